package regrid_test

// Synthetic-truth tests: conservation of the area integral, constants and
// identity remaps, hand-worked missing-data and coverage cases, linear
// reproduction by bilinear interpolation, concurrency and allocations.

import (
	"errors"
	"math"
	"slices"
	"sync"
	"testing"

	"lidscope/grid"
	"lidscope/regrid"
)

// testGrids returns named global grids in several layouts.
func testGrids(t testing.TB) map[string]*grid.Grid {
	m := must(t)
	gl, _ := grid.GaussianLatitudes(64)
	r1 := m(grid.GlobalRegular(1, 1, 0))
	return map[string]*grid.Grid{
		"r1":       r1,
		"r2":       m(grid.GlobalRegular(2, 2, 1)),
		"r2.5":     m(grid.GlobalRegular(2.5, 2.5, 0)),
		"t42":      m(grid.GlobalGaussian(64, 128, 0, grid.GaussMidpoint)),
		"t42w":     m(grid.GlobalGaussian(64, 128, 0, grid.GaussWeights)),
		"t42ns":    m(grid.New(reversed(gl), steps(0, 2.8125, 128), nil, nil)),
		"r3desc":   m(grid.New(steps(88.5, -3, 60), steps(-178.5, 3, 120), nil, nil)),
		"r2past":   m(grid.New(steps(-89, 2, 90), steps(361, 2, 180), nil, nil)),
		"r1wrap":   m(grid.New(r1.Lat, steps(-180, 1, 361), nil, nil)),
		"r5lonrev": m(grid.New(steps(-87.5, 5, 36), steps(357.5, -5, 72), nil, nil)),
	}
}

// wiggly is a smooth field with fine structure, defined by position so that
// a duplicated wrap column gets the same value as its twin.
func wiggly(g *grid.Grid) []float64 {
	out := make([]float64, 0, g.Size())
	for _, la := range g.Lat {
		for _, lo := range g.Lon {
			p, l := la*math.Pi/180, lo*math.Pi/180
			out = append(out, 290+10*math.Cos(p)+3*math.Sin(7*l)*math.Cos(5*p)+math.Cos(13*l+2*p))
		}
	}
	return out
}

func integral(g *grid.Grid, f []float64) float64 {
	var s float64
	for k, a := range g.SolidAngles() {
		if a > 0 {
			s += a * f[k]
		}
	}
	return s
}

// TestConservation: with no missing data the area integral over the sphere
// is unchanged by conservative remapping (to 1e-10 relative), for every pair
// of test grids.
func TestConservation(t *testing.T) {
	t.Parallel()
	grids := testGrids(t)
	names := slices.Sorted(func(yield func(string) bool) {
		for k := range grids {
			if !yield(k) {
				return
			}
		}
	})
	for _, a := range names {
		for _, b := range names {
			src, dst := grids[a], grids[b]
			f := wiggly(src)
			got := remapOurs(t, src, dst, regrid.Options{}, f)
			in, out := integral(src, f), integral(dst, got)
			if rel := math.Abs(out-in) / math.Abs(in); rel > 1e-10 {
				t.Errorf("%s → %s: area integral %.15g → %.15g (relative change %.2g)", a, b, in, out, rel)
			}
		}
	}
}

// TestConstantAndIdentity: a constant stays constant (both methods), and a
// field remapped to its own grid is unchanged.
func TestConstantAndIdentity(t *testing.T) {
	t.Parallel()
	grids := testGrids(t)
	for name, g := range grids {
		for _, m := range []regrid.Method{regrid.Conservative, regrid.Bilinear} {
			for name2, g2 := range grids {
				c := make([]float64, g.Size())
				for k := range c {
					c[k] = 273.15
				}
				got := remapOurs(t, g, g2, regrid.Options{Method: m}, c)
				for k, v := range got {
					if math.Abs(v-273.15) > 1e-12*273.15 {
						t.Fatalf("%s %s → %s: constant 273.15 became %.15g at cell %d", m, name, name2, v, k)
					}
				}
			}
			f := wiggly(g)
			got := remapOurs(t, g, g, regrid.Options{Method: m}, f)
			for k := range f {
				if math.Abs(got[k]-f[k]) > 1e-13*math.Abs(f[k]) {
					t.Fatalf("%s identity on %s: cell %d %.15g → %.15g", m, name, k, f[k], got[k])
				}
			}
		}
	}
}

