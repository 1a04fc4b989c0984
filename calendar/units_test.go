package calendar

import (
	"errors"
	"strings"
	"testing"
)

// Accepted spellings of CF-1.10 §4.4 time units and UDUNITS-2 reference
// timestamps. The UDUNITS-2 documentation's own example (from memory) is
// "seconds since 1992-10-8 15:15:42.5 -6:00", a reference 6 hours behind UTC.
func TestParseUnitsAccepted(t *testing.T) {
	cases := []struct {
		units   string
		cal     Calendar
		unit    Unit
		refUTC  string
		offsetM int
	}{
		{"days since 1900-01-01", Standard, Days, "1900-01-01T00:00:00", 0},
		{"days since 1900-1-1 00:00:00", Standard, Days, "1900-01-01T00:00:00", 0},
		{"seconds since 1900-01-01T00:00:00Z", Standard, Seconds, "1900-01-01T00:00:00", 0},
		{"hours since 1900-01-01 00:00:0.0", Standard, Hours, "1900-01-01T00:00:00", 0},
		{"Days Since 1900-01-01", Standard, Days, "1900-01-01T00:00:00", 0},
		{"  minutes   since   1900-01-01   12:30  ", Standard, Minutes, "1900-01-01T12:30:00", 0},
		{"s since 1992-10-8 15:15:42.5 -6:00", Standard, Seconds, "1992-10-08T21:15:42.5", -360},
		{"days since 1900-01-01 00:00:00 +05:00", Standard, Days, "1899-12-31T19:00:00", 300},
		{"days since 1900-01-01 00:00:00 -6", Standard, Days, "1900-01-01T06:00:00", -360},
		{"days since 1900-01-01 -6", Standard, Days, "1900-01-01T06:00:00", -360},
		{"days since 1900-01-01T00:00:00+0530", Standard, Days, "1899-12-31T18:30:00", 330},
		{"days since 1900-01-01T00:00:00-03:30", NoLeap, Days, "1900-01-01T03:30:00", -210},
		{"days since 1900-01-01 00:00 GMT", Standard, Days, "1900-01-01T00:00:00", 0},
		{"days since 1900-01-01 00:00:00 UTC", Standard, Days, "1900-01-01T00:00:00", 0},
		{"days since 1900-01-01 00:00:00z", Standard, Days, "1900-01-01T00:00:00", 0},
		{"days since 1900-01-01 UTC", Standard, Days, "1900-01-01T00:00:00", 0},
		{"days since -0500-03-01", ProlepticGregorian, Days, "-0500-03-01T00:00:00", 0},
		{"days since -4713-11-24 12:00", ProlepticGregorian, Days, "-4713-11-24T12:00:00", 0},
		{"days since 0000-01-01", NoLeap, Days, "0000-01-01T00:00:00", 0},
		{"days since 10000-01-01", Standard, Days, "10000-01-01T00:00:00", 0},
		{"days since +2000-01-01", Standard, Days, "2000-01-01T00:00:00", 0},
		{"hr since 2000-01-01", Julian, Hours, "2000-01-01T00:00:00", 0},
		{"h since 2000-01-01", Standard, Hours, "2000-01-01T00:00:00", 0},
		{"d since 2000-01-01", Standard, Days, "2000-01-01T00:00:00", 0},
		{"sec since 2000-01-01", Standard, Seconds, "2000-01-01T00:00:00", 0},
		{"min since 2000-01-01", Standard, Minutes, "2000-01-01T00:00:00", 0},
		{"second since 2000-01-01 00:00:00.123456789", Standard, Seconds, "2000-01-01T00:00:00.123456789", 0},
		{"days since 2001-02-30", Day360, Days, "2001-02-30T00:00:00", 0},
		{"days since 1582-10-04 23:00", Standard, Days, "1582-10-04T23:00:00", 0},
		{"days since 1582-10-15 02:00 +03:00", Standard, Days, "1582-10-04T23:00:00", 180},
	}
	for _, c := range cases {
		u, err := ParseUnits(c.units, c.cal, Options{})
		if err != nil {
			t.Errorf("ParseUnits(%q, %v): %v", c.units, c.cal, err)
			continue
		}
		if u.Unit() != c.unit || u.Reference().String() != c.refUTC || u.UTCOffset() != c.offsetM ||
			u.Calendar() != c.cal || u.Text() != c.units {
			t.Errorf("ParseUnits(%q) = %v since %v, offset %d; want %v since %s, offset %d",
				c.units, u.Unit(), u.Reference(), u.UTCOffset(), c.unit, c.refUTC, c.offsetM)
		}
		if v, err := u.Encode(u.Reference()); err != nil || v != 0 {
			t.Errorf("%q: Encode(reference) = %v, %v; want 0", c.units, v, err)
		}
	}
}

