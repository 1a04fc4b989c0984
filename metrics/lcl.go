package metrics

import (
	"fmt"
	"math"
)

// LCLMethod selects how the lifting condensation level is computed. The
// zero value is unset and fails validation.
type LCLMethod int

// The LCL methods.
const (
	// LCLRomps is the exact expression of Romps (2017), the default.
	LCLRomps LCLMethod = iota + 1
	// LCLBolton is the LCL temperature of Bolton (1980, eq. 22) lifted
	// along the dry adiabat.
	LCLBolton
	// LCLLinear is the rule z_LCL = 125 m K-1 × (T − Td) (Lawrence 2005).
	LCLLinear
)

// String returns the name used on the command line and in conventions text.
func (m LCLMethod) String() string {
	switch m {
	case LCLRomps:
		return "romps"
	case LCLBolton:
		return "bolton"
	case LCLLinear:
		return "linear"
	}
	return fmt.Sprintf("LCLMethod(%d)", int(m))
}

// ParseLCLMethod reads a name written by [LCLMethod.String].
func ParseLCLMethod(s string) (LCLMethod, error) {
	for _, m := range []LCLMethod{LCLRomps, LCLBolton, LCLLinear} {
		if s == m.String() {
			return m, nil
		}
	}
	return 0, fmt.Errorf("metrics: unknown LCL method %q (use romps, bolton or linear)", s)
}

func (m LCLMethod) valid() bool { return m >= LCLRomps && m <= LCLLinear }

// Height returns the LCL height, m above the surface, of air at temperature
// T, K, pressure p, Pa, and relative humidity rh over liquid water
// (fraction), with method m. svp and c are used by the Bolton and linear
// methods (the linear rule needs the dew point); the Romps method uses its
// own constants. rh ≥ 1 gives 0.
func (m LCLMethod) Height(T, p, rh float64, svp SVPFormula, c Constants) float64 {
	switch m {
	case LCLRomps:
		return RompsLCL(T, p, rh)
	case LCLBolton:
		return BoltonLCL(T, rh, c)
	case LCLLinear:
		if rh >= 1 {
			return 0
		}
		return LinearLCL(T, svp.DewPoint(T, rh))
	}
	return math.NaN()
}

// rompsPvstarl is the saturation vapour pressure over liquid, Pa, of
// Romps (2017, eq. 4) with the constants of the author's code.
func rompsPvstarl(T float64) float64 {
	return rompsPtrip * math.Pow(T/rompsTtrip, (rompsCpv-rompsCvl)/rompsRv) *
		math.Exp((rompsE0v-(rompsCvv-rompsCvl)*rompsTtrip)/rompsRv*(1/rompsTtrip-1/T))
}

// RompsLCL returns the height of the lifting condensation level, m above
// the parcel's level, for air at temperature T, K, pressure p, Pa, and
// relative humidity rh over liquid water (fraction), with the exact
// expression of Romps (2017, J. Atmos. Sci. 74, 3891–3900), the z_LCL
// formula of the paper as written in the author's published code (the
// equation number is not quoted here because it is known only from memory):
//
//	z_LCL = (cpm T/g) [1 − b/(a W₋₁((b/a) c^(1/a)))]
//	a = −(cpv − cvl)/Rv + cpm/Rm
//	b = −(E0v − (cvv − cvl) Ttrip)/(Rv T)
//	c = rh exp(b)
//
// with cpm and Rm the heat capacity and gas constant of the moist air. The
// constants are those of the author's published code (Ttrip 273.16 K,
// ptrip 611.65 Pa, E0v 2.374e6 J kg-1, g 9.81 m s-2, Ra 287.04, Rv 461,
// cva 719, cvv 1418, cvl 4119 J kg-1 K-1), not [Constants], so that the
// author's check values are reproduced. As in the author's code, rh = 0
// gives cpm T/g; rh ≥ 1 (saturated or supersaturated) gives 0.
//
// This is the literal published form through [LambertWm1]; the slab kernel
// uses an algebraically identical form solved in log space (see the tests
// for their agreement).
func RompsLCL(T, p, rh float64) float64 {
	if rh >= 1 {
		return 0
	}
	pv := rh * rompsPvstarl(T)
	qv := rompsRa * pv / (rompsRv*p + (rompsRa-rompsRv)*pv)
	rm := (1-qv)*rompsRa + qv*rompsRv
	cpm := (1-qv)*rompsCpa + qv*rompsCpv
	if rh == 0 {
		return cpm * T / rompsG
	}
	a := -(rompsCpv-rompsCvl)/rompsRv + cpm/rm
	b := -(rompsE0v - (rompsCvv-rompsCvl)*rompsTtrip) / (rompsRv * T)
	c := rh * math.Exp(b)
	return cpm * T / rompsG * (1 - b/(a*LambertWm1(b/a*math.Pow(c, 1/a))))
}

