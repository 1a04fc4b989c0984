package grid_test

import (
	"math"
	"testing"

	"lidscope/grid"
)

// FuzzNew builds coordinate axes from fuzzed parameters (start, step,
// count, a jitter) and checks that New never panics and that every grid it
// accepts is consistent: bounds contain centres and have positive width,
// total solid angle is at most 4π, and Canonical succeeds with ascending
// axes.
func FuzzNew(f *testing.F) {
	f.Add(-89.5, 1.0, uint16(180), 0.0, 1.0, uint16(360), 0.0)
	f.Add(89.0, -2.0, uint16(90), 181.0, 2.0, uint16(181), 0.0)
	f.Add(-60.0, 30.0, uint16(5), 0.0, 10.0, uint16(37), 0.0)
	f.Add(10.0, 0.5, uint16(3), 359.0, -0.25, uint16(7), 0.1)
	f.Add(0.0, 1e-9, uint16(2), -1e6, 1e5, uint16(2), 0.0)
	f.Fuzz(func(t *testing.T, lat0, dlat float64, nlat uint16, lon0, dlon float64, nlon uint16, jitter float64) {
		nlat, nlon = nlat%400, nlon%800
		lat := make([]float64, nlat)
		for j := range lat {
			lat[j] = lat0 + float64(j)*dlat + jitter*math.Sin(float64(j))
		}
		lon := make([]float64, nlon)
		for i := range lon {
			lon[i] = lon0 + float64(i)*dlon + jitter*math.Cos(float64(i))
		}
		g, err := grid.New(lat, lon, nil, nil)
		if err != nil {
			return
		}
		for j, b := range g.LatBounds {
			if !(b[0] < b[1]) || b[0] < -90 || b[1] > 90 || g.Lat[j] < b[0]-1e-4 || g.Lat[j] > b[1]+1e-4 {
				t.Fatalf("latitude %d: %g with bounds %v", j, g.Lat[j], b)
			}
		}
		for i, b := range g.LonBounds {
			if !(b[0] < b[1]) || g.Lon[i] < b[0]-1e-4 || g.Lon[i] > b[1]+1e-4 {
				t.Fatalf("longitude %d: %g with bounds %v", i, g.Lon[i], b)
			}
		}
		var s float64
		for _, a := range g.SolidAngles() {
			if a < 0 || math.IsNaN(a) {
				t.Fatalf("solid angle %g", a)
			}
			s += a
		}
		if s > 4*math.Pi*(1+1e-9) {
			t.Fatalf("%v: total solid angle %g exceeds 4π", g, s)
		}
		_ = g.String()
		c, p, err := grid.Canonical(g)
		if err != nil {
			t.Fatalf("Canonical(%v): %v", g, err)
		}
		for j := 1; j < c.NLat(); j++ {
			if !(c.Lat[j] > c.Lat[j-1]) {
				t.Fatalf("canonical latitudes not ascending")
			}
		}
		for i := 1; i < c.NLon(); i++ {
			if !(c.Lon[i] > c.Lon[i-1]) {
				t.Fatalf("canonical longitudes not ascending: %v", c.Lon)
			}
		}
		if len(p.LatIndex) != c.NLat() || len(p.LonIndex) != c.NLon() {
			t.Fatalf("permutation size %d×%d for %v", len(p.LatIndex), len(p.LonIndex), c)
		}
	})
}
