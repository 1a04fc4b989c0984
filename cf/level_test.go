package cf

import (
	"math"
	"testing"
)

// Interpolation linear in ln p between the bracketing levels is common
// practice for taking a field at a pressure level not in the file. The
// worked number: 700 hPa between 600 hPa (260 K) and 850 hPa (280 K):
//
//	W = ln(700/600) / ln(850/600) = 0.1541506798 / 0.3483066943 = 0.4425716828
//	T = (1 − W)·260 + W·280 = 260 + 20·0.4425716828 = 268.8514337 K
const (
	handW    = 0.4425716828
	handT700 = 268.8514337
)

func TestPickLevel(t *testing.T) {
	cases := []struct {
		name   string
		levels []float64
		units  string
		target float64
		exact  bool
		lo, hi int
		w      float64
		err    string
	}{
		{"hPa exact", []float64{1000, 850, 700, 500}, "hPa", 70000, true, 2, 2, 0, ""},
		{"Pa exact", []float64{50000, 70000, 85000}, "Pa", 70000, true, 1, 1, 0, ""},
		{"mbar exact", []float64{1000, 700}, "mbar", 70000, true, 1, 1, 0, ""},
		{"hPa interpolated, descending", []float64{1000, 850, 600, 500}, "hPa", 70000, false, 2, 1, handW, ""},
		{"Pa interpolated, ascending", []float64{50000, 60000, 85000, 100000}, "Pa", 70000, false, 1, 2, handW, ""},
		{"unsorted levels", []float64{600, 1000, 500, 850}, "hPa", 70000, false, 0, 3, handW, ""},
		{"within 0.01 Pa is exact", []float64{700.00005, 500}, "hPa", 70000, true, 0, 0, 0, ""},
		{"below the levels", []float64{1000, 925, 850}, "hPa", 70000, false, 0, 0, 0, "outside the file's levels (850…1000 hPa)"},
		{"above the levels", []float64{500, 300}, "hPa", 70000, false, 0, 0, 0, "does not extrapolate"},
		{"no units", []float64{1000, 700}, "", 70000, false, 0, 0, 0, "level units in the study"},
		{"height units", []float64{1000, 700}, "m", 70000, false, 0, 0, 0, "pressure axis"},
		{"non-positive", []float64{1000, 0}, "hPa", 70000, false, 0, 0, 0, "not a positive pressure"},
		{"no levels", nil, "hPa", 70000, false, 0, 0, 0, "no levels"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p, err := PickLevel(c.levels, c.units, c.target)
			if c.err != "" {
				errHas(t, err, c.err)
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if p.Exact != c.exact || p.Lower != c.lo || p.Upper != c.hi || math.Abs(p.W-c.w) > 1e-9 {
				t.Errorf("got %+v, want exact=%v lower=%d upper=%d W=%.10f", p, c.exact, c.lo, c.hi, c.w)
			}
			if p.Target != c.target {
				t.Errorf("target %g", p.Target)
			}
		})
	}
}

func TestLevelsFromFile(t *testing.T) {
	eachKind(t, "levels", func(t *testing.T, path string) {
		for _, c := range []struct {
			v    string
			want float64 // uniform value at 700 hPa
			desc string
		}{
			{"ta_pa", handT700, "interpolated linearly in ln p between 600 and 850 hPa"},
			{"ta_hpa", handT700, "interpolated linearly in ln p between 600 and 850 hPa"},
			{"ta_exact", nan, "read directly"},
		} {
			f := mustOpen(t, path, Spec{Role: RoleAirTemp, Var: c.v, Level: 70000})
			if d := f.Level.Describe(); !hasNote([]string{d}, c.desc) {
				t.Errorf("%s: %s", c.v, d)
			}
			got := slab(t, f, 0)
			want := []float64{c.want, c.want, c.want, c.want}
			if c.v == "ta_exact" {
				want = []float64{270, 271, 272, 273}
			}
			sameValues(t, got, want, 1e-4)
		}
		_, err := Open([]string{path}, Spec{Role: RoleAirTemp, Var: "ta_mb", Level: 70000})
		errHas(t, err, "ta_mb", "lev_mb", "outside the file's levels (850…1000 hPa)")
		// a pressure-level field read as a single-level role
		_, err = Open([]string{path}, Spec{Role: RoleAirTemp, Var: "ta_pa"})
		errHas(t, err, "4 vertical levels", "choose a level")
	})
}

// FuzzPickLevel: whatever the levels, PickLevel does not panic, and a
// successful pick brackets the target with weights in [0, 1].
func FuzzPickLevel(f *testing.F) {
	f.Add(1000.0, 850.0, 600.0, 500.0, 70000.0, "hPa")
	f.Add(50000.0, 70000.0, 85000.0, 100000.0, 70000.0, "Pa")
	f.Add(0.0, -1.0, math.NaN(), math.Inf(1), 70000.0, "mbar")
	f.Add(1.0, 1.0, 1.0, 1.0, 1.0, "")
	f.Fuzz(func(t *testing.T, a, b, c, d, target float64, u string) {
		levels := []float64{a, b, c, d}
		p, err := PickLevel(levels, u, target)
		if err != nil {
			return
		}
		if p.Exact {
			if math.Abs(p.PLower-target) >= 0.01 {
				t.Fatalf("exact pick %g for target %g", p.PLower, target)
			}
			return
		}
		if !(p.W >= 0 && p.W <= 1) || !(p.PLower < target && target < p.PUpper) {
			t.Fatalf("pick %+v does not bracket %g", p, target)
		}
		if p.Lower < 0 || p.Lower >= 4 || p.Upper < 0 || p.Upper >= 4 {
			t.Fatalf("indices out of range: %+v", p)
		}
	})
}
