package metrics

import (
	"errors"
	"fmt"
	"math"
)

// Kernel computes the metrics of a [Conventions] for single columns and for
// slabs. It holds only the validated conventions and values precomputed from it,
// is never modified after [NewKernel], and is safe for concurrent use (e.g.
// one goroutine per time slice).
type Kernel struct {
	r Conventions
	c Constants

	kappa, eps, rdOverG     float64
	gOverCp, invRd, invCpRv float64
	exner700                float64 // (p0/700 hPa)^κ
	lnP0, lnP700            float64
	// constant surface pressure and the values derived from it
	psConst, lnPsConst, thetaFacConst float64
	// assumed relative humidity and its log
	rhConst, lnRhConst float64
}

// NewKernel validates r and returns a kernel for it.
func NewKernel(r Conventions) (*Kernel, error) {
	if err := r.Validate(); err != nil {
		return nil, err
	}
	c := r.Constants
	k := &Kernel{r: r, c: c}
	k.kappa = c.Kappa()
	k.eps = c.Epsilon()
	k.rdOverG = c.Rd / c.G
	k.gOverCp = c.G / c.Cpd
	k.invRd = 1 / c.Rd
	k.invCpRv = 1 / (c.Cpd * c.Rv)
	k.exner700 = math.Pow(c.P0/P700, k.kappa)
	k.lnP0 = math.Log(c.P0)
	k.lnP700 = math.Log(P700)
	k.psConst = r.SurfacePressure
	k.lnPsConst = math.Log(r.SurfacePressure)
	k.thetaFacConst = math.Pow(c.P0/r.SurfacePressure, k.kappa)
	k.rhConst = r.AssumedRH
	k.lnRhConst = math.Log(r.AssumedRH)
	return k, nil
}

// Conventions returns the kernel's conventions.
func (k *Kernel) Conventions() Conventions { return k.r }

// fault says why a column gave NaN.
type fault uint8

const (
	faultNone    fault = iota
	faultMissing       // a NaN input
	faultTs
	faultT700
	faultPs
	faultHumidity
	faultT850
	faultQ700
)

// what a caller needs: the kernel skips the rest.
type want struct{ lcl, eis, ectei bool }

func badT(t float64) bool { return !(t >= minTemperature && t <= maxTemperature) }

// lnes returns ln es(T) for the conventions' formula: the log of
// [MurphyKoopSVP] or [BoltonSVP] with the kernel's exp and log, reusing
// invT = 1/T and lnT = ln T.
func (k *Kernel) lnes(T, invT, lnT float64) float64 {
	if k.r.SVP == SVPBolton {
		return lnesBolton(T)
	}
	return lnesMK(T, invT, lnT, 1-2/(1+fexp(mkTanhScale*(T-218.8))))
}

// mkTanhScale is 2 × 0.0415: tanh z = 1 − 2/(1 + e^(2z)).
const mkTanhScale = 2 * 0.0415

// lnesMK is ln of Murphy & Koop (2005) eq. 10 given 1/T, ln T and
// th = tanh(0.0415 (T − 218.8)).
func lnesMK(T, invT, lnT, th float64) float64 {
	return 54.842763 - 6763.22*invT - 4.210*lnT + 0.000367*T +
		th*(53.878-1331.22*invT-9.44523*lnT+0.014025*T)
}

// lnesBolton is ln of Bolton (1980) eq. 10.
func lnesBolton(T float64) float64 {
	t := T - ZeroCelsius
	return lnBolton0 + 17.67*t/(t+243.5)
}

var lnBolton0 = math.Log(611.2)

// logOrMinusInf is flog for x > 0 and −Inf for x = 0.
func logOrMinusInf(x float64) float64 {
	if x == 0 {
		return math.Inf(-1)
	}
	return flog(x)
}

var lnMaxRH = math.Log(maxRH)

