package cf

import (
	"encoding/binary"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// floatsFrom turns fuzz bytes into up to max float64s, 2 bytes each as a
// coordinate in a plausible range plus an occasional special value.
func floatsFrom(b []byte, max int, scale float64) []float64 {
	var out []float64
	for len(b) >= 2 && len(out) < max {
		v := binary.LittleEndian.Uint16(b)
		b = b[2:]
		switch v {
		case 0xffff:
			out = append(out, math.NaN())
		case 0xfffe:
			out = append(out, math.Inf(1))
		default:
			out = append(out, (float64(v)/65535-0.5)*scale)
		}
	}
	return out
}

// FuzzLayout: random coordinates never make newLayout panic, and a layout
// it accepts is canonical: latitudes ascending, longitudes ascending in
// [−180, 180), every canonical cell mapped to a distinct stored cell.
func FuzzLayout(f *testing.F) {
	f.Add([]byte{0, 0, 0, 128, 255, 255}, []byte{0, 0, 0, 64, 0, 128, 0, 192, 255, 255}, true, false)
	f.Add([]byte{1, 2, 3, 4}, []byte{5, 6, 7, 8, 9, 10}, false, true)
	f.Fuzz(func(t *testing.T, latB, lonB []byte, latFirst, withBounds bool) {
		lat := floatsFrom(latB, 8, 200) // beyond ±90 on purpose
		lon := floatsFrom(lonB, 8, 1080)
		var lb, ob [][2]float64
		if withBounds {
			for _, x := range lat {
				lb = append(lb, [2]float64{x - 1, x + 1})
			}
			for _, x := range lon {
				ob = append(ob, [2]float64{x + 1, x - 1})
			}
		}
		l, err := newLayout("f.nc", "lat", "lon", lat, lon, lb, ob, latFirst)
		if err != nil {
			return
		}
		for i := 1; i < len(l.Lat); i++ {
			if !(l.Lat[i] > l.Lat[i-1]) {
				t.Fatalf("lat not ascending: %v", l.Lat)
			}
		}
		for i, x := range l.Lon {
			if x < -180 || x >= 180 || (i > 0 && !(x > l.Lon[i-1])) {
				t.Fatalf("lon not canonical: %v (from %v)", l.Lon, lon)
			}
		}
		if len(l.src) != l.NLat()*l.NLon() {
			t.Fatalf("%d cells mapped for %d×%d", len(l.src), l.NLat(), l.NLon())
		}
		seen := map[int]bool{}
		for _, s := range l.src {
			if s < 0 || s >= len(lat)*len(lon) || seen[s] {
				t.Fatalf("bad src %v", l.src)
			}
			seen[s] = true
		}
		if (len(lat) > 1 || withBounds) && len(l.LatBounds) != l.NLat() {
			t.Fatalf("lat bounds %v", l.LatBounds)
		}
		for _, b := range l.LatBounds {
			if b[0] > b[1] {
				t.Fatalf("lat bounds not ordered: %v", l.LatBounds)
			}
		}
	})
}

// A damaged or truncated file gives an error (or an unusable report),
// never a panic: each fixture, in every format, cut at several sizes.
func TestTruncatedFiles(t *testing.T) {
	t.Parallel()
	for _, name := range []string{"grid_ns_0360", "packing", "month_units"} {
		for _, kind := range ncgenKinds {
			src := fixture(t, name, kind)
			data, err := os.ReadFile(src)
			if err != nil {
				t.Fatal(err)
			}
			for _, frac := range []float64{0, 0.01, 0.1, 0.3, 0.5, 0.7, 0.9, 0.99} {
				n := int(float64(len(data)) * frac)
				p := filepath.Join(t.TempDir(), "cut.nc")
				if err := os.WriteFile(p, data[:n], 0o644); err != nil {
					t.Fatal(err)
				}
				func() {
					defer func() {
						if x := recover(); x != nil {
							t.Errorf("%s (%s) cut at %d of %d bytes: panic %v", name, kind, n, len(data), x)
						}
					}()
					rep := Inspect(p)
					if rep.Usable && n < len(data)/2 {
						t.Errorf("%s (%s) cut at %d of %d bytes reported usable", name, kind, n, len(data))
					}
					f, err := Open([]string{p}, Spec{Role: RoleSST, Overrides: Overrides{Climatology: name == "month_units"}})
					if err != nil {
						return
					}
					defer f.Close()
					buf := make([]float32, f.Len())
					for ts := 0; ts < f.NT(); ts++ {
						_ = f.ReadSlab(ts, buf, nil)
					}
				}()
			}
		}
	}
}
