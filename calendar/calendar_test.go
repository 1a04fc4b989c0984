package calendar

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func mustUnits(t *testing.T, units string, cal Calendar) Units {
	t.Helper()
	u, err := ParseUnits(units, cal, Options{})
	if err != nil {
		t.Fatalf("ParseUnits(%q, %v): %v", units, cal, err)
	}
	return u
}

func mustDecode(t *testing.T, u Units, v float64) Date {
	t.Helper()
	d, err := u.Decode(v)
	if err != nil {
		t.Fatalf("%v: Decode(%v): %v", u, v, err)
	}
	return d
}

// The Gregorian reform: the Julian Thursday 1582-10-04 was followed by the
// Gregorian Friday 1582-10-15 (common practice; Pope Gregory XIII's bull
// Inter gravissimas, 1582). CF-1.10 §4.4.1 defines "standard" this way.
func TestGregorianReform(t *testing.T) {
	u := mustUnits(t, "days since 1582-10-04", Standard)
	if got := mustDecode(t, u, 1).String(); got != "1582-10-15T00:00:00" {
		t.Errorf("1 day after 1582-10-04 in standard = %s, want 1582-10-15T00:00:00", got)
	}
	if got := mustDecode(t, u, 0.75).String(); got != "1582-10-04T18:00:00" {
		t.Errorf("0.75 days after 1582-10-04 = %s", got)
	}
	for day := 5; day <= 14; day++ {
		err := Standard.CheckDay(1582, 10, day)
		if !errors.Is(err, ErrDate) {
			t.Errorf("1582-10-%02d in standard: err = %v, want ErrDate", day, err)
		}
	}
	for _, c := range []Calendar{ProlepticGregorian, Julian} {
		if err := c.CheckDay(1582, 10, 10); err != nil {
			t.Errorf("1582-10-10 in %v: %v", c, err)
		}
	}
	if n := Standard.DaysInMonth(1582, 10); n != 21 {
		t.Errorf("October 1582 in standard has %d days, want 21", n)
	}
	if n := Standard.DaysInYear(1582); n != 355 {
		t.Errorf("1582 in standard has %d days, want 355", n)
	}
	oct15 := Date{1582, 10, 15, 0, 0, 0, 0, Standard}
	if n := oct15.DayOfYear(); n != 278 {
		t.Errorf("day of year of 1582-10-15 in standard = %d, want 278 (287 days before it less the 10 dropped)", n)
	}
	// The Julian calendar ran 10 days behind the Gregorian in 1582 (common
	// practice: the 10 days dropped by the reform).
	ju := mustUnits(t, "days since 1582-10-04", Julian)
	gr := mustUnits(t, "days since 1582-10-04", ProlepticGregorian)
	j, _ := ju.Encode(Date{1582, 10, 14, 0, 0, 0, 0, Julian})
	g, _ := gr.Encode(Date{1582, 10, 14, 0, 0, 0, 0, ProlepticGregorian})
	if j != 10 || g != 10 {
		t.Errorf("days from 1582-10-04 to 1582-10-14: julian %v, proleptic_gregorian %v, want 10 and 10", j, g)
	}
}

// atNanoOfDay builds the date y-m-d at ns nanoseconds after midnight.
func atNanoOfDay(cal Calendar, y, m, d int, ns int64) Date {
	sec := ns / nanosPerSec
	return Date{y, m, d, int(sec / 3600), int(sec / 60 % 60), int(sec % 60), int(ns % nanosPerSec), cal}
}

