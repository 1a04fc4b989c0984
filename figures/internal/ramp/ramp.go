// Package ramp builds the colour maps of lidscope's figures from straight
// lightness ramps in CIELAB, and converts between CIELAB and sRGB.
//
// Every map is defined by a path in CIE L*C*h (the polar form of CIELAB)
// whose lightness L* changes linearly along the map, so equal steps of the
// data give equal steps of lightness, the cue that survives every form of
// colour-vision deficiency and greyscale printing. Hue and chroma are chosen
// so that the whole path lies inside the sRGB gamut (checked by the tests,
// so no colour is clipped):
//
//   - Fathom (sequential, for fractions, frequencies and other one-signed
//     quantities): L* 18 → 94; hue turns from 200° (deep blue-green)
//     through 274° (slate blue), 314° (violet) and 348° (rose) to 60°
//     (pale peach); chroma rises from 12 to 42 at the middle and falls to 8
//     at the light end, the largest the sRGB gamut allows near the dark and
//     light ends. The hue turns at a rate inversely proportional to the
//     chroma, so that every step of the map moves the colour by the same
//     hue difference ΔH* (CIE 15:2004 eq. 8.9) as well as the same ΔL*.
//   - Fulcrum (diverging, for anomalies and quantities centred on zero):
//     L* 96 at the centre falling linearly to 33 at both ends; negative
//     values turn from 195° (pale aqua) to 240° (deep blue-green),
//     positive ones from 80° (pale sand) to 40° (rust); chroma 0 at the
//     centre rising linearly to a peak at 60 % of each half and then easing
//     towards the end (negative: peak 30, end 22; positive: peak 42, end 45).
//   - Pumice (sequential, neutral): L* 25 → 92 with zero chroma, for counts
//     drawn behind coloured data.
//
// The maps are lidscope's own: a test compares their sampled lightness and
// hue tracks with every colour map of a widely used plotting library and
// refuses any that follows one.
//
// Conversions follow CIE 15:2004 (CIELAB, D65 white point of the sRGB
// standard) and IEC 61966-2-1:1999 (the sRGB transfer function and
// primaries). The tests check them against the CIELAB definition's worked
// values and against the colorspacious package (Smith, 2015) shipped by
// Debian, and check perceptual uniformity in CAM02-UCS (Luo, Cui & Li 2006,
// Color Res. Appl. 31) and lightness order under simulated colour-vision
// deficiency (Machado, Oliveira & Fernandes 2009, IEEE TVCG 15).
package ramp

import (
	"fmt"
	"image/color"
	"math"
	"sort"
	"strings"
)

// Lab is a CIELAB colour (L* 0…100; a*, b* unbounded) relative to the D65
// white point.
type Lab struct{ L, A, B float64 }

// LCh returns the CIELAB colour with lightness l, chroma c and hue angle h
// in degrees (CIE 15:2004 §8.2.1: a* = C cos h, b* = C sin h).
func LCh(l, c, h float64) Lab {
	s, co := math.Sincos(h * math.Pi / 180)
	return Lab{l, c * co, c * s}
}

// The sRGB primaries' matrix from linear RGB to XYZ (IEC 61966-2-1:1999
// eq. 7, four-digit form) and its inverse.
var (
	rgb2xyz = [3][3]float64{
		{0.4124, 0.3576, 0.1805},
		{0.2126, 0.7152, 0.0722},
		{0.0193, 0.1192, 0.9505},
	}
	xyz2rgb = invert3(rgb2xyz)
	// The white point is the image of sRGB white (1, 1, 1) under that
	// matrix, (0.9505, 1, 1.089): D65 (x = 0.3127, y = 0.3290) to the
	// matrix's four digits, so that sRGB white has a* = b* = 0 exactly.
	whiteX = rgb2xyz[0][0] + rgb2xyz[0][1] + rgb2xyz[0][2]
	whiteY = rgb2xyz[1][0] + rgb2xyz[1][1] + rgb2xyz[1][2]
	whiteZ = rgb2xyz[2][0] + rgb2xyz[2][1] + rgb2xyz[2][2]
)

// labF is the CIELAB compression f(t) of CIE 15:2004 eq. 8.6 with the
// exact constants (6/29)³ and 1/3·(29/6)².
func labF(t float64) float64 {
	const d = 6.0 / 29
	if t > d*d*d {
		return math.Cbrt(t)
	}
	return t/(3*d*d) + 4.0/29
}

