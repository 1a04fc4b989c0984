package calendar

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

var allCalendars = []Calendar{Standard, ProlepticGregorian, Julian, NoLeap, AllLeap, Day360}

// Integral values decode exactly however large they are: the result has no
// fractional second and encodes back to the identical float64.
func TestDecodeExactIntegral(t *testing.T) {
	cases := []struct {
		units string
		v     float64
		want  string
	}{
		// 1e6 h = 41666 d 16 h; cftime 1.6 gives the same (TestDecodeMatchesCftime).
		{"hours since 1800-01-01 00:00:00", 1e6, "1914-01-30T16:00:00"},
		{"seconds since 1970-01-01", 1e9, "2001-09-09T01:46:40"},
		{"seconds since 1970-01-01", 4102444800, "2100-01-01T00:00:00"}, // 130 years incl. 32 leap days
		{"minutes since 2000-01-01", 525600 * 4, "2003-12-31T00:00:00"},
		{"seconds since 1601-01-01", 11644473600, "1970-01-01T00:00:00"}, // 134774 days (common practice, from memory: the 1601 file-time epoch)
	}
	for _, c := range cases {
		u := mustUnits(t, c.units, Standard)
		d := mustDecode(t, u, c.v)
		if d.String() != c.want || d.Nanosecond != 0 {
			t.Errorf("%q: Decode(%v) = %v, want %s exactly", c.units, c.v, d, c.want)
		}
		if back, err := u.Encode(d); err != nil || back != c.v {
			t.Errorf("%q: Encode(%v) = %v, %v; want %v exactly", c.units, d, back, err, c.v)
		}
	}
	// Every integral number of hours up to 1e7 decodes without a fraction.
	u := mustUnits(t, "hours since 1850-01-01", ProlepticGregorian)
	for v := 0.0; v < 1e7; v += 9973 {
		d := mustDecode(t, u, v)
		if d.Nanosecond != 0 || d.Second != 0 || d.Minute != 0 {
			t.Fatalf("Decode(%v hours) = %v, not on the hour", v, d)
		}
		if back, _ := u.Encode(d); back != v {
			t.Fatalf("Encode(Decode(%v)) = %v", v, back)
		}
	}
}

// Decode then Encode gives the value back, and Encode then Decode the date,
// in every calendar and unit.
func TestRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	units := []string{"seconds since 1970-01-01", "minutes since 1582-10-15 00:00", "hours since 1800-01-01 06:00 -03:00",
		"days since 1850-01-01", "days since 1582-10-01 12:00:00"}
	for _, cal := range allCalendars {
		for _, s := range units {
			u := mustUnits(t, s, cal)
			unit := float64(u.Unit().seconds())
			for range 500 {
				v := (2*rng.Float64() - 1) * 1e8 / unit * 86400 / 1000
				d := mustDecode(t, u, v)
				back, err := u.Encode(d)
				if err != nil {
					t.Fatal(err)
				}
				if tol := 1e-9/unit + 4*math.Abs(v)*0x1p-52; math.Abs(back-v) > tol {
					t.Fatalf("%v: Encode(Decode(%v)) = %v (diff %g)", u, v, back, back-v)
				}
				again := mustDecode(t, u, back)
				if !again.Equal(d) {
					t.Fatalf("%v: Decode(Encode(%v)) = %v", u, d, again)
				}
			}
		}
	}
}

func TestDecodeErrors(t *testing.T) {
	u := mustUnits(t, "days since 2000-01-01", Standard)
	for _, v := range []float64{math.NaN(), math.Inf(1), math.Inf(-1), 1e300, -1e17} {
		if _, err := u.Decode(v); !errors.Is(err, ErrRange) {
			t.Errorf("Decode(%v): err = %v, want ErrRange", v, err)
		}
	}
	if _, err := u.Encode(Date{2000, 1, 1, 0, 0, 0, 0, NoLeap}); !errors.Is(err, ErrCalendar) {
		t.Errorf("Encode of a noleap date with standard units: err = %v, want ErrCalendar", err)
	}
	if _, err := u.Encode(Date{2001, 2, 29, 0, 0, 0, 0, Standard}); !errors.Is(err, ErrDate) {
		t.Errorf("Encode of 2001-02-29: err = %v, want ErrDate", err)
	}
	if _, err := (Units{}).Decode(1); !errors.Is(err, ErrUnits) {
		t.Errorf("zero Units: err = %v, want ErrUnits", err)
	}
	// Zero values do not panic.
	if r := (Units{}).Reference(); !r.Equal(Date{}) || (Date{}).DayOfYear() != 0 || (Units{}).String() == "" {
		t.Errorf("zero values: Reference %v, DayOfYear %d", r, (Date{}).DayOfYear())
	}
	if _, err := (Units{}).Encode(Date{}); err == nil {
		t.Error("zero Units encoded the zero Date")
	}
	if _, err := u.DecodeAll([]float64{0, 1, math.NaN()}); err == nil || err.Error()[:7] != "time[2]" {
		t.Errorf("DecodeAll error = %v, want one naming time[2]", err)
	}
}

