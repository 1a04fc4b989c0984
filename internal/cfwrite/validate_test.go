package cfwrite_test

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"lidscope/internal/cfwrite"
	"lidscope/netcdf"
)

// TestCreateOptionErrors checks the Options that Create refuses.
func TestCreateOptionErrors(t *testing.T) {
	cases := []struct {
		name string
		edit func(*cfwrite.Options)
		want string
	}{
		{"no title", func(o *cfwrite.Options) { o.Title = " " }, "Options.Title is empty"},
		{"deflate level", func(o *cfwrite.Options) { o.DeflateLevel = 10 }, "DeflateLevel 10 is outside 1–9"},
		{"reserved global", func(o *cfwrite.Options) { o.Attributes = map[string]any{"history": "x"} }, `"history" is set by the writer`},
		{"bad global name", func(o *cfwrite.Options) { o.Attributes = map[string]any{"_x": "y"} }, "must begin with a letter"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			o := fixOptions()
			c.edit(&o)
			_, err := cfwrite.Create(filepath.Join(dir, "out.nc"), o)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("error %v, want one containing %q", err, c.want)
			}
			if !strings.Contains(err.Error(), "out.nc") {
				t.Errorf("error %q does not name the file", err)
			}
			if names := dirNames(t, dir); len(names) != 0 {
				t.Errorf("directory holds %v", names)
			}
		})
	}
	if _, err := cfwrite.Create(filepath.Join(t.TempDir(), "no", "such", "dir.nc"), fixOptions()); err == nil ||
		!strings.Contains(err.Error(), "directory must exist") {
		t.Errorf("Create in a missing directory: %v", err)
	}
}

