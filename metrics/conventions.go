package metrics

import (
	"fmt"
	"strconv"
	"strings"
)

// SurfaceTemperature says what the surface-temperature input is. It changes
// no arithmetic, but it changes what LTS means, so it is recorded.
type SurfaceTemperature int

// The surface-temperature inputs.
const (
	// SurfaceSST: the sea surface temperature stands in for the surface air
	// temperature (the default; common practice over the ocean).
	SurfaceSST SurfaceTemperature = iota + 1
	// SurfaceAir: a near-surface (e.g. 2-m) air temperature.
	SurfaceAir
)

// String returns "sst" or "air".
func (s SurfaceTemperature) String() string {
	switch s {
	case SurfaceSST:
		return "sst"
	case SurfaceAir:
		return "air"
	}
	return fmt.Sprintf("SurfaceTemperature(%d)", int(s))
}

// HumiditySource says where the near-surface humidity for the LCL (and for
// q_surface of ECTEI) comes from.
type HumiditySource int

// The humidity sources.
const (
	// HumidityAssumedRH: no humidity field; relative humidity is
	// Conventions.AssumedRH everywhere (default 0.8, a documented assumption).
	HumidityAssumedRH HumiditySource = iota + 1
	// HumidityRH: a relative-humidity field over liquid water, fraction 0–1.
	HumidityRH
	// HumidityDewPoint: a dew-point field, K.
	HumidityDewPoint
	// HumiditySpecific: a specific-humidity field, kg/kg.
	HumiditySpecific
)

// String returns the name used in conventions text.
func (h HumiditySource) String() string {
	switch h {
	case HumidityAssumedRH:
		return "assumed-rh"
	case HumidityRH:
		return "rh"
	case HumidityDewPoint:
		return "dewpoint"
	case HumiditySpecific:
		return "specific"
	}
	return fmt.Sprintf("HumiditySource(%d)", int(h))
}

// LapseMoisture says which saturation humidity goes into the moist
// gradients ([MoistAdiabatThetaGradient], [MoistAdiabaticLapseRate]).
type LapseMoisture int

// The moisture variables of the lapse rate.
const (
	// LapseQs: saturation specific humidity, as printed in Wood &
	// Bretherton (2006, eq. 5). The default.
	LapseQs LapseMoisture = iota + 1
	// LapseRs: saturation mixing ratio, as in the AMS Glossary form.
	LapseRs
)

// String returns "qs" or "rs".
func (l LapseMoisture) String() string {
	switch l {
	case LapseQs:
		return "qs"
	case LapseRs:
		return "rs"
	}
	return fmt.Sprintf("LapseMoisture(%d)", int(l))
}

// ParseLapseMoisture reads "qs" or "rs".
func ParseLapseMoisture(s string) (LapseMoisture, error) {
	switch s {
	case "qs":
		return LapseQs, nil
	case "rs":
		return LapseRs, nil
	}
	return 0, fmt.Errorf("metrics: unknown lapse-rate moisture variable %q (use qs or rs)", s)
}

// ECTEISurface says what q_surface in ECTEI is. Kawai, Koshiro & Webb (2017)
// write it as the surface specific humidity; lidscope offers both readings.
type ECTEISurface int

// The q_surface choices.
const (
	// ECTEIAir: the specific humidity of the near-surface air, from the
	// conventions' humidity source at the surface temperature and pressure (the
	// same air whose LCL is computed). The default.
	ECTEIAir ECTEISurface = iota + 1
	// ECTEISaturated: the saturation specific humidity at the surface
	// temperature and pressure (the humidity at a water surface).
	ECTEISaturated
)

// String returns "air" or "saturated".
func (e ECTEISurface) String() string {
	switch e {
	case ECTEIAir:
		return "air"
	case ECTEISaturated:
		return "saturated"
	}
	return fmt.Sprintf("ECTEISurface(%d)", int(e))
}

// ParseECTEISurface reads "air" or "saturated".
func ParseECTEISurface(s string) (ECTEISurface, error) {
	switch s {
	case "air":
		return ECTEIAir, nil
	case "saturated":
		return ECTEISaturated, nil
	}
	return 0, fmt.Errorf("metrics: unknown ECTEI surface humidity %q (use air or saturated)", s)
}

