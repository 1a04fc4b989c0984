package grid_test

import (
	"math"
	"testing"

	"lidscope/grid"
)

// TestSolidAngleWorked checks cell solid angles against closed forms of the
// spherical-zone area 2πR²(sin φ2 − sin φ1) per full turn (common practice).
func TestSolidAngleWorked(t *testing.T) {
	cases := []struct {
		name             string
		lat1, lat2, dlon float64
		want             float64
	}{
		{"hemisphere", 0, 90, 360, 2 * math.Pi},
		{"whole sphere", -90, 90, 360, 4 * math.Pi},
		{"tropics 30S-30N", -30, 30, 360, 2 * math.Pi}, // sin 30° = 1/2
		{"polar cap above 60N", 60, 90, 360, 2 * math.Pi * (1 - math.Sqrt(3)/2)},
		{"octant", 0, 90, 90, math.Pi / 2},
		{"reversed order", 90, 0, -90, math.Pi / 2},
		{"1°×1° at the equator", 0, 1, 1, math.Pi / 180 * math.Sin(math.Pi/180)},
	}
	for _, c := range cases {
		if got := grid.BandSolidAngle(c.lat1, c.lat2, c.dlon); math.Abs(got-c.want) > 1e-15*c.want+1e-18 {
			t.Errorf("%s: %.17g sr, want %.17g", c.name, got, c.want)
		}
	}
}

// TestAreasSumToSphere: cell areas of global grids sum to 4πR² (to 1e-11,
// the rounding of a plain sum of up to 10⁶ terms),
// and a duplicated wrap column adds nothing.
func TestAreasSumToSphere(t *testing.T) {
	t.Parallel()
	m := must(t)
	r1 := m(grid.GlobalRegular(1, 1, 0))
	grids := map[string]*grid.Grid{
		"0.25°":             m(grid.GlobalRegular(0.25, 0.25, 0.125)),
		"1°":                r1,
		"2.5°×3.75°":        m(grid.GlobalRegular(2.5, 3.75, 0)),
		"T42 midpoint":      m(grid.GlobalGaussian(64, 128, 0, grid.GaussMidpoint)),
		"T42 weights":       m(grid.GlobalGaussian(64, 128, 0, grid.GaussWeights)),
		"T255 midpoint":     m(grid.GlobalGaussian(256, 512, 0, grid.GaussMidpoint)),
		"1° wrap column":    m(grid.New(r1.Lat, steps(0, 1, 361), nil, nil)),
		"irregular derived": m(grid.New([]float64{-70, -10, 0, 3, 50}, []float64{10, 100, 170, 300}, nil, nil)),
	}
	sphere := 4 * math.Pi * grid.EarthRadius * grid.EarthRadius
	for name, g := range grids {
		var sr, m2 float64
		for _, v := range g.SolidAngles() {
			sr += v
		}
		for _, v := range g.CellAreas() {
			m2 += v
		}
		if math.Abs(sr-4*math.Pi) > 1e-11*4*math.Pi {
			t.Errorf("%s: solid angles sum to %.15g, want 4π", name, sr)
		}
		if math.Abs(m2-sphere) > 1e-11*sphere {
			t.Errorf("%s: areas sum to %.15g m², want 4πR² = %.15g", name, m2, sphere)
		}
	}
	wrap := grids["1° wrap column"]
	if a := wrap.SolidAngle(10, 360); a != 0 {
		t.Errorf("wrap column cell solid angle %g, want 0", a)
	}
}

// TestGaussWeightsBounds: with GaussWeights bounds each cell's solid angle is
// 2π·w/nlon for its quadrature weight w.
func TestGaussWeightsBounds(t *testing.T) {
	g := must(t)(grid.GlobalGaussian(64, 128, 0, grid.GaussWeights))
	_, w := grid.GaussianLatitudes(64)
	for j := range g.Lat {
		want := 2 * math.Pi * w[j] / 128
		if got := g.SolidAngle(j, 5); math.Abs(got-want) > 1e-13*want {
			t.Errorf("row %d: %.15g sr, want 2π·w/nlon = %.15g", j, got, want)
		}
		if b := g.LatBounds[j]; !(g.Lat[j] > b[0] && g.Lat[j] < b[1]) {
			t.Errorf("row %d: latitude %g outside its bounds %v", j, g.Lat[j], b)
		}
	}
}
