package metrics

import "math"

// Table-driven exp and log for the kernel. They have no special cases (no
// NaN, Inf, subnormal or overflow handling): callers pass finite arguments in
// the ranges stated, which the kernel guarantees by validating inputs first.
// Their errors are measured against math.Exp and math.Log in
// fastmath_test.go (within 2 ulp, resp. 2.5e-16 absolute).

// ln2 to more digits than float64 holds (untyped constant arithmetic is
// exact in Go).
const ln2 = 0.693147180559945309417232121458176568

const (
	expBits = 6
	expN    = 1 << expBits // table size
	// ln2/64 split so that kd*ln2NHi is exact for |kd| < 2^20.
	ln2NHi   = 0x1.62e42fefp-7
	ln2NLo   = ln2/expN - ln2NHi
	invLn2N  = expN / ln2
	expShift = 0x1.8p52 // adding it rounds to an integer in the low mantissa bits
)

// expTab[j] = 2^(j/64).
var expTab = func() (t [expN]float64) {
	for j := range t {
		t[j] = math.Exp2(float64(j) / expN)
	}
	return
}()

// fexp returns e^x for −700 < x < 700. Method: x = (64n + j) ln2/64 + r,
// |r| ≤ ln2/128, e^x = 2^n 2^(j/64) e^r with e^r by its Taylor series to r^5
// (truncation below 4e-17 relative).
func fexp(x float64) float64 {
	kd := x*invLn2N + expShift
	ki := math.Float64bits(kd)
	kd -= expShift
	r := x - kd*ln2NHi - kd*ln2NLo
	j := ki & (expN - 1)
	scale := math.Float64frombits(math.Float64bits(expTab[j]) + (ki-j)<<(52-expBits))
	p := r + r*r*(0.5+r*(1.0/6+r*(1.0/24+r*(1.0/120))))
	return scale + scale*p
}

const (
	logBits = 7
	logN    = 1 << logBits
	ln2Hi   = 0x1.62e42fefa38p-1 // ln2 with 11 trailing zero bits, so e*ln2Hi is exact
	ln2Lo   = ln2 - ln2Hi
)

// logInvC[j] ≈ 1/c_j with c_j = 1 + (j + 1/2)/128 the centre of the j-th
// mantissa interval, and logC[j] = −ln(logInvC[j]), computed with math.Log.
var logInvC, logC = func() (inv, lc [logN]float64) {
	for j := range inv {
		inv[j] = 1 / (1 + (float64(j)+0.5)/logN)
		lc[j] = -math.Log(inv[j])
	}
	return
}()

// flog returns ln x for positive, finite, normal x. Method: x = 2^e m,
// 1 ≤ m < 2, m in the j-th of 128 intervals; ln x = e ln2 + ln c_j +
// ln(1 + r) with r = m/c_j − 1, |r| < 1/256, and ln(1 + r) by its series to
// r^6 (truncation below 3e-18).
func flog(x float64) float64 {
	b := math.Float64bits(x)
	e := float64(int64(b>>52) - 1023)
	j := (b >> (52 - logBits)) & (logN - 1)
	m := math.Float64frombits(b&(1<<52-1) | 1023<<52)
	r := m*logInvC[j] - 1
	r2 := r * r
	p := r - r2*(0.5-r*(1.0/3-r*(0.25-r*(0.2-r*(1.0/6)))))
	return e*ln2Hi + (logC[j] + p + e*ln2Lo)
}

// vexp sets dst[i] = fexp(src[i]) (same arithmetic, written as a loop with
// no calls so that independent elements overlap in the pipeline). dst and
// src may be the same slice.
func vexp(dst, src []float64) {
	dst = dst[:len(src)]
	for i, x := range src {
		kd := x*invLn2N + expShift
		ki := math.Float64bits(kd)
		kd -= expShift
		r := x - kd*ln2NHi - kd*ln2NLo
		j := ki & (expN - 1)
		scale := math.Float64frombits(math.Float64bits(expTab[j]) + (ki-j)<<(52-expBits))
		p := r + r*r*(0.5+r*(1.0/6+r*(1.0/24+r*(1.0/120))))
		dst[i] = scale + scale*p
	}
}

// vlog sets dst[i] = flog(src[i]), as vexp does for fexp.
func vlog(dst, src []float64) {
	dst = dst[:len(src)]
	for i, x := range src {
		b := math.Float64bits(x)
		e := float64(int64(b>>52) - 1023)
		j := (b >> (52 - logBits)) & (logN - 1)
		m := math.Float64frombits(b&(1<<52-1) | 1023<<52)
		r := m*logInvC[j] - 1
		r2 := r * r
		p := r - r2*(0.5-r*(1.0/3-r*(0.25-r*(0.2-r*(1.0/6)))))
		dst[i] = e*ln2Hi + (logC[j] + p + e*ln2Lo)
	}
}