// ColumnInput is one column's input, SI units. Fields the conventions do not
// use are ignored.
type ColumnInput struct {
	Ts   float64 // surface temperature (SST or air, per Conventions.Surface), K
	T700 float64 // 700-hPa temperature, K
	Ps   float64 // surface pressure, Pa; used when Conventions.PressureField
	// Humidity is the relative humidity (fraction), dew point (K) or
	// specific humidity (kg/kg) per Conventions.Humidity; unused for
	// HumidityAssumedRH.
	Humidity float64
	T850     float64 // temperature at Conventions.LapsePressure, K; used when Conventions.T850Field
	Q700     float64 // 700-hPa specific humidity, kg/kg; used when Conventions.ECTEI
}

// ColumnResult is every value computed for a column, SI units.
type ColumnResult struct {
	SurfacePressure float64 // Pa, as used
	RH              float64 // near-surface relative humidity over liquid used for the LCL, fraction
	DewPoint        float64 // near-surface dew point, K (NaN when RH is 0)
	Theta700        float64 // θ at 700 hPa, K
	ThetaSurface    float64 // θ at the surface, K
	LTS             float64 // K
	LCL             float64 // m above the surface
	Z700            float64 // m above the surface
	T850            float64 // temperature where Γ is evaluated, K
	WSat850         float64 // saturation humidity in Γ (qs or rs per conventions), kg/kg
	LapseRate850    float64 // Γ_T, moist-adiabatic temperature lapse rate, K m-1
	ThetaGradient   float64 // Γθ of Wood & Bretherton (2006, eq. 5), K m-1
	EIS             float64 // K
	QSurface        float64 // kg/kg (NaN unless Conventions.ECTEI)
	Q700            float64 // kg/kg (NaN unless Conventions.ECTEI)
	ECTEI           float64 // K (NaN unless Conventions.ECTEI)
}

// ErrImpossibleInput is wrapped by Column's errors for inputs outside
// physical limits; ErrMissingInput for NaN inputs.
var (
	ErrImpossibleInput = errors.New("impossible input")
	ErrMissingInput    = errors.New("missing input (NaN)")
)

// wsat is the saturation humidity the conventions uses in the lapse rate at
// temperature t and the lapse pressure.
func (k *Kernel) wsat(t float64) float64 {
	if k.r.LapseMoisture == LapseRs {
		return k.r.SVP.SatMixingRatio(t, k.r.LapsePressure, k.c)
	}
	return k.r.SVP.SatSpecificHumidity(t, k.r.LapsePressure, k.c)
}

// colIn is one column's raw input, kept for error messages.
type colIn struct{ ts, t700, ps, hum, t850, q700 float64 }

// load puts column in at index i of b, with the conventions' constants for
// inputs that are not fields.
func (k *Kernel) load(b *block, i int, in colIn) {
	b.ts[i], b.t700[i], b.hum[i], b.q700[i] = in.ts, in.t700, in.hum, in.q700
	b.ps[i] = k.psConst
	if k.r.PressureField {
		b.ps[i] = in.ps
	}
	if k.r.T850Field {
		b.t850[i] = in.t850
	}
}

// Column computes every metric of the conventions for one column, with all
// intermediate values. It returns an error naming the input that is NaN or
// physically impossible. Column and the slab kernels share one
// implementation and give the same numbers.
func (k *Kernel) Column(in ColumnInput) (ColumnResult, error) {
	ci := colIn{ts: in.Ts, t700: in.T700, ps: in.Ps, hum: in.Humidity, t850: in.T850, q700: in.Q700}
	var b block
	b.n = 1
	k.load(&b, 0, ci)
	k.computeBlock(&b, want{lcl: true, eis: true, ectei: k.r.ECTEI})
	if f := b.fault[0]; f != faultNone {
		return ColumnResult{}, k.explain(f, &ci)
	}
	res := ColumnResult{
		SurfacePressure: b.ps[0], RH: b.rh[0], DewPoint: math.NaN(),
		Theta700: b.theta700[0], ThetaSurface: b.thetaS[0], LTS: b.lts[0],
		LCL: b.lcl[0], Z700: b.z700[0], T850: b.t850[0], WSat850: k.wsat(b.t850[0]),
		ThetaGradient: b.gammaθ[0], EIS: b.eis[0],
		QSurface: math.NaN(), Q700: math.NaN(), ECTEI: math.NaN(),
	}
	res.LapseRate850 = MoistAdiabaticLapseRate(res.T850, res.WSat850, k.c)
	switch {
	case k.r.Humidity == HumidityDewPoint:
		res.DewPoint = in.Humidity
	case res.RH > 0:
		res.DewPoint = k.r.SVP.DewPoint(in.Ts, res.RH)
	}
	if k.r.ECTEI {
		res.QSurface, res.Q700, res.ECTEI = b.qSurface[0], b.q700[0], b.ectei[0]
	}
	return res, nil
}