// rompsLCLFast is RompsLCL rewritten for the kernel. With u = −W₋₁,
// k = −b/a > 1 and ρ = u/k, the published expression becomes
//
//	k(ρ − 1) − ln ρ = δ,  δ = −ln(rh)/a,   z_LCL = (cpm T/g)(1 − 1/ρ),
//
// which needs no exp of b, no power of c and no Lambert W. invT = 1/T,
// lnT = ln T and lnrh = ln rh are passed in so that the caller can reuse
// them. ρ starts from the third-order expansion of the root about δ = 0
// (rh = 1, where ρ = 1) and is polished by Halley's method: one step when
// δ ≤ 0.12 (rh ≳ 0.36), six for drier air. The difference from the
// published form is measured in TestRompsKernelMatchesPublished. The kernel
// runs the stages rompsPrep, rompsConverge and rompsHeight over a block.
func rompsLCLFast(T, invT, lnT, p, rh, lnrh float64) float64 {
	var st [1]rompsState
	pv := [1]float64{fexp(rompsE0 + rompsE1*lnT - rompsE2*invT)}
	rompsPrep(st[:], []float64{T}, []float64{invT}, []float64{p}, []float64{rh}, []float64{lnrh}, pv[:])
	rompsConverge(st[:])
	var z [1]float64
	rompsHeight(z[:], st[:], []float64{flog(st[0].rho)})
	return z[0]
}

// rompsState carries rompsLCLFast from one stage to the next.
type rompsState struct {
	k, delta, rho float64
	cpmQT, gQ     float64 // z_LCL = cpmQT/gQ × (1 − 1/ρ)
}

const (
	rompsE1 = (rompsCpv - rompsCvl) / rompsRv
	rompsE2 = (rompsE0v - (rompsCvv-rompsCvl)*rompsTtrip) / rompsRv
)

// rompsPrep sets st[i] to k, δ, the starting ρ and the height scale
// cpm T/g for columns with temperature T, 1/T, pressure p, relative humidity
// rh and its log, given Romps' saturation vapour pressure over liquid
// pvstar = exp(rompsE0 + e1 ln T − e2/T) (the author's pvstarl). It is
// written as a loop over slices of equal length so that the kernel's
// columns overlap.
func rompsPrep(st []rompsState, T, invT, p, rh, lnrh, pvstar []float64) {
	n := len(st)
	T, invT, p, rh, lnrh, pvstar = T[:n], invT[:n], p[:n], rh[:n], lnrh[:n], pvstar[:n]
	for i := range st {
		pv := rh[i] * pvstar[i]
		// With Q = Rv p + (Ra − Rv) pv: qv = Ra pv/Q, Rm = Ra Rv p/Q and
		// cpm = (cpa Q + Ra (cpv − cpa) pv)/Q, so that 1/a = Rm/(cpm − e1 Rm)
		// = Ra Rv p/N1 with N1 = cpm Q − e1 Ra Rv p. Then k = Y/(T N1),
		// δ = −ln(rh) Ra Rv p/N1 and m = 1/(k − 1) = T N1/(Y − T N1) with
		// Y = e2 Ra Rv p: one division gives all three.
		Q := rompsRv*p[i] + (rompsRa-rompsRv)*pv
		cpmQ := rompsCpa*Q + rompsRa*(rompsCpv-rompsCpa)*pv
		RRp := rompsRa * rompsRv * p[i]
		TN1 := T[i] * (cpmQ - rompsE1*RRp)
		Y := rompsE2 * RRp
		inv := 1 / (TN1 * (Y - TN1))
		k := Y * (Y - TN1) * inv
		m := TN1 * inv * TN1
		d := -lnrh[i] * RRp * (Y - TN1) * inv * T[i]
		rho := 1 + d*m*(1+d*m*m*(-0.5+d*(2*k+1)*m*m*(1.0/6)))
		switch {
		case rh[i] >= 1: // saturated: ρ = 1, z_LCL = 0
			d, rho = 0, 1
		case rh[i] == 0: // dry: ρ = ∞, z_LCL = cpm T/g
			d, rho = math.Inf(1), 1
		}
		// field by field: a struct literal here is built on the stack and
		// copied with 16-byte moves that defeat store forwarding
		s := &st[i]
		s.k, s.delta, s.rho, s.cpmQT, s.gQ = k, d, rho, cpmQ*T[i], rompsG*Q
	}
}

