package grid_test

import (
	"errors"
	"math"
	"slices"
	"strings"
	"testing"

	"lidscope/grid"
)

func steps(first, step float64, n int) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = first + float64(i)*step
	}
	return out
}

func reversed(v []float64) []float64 {
	out := slices.Clone(v)
	slices.Reverse(out)
	return out
}

func must(t testing.TB) func(*grid.Grid, error) *grid.Grid {
	return func(g *grid.Grid, err error) *grid.Grid {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
		return g
	}
}

func TestNewRejects(t *testing.T) {
	lat := steps(-89, 2, 90)
	lon := steps(0, 2, 180)
	cases := []struct {
		name       string
		lat, lon   []float64
		latB, lonB [][2]float64
		want       string
	}{
		{"empty latitude", nil, lon, nil, nil, "no latitude values"},
		{"NaN longitude", lat, []float64{0, math.NaN(), 2}, nil, nil, "longitude[1] = NaN is not finite"},
		{"not monotonic", []float64{0, 10, 5}, lon, nil, nil, "latitude is not strictly monotonic at index 2"},
		{"repeated value", lat, []float64{0, 1, 1, 2}, nil, nil, "longitude is not strictly monotonic at index 2"},
		{"latitude in radians?", []float64{-100, 0, 100}, lon, nil, nil, "outside [-90, 90]"},
		{"two full turns", lat, steps(0, 10, 73), nil, nil, "360° or more"},
		{"wrapping without duplicate", lat, steps(0, 1, 400), nil, nil, "360° or more"},
		{"single latitude without bounds", []float64{10}, lon, nil, nil, "cannot derive latitude bounds from a single latitude"},
		{"single longitude without bounds", lat, []float64{10}, nil, nil, "cannot derive longitude bounds from a single longitude"},
		{"bounds count", []float64{0, 10}, lon, [][2]float64{{-5, 5}}, nil, "1 latitude bounds for 2 latitudes"},
		{"bounds miss centre", []float64{0, 10}, lon, [][2]float64{{-5, 5}, {6, 9}}, nil, "do not contain the centre 10"},
		{"bounds not contiguous", []float64{0, 10}, lon, [][2]float64{{-5, 4}, {5, 15}}, nil, "not contiguous between cells 0 and 1"},
		{"bounds beyond pole", []float64{80, 89}, lon, [][2]float64{{75, 85}, {85, 95}}, nil, "reach outside [-90, 90]"},
		{"zero-width bounds", []float64{0, 10}, lon, [][2]float64{{0, 0}, {0, 20}}, nil, "zero width"},
		{"longitude cells overlap", lat, []float64{0, 180}, nil, [][2]float64{{-100, 100}, {100, 300}}, "more than 360°"},
		{"wide longitude cell", lat, []float64{0}, nil, [][2]float64{{-190, 190}}, "wider than 360°"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := grid.New(c.lat, c.lon, c.latB, c.lonB)
			if err == nil {
				t.Fatalf("accepted")
			}
			if !errors.Is(err, grid.ErrInvalid) {
				t.Errorf("error %v does not wrap ErrInvalid", err)
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %q does not mention %q", err, c.want)
			}
		})
	}
}

