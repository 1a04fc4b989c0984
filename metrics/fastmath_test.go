package metrics

import (
	"math"
	"math/rand/v2"
	"testing"
)

// The kernel's exp and log are checked against the standard library's
// (Go's math.Exp and math.Log, accurate to < 1 ulp) over and beyond the
// ranges the kernel uses.
func TestFastExpLog(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	ulp := func(v float64) float64 { return math.Nextafter(math.Abs(v), math.Inf(1)) - math.Abs(v) }
	tests := []struct {
		name   string
		lo, hi float64
	}{
		{"exp small", -1, 1},
		{"exp kernel range", -60, 60},
		{"exp wide", -700, 700},
	}
	for _, tc := range tests {
		maxUlp := 0.0
		for range 200000 {
			x := tc.lo + (tc.hi-tc.lo)*rng.Float64()
			got, want := fexp(x), math.Exp(x)
			if d := math.Abs(got-want) / ulp(want); d > maxUlp {
				maxUlp = d
			}
		}
		if maxUlp > 2 {
			t.Errorf("fexp %s: max error %.2f ulp, want ≤ 2", tc.name, maxUlp)
		}
		t.Logf("fexp %s: max error %.2f ulp", tc.name, maxUlp)
	}
	for _, x := range []float64{0, 1, -1, ln2, 0.5 * ln2, 64 * ln2, -64 * ln2} {
		if got, want := fexp(x), math.Exp(x); math.Abs(got-want) > 2*ulp(want) {
			t.Errorf("fexp(%g) = %v, want %v", x, got, want)
		}
	}
	logs := []struct {
		name   string
		lo, hi float64 // log-uniform sampling
	}{
		{"log near 1", 0.999, 1.5},
		{"log temperatures", 100, 400},
		{"log pressures", 100, 2e5},
		{"log wide", 1e-300, 1e300},
	}
	for _, tc := range logs {
		maxAbs := 0.0
		for range 200000 {
			x := math.Exp(math.Log(tc.lo) + (math.Log(tc.hi)-math.Log(tc.lo))*rng.Float64())
			got, want := flog(x), math.Log(x)
			tol := math.Max(1, math.Abs(want))
			if d := math.Abs(got-want) / tol; d > maxAbs {
				maxAbs = d
			}
		}
		if maxAbs > 2.5e-16 {
			t.Errorf("flog %s: max error %.3g (absolute, relative when |ln x| > 1), want ≤ 2.5e-16", tc.name, maxAbs)
		}
		t.Logf("flog %s: max error %.3g", tc.name, maxAbs)
	}
	for _, x := range []float64{1, 2, 0.5, math.E, 1 + 1e-12, 1 - 1e-12, 2 - 1e-15} {
		if got, want := flog(x), math.Log(x); math.Abs(got-want) > 2.5e-16*math.Max(1, math.Abs(want)) {
			t.Errorf("flog(%v) = %v, want %v", x, got, want)
		}
	}
}

// The loop forms must agree bit for bit with the scalar forms.
func TestVexpVlogMatchScalar(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	src := make([]float64, 10000)
	dst := make([]float64, len(src))
	for i := range src {
		src[i] = -50 + 100*rng.Float64()
	}
	vexp(dst, src)
	for i, x := range src {
		if dst[i] != fexp(x) {
			t.Fatalf("vexp(%v) = %v, fexp = %v", x, dst[i], fexp(x))
		}
	}
	for i := range src {
		src[i] = math.Exp(-30 + 60*rng.Float64())
	}
	vlog(dst, src)
	for i, x := range src {
		if dst[i] != flog(x) {
			t.Fatalf("vlog(%v) = %v, flog = %v", x, dst[i], flog(x))
		}
	}
}
