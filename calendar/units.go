package calendar

import (
	"fmt"
	"regexp"
	"strconv"
	"strings"
)

// Unit is the step of a time axis.
type Unit uint8

// The time units. Months and Years are calendar steps and need
// Options.CalendarMonths; AbsoluteDay is the "day as %Y%m%d.%f" extension and
// needs Options.AbsoluteDays.
const (
	Seconds Unit = iota + 1
	Minutes
	Hours
	Days
	Months
	Years
	AbsoluteDay
)

// String names the unit as a CF units string would.
func (u Unit) String() string {
	switch u {
	case Seconds:
		return "seconds"
	case Minutes:
		return "minutes"
	case Hours:
		return "hours"
	case Days:
		return "days"
	case Months:
		return "months"
	case Years:
		return "years"
	case AbsoluteDay:
		return "day as %Y%m%d.%f"
	}
	return fmt.Sprintf("Unit(%d)", uint8(u))
}

// seconds returns the length of a fixed unit in seconds, 0 for calendar units.
func (u Unit) seconds() int64 {
	switch u {
	case Seconds:
		return 1
	case Minutes:
		return 60
	case Hours:
		return 3600
	case Days:
		return secondsPerDay
	}
	return 0
}

// monthStep returns the calendar months per step of Months and Years, else 0.
func (u Unit) monthStep() int {
	switch u {
	case Months:
		return 1
	case Years:
		return 12
	}
	return 0
}

// Options opts in to time axes that CF advises against or does not define.
type Options struct {
	// CalendarMonths accepts "months since" and "years since" and reads them
	// as calendar months (years: twelve calendar months) counted from the
	// reference date, as the package documentation describes. Without it
	// these units are an error, because CF-1.10 §4.4 advises against them.
	CalendarMonths bool
	// AbsoluteDays accepts the non-CF form "day as %Y%m%d.%f", whose values
	// are the dates themselves (19790115.5 is 1979-01-15T12:00:00).
	AbsoluteDays bool
}

// Units is a parsed CF time units string together with its calendar.
type Units struct {
	unit     Unit
	cal      Calendar
	written  Date    // the reference date-time as written (local time at the offset)
	offset   int     // UTC offset written with the reference, minutes east of UTC
	origin   instant // the reference in UTC
	original string
}

// Unit returns the step unit.
func (u Units) Unit() Unit { return u.unit }

// Calendar returns the calendar the units were parsed for.
func (u Units) Calendar() Calendar { return u.cal }

// Reference returns the reference date-time in UTC (the zero Date for the
// AbsoluteDay form, which has none, and for the zero Units).
func (u Units) Reference() Date {
	if u.unit == AbsoluteDay || !u.cal.known() {
		return Date{}
	}
	d, _ := u.origin.date(u.cal) // validated when parsed
	return d
}

// UTCOffset returns the UTC offset written with the reference, in minutes
// east of UTC (0 when none was written).
func (u Units) UTCOffset() int { return u.offset }

// Text returns the units string as it was given to ParseUnits.
func (u Units) Text() string { return u.original }

// String returns the units in a normalised form, with the reference in UTC,
// e.g. "days since 1850-01-01T00:00:00 (noleap)".
func (u Units) String() string {
	if u.unit == AbsoluteDay {
		return fmt.Sprintf("%v (%v)", u.unit, u.cal)
	}
	return fmt.Sprintf("%v since %v (%v)", u.unit, u.Reference(), u.cal)
}

// Parse parses a time units attribute together with a calendar attribute
// (empty means standard); see ParseUnits and ParseCalendar.
func Parse(units, calendar string, opt Options) (Units, error) {
	cal, err := ParseCalendar(calendar)
	if err != nil {
		return Units{}, err
	}
	return ParseUnits(units, cal, opt)
}

// howToFix ends the error messages about units that are not CF.
const howToFix = `; CF-1.10 §4.4 time units are "<unit> since <date>", e.g. "days since 1850-01-01"; ` +
	`fix the attribute or declare the time axis in the study`

var unitWords = map[string]Unit{
	"s": Seconds, "sec": Seconds, "secs": Seconds, "second": Seconds, "seconds": Seconds,
	"min": Minutes, "mins": Minutes, "minute": Minutes, "minutes": Minutes,
	"h": Hours, "hr": Hours, "hrs": Hours, "hour": Hours, "hours": Hours,
	"d": Days, "day": Days, "days": Days,
	"month": Months, "months": Months,
	"yr": Years, "yrs": Years, "year": Years, "years": Years,
}

