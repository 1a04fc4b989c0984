// Package stats holds mergeable summary statistics: accumulators that can
// be filled in separate pieces (time ranges, file sets, worker goroutines)
// and merged afterwards to exactly the result of one pass, up to floating-
// point rounding.
package stats

import "math"

// Moments accumulates the weighted count, mean and sum of squared
// deviations of a sample, updated one value at a time with West's (1979)
// weighted form of Welford's algorithm (West 1979, Commun. ACM 22(9),
// 532–535) and merged with the pairwise formula of Chan, Golub & LeVeque
// (1979, "Updating formulae and a pairwise algorithm for computing sample
// variances"), which avoids the cancellation of the Σx² − (Σx)²/n form.
//
// With unit weights, W is the count. The zero value is an empty sample.
type Moments struct {
	N    int64   // number of values added
	W    float64 // sum of weights
	Mean float64 // weighted mean
	M2   float64 // Σ w (x − mean)²
}

// Add adds x with weight w (> 0); NaN values and non-positive weights are ignored.
func (m *Moments) Add(x, w float64) {
	if x != x || !(w > 0) {
		return
	}
	m.N++
	w0 := m.W
	m.W += w
	d := x - m.Mean
	r := d * w / m.W
	m.Mean += r
	m.M2 += w0 * d * r
}

// Merge adds the sample b to m (Chan, Golub & LeVeque 1979, through
// ChanMerge, the one copy of the pairwise update).
func (m *Moments) Merge(b Moments) {
	if b.W == 0 {
		return
	}
	if m.W == 0 {
		*m = b
		return
	}
	p := NewChanMerge(m.W, b.W)
	d := b.Mean - m.Mean
	m.Mean = p.Mean(m.Mean, b.Mean)
	m.M2 = p.CoMoment(m.M2, b.M2, d, d)
	m.W = p.W
	m.N += b.N
}

// MeanOrNaN returns the mean, NaN for an empty sample.
func (m Moments) MeanOrNaN() float64 {
	if m.W == 0 {
		return math.NaN()
	}
	return m.Mean
}

// Var returns the weighted population variance Σw(x−mean)²/Σw (NaN if empty).
func (m Moments) Var() float64 {
	if m.W == 0 {
		return math.NaN()
	}
	return math.Max(0, m.M2/m.W)
}

// Std is the square root of Var.
func (m Moments) Std() float64 { return math.Sqrt(m.Var()) }

// SampleVar returns the unbiased variance for unit (frequency) weights,
// M2/(W−1), NaN when W ≤ 1.
func (m Moments) SampleVar() float64 {
	if m.W <= 1 {
		return math.NaN()
	}
	return math.Max(0, m.M2/(m.W-1))
}
