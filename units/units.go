// Package units recognises the unit strings found in climate data files and
// converts values to the SI units lidscope computes in (K, Pa, fraction 0–1,
// Pa s-1, W m-2, m, kg/kg).
//
// Every conversion is linear, SI = raw*Scale + Offset, and carries a text that
// says what was done, so a caller can log it and record it in outputs. A unit
// string that is not recognised for a quantity is an error: nothing is guessed.
//
// Unit spellings follow UDUNITS-2 as used by the CF conventions (CF-1.10 §3.1),
// plus the non-CF spellings common in real files ("deg_C", "C", "Celsius",
// "mbar", "%"), which are accepted because they are unambiguous for the
// quantity named.
package units

import (
	"errors"
	"fmt"
	"strconv"
	"strings"
	"unicode"
)

// Kind is the physical quantity a value stands for.
type Kind int

// The quantities lidscope reads.
const (
	Temperature   Kind = iota + 1 // SI unit K
	Pressure                      // SI unit Pa
	Fraction                      // dimensionless, 0–1
	Omega                         // vertical pressure velocity, Pa s-1
	Flux                          // radiative flux, W m-2
	Length                        // m
	MixingRatio                   // specific humidity or mixing ratio, kg/kg
	Precipitation                 // precipitation rate, kg m-2 s-1 (= mm s-1 of water)
	Speed                         // wind speed or velocity component, m s-1
)

// String names the kind.
func (k Kind) String() string {
	switch k {
	case Temperature:
		return "temperature"
	case Pressure:
		return "pressure"
	case Fraction:
		return "fraction"
	case Omega:
		return "vertical pressure velocity"
	case Flux:
		return "radiative flux"
	case Length:
		return "length"
	case MixingRatio:
		return "humidity mixing ratio"
	case Precipitation:
		return "precipitation rate"
	case Speed:
		return "speed"
	}
	return fmt.Sprintf("Kind(%d)", int(k))
}

// SI returns the SI unit string lidscope uses for the kind, as written in outputs.
func (k Kind) SI() string {
	switch k {
	case Temperature:
		return "K"
	case Pressure:
		return "Pa"
	case Fraction:
		return "1"
	case Omega:
		return "Pa s-1"
	case Flux:
		return "W m-2"
	case Length:
		return "m"
	case MixingRatio:
		return "kg kg-1"
	case Precipitation:
		return "kg m-2 s-1"
	case Speed:
		return "m s-1"
	}
	return ""
}

// ErrUnknownUnit is returned (wrapped) when a unit string is not recognised for a kind.
var ErrUnknownUnit = errors.New("unit not recognised")

// ErrNoUnit is returned (wrapped) when a unit string is empty.
var ErrNoUnit = errors.New("no unit given")

// Conversion turns a raw value in unit From into the kind's SI unit:
// SI = raw*Scale + Offset.
type Conversion struct {
	Kind   Kind
	From   string // the unit string as found
	Scale  float64
	Offset float64
}

// Apply converts one value.
func (c Conversion) Apply(v float64) float64 { return v*c.Scale + c.Offset }

// Apply32 converts a slice in place; NaN stays NaN.
func (c Conversion) Apply32(v []float32) {
	if c.Identity() {
		return
	}
	s, o := c.Scale, c.Offset
	for i, x := range v {
		v[i] = float32(float64(x)*s + o)
	}
}

// Identity reports whether the conversion changes nothing.
func (c Conversion) Identity() bool { return c.Scale == 1 && c.Offset == 0 }

// String says what the conversion does, e.g. `"degC" → K: x + 273.15`.
func (c Conversion) String() string {
	si := c.Kind.SI()
	if c.Identity() {
		return fmt.Sprintf("%q is %s: no conversion", c.From, si)
	}
	switch {
	case c.Scale == 1:
		return fmt.Sprintf("%q → %s: x %+g", c.From, si, c.Offset)
	case c.Offset == 0:
		return fmt.Sprintf("%q → %s: x × %g", c.From, si, c.Scale)
	}
	return fmt.Sprintf("%q → %s: x × %g %+g", c.From, si, c.Scale, c.Offset)
}

