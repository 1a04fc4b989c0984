package relations

import (
	"errors"
	"fmt"
	"math"

	"lidscope/stats"

	"gonum.org/v1/gonum/mat"
)

// CoMoments accumulates the weighted count, means and co-moment matrix
// C_jk = Σ w (x_j − m_j)(x_k − m_k) of K variables, one sample vector at a
// time (West 1979, Commun. ACM 22(9), 532–535, extended to cross
// products), and merges two samples with the pairwise update of Chan,
// Golub & LeVeque (1979): C = C_a + C_b + (W_a W_b / W) d dᵀ with d the
// difference of the means. Weights are cell areas (any positive unit).
type CoMoments struct {
	K    int
	N    int64     // sample vectors added
	W    float64   // Σ w
	Mean []float64 // K weighted means
	C    []float64 // K×K co-moments, row-major; only the upper triangle (j ≤ k) is kept
}

// NewCoMoments returns an empty accumulator of k variables.
func NewCoMoments(k int) CoMoments {
	buf := make([]float64, k+k*k)
	return CoMoments{K: k, Mean: buf[:k:k], C: buf[k:]}
}

// Add adds the sample vector x (length K) with weight w > 0. Vectors with
// a NaN and non-positive weights are ignored.
func (c *CoMoments) Add(x []float64, w float64) {
	if !(w > 0) {
		return
	}
	for _, v := range x[:c.K] {
		if v != v {
			return
		}
	}
	c.add(x, w)
}

// add is Add without the checks; d is scratch of length K.
func (c *CoMoments) add(x []float64, w float64) {
	k := c.K
	c.N++
	w0 := c.W
	c.W += w
	f := w / c.W
	var dbuf [8]float64
	d := dbuf[:0]
	if k > len(dbuf) {
		d = make([]float64, 0, k)
	}
	for j := 0; j < k; j++ {
		dj := x[j] - c.Mean[j]
		d = append(d, dj)
		c.Mean[j] += dj * f
	}
	g := w0 * f // = w0 w / W
	for j := 0; j < k; j++ {
		row := c.C[j*k : j*k+k]
		gj := g * d[j]
		for l := j; l < k; l++ {
			row[l] += gj * d[l]
		}
	}
}

// Merge adds the sample b (same K) to c, element by element with
// stats.ChanMerge (the same update as stats.Moments.Merge).
func (c *CoMoments) Merge(b CoMoments) {
	if b.W == 0 {
		return
	}
	k := c.K
	if c.W == 0 {
		c.N, c.W = b.N, b.W
		copy(c.Mean, b.Mean)
		copy(c.C, b.C)
		return
	}
	p := stats.NewChanMerge(c.W, b.W)
	for j := 0; j < k; j++ {
		dj := b.Mean[j] - c.Mean[j]
		for l := j; l < k; l++ {
			dl := b.Mean[l] - c.Mean[l]
			c.C[j*k+l] = p.CoMoment(c.C[j*k+l], b.C[j*k+l], dj, dl)
		}
	}
	for j := 0; j < k; j++ {
		c.Mean[j] = p.Mean(c.Mean[j], b.Mean[j])
	}
	c.W = p.W
	c.N += b.N
}

// Clone returns an independent copy.
func (c CoMoments) Clone() CoMoments {
	d := NewCoMoments(c.K)
	d.N, d.W = c.N, c.W
	copy(d.Mean, c.Mean)
	copy(d.C, c.C)
	return d
}

// cov returns the weighted population covariance of j and l, Σw(..)(..)/W.
func (c *CoMoments) cov(j, l int) float64 {
	if j > l {
		j, l = l, j
	}
	return c.C[j*c.K+l] / c.W
}

// Line is a weighted least-squares line y = Intercept + Slope·x with the
// population (Σw-normalised) moments it came from.
type Line struct {
	N                        int64
	W                        float64
	Slope, Intercept, R      float64
	XMean, YMean, XVar, YVar float64 // weighted means and population variances
	ResidVar                 float64 // Σ w e² / Σ w
	XIndex, YIndex           int
	Degenerate               bool // no samples or x has no spread: Slope, Intercept and R are NaN
}

// Simple fits y = a + b·x by weighted least squares to variables ix, iy:
// b = cov(x,y)/var(x), a = ȳ − b x̄, r = cov/√(var x var y) (weighted
// moments; common practice).
func (c *CoMoments) Simple(ix, iy int) Line {
	l := Line{N: c.N, W: c.W, XIndex: ix, YIndex: iy}
	nan := math.NaN()
	l.Slope, l.Intercept, l.R, l.XMean, l.YMean, l.XVar, l.YVar, l.ResidVar = nan, nan, nan, nan, nan, nan, nan, nan
	if c.W == 0 {
		l.Degenerate = true
		return l
	}
	l.XMean, l.YMean = c.Mean[ix], c.Mean[iy]
	sxx, syy, sxy := c.cov(ix, ix), c.cov(iy, iy), c.cov(ix, iy)
	l.XVar, l.YVar = sxx, syy
	if !(sxx > 0) || c.N < 2 {
		l.Degenerate = true
		return l
	}
	l.Slope = sxy / sxx
	l.Intercept = l.YMean - l.Slope*l.XMean
	if syy > 0 {
		l.R = sxy / math.Sqrt(sxx*syy)
	}
	l.ResidVar = math.Max(0, syy-l.Slope*sxy)
	return l
}

