package calendar

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

const (
	secondsPerDay = 86400
	nanosPerSec   = 1_000_000_000
)

// Date is a date and time of day in a CF calendar. The seconds with their
// fractional part are Second + Nanosecond/1e9 (see Seconds). Decoded dates are
// in UTC. The zero Date is not valid (it has no calendar).
type Date struct {
	Year, Month, Day     int // Month 1–12, Day 1–31
	Hour, Minute, Second int // 0–23, 0–59, 0–59 (CF calendars have no leap seconds)
	Nanosecond           int // 0–999999999
	Calendar             Calendar
}

// NewDate builds a Date, splitting second (0 ≤ second < 60, fractional part
// allowed) into Second and Nanosecond, and checks that the date exists in cal.
func NewDate(cal Calendar, year, month, day, hour, minute int, second float64) (Date, error) {
	if math.IsNaN(second) || second < 0 || second >= 60 {
		return Date{}, fmt.Errorf("%w: second %v is not in [0, 60)", ErrDate, second)
	}
	whole := math.Floor(second)
	ns := int(math.Round((second - whole) * nanosPerSec))
	s := int(whole)
	if ns == nanosPerSec {
		s, ns = s+1, 0
	}
	if s >= 60 {
		return Date{}, fmt.Errorf("%w: second %v rounds to 60 at nanosecond precision", ErrDate, second)
	}
	d := Date{year, month, day, hour, minute, s, ns, cal}
	if err := d.Validate(); err != nil {
		return Date{}, err
	}
	return d, nil
}

// Validate returns nil when the date exists in its calendar and its time of
// day is in range, and otherwise an error wrapping ErrDate (or ErrCalendar,
// ErrRange) that says which field is wrong.
func (d Date) Validate() error {
	if err := d.Calendar.CheckDay(d.Year, d.Month, d.Day); err != nil {
		return err
	}
	switch {
	case d.Hour < 0 || d.Hour > 23:
		return fmt.Errorf("%w: hour %d is not 0–23", ErrDate, d.Hour)
	case d.Minute < 0 || d.Minute > 59:
		return fmt.Errorf("%w: minute %d is not 0–59", ErrDate, d.Minute)
	case d.Second < 0 || d.Second > 59:
		return fmt.Errorf("%w: second %d is not 0–59 (CF calendars have no leap seconds)", ErrDate, d.Second)
	case d.Nanosecond < 0 || d.Nanosecond >= nanosPerSec:
		return fmt.Errorf("%w: nanosecond %d is not 0–999999999", ErrDate, d.Nanosecond)
	}
	return nil
}

// Seconds returns the seconds of the minute with their fractional part.
func (d Date) Seconds() float64 {
	return float64(d.Second) + float64(d.Nanosecond)/nanosPerSec
}

// String formats the date in ISO 8601 form, YYYY-MM-DDThh:mm:ss, followed by
// the fraction of the second when it is not zero (trailing zeros dropped).
// Negative years carry a minus sign and years past 9999 have more digits.
func (d Date) String() string {
	var b strings.Builder
	b.Grow(32)
	b.WriteString(formatYear(d.Year))
	fmt.Fprintf(&b, "-%02d-%02dT%02d:%02d:%02d", d.Month, d.Day, d.Hour, d.Minute, d.Second)
	if d.Nanosecond != 0 {
		frac := strconv.Itoa(nanosPerSec + d.Nanosecond)[1:]
		b.WriteByte('.')
		b.WriteString(strings.TrimRight(frac, "0"))
	}
	return b.String()
}

func formatYear(y int) string {
	if y < 0 {
		return fmt.Sprintf("-%04d", -y)
	}
	return fmt.Sprintf("%04d", y)
}

// Compare returns -1, 0 or +1 as d is before, equal to or after e. Dates are
// compared field by field, which is their order within any one calendar.
func (d Date) Compare(e Date) int {
	a := [...]int{d.Year, d.Month, d.Day, d.Hour, d.Minute, d.Second, d.Nanosecond}
	b := [...]int{e.Year, e.Month, e.Day, e.Hour, e.Minute, e.Second, e.Nanosecond}
	for i := range a {
		switch {
		case a[i] < b[i]:
			return -1
		case a[i] > b[i]:
			return 1
		}
	}
	return 0
}

// Before reports whether d is before e.
func (d Date) Before(e Date) bool { return d.Compare(e) < 0 }

// After reports whether d is after e.
func (d Date) After(e Date) bool { return d.Compare(e) > 0 }

// Equal reports whether d and e are the same instant in the same calendar.
func (d Date) Equal(e Date) bool { return d.Calendar == e.Calendar && d.Compare(e) == 0 }

