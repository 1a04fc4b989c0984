package relations

import (
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"testing"

	"lidscope/accumulate"
	"lidscope/regimes"
)

// richLayout is a 4×10 grid with latitude-dependent areas, a band that
// leaves out the poleward row, and every quantity the package uses.
func richLayout() accumulate.Layout {
	l := accumulate.Layout{NLat: 4, NLon: 10, Lat: []float64{-25, -8, 8, 40},
		Quantities: []string{"sst", "lts", "eis", "cloud", "toa_sw_up", "omega"}}
	for i := 0; i < 10; i++ {
		l.Lon = append(l.Lon, -162+36*float64(i))
	}
	for j := 0; j < 4; j++ {
		for i := 0; i < 10; i++ {
			a := 1e11 * math.Cos(l.Lat[j]*math.Pi/180)
			l.Area = append(l.Area, a)
			bw := a
			if j == 3 {
				bw = 0
			}
			if j == 0 {
				bw = a / 2 // half the row inside the band
			}
			l.BandWeight = append(l.BandWeight, bw)
		}
	}
	return l
}

func richConfig() Config {
	cfg := Defaults()
	cfg.Seasons = true
	cfg.Classifier = regimes.Classifier{Delta: 0.3, HalfWidth: 0.1}
	cfg.Regions = []accumulate.Region{{Name: "west", South: -30, North: 30, West: -180, East: 0}, {Name: "north", South: 0, North: 45, West: -180, East: 180}}
	cfg.Patches = []Patch{{Name: "p1", South: -10, North: 10, West: -170, East: -90}, {Name: "dateline", South: -30, North: 10, West: 150, East: -150}}
	cfg.Bootstrap = Bootstrap{N: 40, BlockLength: 6, Seed: 77}
	cfg.Indicator = IndicatorOmega
	cfg.ThresholdReplicates = 40
	cfg.OmegaBins = true
	cfg.DecorrelationLength = 3e5
	return cfg
}

// richSteps generates a random record on richLayout (invented data).
func richSteps(n int, seed uint64) []*accumulate.Step {
	l := richLayout()
	rng := rand.New(rand.NewPCG(seed, 3))
	cl := richConfig().Classifier
	var out []*accumulate.Step
	nc := l.NLat * l.NLon
	for k := 0; k < n; k++ {
		s := newStep(nc, len(l.Quantities), k)
		s.TropMean = 300 + 0.5*math.Sin(float64(k)/2)
		for i := 0; i < nc; i++ {
			if i%7 == 3 || (i%11 == 5 && k%4 == 0) {
				continue // land, or missing now and then
			}
			rel := 1.2*rng.NormFloat64() - 0.4 + 0.3*math.Sin(float64(k+i))
			s.Rel[i] = float32(rel)
			s.Regime[i] = cl.Classify(float64(s.Rel[i]))
			eis := 3 - rel + 2*rng.NormFloat64()
			s.Values[0][i] = float32(s.TropMean + rel)
			s.Values[1][i] = float32(eis + 11 + 0.5*rng.NormFloat64())
			s.Values[2][i] = float32(eis)
			s.Values[3][i] = float32(0.3 + 0.04*eis + 0.05*rng.NormFloat64())
			s.Values[4][i] = float32(90 + 150*float64(s.Values[3][i]) + 5*rng.NormFloat64())
			if rng.IntN(9) == 0 {
				s.Values[4][i] = float32(math.NaN())
			}
			s.Values[5][i] = float32((-40*rel + 15*rng.NormFloat64()) * hPaPerDayToPaPerS)
		}
		out = append(out, s)
	}
	return out
}

// closeEqual compares two values field by field: floats to a relative
// tolerance (NaN equals NaN), everything else exactly.
func closeEqual(path string, a, b reflect.Value, tol float64, errs *[]string) {
	if len(*errs) > 20 {
		return
	}
	switch a.Kind() {
	case reflect.Float64, reflect.Float32:
		x, y := a.Float(), b.Float()
		if math.IsNaN(x) && math.IsNaN(y) || x == y {
			return
		}
		if math.Abs(x-y) > tol*math.Max(1e-300, math.Max(math.Abs(x), math.Abs(y))) {
			*errs = append(*errs, fmt.Sprintf("%s: %.17g vs %.17g", path, x, y))
		}
	case reflect.Struct:
		for k := 0; k < a.NumField(); k++ {
			closeEqual(path+"."+a.Type().Field(k).Name, a.Field(k), b.Field(k), tol, errs)
		}
	case reflect.Slice, reflect.Array:
		if a.Len() != b.Len() {
			*errs = append(*errs, fmt.Sprintf("%s: length %d vs %d", path, a.Len(), b.Len()))
			return
		}
		for k := 0; k < a.Len(); k++ {
			closeEqual(fmt.Sprintf("%s[%d]", path, k), a.Index(k), b.Index(k), tol, errs)
		}
	case reflect.Pointer:
		if a.IsNil() != b.IsNil() {
			*errs = append(*errs, path+": nil vs non-nil")
			return
		}
		if !a.IsNil() {
			closeEqual(path, a.Elem(), b.Elem(), tol, errs)
		}
	default:
		if !reflect.DeepEqual(a.Interface(), b.Interface()) {
			*errs = append(*errs, fmt.Sprintf("%s: %v vs %v", path, a.Interface(), b.Interface()))
		}
	}
}