// TestMissingRenormalisation works one target cell by hand: a target covering
// four equal-area source cells (same latitude band, four longitudes) with
// one missing is the mean of the other three, its coverage is 3/4, and a
// MinCoverage above 3/4 makes it missing.
func TestMissingRenormalisation(t *testing.T) {
	m := must(t)
	src := m(grid.New([]float64{5}, []float64{0.5, 1.5, 2.5, 3.5}, [][2]float64{{0, 10}}, nil))
	dst := m(grid.New([]float64{5}, []float64{2}, [][2]float64{{0, 10}}, [][2]float64{{0, 4}}))
	data := []float32{1, 2, float32(math.NaN()), 6}
	for _, c := range []struct {
		minCov float64
		want   float64
	}{{0, 3}, {0.5, 3}, {0.75, 3}, {0.76, math.NaN()}, {1, math.NaN()}} {
		w, err := regrid.NewWeights(src, dst, regrid.Options{MinCoverage: c.minCov})
		if err != nil {
			t.Fatal(err)
		}
		out := make([]float32, 1)
		if err := w.Apply(out, data); err != nil {
			t.Fatal(err)
		}
		if got := float64(out[0]); !(got == c.want || math.IsNaN(got) && math.IsNaN(c.want)) {
			t.Errorf("MinCoverage %g: got %g, want %g", c.minCov, got, c.want)
		}
	}
	// All missing: NaN even with MinCoverage 0.
	w, _ := regrid.NewWeights(src, dst, regrid.Options{})
	nan := float32(math.NaN())
	out := []float32{0}
	if err := w.Apply(out, []float32{nan, nan, nan, nan}); err != nil || !math.IsNaN(float64(out[0])) {
		t.Errorf("all sources missing: got %g, %v; want NaN", out[0], err)
	}
}

// TestPartialOverlapWeights checks exact overlap weights on a worked case:
// a target cell 0.5…3.5°E × 0…30°N against source cells 1° wide in
// longitude (edges on whole degrees) and split at 10°N: weights are (Δsinφ share)·(Δλ share).
func TestPartialOverlapWeights(t *testing.T) {
	m := must(t)
	src := m(grid.New([]float64{5, 20}, []float64{-0.5, 0.5, 1.5, 2.5, 3.5}, [][2]float64{{0, 10}, {10, 30}}, nil))
	dst := m(grid.New([]float64{15}, []float64{2}, [][2]float64{{0, 30}}, [][2]float64{{0.5, 3.5}}))
	w, err := regrid.NewWeights(src, dst, regrid.Options{})
	if err != nil {
		t.Fatal(err)
	}
	cols, vals := w.Row(0)
	s10, s30 := math.Sin(10*math.Pi/180), math.Sin(30*math.Pi/180)
	want := map[int32]float64{}
	for j, share := range []float64{s10 / s30, (s30 - s10) / s30} {
		for i, lshare := range []float64{0, 0.5 / 3, 1 / 3.0, 1 / 3.0, 0.5 / 3} {
			if lshare > 0 {
				want[int32(j*5+i)] = share * lshare
			}
		}
	}
	if len(cols) != len(want) {
		t.Fatalf("got %d links %v, want %d", len(cols), cols, len(want))
	}
	for k, c := range cols {
		if math.Abs(vals[k]-want[c]) > 1e-15 {
			t.Errorf("link to source %d: weight %.16g, want %.16g", c, vals[k], want[c])
		}
	}
}