// DayOfYear returns the day of the year of a valid date, 1 for 1 January,
// counting only days that exist (so the standard calendar's 1582-10-15 is day
// 278; cftime 1.6 counts it as 288). It returns 0 for a Date without a calendar.
func (d Date) DayOfYear() int {
	if !d.Calendar.known() {
		return 0
	}
	return int(d.Calendar.dayNumber(d.Year, d.Month, d.Day)-d.Calendar.dayNumber(d.Year, 1, 1)) + 1
}

// DaysInMonth returns the number of days of the date's month.
func (d Date) DaysInMonth() int { return d.Calendar.DaysInMonth(d.Year, d.Month) }

// YearMonth returns the date's calendar month, the key for matching monthly
// fields.
func (d Date) YearMonth() YearMonth { return YearMonth{d.Year, d.Month} }

// MonthIndex returns Year*12 + Month - 1, a month count in which consecutive
// calendar months differ by one.
func (d Date) MonthIndex() int { return d.YearMonth().Index() }

// JulianDay returns the Julian Date of the instant (days since the Julian
// -4712-01-01T12:00:00, Meeus 1998, Astronomical Algorithms, ch. 7), for the
// Standard, ProlepticGregorian and Julian calendars. Model calendars have no
// Julian Date: the error wraps ErrCalendar. Its resolution is about 40 µs.
func (d Date) JulianDay() (float64, error) {
	switch d.Calendar {
	case Standard, ProlepticGregorian, Julian:
	default:
		return 0, fmt.Errorf("%w: the %v calendar is not a real-world calendar and has no Julian Date", ErrCalendar, d.Calendar)
	}
	if err := d.Validate(); err != nil {
		return 0, err
	}
	n := d.Calendar.dayNumber(d.Year, d.Month, d.Day)
	return float64(n) - 0.5 + float64(d.nanoOfDay())/(secondsPerDay*nanosPerSec), nil
}

func (d Date) secondOfDay() int64 { return int64(d.Hour)*3600 + int64(d.Minute)*60 + int64(d.Second) }

func (d Date) nanoOfDay() int64 { return d.secondOfDay()*nanosPerSec + int64(d.Nanosecond) }

// instant is a date as whole seconds since day number 0 of its calendar plus
// nanoseconds 0–999999999. It is exact for every valid Date.
type instant struct {
	sec int64
	ns  int64
}

func (d Date) instant() instant {
	return instant{d.Calendar.dayNumber(d.Year, d.Month, d.Day)*secondsPerDay + d.secondOfDay(), int64(d.Nanosecond)}
}

// add returns t moved by sec seconds and ns nanoseconds (any signs).
func (t instant) add(sec, ns int64) instant {
	ns += t.ns
	sec += t.sec + floorDiv64(ns, nanosPerSec)
	ns -= floorDiv64(ns, nanosPerSec) * nanosPerSec
	return instant{sec, ns}
}

// sub returns t - u in seconds and nanoseconds, 0 ≤ ns < 1e9.
func (t instant) sub(u instant) (sec, ns int64) {
	r := instant{t.sec - u.sec, 0}.add(0, t.ns-u.ns)
	return r.sec, r.ns
}

func (t instant) less(u instant) bool { return t.sec < u.sec || (t.sec == u.sec && t.ns < u.ns) }

// date turns an instant back into a Date of cal, checking the year range.
func (t instant) date(cal Calendar) (Date, error) {
	day := floorDiv64(t.sec, secondsPerDay)
	sod := t.sec - day*secondsPerDay
	y, m, dd := cal.fromDayNumber(day)
	d := Date{y, m, dd, int(sod / 3600), int(sod / 60 % 60), int(sod % 60), int(t.ns), cal}
	if y < MinYear || y > MaxYear || (!cal.HasYearZero() && y < 1) {
		first := "years " + strconv.Itoa(MinYear) + ".." + strconv.Itoa(MaxYear)
		if !cal.HasYearZero() {
			first = "dates from 0001-01-01"
		}
		return Date{}, fmt.Errorf("%w: the time is %s, but the %s calendar here has only %s", ErrRange, d, cal, first)
	}
	return d, nil
}

// YearMonth names a calendar month; it is comparable and can key a map.
type YearMonth struct {
	Year, Month int
}

// YearMonthOf returns the YearMonth whose Index is i.
func YearMonthOf(i int) YearMonth { return YearMonth{floorDiv(i, 12), floorMod(i, 12) + 1} }

// Index returns Year*12 + Month - 1; consecutive months differ by one.
func (ym YearMonth) Index() int { return ym.Year*12 + ym.Month - 1 }

// AddMonths returns the month n months later (earlier for negative n).
func (ym YearMonth) AddMonths(n int) YearMonth { return YearMonthOf(ym.Index() + n) }

// String formats the month as YYYY-MM.
func (ym YearMonth) String() string { return fmt.Sprintf("%s-%02d", formatYear(ym.Year), ym.Month) }
