package ramp

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// referenceMaps are samples of every colour map registered in Matplotlib
// 3.6.3 (Debian package python3-matplotlib), written once by
// testdata/reference_maps.py; the file names its source.
type referenceMaps struct {
	Source  string              `json:"source"`
	Samples int                 `json:"samples"`
	Maps    map[string][]string `json:"maps"`
}

func loadReferenceMaps(t *testing.T) referenceMaps {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("testdata", "reference_maps.json"))
	if err != nil {
		t.Fatal(err)
	}
	var r referenceMaps
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatalf("testdata/reference_maps.json: %v", err)
	}
	// Guard against an empty or truncated regeneration: Matplotlib 3.6
	// registers 83 maps besides the reversed ones, among them its default.
	if len(r.Maps) < 80 || r.Samples < 9 || len(r.Maps["viridis"]) != r.Samples {
		t.Fatalf("testdata/reference_maps.json holds %d maps of %d samples: regenerate it with testdata/reference_maps.py", len(r.Maps), r.Samples)
	}
	return r
}

func hexLab(t *testing.T, h string) Lab {
	t.Helper()
	v, err := strconv.ParseUint(strings.TrimPrefix(h, "#"), 16, 32)
	if err != nil || len(h) != 7 {
		t.Fatalf("reference sample %q is not #rrggbb", h)
	}
	return FromSRGB(float64(v>>16)/255, float64(v>>8&0xff)/255, float64(v&0xff)/255)
}

// resemblance compares two maps sampled at the same points: the mean
// colour difference ΔE*ab (CIE 15:2004 eq. 8.8, the CIELAB distance), and
// their lightness and hue tracks: the mean |ΔL*| over all samples and the
// mean hue-angle difference over the samples where both are chromatic (C*
// ≥ 10; hue means nothing near grey). hueN counts those samples.
type resemblance struct {
	dE, dL, dh float64
	hueN       int
}

func compareTracks(a, b []Lab) resemblance {
	var r resemblance
	for i := range a {
		r.dE += math.Sqrt((a[i].L-b[i].L)*(a[i].L-b[i].L) + (a[i].A-b[i].A)*(a[i].A-b[i].A) + (a[i].B-b[i].B)*(a[i].B-b[i].B))
		r.dL += math.Abs(a[i].L - b[i].L)
		if math.Hypot(a[i].A, a[i].B) >= 10 && math.Hypot(b[i].A, b[i].B) >= 10 {
			d := math.Abs(math.Atan2(a[i].B, a[i].A)-math.Atan2(b[i].B, b[i].A)) * 180 / math.Pi
			if d > 180 {
				d = 360 - d
			}
			r.dh += d
			r.hueN++
		}
	}
	n := float64(len(a))
	r.dE /= n
	r.dL /= n
	if r.hueN > 0 {
		r.dh /= float64(r.hueN)
	}
	return r
}

// follows says whether b follows a: colours close on average (mean ΔE*ab
// below 15, several just-noticeable differences of about 2.3 each, Sharma
// 2003, Digital Color Imaging Handbook §1.7, from memory), or the same
// lightness track (mean |ΔL*| below 10) with the same hue track (mean hue
// difference below 20° over at least half the samples).
func (r resemblance) follows(samples int) bool {
	return r.dE < 15 || (r.dL < 10 && r.hueN*2 >= samples && r.dh < 20)
}

func (r resemblance) String() string {
	return fmt.Sprintf("mean ΔE*ab %.1f, mean |ΔL*| %.1f, mean hue difference %.1f° over %d chromatic samples", r.dE, r.dL, r.dh, r.hueN)
}

func sampleLab(path func(float64) Lab, n int) []Lab {
	out := make([]Lab, n)
	for i := range out {
		out[i] = path(float64(i) / float64(n-1))
	}
	return out
}

// nearestReference returns the reference map (either direction) whose
// tracks are nearest ours, and whether any reference follows ours.
func nearestReference(t *testing.T, ref referenceMaps, ours []Lab) (string, resemblance, []string) {
	t.Helper()
	best, bestName := resemblance{dE: math.Inf(1)}, ""
	var followers []string
	for name, hexes := range ref.Maps {
		fwd := make([]Lab, len(hexes))
		for i, h := range hexes {
			fwd[i] = hexLab(t, h)
		}
		rev := make([]Lab, len(fwd))
		for i := range fwd {
			rev[i] = fwd[len(fwd)-1-i]
		}
		for _, c := range []struct {
			name string
			labs []Lab
		}{{name, fwd}, {name + " reversed", rev}} {
			r := compareTracks(ours, c.labs)
			if r.follows(ref.Samples) {
				followers = append(followers, c.name+" ("+r.String()+")")
			}
			if r.dE < best.dE {
				best, bestName = r, c.name
			}
		}
	}
	return bestName, best, followers
}

// The retired maps, kept here only as the test's controls: the old
// sequential map followed the plotting library's default map, the old
// diverging one its red-blue map. The comparison must catch both.
func retiredSequential(t float64) Lab {
	c := 25.0
	if t > 0.45 {
		c = 25 + 55*math.Pow((t-0.45)/0.55, 1.5)
	}
	return LCh(lerp(18, 94, t), c, lerp(290, 100, t))
}

func retiredDiverging(t float64) Lab {
	s := 2*t - 1
	a := math.Abs(s)
	l := lerp(96, 35, a)
	if s < 0 {
		return LCh(l, rise(a, 38, 27), 255)
	}
	return LCh(l, rise(a, 42, 40), 40)
}

