package grid_test

import (
	"errors"
	"strings"
	"testing"

	"lidscope/grid"
)

func TestParseSpec(t *testing.T) {
	cases := []struct {
		spec string
		want string // String() of the grid, or error text
		ok   bool
	}{
		{"regular 1", "180×360 regular 1°×1°, lat -89.5…89.5, lon -179.5…179.5", true},
		{"  Regular 2x2.5 ", "90×144 regular 2°×2.5°, lat -89…89, lon -178.75…178.75", true},
		{"gaussian 64", "64×128 gaussian, lat -87.8638…87.8638, lon -180…177.1875", true},
		{"gaussian 48x96", "48×96 gaussian, lat -87.1591…87.1591, lon -180…176.25", true},
		{"regular 7", "180/dlat and 360/dlon must be whole", false},
		{"regular", "want a kind and a size", false},
		{"regular abc", "latitude spacing \"abc\" is not a number", false},
		{"gaussian 1", "latitude count", false},
		{"gaussian 64x0", "longitude count", false},
		{"hexagonal 3", "unknown kind", false},
	}
	for _, c := range cases {
		g, err := grid.ParseSpec(c.spec)
		if c.ok {
			if err != nil {
				t.Errorf("%q: %v", c.spec, err)
			} else if g.String() != c.want {
				t.Errorf("%q: %v, want %s", c.spec, g, c.want)
			}
			continue
		}
		if err == nil || !errors.Is(err, grid.ErrInvalid) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: error %v, want one wrapping ErrInvalid mentioning %q", c.spec, err, c.want)
		}
	}
}

func FuzzParseSpec(f *testing.F) {
	for _, s := range []string{"regular 1", "regular 2x2.5", "gaussian 64", "gaussian 64x128", "regular 1e-300", "gaussian -3", "regular NaN"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		g, err := grid.ParseSpec(s)
		if err != nil {
			return
		}
		if g.Size() == 0 || !g.PeriodicLon || g.Lon[0] < -180 || g.Lon[g.NLon()-1] >= 180 || !g.LatAscending() {
			t.Fatalf("%q gave %v", s, g)
		}
	})
}
