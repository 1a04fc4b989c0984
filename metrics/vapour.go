package metrics

import (
	"fmt"
	"math"
)

// SVPFormula selects the formula for the saturation vapour pressure over
// liquid water. The zero value is unset and fails validation.
type SVPFormula int

// The saturation-vapour-pressure formulas.
const (
	// SVPMurphyKoop is Murphy & Koop (2005, eq. 10), the default.
	SVPMurphyKoop SVPFormula = iota + 1
	// SVPBolton is Bolton (1980, eq. 10).
	SVPBolton
)

// String returns the name used on the command line and in conventions text.
func (f SVPFormula) String() string {
	switch f {
	case SVPMurphyKoop:
		return "murphy-koop"
	case SVPBolton:
		return "bolton"
	}
	return fmt.Sprintf("SVPFormula(%d)", int(f))
}

// ParseSVPFormula reads a name written by [SVPFormula.String].
func ParseSVPFormula(s string) (SVPFormula, error) {
	for _, f := range []SVPFormula{SVPMurphyKoop, SVPBolton} {
		if s == f.String() {
			return f, nil
		}
	}
	return 0, fmt.Errorf("metrics: unknown saturation vapour pressure formula %q (use murphy-koop or bolton)", s)
}

func (f SVPFormula) valid() bool { return f == SVPMurphyKoop || f == SVPBolton }

// Pressure returns the saturation vapour pressure over liquid water, Pa, at
// temperature T, K, with formula f. It returns NaN for an unset formula.
func (f SVPFormula) Pressure(T float64) float64 {
	switch f {
	case SVPMurphyKoop:
		return MurphyKoopSVP(T)
	case SVPBolton:
		return BoltonSVP(T)
	}
	return math.NaN()
}

// dlnes returns d(ln es)/dT, K-1, the derivative of the log of
// [SVPFormula.Pressure], written out from the same formulas.
func (f SVPFormula) dlnes(T float64) float64 {
	switch f {
	case SVPMurphyKoop:
		lnT := math.Log(T)
		x := 0.0415 * (T - 218.8)
		th := math.Tanh(x)
		sech2 := 1 - th*th
		g := 53.878 - 1331.22/T - 9.44523*lnT + 0.014025*T
		dg := 1331.22/(T*T) - 9.44523/T + 0.014025
		return 6763.22/(T*T) - 4.210/T + 0.000367 + 0.0415*sech2*g + th*dg
	case SVPBolton:
		t := T - ZeroCelsius
		return 17.67 * 243.5 / ((t + 243.5) * (t + 243.5))
	}
	return math.NaN()
}

// MurphyKoopSVP returns the saturation vapour pressure over liquid water, Pa,
// at temperature T, K (Murphy & Koop 2005, Q. J. R. Meteorol. Soc. 131,
// eq. 10):
//
//	ln es = 54.842763 − 6763.22/T − 4.210 ln T + 0.000367 T
//	        + tanh(0.0415 (T − 218.8)) (53.878 − 1331.22/T − 9.44523 ln T + 0.014025 T)
//
// The authors give it as valid for 123 K < T < 332 K.
func MurphyKoopSVP(T float64) float64 {
	lnT := math.Log(T)
	invT := 1 / T
	return math.Exp(54.842763 - 6763.22*invT - 4.210*lnT + 0.000367*T +
		math.Tanh(0.0415*(T-218.8))*(53.878-1331.22*invT-9.44523*lnT+0.014025*T))
}

// BoltonSVP returns the saturation vapour pressure over liquid water, Pa, at
// temperature T, K (Bolton 1980, Mon. Wea. Rev. 108, eq. 10):
//
//	es = 611.2 exp(17.67 T_C / (T_C + 243.5)),  T_C = T − 273.15.
//
// Bolton gives it as accurate to 0.1 % for −30 °C ≤ T_C ≤ 35 °C.
func BoltonSVP(T float64) float64 {
	t := T - ZeroCelsius
	return 611.2 * math.Exp(17.67*t/(t+243.5))
}

// MixingRatio returns the water-vapour mixing ratio r = ε e/(p − e), kg/kg,
// for vapour pressure e and total pressure p, Pa (common practice).
func MixingRatio(e, p float64, c Constants) float64 {
	return c.Epsilon() * e / (p - e)
}

// SpecificHumidity returns the specific humidity q = ε e/(p − (1 − ε) e),
// kg/kg, for vapour pressure e and total pressure p, Pa (common practice).
func SpecificHumidity(e, p float64, c Constants) float64 {
	eps := c.Epsilon()
	return eps * e / (p - (1-eps)*e)
}

// VapourPressure returns the vapour pressure e, Pa, of air with specific
// humidity q, kg/kg, at pressure p, Pa: e = q p/(ε + (1 − ε) q), the inverse
// of [SpecificHumidity].
func VapourPressure(q, p float64, c Constants) float64 {
	eps := c.Epsilon()
	return q * p / (eps + (1-eps)*q)
}

// SatMixingRatio returns the saturation mixing ratio over liquid water,
// kg/kg, at temperature T, K, and pressure p, Pa.
func (f SVPFormula) SatMixingRatio(T, p float64, c Constants) float64 {
	return MixingRatio(f.Pressure(T), p, c)
}

// SatSpecificHumidity returns the saturation specific humidity over liquid
// water, kg/kg, at temperature T, K, and pressure p, Pa.
func (f SVPFormula) SatSpecificHumidity(T, p float64, c Constants) float64 {
	return SpecificHumidity(f.Pressure(T), p, c)
}

// RelativeHumidity returns the relative humidity over liquid water,
// e/es(T) = es(Td)/es(T), fraction, of air at temperature T with dew point
// Td, both K.
func (f SVPFormula) RelativeHumidity(T, Td float64) float64 {
	return f.Pressure(Td) / f.Pressure(T)
}

// DewPoint returns the dew point, K, of air at temperature T, K, with
// relative humidity rh over liquid water (fraction, > 0): the Td with
// es(Td) = rh·es(T). For Bolton's formula the inverse is analytic; for
// Murphy & Koop it is found by Newton iteration on ln es, started from
// Bolton's inverse, to 1e-10 K. It returns NaN for rh ≤ 0 or NaN input.
func (f SVPFormula) DewPoint(T, rh float64) float64 {
	if !(rh > 0) || math.IsNaN(T) || !f.valid() {
		return math.NaN()
	}
	lne := math.Log(rh * f.Pressure(T))
	// Bolton's inverse: T_C = 243.5 x/(17.67 − x), x = ln(e/611.2).
	x := lne - math.Log(611.2)
	td := ZeroCelsius + 243.5*x/(17.67-x)
	if f == SVPBolton {
		return td
	}
	for i := 0; i < 30; i++ {
		d := (math.Log(f.Pressure(td)) - lne) / f.dlnes(td)
		td -= d
		if math.Abs(d) < 1e-10 {
			break
		}
	}
	return td
}

// RelativeHumidityQ returns the relative humidity over liquid water, as a
// fraction, of air with specific humidity q, kg/kg, at temperature T, K,
// and pressure p, Pa: e/es(T), with e = q p/(ε + (1 − ε) q) ([VapourPressure])
// and es the formula's saturation vapour pressure (WMO definition of
// relative humidity as a ratio of vapour pressures; common practice).
func (f SVPFormula) RelativeHumidityQ(q, T, p float64, c Constants) float64 {
	return VapourPressure(q, p, c) / f.Pressure(T)
}
