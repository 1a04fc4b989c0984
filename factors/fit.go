package factors

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"

	"lidscope/relations"
)

// maxCond is the largest condition number of R + λI accepted; beyond it
// the factors are too collinear for the fit to mean anything (the same
// bound as relations.CoMoments.Multiple).
const maxCond = 1e12

// Fit is a multi-linear regression of a response on p factors,
// y = Intercept + Σ Coef_j x_j, from weighted co-moments, with the
// factors standardised (see the package documentation for the scales).
type Fit struct {
	P      int
	Lambda float64 // ridge penalty on the correlation-matrix scale; 0 is OLS
	N      int64   // samples
	W      float64 // Σ w

	Mean  []float64 // weighted factor means, physical units
	SD    []float64 // weighted population standard deviations of the factors
	YMean float64
	YVar  float64 // weighted population variance of the response

	CoefSD    []float64 // response units per standard deviation of each factor (b)
	Coef      []float64 // response units per unit of each factor (β = b/SD)
	Intercept float64   // ȳ − Σ β_j x̄_j
	ResidVar  float64   // Σ w e² / Σ w of the fitted model on its own samples
	R2        float64   // 1 − ResidVar/YVar (in sample)
	VIF       []float64 // variance inflation factors, diag(R⁻¹); +Inf when R is singular

	corr     []float64 // R, p×p
	sandwich []float64 // (R+λI)⁻¹ R (R+λI)⁻¹, p×p
}

// co returns the co-moment C_jl of c (only the upper triangle is kept).
func co(c *relations.CoMoments, j, l int) float64 {
	if j > l {
		j, l = l, j
	}
	return c.C[j*c.K+l]
}

// FitMoments fits the response (the last of the K = p + 1 variables of c)
// on the p factors before it with the ridge penalty lambda ≥ 0 (0: OLS),
// on factors standardised with c's own weighted moments. It returns an
// error when there are too few samples, a factor has no spread, or the
// factors are too collinear for the penalty.
func FitMoments(c relations.CoMoments, lambda float64) (Fit, error) {
	p := c.K - 1
	if p < 1 {
		return Fit{}, fmt.Errorf("factors: the moments hold %d variables; need at least one factor and the response", c.K)
	}
	if !(lambda >= 0) || math.IsInf(lambda, 1) {
		return Fit{}, fmt.Errorf("factors: ridge penalty %v must be a finite number ≥ 0", lambda)
	}
	if !(c.W > 0) || c.N <= int64(p+1) {
		return Fit{}, fmt.Errorf("factors: %d samples cannot fit %d factors and an intercept", c.N, p)
	}
	f := Fit{P: p, Lambda: lambda, N: c.N, W: c.W, Intercept: math.NaN(), ResidVar: math.NaN(), R2: math.NaN()}
	f.Mean = append([]float64(nil), c.Mean[:p]...)
	f.SD = make([]float64, p)
	for j := 0; j < p; j++ {
		v := co(&c, j, j) / c.W
		if !(v > 0) {
			return Fit{}, fmt.Errorf("factors: factor %d has no spread in these samples (variance %g)", j, v)
		}
		f.SD[j] = math.Sqrt(v)
	}
	iy := p
	f.YMean = c.Mean[iy]
	f.YVar = co(&c, iy, iy) / c.W

	r := mat.NewSymDense(p, nil)
	cy := mat.NewVecDense(p, nil)
	for j := 0; j < p; j++ {
		for l := j; l < p; l++ {
			r.SetSym(j, l, co(&c, j, l)/(c.W*f.SD[j]*f.SD[l]))
		}
		cy.SetVec(j, co(&c, j, iy)/(c.W*f.SD[j]))
	}
	a := mat.NewSymDense(p, nil)
	a.CopySym(r)
	for j := 0; j < p; j++ {
		a.SetSym(j, j, a.At(j, j)+lambda)
	}
	var ch mat.Cholesky
	if !ch.Factorize(a) {
		return Fit{}, errors.New("factors: the factors are collinear (R + λI is singular); drop a factor or raise the penalty")
	}
	if cond := ch.Cond(); cond > maxCond {
		return Fit{}, fmt.Errorf("factors: the factors are nearly collinear (condition number of R + λI %.3g); drop a factor or raise the penalty", cond)
	}
	var b mat.VecDense
	if err := ch.SolveVecTo(&b, cy); err != nil {
		return Fit{}, fmt.Errorf("factors: solving the normal equations: %w", err)
	}
	var ainv mat.SymDense
	if err := ch.InverseTo(&ainv); err != nil {
		return Fit{}, fmt.Errorf("factors: inverting R + λI: %w", err)
	}
	var tmp, sw mat.Dense
	tmp.Mul(&ainv, r)
	sw.Mul(&tmp, &ainv)

	f.CoefSD = make([]float64, p)
	f.Coef = make([]float64, p)
	f.corr = make([]float64, p*p)
	f.sandwich = make([]float64, p*p)
	f.Intercept = f.YMean
	bc, brb := 0.0, 0.0 // bᵀc and bᵀRb
	for j := 0; j < p; j++ {
		f.CoefSD[j] = b.AtVec(j)
		f.Coef[j] = f.CoefSD[j] / f.SD[j]
		f.Intercept -= f.Coef[j] * f.Mean[j]
		bc += f.CoefSD[j] * cy.AtVec(j)
		for l := 0; l < p; l++ {
			f.corr[j*p+l] = r.At(j, l)
			f.sandwich[j*p+l] = 0.5 * (sw.At(j, l) + sw.At(l, j))
			brb += f.CoefSD[j] * r.At(j, l) * b.AtVec(l)
		}
	}
	f.ResidVar = math.Max(0, f.YVar-2*bc+brb)
	if f.YVar > 0 {
		f.R2 = 1 - f.ResidVar/f.YVar
	}
	f.VIF = vif(r)
	return f, nil
}

