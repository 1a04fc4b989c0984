package metrics

import "math"

// LambertWm1 returns W₋₁(x), the lower real branch of the Lambert W function
// (the solution w ≤ −1 of w eʷ = x), for −1/e ≤ x < 0. It returns −Inf at
// x = 0 (the limit), −1 at the branch point, and NaN outside the domain.
//
// Method (Corless et al. 1996, Adv. Comput. Math. 5, 329–359; equation
// numbers from memory): within 1e-3 of the branch point, eight terms of the
// series in p = −√(2(1 + e x)) (their eq. 4.22); elsewhere Halley's
// iteration on u − ln u = −ln(−x) for u = −w, started from the branch series
// or from the asymptotic expansion w ≈ L₁ − L₂ + L₂/L₁ (their eq. 4.19).
// The relative error is a few ulp away from the branch point and about
// 1e-13 near it (checked against SciPy's lambertw in the tests); at the
// branch point itself W is infinitely sensitive to x, and the float nearest
// −1/e gives −1 to about 1e-8.
func LambertWm1(x float64) float64 {
	switch {
	case math.IsNaN(x) || x > 0:
		return math.NaN()
	case x == 0:
		return math.Inf(-1)
	}
	d := math.FMA(math.E, x, 1) // 1 + e x, ≥ 0 in the domain
	if d < 0 {
		if d > -1e-15 { // rounding of x at the branch point
			return -1
		}
		return math.NaN()
	}
	if d < 1e-3 {
		return branchSeries(-math.Sqrt(2 * d))
	}
	L := -math.Log(-x)
	var u float64
	if L < 3 {
		u = -branchSeries(-math.Sqrt(2 * d))
	} else {
		l2 := math.Log(L)
		u = L + l2 + l2/L
	}
	return -solveULogU(L, u, 4e-16)
}

// branchSeries sums the series of W about the branch point x = −1/e in
// p = ±√(2(1 + e x)) (Corless et al. 1996, eq. 4.22; p < 0 gives W₋₁).
func branchSeries(p float64) float64 {
	return -1 + p*(1+p*(-1.0/3+p*(11.0/72+p*(-43.0/540+p*(769.0/17280+p*(-221.0/8505+p*(680863.0/43545600+p*(-1963.0/204120))))))))
}

// solveULogU solves u − ln u = L for u > 1 (L > 1) by Halley's method from
// the guess u, stopping when a step is below tol·u. f(u) = u − ln u − L,
// f' = 1 − 1/u, f” = 1/u².
func solveULogU(L, u, tol float64) float64 {
	for i := 0; i < 40; i++ {
		if u <= 1 {
			u = 1 + 1e-12
		}
		f := u - math.Log(u) - L
		fp := (u - 1) / u
		fpp := 1 / (u * u)
		step := f / fp / (1 - f*fpp/(2*fp*fp))
		u -= step
		if math.Abs(step) <= tol*u {
			break
		}
	}
	return u
}
