package ramp

import (
	"bytes"
	"encoding/json"
	"lidscope/internal/testutil"
	"math"
	"os/exec"
	"path/filepath"
	"testing"
)

// Worked values of the CIELAB and sRGB definitions.
func TestConversionWorkedValues(t *testing.T) {
	cases := []struct {
		name    string
		r, g, b float64
		want    Lab
		tol     float64
		source  string
	}{
		// sRGB white maps onto the white point: L* = 100, a* = b* = 0
		// (CIE 15:2004 eq. 8.4 with X/Xn = Y/Yn = Z/Zn = 1).
		{"white", 1, 1, 1, Lab{100, 0, 0}, 1e-9, "CIE 15:2004 eq. 8.4"},
		{"black", 0, 0, 0, Lab{0, 0, 0}, 1e-9, "CIE 15:2004 eq. 8.4"},
		// Mid grey 0.5: linear value ((0.5+0.055)/1.055)^2.4 = 0.214041
		// (IEC 61966-2-1 eq. 5), L* = 116·0.214041^(1/3) − 16 = 53.3889
		// (hand-worked).
		{"grey 0.5", 0.5, 0.5, 0.5, Lab{53.3889, 0, 0}, 1e-3, "hand-worked from IEC 61966-2-1 eq. 5, CIE 15:2004 eq. 8.4"},
		// sRGB primaries in CIELAB D65: red (53.24, 80.09, 67.20), green
		// (87.73, −86.18, 83.18), blue (32.30, 79.19, −107.86) (from
		// memory; small differences come from the white point's digits).
		{"red", 1, 0, 0, Lab{53.24, 80.09, 67.20}, 0.1, "from memory"},
		{"green", 0, 1, 0, Lab{87.73, -86.18, 83.18}, 0.1, "from memory"},
		{"blue", 0, 0, 1, Lab{32.30, 79.19, -107.86}, 0.15, "from memory"},
	}
	for _, c := range cases {
		got := FromSRGB(c.r, c.g, c.b)
		if math.Abs(got.L-c.want.L) > c.tol || math.Abs(got.A-c.want.A) > c.tol || math.Abs(got.B-c.want.B) > c.tol {
			t.Errorf("%s: FromSRGB = %+v, want %+v ± %g (%s)", c.name, got, c.want, c.tol, c.source)
		}
		r, g, b, ok := c.want.SRGB()
		if c.tol < 1e-3 && (!ok || math.Abs(r-c.r) > 1e-6 || math.Abs(g-c.g) > 1e-6 || math.Abs(b-c.b) > 1e-6) {
			t.Errorf("%s: SRGB(%+v) = %g %g %g (in gamut %v), want %g %g %g", c.name, c.want, r, g, b, ok, c.r, c.g, c.b)
		}
	}
}

func TestRoundTrip(t *testing.T) {
	for r := 0.0; r <= 1; r += 0.125 {
		for g := 0.0; g <= 1; g += 0.125 {
			for b := 0.0; b <= 1; b += 0.125 {
				l := FromSRGB(r, g, b)
				r2, g2, b2, ok := l.SRGB()
				if !ok || math.Abs(r2-r) > 1e-9 || math.Abs(g2-g) > 1e-9 || math.Abs(b2-b) > 1e-9 {
					t.Fatalf("round trip of %g %g %g via %+v gave %g %g %g (in gamut %v)", r, g, b, l, r2, g2, b2, ok)
				}
			}
		}
	}
	if _, _, _, ok := LCh(50, 150, 0).SRGB(); ok {
		t.Error("L*C*h (50, 150, 0°) reported inside the sRGB gamut; its chroma is beyond any sRGB colour")
	}
}

// Every map lies inside the gamut (no clipping, so the design's lightness
// ramp is what is shown) and its 8-bit colours keep the lightness ramp.
func TestMapsDesign(t *testing.T) {
	cases := []struct {
		name           string
		kind           Kind
		l0, lMid, l1   float64
		neutralCentre  bool
		monotoneDarkUp bool
	}{
		{"fathom", Sequential, 18, 56, 94, false, true},
		{"pumice", Sequential, 25, 58.5, 92, true, true},
		{"fulcrum", Diverging, 33, 96, 33, true, false},
	}
	for _, c := range cases {
		m, err := ByName(c.name)
		if err != nil {
			t.Fatal(err)
		}
		if m.Kind != c.kind {
			t.Errorf("%s: kind %v, want %v", c.name, m.Kind, c.kind)
		}
		const n = 1025
		for i := 0; i < n; i++ {
			tt := float64(i) / (n - 1)
			if _, _, _, ok := m.At(tt).SRGB(); !ok {
				t.Fatalf("%s: t = %g (%+v) is outside the sRGB gamut", c.name, tt, m.At(tt))
			}
		}
		for _, p := range []struct{ t, l float64 }{{0, c.l0}, {0.5, c.lMid}, {1, c.l1}} {
			rgb := m.At(p.t).RGBA()
			got := FromSRGB(float64(rgb.R)/255, float64(rgb.G)/255, float64(rgb.B)/255).L
			if math.Abs(got-p.l) > 0.5 { // 8-bit rounding moves L* by < 0.4
				t.Errorf("%s: L* at t = %g is %.2f after 8-bit rounding, want %g", c.name, p.t, got, p.l)
			}
		}
		if c.neutralCentre {
			mid := m.At(0.5)
			if math.Hypot(mid.A, mid.B) > 1e-9 {
				t.Errorf("%s: centre %+v is not neutral", c.name, mid)
			}
		}
		if c.kind == Diverging {
			for _, tt := range []float64{0, 0.1, 0.25, 0.4} {
				if a, b := m.At(tt).L, m.At(1-tt).L; math.Abs(a-b) > 1e-9 {
					t.Errorf("%s: L* at %g (%g) differs from L* at %g (%g); a diverging map must be symmetric in lightness", c.name, tt, a, 1-tt, b)
				}
			}
		}
	}
	if _, err := ByName("rainbow"); err == nil {
		t.Error("ByName accepted an unknown map")
	}
	r, err := ByName("fathom" + ReversedSuffix)
	if err != nil || r.At(0) != fathom(1) {
		t.Errorf("reversed fathom: %v, %+v", err, r.At(0))
	}
}