// rompsConverge takes five Halley steps for the dry columns (δ > 0.12),
// whose starting ρ is not yet close enough for the single final step.
func rompsConverge(st []rompsState) {
	for i := range st {
		s := &st[i]
		if !(s.delta > 0.12) || math.IsInf(s.delta, 1) {
			continue
		}
		k, delta, rho := s.k, s.delta, s.rho
		for range 5 {
			f := k*(rho-1) - flog(rho) - delta
			g := k*rho - 1
			rho -= 2 * f * rho * g / (2*g*g - f)
		}
		s.rho = rho
	}
}

// rompsHeight sets z[i] to the LCL height of st[i], given lnRho[i] =
// ln st[i].rho: the last Halley step fused with the height (with
// ρ' = ρ − num/den and N = ρ den − num, 1 − 1/ρ' = (N − den)/N).
func rompsHeight(z []float64, st []rompsState, lnRho []float64) {
	z, lnRho = z[:len(st)], lnRho[:len(st)]
	for i := range st {
		s := &st[i]
		if math.IsInf(s.delta, 1) {
			z[i] = s.cpmQT / s.gQ
			continue
		}
		k, rho := s.k, s.rho
		f := k*(rho-1) - lnRho[i] - s.delta
		g := k*rho - 1
		num := 2 * f * rho * g
		den := 2*g*g - f
		N := rho*den - num
		z[i] = s.cpmQT * (N - den) / (s.gQ * N)
	}
}

// rompsE0 is the constant part of ln pvstarl in rompsLCLFast:
// ln ptrip − ((cpv − cvl)/Rv) ln Ttrip + (E0v − (cvv − cvl) Ttrip)/(Rv Ttrip).
var rompsE0 = math.Log(rompsPtrip) - (rompsCpv-rompsCvl)/rompsRv*math.Log(rompsTtrip) +
	(rompsE0v-(rompsCvv-rompsCvl)*rompsTtrip)/(rompsRv*rompsTtrip)

// BoltonLCL returns the LCL height, m above the parcel's level, for air at
// temperature T, K, with relative humidity rh (fraction, > 0): the LCL
// temperature of Bolton (1980, Mon. Wea. Rev. 108, eq. 22 — number from
// memory; eq. 21 is the same in terms of vapour pressure),
//
//	T_L = 1/(1/(T − 55) − ln(rh)/2840) + 55,
//
// reached by dry-adiabatic ascent, z_LCL = (cpd/g)(T − T_L) (common
// practice). rh ≥ 1 gives 0; rh ≤ 0 gives NaN.
func BoltonLCL(T, rh float64, c Constants) float64 {
	if rh >= 1 {
		return 0
	}
	tl := 1/(1/(T-55)-math.Log(rh)/2840) + 55
	return c.Cpd / c.G * (T - tl)
}

// LinearLCL returns the LCL height, m above the parcel's level, from
// temperature T and dew point Td, K, by the rule z_LCL = 125 m K-1 ×
// (T − Td) (Lawrence 2005, Bull. Amer. Meteor. Soc. 86, eq. 24 — number from
// memory). A dew point above T gives 0.
func LinearLCL(T, Td float64) float64 {
	return LinearLCLRate * math.Max(T-Td, 0)
}
