package coast

import (
	"math"
	"testing"
)

func TestEncodeDecode(t *testing.T) {
	in := [][]Point{
		{{-180, -10}, {-179.994, -10.004}, {-179.5, 0}, {179.99, 89.99}},
		{{0, 0}, {0.001, 0.001}}, // rounds to one point: dropped
		{{10, 20}, {10, 20}, {11, 21}},
	}
	got, err := Decode(Encode(in))
	if err != nil {
		t.Fatal(err)
	}
	want := [][]Point{
		{{-180, -10}, {-179.99, -10}, {-179.5, 0}, {179.99, 89.99}},
		{{10, 20}, {11, 21}},
	}
	if len(got) != len(want) {
		t.Fatalf("got %d lines, want %d: %v", len(got), len(want), got)
	}
	for i := range want {
		for k := range want[i] {
			if math.Abs(got[i][k].Lon-want[i][k].Lon) > 1e-9 || math.Abs(got[i][k].Lat-want[i][k].Lat) > 1e-9 {
				t.Errorf("line %d point %d: %v, want %v", i, k, got[i][k], want[i][k])
			}
		}
	}
	for _, bad := range [][]byte{nil, []byte("LSCL"), []byte("XXXX\x01\x00"), []byte("LSCL\x02\x00"), append(Encode(in), 0), Encode(in)[:20]} {
		if _, err := Decode(bad); err == nil {
			t.Errorf("Decode(%q) accepted corrupt data", bad)
		}
	}
}

func FuzzDecode(f *testing.F) {
	f.Add(Encode([][]Point{{{1, 2}, {3, 4}}}))
	f.Add(embedded)
	f.Add([]byte("LSCL\x01\x05\x02"))
	f.Fuzz(func(t *testing.T, b []byte) {
		ls, err := Decode(b)
		if err != nil {
			return
		}
		for _, l := range ls {
			if len(l) < 2 {
				t.Fatalf("decoded a line of %d points", len(l))
			}
			for _, p := range l {
				if math.Abs(p.Lon) > 180 || math.Abs(p.Lat) > 90 {
					t.Fatalf("decoded %v off the globe", p)
				}
			}
		}
		// Re-encoding what was decoded gives data that decodes the same.
		again, err := Decode(Encode(ls))
		if err != nil {
			t.Fatal(err)
		}
		if len(again) > len(ls) {
			t.Fatalf("re-encoding grew %d lines to %d", len(ls), len(again))
		}
	})
}

// distance returns the great-circle distance in degrees of arc.
func distance(a, b Point) float64 {
	r := math.Pi / 180
	s := math.Sin(a.Lat*r)*math.Sin(b.Lat*r) + math.Cos(a.Lat*r)*math.Cos(b.Lat*r)*math.Cos((a.Lon-b.Lon)*r)
	return math.Acos(math.Max(-1, math.Min(1, s))) / r
}

func nearest(ls [][]Point, p Point) float64 {
	best := math.Inf(1)
	for _, l := range ls {
		for _, q := range l {
			best = math.Min(best, distance(p, q))
		}
	}
	return best
}

// The embedded coastline is Natural Earth's 1:110m land: its northern
// and southern extents are those of the source file's bbox (83.645°N,
// Greenland; 85.609°S; world-atlas 2.0.2 land-110m.json), it passes near well-known capes and stays away
// from the open ocean.
func TestEmbedded(t *testing.T) {
	ls, err := Lines()
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	north, south := -90.0, 90.0
	for _, l := range ls {
		n += len(l)
		for _, p := range l {
			north, south = math.Max(north, p.Lat), math.Min(south, p.Lat)
		}
	}
	if len(ls) < 100 || n < 4000 || n > 6000 {
		t.Errorf("%d lines, %d points: expected the ~130 lines and ~5100 points of the 1:110m land", len(ls), n)
	}
	if math.Abs(north-83.645) > 0.01 {
		t.Errorf("northernmost point %.3f°N, want 83.645°N (source bbox)", north)
	}
	if math.Abs(south+85.609) > 0.01 {
		t.Errorf("southernmost point %.3f°N, want 85.609°S (source bbox: the Ross Ice Shelf grounding line)", south)
	}
	for _, c := range []struct {
		name string
		p    Point
		max  float64
	}{
		// Positions from memory; 1:110m generalisation is ~0.5°.
		{"Cape of Good Hope", Point{18.47, -34.36}, 0.7},
		{"Cape Horn", Point{-67.27, -55.98}, 0.7},
		{"Cap-Vert (Dakar)", Point{-17.5, 14.7}, 0.7},
		{"Cape York", Point{142.5, -10.7}, 0.7},
		{"Lima", Point{-77.05, -12.05}, 0.7},
	} {
		if d := nearest(ls, c.p); d > c.max {
			t.Errorf("%s: nearest coast %.2f° away, want ≤ %g°", c.name, d, c.max)
		}
	}
	for _, p := range []Point{{-100, -30}, {-40, 10}, {-140, 0}, {80, -30}} {
		if d := nearest(ls, p); d < 5 {
			t.Errorf("open ocean at %v: coast only %.2f° away", p, d)
		}
	}
	// No segment runs along the antimeridian (the data's cut, not a coast).
	for _, l := range ls {
		for i := 1; i < len(l); i++ {
			if math.Abs(l[i].Lon) > 179.99 && math.Abs(l[i-1].Lon) > 179.99 && l[i].Lon == l[i-1].Lon {
				t.Fatalf("segment %v → %v runs along the antimeridian", l[i-1], l[i])
			}
		}
	}
}

