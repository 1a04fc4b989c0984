package netcdf

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"lidscope/internal/testutil"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"strings"
	"sync"
	"syscall"
	"testing"
)

// writeSample creates a small file with every attribute type and a 3-D
// variable over an unlimited time dimension.
func writeSample(t testing.TB, path string, format Format) {
	t.Helper()
	f, err := CreateFormat(path, format)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := f.DefDim("time", Unlimited); err != nil {
		t.Fatal(err)
	}
	if _, err := f.DefDim("lat", 3); err != nil {
		t.Fatal(err)
	}
	if _, err := f.DefDim("lon", 4); err != nil {
		t.Fatal(err)
	}
	v, err := f.DefVar("sst", Float, []string{"time", "lat", "lon"})
	if err != nil {
		t.Fatal(err)
	}
	if format == FormatNetCDF4 {
		if err := v.SetChunking([]int{1, 3, 4}); err != nil {
			t.Fatal(err)
		}
		if err := v.SetDeflate(true, 4); err != nil {
			t.Fatal(err)
		}
	}
	must := func(err error) {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
	}
	must(v.PutAttr("units", "K"))
	must(v.PutAttr("_FillValue", float32(-999)))
	must(v.PutAttr("valid_range", []float32{250, 320}))
	must(v.PutAttr("scale_i16", []int16{-3, 7}))
	must(v.PutAttr("an_int", 42))
	must(v.PutAttr("a_double", 2.5))
	must(v.PutAttr("a_byte", int8(-5)))
	must(f.PutAttr("Conventions", "CF-1.10"))
	if format == FormatNetCDF4 {
		must(f.PutAttr("strings", []string{"alpha", "beta"}))
		must(v.PutAttr("u64", []uint64{1 << 40}))
		must(v.PutAttr("u8", []uint8{1, 2, 255}))
	}
	must(f.EndDef())
	for step := 0; step < 2; step++ {
		buf := make([]float32, 12)
		for i := range buf {
			buf[i] = float32(270 + 10*step + i)
		}
		must(v.WriteFloat32([]int{step, 0, 0}, []int{1, 3, 4}, buf))
	}
	must(f.Close())
}

func TestRoundTripFormats(t *testing.T) {
	for _, fm := range []Format{FormatClassic, Format64BitOffset, FormatCDF5, FormatNetCDF4, FormatNetCDF4Classic} {
		t.Run(fm.String(), func(t *testing.T) {
			path := filepath.Join(t.TempDir(), "s.nc")
			writeSample(t, path, fm)
			f, err := Open(path)
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			got, err := f.Format()
			if err != nil || got != fm {
				t.Fatalf("format = %v, %v; want %v", got, err, fm)
			}
			dims, err := f.Dims()
			if err != nil {
				t.Fatal(err)
			}
			if len(dims) != 3 || !dims[0].Unlimited || dims[0].Len != 2 || dims[1].Len != 3 || dims[2].Unlimited {
				t.Fatalf("dims = %+v", dims)
			}
			v, err := f.Var("sst")
			if err != nil {
				t.Fatal(err)
			}
			if v.Type != Float || !reflect.DeepEqual(v.Shape(), []int{2, 3, 4}) {
				t.Fatalf("var = %+v shape %v", v, v.Shape())
			}
			buf := make([]float64, 4)
			if err := v.ReadFloat64([]int{1, 2, 0}, []int{1, 1, 4}, buf); err != nil {
				t.Fatal(err)
			}
			if want := []float64{288, 289, 290, 291}; !reflect.DeepEqual(buf, want) {
				t.Fatalf("read = %v, want %v", buf, want)
			}
			a, err := v.Attr("units")
			if s, ok := a.Text(); err != nil || !ok || s != "K" {
				t.Fatalf("units = %v %v", a, err)
			}
			a, _ = v.Attr("valid_range")
			if fs, ok := a.Float64s(); !ok || !reflect.DeepEqual(fs, []float64{250, 320}) || a.Type != Float {
				t.Fatalf("valid_range = %+v", a)
			}
			a, _ = v.Attr("an_int")
			if a.Type != Int || !reflect.DeepEqual(a.Value, []int32{42}) {
				t.Fatalf("an_int = %+v", a)
			}
			a, _ = v.Attr("a_byte")
			if a.Type != Byte || !reflect.DeepEqual(a.Value, []int8{-5}) {
				t.Fatalf("a_byte = %+v", a)
			}
			if fm == FormatNetCDF4 {
				a, err = f.Attr("strings")
				if err != nil || a.Type != String || !reflect.DeepEqual(a.Value, []string{"alpha", "beta"}) {
					t.Fatalf("strings = %+v %v", a, err)
				}
				a, _ = v.Attr("u64")
				if !reflect.DeepEqual(a.Value, []uint64{1 << 40}) {
					t.Fatalf("u64 = %+v", a)
				}
				sh, df, lv, err := v.Deflate()
				if err != nil || !sh || !df || lv != 4 {
					t.Fatalf("deflate = %v %v %v %v", sh, df, lv, err)
				}
			}
			as, err := v.Attrs()
			if err != nil || len(as) != v.NAtts {
				t.Fatalf("attrs: %d of %d, %v", len(as), v.NAtts, err)
			}
		})
	}
}

