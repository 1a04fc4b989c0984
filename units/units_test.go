package units

import (
	"errors"
	"math"
	"testing"
)

// Unit spellings from UDUNITS-2 / CF-1.10 §3.1 (common practice), plus the
// non-CF spellings found in real files (Debian libncarg-data has "deg_C",
// "C" and "Celsius").
func TestParse(t *testing.T) {
	cases := []struct {
		kind Kind
		unit string
		in   float64
		want float64
	}{
		{Temperature, "K", 290, 290},
		{Temperature, "degC", 16.85, 290},
		{Temperature, "deg_C", 0, 273.15},
		{Temperature, "°C", 25, 298.15},
		{Temperature, "C", -1.8, 271.35},
		{Temperature, "Celsius", 10, 283.15},
		{Temperature, "degrees_Celsius", 10, 283.15},
		{Pressure, "hPa", 1013.25, 101325},
		{Pressure, "mbar", 700, 70000},
		{Pressure, "Pa", 85000, 85000},
		{Fraction, "%", 35, 0.35},
		// cloud cover: 1 okta = 1/8 of the sky, 1 tenth = 1/10 (WMO
		// code table 2700 for oktas, from memory; tenths: common practice)
		{Fraction, "oktas", 6, 0.75},
		{Fraction, "okta", 8, 1},
		{Fraction, "tenths", 7, 0.7},
		{Fraction, "FRACTION OF SKY COVER", 0.6, 0.6},
		{Fraction, "percent of sky cover", 60, 0.6},
		{Fraction, "1", 0.35, 0.35},
		{Fraction, "", 0.35, 0.35},
		{Omega, "Pa s-1", -0.05, -0.05},
		{Omega, "Pa/s", -0.05, -0.05},
		{Omega, "hPa day-1", 86.4, 0.1},
		{Omega, "hPa/day", -43.2, -0.05},
		{Flux, "W m-2", 100, 100},
		{Flux, "W m**-2", 100, 100},
		{Flux, "W/m2", 100, 100},
		{MixingRatio, "g/kg", 12, 0.012},
		{Precipitation, "mm/day", 8.64, 1e-4},
	}
	for _, c := range cases {
		conv, err := Parse(c.kind, c.unit)
		if err != nil {
			t.Errorf("Parse(%v, %q): %v", c.kind, c.unit, err)
			continue
		}
		if got := conv.Apply(c.in); math.Abs(got-c.want) > 1e-9*math.Max(1, math.Abs(c.want)) {
			t.Errorf("%q: %v → %v, want %v", c.unit, c.in, got, c.want)
		}
	}
}

func TestParseRejects(t *testing.T) {
	cases := []struct {
		kind Kind
		unit string
		want error
	}{
		{Temperature, "", ErrNoUnit},
		{Temperature, "F", ErrUnknownUnit}, // Fahrenheit is not accepted: never seen in climate data, and ambiguous with "F" for farad
		{Pressure, "m", ErrUnknownUnit},
		{Fraction, "K", ErrUnknownUnit},
		{Omega, "m s-1", ErrUnknownUnit}, // vertical velocity in m/s is not omega
	}
	for _, c := range cases {
		if _, err := Parse(c.kind, c.unit); !errors.Is(err, c.want) {
			t.Errorf("Parse(%v, %q) = %v, want %v", c.kind, c.unit, err, c.want)
		}
	}
}

func TestParseQuantity(t *testing.T) {
	cases := []struct {
		kind Kind
		in   string
		want float64
		bad  bool
	}{
		{Temperature, "290K", 290, false},
		{Temperature, "16.85degC", 290, false},
		{Temperature, "290", 290, false},
		{Temperature, " 25 °C ", 298.15, false},
		{Pressure, "1015hPa", 101500, false},
		{Pressure, "1e5Pa", 1e5, false},
		{Pressure, "1015 mbar", 101500, false},
		{Fraction, "80%", 0.8, false},
		{Fraction, "0.8", 0.8, false},
		{Temperature, "NaN", 0, true},
		{Temperature, "K", 0, true},
		{Temperature, "290 furlongs", 0, true},
		{Temperature, "", 0, true},
	}
	for _, c := range cases {
		got, _, err := ParseQuantity(c.kind, c.in)
		if c.bad {
			if err == nil {
				t.Errorf("ParseQuantity(%q) = %v, want an error", c.in, got)
			}
			continue
		}
		if err != nil || math.Abs(got-c.want) > 1e-9*math.Abs(c.want) {
			t.Errorf("ParseQuantity(%q) = %v, %v; want %v", c.in, got, err, c.want)
		}
	}
}

func FuzzParseQuantity(f *testing.F) {
	for _, s := range []string{"290K", "16.85degC", "1015hPa", "80%", "", "1e", "-", "°", "1/0"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		for _, k := range []Kind{Temperature, Pressure, Fraction, Omega} {
			v, c, err := ParseQuantity(k, s)
			if err == nil && (c.Kind != k || math.IsNaN(v)) {
				t.Fatalf("%q: %v %+v", s, v, c)
			}
		}
	})
}

func TestConversionString(t *testing.T) {
	c, _ := Parse(Temperature, "degC")
	if got := c.String(); got != `"degC" → K: x +273.15` {
		t.Errorf("String() = %q", got)
	}
}

// The conversions of cloud-cover units are logged with their factor.
func TestSkyCoverConversionText(t *testing.T) {
	for _, c := range []struct{ unit, text string }{
		{"oktas", `"oktas" → 1: x × 0.125`},
		{"Tenths", `"Tenths" → 1: x × 0.1`},
		{"FRACTION OF SKY COVER", `"FRACTION OF SKY COVER" is 1: no conversion`},
	} {
		conv, err := Parse(Fraction, c.unit)
		if err != nil {
			t.Fatal(err)
		}
		if conv.String() != c.text {
			t.Errorf("%q: %q, want %q", c.unit, conv.String(), c.text)
		}
	}
}