// The maps checked with an independent implementation: colorspacious
// (Smith 2015) converts our CIELAB paths to sRGB, measures steps in
// CAM02-UCS (Luo, Cui & Li 2006) and simulates colour-vision deficiency
// (Machado, Oliveira & Fernandes 2009).
func TestMapsAgainstColorspacious(t *testing.T) {
	py := testutil.Python(t, "numpy", "colorspacious")
	const n = 129
	type entry struct {
		Lab [][3]float64 `json:"lab"`
	}
	req := struct {
		White [3]float64       `json:"white"`
		Maps  map[string]entry `json:"maps"`
	}{White: [3]float64{100 * whiteX, 100 * whiteY, 100 * whiteZ}, Maps: map[string]entry{}}
	for _, name := range Names() {
		m, _ := ByName(name)
		var e entry
		for i := 0; i < n; i++ {
			c := m.At(float64(i) / (n - 1))
			e.Lab = append(e.Lab, [3]float64{c.L, c.A, c.B})
		}
		req.Maps[name] = e
	}
	in, _ := json.Marshal(req)
	cmd := exec.Command(py, filepath.Join("testdata", "check_maps.py"))
	cmd.Stdin = bytes.NewReader(in)
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("check_maps.py: %v\n%s", err, stderr.String())
	}
	var res map[string]struct {
		SRGB  [][3]float64 `json:"srgb"`
		Steps []float64    `json:"steps"`
		J     []float64    `json:"J"`
		CVD   map[string]struct {
			J   []float64    `json:"J"`
			UCS [][3]float64 `json:"ucs"`
		} `json:"cvd"`
	}
	if err := json.Unmarshal(out, &res); err != nil {
		t.Fatal(err)
	}
	for _, name := range Names() {
		m, _ := ByName(name)
		r := res[name]
		for i, want := range r.SRGB {
			c := m.At(float64(i) / (n - 1))
			rr, gg, bb, _ := c.SRGB()
			// colorspacious uses the standard's four-digit XYZ→RGB matrix
			// rather than the exact inverse of the RGB→XYZ one: differences
			// of a few 1e-6, far below one 8-bit level (1/255).
			if math.Abs(rr-want[0]) > 1e-4 || math.Abs(gg-want[1]) > 1e-4 || math.Abs(bb-want[2]) > 1e-4 {
				t.Fatalf("%s[%d]: sRGB %g %g %g, colorspacious %v", name, i, rr, gg, bb, want)
			}
		}
		// Perceptual uniformity: consecutive CAM02-UCS steps within a factor
		// 1.7 of each other (each half separately for a diverging map).
		halves := [][2]int{{0, n - 1}}
		if m.Kind == Diverging {
			halves = [][2]int{{0, n / 2}, {n / 2, n - 1}}
		}
		for _, h := range halves {
			lo, hi := math.Inf(1), 0.0
			for _, s := range r.Steps[h[0]:h[1]] {
				lo, hi = math.Min(lo, s), math.Max(hi, s)
			}
			if hi/lo > 1.7 {
				t.Errorf("%s entries %d…%d: CAM02-UCS steps range %.3f…%.3f (ratio %.2f > 1.7): not perceptually uniform", name, h[0], h[1], lo, hi, hi/lo)
			}
		}
		// Order survives colour-vision deficiency: J' strictly monotone
		// (rising on sequential maps, rising then falling on diverging).
		for kind, sim := range r.CVD {
			for i := 1; i < n; i++ {
				up := sim.J[i] > sim.J[i-1]
				wantUp := m.Kind == Sequential || i <= n/2
				if up != wantUp {
					t.Errorf("%s under %s: J' not monotone at entry %d (%.3f → %.3f)", name, kind, i, sim.J[i-1], sim.J[i])
					break
				}
			}
			if m.Kind == Diverging {
				a, b := sim.UCS[n/8], sim.UCS[n-1-n/8]
				if d := math.Sqrt((a[0]-b[0])*(a[0]-b[0]) + (a[1]-b[1])*(a[1]-b[1]) + (a[2]-b[2])*(a[2]-b[2])); d < 25 {
					t.Errorf("%s under %s: the two sides are %.1f apart in CAM02-UCS (< 25): negative and positive values would be confused", name, kind, d)
				}
			}
		}
	}
}

func BenchmarkTable(b *testing.B) {
	m, _ := ByName("fathom")
	for b.Loop() {
		m.Table(256)
	}
}