// TestDeclarationErrors checks that malformed declarations are refused
// with a message naming what was wrong (the CF-1.10 rule is cited in each
// message), and that the failed writer leaves nothing behind.
func TestDeclarationErrors(t *testing.T) {
	grid := cfwrite.Grid{Lat: fixLat, Lon: fixLon}
	tax := cfwrite.TimeAxis{Units: "days since 1979-01-01", Calendar: "standard"}
	mapVar := func(edit func(*cfwrite.VarSpec)) func(w *cfwrite.Writer) error {
		return func(w *cfwrite.Writer) error {
			if err := w.SetGrid(grid); err != nil {
				return err
			}
			if err := w.SetTime(tax); err != nil {
				return err
			}
			s := cfwrite.VarSpec{Name: "sst", Dims: []string{"time", "lat", "lon"}, Units: "K", LongName: "sst"}
			edit(&s)
			_, err := w.AddVar(s)
			return err
		}
	}
	cases := []struct {
		name string
		run  func(w *cfwrite.Writer) error
		want string
	}{
		{"latitude range", func(w *cfwrite.Writer) error {
			return w.SetGrid(cfwrite.Grid{Lat: []float64{0, 91}, Lon: fixLon})
		}, "outside [-90, 90]"},
		{"latitude order", func(w *cfwrite.Writer) error {
			return w.SetGrid(cfwrite.Grid{Lat: []float64{0, 10, 5}, Lon: fixLon})
		}, "strictly monotonic"},
		{"single latitude without bounds", func(w *cfwrite.Writer) error {
			return w.SetGrid(cfwrite.Grid{Lat: []float64{0}, Lon: fixLon})
		}, "give the bounds"},
		{"centre outside bounds", func(w *cfwrite.Writer) error {
			return w.SetGrid(cfwrite.Grid{Lat: fixLat, Lon: fixLon, LonBounds: [][2]float64{{0, 1}, {1, 2}, {2, 3}, {3, 4}}})
		}, "outside its bounds"},
		{"longitude span", func(w *cfwrite.Writer) error {
			return w.SetGrid(cfwrite.Grid{Lat: fixLat, Lon: []float64{0, 200, 400}})
		}, "more than 360"},
		{"pressure out of range", func(w *cfwrite.Writer) error {
			return w.SetLevels(cfwrite.Levels{Pa: []float64{100000, 250000}})
		}, "levels are in Pa"},
		{"time units", func(w *cfwrite.Writer) error {
			return w.SetTime(cfwrite.TimeAxis{Units: "days after 1979-01-01", Calendar: "standard"})
		}, `not of the form "<unit> since <date>"`},
		{"months", func(w *cfwrite.Writer) error {
			return w.SetTime(cfwrite.TimeAxis{Units: "months since 1979-01-01", Calendar: "standard"})
		}, "not a calendar interval"},
		{"no calendar", func(w *cfwrite.Writer) error {
			return w.SetTime(cfwrite.TimeAxis{Units: "days since 1979-01-01"})
		}, "no calendar given"},
		{"unknown calendar", func(w *cfwrite.Writer) error {
			return w.SetTime(cfwrite.TimeAxis{Units: "days since 1979-01-01", Calendar: "lunar"})
		}, `calendar "lunar" is not one of`},
		{"date not in calendar", func(w *cfwrite.Writer) error {
			return w.SetTime(cfwrite.TimeAxis{Units: "days since 1979-02-29", Calendar: "standard"})
		}, "1979-02 has 28 days in the standard calendar"},
		{"bounded step on unbounded axis", func(w *cfwrite.Writer) error {
			if err := w.SetTime(tax); err != nil {
				return err
			}
			_, err := w.AppendTimeBounded(1, 0, 2)
			return err
		}, "declared without bounds"},
		{"unbounded step on bounded axis", func(w *cfwrite.Writer) error {
			if err := w.SetTime(cfwrite.TimeAxis{Units: tax.Units, Calendar: tax.Calendar, Bounds: true}); err != nil {
				return err
			}
			_, err := w.AppendTime(1)
			return err
		}, "append steps with AppendTimeBounded"},
		{"empty time bounds", func(w *cfwrite.Writer) error {
			if err := w.SetTime(cfwrite.TimeAxis{Units: tax.Units, Calendar: tax.Calendar, Bounds: true}); err != nil {
				return err
			}
			_, err := w.AppendTimeBounded(1, 2, 2)
			return err
		}, "lower < upper"},
		{"append without axis", func(w *cfwrite.Writer) error {
			_, err := w.AppendTime(0)
			return err
		}, "call SetTime first"},
		{"grid twice", func(w *cfwrite.Writer) error {
			if err := w.SetGrid(grid); err != nil {
				return err
			}
			return w.SetGrid(grid)
		}, "already used"},
		{"meaning with a blank", func(w *cfwrite.Writer) error {
			return w.AddCategories(cfwrite.Categories{Name: "regime", Meanings: []string{"deep convection", "subsidence"}})
		}, "join words with '_'"},
		{"category values", func(w *cfwrite.Writer) error {
			return w.AddCategories(cfwrite.Categories{Name: "regime", Meanings: []string{"a", "b"}, Values: []int{1, 1}})
		}, "values must increase strictly"},
		{"axis name", func(w *cfwrite.Writer) error {
			return w.AddAxis(cfwrite.Axis{Name: "2bins", Values: []float64{1, 2}})
		}, "must begin with a letter"},
		{"axis reserved attribute", func(w *cfwrite.Writer) error {
			return w.AddAxis(cfwrite.Axis{Name: "bin", Values: []float64{1, 2}, Attributes: map[string]any{"units": "K"}})
		}, `"units" is set by the writer`},
		{"scalar positive", func(w *cfwrite.Writer) error {
			s := cfwrite.PressureCoord("plev", 70000)
			s.Positive = "downward"
			return w.AddScalarCoord(s)
		}, `positive "downward"`},
		{"no units", mapVar(func(s *cfwrite.VarSpec) { s.Units = "" }), "Units is empty"},
		{"no name", mapVar(func(s *cfwrite.VarSpec) { s.LongName = "" }), "LongName or a StandardName"},
		{"standard name form", mapVar(func(s *cfwrite.VarSpec) { s.StandardName = "sea surface temperature" }), "not of the form CF standard names have"},
		{"unknown dimension", mapVar(func(s *cfwrite.VarSpec) { s.Dims = []string{"time", "lat", "longitude"} }), `dimension "longitude" is not declared`},
		{"time not first", mapVar(func(s *cfwrite.VarSpec) { s.Dims = []string{"lat", "lon", "time"} }), "time must be the first dimension"},
		{"lon before lat", mapVar(func(s *cfwrite.VarSpec) { s.Dims = []string{"time", "lon", "lat"} }), "T, Z, Y, X"},
		{"repeated dimension", mapVar(func(s *cfwrite.VarSpec) { s.Dims = []string{"time", "lat", "lat"} }), "appears twice"},
		{"cell method", mapVar(func(s *cfwrite.VarSpec) { s.CellMethods = "time: average" }), `"average" is not a CF cell method`},
		{"coordinates", mapVar(func(s *cfwrite.VarSpec) { s.Coordinates = "plev" }), `"plev", which is not a variable`},
		{"reserved attribute", mapVar(func(s *cfwrite.VarSpec) { s.Attributes = map[string]any{"_FillValue": 1.0} }), "must begin with a letter"},
		{"attribute type", mapVar(func(s *cfwrite.VarSpec) { s.Attributes = map[string]any{"flag": struct{}{}} }), "Go type struct {} are not supported"},
		{"int attribute too big", mapVar(func(s *cfwrite.VarSpec) { s.Attributes = map[string]any{"n": 1 << 40} }), "does not fit the 32-bit"},
		{"fill not float32", mapVar(func(s *cfwrite.VarSpec) { s.Fill = 1e300 }), "not a finite float32"},
		{"chunks", mapVar(func(s *cfwrite.VarSpec) { s.Chunks = []int{1, 3} }), "has 2 sizes for 3 dimensions"},
		{"name clash", mapVar(func(s *cfwrite.VarSpec) { s.Name = "lat_bnds" }), "already used by the grid"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			w, err := cfwrite.Create(filepath.Join(dir, "out.nc"), fixOptions())
			must(t, err)
			err = c.run(w)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("error %v, want one containing %q", err, c.want)
			}
			if !strings.Contains(err.Error(), "out.nc") {
				t.Errorf("error %q does not name the file", err)
			}
			if names := dirNames(t, dir); len(names) != 0 {
				t.Errorf("after the error the directory holds %v", names)
			}
			if w.Err() == nil || w.Close() == nil {
				t.Error("the error is not final")
			}
		})
	}
}

