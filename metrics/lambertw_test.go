package metrics

import (
	"math"
	"testing"
)

func TestLambertWm1(t *testing.T) {
	// Closed forms (common practice): W₋₁(−1/e) = −1, W₋₁(−2e⁻²) = −2,
	// W₋₁(−ln2/2) = −2 ln 2, W₋₁(−3e⁻³) = −3.
	// At the branch point W is infinitely sensitive to x: the float nearest
	// −1/e gives −1 to about 1e-8 (√ of the rounding of x).
	if w := LambertWm1(-1 / math.E); math.Abs(w+1) > 1e-7 {
		t.Errorf("LambertWm1(−1/e) = %v, want −1 ± 1e-7", w)
	}
	for _, tc := range []struct{ x, w float64 }{
		{-2 * math.Exp(-2), -2},
		{-math.Ln2 / 2, -2 * math.Ln2},
		{-3 * math.Exp(-3), -3},
		{-10 * math.Exp(-10), -10},
	} {
		if got := LambertWm1(tc.x); relErr(got, tc.w) > 1e-12 {
			t.Errorf("LambertWm1(%v) = %v, want %v", tc.x, got, tc.w)
		}
	}
	// Defining identity w eʷ = x, w ≤ −1, across the domain.
	for _, x := range []float64{-0.36787944, -0.3678, -0.36, -0.3, -0.2, -0.1, -1e-2, -1e-5, -1e-50, -1e-300} {
		w := LambertWm1(x)
		if !(w <= -1) || relErr(w*math.Exp(w), x) > 1e-12 {
			t.Errorf("LambertWm1(%v) = %v: w eʷ = %v", x, w, w*math.Exp(w))
		}
	}
	// Toward the branch point w eʷ is flat, so its residual says little.
	// Writing w = −1 − s and d = 1 + e x, the identity is
	// s − ln(1 + s) = −ln(1 − d), which is sensitive to s and is evaluated
	// here with math.Log1p: it must hold to 1e-6 relative.
	for i := 1; i <= 60; i++ {
		x := -1 / math.E * (1 - math.Pow(10, -float64(i)/4))
		d := math.FMA(math.E, x, 1)
		s := -1 - LambertWm1(x)
		lhs, rhs := s-math.Log1p(s), -math.Log1p(-d)
		if relErr(lhs, rhs) > 1e-6 {
			t.Errorf("LambertWm1(%v): s − ln(1+s) = %.10g, −ln(1−d) = %.10g", x, lhs, rhs)
		}
	}
	if !math.IsInf(LambertWm1(0), -1) {
		t.Error("LambertWm1(0) is not −Inf")
	}
	for _, x := range []float64{0.1, -0.4, math.NaN(), math.Inf(-1)} {
		if !math.IsNaN(LambertWm1(x)) {
			t.Errorf("LambertWm1(%v) = %v, want NaN", x, LambertWm1(x))
		}
	}
}