func labFInv(f float64) float64 {
	const d = 6.0 / 29
	if f > d {
		return f * f * f
	}
	return 3 * d * d * (f - 4.0/29)
}

// XYZ returns the CIE XYZ tristimulus values (Y = 1 for the white point)
// of c (CIE 15:2004 eq. 8.4–8.6 inverted).
func (c Lab) XYZ() (x, y, z float64) {
	fy := (c.L + 16) / 116
	fx := fy + c.A/500
	fz := fy - c.B/200
	return whiteX * labFInv(fx), whiteY * labFInv(fy), whiteZ * labFInv(fz)
}

// FromXYZ returns the CIELAB colour of tristimulus values relative to the
// D65 white with Y = 1 (CIE 15:2004 eq. 8.4–8.6).
func FromXYZ(x, y, z float64) Lab {
	fx, fy, fz := labF(x/whiteX), labF(y/whiteY), labF(z/whiteZ)
	return Lab{116*fy - 16, 500 * (fx - fy), 200 * (fy - fz)}
}

// LinearRGB returns c in linear-light sRGB components (0…1 inside the
// gamut; outside it some component is below 0 or above 1).
func (c Lab) LinearRGB() (r, g, b float64) {
	x, y, z := c.XYZ()
	m := xyz2rgb
	return m[0][0]*x + m[0][1]*y + m[0][2]*z,
		m[1][0]*x + m[1][1]*y + m[1][2]*z,
		m[2][0]*x + m[2][1]*y + m[2][2]*z
}

// SRGB returns c as gamma-encoded sRGB components in 0…1 (IEC
// 61966-2-1:1999 eq. 9) and whether c lies inside the gamut (to 1e-9);
// outside it the components are clamped.
func (c Lab) SRGB() (r, g, b float64, inGamut bool) {
	lr, lg, lb := c.LinearRGB()
	inGamut = true
	enc := func(v float64) float64 {
		if v < -1e-9 || v > 1+1e-9 {
			inGamut = false
		}
		v = math.Min(1, math.Max(0, v))
		if v <= 0.0031308 {
			return 12.92 * v
		}
		return 1.055*math.Pow(v, 1/2.4) - 0.055
	}
	return enc(lr), enc(lg), enc(lb), inGamut
}

// Decode returns the linear-light value of a gamma-encoded sRGB component
// (IEC 61966-2-1:1999 eq. 5).
func Decode(v float64) float64 {
	if v <= 0.04045 {
		return v / 12.92
	}
	return math.Pow((v+0.055)/1.055, 2.4)
}

// FromSRGB returns the CIELAB colour of gamma-encoded sRGB components in
// 0…1.
func FromSRGB(r, g, b float64) Lab {
	lr, lg, lb := Decode(r), Decode(g), Decode(b)
	m := rgb2xyz
	return FromXYZ(m[0][0]*lr+m[0][1]*lg+m[0][2]*lb,
		m[1][0]*lr+m[1][1]*lg+m[1][2]*lb,
		m[2][0]*lr+m[2][1]*lg+m[2][2]*lb)
}

// RGBA returns c as an opaque 8-bit sRGB colour (rounded).
func (c Lab) RGBA() color.RGBA {
	r, g, b, _ := c.SRGB()
	q := func(v float64) uint8 { return uint8(math.Round(v * 255)) }
	return color.RGBA{q(r), q(g), q(b), 255}
}

func invert3(m [3][3]float64) [3][3]float64 {
	a, b, c := m[0][0], m[0][1], m[0][2]
	d, e, f := m[1][0], m[1][1], m[1][2]
	g, h, i := m[2][0], m[2][1], m[2][2]
	det := a*(e*i-f*h) - b*(d*i-f*g) + c*(d*h-e*g)
	return [3][3]float64{
		{(e*i - f*h) / det, (c*h - b*i) / det, (b*f - c*e) / det},
		{(f*g - d*i) / det, (a*i - c*g) / det, (c*d - a*f) / det},
		{(d*h - e*g) / det, (b*g - a*h) / det, (a*e - b*d) / det},
	}
}

// Kind says how a map relates to the data.
type Kind int

const (
	// Sequential maps run from low (dark) to high (light) values.
	Sequential Kind = iota
	// Diverging maps are lightest at the centre, which is placed at zero.
	Diverging
)

func (k Kind) String() string {
	if k == Diverging {
		return "diverging"
	}
	return "sequential"
}