// TestWholeAndSeriesWrites covers Write on a variable over time, a scalar
// data variable and NoDeflate.
func TestWholeAndSeriesWrites(t *testing.T) {
	path := tempPath(t, "series.nc")
	o := fixOptions()
	o.DeflateLevel = cfwrite.NoDeflate
	w, err := cfwrite.Create(path, o)
	must(t, err)
	defer w.Abort()
	must(t, w.SetTime(cfwrite.TimeAxis{Units: "hours since 2001-01-01T00:00:00Z", Calendar: "360_day"}))
	series, err := w.AddVar(cfwrite.VarSpec{Name: "eis_mean", Dims: []string{"time"}, Units: "K", LongName: "mean EIS"})
	must(t, err)
	scalar, err := w.AddVar(cfwrite.VarSpec{Name: "sst_threshold", Units: "K", LongName: "regime threshold on relative SST", Type: cfwrite.Float64})
	must(t, err)
	for s := range 5 {
		if _, err := w.AppendTime(float64(24 * s)); err != nil {
			t.Fatal(err)
		}
	}
	if got := series.Shape(); len(got) != 1 || got[0] != 5 {
		t.Errorf("Shape %v, want [5]", got)
	}
	if err := series.Write([]float64{1, 2, 3, 4}); err == nil || !strings.Contains(err.Error(), "got 4 values, the variable holds 5 (time = 5)") {
		t.Fatalf("short Write: %v", err)
	}
	// That error was final; start again.
	w, err = cfwrite.Create(path, o)
	must(t, err)
	defer w.Abort()
	must(t, w.SetTime(cfwrite.TimeAxis{Units: "hours since 2001-01-01T00:00:00Z", Calendar: "360_day"}))
	series, _ = w.AddVar(cfwrite.VarSpec{Name: "eis_mean", Dims: []string{"time"}, Units: "K", LongName: "mean EIS"})
	scalar, _ = w.AddVar(cfwrite.VarSpec{Name: "sst_threshold", Units: "K", LongName: "regime threshold on relative SST", Type: cfwrite.Float64})
	for s := range 5 {
		must(t, func() error { _, err := w.AppendTime(float64(24 * s)); return err }())
	}
	must(t, series.Write([]float64{1, 2, 3, 4.5, 5}))
	must(t, scalar.Write([]float64{0.5}))
	must(t, w.Close())
}

