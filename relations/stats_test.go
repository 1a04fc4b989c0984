package relations

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat"
)

// Worked numbers of the effective-sample-size formulas of Bretherton,
// Widmann, Dymnikov, Wallace & Bladé (1999, J. Climate 12, 1990–2009):
// eq. 30 N(1 − r1)/(1 + r1) for a mean, eq. 31 N(1 − r1 r2)/(1 + r1 r2)
// for a correlation.
func TestEffectiveSizeWorked(t *testing.T) {
	cases := []struct {
		name   string
		got    float64
		want   float64
		source string
	}{
		{"mean N=120 r1=0.5", EffectiveSizeMean(120, 0.5), 40, "Bretherton et al. 1999 eq. 30: 120·0.5/1.5"},
		{"mean N=120 r1=0", EffectiveSizeMean(120, 0), 120, "eq. 30, no autocorrelation"},
		{"mean N=100 r1=0.9", EffectiveSizeMean(100, 0.9), 100 * 0.1 / 1.9, "eq. 30"},
		{"mean N=120 r1=-0.5 capped", EffectiveSizeMean(120, -0.5), 120, "eq. 30 would give 360; capped at N (issue 6)"},
		{"corr N=120 r1=r2=0.5", EffectiveSizeCorr(120, 0.5, 0.5), 72, "eq. 31: 120·0.75/1.25"},
		{"corr N=120 r1=0.5 r2=0", EffectiveSizeCorr(120, 0.5, 0), 120, "eq. 31: one white series"},
		{"corr N=50 r1=0.8 r2=0.6", EffectiveSizeCorr(50, 0.8, 0.6), 50 * 0.52 / 1.48, "eq. 31"},
		{"corr N=120 r1=0.5 r2=-0.5 capped", EffectiveSizeCorr(120, 0.5, -0.5), 120, "eq. 31 capped at N"},
		{"corr N=10 r=0.99 floored", EffectiveSizeCorr(10, 0.999, 0.999), 1, "at least one sample"},
	}
	for _, c := range cases {
		if math.Abs(c.got-c.want) > 1e-12*c.want {
			t.Errorf("%s: got %.15g, want %.15g (%s)", c.name, c.got, c.want, c.source)
		}
	}
	if !math.IsNaN(EffectiveSizeMean(10, math.NaN())) {
		t.Error("NaN r1 must give NaN")
	}
}

// The pooled effective size: M·T·factor capped at N, with M the
// independent-area count (the package's documented choice).
func TestPooledSize(t *testing.T) {
	cases := []struct {
		s      sizeInputs
		factor float64
		want   float64
	}{
		// 120 steps × 16 cells, every cell independent (L = 0), r1 = 0.5 both: 1920·0.6 = 1152.
		{sizeInputs{n: 1920, steps: 120, area: 1920 * 1e10, l2: 0}, corrFactor(0.5, 0.5), 1920 * 0.6},
		// area per step 16e10 m², L = 2e5 m → L² = 4e10: M = 4; T·M·factor = 120·4·(1/3).
		{sizeInputs{n: 1920, steps: 120, area: 1920 * 1e10, l2: 4e10}, meanFactor(0.5), 160},
		// Huge L: M = 1.
		{sizeInputs{n: 1920, steps: 120, area: 1920 * 1e10, l2: 1e14}, 1, 120},
		// Factor > 1 (negative product) is capped at 1, then at N.
		{sizeInputs{n: 1920, steps: 120, area: 1920 * 1e10, l2: 0}, corrFactor(0.5, -0.5), 1920},
	}
	for k, c := range cases {
		if got := c.s.pooled(c.factor); math.Abs(got-c.want) > 1e-9*c.want {
			t.Errorf("case %d: pooled = %g, want %g", k, got, c.want)
		}
	}
}

