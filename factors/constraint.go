package factors

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// Constrained is an observationally constrained change of the response
// per kelvin of global-mean surface warming and each factor's part of it.
type Constrained struct {
	Change     float64   // ΔC/ΔT = Σ_i β_i d_i, response units per K
	SE         float64   // its standard error
	Lo, Hi     float64   // Change ∓ z·SE at the level asked for (normal quantile z)
	Contrib    []float64 // β_i d_i per factor
	ContribSE  []float64 // standard error of each contribution
	PerKelvin  []float64 // d_i = Δx_i/ΔT, factor units per K
	PerKelvinS []float64 // standard error of d_i
}

// Constrain combines sensitivities beta (response units per factor unit,
// from observations) with a model's factor changes dx between a control
// and a warmer climate and the global-mean surface warming dT (K, > 0,
// taken as exact): ΔC/ΔT = Σ_i β_i (Δx_i/ΔT) (Qu et al. 2015; Myers &
// Norris 2016; Klein et al. 2017). betaCov is the p×p covariance of beta
// (Fit.Cov); dxCov the p×p covariance of the sampling error of dx (nil
// when it is taken as exact). beta and the factor changes are assumed
// independent (they come from different data: observations and a model),
// so with d = dx/dT and Σ_d = dxCov/dT² the variance is exactly
//
//	Var(βᵀd) = βᵀΣ_dβ + dᵀΣ_βd + tr(Σ_βΣ_d)
//
// (the variance of a sum of products of independent variables; common
// practice), and the interval is Change ± z·SE with z the normal quantile
// of the level (0.95 for 95 %). The contribution of factor i is β_i d_i
// with variance β_i²Σ_d[i,i] + d_i²Σ_β[i,i] + Σ_β[i,i]Σ_d[i,i]; the
// contributions sum to Change, their variances do not add up to its
// variance when the covariances are not diagonal.
func Constrain(beta, betaCov, dx, dxCov []float64, dT, level float64) (Constrained, error) {
	p := len(beta)
	if p == 0 || len(dx) != p || len(betaCov) != p*p || (dxCov != nil && len(dxCov) != p*p) {
		return Constrained{}, fmt.Errorf("factors: constraint needs %d changes and %d×%d covariances; have %d changes, %d and %d covariance entries", p, p, p, len(dx), len(betaCov), len(dxCov))
	}
	if !(dT > 0) || math.IsInf(dT, 1) {
		return Constrained{}, fmt.Errorf("factors: the global-mean warming %v K must be a finite positive number", dT)
	}
	if !(level > 0 && level < 1) {
		return Constrained{}, fmt.Errorf("factors: interval level %v must be between 0 and 1", level)
	}
	sd := make([]float64, p*p) // Σ_d
	if dxCov != nil {
		for i, c := range dxCov {
			sd[i] = c / (dT * dT)
		}
	}
	r := Constrained{Contrib: make([]float64, p), ContribSE: make([]float64, p), PerKelvin: make([]float64, p), PerKelvinS: make([]float64, p)}
	for i := range dx {
		r.PerKelvin[i] = dx[i] / dT
		r.PerKelvinS[i] = math.Sqrt(sd[i*p+i])
	}
	d := r.PerKelvin
	v := 0.0
	for i := 0; i < p; i++ {
		r.Contrib[i] = beta[i] * d[i]
		r.Change += r.Contrib[i]
		bi, si := betaCov[i*p+i], sd[i*p+i]
		r.ContribSE[i] = math.Sqrt(beta[i]*beta[i]*si + d[i]*d[i]*bi + bi*si)
		for k := 0; k < p; k++ {
			v += beta[i]*sd[i*p+k]*beta[k] + d[i]*betaCov[i*p+k]*d[k] + betaCov[i*p+k]*sd[k*p+i]
		}
	}
	r.SE = math.Sqrt(math.Max(0, v))
	z := distuv.UnitNormal.Quantile(0.5 + level/2)
	r.Lo, r.Hi = r.Change-z*r.SE, r.Change+z*r.SE
	return r, nil
}
