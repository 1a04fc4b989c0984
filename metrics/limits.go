package metrics

import "fmt"

// The input ranges of a column, in one place: the kernel's per-column
// check, Conventions.Validate, Column's explanations and the one-column
// calculator (lidscope calc) all ask these. Outside them a column is
// physically impossible (or outside the validity of the saturation
// formulas) and gives NaN.

// SurfacePressureOK reports whether p (Pa) can be a column's surface
// pressure: the 700-hPa level lies above the surface (p > P700) and p is at
// most 120000 Pa, well above any observed sea-level pressure (common
// practice).
func SurfacePressureOK(p float64) bool { return p > P700 && p <= maxSurfacePressure }

// CheckSurfacePressure is SurfacePressureOK as an error that says what to
// give.
func CheckSurfacePressure(p float64) error {
	if SurfacePressureOK(p) {
		return nil
	}
	return fmt.Errorf("surface pressure %g Pa must be above 70000 Pa (the 700-hPa level must be above the surface) and at most %g Pa; give hPa with a unit, e.g. 1013hPa", p, float64(maxSurfacePressure))
}

// RelativeHumidityOK reports whether rh (a fraction) is a usable measured
// near-surface relative humidity: in [0, 1.05]; slight supersaturation is
// accepted as measurement error, more is taken as a wrong input (common
// practice).
func RelativeHumidityOK(rh float64) bool { return rh >= 0 && rh <= maxRH }

// CheckRelativeHumidity is RelativeHumidityOK as an error that says what
// to give.
func CheckRelativeHumidity(rh float64) error {
	if RelativeHumidityOK(rh) {
		return nil
	}
	return fmt.Errorf("relative humidity %g is outside [0, %g] (a fraction: 80 %% is 0.8)", rh, maxRH)
}

// AssumedRHOK reports whether rh can be the assumed near-surface relative
// humidity of Conventions.AssumedRH: a fraction in (0, 1].
func AssumedRHOK(rh float64) bool { return rh > 0 && rh <= 1 }
