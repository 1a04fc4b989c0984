package cfwrite_test

import (
	"fmt"
	"log"
	"math"
	"os"
	"path/filepath"

	"lidscope/internal/cfwrite"
	"lidscope/netcdf"
)

// Writing a monthly map time series: one [lat][lon] slab per time step.
// The values are invented (a synthetic scenario).
func Example() {
	dir, err := os.MkdirTemp("", "cfwrite-example")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "eis_maps.nc")

	w, err := cfwrite.Create(path, cfwrite.Options{
		Title:      "Estimated inversion strength, synthetic demo scenario",
		Source:     "lidscope (invented input data)",
		Command:    []string{"lidscope", "demo"},
		Attributes: map[string]any{"lidscope_version": "0.1.0-dev"},
	})
	if err != nil {
		log.Fatal(err)
	}
	defer w.Abort() // removes the temporary file unless Close succeeded

	lat := []float64{-15, -5, 5, 15}
	lon := []float64{0, 60, 120, 180, 240, 300}
	if err := w.SetGrid(cfwrite.Grid{Lat: lat, Lon: lon}); err != nil {
		log.Fatal(err)
	}
	if err := w.SetTime(cfwrite.TimeAxis{Units: "days since 2001-01-01", Calendar: "noleap", Bounds: true}); err != nil {
		log.Fatal(err)
	}
	eis, err := w.AddVar(cfwrite.VarSpec{
		Name: "eis", Dims: []string{cfwrite.DimTime, cfwrite.DimLat, cfwrite.DimLon},
		Units: "K", LongName: "estimated inversion strength",
		CellMethods: "time: mean area: mean where sea",
	})
	if err != nil {
		log.Fatal(err)
	}
	monthStart := []float64{0, 31, 59}
	for m := 0; m < 2; m++ {
		lo, hi := monthStart[m], monthStart[m+1]
		step, err := w.AppendTimeBounded((lo+hi)/2, lo, hi)
		if err != nil {
			log.Fatal(err)
		}
		slab := make([]float64, len(lat)*len(lon))
		for i := range slab {
			slab[i] = 2 + float64(i%len(lon)) + float64(m)/2
		}
		slab[3] = math.NaN() // land: stored as _FillValue
		if err := eis.WriteStep(step, slab); err != nil {
			log.Fatal(err)
		}
	}
	if err := w.Close(); err != nil {
		log.Fatal(err)
	}

	f, err := netcdf.Open(path)
	if err != nil {
		log.Fatal(err)
	}
	defer f.Close()
	v, _ := f.Var("eis")
	fill, _ := v.Attr("_FillValue")
	cal, _ := f.Var("time")
	c, _ := cal.Attr("calendar")
	fmt.Println(v.Name, v.Type, v.Shape(), "_FillValue", fill.Value, "calendar", c)
	// Output: eis float [2 4 6] _FillValue [1e+20] calendar "noleap"
}

// A relationship table over a categorical regime axis and EIS bins.
func ExampleWriter_AddCategories() {
	dir, err := os.MkdirTemp("", "cfwrite-example")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "table.nc")

	w, err := cfwrite.Create(path, cfwrite.Options{Title: "Low cloud by regime and EIS bin, synthetic demo", Command: []string{"lidscope", "demo"}})
	if err != nil {
		log.Fatal(err)
	}
	defer w.Abort()
	if err := w.AddCategories(cfwrite.Categories{
		Name: "regime", LongName: "SST regime",
		Meanings: []string{"convective", "subsidence"},
	}); err != nil {
		log.Fatal(err)
	}
	centres, bounds, err := cfwrite.BinsFromEdges([]float64{0, 2, 4, 6})
	if err != nil {
		log.Fatal(err)
	}
	if err := w.AddAxis(cfwrite.Axis{Name: "eis_bin", Values: centres, Bounds: bounds,
		Units: "K", LongName: "estimated inversion strength bin"}); err != nil {
		log.Fatal(err)
	}
	cl, err := w.AddVar(cfwrite.VarSpec{Name: "low_cloud", Dims: []string{"regime", "eis_bin"},
		Units: "1", LongName: "mean low-cloud fraction"})
	if err != nil {
		log.Fatal(err)
	}
	if err := cl.Write([]float64{0.1, 0.15, math.NaN(), 0.2, 0.3, 0.4}); err != nil {
		log.Fatal(err)
	}
	if err := w.Close(); err != nil {
		log.Fatal(err)
	}

	f, err := netcdf.Open(path)
	if err != nil {
		log.Fatal(err)
	}
	defer f.Close()
	r, _ := f.Var("regime")
	fv, _ := r.Attr("flag_values")
	fm, _ := r.Attr("flag_meanings")
	b, _ := f.Var("eis_bin_bnds")
	edges, _ := b.ReadAllFloat64()
	fmt.Println("flag_values", fv, "flag_meanings", fm)
	fmt.Println("eis_bin_bnds", edges)
	// Output:
	// flag_values [0 1] flag_meanings "convective subsidence"
	// eis_bin_bnds [0 2 2 4 4 6]
}

// Abort discards a file whose computation failed: nothing appears at the
// path.
func ExampleWriter_Abort() {
	dir, err := os.MkdirTemp("", "cfwrite-example")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "never.nc")
	w, err := cfwrite.Create(path, cfwrite.Options{Title: "discarded", Command: []string{"lidscope", "demo"}})
	if err != nil {
		log.Fatal(err)
	}
	w.Abort()
	entries, _ := os.ReadDir(dir)
	fmt.Println(len(entries), "files;", w.Close())
	// Output: 0 files; cfwrite: the writer is already closed or aborted
}
