package stats

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat"
)

// TestMomentsAgainstGonum compares with gonum/stat's two-pass weighted
// mean and variance on an explicit array (an independent implementation).
func TestMomentsAgainstGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	x := make([]float64, 1000)
	w := make([]float64, 1000)
	for i := range x {
		x[i] = 1e4 + rng.NormFloat64()*3 // a large offset stresses cancellation
		w[i] = 0.1 + rng.Float64()
	}
	var m Moments
	for i := range x {
		m.Add(x[i], w[i])
	}
	mean, variance := stat.MeanVariance(x, w) // gonum: unbiased with frequency weights, Σw(x−m)²/(Σw−1)
	if math.Abs(m.Mean-mean) > 1e-9 {
		t.Errorf("mean %v, gonum %v", m.Mean, mean)
	}
	if got := m.SampleVar(); math.Abs(got-variance) > 1e-9*variance {
		t.Errorf("variance %v, gonum %v", got, variance)
	}
	// split in three and merge, in any order
	var a, b, c Moments
	for i := range x {
		switch {
		case i < 100:
			a.Add(x[i], w[i])
		case i < 700:
			b.Add(x[i], w[i])
		default:
			c.Add(x[i], w[i])
		}
	}
	c.Merge(a)
	c.Merge(b)
	if math.Abs(c.Mean-m.Mean) > 1e-10 || math.Abs(c.M2-m.M2) > 1e-8*m.M2 || c.N != m.N || math.Abs(c.W-m.W) > 1e-9 {
		t.Errorf("merged %+v, single pass %+v", c, m)
	}
}

func TestMomentsEdgeCases(t *testing.T) {
	var m Moments
	if !math.IsNaN(m.MeanOrNaN()) || !math.IsNaN(m.Var()) {
		t.Error("empty sample must give NaN")
	}
	m.Add(math.NaN(), 1)
	m.Add(5, 0)
	m.Add(5, -1)
	if m.N != 0 {
		t.Error("NaN or non-positive weights were counted")
	}
	m.Add(2, 1)
	m.Add(4, 1)
	if m.Mean != 3 || m.Var() != 1 || m.SampleVar() != 2 {
		t.Errorf("{2,4}: %+v", m)
	}
	var e Moments
	e.Merge(m)
	m.Merge(Moments{})
	if e != m {
		t.Error("merge with empty changed the sample")
	}
}
