package cf

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The data size worked out from a classic header (NetCDF Classic Format
// Specification) never exceeds the size of a complete file, and ncgen's
// classic files end exactly where their last variable's data ends or
// within its 4-byte padding.
func TestClassicSizeOfCompleteFiles(t *testing.T) {
	t.Parallel()
	var files []string
	fixtures := map[string]bool{}
	for _, name := range []string{"grid_ns_0360", "grid_gauss_extra", "packing", "levels", "calendars", "coords", "month_units", "units"} {
		for _, k := range ncgenKinds[:3] {
			p := fixture(t, name, k)
			files = append(files, p)
			fixtures[p] = true
		}
	}
	if dir := os.Getenv("LIDSCOPE_REALDATA"); dir != "" {
		for _, pat := range []string{"cdf/*.nc", "cdf/*.cdf", "nug/*.nc"} {
			m, _ := filepath.Glob(filepath.Join(dir, pat))
			files = append(files, m...)
		}
	}
	classic := 0
	for _, p := range files {
		data, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		need, ok := classicSize(bytes.NewReader(data))
		if !ok {
			if bytes.HasPrefix(data, []byte("CDF")) {
				t.Errorf("%s: classic header not understood", p)
			}
			continue
		}
		classic++
		if need > int64(len(data)) || fixtures[p] && need < int64(len(data))-3 {
			t.Errorf("%s: header needs %d bytes, file has %d", p, need, len(data))
		}
		if err := checkClassicSize(p); err != nil {
			t.Errorf("complete file refused: %v", err)
		}
	}
	if classic < 24 {
		t.Errorf("only %d classic files checked", classic)
	}
}

// Cut anywhere inside its data, a classic file is refused by Open and
// Inspect, instead of being read with zeros for the missing bytes.
func TestClassicTruncationDetected(t *testing.T) {
	t.Parallel()
	for _, k := range ncgenKinds[:3] {
		src := fixture(t, "grid_ns_0360", k)
		data, err := os.ReadFile(src)
		if err != nil {
			t.Fatal(err)
		}
		need, ok := classicSize(bytes.NewReader(data))
		if !ok || need < int64(len(data))-3 {
			t.Fatalf("%s: header not read (ok %v, need %d of %d bytes)", k, ok, need, len(data))
		}
		dir := t.TempDir()
		for n := len(data) - 1; n > 0; n-- {
			p := filepath.Join(dir, "cut.nc")
			if err := os.WriteFile(p, data[:n], 0o644); err != nil {
				t.Fatal(err)
			}
			f, err := Open([]string{p}, Spec{Role: RoleSST})
			if int64(n) < need {
				if err == nil {
					f.Close()
					t.Fatalf("%s cut to %d of %d bytes (data need %d) opened", k, n, len(data), need)
				}
				if rep := Inspect(p); rep.Usable {
					t.Fatalf("%s cut to %d bytes reported usable", k, n)
				}
				if n == len(data)-1 && !strings.Contains(err.Error(), "is truncated") {
					t.Errorf("cut by one byte: %v", err)
				}
			} else if err == nil {
				f.Close()
			}
		}
	}
}

// FuzzClassicSize: any bytes after a classic magic number give a verdict
// or none, never a panic.
func FuzzClassicSize(f *testing.F) {
	for _, k := range []string{"classic", "64-bit offset", "cdf5"} {
		data, err := os.ReadFile(fixture(f, "grid_ns_0360", k))
		if err != nil {
			f.Fatal(err)
		}
		f.Add(data)
	}
	f.Add([]byte("CDF\x01"))
	f.Add([]byte("CDF\x05\xff\xff\xff\xff\xff\xff\xff\xff"))
	f.Fuzz(func(t *testing.T, b []byte) {
		need, ok := classicSize(bytes.NewReader(b))
		if ok && need < 0 {
			t.Fatalf("negative size %d", need)
		}
	})
}