func TestProject(t *testing.T) {
	cases := []struct {
		name string
		in   [][]Point
		box  Box
		want [][]Point
	}{
		{"inside unchanged", [][]Point{{{10, 0}, {20, 5}}}, Box{-180, 180, -90, 90}, [][]Point{{{10, 0}, {20, 5}}}},
		{"wrapped into 0…360", [][]Point{{{-10, 0}, {-20, 10}}}, Box{0, 360, -90, 90}, [][]Point{{{350, 0}, {340, 10}}}},
		{"split at the Greenwich seam of a 0…360 map", [][]Point{{{-2, 0}, {2, 4}}}, Box{0, 360, -90, 90},
			[][]Point{{{358, 0}, {360, 2}}, {{0, 2}, {2, 4}}}},
		{"split at the dateline of a −180…180 map", [][]Point{{{178, 0}, {-178, 4}}}, Box{-180, 180, -90, 90},
			[][]Point{{{178, 0}, {180, 2}}, {{-180, 2}, {-178, 4}}}},
		{"dateline crossing continuous on a 0…360 map", [][]Point{{{178, 0}, {-178, 4}}}, Box{0, 360, -90, 90},
			[][]Point{{{178, 0}, {182, 4}}}},
		{"clipped to the box", [][]Point{{{-10, 0}, {10, 0}}}, Box{0, 20, -5, 5}, [][]Point{{{0, 0}, {10, 0}}}},
		{"leaves and re-enters", [][]Point{{{1, 0}, {1, 10}, {3, 10}, {3, 0}}}, Box{0, 5, -5, 5},
			[][]Point{{{1, 0}, {1, 5}}, {{3, 5}, {3, 0}}}},
		{"outside dropped", [][]Point{{{50, 50}, {60, 60}}}, Box{0, 20, -5, 5}, nil},
		{"regional box across the dateline", [][]Point{{{170, 0}, {-170, 0}}}, Box{160, 200, -10, 10}, [][]Point{{{170, 0}, {190, 0}}}},
	}
	for _, c := range cases {
		got := Project(c.in, c.box)
		if !approxLines(got, c.want) {
			t.Errorf("%s: Project = %v, want %v", c.name, got, c.want)
		}
	}
}

func approxLines(a, b [][]Point) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if len(a[i]) != len(b[i]) {
			return false
		}
		for k := range a[i] {
			if math.Abs(a[i][k].Lon-b[i][k].Lon) > 1e-9 || math.Abs(a[i][k].Lat-b[i][k].Lat) > 1e-9 {
				return false
			}
		}
	}
	return true
}

// The projected embedded coastline stays in the box on every kind of map.
func TestProjectEmbeddedInBox(t *testing.T) {
	ls, err := Lines()
	if err != nil {
		t.Fatal(err)
	}
	for _, b := range []Box{{-180, 180, -90, 90}, {0, 360, -90, 90}, {-180, 180, -30, 30}, {120, 290, -40, 40}} {
		got := Project(ls, b)
		if len(got) == 0 {
			t.Errorf("%v: no coast", b)
		}
		for _, l := range got {
			for _, p := range l {
				if p.Lon < b.West-1e-9 || p.Lon > b.East+1e-9 || p.Lat < b.South-1e-9 || p.Lat > b.North+1e-9 {
					t.Fatalf("%v: point %v outside", b, p)
				}
			}
			for i := 1; i < len(l); i++ {
				if math.Abs(l[i].Lon-l[i-1].Lon) > 90 {
					t.Fatalf("%v: segment %v → %v jumps across the map", b, l[i-1], l[i])
				}
			}
		}
	}
}

func BenchmarkProject(b *testing.B) {
	ls, _ := Lines()
	for b.Loop() {
		Project(ls, Box{0, 360, -60, 60})
	}
}
