package cf

import (
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/internal/testutil"
	"lidscope/netcdf"
)

// Kinds of ncgen output (ncgen -k), one per on-disk format.
var ncgenKinds = []string{"classic", "64-bit offset", "cdf5", "netCDF-4"}

// cdlFor prepares CDL text for an ncgen kind: lines marked "// nc4" carry
// NetCDF-4-only special attributes (_DeflateLevel, _Shuffle) and are kept
// only for the netCDF-4 kind.
func cdlFor(cdl, kind string) string {
	if kind == "netCDF-4" {
		return cdl
	}
	var b strings.Builder
	for _, line := range strings.SplitAfter(cdl, "\n") {
		if strings.Contains(line, "// nc4") {
			continue
		}
		b.WriteString(line)
	}
	return b.String()
}

// ncgen compiles CDL text into a file of the given kind in a temporary
// folder and returns its path.
func ncgen(t testing.TB, cdl, kind, name string) string {
	t.Helper()
	tool := testutil.Tool(t, "ncgen")
	dir := t.TempDir()
	src := filepath.Join(dir, name+".cdl")
	if err := os.WriteFile(src, []byte(cdlFor(cdl, kind)), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, name+".nc")
	if b, err := exec.Command(tool, "-k", kind, "-o", out, src).CombinedOutput(); err != nil {
		t.Fatalf("ncgen -k %q %s: %v\n%s", kind, name, err, b)
	}
	return out
}

// fixture compiles testdata/<name>.cdl with the given ncgen kind.
func fixture(t testing.TB, name, kind string) string {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("testdata", name+".cdl"))
	if err != nil {
		t.Fatal(err)
	}
	return ncgen(t, string(b), kind, name)
}

// eachKind runs f on testdata/<name>.cdl compiled in every on-disk format.
func eachKind(t *testing.T, name string, f func(t *testing.T, path string)) {
	for _, k := range ncgenKinds {
		t.Run(strings.ReplaceAll(k, " ", "_"), func(t *testing.T) {
			f(t, fixture(t, name, k))
		})
	}
}

// mustOpen opens one file for a spec and closes it at the end of the test.
func mustOpen(t testing.TB, path string, spec Spec) *Field {
	t.Helper()
	f, err := Open([]string{path}, spec)
	if err != nil {
		t.Fatalf("Open(%s, %+v): %v", path, spec, err)
	}
	t.Cleanup(func() { f.Close() })
	return f
}

// slab reads time step ts of f.
func slab(t testing.TB, f *Field, ts int) []float32 {
	t.Helper()
	buf := make([]float32, f.Len())
	if err := f.ReadSlab(ts, buf, nil); err != nil {
		t.Fatalf("ReadSlab(%d): %v", ts, err)
	}
	return buf
}

// nan marks an expected missing value in tables.
var nan = math.NaN()

// sameValues compares a slab with expected values (NaN matches NaN) within
// an absolute tolerance, reporting every differing cell.
func sameValues(t testing.TB, got []float32, want []float64, tol float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("got %d cells %v, want %d %v", len(got), got, len(want), want)
	}
	for i := range want {
		g := float64(got[i])
		switch {
		case math.IsNaN(want[i]) && math.IsNaN(g):
		case math.IsNaN(want[i]) != math.IsNaN(g) || math.Abs(g-want[i]) > tol:
			t.Errorf("cell %d: got %v, want %v", i, g, want[i])
		}
	}
}

func sameFloats(t testing.TB, what string, got, want []float64, tol float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%s: got %v, want %v", what, got, want)
	}
	for i := range want {
		if math.Abs(got[i]-want[i]) > tol {
			t.Errorf("%s[%d]: got %v, want %v", what, i, got[i], want[i])
		}
	}
}

func sameBounds(t testing.TB, what string, got, want [][2]float64, tol float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%s: got %v, want %v", what, got, want)
	}
	for i := range want {
		if math.Abs(got[i][0]-want[i][0]) > tol || math.Abs(got[i][1]-want[i][1]) > tol {
			t.Errorf("%s[%d]: got %v, want %v", what, i, got[i], want[i])
		}
	}
}

func hasNote(notes []string, part string) bool {
	for _, n := range notes {
		if strings.Contains(n, part) {
			return true
		}
	}
	return false
}

// errHas checks that err is non-nil and mentions every part.
func errHas(t testing.TB, err error, parts ...string) {
	t.Helper()
	if err == nil {
		t.Fatalf("expected an error mentioning %q, got none", parts)
	}
	for _, p := range parts {
		if !strings.Contains(err.Error(), p) {
			t.Errorf("error does not mention %q:\n%v", p, err)
		}
	}
}

// mustOpenNC opens a netCDF file for the length of the test.
func mustOpenNC(t testing.TB, path string) *netcdf.File {
	t.Helper()
	nf, err := netcdf.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { nf.Close() })
	return nf
}
