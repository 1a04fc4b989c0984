package pipeline

import (
	"context"
	"math"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"lidscope/accumulate"
	"lidscope/cf"
	"lidscope/internal/cfwrite"
	"lidscope/metrics"
	"lidscope/regimes"
)

// A tiny synthetic world (invented data, for synthetic-truth tests): a 4×4
// grid inside the tropics, 3 monthly steps; the warmest column is
// convective, the rest subsidence; one column is land (SST missing).
var (
	lats = []float64{-15, -5, 5, 15}
	lons = []float64{0, 90, 180, 270}
)

func sstAt(t, j, i int) float64 {
	if j == 0 && i == 3 {
		return math.NaN() // land
	}
	v := 298.0 + float64(i) // warmer to the east
	if j == 2 && i == 1 {
		v = 303 + float64(t) // a warm pool column, always convective
	}
	return v
}

func writeField(t *testing.T, path, name, stdName, unitStr string, levels []float64, val func(step, lev, j, i int) float64, nt int) {
	t.Helper()
	w, err := cfwrite.Create(path, cfwrite.Options{Title: "lidscope pipeline test (synthetic, invented data)"})
	if err != nil {
		t.Fatal(err)
	}
	defer w.Abort()
	must := func(err error) {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
	}
	must(w.SetGrid(cfwrite.Grid{Lat: lats, Lon: lons}))
	dims := []string{cfwrite.DimTime, cfwrite.DimLat, cfwrite.DimLon}
	if levels != nil {
		must(w.SetLevels(cfwrite.Levels{Pa: levels}))
		dims = []string{cfwrite.DimTime, cfwrite.DimPlev, cfwrite.DimLat, cfwrite.DimLon}
	}
	must(w.SetTime(cfwrite.TimeAxis{Units: "days since 2001-01-01", Calendar: "standard"}))
	v, err := w.AddVar(cfwrite.VarSpec{Name: name, Dims: dims, Units: unitStr, StandardName: stdName})
	must(err)
	nl := max(1, len(levels))
	for s := 0; s < nt; s++ {
		k, err := w.AppendTime(float64(15 + 31*s))
		must(err)
		var buf []float64
		for l := 0; l < nl; l++ {
			for j := range lats {
				for i := range lons {
					buf = append(buf, val(s, l, j, i))
				}
			}
		}
		must(v.WriteStep(k, buf))
	}
	must(w.Close())
}

func testPlan(t *testing.T) Plan {
	dir := t.TempDir()
	sp := filepath.Join(dir, "sst.nc")
	tp := filepath.Join(dir, "ta.nc")
	cp := filepath.Join(dir, "cld.nc")
	writeField(t, sp, "tos", "sea_surface_temperature", "K", nil, func(s, _, j, i int) float64 { return sstAt(s, j, i) }, 3)
	writeField(t, tp, "ta", "air_temperature", "K", []float64{85000, 70000, 50000}, func(s, l, j, i int) float64 { return []float64{290, 285, 270}[l] }, 3)
	writeField(t, cp, "cll", "low_type_cloud_area_fraction", "1", nil, func(s, _, j, i int) float64 { return 0.1 * float64(j+1) }, 3)
	return Plan{
		Dataset: "tiny",
		SST:     Input{Paths: []string{sp}, Spec: cf.Spec{Role: cf.RoleSST}},
		T700:    &Input{Paths: []string{tp}, Spec: cf.Spec{Role: cf.RoleAirTemp, Level: 70000}},
		Cloud:   &Input{Paths: []string{cp}, Spec: cf.Spec{Role: cf.RoleLowCloud}},
		Ocean:   Ocean{Kind: "sst"},
		Metrics: metrics.DefaultConventions(),
		Regimes: regimes.Definition{Delta: 1.5, Band: regimes.Band{South: -30, North: 30}},
		Regions: []accumulate.Region{{Name: "pool", South: 0, North: 10, West: 80, East: 100}},
	}
}

