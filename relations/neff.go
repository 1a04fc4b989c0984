package relations

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// EffectiveSizeMean is the effective sample size of the mean of n values
// of a series with lag-1 autocorrelation r1 (an AR(1) approximation):
// n(1 − r1)/(1 + r1) (Bretherton, Widmann, Dymnikov, Wallace & Bladé 1999,
// J. Climate 12, 1990–2009, eq. 30), capped at n (a negative r1 would
// give more than n) and at least 1 when n ≥ 1. NaN for a NaN r1.
func EffectiveSizeMean(n, r1 float64) float64 {
	if r1 != r1 || n != n {
		return math.NaN()
	}
	return capSize(n, n*(1-r1)/(1+r1))
}

// EffectiveSizeCorr is the effective sample size for the correlation (or
// regression) of two series with lag-1 autocorrelations r1 and r2:
// n(1 − r1 r2)/(1 + r1 r2) (Bretherton et al. 1999, eq. 31), capped at n
// and at least 1 when n ≥ 1.
func EffectiveSizeCorr(n, r1, r2 float64) float64 {
	if r1 != r1 || r2 != r2 || n != n {
		return math.NaN()
	}
	p := r1 * r2
	return capSize(n, n*(1-p)/(1+p))
}

func capSize(n, e float64) float64 {
	if e > n || math.IsInf(e, 1) || e != e {
		e = n
	}
	if e < 1 && n >= 1 {
		e = 1
	}
	return e
}

// Lag1 returns the lag-1 autocorrelation of a series with gaps:
// Σ (z_t − z̄)(z_{t+1} − z̄) over the pairs of consecutive steps that are
// both present, divided by Σ (z_t − z̄)² over all present steps, z̄ their
// mean (the usual estimator, common practice), times n/n_pairs so that
// gaps (e.g. a season's subset of months) do not bias it towards zero; for
// a series without gaps that factor is n/(n − 1). present[t] false marks a
// gap.
// NaN with fewer than 3 present steps, no pair, or no variance.
func Lag1(z []float64, present []bool) float64 {
	var n int
	var s float64
	for t, v := range z {
		if present[t] {
			n++
			s += v
		}
	}
	if n < 3 {
		return math.NaN()
	}
	m := s / float64(n)
	var den, num float64
	pairs := 0
	for t, v := range z {
		if !present[t] {
			continue
		}
		den += (v - m) * (v - m)
		if t+1 < len(z) && present[t+1] {
			num += (v - m) * (z[t+1] - m)
			pairs++
		}
	}
	if pairs == 0 || !(den > 0) {
		return math.NaN()
	}
	return num / den * float64(n) / float64(pairs)
}

// tQuantile is the p quantile of Student's t with nu degrees of freedom
// (gonum distuv), NaN for nu ≤ 0.
func tQuantile(p, nu float64) float64 {
	if !(nu > 0) {
		return math.NaN()
	}
	return distuv.StudentsT{Mu: 0, Sigma: 1, Nu: nu}.Quantile(p)
}

// CorrCI is the two-sided confidence interval of a correlation r at the
// given level from Fisher's z transform, tanh(atanh r ± z_{(1+level)/2} /
// √(nEff − 3)) (Fisher 1921; common practice). NaN when nEff ≤ 3.
func CorrCI(r, nEff, level float64) (lo, hi float64) {
	if !(nEff > 3) || r != r || math.Abs(r) >= 1 {
		if math.Abs(r) == 1 {
			return r, r
		}
		return math.NaN(), math.NaN()
	}
	z := math.Atanh(r)
	q := distuv.UnitNormal.Quantile(0.5+level/2) / math.Sqrt(nEff-3)
	return math.Tanh(z - q), math.Tanh(z + q)
}

// sizeInputs are what the pooled effective sample size is computed from.
type sizeInputs struct {
	n     float64 // cell-steps pooled
	steps float64 // time steps with at least one sample
	area  float64 // Σ weights over the pooled samples, m² × steps
	l2    float64 // decorrelation length squared, m² (0: every cell independent)
}

// independentAreas is the independent-area count per time step:
// min(mean samples per step, max(1, mean sampled area per step / L²)).
func (s sizeInputs) independentAreas() float64 {
	if !(s.steps > 0) {
		return math.NaN()
	}
	perStep := s.n / s.steps
	if s.l2 == 0 {
		return perStep
	}
	return math.Min(perStep, math.Max(1, s.area/s.steps/s.l2))
}

// pooled returns the effective size of pooled space-time samples given the
// time factor (1 − ρ)/(1 + ρ) of Bretherton et al. (1999) eqs. 30/31:
// min(N, M·T·min(1, factor)), at least 1.
func (s sizeInputs) pooled(factor float64) float64 {
	if factor != factor || !(s.n > 0) {
		return math.NaN()
	}
	e := s.independentAreas() * s.steps * math.Min(1, factor)
	return capSize(s.n, e)
}

func corrFactor(r1, r2 float64) float64 { p := r1 * r2; return (1 - p) / (1 + p) }
func meanFactor(r1 float64) float64     { return (1 - r1) / (1 + r1) }
