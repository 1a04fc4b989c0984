package cfwrite_test

import (
	"math"
	"os"
	"path/filepath"
	"testing"
	"time"

	"lidscope/internal/cfwrite"
)

// Synthetic-truth fixtures: invented values, chosen to be exact in float32
// so that a read-back can be compared with ==.

var (
	fixLat     = []float64{10, 0, -10} // decreasing, as many reanalyses store it
	fixLon     = []float64{0, 90, 180, 270}
	fixCreated = time.Date(2026, 3, 4, 5, 6, 7, 0, time.UTC)
	fixCommand = []string{"lidscope", "maps", "--in", "sst file.nc"}
)

// fixSST is the synthetic SST of step s at flat index k ([lat][lon]); NaN
// marks land.
func fixSST(s, k int) float64 {
	if k == 5 || (s == 1 && k == 10) {
		return math.NaN()
	}
	return 290 + float64(k) + float64(s)/4
}

func fixOptions() cfwrite.Options {
	return cfwrite.Options{
		Title:       "lidscope synthetic test field (invented data)",
		Institution: "lidscope test suite",
		Source:      "lidscope cfwrite tests",
		Command:     fixCommand,
		Created:     fixCreated,
		Attributes:  map[string]any{"lidscope_version": "0.0-test", "input_files": "none (synthetic)"},
	}
}

// writeMaps writes the map fixture: a 3×4 grid, two monthly steps with
// bounds on a "days since 1979-01-01" standard axis, SST with missing values
// and a 700 hPa temperature with a scalar pressure coordinate, plus a
// float64 time series.
func writeMaps(t testing.TB, path string, calendar string) {
	t.Helper()
	w, err := cfwrite.Create(path, fixOptions())
	if err != nil {
		t.Fatal(err)
	}
	defer w.Abort()
	must(t, w.SetGrid(cfwrite.Grid{Lat: fixLat, Lon: fixLon}))
	must(t, w.SetTime(cfwrite.TimeAxis{Units: "days since 1979-01-01", Calendar: calendar, Bounds: true}))
	must(t, w.AddScalarCoord(cfwrite.PressureCoord("plev", 70000)))
	sst, err := w.AddVar(cfwrite.VarSpec{
		Name: "sst", Dims: []string{cfwrite.DimTime, cfwrite.DimLat, cfwrite.DimLon},
		Units: "K", StandardName: "sea_surface_temperature", LongName: "sea surface temperature",
		CellMethods: "time: mean area: mean where sea",
		Attributes:  map[string]any{"valid_min": 260.0, "comment": "invented values"},
	})
	must(t, err)
	ta, err := w.AddVar(cfwrite.VarSpec{
		Name: "ta700", Dims: []string{cfwrite.DimTime, cfwrite.DimLat, cfwrite.DimLon},
		Units: "K", StandardName: "air_temperature", LongName: "air temperature at 700 hPa",
		Coordinates: "plev", CellMethods: "time: mean",
	})
	must(t, err)
	mean, err := w.AddVar(cfwrite.VarSpec{
		Name: "sst_tropmean", Dims: []string{cfwrite.DimTime}, Type: cfwrite.Float64,
		Units: "K", LongName: "tropical-mean sea surface temperature",
		CellMethods: "time: mean area: mean where sea",
	})
	must(t, err)
	// Steps: January and February 1979, stamped mid-month.
	steps := [][3]float64{{15, 0, 31}, {45, 31, 59}}
	for s, st := range steps {
		i, err := w.AppendTimeBounded(st[0], st[1], st[2])
		must(t, err)
		d := make([]float64, 12)
		e := make([]float64, 12)
		for k := range d {
			d[k] = fixSST(s, k)
			e[k] = 280 + float64(k)/2 - float64(s)
		}
		must(t, sst.WriteStep(i, d))
		must(t, ta.WriteStep(i, e))
		must(t, mean.WriteStep(i, []float64{300.125 + float64(s)}))
	}
	must(t, w.Close())
}

// Regime table fixture: 2 regimes × 3 EIS bins.
var (
	fixEdges    = []float64{-2, 0, 2, 4}
	fixMeanings = []string{"convective", "subsidence"}
)

func fixSlope(r, b int) float64 {
	if r == 0 && b == 2 {
		return math.NaN() // empty bin
	}
	return -0.5 + float64(r) + float64(b)/8
}

func writeTable(t testing.TB, path string) {
	t.Helper()
	w, err := cfwrite.Create(path, fixOptions())
	if err != nil {
		t.Fatal(err)
	}
	defer w.Abort()
	must(t, w.AddCategories(cfwrite.Categories{Name: "regime", LongName: "SST regime", Meanings: fixMeanings}))
	c, b, err := cfwrite.BinsFromEdges(fixEdges)
	must(t, err)
	must(t, w.AddAxis(cfwrite.Axis{Name: "eis_bin", Values: c, Bounds: b, Units: "K", LongName: "estimated inversion strength bin"}))
	v, err := w.AddVar(cfwrite.VarSpec{
		Name: "cloud_mean", Dims: []string{"regime", "eis_bin"},
		Units: "1", LongName: "mean low-cloud fraction in the bin",
	})
	must(t, err)
	n, err := w.AddVar(cfwrite.VarSpec{
		Name: "count", Dims: []string{"regime", "eis_bin"}, Type: cfwrite.Int32,
		Units: "1", LongName: "number of columns in the bin",
	})
	must(t, err)
	vals := make([]float64, 6)
	cnt := make([]float64, 6)
	for r := range 2 {
		for k := range 3 {
			vals[r*3+k] = fixSlope(r, k)
			cnt[r*3+k] = float64(10*r + k)
		}
	}
	must(t, v.Write(vals))
	must(t, n.Write(cnt))
	must(t, w.Close())
}

func must(t testing.TB, err error) {
	t.Helper()
	if err != nil {
		t.Fatal(err)
	}
}

// dirNames lists a directory.
func dirNames(t testing.TB, dir string) []string {
	t.Helper()
	es, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, e := range es {
		out = append(out, e.Name())
	}
	return out
}

func tempPath(t testing.TB, name string) string {
	return filepath.Join(t.TempDir(), name)
}