// normalise folds case and spacing and common spelling variants so that the
// tables below can be small: "deg C" → "degc", "Pa s^-1" → "pa s-1", "hPa/day" → "hpa day-1".
func normalise(u string) string {
	u = strings.TrimSpace(u)
	u = strings.ReplaceAll(u, "°", "deg")
	u = strings.ReplaceAll(u, "º", "deg")
	u = strings.ToLower(u)
	u = strings.ReplaceAll(u, "**", "")
	u = strings.ReplaceAll(u, "^", "")
	u = strings.ReplaceAll(u, ".", " ")
	u = strings.ReplaceAll(u, "*", " ")
	// a/b → a b-1 (one slash only, as UDUNITS allows)
	if i := strings.Index(u, "/"); i >= 0 && !strings.Contains(u[i+1:], "/") {
		den := strings.TrimSpace(u[i+1:])
		if den != "" && !strings.ContainsAny(den, " -") {
			// "m2" → "m-2", "s" → "s-1"
			j := strings.IndexAny(den, "0123456789")
			if j > 0 {
				den = den[:j] + "-" + den[j:]
			} else {
				den += "-1"
			}
			u = strings.TrimSpace(u[:i]) + " " + den
		}
	}
	u = strings.Join(strings.Fields(u), " ")
	return u
}

type entry struct{ scale, offset float64 }

var tables = map[Kind]map[string]entry{
	Temperature: {
		"k": {1, 0}, "kelvin": {1, 0}, "kelvins": {1, 0}, "degk": {1, 0}, "deg k": {1, 0}, "deg_k": {1, 0},
		"degc": {1, 273.15}, "deg c": {1, 273.15}, "deg_c": {1, 273.15}, "c": {1, 273.15},
		"celsius": {1, 273.15}, "degree_c": {1, 273.15}, "degrees_c": {1, 273.15},
		"degree c": {1, 273.15}, "degrees c": {1, 273.15}, "degrees celsius": {1, 273.15},
		"degree celsius": {1, 273.15}, "degree_celsius": {1, 273.15}, "degrees_celsius": {1, 273.15},
	},
	Pressure: {
		"pa": {1, 0}, "pascal": {1, 0}, "pascals": {1, 0},
		"hpa": {100, 0}, "mbar": {100, 0}, "millibar": {100, 0}, "millibars": {100, 0}, "mb": {100, 0},
		"kpa": {1000, 0}, "bar": {1e5, 0}, "atm": {101325, 0},
	},
	Fraction: {
		"1": {1, 0}, "": {1, 0}, "fraction": {1, 0}, "0-1": {1, 0}, "frac": {1, 0}, "none": {1, 0},
		"%": {0.01, 0}, "percent": {0.01, 0}, "percentage": {0.01, 0},
		// cloud cover as sky fractions, tenths and oktas (eighths; WMO
		// code table 2700, from memory: 0–8 oktas, 9 = sky obscured, which
		// is not a cover and must be declared missing)
		"fraction of sky cover": {1, 0}, "fraction of sky": {1, 0}, "sky cover fraction": {1, 0},
		"percent of sky cover": {0.01, 0}, "% of sky cover": {0.01, 0}, "percent sky cover": {0.01, 0},
		"tenths": {0.1, 0}, "tenths of sky cover": {0.1, 0}, "tenths of sky": {0.1, 0},
		"okta": {0.125, 0}, "oktas": {0.125, 0}, "octa": {0.125, 0}, "octas": {0.125, 0},
		"eighths": {0.125, 0}, "eighths of sky": {0.125, 0}, "eighths of sky cover": {0.125, 0},
	},
	Omega: {
		"pa s-1": {1, 0}, "pa s": {1, 0}, "pascal s-1": {1, 0},
		"hpa s-1": {100, 0}, "mbar s-1": {100, 0},
		"hpa day-1": {100.0 / 86400, 0}, "mbar day-1": {100.0 / 86400, 0}, "hpa d-1": {100.0 / 86400, 0},
		"pa day-1": {1.0 / 86400, 0}, "hpa h-1": {100.0 / 3600, 0}, "hpa hr-1": {100.0 / 3600, 0},
	},
	Flux: {
		"w m-2": {1, 0}, "w m2": {1, 0}, "w/m2": {1, 0}, "watt m-2": {1, 0}, "watts m-2": {1, 0},
		"w m-2 ": {1, 0}, "mw m-2": {1e-3, 0},
	},
	Length: {
		"m": {1, 0}, "meter": {1, 0}, "meters": {1, 0}, "metre": {1, 0}, "metres": {1, 0},
		"km": {1000, 0}, "gpm": {1, 0}, "dam": {10, 0},
	},
	MixingRatio: {
		"kg kg-1": {1, 0}, "kg/kg": {1, 0}, "1": {1, 0}, "g kg-1": {1e-3, 0}, "g/kg": {1e-3, 0},
	},
	Precipitation: {
		"kg m-2 s-1": {1, 0}, "mm s-1": {1, 0}, "mm day-1": {1.0 / 86400, 0}, "mm d-1": {1.0 / 86400, 0},
		"mm/day": {1.0 / 86400, 0}, "m s-1": {1000, 0}, "mm h-1": {1.0 / 3600, 0}, "mm hr-1": {1.0 / 3600, 0},
	},
	Speed: {
		"m s-1": {1, 0}, "m/s": {1, 0}, "m s**-1": {1, 0}, "meter second-1": {1, 0}, "metre second-1": {1, 0},
		"km h-1": {1000.0 / 3600, 0}, "km/h": {1000.0 / 3600, 0},
		"knot": {1852.0 / 3600, 0}, "knots": {1852.0 / 3600, 0}, "kt": {1852.0 / 3600, 0}, // 1 knot = 1852 m h-1 (international nautical mile; common practice)
	},
}