// Calendar months, the opt-in reading of "months since" described in the
// package documentation.
func TestCalendarMonths(t *testing.T) {
	opt := Options{CalendarMonths: true}
	cases := []struct {
		units string
		cal   string
		v     float64
		want  string
	}{
		{"months since 2000-01-01", "standard", 0, "2000-01-01T00:00:00"},
		{"months since 2000-01-01", "standard", 1, "2000-02-01T00:00:00"},
		{"months since 2000-01-01", "standard", 0.5, "2000-01-16T12:00:00"}, // half of 31 days
		{"months since 2000-01-01", "standard", 1.5, "2000-02-15T12:00:00"}, // half of 29 days
		{"months since 2000-01-01", "noleap", 1.5, "2000-02-15T00:00:00"},   // half of 28 days
		{"months since 2000-01-01", "standard", 12, "2001-01-01T00:00:00"},
		{"months since 2000-01-01", "standard", -1, "1999-12-01T00:00:00"},
		{"months since 2000-01-01", "standard", -0.5, "1999-12-16T12:00:00"},
		{"months since 1850-01-15 12:00", "noleap", 1, "1850-02-15T12:00:00"},
		{"months since 1850-01-15 12:00", "noleap", 13, "1851-02-15T12:00:00"},
		{"months since 1850-01-15", "360_day", 0.5, "1850-01-30T00:00:00"},
		{"month since 0000-01-01", "360_day", 24011, "2000-12-01T00:00:00"},
		{"years since 2000-01-01", "standard", 1, "2001-01-01T00:00:00"},
		{"years since 2000-01-01", "standard", 0.5, "2000-07-02T00:00:00"}, // half of 366 days
		{"years since 2000-03-01 00:00 +06:00", "julian", -1, "1999-02-28T18:00:00"},
	}
	for _, c := range cases {
		u, err := Parse(c.units, c.cal, opt)
		if err != nil {
			t.Fatalf("Parse(%q, %q): %v", c.units, c.cal, err)
		}
		d := mustDecode(t, u, c.v)
		if d.String() != c.want {
			t.Errorf("%q (%s): Decode(%v) = %v, want %s", c.units, c.cal, c.v, d, c.want)
		}
		if back, err := u.Encode(d); err != nil || math.Abs(back-c.v) > 1e-12 {
			t.Errorf("%q (%s): Encode(%v) = %v, %v; want %v", c.units, c.cal, d, back, err, c.v)
		}
	}
	// In 360_day a calendar month is 30 days.
	m, _ := Parse("months since 1979-01-01", "360_day", opt)
	days, _ := Parse("days since 1979-01-01", "360_day", opt)
	for v := -50.0; v <= 50; v += 0.125 {
		a, b := mustDecode(t, m, v), mustDecode(t, days, 30*v)
		if !a.Equal(b) {
			t.Errorf("360_day: %v months = %v but %v days = %v", v, a, 30*v, b)
		}
	}
	// A step landing in the 1582 gap of standard does not exist.
	u, _ := Parse("months since 1582-09-10", "standard", opt)
	if _, err := u.Decode(1); !errors.Is(err, ErrDate) {
		t.Errorf("1 month after 1582-09-10 in standard: err = %v, want ErrDate", err)
	}
	// Round trips at arbitrary values.
	rng := rand.New(rand.NewPCG(3, 4))
	for _, cal := range allCalendars {
		u, err := ParseUnits("months since 1900-01-16 12:00", cal, opt)
		if err != nil {
			t.Fatal(err)
		}
		for range 300 {
			v := (2*rng.Float64() - 1) * 3000
			d := mustDecode(t, u, v)
			back, err := u.Encode(d)
			if err != nil || math.Abs(back-v) > 1e-9 {
				t.Fatalf("%v: Encode(Decode(%v)) = %v, %v", cal, v, back, err)
			}
		}
	}
}