// TestNcdumpReadsWhatWeWrite checks our writer against ncdump, the netCDF
// reference dumper (Unidata netcdf-bin).
func TestNcdumpReadsWhatWeWrite(t *testing.T) {
	ncdump := testutil.Tool(t, "ncdump")
	path := filepath.Join(t.TempDir(), "s.nc")
	writeSample(t, path, FormatNetCDF4)
	out, err := exec.Command(ncdump, "-s", path).CombinedOutput()
	if err != nil {
		t.Fatalf("ncdump: %v\n%s", err, out)
	}
	text := string(out)
	for _, want := range []string{
		"time = UNLIMITED ; // (2 currently)",
		"float sst(time, lat, lon) ;",
		`sst:units = "K" ;`,
		"sst:_DeflateLevel = 4 ;",
		`sst:_Shuffle = "true" ;`,
		`string :strings = "alpha", "beta" ;`,
		"280, 281, 282, 283,",
	} {
		if !strings.Contains(text, want) {
			t.Errorf("ncdump output lacks %q:\n%s", want, text)
		}
	}
}

// TestReadNcgenFile reads a file compiled by ncgen (netcdf-bin), written by
// the reference tool rather than by us.
func TestReadNcgenFile(t *testing.T) {
	ncgen := testutil.Tool(t, "ncgen")
	dir := t.TempDir()
	cdl := `netcdf x {
dimensions: n = 3 ;
variables:
  short v(n) ; v:scale_factor = 0.5 ; v:add_offset = 10. ; v:title = "packed" ;
data: v = -1, 0, 32767 ;
}`
	for _, kind := range []string{"classic", "64-bit offset", "cdf5", "netCDF-4", "netCDF-4 classic model"} {
		src := filepath.Join(dir, "x.cdl")
		os.WriteFile(src, []byte(cdl), 0o644)
		nc := filepath.Join(dir, strings.ReplaceAll(kind, " ", "_")+".nc")
		if out, err := exec.Command(ncgen, "-k", kind, "-o", nc, src).CombinedOutput(); err != nil {
			t.Fatalf("ncgen -k %s: %v %s", kind, err, out)
		}
		f, err := Open(nc)
		if err != nil {
			t.Fatal(err)
		}
		v, err := f.Var("v")
		if err != nil {
			t.Fatal(err)
		}
		got, err := v.ReadAllFloat64()
		if err != nil || !reflect.DeepEqual(got, []float64{-1, 0, 32767}) || v.Type != Short {
			t.Fatalf("%s: %v %v %v", kind, got, err, v.Type)
		}
		f.Close()
	}
}

func TestErrorsAreTyped(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "s.nc")
	writeSample(t, path, FormatNetCDF4)
	f, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	_, err = f.Var("nope")
	if !errors.Is(err, ErrNotVar) || !strings.Contains(err.Error(), "nope") || !strings.Contains(err.Error(), path) {
		t.Errorf("missing variable: %v", err)
	}
	v, _ := f.Var("sst")
	_, err = v.Attr("nope")
	if !errors.Is(err, ErrNotAttr) || !strings.Contains(err.Error(), "sst:nope") {
		t.Errorf("missing attribute: %v", err)
	}
	if err := v.ReadFloat32([]int{5, 0, 0}, []int{1, 3, 4}, make([]float32, 12)); err == nil {
		t.Error("read past the end succeeded")
	}
	if err := v.ReadFloat32([]int{0, 0, 0}, []int{1, 3, 4}, make([]float32, 11)); err == nil {
		t.Error("short buffer accepted")
	}
	junk := filepath.Join(dir, "junk.nc")
	os.WriteFile(junk, []byte("this is not a netCDF file at all, just text"), 0o644)
	if _, err := Open(junk); !errors.Is(err, ErrNotNetCDF) {
		t.Errorf("junk file: %v", err)
	}
	if _, err := Open(filepath.Join(dir, "absent.nc")); !errors.Is(err, ErrNoSuchFile) {
		t.Errorf("absent file: %v", err)
	}
}