// dateFormatWords are what files write when they mean "the value is the date".
var dateFormatWords = map[string]bool{
	"yyyymmdd": true, "yyyymmddhh": true, "yyyymm": true, "yyyy-mm-dd": true,
	"date": true, "%y%m%d": true, "%y%m%d.%f": true,
}

// ParseUnits parses a CF time units string "<unit> since <reference>"
// (CF-1.10 §4.4) for calendar cal.
//
// Units are seconds (s, sec, second), minutes (min, minute), hours (h, hr,
// hour) and days (d, day), in singular or plural, any case; months and years
// only with opt.CalendarMonths. The reference is YYYY-MM-DD (one-digit month
// and day allowed, a sign and up to six year digits), optionally followed by
// a blank or "T" and hh:mm, hh:mm:ss or hh:mm:ss.fff, and optionally by a UTC
// offset: Z, UTC, GMT, ±h, ±hh, ±hhmm or ±hh:mm. The reference must exist in
// the calendar. With opt.AbsoluteDays the form "day as %Y%m%d.%f" is also
// accepted. Errors wrap ErrUnits, ErrNotCF, ErrDate or ErrRange and quote
// what was found; callers add the file and variable names.
func ParseUnits(units string, cal Calendar, opt Options) (Units, error) {
	if !cal.known() {
		return Units{}, fmt.Errorf("%w: %v is not a calendar; use ParseCalendar", ErrCalendar, cal)
	}
	fields := strings.Fields(units)
	if len(fields) == 0 {
		return Units{}, fmt.Errorf("%w: the time units are empty%s", ErrNotCF, howToFix)
	}
	since := -1
	for i, f := range fields {
		if strings.EqualFold(f, "since") {
			since = i
			break
		}
	}
	if since < 0 {
		return parseNoSince(units, fields, cal, opt)
	}
	if since != 1 {
		return Units{}, fmt.Errorf("%w: time units %q need exactly one unit word before \"since\"%s", ErrUnits, units, howToFix)
	}
	unit, ok := unitWords[strings.ToLower(fields[0])]
	if !ok {
		return Units{}, fmt.Errorf("%w: time units %q: %q is not a time unit lidscope reads (seconds, minutes, hours, days; months and years on request)%s",
			ErrUnits, units, fields[0], howToFix)
	}
	if unit.monthStep() != 0 && !opt.CalendarMonths {
		return Units{}, fmt.Errorf("%w: time units %q count %s, which CF-1.10 §4.4 advises against (UDUNITS takes a month as 1/12 of a tropical year, about 30.44 days, not a calendar month); "+
			"opt in to reading them as calendar %s counted from the reference, or declare the time axis in the study", ErrUnits, units, unit, unit)
	}
	if len(fields) == 2 {
		return Units{}, fmt.Errorf("%w: time units %q have nothing after \"since\"%s", ErrUnits, units, howToFix)
	}
	ref := strings.Join(fields[2:], " ")
	written, offset, err := parseReference(ref, cal)
	if err != nil {
		return Units{}, fmt.Errorf("time units %q: %w", units, err)
	}
	if step := unit.monthStep(); step != 0 {
		if maxDay := minMonthLength(cal); written.Day > maxDay {
			return Units{}, fmt.Errorf("%w: time units %q: counting calendar %s needs a reference day that every month of the %s calendar has (1–%d), not %d",
				ErrUnits, units, unit, cal, maxDay, written.Day)
		}
	}
	u := Units{unit: unit, cal: cal, written: written, offset: offset, original: units}
	u.origin = written.instant().add(-int64(offset)*60, 0)
	if _, err := u.origin.date(cal); err != nil {
		return Units{}, fmt.Errorf("time units %q: the reference in UTC: %w", units, err)
	}
	return u, nil
}

func minMonthLength(cal Calendar) int {
	switch cal {
	case Day360:
		return 30
	case AllLeap:
		return 29
	}
	return 28
}