// TestDerivedBounds checks bounds derived from centres (half-way points,
// poles, wrap-around) on hand-worked grids.
func TestDerivedBounds(t *testing.T) {
	cases := []struct {
		name         string
		lat, lon     []float64
		latB0, latBn [2]float64 // first and last latitude bounds
		lonB0, lonBn [2]float64 // first and last longitude bounds
		periodic     bool
		wrap         bool
		kind         grid.Kind
	}{
		{"1° global", steps(-89.5, 1, 180), steps(0, 1, 360), [2]float64{-90, -89}, [2]float64{89, 90}, [2]float64{-0.5, 0.5}, [2]float64{358.5, 359.5}, true, false, grid.Regular},
		{"north→south", steps(89.5, -1, 180), steps(-180, 1, 360), [2]float64{89, 90}, [2]float64{-90, -89}, [2]float64{-180.5, -179.5}, [2]float64{178.5, 179.5}, true, false, grid.Regular},
		{"duplicated wrap column", steps(-88, 4, 45), steps(0, 4, 91), [2]float64{-90, -86}, [2]float64{86, 90}, [2]float64{-2, 2}, [2]float64{358, 362}, true, true, grid.Regular},
		{"past 360", steps(-89, 2, 90), steps(181, 2, 180), [2]float64{-90, -88}, [2]float64{88, 90}, [2]float64{180, 182}, [2]float64{538, 540}, true, false, grid.Regular},
		{"decreasing longitude", steps(-80, 40, 5), steps(350, -10, 36), [2]float64{-90, -60}, [2]float64{60, 90}, [2]float64{345, 355}, [2]float64{-5, 5}, true, false, grid.Regular},
		{"regional", steps(10, 1, 11), steps(200, 0.5, 21), [2]float64{9.5, 10.5}, [2]float64{19.5, 20.5}, [2]float64{199.75, 200.25}, [2]float64{209.75, 210.25}, false, false, grid.Regular},
		{"irregular", []float64{-60, -20, 0, 10}, []float64{0, 90, 200}, [2]float64{-90, -40}, [2]float64{5, 15}, [2]float64{-80, 45}, [2]float64{145, 280}, true, false, grid.Irregular},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			g := must(t)(grid.New(c.lat, c.lon, nil, nil))
			near := func(a, b [2]float64) bool { return math.Abs(a[0]-b[0]) < 1e-12 && math.Abs(a[1]-b[1]) < 1e-12 }
			if !near(g.LatBounds[0], c.latB0) || !near(g.LatBounds[len(c.lat)-1], c.latBn) {
				t.Errorf("latitude bounds %v … %v, want %v … %v", g.LatBounds[0], g.LatBounds[len(c.lat)-1], c.latB0, c.latBn)
			}
			if !near(g.LonBounds[0], c.lonB0) || !near(g.LonBounds[len(c.lon)-1], c.lonBn) {
				t.Errorf("longitude bounds %v … %v, want %v … %v", g.LonBounds[0], g.LonBounds[len(c.lon)-1], c.lonB0, c.lonBn)
			}
			if g.PeriodicLon != c.periodic || g.WrapColumn != c.wrap || g.Kind != c.kind {
				t.Errorf("periodic %v wrap %v kind %v, want %v %v %v", g.PeriodicLon, g.WrapColumn, g.Kind, c.periodic, c.wrap, c.kind)
			}
			for j := 1; j < len(c.lat); j++ {
				if g.LatBounds[j][0] != g.LatBounds[j-1][1] && g.LatBounds[j][1] != g.LatBounds[j-1][0] {
					t.Errorf("latitude bounds %d, %d not contiguous: %v %v", j-1, j, g.LatBounds[j-1], g.LatBounds[j])
				}
			}
		})
	}
}

func TestSuppliedBounds(t *testing.T) {
	// CF-style descending bounds pairs are accepted and stored (low, high).
	g := must(t)(grid.New([]float64{45, -45}, []float64{90, 270},
		[][2]float64{{90, 0}, {0, -90}}, [][2]float64{{0, 180}, {180, 360}}))
	if g.LatBounds[0] != [2]float64{0, 90} || g.LatBounds[1] != [2]float64{-90, 0} {
		t.Errorf("latitude bounds stored as %v", g.LatBounds)
	}
	if !g.PeriodicLon {
		t.Errorf("%v: two 180° cells not periodic", g)
	}
	// float32-rounded bounds are tolerated and clamped at the poles.
	f32 := func(v float64) float64 { return float64(float32(v)) }
	lat := steps(-89.9, 0.2, 900)
	latB := make([][2]float64, len(lat))
	for j := range latB {
		latB[j] = [2]float64{f32(-90 + 0.2*float64(j)), f32(-90 + 0.2*float64(j+1))}
	}
	g = must(t)(grid.New(lat, steps(0.1, 0.2, 1800), latB, nil))
	if g.LatBounds[len(lat)-1][1] != 90 {
		t.Errorf("last latitude bound %v, want clamped to 90", g.LatBounds[len(lat)-1])
	}
}