func TestRunSyntheticTruth(t *testing.T) {
	p := testPlan(t)
	res, err := Run(context.Background(), p)
	if err != nil {
		t.Fatal(err)
	}
	acc := res.Acc
	if acc.Cells.Steps != 3 || len(res.Labels) != 3 || res.Labels[0] != "2001-01" {
		t.Fatalf("steps %d labels %v", acc.Cells.Steps, res.Labels)
	}
	cf := acc.ConvectiveFraction()
	// storage longitudes 0, 90, 180, 270 are canonical −180, −90, 0, 90
	idx := func(j, i int) int { return j*4 + (i+2)%4 }
	if cf[idx(2, 1)] != 1 {
		t.Errorf("warm-pool column convective fraction %v, want 1", cf[idx(2, 1)])
	}
	if !math.IsNaN(cf[idx(0, 3)]) {
		t.Errorf("land column has a convective fraction %v", cf[idx(0, 3)])
	}
	// Tropical mean at step 0, by hand: area weights ∝ sin-latitude extent
	// per row (rows ±15 have bounds ±10…±20, rows ±5 have ±0…±10).
	s := func(d float64) float64 { return math.Sin(d * math.Pi / 180) }
	wOuter, wInner := s(20)-s(10), s(10)
	var sw, swx float64
	for j := range lats {
		w := wInner
		if j == 0 || j == 3 {
			w = wOuter
		}
		for i := range lons {
			if x := sstAt(0, j, i); x == x {
				sw += w
				swx += w * x
			}
		}
	}
	if got := acc.Series[0].TropMean; math.Abs(got-swx/sw) > 1e-4 {
		t.Errorf("tropical mean %v, hand %v", got, swx/sw)
	}
	// EIS of a subsidence column equals the kernel's column value.
	k, _ := metrics.NewKernel(metrics.DefaultConventions())
	col, err := k.Column(metrics.ColumnInput{Ts: float64(float32(sstAt(0, 1, 0))), T700: 285})
	if err != nil {
		t.Fatal(err)
	}
	got := acc.Moments(3, regimes.Subsidence, idx(1, 0)).Mean
	if math.Abs(got-col.EIS) > 1e-4 {
		t.Errorf("EIS %v, kernel %v", got, col.EIS)
	}
	if n := acc.Regions[0].Values[0][regimes.Convective].N; n != 3 {
		t.Errorf("region pool: %d convective samples, want 3", n)
	}
}

func TestRunDeterministicAcrossWorkers(t *testing.T) {
	p := testPlan(t)
	p.Workers = 1
	a, err := Run(context.Background(), p)
	if err != nil {
		t.Fatal(err)
	}
	p.Workers = 7
	b, err := Run(context.Background(), p)
	if err != nil {
		t.Fatal(err)
	}
	for i := range a.Acc.NCells() {
		for q := range a.Acc.L.Quantities {
			for r := regimes.Regime(0); r < 3; r++ {
				if a.Acc.Moments(q, r, i) != b.Acc.Moments(q, r, i) {
					t.Fatalf("cell %d differs between 1 and 7 workers", i)
				}
			}
		}
	}
}

func TestRunRejectsMismatchedGrids(t *testing.T) {
	p := testPlan(t)
	dir := t.TempDir()
	other := filepath.Join(dir, "cld2.nc")
	old := lons
	lons = []float64{10, 100, 190, 280}
	writeField(t, other, "cll", "low_type_cloud_area_fraction", "1", nil, func(s, _, j, i int) float64 { return 0.2 }, 3)
	lons = old
	p.Cloud.Paths = []string{other}
	_, err := Run(context.Background(), p)
	if err == nil || !strings.Contains(err.Error(), "analysis grid") || !strings.Contains(err.Error(), "cld2.nc") {
		t.Fatalf("want an error naming the grid mismatch and the file, got %v", err)
	}
	p.Grid.Target = "sst"
	if _, err := Run(context.Background(), p); err != nil {
		t.Fatalf("with an analysis grid: %v", err)
	}
}