// TestRegionalSource: targets outside a regional source are missing and
// coverage is the covered area fraction.
func TestRegionalSource(t *testing.T) {
	m := must(t)
	// 170°E…190°E (crossing the antimeridian) × 0…10°N, 1° cells.
	src := m(grid.New(steps(0.5, 1, 10), steps(170.5, 1, 20), nil, nil))
	dst := m(grid.GlobalRegular(5, 5, -180+2.5)) // centres -177.5 … 177.5
	w, err := regrid.NewWeights(src, dst, regrid.Options{})
	if err != nil {
		t.Fatal(err)
	}
	cov := make([]float64, dst.Size())
	if err := w.Coverage(cov); err != nil {
		t.Fatal(err)
	}
	for j, la := range dst.Lat {
		for i, lo := range dst.Lon {
			want := 0.0
			if la > 0 && la < 10 && (lo > 170 || lo < -170) {
				want = 1
			}
			if got := cov[j*dst.NLon()+i]; math.Abs(got-want) > 1e-12 {
				t.Errorf("coverage at (%g, %g) = %g, want %g", la, lo, got, want)
			}
		}
	}
	out := make([]float64, dst.Size())
	if err := w.Apply64(out, wiggly(src)); err != nil {
		t.Fatal(err)
	}
	for k, c := range cov {
		if (c == 0) != math.IsNaN(out[k]) {
			t.Errorf("cell %d: coverage %g but value %g", k, c, out[k])
		}
	}
	// Bilinear: outside the source centres in longitude is missing.
	wb, err := regrid.NewWeights(src, dst, regrid.Options{Method: regrid.Bilinear})
	if err != nil {
		t.Fatal(err)
	}
	if err := wb.Apply64(out, wiggly(src)); err != nil {
		t.Fatal(err)
	}
	for j, la := range dst.Lat {
		for i, lo := range dst.Lon {
			inside := la >= 0.5 && la <= 9.5 && (lo >= 170.5 || lo <= -170.5)
			if v := out[j*dst.NLon()+i]; inside == math.IsNaN(v) {
				t.Errorf("bilinear at (%g, %g) = %g, inside=%v", la, lo, v, inside)
			}
		}
	}
}

// TestBilinearLinear: bilinear interpolation reproduces a field linear in
// longitude and latitude exactly inside a regional source, and across the
// seam of a periodic source it interpolates between the last and first
// columns.
func TestBilinearLinear(t *testing.T) {
	m := must(t)
	src := m(grid.New(steps(-30, 3, 21), steps(100, 4, 26), nil, nil))
	dst := m(grid.New(steps(-29.3, 1.7, 35), steps(101.1, 0.9, 100), nil, nil))
	lin := func(la, lo float64) float64 { return 3 + 0.25*la - 0.125*lo + 0.01*la*lo }
	f := make([]float64, 0, src.Size())
	for _, la := range src.Lat {
		for _, lo := range src.Lon {
			f = append(f, lin(la, lo))
		}
	}
	got := remapOurs(t, src, dst, regrid.Options{Method: regrid.Bilinear}, f)
	for j, la := range dst.Lat {
		for i, lo := range dst.Lon {
			if v, want := got[j*dst.NLon()+i], lin(la, lo); math.Abs(v-want) > 1e-12*math.Abs(want) {
				t.Errorf("(%g, %g): got %.15g, want %.15g", la, lo, v, want)
			}
		}
	}

	// Seam: source columns at 355 and 5 (lon 5…355 step 10), target at 359
	// lies 4/10 of the way from 355 to 365.
	per := m(grid.New([]float64{-45, 45}, steps(5, 10, 36), nil, nil))
	g := make([]float64, per.Size())
	for k := range g {
		g[k] = float64(k % 36)
	}
	tgt := m(grid.New([]float64{0}, []float64{-1}, [][2]float64{{-1, 1}}, [][2]float64{{-2, 0}}))
	out := remapOurs(t, per, tgt, regrid.Options{Method: regrid.Bilinear}, g)
	if want := 0.6*35 + 0.4*0; math.Abs(out[0]-want) > 1e-12 {
		t.Errorf("across the seam: got %g, want %g", out[0], want)
	}
}

// TestBilinearPolarRows: targets poleward of the outermost source row take
// that row, interpolated in longitude.
func TestBilinearPolarRows(t *testing.T) {
	m := must(t)
	src := m(grid.GlobalRegular(2, 2, 1))
	dst := m(grid.GlobalRegular(1, 1, 0))
	f := wiggly(src)
	got := remapOurs(t, src, dst, regrid.Options{Method: regrid.Bilinear}, f)
	for i := 0; i < dst.NLon(); i++ {
		// Target lon i lies between source columns (i-1)/2 … ; use lon 1 + 2k exactly.
		if i%2 == 1 {
			k := (i - 1) / 2
			if got[i] != f[k] {
				t.Errorf("south polar row, lon %d: got %g, want source row value %g", i, got[i], f[k])
			}
		}
	}
}