// Non-CF and malformed units: each error says what was found, and the
// non-CF ones say the study can declare the time axis.
func TestParseUnitsErrors(t *testing.T) {
	cases := []struct {
		units string
		cal   Calendar
		opt   Options
		want  error
		text  []string
	}{
		{"", Standard, Options{}, ErrNotCF, []string{"empty", "study"}},
		{"Month", Standard, Options{}, ErrNotCF, []string{`"Month" name a unit but no reference date`, "declare the time axis in the study"}},
		{"months", Standard, Options{}, ErrNotCF, []string{`"months"`, "no reference date"}},
		{"days", Standard, Options{}, ErrNotCF, []string{"no reference date"}},
		{"YYYYMMDD", Standard, Options{}, ErrNotCF, []string{`"YYYYMMDD"`, "dates written as numbers", "study"}},
		{"yyyymmdd", Standard, Options{}, ErrNotCF, []string{"dates written as numbers"}},
		{"day as %Y%m%d.%f", Standard, Options{}, ErrNotCF, []string{"YYYYMMDD.fraction", "CF does not define", "opt in", "study"}},
		{"month as %Y%m.%f", Standard, Options{AbsoluteDays: true}, ErrNotCF, []string{`"month as %Y%m.%f"`, `only "day as %Y%m%d.%f"`}},
		{"months since 1850-01-01", Standard, Options{}, ErrUnits, []string{"advises against", "about 30.44 days", "study"}},
		{"years since 0001-01-01", NoLeap, Options{}, ErrUnits, []string{"count years", "advises against"}},
		{"hours after 1900-01-01", Standard, Options{}, ErrNotCF, []string{`use "after" where CF requires "since"`}},
		{"days from 1900-01-01", Standard, Options{}, ErrNotCF, []string{`"from"`}},
		{"weeks since 2000-01-01", Standard, Options{}, ErrUnits, []string{`"weeks" is not a time unit`}},
		{"days since", Standard, Options{}, ErrUnits, []string{"nothing after"}},
		{"days since yesterday", Standard, Options{}, ErrUnits, []string{`"yesterday" is not of the form YYYY-MM-DD`}},
		{"days since 1900-01-01 06", Standard, Options{}, ErrUnits, []string{"not of the form"}},
		{"days since 1900-01-01-6", Standard, Options{}, ErrUnits, []string{"not of the form"}},
		{"days since 1900/01/01", Standard, Options{}, ErrUnits, []string{"not of the form"}},
		{"3 days since 1900-01-01", Standard, Options{}, ErrUnits, []string{"exactly one unit word"}},
		{"K", Standard, Options{}, ErrNotCF, []string{`"K" is not a CF time units string`}},
		{"days since 1582-10-10", Standard, Options{}, ErrDate, []string{"1582-10-10 does not exist in the standard calendar", "1582-10-15"}},
		{"days since 2001-02-30", Standard, Options{}, ErrDate, []string{"2001-02 has 28 days", "day 30"}},
		{"days since 2000-02-29", NoLeap, Options{}, ErrDate, []string{"2000-02 has 28 days in the noleap calendar"}},
		{"days since 1900-02-29", ProlepticGregorian, Options{}, ErrDate, []string{"1900-02 has 28 days"}},
		{"days since 2001-02-31", Day360, Options{}, ErrDate, []string{"has 30 days in the 360_day calendar"}},
		{"days since 2001-13-01", Standard, Options{}, ErrDate, []string{"month 13"}},
		{"days since 1900-01-01 25:00", Standard, Options{}, ErrDate, []string{"hour 25"}},
		{"days since 1900-01-01 00:00:60", Standard, Options{}, ErrDate, []string{"no leap seconds"}},
		{"days since 1900-01-01 00:00:00 +25:00", Standard, Options{}, ErrUnits, []string{"UTC offset"}},
		{"days since 0000-01-01", Standard, Options{}, ErrDate, []string{"year 0 does not exist in the standard calendar", "climatology"}},
		{"days since -0001-01-01", Julian, Options{}, ErrDate, []string{"year -1 does not exist in the julian calendar"}},
		{"days since 0001-01-01 00:00 +01:00", Standard, Options{}, ErrRange, []string{"reference in UTC", "0000-12-31T23:00:00"}},
		{"months since 1850-01-31", Standard, Options{CalendarMonths: true}, ErrUnits, []string{"reference day", "(1–28), not 31"}},
		{"months since 1850-01-30", AllLeap, Options{CalendarMonths: true}, ErrUnits, []string{"(1–29), not 30"}},
		{"days since 9999999-01-01", ProlepticGregorian, Options{}, ErrUnits, []string{"not of the form"}},
	}
	for _, c := range cases {
		_, err := ParseUnits(c.units, c.cal, c.opt)
		if !errors.Is(err, c.want) {
			t.Errorf("ParseUnits(%q, %v) error = %v; want %v", c.units, c.cal, err, c.want)
			continue
		}
		for _, s := range c.text {
			if !strings.Contains(err.Error(), s) {
				t.Errorf("ParseUnits(%q) error %q lacks %q", c.units, err, s)
			}
		}
		if c.units != "" && !strings.Contains(err.Error(), c.units) && !strings.Contains(err.Error(), strings.Fields(c.units)[len(strings.Fields(c.units))-1]) {
			t.Errorf("ParseUnits(%q) error %q does not quote what it found", c.units, err)
		}
	}
	if _, err := ParseUnits("days since 2000-01-01", Calendar(0), Options{}); !errors.Is(err, ErrCalendar) {
		t.Errorf("zero calendar: err = %v, want ErrCalendar", err)
	}
	if _, err := Parse("days since 2000-01-01", "none", Options{}); !errors.Is(err, ErrCalendar) {
		t.Errorf(`calendar "none": err = %v, want ErrCalendar`, err)
	}
}

func TestUnitsString(t *testing.T) {
	u, err := Parse("Days since 1900-1-1 0:0:0 +01:00", "365_day", Options{})
	if err != nil {
		t.Fatal(err)
	}
	if got, want := u.String(), "days since 1899-12-31T23:00:00 (noleap)"; got != want {
		t.Errorf("String() = %q, want %q", got, want)
	}
	a, err := Parse("day as %Y%m%d.%f", "", Options{AbsoluteDays: true})
	if err != nil {
		t.Fatal(err)
	}
	if got, want := a.String(), "day as %Y%m%d.%f (standard)"; got != want {
		t.Errorf("String() = %q, want %q", got, want)
	}
	if !a.Reference().Equal(Date{}) {
		t.Errorf("absolute form Reference() = %v, want the zero Date", a.Reference())
	}
}