// Julian Dates from Meeus (1998), Astronomical Algorithms, 2nd ed., ch. 7:
// examples 7.a and 7.b and the table of chapter 7 (values from memory;
// Meeus uses the Julian calendar before 1582-10-15, as "standard" does).
func TestJulianDayMeeus(t *testing.T) {
	cases := []struct {
		y, m   int
		day    float64 // day of month with fraction, as Meeus writes it
		cal    Calendar
		wantJD float64
	}{
		{2000, 1, 1.5, Standard, 2451545.0},
		{1999, 1, 1.0, Standard, 2451179.5},
		{1987, 1, 27.0, Standard, 2446822.5},
		{1987, 6, 19.5, Standard, 2446966.0},
		{1988, 1, 27.0, Standard, 2447187.5},
		{1988, 6, 19.5, Standard, 2447332.0},
		{1900, 1, 1.0, Standard, 2415020.5},
		{1600, 1, 1.0, Standard, 2305447.5},
		{1600, 12, 31.0, Standard, 2305812.5},
		{837, 4, 10.3, Standard, 2026871.8},
		{1957, 10, 4.81, Standard, 2436116.31}, // example 7.a
		{333, 1, 27.5, Standard, 1842713.0},    // example 7.b
		{333, 1, 27.5, Julian, 1842713.0},
		{2000, 1, 1.5, ProlepticGregorian, 2451545.0},
		// The same Julian-calendar date is 13 days later in 1900–2099
		// (common practice): Julian 2000-01-01 is Gregorian 2000-01-14.
		{2000, 1, 1.0, Julian, 2451557.5},
	}
	for _, c := range cases {
		whole := math.Floor(c.day)
		d := atNanoOfDay(c.cal, c.y, c.m, int(whole), int64(math.Round((c.day-whole)*secondsPerDay*nanosPerSec)))
		jd, err := d.JulianDay()
		if err != nil {
			t.Fatalf("%v: %v", d, err)
		}
		if math.Abs(jd-c.wantJD) > 1e-6 {
			t.Errorf("JulianDay(%v %v) = %.6f, want %.6f (Meeus 1998, ch. 7)", d, c.cal, jd, c.wantJD)
		}
	}
	if _, err := (Date{2000, 1, 1, 0, 0, 0, 0, NoLeap}).JulianDay(); !errors.Is(err, ErrCalendar) {
		t.Errorf("JulianDay in noleap: err = %v, want ErrCalendar", err)
	}
}

// MJD = JD − 2400000.5, so MJD 0 is 1858-11-17T00:00:00 (common practice;
// the Modified Julian Date of the Smithsonian Astrophysical Observatory, 1957).
func TestModifiedJulianDayZero(t *testing.T) {
	jd, err := Date{1858, 11, 17, 0, 0, 0, 0, Standard}.JulianDay()
	if err != nil || jd-2400000.5 != 0 {
		t.Errorf("MJD of 1858-11-17 = %v (%v), want 0", jd-2400000.5, err)
	}
	u := mustUnits(t, "days since 1858-11-17 00:00:00", Standard)
	if got := mustDecode(t, u, 51544).String(); got != "2000-01-01T00:00:00" {
		t.Errorf("MJD 51544 = %s, want 2000-01-01T00:00:00 (JD 2451544.5, Meeus 1998 ch. 7)", got)
	}
}

// Unix time: 2000-01-01T00:00:00Z is 946684800 s and 1e9 s is
// 2001-09-09T01:46:40Z (common practice, from memory); 2^31−1 s is
// 2038-01-19T03:14:07Z (the signed 32-bit limit, common practice).
func TestUnixTimeFacts(t *testing.T) {
	u := mustUnits(t, "seconds since 1970-01-01 00:00:00 UTC", Standard)
	for v, want := range map[float64]string{
		946684800:   "2000-01-01T00:00:00",
		1e9:         "2001-09-09T01:46:40",
		1<<31 - 1:   "2038-01-19T03:14:07",
		-1:          "1969-12-31T23:59:59",
		-(1 << 31):  "1901-12-13T20:45:52",
		1e9 + 0.125: "2001-09-09T01:46:40.125",
	} {
		if got := mustDecode(t, u, v).String(); got != want {
			t.Errorf("%v s since 1970 = %s, want %s", v, got, want)
		}
	}
}