// Merge test of issue 6: a record split by time into three pieces whose
// accumulators are merged gives the same Results as one pass, for every
// statistic (binned tables, joint composites, regressions with their
// effective sizes and bootstrap intervals, flips, threshold with its
// bootstrap and yearly estimates, omega composites), in both modes; the
// anomaly-mode climatology is itself built in pieces and merged.
func TestMergeEqualsSinglePass(t *testing.T) {
	t.Parallel()
	steps := richSteps(66, 5)
	l := richLayout()
	l.Regions = richConfig().Regions // so the climatology covers them
	for _, mode := range []Mode{Climatological, Anomaly} {
		cfg := richConfig()
		cfg.Mode = mode
		cfg.Bins = nil
		var clim *Climatology
		if mode == Anomaly {
			cfg.Detrend = true
			clim = NewClimatology(l)
			for _, s := range steps {
				clim.AddStep(s)
			}
			// The same climatology from two pieces in the other order.
			c1, c2 := NewClimatology(l), NewClimatology(l)
			for k, s := range steps {
				if k < 25 {
					c1.AddStep(s)
				} else {
					c2.AddStep(s)
				}
			}
			if err := c2.Merge(c1); err != nil {
				t.Fatal(err)
			}
			for i := 0; i < l.NLat*l.NLon; i++ {
				for v := 0; v <= len(l.Quantities); v++ {
					for m := 1; m <= 12; m++ {
						x, y := clim.Value(i, v, 2003, m, true), c2.Value(i, v, 2003, m, true)
						if !(x == y || math.Abs(x-y) <= 1e-9*math.Abs(x) || (x != x && y != y)) {
							t.Fatalf("climatology cell %d var %d month %d: %g vs merged %g", i, v, m, x, y)
						}
					}
				}
			}
		}
		whole, err := New(cfg, l, clim)
		if err != nil {
			t.Fatal(err)
		}
		for _, s := range steps {
			whole.AddStep(s)
		}
		cuts := []int{0, 17, 40, len(steps)}
		var merged *Acc
		for p := 0; p+1 < len(cuts); p++ {
			a, err := New(cfg, l, clim)
			if err != nil {
				t.Fatal(err)
			}
			for _, s := range steps[cuts[p]:cuts[p+1]] {
				a.AddStep(s)
			}
			if merged == nil {
				merged = a
			} else if err := merged.Merge(a); err != nil {
				t.Fatal(err)
			}
		}
		r1, err := whole.Results()
		if err != nil {
			t.Fatal(err)
		}
		r2, err := merged.Results()
		if err != nil {
			t.Fatal(err)
		}
		if len(r1.Regressions) == 0 || len(r1.Binned) == 0 || len(r1.Joint) == 0 || len(r1.Flips) != 2 || r1.Threshold == nil || len(r1.Omega) == 0 || r1.Regressions[0].Boot == nil {
			t.Fatalf("%v: the test record does not exercise every statistic", mode)
		}
		var errs []string
		closeEqual("Results", reflect.ValueOf(*r1), reflect.ValueOf(*r2), 1e-9, &errs)
		for _, e := range errs {
			t.Errorf("%v: %s", mode, e)
		}
		// The comparison itself notices a difference.
		r2.Regressions[0].Slope *= 1 + 1e-7
		r2.Flips[1].Rows[0].Changed += 1e-3
		errs = nil
		closeEqual("Results", reflect.ValueOf(*r1), reflect.ValueOf(*r2), 1e-9, &errs)
		if len(errs) != 2 {
			t.Errorf("the comparison found %d differences of 2 planted: %v", len(errs), errs)
		}
	}
}

// Merging refuses accumulators that do not fit together.
func TestMergeRefuses(t *testing.T) {
	l := richLayout()
	a, _ := New(richConfig(), l, nil)
	c2 := richConfig()
	c2.DeltaT = []float64{1}
	b, _ := New(c2, l, nil)
	if err := a.Merge(b); err == nil {
		t.Error("merging different configurations must fail")
	}
	l2 := richLayout()
	l2.Quantities = []string{"sst", "lts", "eis", "cloud", "toa_sw_up", "omega"}
	l2.Lat = []float64{-25, -8, 8, 41}
	b, _ = New(richConfig(), l2, nil)
	if err := a.Merge(b); err == nil {
		t.Error("merging different grids must fail")
	}
	if err := a.Merge(nil); err == nil {
		t.Error("merging nil must fail")
	}
}