func TestTruncatedFileIsAnError(t *testing.T) {
	dir := t.TempDir()
	for _, fm := range []Format{FormatClassic, FormatNetCDF4} {
		path := filepath.Join(dir, fmt.Sprintf("s%d.nc", fm))
		writeSample(t, path, fm)
		b, _ := os.ReadFile(path)
		for _, keep := range []int{0, 8, len(b) / 3, len(b) - 5} {
			tp := filepath.Join(dir, fmt.Sprintf("t%d_%d.nc", fm, keep))
			os.WriteFile(tp, b[:keep], 0o644)
			f, err := Open(tp)
			if err != nil {
				continue // an error is the right answer
			}
			v, err := f.Var("sst")
			if err == nil {
				buf := make([]float32, 24)
				err = v.ReadFloat32([]int{0, 0, 0}, []int{2, 3, 4}, buf)
			}
			f.Close()
			if err == nil && keep < len(b)/2 {
				t.Errorf("%v truncated to %d bytes read without error", fm, keep)
			}
		}
	}
}

// TestConcurrentUseIsSafeAndSilent reads from many goroutines at once,
// including failing opens of damaged NetCDF-4 files that make HDF5 raise
// errors, and checks the data and that HDF5 printed no diagnostics to the
// process's stderr (which it does on any thread where netCDF-C did not turn
// HDF5's error printing off).
func TestConcurrentUseIsSafeAndSilent(t *testing.T) {
	dir := t.TempDir()
	var paths []string
	for i := 0; i < 4; i++ {
		p := filepath.Join(dir, fmt.Sprintf("c%d.nc", i))
		writeSample(t, p, FormatNetCDF4)
		paths = append(paths, p)
	}
	b, _ := os.ReadFile(paths[0])
	bad := filepath.Join(dir, "bad.nc")
	os.WriteFile(bad, b[:len(b)/2], 0o644)

	// Capture file descriptor 2 (where the C libraries write).
	r, w, err := os.Pipe()
	if err != nil {
		t.Fatal(err)
	}
	saved, err := syscall.Dup(2)
	if err != nil {
		t.Fatal(err)
	}
	if err := syscall.Dup2(int(w.Fd()), 2); err != nil {
		t.Fatal(err)
	}
	var captured bytes.Buffer
	copied := make(chan struct{})
	go func() { io.Copy(&captured, r); close(copied) }()

	var wg sync.WaitGroup
	errs := make(chan error, 64)
	for g := 0; g < 32; g++ {
		wg.Add(1)
		go func(g int) {
			defer wg.Done()
			for k := 0; k < 20; k++ {
				if _, err := Open(bad); err == nil {
					errs <- fmt.Errorf("damaged file opened")
				}
				f, err := Open(paths[(g+k)%len(paths)])
				if err != nil {
					errs <- err
					return
				}
				v, err := f.Var("sst")
				if err != nil {
					errs <- err
					return
				}
				buf := make([]float32, 12)
				if err := v.ReadFloat32([]int{1, 0, 0}, []int{1, 3, 4}, buf); err != nil {
					errs <- err
					return
				}
				for i, x := range buf {
					if x != float32(280+i) {
						errs <- fmt.Errorf("value %d = %v", i, x)
						return
					}
				}
				f.Close()
			}
		}(g)
	}
	wg.Wait()
	syscall.Dup2(saved, 2)
	syscall.Close(saved)
	w.Close()
	<-copied
	close(errs)
	for err := range errs {
		t.Error(err)
	}
	if strings.Contains(captured.String(), "HDF5-DIAG") {
		t.Errorf("HDF5 diagnostics were printed:\n%.2000s", captured.String())
	}
	if len(registry) != 0 {
		t.Errorf("%d handles left open", len(registry))
	}
}