// TestConcurrentApply applies one Weights from several goroutines at once
// (run with -race) and checks every result equals the serial one.
func TestConcurrentApply(t *testing.T) {
	m := must(t)
	src, dst := m(grid.GlobalRegular(1, 1, 0)), m(grid.GlobalGaussian(64, 128, 0, grid.GaussMidpoint))
	w, err := regrid.NewWeights(src, dst, regrid.Options{})
	if err != nil {
		t.Fatal(err)
	}
	const n = 8
	slabs := make([][]float32, n)
	want := make([][]float32, n)
	base := wiggly(src)
	for s := range slabs {
		slabs[s] = make([]float32, src.Size())
		for k, v := range base {
			slabs[s][k] = float32(v + float64(s))
			if (k+s)%97 == 0 {
				slabs[s][k] = float32(math.NaN())
			}
		}
		want[s] = make([]float32, dst.Size())
		if err := w.Apply(want[s], slabs[s]); err != nil {
			t.Fatal(err)
		}
	}
	var wg sync.WaitGroup
	got := make([][]float32, n)
	for s := range slabs {
		got[s] = make([]float32, dst.Size())
		wg.Add(1)
		go func() {
			defer wg.Done()
			for rep := 0; rep < 5; rep++ {
				if err := w.Apply(got[s], slabs[s]); err != nil {
					t.Error(err)
				}
			}
		}()
	}
	wg.Wait()
	for s := range got {
		for k := range got[s] {
			if got[s][k] != want[s][k] && !(math.IsNaN(float64(got[s][k])) && math.IsNaN(float64(want[s][k]))) {
				t.Fatalf("slab %d cell %d: concurrent %g, serial %g", s, k, got[s][k], want[s][k])
			}
		}
	}
}

func TestApplyDoesNotAllocate(t *testing.T) {
	m := must(t)
	src, dst := m(grid.GlobalRegular(1, 1, 0)), m(grid.GlobalRegular(2.5, 2.5, 0))
	for _, meth := range []regrid.Method{regrid.Conservative, regrid.Bilinear} {
		w, err := regrid.NewWeights(src, dst, regrid.Options{Method: meth})
		if err != nil {
			t.Fatal(err)
		}
		in := make([]float32, src.Size())
		out := make([]float32, dst.Size())
		mask := make([]bool, src.Size())
		keep := make([]bool, dst.Size())
		if a := testing.AllocsPerRun(10, func() { _ = w.Apply(out, in) }); a != 0 {
			t.Errorf("%s Apply: %g allocations per call", meth, a)
		}
		if a := testing.AllocsPerRun(10, func() { _ = regrid.RemapMask(w, keep, mask, 0.5) }); a != 0 {
			t.Errorf("%s RemapMask: %g allocations per call", meth, a)
		}
	}
}