// Conventions lists every choice that changes LTS, EIS or ECTEI. Start from
// [DefaultConventions] and change fields; the zero value is invalid (its enums
// are unset) so that no choice is made silently. [Conventions.Text] is the stable
// description to record in outputs.
//
// The conventions also says which optional inputs are fields (PressureField,
// Humidity, T850Field, ECTEI): [Kernel.Slab] checks that the slices it is
// given match, so the recorded text is always true of the computation.
type Conventions struct {
	// Constants are the physical constants (default DefaultConstants()).
	Constants Constants
	// SVP is the saturation-vapour-pressure formula used for the humidity
	// conversions, the dew point and the lapse rate (default SVPMurphyKoop).
	SVP SVPFormula
	// LCL is the lifting-condensation-level method (default LCLRomps).
	LCL LCLMethod
	// Surface says whether the surface temperature is SST or air
	// temperature (default SurfaceSST). θ_surface, the LCL, z700 and the
	// default T850 all use it.
	Surface SurfaceTemperature
	// PressureField is true when surface pressure is given per column;
	// otherwise SurfacePressure is used everywhere (default false).
	PressureField bool
	// SurfacePressure is the constant surface pressure, Pa (default
	// 100000, i.e. 1000 hPa, the level of Klein & Hartmann 1993).
	SurfacePressure float64
	// Humidity is the source of near-surface humidity (default
	// HumidityAssumedRH).
	Humidity HumiditySource
	// AssumedRH is the relative humidity over liquid water used when
	// Humidity is HumidityAssumedRH (default 0.8).
	AssumedRH float64
	// T850Field is true when the temperature at LapsePressure is given per
	// column; otherwise it is (Ts + T700)/2 (Wood & Bretherton 2006;
	// default false).
	T850Field bool
	// LapsePressure is where Γθ is evaluated, Pa (default 85000).
	LapsePressure float64
	// LapseMoisture is the saturation humidity in Γθ (default LapseQs).
	LapseMoisture LapseMoisture
	// ECTEI is true when ECTEI is computed; it needs a q700 field
	// (default false).
	ECTEI bool
	// ECTEIBeta is β of ECTEI (default 0.23, Kawai et al. 2017).
	ECTEIBeta float64
	// ECTEISurface is what q_surface means (default ECTEIAir).
	ECTEISurface ECTEISurface
}

// DefaultConventions returns the default conventions: DefaultConstants, Murphy & Koop
// (2005) saturation vapour pressure, Romps (2017) LCL, SST as surface
// temperature at a constant 1000 hPa, relative humidity 0.8 assumed, Γθ of
// Wood & Bretherton (2006, eq. 5) at 850 hPa with qs and T850 =
// (Ts + T700)/2, and no ECTEI (β = 0.23, q_surface of the surface air, when
// enabled).
func DefaultConventions() Conventions {
	return Conventions{
		Constants:       DefaultConstants(),
		SVP:             SVPMurphyKoop,
		LCL:             LCLRomps,
		Surface:         SurfaceSST,
		SurfacePressure: ReferencePressure,
		Humidity:        HumidityAssumedRH,
		AssumedRH:       DefaultAssumedRH,
		LapsePressure:   P850,
		LapseMoisture:   LapseQs,
		ECTEIBeta:       KawaiBeta,
		ECTEISurface:    ECTEIAir,
	}
}

const startHint = "; start from metrics.DefaultConventions()"

// Validate reports the first invalid or unset field, by name.
func (r Conventions) Validate() error {
	if err := r.Constants.Validate(); err != nil {
		return fmt.Errorf("metrics: Conventions.Constants: %w", err)
	}
	switch {
	case !r.SVP.valid():
		return fmt.Errorf("metrics: Conventions.SVP is %v, not a known formula%s", r.SVP, startHint)
	case !r.LCL.valid():
		return fmt.Errorf("metrics: Conventions.LCL is %v, not a known method%s", r.LCL, startHint)
	case r.Surface != SurfaceSST && r.Surface != SurfaceAir:
		return fmt.Errorf("metrics: Conventions.Surface is %v, not sst or air%s", r.Surface, startHint)
	case r.Humidity < HumidityAssumedRH || r.Humidity > HumiditySpecific:
		return fmt.Errorf("metrics: Conventions.Humidity is %v, not a known source%s", r.Humidity, startHint)
	case r.LapseMoisture != LapseQs && r.LapseMoisture != LapseRs:
		return fmt.Errorf("metrics: Conventions.LapseMoisture is %v, not qs or rs%s", r.LapseMoisture, startHint)
	case r.ECTEISurface != ECTEIAir && r.ECTEISurface != ECTEISaturated:
		return fmt.Errorf("metrics: Conventions.ECTEISurface is %v, not air or saturated%s", r.ECTEISurface, startHint)
	}
	if !r.PressureField && !SurfacePressureOK(r.SurfacePressure) {
		return fmt.Errorf("metrics: Conventions.SurfacePressure = %g Pa must be above 70000 Pa (700 hPa) and at most %g Pa; give it in Pa (1000 hPa = 100000 Pa)", r.SurfacePressure, float64(maxSurfacePressure))
	}
	if r.Humidity == HumidityAssumedRH && !AssumedRHOK(r.AssumedRH) {
		return fmt.Errorf("metrics: Conventions.AssumedRH = %g must be a fraction in (0, 1] (0.8 means 80 %%)", r.AssumedRH)
	}
	if !(r.LapsePressure > P700 && r.LapsePressure < maxSurfacePressure) {
		return fmt.Errorf("metrics: Conventions.LapsePressure = %g Pa must lie between 70000 Pa and %g Pa (default 85000)", r.LapsePressure, float64(maxSurfacePressure))
	}
	if r.ECTEI && !(r.ECTEIBeta >= 0 && r.ECTEIBeta <= 1) {
		return fmt.Errorf("metrics: Conventions.ECTEIBeta = %g must be in [0, 1] (Kawai et al. 2017 use 0.23)", r.ECTEIBeta)
	}
	return nil
}