// SlopeSE is the standard error of the slope for an effective sample size
// nEff: √(ResidVar / ((nEff − 2)·XVar)). With nEff = N and unit weights
// this is the textbook OLS standard error; with area weights it equals the
// weighted-least-squares error σ̂²(XᵀWX)⁻¹ with σ̂² = Σwe²/(N − 2) after
// scaling the weights to sum to N (common practice). NaN when nEff ≤ 2.
func (l Line) SlopeSE(nEff float64) float64 {
	if !(nEff > 2) || l.Degenerate {
		return math.NaN()
	}
	return math.Sqrt(l.ResidVar / ((nEff - 2) * l.XVar))
}

// InterceptSE is √(ResidVar/(nEff − 2)·(1 + x̄²/XVar)), the intercept's
// standard error in the same convention as SlopeSE.
func (l Line) InterceptSE(nEff float64) float64 {
	if !(nEff > 2) || l.Degenerate {
		return math.NaN()
	}
	return math.Sqrt(l.ResidVar / (nEff - 2) * (1 + l.XMean*l.XMean/l.XVar))
}

// Multi is a weighted least-squares fit y = Intercept + Σ Coef_k x_k.
type Multi struct {
	N          int64
	W          float64
	Coef       []float64
	Intercept  float64
	ResidVar   float64   // Σ w e² / Σ w
	R2         float64   // 1 − ResidVar/var(y)
	XInv       []float64 // inverse of the population covariance matrix of the predictors (p×p)
	XMean      []float64
	YMean      float64
	XIndex     []int
	YIndex     int
	Degenerate bool
}

// Multiple fits y (variable iy) on the predictors ix by weighted least
// squares from the co-moments: Coef = S_xx⁻¹ s_xy (normal equations on the
// centred moments), Intercept = ȳ − Coefᵀ x̄. It returns an error when the
// predictors are collinear (singular S_xx).
func (c *CoMoments) Multiple(iy int, ix []int) (Multi, error) {
	p := len(ix)
	m := Multi{N: c.N, W: c.W, XIndex: append([]int(nil), ix...), YIndex: iy, Intercept: math.NaN(), ResidVar: math.NaN(), R2: math.NaN()}
	m.Coef = make([]float64, p)
	for k := range m.Coef {
		m.Coef[k] = math.NaN()
	}
	if c.W == 0 || c.N <= int64(p) {
		m.Degenerate = true
		return m, fmt.Errorf("relations: %d samples cannot fit %d predictors", c.N, p)
	}
	sxx := mat.NewSymDense(p, nil)
	sxy := mat.NewVecDense(p, nil)
	for a := 0; a < p; a++ {
		for b := a; b < p; b++ {
			sxx.SetSym(a, b, c.cov(ix[a], ix[b]))
		}
		sxy.SetVec(a, c.cov(ix[a], iy))
	}
	var ch mat.Cholesky
	if ok := ch.Factorize(sxx); !ok {
		m.Degenerate = true
		return m, errors.New("relations: the predictors are collinear (their covariance matrix is singular)")
	}
	if cond := ch.Cond(); cond > 1e12 {
		m.Degenerate = true
		return m, fmt.Errorf("relations: the predictors are nearly collinear (condition number %.3g)", cond)
	}
	var beta mat.VecDense
	if err := ch.SolveVecTo(&beta, sxy); err != nil {
		m.Degenerate = true
		return m, fmt.Errorf("relations: solving the normal equations: %w", err)
	}
	var inv mat.SymDense
	if err := ch.InverseTo(&inv); err != nil {
		m.Degenerate = true
		return m, fmt.Errorf("relations: inverting the predictor covariance: %w", err)
	}
	m.XInv = make([]float64, p*p)
	m.XMean = make([]float64, p)
	m.YMean = c.Mean[iy]
	m.Intercept = m.YMean
	explained := 0.0
	for a := 0; a < p; a++ {
		m.Coef[a] = beta.AtVec(a)
		m.XMean[a] = c.Mean[ix[a]]
		m.Intercept -= m.Coef[a] * m.XMean[a]
		explained += m.Coef[a] * sxy.AtVec(a)
		for b := 0; b < p; b++ {
			m.XInv[a*p+b] = inv.At(a, b)
		}
	}
	syy := c.cov(iy, iy)
	m.ResidVar = math.Max(0, syy-explained)
	if syy > 0 {
		m.R2 = 1 - m.ResidVar/syy
	}
	return m, nil
}

// SE is the standard error of coefficient k for an effective sample size
// nEff: √(ResidVar·S_xx⁻¹[k,k]/(nEff − p − 1)), the WLS covariance
// σ̂²(XᵀWX)⁻¹ in the convention of Line.SlopeSE. NaN when nEff ≤ p + 1.
func (m Multi) SE(k int, nEff float64) float64 {
	p := len(m.Coef)
	if m.Degenerate || !(nEff > float64(p+1)) {
		return math.NaN()
	}
	return math.Sqrt(m.ResidVar * m.XInv[k*p+k] / (nEff - float64(p) - 1))
}

// InterceptSE is the standard error of the intercept in the same
// convention: √(ResidVar/(nEff−p−1)·(1 + x̄ᵀ S_xx⁻¹ x̄)).
func (m Multi) InterceptSE(nEff float64) float64 {
	p := len(m.Coef)
	if m.Degenerate || !(nEff > float64(p+1)) {
		return math.NaN()
	}
	q := 0.0
	for a := 0; a < p; a++ {
		for b := 0; b < p; b++ {
			q += m.XMean[a] * m.XInv[a*p+b] * m.XMean[b]
		}
	}
	return math.Sqrt(m.ResidVar / (nEff - float64(p) - 1) * (1 + q))
}
