package figures

import (
	"image/color"
	"math"
	"sort"

	"lidscope/figures/internal/ramp"
)

// paletteDefaults chooses a colour map per kind of quantity: sequential
// maps for fractions, frequencies and other one-signed quantities,
// diverging maps centred on zero for quantities of either sign.
var paletteDefaults = map[string]string{
	"fraction":     "fathom",  // time and area fractions of a regime
	"frequency":    "fathom",  // regime crossings per year, joint-composite frequency
	"cloud":        "fathom",  // cloud fractions
	"lts":          "fathom",  // lower-tropospheric stability
	"eis":          "fulcrum", // estimated inversion strength (either sign)
	"relative_sst": "fulcrum", // SST minus tropical-mean SST (an anomaly)
	"count":        "pumice",  // sample counts drawn behind data
}

// PaletteKeys lists the kinds of quantity whose colour map Options.Palettes
// may override.
func PaletteKeys() []string {
	var out []string
	for k := range paletteDefaults {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// colourScale maps data values onto a colour map between Lo and Hi.
type colourScale struct {
	m      ramp.Map
	lo, hi float64
	table  []color.RGBA
}

var missingColour = ramp.Missing.RGBA()

func (f *fig) scale(key string, lo, hi float64) colourScale {
	name := paletteDefaults[key]
	if o, ok := f.opt.Palettes[key]; ok {
		name = o
	}
	m, err := ramp.ByName(name)
	if err != nil { // validated in Options.normalise
		m, _ = ramp.ByName("fathom")
	}
	return colourScale{m: m, lo: lo, hi: hi, table: m.Table(256)}
}

// colour returns the colour of v; NaN is the missing colour.
func (s colourScale) colour(v float64) color.RGBA {
	if math.IsNaN(v) {
		return missingColour
	}
	t := (v - s.lo) / (s.hi - s.lo)
	if !(s.hi > s.lo) {
		t = 0.5
	}
	i := int(math.Round(math.Min(1, math.Max(0, t)) * float64(len(s.table)-1)))
	return s.table[i]
}

// percentile returns the p-th percentile (0…100) of the finite values, by
// linear interpolation between order statistics (the usual "type 7"
// definition, common practice); NaN when there are none.
func percentile(vals []float64, p float64) float64 {
	var v []float64
	for _, x := range vals {
		if !math.IsNaN(x) && !math.IsInf(x, 0) {
			v = append(v, x)
		}
	}
	if len(v) == 0 {
		return math.NaN()
	}
	sort.Float64s(v)
	h := p / 100 * float64(len(v)-1)
	i := int(math.Floor(h))
	if i >= len(v)-1 {
		return v[len(v)-1]
	}
	return v[i] + (h-float64(i))*(v[i+1]-v[i])
}

// sequentialLimits returns limits for a one-signed quantity: the 2nd and
// 98th percentiles rounded outwards to a nice step.
func sequentialLimits(vals []float64) (lo, hi float64) {
	lo, hi = percentile(vals, 2), percentile(vals, 98)
	if math.IsNaN(lo) {
		return 0, 1
	}
	if hi <= lo {
		hi = lo + math.Max(1e-9, math.Abs(lo)*0.1)
	}
	step := niceCeil((hi - lo) / 5)
	return math.Floor(lo/step) * step, math.Ceil(hi/step) * step
}

// divergingLimits returns ±L, L the larger magnitude of the 2nd and 98th
// percentiles rounded up to a nice number, so that zero is at the centre.
func divergingLimits(vals []float64) (lo, hi float64) {
	a, b := percentile(vals, 2), percentile(vals, 98)
	if math.IsNaN(a) {
		return -1, 1
	}
	l := niceCeil(math.Max(math.Abs(a), math.Abs(b)))
	return -l, l
}