// parseNoSince handles units without "since": the absolute day form, and
// errors that say what the string looks like.
func parseNoSince(units string, fields []string, cal Calendar, opt Options) (Units, error) {
	lower := strings.ToLower(strings.Join(fields, " "))
	if lower == "day as %y%m%d.%f" {
		if !opt.AbsoluteDays {
			return Units{}, fmt.Errorf("%w: time units %q store each date as a number YYYYMMDD.fraction, which CF does not define; "+
				"opt in to that form, or declare the time axis in the study", ErrNotCF, units)
		}
		return Units{unit: AbsoluteDay, cal: cal, original: units}, nil
	}
	if len(fields) >= 3 && strings.EqualFold(fields[1], "as") {
		return Units{}, fmt.Errorf("%w: time units %q store dates as numbers in a form CF does not define (only \"day as %%Y%%m%%d.%%f\" can be read, on request)%s",
			ErrNotCF, units, howToFix)
	}
	if len(fields) >= 3 {
		if _, ok := unitWords[strings.ToLower(fields[0])]; ok {
			switch w := strings.ToLower(fields[1]); w {
			case "after", "from", "ref", "@", "since:":
				return Units{}, fmt.Errorf("%w: time units %q use %q where CF requires \"since\"%s", ErrNotCF, units, fields[1], howToFix)
			}
		}
	}
	if len(fields) == 1 {
		w := strings.ToLower(fields[0])
		if _, ok := unitWords[w]; ok {
			return Units{}, fmt.Errorf("%w: time units %q name a unit but no reference date (no \"since <date>\"), so the values cannot be placed in time%s",
				ErrNotCF, units, howToFix)
		}
		if dateFormatWords[w] {
			return Units{}, fmt.Errorf("%w: time units %q say the values are dates written as numbers, which CF does not define%s", ErrNotCF, units, howToFix)
		}
	}
	return Units{}, fmt.Errorf("%w: %q is not a CF time units string (no \"since\")%s", ErrNotCF, units, howToFix)
}

// refPattern matches the reference date-time; the parts are checked in
// parseReference.
var refPattern = regexp.MustCompile(`^([+-]?\d{1,6})-(\d{1,2})-(\d{1,2})` +
	`(?:(?:[Tt]|\s+)(\d{1,2}):(\d{1,2})(?::(\d{1,2})(\.\d*)?)?)?` +
	`(?:\s*([Zz]|(?i:utc|gmt))|(\s*)([+-])(\d{1,2})(?::?(\d{2}))?)?$`)

const refForm = "YYYY-MM-DD[ hh:mm[:ss[.fff]]][ ±hh:mm]"

// parseReference parses the reference date-time and returns it as written,
// with the UTC offset in minutes east of UTC.
func parseReference(ref string, cal Calendar) (Date, int, error) {
	m := refPattern.FindStringSubmatch(ref)
	if m == nil {
		return Date{}, 0, fmt.Errorf("%w: the reference date-time %q is not of the form %s", ErrUnits, ref, refForm)
	}
	hasTime := m[4] != ""
	if m[10] != "" && !hasTime && m[9] == "" {
		return Date{}, 0, fmt.Errorf("%w: the reference date-time %q is not of the form %s", ErrUnits, ref, refForm)
	}
	num := func(s string) int {
		if s == "" {
			return 0
		}
		v, _ := strconv.Atoi(s) // the pattern allows at most six digits and a sign
		return v
	}
	d := Date{Year: num(m[1]), Month: num(m[2]), Day: num(m[3]),
		Hour: num(m[4]), Minute: num(m[5]), Second: num(m[6]), Calendar: cal}
	if len(m[7]) > 1 {
		f, _ := strconv.ParseFloat("0"+m[7], 64)
		d.Nanosecond = int(f*nanosPerSec + 0.5)
		if d.Nanosecond >= nanosPerSec {
			d.Nanosecond = nanosPerSec - 1
		}
	}
	if err := d.Validate(); err != nil {
		return Date{}, 0, fmt.Errorf("the reference date-time %q: %w", ref, err)
	}
	offset := 0
	if m[10] != "" {
		h, mm := num(m[11]), num(m[12])
		if h > 23 || mm > 59 {
			return Date{}, 0, fmt.Errorf("%w: the UTC offset in %q is not ±hh:mm with hh ≤ 23 and mm ≤ 59", ErrUnits, ref)
		}
		offset = h*60 + mm
		if m[10] == "-" {
			offset = -offset
		}
	}
	return d, offset, nil
}
