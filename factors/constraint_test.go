package factors

import (
	"math"
	"math/rand/v2"
	"testing"
)

// A planted linear cloud model (synthetic truth): C = 1 + Σ β_i x_i with
// no noise in a control and a warmer world whose factors shift by
// different amounts per sample. Sensitivities fitted on the control world
// times the mean factor changes per kelvin give the world's own ΔC/ΔT
// exactly (to rounding) with a vanishing standard error, and the
// contributions add up to it.
func TestConstrainPlantedExact(t *testing.T) {
	beta := []float64{-0.9, 0.4, 0.05}
	shift := []float64{0.8, -2, 15}
	const dT = 3.7
	rng := rand.New(rand.NewPCG(3, 4))
	ctrl := planted(rng, 4, 50, 1, beta, 0, 0.3, true)
	fs := foldsOf(ctrl, 4)
	all, _ := fs.Pooled()
	f, err := FitMoments(all, 0)
	if err != nil {
		t.Fatal(err)
	}
	var cC, cW, w float64
	dx := make([]float64, 3)
	for _, s := range ctrl {
		cC += s.w * s.y
		y := 1.0
		for j := range beta {
			x := s.x[j] + shift[j]*(1+0.3*rng.NormFloat64())
			y += beta[j] * x
			dx[j] += s.w * (x - s.x[j])
		}
		cW += s.w * y
		w += s.w
	}
	for j := range dx {
		dx[j] /= w
	}
	want := (cW - cC) / w / dT
	r, err := Constrain(f.Coef, f.Cov(float64(all.N)), dx, nil, dT, 0.95)
	if err != nil {
		t.Fatal(err)
	}
	if !near(r.Change, want, 1e-10) {
		t.Errorf("constrained ΔC/ΔT %.15g, planted %.15g", r.Change, want)
	}
	sum := 0.0
	for _, c := range r.Contrib {
		sum += c
	}
	if !near(sum, r.Change, 1e-14) {
		t.Errorf("contributions add to %g, change %g", sum, r.Change)
	}
	if !(r.SE < 1e-9*math.Abs(want)) {
		t.Errorf("a noise-free fit with exact changes has standard error %g", r.SE)
	}
}

// The variance of Σ β_i d_i with independent normal β ~ N(b, Σ_β) and
// Δx ~ N(Δx₀, Σ_Δx), d = Δx/ΔT, against a Monte Carlo estimate from 200 000 draws
// (synthetic; the sampling error of a variance estimate from 2·10⁵ draws
// is about 0.3 %, the tolerance 2 %), and each contribution's variance the
// same way.
func TestConstrainVarianceMonteCarlo(t *testing.T) {
	b := []float64{-0.9, 0.4}
	sb := []float64{0.04, 0.01, 0.01, 0.09} // Σ_β
	dx := []float64{2.6, -1.5}
	sx := []float64{0.5, -0.2, -0.2, 0.3} // covariance of Δx
	const dT = 2.0
	r, err := Constrain(b, sb, dx, sx, dT, 0.95)
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(1, 1))
	chol := func(c []float64) [3]float64 { // 2×2 Cholesky: l11, l21, l22
		l11 := math.Sqrt(c[0])
		l21 := c[2] / l11
		return [3]float64{l11, l21, math.Sqrt(c[3] - l21*l21)}
	}
	lb, lx := chol(sb), chol(sx)
	const n = 200000
	var s, s2, c0, c02 float64
	for i := 0; i < n; i++ {
		z1, z2, z3, z4 := rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()
		b0, b1 := b[0]+lb[0]*z1, b[1]+lb[1]*z1+lb[2]*z2
		x0, x1 := dx[0]+lx[0]*z3, dx[1]+lx[1]*z3+lx[2]*z4
		v := (b0*x0 + b1*x1) / dT
		s += v
		s2 += v * v
		c := b0 * x0 / dT
		c0 += c
		c02 += c * c
	}
	mcVar := s2/n - (s/n)*(s/n)
	mcC := c02/n - (c0/n)*(c0/n)
	if math.Abs(r.SE*r.SE/mcVar-1) > 0.02 {
		t.Errorf("variance %g, Monte Carlo %g", r.SE*r.SE, mcVar)
	}
	if math.Abs(r.ContribSE[0]*r.ContribSE[0]/mcC-1) > 0.02 {
		t.Errorf("contribution variance %g, Monte Carlo %g", r.ContribSE[0]*r.ContribSE[0], mcC)
	}
	if z := (r.Hi - r.Change) / r.SE; math.Abs(z-1.959963984540054) > 1e-9 {
		t.Errorf("95 %% normal quantile %g", z) // Φ⁻¹(0.975), from tables
	}
}

func TestConstrainErrors(t *testing.T) {
	for _, tc := range []struct {
		name          string
		b, bc, dx, dc []float64
		dT, level     float64
	}{
		{"no factors", nil, nil, nil, nil, 1, 0.95},
		{"length mismatch", []float64{1, 2}, make([]float64, 4), []float64{1}, nil, 1, 0.95},
		{"covariance size", []float64{1}, make([]float64, 2), []float64{1}, nil, 1, 0.95},
		{"zero warming", []float64{1}, []float64{0}, []float64{1}, nil, 0, 0.95},
		{"NaN warming", []float64{1}, []float64{0}, []float64{1}, nil, math.NaN(), 0.95},
		{"level 95 instead of 0.95", []float64{1}, []float64{0}, []float64{1}, nil, 1, 95},
	} {
		if _, err := Constrain(tc.b, tc.bc, tc.dx, tc.dc, tc.dT, tc.level); err == nil {
			t.Errorf("%s: accepted", tc.name)
		}
	}
}