// SST is the minimum input: without T700 the run has no t700/lts/eis,
// without cloud no cloud quantity; what remains (regimes, crossings,
// series, the quantities present) equals the full run's exactly
// (synthetic truth: the full run is the reference).
func TestRunOptionalInputs(t *testing.T) {
	full := testPlan(t)
	ref, err := Run(context.Background(), full)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name        string
		noT, noC    bool
		quantities  string
		lacksPhrase string
	}{
		{"sst only", true, true, "sst", "LTS or EIS; no low_cloud or cloud input"},
		{"sst and T700", false, true, "sst t700 lts eis", "no cloud statistics"},
		{"sst and cloud", true, false, "sst low_cloud", "no 700 hPa temperature"},
	} {
		t.Run(c.name, func(t *testing.T) {
			p := testPlan(t)
			if c.noT {
				p.T700 = nil
			}
			if c.noC {
				p.Cloud = nil
			}
			if got := strings.Join(p.Quantities(), " "); got != c.quantities {
				t.Errorf("Quantities() = %q, want %q", got, c.quantities)
			}
			if l := strings.Join(p.Lacks(), "; "); !strings.Contains(l, c.lacksPhrase) {
				t.Errorf("Lacks() = %q, want it to mention %q", l, c.lacksPhrase)
			}
			res, err := Run(context.Background(), p)
			if err != nil {
				t.Fatal(err)
			}
			l := res.Acc.L
			if got := strings.Join(l.Quantities, " "); got != c.quantities {
				t.Errorf("layout quantities %q, want %q", got, c.quantities)
			}
			if c.noC && l.Cloud != "" {
				t.Errorf("layout cloud %q without a cloud input", l.Cloud)
			}
			if len(res.Acc.Cells.Values) != len(l.Quantities) || len(res.Acc.Series[0].Means) != len(l.Quantities) {
				t.Errorf("%d cell and %d series quantities for %d names", len(res.Acc.Cells.Values), len(res.Acc.Series[0].Means), len(l.Quantities))
			}
			for i := range ref.Acc.Cells.Valid {
				if ref.Acc.Cells.Valid[i] != res.Acc.Cells.Valid[i] || ref.Acc.Cells.Tracks[i] != res.Acc.Cells.Tracks[i] {
					t.Fatalf("cell %d: regimes or crossings differ from the full run", i)
				}
			}
			for qi, q := range l.Quantities {
				ri := slices.Index(ref.Acc.L.Quantities, q)
				for r := regimes.Regime(0); r < 3; r++ {
					for i := range ref.Acc.NCells() {
						a, b := ref.Acc.Moments(ri, r, i), res.Acc.Moments(qi, r, i)
						if a != b {
							t.Fatalf("%s, regime %d, cell %d: %+v, full run %+v", q, r, i, b, a)
						}
					}
				}
			}
			for k := range ref.Acc.Series {
				if ref.Acc.Series[k].TropMean != res.Acc.Series[k].TropMean || ref.Acc.Series[k].AreaFraction != res.Acc.Series[k].AreaFraction {
					t.Fatalf("series step %d differs from the full run", k)
				}
			}
		})
	}
}

// TestRunDomainKeepsOnlyItsColumns: with an analysis domain (a box
// 100°W…10°E, 0…20°N), the columns inside have the statistics
// of the run without one, the others none; the band series and regions
// do not change, and ShapeOf counts the analysed columns.
func TestRunDomainKeepsOnlyItsColumns(t *testing.T) {
	p := testPlan(t)
	full, err := Run(context.Background(), p)
	if err != nil {
		t.Fatal(err)
	}
	p.Domain = &accumulate.Region{Name: "domain", South: 0, North: 20, West: -100, East: 10}
	dom, err := Run(context.Background(), p)
	if err != nil {
		t.Fatal(err)
	}
	// grid: lat −15, −5, 5, 15; lon −180, −90, 0, 90 (from 0, 90, 180, 270)
	l := full.Acc.L
	inside := func(i int) bool {
		lat, lon := l.Lat[i/l.NLon], l.Lon[i%l.NLon]
		return lat > 0 && (lon == 0 || lon == -90)
	}
	kept := 0
	for i := range full.Acc.NCells() {
		for q := range full.Acc.L.Quantities {
			for _, r := range regimes.All {
				a, b := dom.Acc.Moments(q, r, i), full.Acc.Moments(q, r, i)
				if inside(i) && a != b {
					t.Fatalf("cell %d (inside) quantity %d regime %v: %+v, without a domain %+v", i, q, r, a, b)
				}
				if !inside(i) && a.N != 0 {
					t.Fatalf("cell %d is outside the domain but has %d values", i, a.N)
				}
			}
		}
		if inside(i) {
			kept++
			if dom.Acc.ValidSteps(i) != full.Acc.ValidSteps(i) || dom.Acc.ValidSteps(i) == 0 {
				t.Fatalf("cell %d: %d valid steps, without a domain %d", i, dom.Acc.ValidSteps(i), full.Acc.ValidSteps(i))
			}
		}
	}
	if kept != 4 || dom.Acc.Index.Len() != 4 {
		t.Errorf("%d columns inside, %d kept; want 4", kept, dom.Acc.Index.Len())
	}
	for k := range full.Acc.Series {
		if full.Acc.Series[k].TropMean != dom.Acc.Series[k].TropMean || full.Acc.Series[k].AreaFraction != dom.Acc.Series[k].AreaFraction {
			t.Fatalf("series step %d depends on the domain", k)
		}
	}
	if full.Acc.Regions[0].Values[0][regimes.Convective] != dom.Acc.Regions[0].Values[0][regimes.Convective] {
		t.Error("the region statistics depend on the domain")
	}
	sh, err := ShapeOf(p)
	if err != nil {
		t.Fatal(err)
	}
	if sh.Columns != 4 || sh.Cells != 16 {
		t.Errorf("shape: %d columns of %d cells, want 4 of 16", sh.Columns, sh.Cells)
	}
}
