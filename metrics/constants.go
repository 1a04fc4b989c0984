package metrics

import (
	"fmt"
	"math"
)

// Fixed values used throughout the package. Each is a definition, not a
// tunable choice; tunable constants live in [Constants].
const (
	// ZeroCelsius is 0 °C in kelvin (definition of the Celsius scale).
	ZeroCelsius = 273.15
	// TriplePoint is the triple-point temperature of water, K (definition
	// of the kelvin before 2019; IAPWS).
	TriplePoint = 273.16
	// StandardGravity is g0 in m s-2 (3rd CGPM, 1901; the g0 of the
	// U.S. Standard Atmosphere 1976).
	StandardGravity = 9.80665
	// P700 and P850 are the pressure levels of LTS and EIS, Pa
	// (Klein & Hartmann 1993; Wood & Bretherton 2006).
	P700 = 70000.0
	P850 = 85000.0
	// ReferencePressure is the p0 of potential temperature, 1000 hPa in Pa
	// (common practice).
	ReferencePressure = 100000.0
	// DefaultAssumedRH is the near-surface relative humidity assumed when no
	// humidity field is given. 0.8 is a common assumption over the
	// subtropical oceans (common practice), not a measurement.
	DefaultAssumedRH = 0.8
	// KawaiBeta is the β of ECTEI (Kawai, Koshiro & Webb 2017).
	KawaiBeta = 0.23
	// LinearLCLRate is the slope of the linear LCL rule, m K-1:
	// z_LCL ≈ 125 m K-1 × (T − Td) (Lawrence 2005, BAMS 86, eq. 24;
	// equation number from memory).
	LinearLCLRate = 125.0
)

// Constants are the physical constants a [Conventions] uses. All are SI. They are
// part of the conventions because papers use slightly different values and the
// differences show in EIS at the 0.01–0.1 K level.
//
// The LCL of Romps (2017) does not use these: it uses the constants of the
// author's published code (see [RompsLCL]) so that the author's test values
// are reproduced.
type Constants struct {
	Rd      float64 // gas constant of dry air, J kg-1 K-1
	Rv      float64 // gas constant of water vapour, J kg-1 K-1
	Cpd     float64 // specific heat of dry air at constant pressure, J kg-1 K-1
	Lv0     float64 // latent heat of vaporisation at 0 °C, J kg-1
	LvSlope float64 // −dLv/dT, J kg-1 K-1; Lv(T) = Lv0 − LvSlope·(T − 273.15). 0 means constant Lv.
	G       float64 // gravitational acceleration, m s-2
	P0      float64 // reference pressure of potential temperature, Pa
}

// DefaultConstants returns the default constants:
//
//	Rd  = 287.04 J kg-1 K-1   (common practice)
//	Rv  = 461.5 J kg-1 K-1    (common practice; ε = Rd/Rv = 0.62197)
//	Cpd = 1005.7 J kg-1 K-1   (gives κ = Rd/cpd = 0.2854, the κ of Bolton 1980, from memory)
//	Lv0 = 2.501e6 J kg-1      (Bolton 1980, eq. 2, at 0 °C)
//	LvSlope = 0               (Lv held constant, as in the EIS papers — common practice)
//	G   = 9.80665 m s-2       (standard gravity)
//	P0  = 100000 Pa           (common practice)
func DefaultConstants() Constants {
	return Constants{
		Rd:      287.04,
		Rv:      461.5,
		Cpd:     1005.7,
		Lv0:     2.501e6,
		LvSlope: 0,
		G:       StandardGravity,
		P0:      ReferencePressure,
	}
}

// BoltonLvSlope is the LvSlope of Bolton (1980, eq. 2):
// Lv = (2.501 − 0.00237 T_C)·10^6 J kg-1, T_C in °C.
const BoltonLvSlope = 2370.0

// Kappa returns κ = Rd/cpd, dimensionless.
func (c Constants) Kappa() float64 { return c.Rd / c.Cpd }

// Epsilon returns ε = Rd/Rv, the ratio of the molar masses of water and
// dry air, dimensionless.
func (c Constants) Epsilon() float64 { return c.Rd / c.Rv }

// Lv returns the latent heat of vaporisation at temperature T (K) in
// J kg-1: Lv0 − LvSlope·(T − 273.15).
func (c Constants) Lv(T float64) float64 { return c.Lv0 - c.LvSlope*(T-ZeroCelsius) }

// Validate reports constants that are unset or outside a plausible range,
// naming the field. The ranges are wide: they catch a zero value, a value
// given in the wrong unit or a sign mistake, not a defensible alternative.
func (c Constants) Validate() error {
	check := func(name string, v, lo, hi float64, unit string) error {
		if math.IsNaN(v) || v < lo || v > hi {
			return fmt.Errorf("metrics: Constants.%s = %g %s is outside [%g, %g]; start from metrics.DefaultConstants()", name, v, unit, lo, hi)
		}
		return nil
	}
	for _, e := range []error{
		check("Rd", c.Rd, 280, 295, "J kg-1 K-1"),
		check("Rv", c.Rv, 455, 470, "J kg-1 K-1"),
		check("Cpd", c.Cpd, 990, 1010, "J kg-1 K-1"),
		check("Lv0", c.Lv0, 2.4e6, 2.6e6, "J kg-1"),
		check("LvSlope", c.LvSlope, 0, 3000, "J kg-1 K-1"),
		check("G", c.G, 9.7, 9.9, "m s-2"),
		check("P0", c.P0, 99000, 101325, "Pa"),
	} {
		if e != nil {
			return e
		}
	}
	return nil
}

// Constants of Romps' (2017) published LCL code, used only by [RompsLCL]
// so that the author's check values reproduce exactly. Values as in the
// author's code (from memory; confirmed by reproducing the author's test
// values, see lcl_test.go).
const (
	rompsTtrip = 273.16   // K
	rompsPtrip = 611.65   // Pa
	rompsE0v   = 2.3740e6 // J kg-1, internal energy of vaporisation at the triple point
	rompsG     = 9.81     // m s-2
	rompsRa    = 287.04   // J kg-1 K-1
	rompsRv    = 461.0    // J kg-1 K-1
	rompsCva   = 719.0    // J kg-1 K-1
	rompsCvv   = 1418.0   // J kg-1 K-1
	rompsCvl   = 4119.0   // J kg-1 K-1
	rompsCpa   = rompsCva + rompsRa
	rompsCpv   = rompsCvv + rompsRv
)