func TestKindDetection(t *testing.T) {
	m := must(t)
	gl, _ := grid.GaussianLatitudes(96)
	f32 := make([]float64, len(gl))
	for j, v := range gl {
		f32[j] = float64(float32(v))
	}
	perturbed := slices.Clone(gl)
	perturbed[10] += 0.01
	lon := steps(0, 1.875, 192)
	cases := []struct {
		name string
		g    *grid.Grid
		kind grid.Kind
		str  string
	}{
		{"regular 1°", m(grid.GlobalRegular(1, 1, 0)), grid.Regular, "180×360 regular 1°×1°, lat -89.5…89.5, lon 0…359"},
		{"regular 2.5° from centres", m(grid.New(steps(88.75, -2.5, 72), steps(-180, 2.5, 144), nil, nil)), grid.Regular, "72×144 regular 2.5°×2.5°, lat 88.75…-88.75, lon -180…177.5"},
		{"T62 gaussian", m(grid.GlobalGaussian(94, 192, 0, grid.GaussMidpoint)), grid.Gaussian, "94×192 gaussian, lat -88.542…88.542, lon 0…358.125"},
		{"gaussian float32 north→south", m(grid.New(reversed(f32), lon, nil, nil)), grid.Gaussian, "96×192 gaussian, lat 88.5722…-88.5722, lon 0…358.125"},
		{"perturbed gaussian", m(grid.New(perturbed, lon, nil, nil)), grid.Irregular, "96×192 irregular, lat -88.5722…88.5722, lon 0…358.125"},
		{"wrap column", m(grid.New(steps(-60, 30, 5), steps(-180, 10, 37), nil, nil)), grid.Regular, "5×37 regular 30°×10°, lat -60…60, lon -180…180, wrap column"},
		{"regional", m(grid.New(steps(-20, 1, 41), steps(230, 1, 60), nil, nil)), grid.Regular, "41×60 regular 1°×1°, lat -20…20, lon 230…289, regional"},
	}
	for _, c := range cases {
		if c.g.Kind != c.kind {
			t.Errorf("%s: kind %v, want %v", c.name, c.g.Kind, c.kind)
		}
		if s := c.g.String(); s != c.str {
			t.Errorf("%s: String() = %q, want %q", c.name, s, c.str)
		}
	}
}

func TestEqualAndDifference(t *testing.T) {
	m := must(t)
	a := m(grid.GlobalRegular(1, 1, 0))
	same := m(grid.New(steps(-89.5, 1, 180), steps(0, 1, 360), nil, nil))
	shifted := m(grid.GlobalRegular(1, 1, -180))
	flipped := m(grid.New(reversed(a.Lat), a.Lon, nil, nil))
	coarse := m(grid.GlobalRegular(2, 2, 0))
	nudged := m(grid.New(a.Lat, steps(1e-3, 1, 360), nil, nil))
	cases := []struct {
		name string
		b    *grid.Grid
		tol  float64
		want string // substring of Difference; "" for equal
	}{
		{"same", same, 1e-9, ""},
		{"within tolerance", nudged, 1e-2, ""},
		{"beyond tolerance", nudged, 1e-4, "longitude[0] differs: 0 vs 0.001"},
		{"other convention", shifted, 1e-9, "different meridians or use different longitude conventions"},
		{"flipped", flipped, 1e-9, "latitude order differs"},
		{"coarser", coarse, 1e-9, "180 vs 90 latitudes; 360 vs 180 longitudes"},
	}
	for _, c := range cases {
		d := grid.Difference(a, c.b, c.tol)
		if grid.Equal(a, c.b, c.tol) != (c.want == "") {
			t.Errorf("%s: Equal = %v", c.name, !(c.want == ""))
		}
		if c.want == "" {
			if d != "" {
				t.Errorf("%s: Difference = %q, want none", c.name, d)
			}
			continue
		}
		if !strings.Contains(d, c.want) || !strings.Contains(d, a.String()) || !strings.Contains(d, c.b.String()) {
			t.Errorf("%s: Difference = %q, want it to name both grids and say %q", c.name, d, c.want)
		}
	}
}