// TestHistory: the new history line comes first, the input's history is
// kept below it (CF-1.10 §2.6.2), and a nil Command records os.Args.
func TestHistory(t *testing.T) {
	path := tempPath(t, "h.nc")
	o := fixOptions()
	o.Command = nil
	o.InputHistory = "Mon Jan  1 00:00:00 2024: some earlier step\n"
	w, err := cfwrite.Create(path, o)
	must(t, err)
	v, err := w.AddVar(cfwrite.VarSpec{Name: "x", Units: "1", LongName: "x"})
	must(t, err)
	must(t, v.Write([]float64{1}))
	must(t, w.Close())
	f, err := netcdf.Open(path)
	must(t, err)
	defer f.Close()
	a, err := f.Attr("history")
	must(t, err)
	h, _ := a.Text()
	first, rest, _ := strings.Cut(h, "\n")
	if !strings.HasPrefix(first, "2026-03-04T05:06:07Z: "+os.Args[0]) {
		t.Errorf("history line %q does not start with the timestamp and os.Args[0] %q", first, os.Args[0])
	}
	if rest != "Mon Jan  1 00:00:00 2024: some earlier step" {
		t.Errorf("earlier history kept as %q", rest)
	}
}

// TestConcurrentVariables writes two variables from two goroutines; run
// with -race to check the locking.
func TestConcurrentVariables(t *testing.T) {
	path := tempPath(t, "c.nc")
	w, err := cfwrite.Create(path, fixOptions())
	must(t, err)
	defer w.Abort()
	must(t, w.SetGrid(cfwrite.Grid{Lat: fixLat, Lon: fixLon}))
	must(t, w.SetTime(cfwrite.TimeAxis{Units: "days since 1979-01-01", Calendar: "standard"}))
	var vs [2]*cfwrite.Var
	for i := range vs {
		vs[i], err = w.AddVar(cfwrite.VarSpec{Name: fmt.Sprintf("v%d", i), Dims: []string{"time", "lat", "lon"}, Units: "1", LongName: "v"})
		must(t, err)
	}
	for s := range 4 {
		_, err := w.AppendTime(float64(s))
		must(t, err)
	}
	var wg sync.WaitGroup
	errs := make(chan error, 8)
	for i := range vs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for s := range 4 {
				d := make([]float64, 12)
				for k := range d {
					d[k] = float64(100*i + 10*s + k)
				}
				errs <- vs[i].WriteStep(s, d)
			}
		}()
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		must(t, err)
	}
	must(t, w.Close())
	f, err := netcdf.Open(path)
	must(t, err)
	defer f.Close()
	for i := range vs {
		v, err := f.Var(fmt.Sprintf("v%d", i))
		must(t, err)
		x, err := v.ReadAllFloat64()
		must(t, err)
		for j, got := range x {
			if want := float64(100*i + 10*(j/12) + j%12); got != want {
				t.Fatalf("v%d[%d] = %g, want %g", i, j, got, want)
			}
		}
	}
}