func TestErrors(t *testing.T) {
	m := must(t)
	src, dst := m(grid.GlobalRegular(2, 2, 0)), m(grid.GlobalRegular(5, 5, 0))
	w, err := regrid.NewWeights(src, dst, regrid.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if err := w.Apply(make([]float32, 3), make([]float32, src.Size())); !errors.Is(err, regrid.ErrSize) {
		t.Errorf("short destination: got %v, want ErrSize", err)
	}
	if err := w.Apply64(make([]float64, dst.Size()), make([]float64, 5)); !errors.Is(err, regrid.ErrSize) {
		t.Errorf("short source: got %v, want ErrSize", err)
	}
	if err := regrid.RemapMask(w, make([]bool, dst.Size()), make([]bool, src.Size()), 0); err == nil {
		t.Error("mask threshold 0 accepted")
	}
	for _, o := range []regrid.Options{{MinCoverage: -0.1}, {MinCoverage: 1.5}, {Method: 7}} {
		if _, err := regrid.NewWeights(src, dst, o); err == nil {
			t.Errorf("options %+v accepted", o)
		}
	}
	zonal := m(grid.New([]float64{-45, 45}, []float64{180}, nil, [][2]float64{{0, 360}}))
	if _, err := regrid.NewWeights(zonal, dst, regrid.Options{Method: regrid.Bilinear}); err == nil {
		t.Error("bilinear from a single-longitude grid accepted")
	}
	// Conservative from a zonal-mean grid works and is constant along longitude.
	wz, err := regrid.NewWeights(zonal, dst, regrid.Options{})
	if err != nil {
		t.Fatal(err)
	}
	out := make([]float64, dst.Size())
	if err := wz.Apply64(out, []float64{1, 3}); err != nil {
		t.Fatal(err)
	}
	for j := 0; j < dst.NLat(); j++ {
		want := 1.0
		if dst.Lat[j] > 0 {
			want = 3
		}
		for i := 0; i < dst.NLon(); i++ {
			if math.Abs(out[j*dst.NLon()+i]-want) > 1e-12 {
				t.Fatalf("zonal source → %v at (%d,%d): %g, want %g", dst, j, i, out[j*dst.NLon()+i], want)
			}
		}
	}
}

func TestWithMinCoverage(t *testing.T) {
	m := must(t)
	w, err := regrid.NewWeights(m(grid.GlobalRegular(1, 1, 0)), m(grid.GlobalRegular(2, 2, 0)), regrid.Options{Method: regrid.Bilinear})
	if err != nil {
		t.Fatal(err)
	}
	if w.MinCoverage() != 1 {
		t.Errorf("bilinear default MinCoverage = %g, want 1", w.MinCoverage())
	}
	w2, err := w.WithMinCoverage(0.25)
	if err != nil || w2.MinCoverage() != 0.25 || w.MinCoverage() != 1 || w2.NumLinks() != w.NumLinks() {
		t.Errorf("WithMinCoverage(0.25): %v, %v; original changed to %g", w2.MinCoverage(), err, w.MinCoverage())
	}
	if _, err := w.WithMinCoverage(2); err == nil {
		t.Error("WithMinCoverage(2) accepted")
	}
}

// TestMaskFractionWorked: a target cell covering four equal-area source cells
// of which one is inside the mask has fraction 1/4; thresholds decide.
func TestMaskFractionWorked(t *testing.T) {
	m := must(t)
	src := m(grid.New([]float64{5}, []float64{0.5, 1.5, 2.5, 3.5}, [][2]float64{{0, 10}}, nil))
	dst := m(grid.New([]float64{5}, []float64{2}, [][2]float64{{0, 10}}, [][2]float64{{0, 4}}))
	w, err := regrid.NewWeights(src, dst, regrid.Options{})
	if err != nil {
		t.Fatal(err)
	}
	frac := []float64{0}
	for _, c := range []struct {
		mask []bool
		frac float64
	}{{[]bool{true, false, false, false}, 0.25}, {[]bool{true, true, false, false}, 0.5}, {[]bool{true, true, true, true}, 1}} {
		if err := regrid.MaskFraction(w, frac, c.mask); err != nil {
			t.Fatal(err)
		}
		if math.Abs(frac[0]-c.frac) > 1e-15 {
			t.Errorf("mask %v: fraction %g, want %g", c.mask, frac[0], c.frac)
		}
		for _, th := range []float64{0.25, 0.5, 0.75, 1} {
			keep := []bool{false}
			if err := regrid.RemapMask(w, keep, c.mask, th); err != nil {
				t.Fatal(err)
			}
			if keep[0] != (c.frac >= th) {
				t.Errorf("mask %v threshold %g: got %v", c.mask, th, keep[0])
			}
		}
	}
}

// TestWrapColumnTarget: a target's duplicated wrap column gets the same
// value as the column it repeats, for both methods.
func TestWrapColumnTarget(t *testing.T) {
	m := must(t)
	src := m(grid.GlobalRegular(2, 2, 1))
	dst := m(grid.New(steps(-88.75, 2.5, 72), steps(0, 2.5, 145), nil, nil))
	if !dst.WrapColumn {
		t.Fatalf("%v: wrap column not detected", dst)
	}
	for _, meth := range []regrid.Method{regrid.Conservative, regrid.Bilinear} {
		out := remapOurs(t, src, dst, regrid.Options{Method: meth}, wiggly(src))
		for j := 0; j < dst.NLat(); j++ {
			if a, b := out[j*145], out[j*145+144]; a != b {
				t.Errorf("%s row %d: column 0 = %.15g, wrap column = %.15g", meth, j, a, b)
			}
		}
	}
}

func TestParseMethod(t *testing.T) {
	for s, want := range map[string]regrid.Method{"conservative": regrid.Conservative, " Bilinear ": regrid.Bilinear} {
		if got, err := regrid.ParseMethod(s); err != nil || got != want {
			t.Errorf("ParseMethod(%q) = %v, %v", s, got, err)
		}
	}
	if _, err := regrid.ParseMethod("nearest"); err == nil {
		t.Error("ParseMethod(\"nearest\") accepted")
	}
	if _, err := regrid.NewWeights(&grid.Grid{Lat: []float64{0}, Lon: []float64{0}}, must(t)(grid.GlobalRegular(5, 5, 0)), regrid.Options{}); err == nil {
		t.Error("hand-built grid without bounds accepted")
	}
}
