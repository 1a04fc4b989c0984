package calendar

import (
	"errors"
	"math"
	"testing"
)

// unitSpan returns the shortest and longest length of one unit in seconds.
func unitSpan(u Units) (lo, hi float64) {
	switch u.Unit() {
	case Months:
		return 28 * secondsPerDay, 31 * secondsPerDay
	case Years:
		return 360 * secondsPerDay, 366 * secondsPerDay
	case AbsoluteDay:
		return secondsPerDay, secondsPerDay
	}
	s := float64(u.Unit().seconds())
	return s, s
}

func secondsBetween(a, b Date) float64 {
	sec, ns := a.instant().sub(b.instant())
	return float64(sec) + float64(ns)/nanosPerSec
}

func knownError(err error) bool {
	for _, e := range []error{ErrUnits, ErrNotCF, ErrCalendar, ErrDate, ErrRange} {
		if errors.Is(err, e) {
			return true
		}
	}
	return false
}

// FuzzParseUnits: parsing never panics and fails only with this package's
// errors; a successful parse decodes 0 to the reference, and every value
// that decodes encodes back to itself within float64 and nanosecond rounding.
func FuzzParseUnits(f *testing.F) {
	for _, s := range []string{
		"days since 1850-01-01", "seconds since 1970-01-01T00:00:00Z", "hours since 1900-1-1 0:0:0.0 -6:00",
		"days since 1582-10-04", "months since 2000-01-15", "years since 0001-01-01", "day as %Y%m%d.%f",
		"minutes since -4713-11-24 12:00", "d since 10000-01-01 UTC", "Month", "days since 1900-01-01T00:00:00+0530",
		"months since 1850-01-01 00:00 +14:00", "s since 0000-01-01", "",
	} {
		f.Add(s, uint8(0), 1.5)
		f.Add(s, uint8(13), -1e6)
		f.Add(s, uint8(29), 19790115.25)
	}
	f.Fuzz(func(t *testing.T, units string, c uint8, v float64) {
		cal := allCalendars[int(c)%len(allCalendars)]
		opt := Options{CalendarMonths: c&8 != 0, AbsoluteDays: c&16 != 0}
		u, err := ParseUnits(units, cal, opt)
		if err != nil {
			if !knownError(err) {
				t.Fatalf("ParseUnits(%q): error wraps no sentinel: %v", units, err)
			}
			return
		}
		if u.Unit() != AbsoluteDay {
			ref := u.Reference()
			if err := ref.Validate(); err != nil {
				t.Fatalf("%q: invalid reference %v: %v", units, ref, err)
			}
			if d, err := u.Decode(0); err != nil || !d.Equal(ref) {
				t.Fatalf("%q: Decode(0) = %v, %v; want %v", units, d, err, ref)
			}
			if e, err := u.Encode(ref); err != nil || e != 0 {
				t.Fatalf("%q: Encode(reference) = %v, %v", units, e, err)
			}
		}
		lo, hi := unitSpan(u)
		for _, x := range []float64{v, 1, -1, 0.5, 1e6 + 0.25, 19790115.5} {
			d, err := u.Decode(x)
			if err != nil {
				if !errors.Is(err, ErrRange) && !errors.Is(err, ErrDate) {
					t.Fatalf("%q: Decode(%v): %v", units, x, err)
				}
				continue
			}
			if err := d.Validate(); err != nil {
				t.Fatalf("%q: Decode(%v) = invalid %v: %v", units, x, d, err)
			}
			e, err := u.Encode(d)
			if err != nil {
				t.Fatalf("%q: Encode(%v): %v", units, d, err)
			}
			round := 0.5e-9 // nanosecond rounding
			if u.Unit() == AbsoluteDay {
				round = 0.5e-3 // millisecond rounding
			}
			tol := 8*math.Abs(x)*0x1p-52 + 2*round/lo
			if math.Abs(e-x) > tol {
				t.Fatalf("%q: Encode(Decode(%v)) = %v (diff %g > %g)", units, x, e, e-x, tol)
			}
			d2, err := u.Decode(e)
			if err != nil {
				t.Fatalf("%q: Decode(Encode(%v)) = %v: %v", units, d, e, err)
			}
			if gap := math.Abs(secondsBetween(d2, d)); gap > tol*hi+2e-9 {
				t.Fatalf("%q: Decode(Encode(%v)) = %v, %g s away", units, d, d2, gap)
			}
		}
	})
}

// FuzzParseCalendar: never panics; accepted names round-trip through String.
func FuzzParseCalendar(f *testing.F) {
	for _, s := range append(CalendarNames(), "", "none", "NoLeap", " 360_DAY ") {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, name string) {
		c, err := ParseCalendar(name)
		if err != nil {
			if !errors.Is(err, ErrCalendar) {
				t.Fatalf("ParseCalendar(%q): %v", name, err)
			}
			return
		}
		if back, err := ParseCalendar(c.String()); err != nil || back != c {
			t.Fatalf("%q -> %v does not round-trip", name, c)
		}
	})
}