// The "day as %Y%m%d.%f" extension.
func TestAbsoluteDays(t *testing.T) {
	opt := Options{AbsoluteDays: true}
	u, err := Parse("day as %Y%m%d.%f", "standard", opt)
	if err != nil {
		t.Fatal(err)
	}
	for v, want := range map[float64]string{
		19790115.5:          "1979-01-15T12:00:00",
		19790115:            "1979-01-15T00:00:00",
		19790115.25:         "1979-01-15T06:00:00",
		19790115.0416666667: "1979-01-15T01:00:00", // rounded to the millisecond
		20000229.75:         "2000-02-29T18:00:00",
		15821015:            "1582-10-15T00:00:00",
		99991231.75:         "9999-12-31T18:00:00",
	} {
		d := mustDecode(t, u, v)
		if d.String() != want {
			t.Errorf("Decode(%v) = %v, want %s", v, d, want)
		}
		back, err := u.Encode(d)
		if err != nil || math.Abs(back-v) > 1e-8 {
			t.Errorf("Encode(%v) = %v, %v; want %v", d, back, err, v)
		}
	}
	for _, v := range []float64{19790132, 19791301, 19790100, 15821010, 20010229, 101} {
		if _, err := u.Decode(v); !errors.Is(err, ErrDate) {
			t.Errorf("Decode(%v): err = %v, want ErrDate", v, err)
		}
	}
	if _, err := u.Decode(-20000101); !errors.Is(err, ErrRange) {
		t.Errorf("negative absolute day: err = %v, want ErrRange", err)
	}
	n, _ := Parse("day as %Y%m%d.%f", "noleap", opt)
	if _, err := n.Decode(20000229); !errors.Is(err, ErrDate) {
		t.Errorf("noleap 20000229: err = %v, want ErrDate", err)
	}
	d, _ := Parse("day as %Y%m%d.%f", "360_day", opt)
	if got := mustDecode(t, d, 20000230.5).String(); got != "2000-02-30T12:00:00" {
		t.Errorf("360_day 20000230.5 = %s", got)
	}
}

func TestDecodeBounds(t *testing.T) {
	// Monthly means with CF-1.10 §7.1 bounds at the month edges.
	b, err := DecodeBounds([]float64{0, 31, 31, 59, 59, 90}, "days since 2001-01-01", "noleap", Options{})
	if err != nil {
		t.Fatal(err)
	}
	want := []string{"2001-01-01T00:00:00/2001-02-01T00:00:00", "2001-02-01T00:00:00/2001-03-01T00:00:00",
		"2001-03-01T00:00:00/2001-04-01T00:00:00"}
	if len(b) != len(want) {
		t.Fatalf("got %d intervals, want %d", len(b), len(want))
	}
	for i := range b {
		if b[i].String() != want[i] {
			t.Errorf("interval %d = %v, want %s", i, b[i], want[i])
		}
	}
	mid := Date{2001, 2, 14, 12, 0, 0, 0, NoLeap}
	if !b[1].Contains(mid) || b[0].Contains(mid) || !b[1].Contains(b[1].End) {
		t.Errorf("Contains is wrong for %v", mid)
	}
	rev := Interval{b[1].End, b[1].Start}
	if !rev.Contains(mid) {
		t.Errorf("reversed interval does not contain %v", mid)
	}
	if _, err := DecodeBounds([]float64{0, 1, 2}, "days since 2001-01-01", "", Options{}); !errors.Is(err, ErrUnits) {
		t.Errorf("odd bounds: err = %v, want ErrUnits", err)
	}
	_, err = DecodeBounds([]float64{0, 1, 2, math.NaN()}, "days since 2001-01-01", "", Options{})
	if err == nil || err.Error()[:18] != "time bounds[1][1]:" {
		t.Errorf("NaN bound: err = %v, want one naming bounds[1][1]", err)
	}
	if _, err := DecodeBounds(nil, "days", "", Options{}); !errors.Is(err, ErrNotCF) {
		t.Errorf("bad units: err = %v, want ErrNotCF", err)
	}
	dates, err := DecodeAxis([]float64{15.5, 45}, "days since 2001-01-01", "noleap", Options{})
	if err != nil || len(dates) != 2 || dates[1].String() != "2001-02-15T00:00:00" {
		t.Errorf("DecodeAxis = %v, %v", dates, err)
	}
	if _, err := DecodeAxis(nil, "days since 2001-01-01", "mixed", Options{}); !errors.Is(err, ErrCalendar) {
		t.Errorf("bad calendar: err = %v, want ErrCalendar", err)
	}
}
