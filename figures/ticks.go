package figures

import (
	"math"
	"strconv"

	"gonum.org/v1/plot"
)

// roundTicks is gonum's default ticker, except where that falls back to
// labels spread evenly between the ends of a narrow range (298.07, 298.18,
// 298.27 on a range of a few tenths of a kelvin at 298 K): then the labels
// are put at multiples of a round step (1, 2, 2.5 or 5 times a power of
// ten) instead, as a reader expects.
type roundTicks struct{}

func (roundTicks) Ticks(lo, hi float64) []plot.Tick {
	ts := plot.DefaultTicks{}.Ticks(lo, hi)
	if labelsRound(ts) {
		return ts
	}
	return niceTicks(lo, hi, 3)
}

// labelsRound reports whether the labelled ticks sit at multiples of
// their spacing.
func labelsRound(ts []plot.Tick) bool {
	var v []float64
	for _, t := range ts {
		if t.Label != "" {
			v = append(v, t.Value)
		}
	}
	if len(v) < 2 {
		return true
	}
	d := v[1] - v[0]
	for _, x := range v {
		if q := x / d; math.Abs(q-math.Round(q)) > 1e-6 {
			return false
		}
	}
	return true
}

// niceStep returns the smallest of 1, 2, 2.5 and 5 times a power of ten
// that is at least x (x > 0), and its mantissa.
func niceStep(x float64) (step, mantissa float64) {
	e := math.Pow(10, math.Floor(math.Log10(x)))
	for _, m := range []float64{1, 2, 2.5, 5} {
		if m*e >= x*(1-1e-12) {
			return m * e, m
		}
	}
	return 10 * e, 1
}

// niceTicks labels multiples of a round step inside [lo, hi], at least
// want of them where the step allows, with unlabelled minor ticks between.
func niceTicks(lo, hi float64, want int) []plot.Tick {
	if !(hi > lo) {
		return nil
	}
	step, m := niceStep((hi - lo) / float64(want))
	for step > 0 && math.Floor(hi/step)-math.Ceil(lo/step)+1 < float64(want) {
		smaller, sm := niceStep(step * (1 - 1e-9) / 2)
		if smaller >= step {
			break
		}
		step, m = smaller, sm
	}
	dec := int(math.Max(0, -math.Floor(math.Log10(step)+1e-9)))
	if m == 2.5 {
		dec++
	}
	minor := step / 5
	if m == 2 {
		minor = step / 4
	}
	var ts []plot.Tick
	for k := math.Ceil(lo / minor); k*minor <= hi*(1+1e-12)+1e-300; k++ {
		v := k * minor
		t := plot.Tick{Value: v}
		if q := v / step; math.Abs(q-math.Round(q)) < 1e-6 {
			t.Label = strconv.FormatFloat(math.Round(q)*step+0, 'f', dec, 64) // +0: no "-0"
		}
		ts = append(ts, t)
	}
	return ts
}
