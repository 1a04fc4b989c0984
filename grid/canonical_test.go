package grid_test

import (
	"math"
	"testing"

	"lidscope/grid"
)

// value is a synthetic field defined by position (longitude modulo 360), so
// that the same place has the same value in every layout.
func value(lat, lon float64) float32 {
	l := math.Mod(math.Mod(lon, 360)+360, 360)
	return float32(1000*lat + l)
}

func TestCanonical(t *testing.T) {
	m := must(t)
	cases := []struct {
		name               string
		g                  *grid.Grid
		nlon               int
		firstLon, lastLon  float64
		identity, periodic bool
	}{
		{"already canonical", m(grid.GlobalRegular(1, 1, -179.5)), 360, -179.5, 179.5, true, true},
		{"0…360", m(grid.GlobalRegular(1, 1, 0)), 360, -180, 179, false, true},
		{"north→south", m(grid.New(steps(89, -2, 90), steps(-179, 2, 180), nil, nil)), 180, -179, 179, false, true},
		{"wrap column", m(grid.New(steps(-88, 4, 45), steps(0, 4, 91), nil, nil)), 90, -180, 176, false, true},
		{"past 360", m(grid.New(steps(-89, 2, 90), steps(181, 2, 180), nil, nil)), 180, -179, 179, true, true}, // data order kept, coordinates shifted
		{"decreasing longitude", m(grid.New(steps(-80, 40, 5), steps(350, -10, 36), nil, nil)), 36, -180, 170, false, true},
		{"gaussian north→south", m(grid.New(reversed(mustLat(64)), steps(0, 2.8125, 128), nil, nil)), 128, -180, 177.1875, false, true},
		{"regional east of dateline", m(grid.New(steps(-30, 1, 31), steps(200, 1, 51), nil, nil)), 51, -160, -110, true, false},
		{"regional across dateline", m(grid.New(steps(-10, 1, 21), steps(120, 2, 61), nil, nil)), 61, 120, 240, true, false},
		{"regional past 360", m(grid.New(steps(-10, 1, 21), steps(480, 2, 61), nil, nil)), 61, 120, 240, true, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			can, p, err := grid.Canonical(c.g)
			if err != nil {
				t.Fatal(err)
			}
			if can.NLon() != c.nlon || can.WrapColumn {
				t.Fatalf("%v: %d longitudes (wrap %v), want %d", can, can.NLon(), can.WrapColumn, c.nlon)
			}
			if math.Abs(can.Lon[0]-c.firstLon) > 1e-9 || math.Abs(can.Lon[c.nlon-1]-c.lastLon) > 1e-9 {
				t.Errorf("%v: longitudes %g…%g, want %g…%g", can, can.Lon[0], can.Lon[c.nlon-1], c.firstLon, c.lastLon)
			}
			if p.Identity() != c.identity || can.PeriodicLon != c.periodic {
				t.Errorf("identity %v periodic %v, want %v %v", p.Identity(), can.PeriodicLon, c.identity, c.periodic)
			}
			if can.Kind != c.g.Kind {
				t.Errorf("kind %v became %v", c.g.Kind, can.Kind)
			}
			for j := 1; j < can.NLat(); j++ {
				if !(can.Lat[j] > can.Lat[j-1]) {
					t.Fatalf("latitudes not ascending at %d", j)
				}
			}
			for i := range can.Lon {
				if i > 0 && !(can.Lon[i] > can.Lon[i-1]) {
					t.Fatalf("longitudes not ascending at %d", i)
				}
				if c.periodic && (can.Lon[i] < -180 || can.Lon[i] >= 180) {
					t.Fatalf("longitude %g outside [-180, 180)", can.Lon[i])
				}
				if b := can.LonBounds[i]; !(b[0] <= can.Lon[i] && can.Lon[i] <= b[1]) {
					t.Fatalf("longitude %g outside its bounds %v", can.Lon[i], b)
				}
			}
			// Permuting data: every canonical cell holds the value of its place.
			src := make([]float32, c.g.Size())
			for j, la := range c.g.Lat {
				for i, lo := range c.g.Lon {
					src[j*c.g.NLon()+i] = value(la, lo)
				}
			}
			dst := make([]float32, can.Size())
			if err := p.Apply(dst, src); err != nil {
				t.Fatal(err)
			}
			for j, la := range can.Lat {
				for i, lo := range can.Lon {
					if got, want := dst[j*can.NLon()+i], value(la, lo); got != want {
						t.Fatalf("canonical cell (%g, %g) holds %g, want %g", la, lo, got, want)
					}
				}
			}
			// Areas move with their cells.
			a, b := c.g.SolidAngles(), can.SolidAngles()
			var sa, sb float64
			for _, v := range a {
				sa += v
			}
			for _, v := range b {
				sb += v
			}
			if math.Abs(sa-sb) > 1e-12*sa {
				t.Errorf("total solid angle %g became %g", sa, sb)
			}
			if err := p.Apply(dst[:1], src); err == nil {
				t.Error("short destination accepted")
			}
		})
	}
}

func mustLat(n int) []float64 {
	lat, _ := grid.GaussianLatitudes(n)
	return lat
}

func TestPermAllocations(t *testing.T) {
	g := must(t)(grid.GlobalRegular(1, 1, 0))
	_, p, err := grid.Canonical(g)
	if err != nil {
		t.Fatal(err)
	}
	src := make([]float32, g.Size())
	dst := make([]float32, g.Size())
	if a := testing.AllocsPerRun(10, func() { _ = p.Apply(dst, src) }); a != 0 {
		t.Errorf("Perm.Apply allocates %g times per call", a)
	}
}