// Map is a colour map: a path in CIELAB over t in [0, 1].
type Map struct {
	Name string
	Kind Kind
	// Path returns the colour at t in [0, 1].
	Path func(t float64) Lab
	// Reversed maps run the path from 1 to 0.
	Reversed bool
}

// At returns the colour at t in [0, 1] (clamped).
func (m Map) At(t float64) Lab {
	t = math.Min(1, math.Max(0, t))
	if m.Reversed {
		t = 1 - t
	}
	return m.Path(t)
}

// Table returns n colours sampled evenly from t = 0 to t = 1 (n ≥ 2).
func (m Map) Table(n int) []color.RGBA {
	out := make([]color.RGBA, n)
	for i := range out {
		out[i] = m.At(float64(i) / float64(n-1)).RGBA()
	}
	return out
}

// lerp is linear interpolation.
func lerp(a, b, t float64) float64 { return a + (b-a)*t }

// fathomChroma holds the chroma of fathom at t = 0, 1/6, …, 1 (linear in
// between).
var fathomChroma = [...]float64{12, 20, 30, 42, 38, 26, 8}

// fathomHue0 and fathomHue1 are fathom's hue angles at t = 0 and t = 1
// (degrees; 420° is 60°).
const fathomHue0, fathomHue1 = 200.0, 420.0

// fathomTurn returns G(t) = ∫₀ᵗ ds / C(s) for fathom's piecewise-linear
// chroma C (exact on each piece: ∫ dt/(c + kt) = ln((c + kt)/c)/k).
func fathomTurn(t float64) float64 {
	n := len(fathomChroma) - 1
	w := 1 / float64(n)
	g := 0.0
	for i := 0; i < n; i++ {
		a, b := fathomChroma[i], fathomChroma[i+1]
		u := math.Min(w, t-float64(i)*w)
		if u <= 0 {
			break
		}
		if k := (b - a) / w; k == 0 {
			g += u / a
		} else {
			g += math.Log((a+k*u)/a) / k
		}
	}
	return g
}

var fathomTurnTotal = fathomTurn(1)

func fathom(t float64) Lab {
	n := float64(len(fathomChroma) - 1)
	i := math.Min(math.Floor(t*n), n-1)
	c := lerp(fathomChroma[int(i)], fathomChroma[int(i)+1], t*n-i)
	h := lerp(fathomHue0, fathomHue1, fathomTurn(t)/fathomTurnTotal)
	return LCh(lerp(18, 94, t), c, h)
}

// rise is the chroma of a diverging half at distance s in [0, 1] from the
// centre: linear up to peak at s = 0.6, then linear to end at s = 1.
func rise(s, peak, end float64) float64 {
	if s < 0.6 {
		return peak * s / 0.6
	}
	return lerp(peak, end, (s-0.6)/0.4)
}

func fulcrum(t float64) Lab {
	s := 2*t - 1
	a := math.Abs(s)
	l := lerp(96, 33, a)
	if s < 0 {
		return LCh(l, rise(a, 30, 22), lerp(195, 240, a))
	}
	return LCh(l, rise(a, 42, 45), lerp(80, 40, a))
}

func pumice(t float64) Lab { return Lab{lerp(25, 92, t), 0, 0} }

var maps = map[string]Map{
	"fathom":  {Name: "fathom", Kind: Sequential, Path: fathom},
	"fulcrum": {Name: "fulcrum", Kind: Diverging, Path: fulcrum},
	"pumice":  {Name: "pumice", Kind: Sequential, Path: pumice},
}

// ReversedSuffix, appended to a map's name, names the map run backwards.
const ReversedSuffix = "-reversed"

// Names lists the maps' names, sorted, without the reversed variants.
func Names() []string {
	var out []string
	for n := range maps {
		out = append(out, n)
	}
	sort.Strings(out)
	return out
}

// ByName returns a map by name; a name ending in ReversedSuffix gives the
// map run backwards.
func ByName(name string) (Map, error) {
	base, rev := strings.CutSuffix(name, ReversedSuffix)
	m, ok := maps[base]
	if !ok {
		return Map{}, fmt.Errorf("unknown colour map %q: choose one of %s (add %q to run one backwards)",
			name, strings.Join(Names(), ", "), ReversedSuffix)
	}
	m.Reversed = rev
	m.Name = name
	return m, nil
}

// Missing is the neutral grey (L* 66, zero chroma) of cells without data.
var Missing = Lab{66, 0, 0}