func num(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// Text returns a stable one-line description of the conventions, for output
// metadata. Equal convention sets give equal text; the format changes only with the
// version tag at its start ("lidscope-metrics-conventions/1"). Fields that have
// no effect (e.g. AssumedRH when a humidity field is used) are left out.
func (r Conventions) Text() string {
	c := r.Constants
	var b strings.Builder
	b.WriteString("lidscope-metrics-conventions/1")
	fmt.Fprintf(&b, "; constants Rd=%s Rv=%s cpd=%s Lv0=%s LvSlope=%s g=%s p0=%s",
		num(c.Rd), num(c.Rv), num(c.Cpd), num(c.Lv0), num(c.LvSlope), num(c.G), num(c.P0))
	b.WriteString("; theta=T*(p0/p)^(Rd/cpd)")
	switch r.SVP {
	case SVPMurphyKoop:
		b.WriteString("; svp=murphy-koop (Murphy & Koop 2005 eq. 10, over liquid)")
	case SVPBolton:
		b.WriteString("; svp=bolton (Bolton 1980 eq. 10, over liquid)")
	default:
		fmt.Fprintf(&b, "; svp=%v", r.SVP)
	}
	switch r.LCL {
	case LCLRomps:
		b.WriteString("; lcl=romps (Romps 2017 exact, Lambert W-1, author's constants)")
	case LCLBolton:
		b.WriteString("; lcl=bolton (Bolton 1980 eq. 22 T_LCL, dry adiabat cpd/g)")
	case LCLLinear:
		b.WriteString("; lcl=linear (125 m/K x (T-Td))")
	default:
		fmt.Fprintf(&b, "; lcl=%v", r.LCL)
	}
	fmt.Fprintf(&b, "; surface-temperature=%v", r.Surface)
	if r.PressureField {
		b.WriteString("; surface-pressure=field")
	} else {
		fmt.Fprintf(&b, "; surface-pressure=%s Pa", num(r.SurfacePressure))
	}
	if r.Humidity == HumidityAssumedRH {
		fmt.Fprintf(&b, "; humidity=assumed-rh %s (over liquid)", num(r.AssumedRH))
	} else {
		fmt.Fprintf(&b, "; humidity=%v field", r.Humidity)
	}
	t850 := "(Ts+T700)/2"
	if r.T850Field {
		t850 = "field"
	}
	fmt.Fprintf(&b, "; lapse=Wood & Bretherton 2006 eq. 5 at %s Pa, %v, T=%s", num(r.LapsePressure), r.LapseMoisture, t850)
	b.WriteString("; z700=hypsometric Rd*(Ts+T700)/2/g*ln(ps/70000), no virtual correction")
	b.WriteString("; lts=theta700-theta_surface (Klein & Hartmann 1993)")
	b.WriteString("; eis=LTS-Gamma_theta*(z700-z_LCL) (Wood & Bretherton 2006 eq. 4)")
	if r.ECTEI {
		fmt.Fprintf(&b, "; ectei=EIS-beta*Lv(Ts)/cpd*(q_surface-q700) (Kawai et al. 2017), beta=%s, q_surface=%v", num(r.ECTEIBeta), r.ECTEISurface)
	} else {
		b.WriteString("; ectei=off")
	}
	return b.String()
}

// Limits on inputs. Outside them a column is physically impossible (or
// outside the validity of the saturation formulas) and gives NaN.
const (
	minTemperature     = 123.0    // K, lower validity limit of Murphy & Koop (2005) eq. 10
	maxTemperature     = 332.0    // K, upper validity limit of Murphy & Koop (2005) eq. 10
	maxSurfacePressure = 120000.0 // Pa, well above any observed sea-level pressure
	maxRH              = 1.05     // fraction; above this the input is taken as wrong
	maxSpecific        = 0.1      // kg/kg
)