// Calendar definitions of CF-1.10 §4.4.1.
func TestCalendarDefinitions(t *testing.T) {
	years := []int{-400, -1, 0, 1, 4, 100, 1500, 1582, 1600, 1700, 1900, 1999, 2000, 2001, 2024, 2100, 2400, 10000}
	for _, y := range years {
		if n := Day360.DaysInYear(y); n != 360 {
			t.Errorf("360_day year %d has %d days", y, n)
		}
		if n := NoLeap.DaysInYear(y); n != 365 {
			t.Errorf("noleap year %d has %d days", y, n)
		}
		if err := NoLeap.CheckDay(y, 2, 29); !errors.Is(err, ErrDate) {
			t.Errorf("noleap %d-02-29: err = %v, want ErrDate", y, err)
		}
		if n := AllLeap.DaysInYear(y); n != 366 {
			t.Errorf("all_leap year %d has %d days", y, n)
		}
		if err := AllLeap.CheckDay(y, 2, 29); err != nil {
			t.Errorf("all_leap %d-02-29: %v", y, err)
		}
		for m := 1; m <= 12; m++ {
			if n := Day360.DaysInMonth(y, m); n != 30 {
				t.Errorf("360_day %d-%02d has %d days", y, m, n)
			}
		}
		if err := Day360.CheckDay(y, 2, 30); err != nil {
			t.Errorf("360_day %d-02-30: %v", y, err)
		}
	}
	// Leap years: Julian every 4th year; Gregorian not in centuries unless
	// divisible by 400 (common practice).
	leap := []struct {
		cal  Calendar
		year int
		want bool
	}{
		{Julian, 1900, true}, {ProlepticGregorian, 1900, false}, {Standard, 1900, false},
		{Julian, 2000, true}, {ProlepticGregorian, 2000, true}, {Standard, 2000, true},
		{Julian, 1500, true}, {ProlepticGregorian, 1500, false}, {Standard, 1500, true},
		{ProlepticGregorian, 0, true}, {ProlepticGregorian, -100, false}, {ProlepticGregorian, -400, true},
		{ProlepticGregorian, 2100, false}, {Julian, 2100, true}, {Julian, 2023, false},
	}
	for _, c := range leap {
		if got := c.cal.IsLeapYear(c.year); got != c.want {
			t.Errorf("%v.IsLeapYear(%d) = %v, want %v", c.cal, c.year, got, c.want)
		}
	}
	if err := Julian.CheckDay(1900, 2, 29); err != nil {
		t.Errorf("julian 1900-02-29: %v", err)
	}
	if err := ProlepticGregorian.CheckDay(1900, 2, 29); !errors.Is(err, ErrDate) {
		t.Errorf("proleptic_gregorian 1900-02-29: err = %v, want ErrDate", err)
	}
	// A Gregorian 400-year cycle has 146097 days and a Julian 4-year cycle
	// 1461 (common practice).
	if n := ProlepticGregorian.dayNumber(2400, 1, 1) - ProlepticGregorian.dayNumber(2000, 1, 1); n != 146097 {
		t.Errorf("Gregorian 400-year cycle = %d days", n)
	}
	if n := Julian.dayNumber(2004, 1, 1) - Julian.dayNumber(2000, 1, 1); n != 1461 {
		t.Errorf("Julian 4-year cycle = %d days", n)
	}
}