// Parse returns the conversion of unit string u, for quantity kind, to SI.
// An empty unit is an error for every kind but Fraction (where CF's
// dimensionless "1" may be written as an empty string); callers that know a
// variable had no units attribute at all should say so themselves.
func Parse(kind Kind, u string) (Conversion, error) {
	t, ok := tables[kind]
	if !ok {
		return Conversion{}, fmt.Errorf("units: unknown quantity %v", kind)
	}
	n := normalise(u)
	if n == "" && kind != Fraction {
		return Conversion{}, fmt.Errorf("%w for %v (expected e.g. %q)", ErrNoUnit, kind, kind.SI())
	}
	e, ok := t[n]
	if !ok {
		return Conversion{}, fmt.Errorf("%w: %q is not a %v unit lidscope knows (e.g. %s)", ErrUnknownUnit, u, kind, examples(kind))
	}
	return Conversion{Kind: kind, From: u, Scale: e.scale, Offset: e.offset}, nil
}

func examples(k Kind) string {
	switch k {
	case Temperature:
		return `"K", "degC", "deg_C", "Celsius"`
	case Pressure:
		return `"Pa", "hPa", "mbar"`
	case Fraction:
		return `"1", "%", "tenths", "oktas"`
	case Omega:
		return `"Pa s-1", "hPa day-1"`
	case Flux:
		return `"W m-2"`
	case Length:
		return `"m", "km"`
	case MixingRatio:
		return `"kg kg-1", "g kg-1"`
	case Precipitation:
		return `"kg m-2 s-1", "mm day-1"`
	case Speed:
		return `"m s-1", "knots"`
	}
	return k.SI()
}

// ParseQuantity reads a number followed by an optional unit, such as
// "290K", "16.85degC", "1015 hPa", "80%" or "0.8", and returns its value in
// SI units with the conversion used. A bare number is taken in SI units.
func ParseQuantity(kind Kind, s string) (float64, Conversion, error) {
	s = strings.TrimSpace(s)
	if s == "" {
		return 0, Conversion{}, fmt.Errorf("empty %v value", kind)
	}
	// longest numeric prefix
	end := 0
	for i := 1; i <= len(s); i++ {
		if _, err := strconv.ParseFloat(s[:i], 64); err == nil {
			end = i
		} else if i < len(s) && !numberish(rune(s[i-1])) {
			break
		}
	}
	if end == 0 {
		return 0, Conversion{}, fmt.Errorf("%q does not start with a number (write e.g. 290K or 16.85degC)", s)
	}
	v, _ := strconv.ParseFloat(s[:end], 64)
	u := strings.TrimSpace(s[end:])
	if u == "" {
		u = kind.SI()
	}
	c, err := Parse(kind, u)
	if err != nil {
		return 0, Conversion{}, fmt.Errorf("%q: %w", s, err)
	}
	return c.Apply(v), c, nil
}

func numberish(r rune) bool {
	return unicode.IsDigit(r) || r == '.' || r == '-' || r == '+' || r == 'e' || r == 'E'
}