func TestSharedHandle(t *testing.T) {
	path := filepath.Join(t.TempDir(), "s.nc")
	writeSample(t, path, FormatNetCDF4)
	a, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	b, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	if a.h != b.h || a.h.refs != 2 {
		t.Fatal("second Open did not share the handle")
	}
	a.Close()
	a.Close() // idempotent
	v, err := b.Var("sst")
	if err != nil {
		t.Fatalf("handle closed under a live reference: %v", err)
	}
	_ = v
	b.Close()
}

func ExampleOpen() {
	dir, _ := os.MkdirTemp("", "example")
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "t.nc")
	f, _ := Create(path)
	f.DefDim("x", 3)
	v, _ := f.DefVar("t", Double, []string{"x"})
	v.PutAttr("units", "K")
	f.EndDef()
	v.WriteFloat64([]int{0}, []int{3}, []float64{280, 290, 300})
	f.Close()

	g, err := Open(path)
	if err != nil {
		fmt.Println(err)
		return
	}
	defer g.Close()
	t, _ := g.Var("t")
	units, _ := t.Attr("units")
	vals, _ := t.ReadAllFloat64()
	fmt.Println(t.Name, t.Shape(), units, vals)
	// Output: t [3] "K" [280 290 300]
}

// TestSlabTransfers runs each read and write method on an empty slab (a
// no-op), a buffer of the wrong length and a wrong rank (errors naming the
// file and variable), and a whole variable, which reading back
// in the other precision returns unchanged (the values are exact in
// both float32 and float64).
func TestSlabTransfers(t *testing.T) {
	path := filepath.Join(t.TempDir(), "slab.nc")
	f, err := Create(path)
	if err != nil {
		t.Fatal(err)
	}
	f.DefDim("y", 2)
	f.DefDim("x", 3)
	v32, err := f.DefVar("f32", Float, []string{"y", "x"})
	if err != nil {
		t.Fatal(err)
	}
	v64, err := f.DefVar("f64", Double, []string{"y", "x"})
	if err != nil {
		t.Fatal(err)
	}
	if err := f.EndDef(); err != nil {
		t.Fatal(err)
	}
	want := []float64{1.5, -2, 3.25, 1e6, 0, -0.125}
	want32 := make([]float32, len(want))
	for i, x := range want {
		want32[i] = float32(x)
	}
	type op struct {
		name string
		call func(start, count []int, n int) error
	}
	ops := []op{
		{"WriteFloat32", func(s, c []int, n int) error { return v32.WriteFloat32(s, c, append([]float32(nil), want32[:n]...)) }},
		{"WriteFloat64", func(s, c []int, n int) error { return v64.WriteFloat64(s, c, append([]float64(nil), want[:n]...)) }},
		{"ReadFloat32", func(s, c []int, n int) error { return v64.ReadFloat32(s, c, make([]float32, n)) }},
		{"ReadFloat64", func(s, c []int, n int) error { return v32.ReadFloat64(s, c, make([]float64, n)) }},
	}
	for _, o := range ops {
		if err := o.call([]int{0, 0}, []int{0, 3}, 0); err != nil {
			t.Errorf("%s of an empty slab: %v", o.name, err)
		}
		if err := o.call([]int{0, 0}, []int{2, 3}, 5); err == nil || !strings.Contains(err.Error(), "buffer holds 5 values") || !strings.Contains(err.Error(), path) {
			t.Errorf("%s with a short buffer: err = %v", o.name, err)
		}
		if err := o.call([]int{0}, []int{3}, 3); err == nil || !strings.Contains(err.Error(), "has 2 dimensions") {
			t.Errorf("%s with the wrong rank: err = %v", o.name, err)
		}
		if o.name[0] == 'W' {
			if err := o.call([]int{0, 0}, []int{2, 3}, 6); err != nil {
				t.Fatalf("%s: %v", o.name, err)
			}
		}
	}
	got64 := make([]float64, 6)
	if err := v32.ReadFloat64([]int{0, 0}, []int{2, 3}, got64); err != nil {
		t.Fatal(err)
	}
	got32 := make([]float32, 6)
	if err := v64.ReadFloat32([]int{0, 0}, []int{2, 3}, got32); err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(got64, want) || !reflect.DeepEqual(got32, want32) {
		t.Errorf("read back %v and %v, want %v", got64, got32, want)
	}
	// A slab past the end is netCDF-C's error, named by the C call.
	if err := v64.ReadFloat64([]int{1, 0}, []int{2, 3}, make([]float64, 6)); err == nil || !strings.Contains(err.Error(), "nc_get_vara_double") {
		t.Errorf("read past the end: err = %v", err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
}