// Year numbering of CF-1.10 §4.4.1: standard and julian start at year 1;
// the other calendars have year 0 and negative years.
func TestYearNumbering(t *testing.T) {
	for _, c := range []Calendar{Standard, Julian} {
		if err := c.CheckDay(0, 1, 1); !errors.Is(err, ErrDate) {
			t.Errorf("%v year 0: err = %v, want ErrDate", c, err)
		}
		u := mustUnits(t, "days since 0001-01-01", c)
		if _, err := u.Decode(-1); !errors.Is(err, ErrRange) {
			t.Errorf("%v: 1 day before 0001-01-01: err = %v, want ErrRange", c, err)
		}
	}
	for _, c := range []Calendar{ProlepticGregorian, NoLeap, AllLeap, Day360} {
		u := mustUnits(t, "days since 0001-01-01", c)
		if got := mustDecode(t, u, -1).String(); !strings.HasPrefix(got, "0000-12-") {
			t.Errorf("%v: 1 day before 0001-01-01 = %s, want year 0", c, got)
		}
	}
	u := mustUnits(t, "days since -4713-11-24 12:00:00", ProlepticGregorian)
	// JD 0 is the proleptic Gregorian -4713-11-24T12:00 (Meeus 1998, ch. 7,
	// in astronomical year numbering; from memory).
	if got := mustDecode(t, u, 2451545).String(); got != "2000-01-01T12:00:00" {
		t.Errorf("JD 2451545 from the proleptic Gregorian JD 0 = %s, want 2000-01-01T12:00:00", got)
	}
}

// Every day number maps to a date and back, and consecutive day numbers are
// consecutive dates (the next-day rule written independently here).
func TestDayNumberRoundTrip(t *testing.T) {
	for _, c := range []Calendar{Standard, ProlepticGregorian, Julian, NoLeap, AllLeap, Day360} {
		y, m, d := 1, 1, 1
		if c.HasYearZero() {
			y = -1000
		}
		n := c.dayNumber(y, m, d)
		for range 3200 * 366 {
			gy, gm, gd := c.fromDayNumber(n)
			if gy != y || gm != m || gd != d {
				t.Fatalf("%v: day %d = %d-%d-%d, want %d-%d-%d", c, n, gy, gm, gd, y, m, d)
			}
			if back := c.dayNumber(y, m, d); back != n {
				t.Fatalf("%v: %d-%d-%d -> %d, want %d", c, y, m, d, back, n)
			}
			// next day
			d++
			if c == Standard && y == 1582 && m == 10 && d == 5 {
				d = 15
			}
			if d > c.monthLength(y, m) {
				d, m = 1, m+1
				if m > 12 {
					m, y = 1, y+1
				}
			}
			n++
		}
	}
}

func TestParseCalendar(t *testing.T) {
	for name, want := range map[string]Calendar{
		"": Standard, "standard": Standard, "Gregorian": Standard, " GREGORIAN ": Standard,
		"proleptic_gregorian": ProlepticGregorian, "Julian": Julian, "noleap": NoLeap, "365_day": NoLeap,
		"NoLeap": NoLeap, "all_leap": AllLeap, "366_day": AllLeap, "360_day": Day360, "360_DAY": Day360,
	} {
		got, err := ParseCalendar(name)
		if err != nil || got != want {
			t.Errorf("ParseCalendar(%q) = %v, %v; want %v", name, got, err, want)
		}
	}
	for _, c := range []struct{ name, wantText string }{
		{"none", "has no dates"},
		{"None", "has no dates"},
		{"360", "unknown calendar \"360\"; CF-1.10 §4.4.1 names standard, gregorian, proleptic_gregorian"},
		{"mixed", "360_day"},
		{"gregorian_proleptic", "unknown calendar"},
	} {
		_, err := ParseCalendar(c.name)
		if !errors.Is(err, ErrCalendar) || !strings.Contains(err.Error(), c.wantText) {
			t.Errorf("ParseCalendar(%q) error = %v; want ErrCalendar containing %q", c.name, err, c.wantText)
		}
	}
	for _, name := range CalendarNames() {
		c, err := ParseCalendar(name)
		if err != nil {
			t.Errorf("listed name %q: %v", name, err)
		}
		if back, _ := ParseCalendar(c.String()); back != c {
			t.Errorf("%v does not round-trip its String", c)
		}
	}
}
