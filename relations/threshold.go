// The logistic threshold of the results: the indicator fitted against
// relative SST, overall and year by year.

package relations

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
)

// thrFit fits the logistic regression to the sum of the given steps'
// binned counts; it returns the fit and the mean tropical-mean SST of the
// steps that had samples.
func (a *Acc) thrFit(idx []int, x, y, n []float64) (Logistic, float64, int64, error) {
	clear(y)
	clear(n)
	var tm float64
	var nt int
	scale := float64(a.thrN) / a.thrW
	for _, t := range idx {
		st := &a.steps[t]
		any := false
		for b := 0; b < a.nthr; b++ {
			if w := st.thr[a.nthr+b]; w > 0 {
				n[b] += w * scale
				y[b] += st.thr[b] * scale
				any = true
			}
		}
		if any {
			tm += st.tropMean
			nt++
		}
	}
	var cnt float64
	for _, v := range n {
		cnt += v
	}
	if nt == 0 {
		return Logistic{}, math.NaN(), 0, errors.New("relations: no samples")
	}
	l, err := FitLogistic(x, y, n)
	return l, tm / float64(nt), int64(math.Round(cnt)), err
}

func (a *Acc) threshold() (*Threshold, error) {
	c := a.cfg
	op := "<"
	if c.Indicator == IndicatorPrecip {
		op = ">"
	}
	t := &Threshold{Indicator: c.Indicator, IndicatorThreshold: a.indThr, IndicatorUnits: indicatorUnits[c.Indicator],
		Condition: fmt.Sprintf("%s %s %g %s", c.Indicator, op, a.indThr, indicatorUnits[c.Indicator]),
		N:         a.thrN, Area: a.thrW, OutOfRange: a.thrOut, Replicates: c.ThresholdReplicates,
		Rel: math.NaN(), Abs: math.NaN(), RelCI: nanInterval(), AbsCI: nanInterval(), B0: math.NaN(), B1: math.NaN(),
		Tracking: math.NaN(), TrackingCI: nanInterval()}
	if a.thrN == 0 {
		t.Note = "no band ocean sample had both a valid indicator and a relative SST inside the fit range"
		return t, nil
	}
	x := make([]float64, a.nthr)
	for b := range x {
		x[b] = c.ThresholdRange[0] + (float64(b)+0.5)*c.ThresholdBinWidth
	}
	y, n := make([]float64, a.nthr), make([]float64, a.nthr)
	all := make([]int, len(a.steps))
	for k := range all {
		all[k] = k
	}
	l, tm, _, err := a.thrFit(all, x, y, n)
	t.TropicalMean = tm
	if err != nil {
		t.Note = err.Error()
		return t, nil
	}
	t.B0, t.B1, t.Rel, t.Abs = l.B0, l.B1, l.X50, l.X50+tm
	if t.B1 <= 0 {
		addNote(&t.Note, "the probability of convection does not rise with relative SST (logistic slope ≤ 0); the threshold is not meaningful")
	}
	if c.ThresholdReplicates > 0 {
		if L, T := c.Bootstrap.BlockLength, len(a.steps); T < 10*L {
			addNote(&t.Note, fmt.Sprintf("the record has %d steps, fewer than 10 bootstrap blocks of %d: the interval may be too narrow by about √(1 − L/T) = %.2f", T, L, math.Sqrt(math.Max(0, 1-float64(L)/float64(T)))))
		}
		rng := rand.New(rand.NewPCG(c.Bootstrap.Seed, streamThreshold))
		rel := make([]float64, c.ThresholdReplicates)
		abs := make([]float64, c.ThresholdReplicates)
		idx := make([]int, 0, len(a.steps))
		for b := range rel {
			idx = blockResample(rng, len(a.steps), c.Bootstrap.BlockLength, idx)
			l, tm, _, err := a.thrFit(idx, x, y, n)
			rel[b], abs[b] = math.NaN(), math.NaN()
			if err == nil && l.B1 > 0 {
				rel[b], abs[b] = l.X50, l.X50+tm
			}
		}
		var f int
		t.RelCI.Lo, t.RelCI.Hi, f = percentiles(rel)
		t.AbsCI.Lo, t.AbsCI.Hi, _ = percentiles(abs)
		t.Failed = f
	}
	// Per year.
	byYear := map[int][]int{}
	var ys []int
	for k, st := range a.steps {
		if _, ok := byYear[st.year]; !ok {
			ys = append(ys, st.year)
		}
		byYear[st.year] = append(byYear[st.year], k)
	}
	sort.Ints(ys)
	if len(ys) >= 5 {
		var tx, ty []float64
		for _, yr := range ys {
			yt := YearThreshold{Year: yr, Steps: len(byYear[yr]), Rel: math.NaN(), Abs: math.NaN(), LogisticSlope: math.NaN()}
			l, tm, cnt, err := a.thrFit(byYear[yr], x, y, n)
			yt.TropicalMean, yt.N = tm, cnt
			if err != nil {
				yt.Note = err.Error()
			} else if l.B1 <= 0 {
				yt.Note = "logistic slope ≤ 0"
			} else {
				yt.Rel, yt.Abs, yt.LogisticSlope = l.X50, l.X50+tm, l.B1
				tx = append(tx, tm)
				ty = append(ty, yt.Abs)
			}
			t.Years = append(t.Years, yt)
		}
		if len(tx) >= 3 {
			cm := NewCoMoments(2)
			for k := range tx {
				cm.Add([]float64{tx[k], ty[k]}, 1)
			}
			ln := cm.Simple(0, 1)
			t.Tracking = ln.Slope
			se := ln.SlopeSE(float64(len(tx)))
			q := tQuantile(0.975, float64(len(tx)-2))
			t.TrackingCI = Interval{ln.Slope - q*se, ln.Slope + q*se}
		}
	}
	return t, nil
}