// Lag1 on a hand-computed series and on a long synthetic AR(1) series
// (synthetic truth: φ = 0.7).
func TestLag1(t *testing.T) {
	// z = 1, 2, 3, 4: mean 2.5, deviations −1.5 −0.5 0.5 1.5; Σd² = 5;
	// Σ d_t d_t+1 = 0.75 − 0.25 + 0.75 = 1.25; n/pairs = 4/3 → 1/3.
	z := []float64{1, 2, 3, 4}
	p := []bool{true, true, true, true}
	if got := Lag1(z, p); math.Abs(got-1.25/5*4/3) > 1e-15 {
		t.Errorf("Lag1(1,2,3,4) = %v, want %v", got, 1.25/5*4/3)
	}
	// With a gap: 1, 2, _, 4, 5 → present mean 3, d = −2 −1 1 2, Σd² = 10,
	// pairs (1,2) and (4,5): 2 + 2 = 4; n/pairs = 4/2 → 0.8.
	z = []float64{1, 2, 0, 4, 5}
	p = []bool{true, true, false, true, true}
	if got := Lag1(z, p); math.Abs(got-0.8) > 1e-15 {
		t.Errorf("Lag1 with a gap = %v, want 0.8", got)
	}
	rng := rand.New(rand.NewPCG(1, 2))
	z = make([]float64, 20000)
	p = make([]bool, len(z))
	for k := range z {
		if k > 0 {
			z[k] = ar1(rng, z[k-1], 0.7)
		}
		p[k] = true
	}
	if got := Lag1(z, p); math.Abs(got-0.7) > 0.02 {
		t.Errorf("Lag1 of AR(1) φ = 0.7 over 20000 steps = %v", got)
	}
	if !math.IsNaN(Lag1([]float64{1, 2}, []bool{true, true})) {
		t.Error("two values must give NaN")
	}
}

// CoMoments.Simple against gonum/stat (an independent implementation of
// weighted least squares and weighted correlation) on an explicit array,
// to 1e-9; and merging split pieces equals one pass.
func TestSimpleAgainstGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	n := 500
	x, y, w := make([]float64, n), make([]float64, n), make([]float64, n)
	for i := range x {
		x[i] = 5 + 3*rng.NormFloat64()
		y[i] = 0.4 + 0.06*x[i] + 0.1*rng.NormFloat64()
		w[i] = 1e10 * (0.5 + rng.Float64())
	}
	c := NewCoMoments(2)
	a, b := NewCoMoments(2), NewCoMoments(2)
	for i := range x {
		c.Add([]float64{x[i], y[i]}, w[i])
		if i < 173 {
			a.Add([]float64{x[i], y[i]}, w[i])
		} else {
			b.Add([]float64{x[i], y[i]}, w[i])
		}
	}
	a.Merge(b)
	alpha, beta := stat.LinearRegression(x, y, w, false)
	r := stat.Correlation(x, y, w)
	for _, cm := range []CoMoments{c, a} {
		l := cm.Simple(0, 1)
		for _, v := range []struct {
			name      string
			got, want float64
		}{{"slope", l.Slope, beta}, {"intercept", l.Intercept, alpha}, {"r", l.R, r}} {
			if math.Abs(v.got-v.want) > 1e-9*math.Max(1, math.Abs(v.want)) {
				t.Errorf("%s = %.15g, gonum/stat %.15g", v.name, v.got, v.want)
			}
		}
	}
}

// Two-predictor fit against gonum/mat's least squares on an explicit
// design matrix (y = 0.2 + 0.05 x1 − 0.01 x2 + noise).
func TestMultipleAgainstExplicit(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	n := 400
	c := NewCoMoments(3)
	var xs [][3]float64
	var ws []float64
	for i := 0; i < n; i++ {
		x1 := 5 + 2*rng.NormFloat64()
		x2 := 300 + 1.5*rng.NormFloat64() + 0.3*x1
		y := 0.2 + 0.05*x1 - 0.01*x2 + 0.05*rng.NormFloat64()
		w := 0.5 + rng.Float64()
		c.Add([]float64{x1, x2, y}, w)
		xs = append(xs, [3]float64{x1, x2, y})
		ws = append(ws, w)
	}
	m, err := c.Multiple(2, []int{0, 1})
	if err != nil {
		t.Fatal(err)
	}
	// Normal equations of weighted least squares on the raw (uncentred)
	// design [1 x1 x2], solved by Gaussian elimination here.
	var A [3][4]float64
	for i, v := range xs {
		row := [3]float64{1, v[0], v[1]}
		for j := 0; j < 3; j++ {
			for k := 0; k < 3; k++ {
				A[j][k] += ws[i] * row[j] * row[k]
			}
			A[j][3] += ws[i] * row[j] * v[2]
		}
	}
	for p := 0; p < 3; p++ {
		for r := p + 1; r < 3; r++ {
			f := A[r][p] / A[p][p]
			for k := p; k < 4; k++ {
				A[r][k] -= f * A[p][k]
			}
		}
	}
	var beta [3]float64
	for p := 2; p >= 0; p-- {
		s := A[p][3]
		for k := p + 1; k < 3; k++ {
			s -= A[p][k] * beta[k]
		}
		beta[p] = s / A[p][p]
	}
	got := []float64{m.Intercept, m.Coef[0], m.Coef[1]}
	for k := range got {
		if math.Abs(got[k]-beta[k]) > 1e-9*math.Max(1, math.Abs(beta[k])) {
			t.Errorf("coefficient %d = %.15g, normal equations %.15g", k, got[k], beta[k])
		}
	}
}