// vif is diag(R⁻¹), the variance inflation factors 1/(1 − R_j²) with R_j²
// the coefficient of determination of factor j on the others (common
// practice); +Inf for every factor when R is singular.
func vif(r *mat.SymDense) []float64 {
	p := r.SymmetricDim()
	out := make([]float64, p)
	var ch mat.Cholesky
	var inv mat.SymDense
	if !ch.Factorize(r) || ch.InverseTo(&inv) != nil {
		for j := range out {
			out[j] = math.Inf(1)
		}
		return out
	}
	for j := range out {
		out[j] = inv.At(j, j)
	}
	return out
}

// Corr returns the weighted correlation matrix R of the factors (p×p,
// row-major).
func (f Fit) Corr() []float64 { return append([]float64(nil), f.corr...) }

// dof is the residual degrees of freedom for an effective sample size.
func (f Fit) dof(nEff float64) float64 { return nEff - float64(f.P) - 1 }

// CovSD is the covariance of the coefficients per standard deviation
// (p×p, row-major) for an effective sample size nEff:
// ResidVar·(R+λI)⁻¹R(R+λI)⁻¹/(nEff − p − 1). NaN when nEff ≤ p + 1.
func (f Fit) CovSD(nEff float64) []float64 {
	out := make([]float64, f.P*f.P)
	d := f.dof(nEff)
	for i, s := range f.sandwich {
		if d > 0 {
			out[i] = f.ResidVar * s / d
		} else {
			out[i] = math.NaN()
		}
	}
	return out
}

// Cov is the covariance of the coefficients in physical units,
// CovSD[j,l]/(SD_j SD_l).
func (f Fit) Cov(nEff float64) []float64 {
	out := f.CovSD(nEff)
	for j := 0; j < f.P; j++ {
		for l := 0; l < f.P; l++ {
			out[j*f.P+l] /= f.SD[j] * f.SD[l]
		}
	}
	return out
}

// SE is the standard error of coefficient j in physical units.
func (f Fit) SE(j int, nEff float64) float64 {
	d := f.dof(nEff)
	if !(d > 0) {
		return math.NaN()
	}
	return math.Sqrt(f.ResidVar*f.sandwich[j*f.P+j]/d) / f.SD[j]
}

// SESD is the standard error of coefficient j per standard deviation.
func (f Fit) SESD(j int, nEff float64) float64 { return f.SE(j, nEff) * f.SD[j] }

// TQuantile is the p quantile of Student's t with nu degrees of freedom
// (gonum distuv); NaN for nu ≤ 0.
func TQuantile(p, nu float64) float64 {
	if !(nu > 0) {
		return math.NaN()
	}
	return distuv.StudentsT{Mu: 0, Sigma: 1, Nu: nu}.Quantile(p)
}

// Interval is the two-sided interval of coefficient j in physical units at
// the given level (0.95 for 95 %): Coef ± t·SE with Student's t of
// nEff − p − 1 degrees of freedom. NaN when nEff ≤ p + 1.
func (f Fit) Interval(j int, nEff, level float64) (lo, hi float64) {
	h := TQuantile(0.5+level/2, f.dof(nEff)) * f.SE(j, nEff)
	return f.Coef[j] - h, f.Coef[j] + h
}

// IntervalSD is Interval per standard deviation of the factor.
func (f Fit) IntervalSD(j int, nEff, level float64) (lo, hi float64) {
	h := TQuantile(0.5+level/2, f.dof(nEff)) * f.SESD(j, nEff)
	return f.CoefSD[j] - h, f.CoefSD[j] + h
}

// Predict returns Intercept + Σ Coef_j x_j for the factors x (physical
// units).
func (f Fit) Predict(x []float64) float64 {
	y := f.Intercept
	for j, b := range f.Coef {
		y += b * x[j]
	}
	return y
}

// HeldOutSSE is Σ w (y − ŷ)² of the fitted model over the samples whose
// moments are h (same K), computed from h alone:
// C_yy − 2βᵀC_xy + βᵀC_xxβ + W_h (ȳ_h − ŷ(x̄_h))².
func (f Fit) HeldOutSSE(h relations.CoMoments) float64 {
	if h.W == 0 {
		return 0
	}
	p, iy := f.P, f.P
	s := co(&h, iy, iy)
	for j := 0; j < p; j++ {
		s -= 2 * f.Coef[j] * co(&h, j, iy)
		for l := 0; l < p; l++ {
			s += f.Coef[j] * co(&h, j, l) * f.Coef[l]
		}
	}
	bias := h.Mean[iy] - f.Predict(h.Mean[:p])
	return math.Max(0, s) + h.W*bias*bias
}