// lidscope's chromatic maps follow none of the reference maps, in either
// direction; the retired maps, which did, are caught. The neutral map is a
// plain grey ramp, the same as every library's grey map by design (common
// practice), and is left out.
func TestMapsDistinctFromReferences(t *testing.T) {
	ref := loadReferenceMaps(t)
	for _, c := range []struct {
		name string
		path func(float64) Lab
		// wantFollower is a reference map that must be found following
		// (the controls); empty for lidscope's maps.
		wantFollower string
	}{
		{"fathom", fathom, ""},
		{"fulcrum", fulcrum, ""},
		{"retired sequential", retiredSequential, "viridis"},
		{"retired diverging", retiredDiverging, "RdBu reversed"},
	} {
		ours := sampleLab(c.path, ref.Samples)
		name, near, followers := nearestReference(t, ref, ours)
		t.Logf("%s: nearest reference %s: %s", c.name, name, near)
		if c.wantFollower == "" {
			if len(followers) > 0 {
				t.Errorf("%s follows reference maps of %s: %s", c.name, ref.Source, strings.Join(followers, "; "))
			}
			continue
		}
		found := false
		for _, f := range followers {
			found = found || strings.HasPrefix(f, c.wantFollower+" (")
		}
		if !found {
			t.Errorf("control %s: the comparison did not find that it follows %s (followers: %v)", c.name, c.wantFollower, followers)
		}
	}
}

// lidscope's map names are its own: none is the name of a reference map
// (in any letter case), nor one of the retired names.
func TestMapNamesOwn(t *testing.T) {
	ref := loadReferenceMaps(t)
	taken := map[string]bool{"dusk": true, "tide": true, "ash": true}
	for name := range ref.Maps {
		taken[strings.ToLower(name)] = true
	}
	for _, n := range Names() {
		if taken[strings.ToLower(n)] {
			t.Errorf("colour map name %q is taken (a reference map of %s, or a retired name)", n, ref.Source)
		}
	}
}

// Printable in grey: lightness is strictly monotone along each map
// (along each half of a diverging map) and spans at least 60 L* units, so
// that a greyscale print still orders the values (common practice).
func TestMapsGreyPrint(t *testing.T) {
	const n = 1025
	for _, name := range Names() {
		m, _ := ByName(name)
		half := n - 1
		if m.Kind == Diverging {
			half = (n - 1) / 2
		}
		prev := m.At(0).L
		lo, hi := prev, prev
		for i := 1; i < n; i++ {
			l := m.At(float64(i) / (n - 1)).L
			lo, hi = math.Min(lo, l), math.Max(hi, l)
			up := l > prev
			if wantUp := m.Kind == Sequential || i <= half; up != wantUp {
				t.Fatalf("%s: L* not monotone at entry %d of %d (%.4f → %.4f)", name, i, n, prev, l)
			}
			prev = l
		}
		if hi-lo < 60 {
			t.Errorf("%s: L* spans only %.1f…%.1f (< 60 units): too little contrast in grey", name, lo, hi)
		}
	}
}

// The design's tracks, as the package documentation states them.
func TestMapsTracks(t *testing.T) {
	cases := []struct {
		name       string
		t, l, c, h float64
	}{
		{"fathom", 0, 18, 12, 200},
		{"fathom", 1, 94, 8, 60},
		{"fathom", 0.5, 56, 42, 314},
		{"fathom", 0.25, 37, 25, 274},
		{"fathom", 0.75, 75, 32, 348},
		{"fulcrum", 0, 33, 22, 240},
		{"fulcrum", 0.5, 96, 0, math.NaN()},
		{"fulcrum", 1, 33, 45, 40},
		{"fulcrum", 0.2, 33 + 63*0.4, 30, 195 + 45*0.6},
		{"fulcrum", 0.8, 33 + 63*0.4, 42, 80 - 40*0.6},
	}
	for _, c := range cases {
		m, _ := ByName(c.name)
		p := m.At(c.t)
		ch := math.Hypot(p.A, p.B)
		h := math.Mod(math.Atan2(p.B, p.A)*180/math.Pi+360, 360)
		if math.Abs(p.L-c.l) > 1e-9 || math.Abs(ch-c.c) > 0.5 || (!math.IsNaN(c.h) && math.Abs(h-c.h) > 1) {
			t.Errorf("%s at t = %g: L* %.2f C* %.2f h %.1f°, want %g %g %g°", c.name, c.t, p.L, ch, h, c.l, c.c, c.h)
		}
	}
	// Fathom's hue turns at a rate inversely proportional to its chroma,
	// so the hue difference ΔH* = 2√(C₁C₂) sin(Δh/2) (CIE 15:2004 eq. 8.9)
	// of every small step is the same.
	const n = 600
	var lo, hi float64 = math.Inf(1), 0
	for i := 0; i < n; i++ {
		a, b := fathom(float64(i)/n), fathom(float64(i+1)/n)
		ca, cb := math.Hypot(a.A, a.B), math.Hypot(b.A, b.B)
		dh := math.Atan2(b.B, b.A) - math.Atan2(a.B, a.A)
		dh = math.Remainder(dh, 2*math.Pi)
		dH := 2 * math.Sqrt(ca*cb) * math.Abs(math.Sin(dh/2))
		lo, hi = math.Min(lo, dH), math.Max(hi, dH)
	}
	if hi/lo > 1.01 {
		t.Errorf("fathom: ΔH* per step ranges %.5f…%.5f; the hue should turn inversely to chroma", lo, hi)
	}
}
