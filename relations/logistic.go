package relations

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// Logistic is a fitted logistic regression p(x) = 1/(1 + exp(−(B0 + B1 x))).
type Logistic struct {
	B0, B1     float64
	Iterations int
	// X50 = −B0/B1 is where p = 0.5.
	X50 float64
}

// ErrSeparation is wrapped when the indicator is (almost) a step function
// of the predictor, so that the likelihood has no finite maximum.
var ErrSeparation = errors.New("relations: the indicator is separated by the predictor (no finite maximum-likelihood fit)")

// FitLogistic fits a logistic regression to binned data by iteratively
// reweighted least squares (Newton–Raphson on the binomial log-likelihood;
// McCullagh & Nelder 1989, Generalized Linear Models, 2nd ed., §2.5): bin
// k has predictor value x[k], total weight n[k] ≥ 0 and weight y[k] ≤ n[k]
// of positive outcomes (weights may be areas or counts; the estimate does
// not depend on their scale). For data binned finely in x this is the
// maximum-likelihood fit of the unbinned data up to the within-bin spread
// of x. Steps are halved whenever the log-likelihood would decrease.
func FitLogistic(x, y, n []float64) (Logistic, error) {
	var sn, sy, sx float64
	for k := range x {
		if n[k] > 0 {
			sn += n[k]
			sy += y[k]
			sx += n[k] * x[k]
		}
	}
	if !(sn > 0) {
		return Logistic{}, errors.New("relations: no samples for the logistic fit")
	}
	if sy <= 0 || sy >= sn {
		return Logistic{}, fmt.Errorf("%w: the indicator is %s everywhere", ErrSeparation, map[bool]string{true: "false", false: "true"}[sy <= 0])
	}
	if err := separated(x, y, n); err != nil {
		return Logistic{}, err
	}
	// Work with weights scaled to sum to 1 and x centred, for conditioning.
	xm := sx / sn
	p0 := sy / sn
	b0, b1 := math.Log(p0/(1-p0)), 0.0
	ll := func(b0, b1 float64) float64 {
		s := 0.0
		for k := range x {
			if !(n[k] > 0) {
				continue
			}
			eta := b0 + b1*(x[k]-xm)
			// log p = −log(1+e^−η), log(1−p) = −log(1+e^η)
			s += (y[k]*-softplus(-eta) + (n[k]-y[k])*-softplus(eta)) / sn
		}
		return s
	}
	cur := ll(b0, b1)
	it := 0
	for ; it < 200; it++ {
		var g0, g1, h00, h01, h11 float64
		for k := range x {
			if !(n[k] > 0) {
				continue
			}
			xc := x[k] - xm
			p := 1 / (1 + math.Exp(-(b0 + b1*xc)))
			r := (y[k] - n[k]*p) / sn
			v := n[k] * p * (1 - p) / sn
			g0 += r
			g1 += r * xc
			h00 += v
			h01 += v * xc
			h11 += v * xc * xc
		}
		det := h00*h11 - h01*h01
		if !(det > 0) {
			return Logistic{}, fmt.Errorf("%w (singular information matrix after %d iterations)", ErrSeparation, it)
		}
		d0 := (h11*g0 - h01*g1) / det
		d1 := (h00*g1 - h01*g0) / det
		step := 1.0
		var next float64
		for h := 0; h < 60; h++ {
			next = ll(b0+step*d0, b1+step*d1)
			if next >= cur-1e-15 {
				break
			}
			step /= 2
		}
		b0 += step * d0
		b1 += step * d1
		gain := next - cur
		cur = next
		if math.Abs(step*d0) < 1e-12*(1+math.Abs(b0)) && math.Abs(step*d1) < 1e-12*(1+math.Abs(b1)) || (gain >= 0 && gain < 1e-17 && it > 3) {
			it++
			break
		}
		if math.Abs(b1) > 1e6 {
			return Logistic{}, fmt.Errorf("%w (slope diverging: %g per unit of x)", ErrSeparation, b1)
		}
	}
	if it >= 200 {
		return Logistic{}, fmt.Errorf("%w (no convergence in 200 iterations)", ErrSeparation)
	}
	l := Logistic{B0: b0 - b1*xm, B1: b1, Iterations: it}
	l.X50 = math.NaN()
	if b1 != 0 {
		l.X50 = xm - b0/b1
	}
	return l, nil
}

// separated reports complete or quasi-complete separation: the outcomes
// are all negative below and all positive above some x (at most one
// mixed value of x between), or the reverse. The likelihood then has no
// finite maximum (Albert & Anderson 1984, Biometrika 71, 1–10).
func separated(x, y, n []float64) error {
	idx := make([]int, 0, len(x))
	for k := range x {
		if n[k] > 0 {
			idx = append(idx, k)
		}
	}
	sort.Slice(idx, func(i, j int) bool { return x[idx[i]] < x[idx[j]] })
	check := func(pos func(k int) bool, neg func(k int) bool) (lo, hi float64, sep bool) {
		first, last := -1, -1 // first index with a positive, last with a negative
		for i, k := range idx {
			if pos(k) && first < 0 {
				first = i
			}
			if neg(k) {
				last = i
			}
		}
		if first < 0 || last < 0 || first < last {
			return 0, 0, false
		}
		return x[idx[last]], x[idx[first]], true
	}
	pos := func(k int) bool { return y[k] > 0 }
	neg := func(k int) bool { return y[k] < n[k] }
	if lo, hi, ok := check(pos, neg); ok {
		return fmt.Errorf("%w: the indicator switches from false to true between x = %g and %g", ErrSeparation, lo, hi)
	}
	if lo, hi, ok := check(neg, pos); ok {
		return fmt.Errorf("%w: the indicator switches from true to false between x = %g and %g", ErrSeparation, lo, hi)
	}
	return nil
}

// softplus is log(1 + e^x) without overflow.
func softplus(x float64) float64 {
	if x > 30 {
		return x
	}
	if x < -30 {
		return math.Exp(x)
	}
	return math.Log1p(math.Exp(x))
}