func tempHint(t float64) string {
	if t < 0 {
		return " (below absolute zero: a temperature in °C needs a unit, e.g. 16.85degC)"
	}
	if t < minTemperature {
		return " (was it given in °C without a unit? write e.g. 16.85degC)"
	}
	return ""
}

func (k *Kernel) explain(f fault, in *colIn) error {
	r := &k.r
	rangeT := fmt.Sprintf("[%g, %g] K, the validity range of Murphy & Koop (2005) eq. 10", minTemperature, maxTemperature)
	switch f {
	case faultMissing:
		return fmt.Errorf("metrics: %w in the column (%s)", ErrMissingInput, k.nanNames(in))
	case faultTs:
		return fmt.Errorf("metrics: %w: surface temperature (%v) %g K is outside %s%s", ErrImpossibleInput, r.Surface, in.ts, rangeT, tempHint(in.ts))
	case faultT700:
		return fmt.Errorf("metrics: %w: 700-hPa temperature %g K is outside %s%s", ErrImpossibleInput, in.t700, rangeT, tempHint(in.t700))
	case faultPs:
		return fmt.Errorf("metrics: %w: %w", ErrImpossibleInput, CheckSurfacePressure(in.ps))
	case faultHumidity:
		switch r.Humidity {
		case HumidityRH:
			return fmt.Errorf("metrics: %w: %w", ErrImpossibleInput, CheckRelativeHumidity(in.hum))
		case HumidityDewPoint:
			if badT(in.hum) {
				return fmt.Errorf("metrics: %w: dew point %g K is outside %s%s", ErrImpossibleInput, in.hum, rangeT, tempHint(in.hum))
			}
			return fmt.Errorf("metrics: %w: dew point %g K is above the surface temperature %g K by more than RH %g allows", ErrImpossibleInput, in.hum, in.ts, maxRH)
		case HumiditySpecific:
			return fmt.Errorf("metrics: %w: specific humidity %g kg/kg is negative, at least %g, or gives RH above %g at %g K (give g/kg with a unit, e.g. 12g/kg)", ErrImpossibleInput, in.hum, maxSpecific, maxRH, in.ts)
		}
	case faultT850:
		return fmt.Errorf("metrics: %w: temperature at %g Pa %g K is outside %s%s", ErrImpossibleInput, r.LapsePressure, in.t850, rangeT, tempHint(in.t850))
	case faultQ700:
		return fmt.Errorf("metrics: %w: 700-hPa specific humidity %g kg/kg must be in [0, %g)", ErrImpossibleInput, in.q700, maxSpecific)
	}
	return fmt.Errorf("metrics: column rejected (fault %d)", f)
}

func (k *Kernel) nanNames(in *colIn) string {
	var s []string
	add := func(used bool, v float64, name string) {
		if used && v != v {
			s = append(s, name)
		}
	}
	add(true, in.ts, "surface temperature")
	add(true, in.t700, "T700")
	add(k.r.PressureField, in.ps, "surface pressure")
	add(k.r.Humidity != HumidityAssumedRH, in.hum, "humidity")
	add(k.r.T850Field, in.t850, "T850")
	add(k.r.ECTEI, in.q700, "q700")
	return fmt.Sprint(s)
}
