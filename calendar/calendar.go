package calendar

import (
	"fmt"
	"strings"
)

// Calendar is one of the CF calendars (CF-1.10 §4.4.1). The zero value is not
// a calendar; use ParseCalendar or one of the constants.
type Calendar uint8

// The CF calendars lidscope decodes.
const (
	// Standard is the mixed Julian/Gregorian calendar (CF names "standard" and
	// "gregorian"): Julian up to 1582-10-04, Gregorian from 1582-10-15.
	Standard Calendar = iota + 1
	// ProlepticGregorian is the Gregorian calendar extended to all years.
	ProlepticGregorian
	// Julian has a leap year every fourth year.
	Julian
	// NoLeap has 365 days in every year (CF names "noleap" and "365_day").
	NoLeap
	// AllLeap has 366 days in every year (CF names "all_leap" and "366_day").
	AllLeap
	// Day360 has twelve months of 30 days (CF name "360_day").
	Day360
)

// Year limits of this package, in the calendar's own year numbering.
const (
	MinYear = -999999
	MaxYear = 999999
)

// Julian Day Number of 1582-10-15, the first Gregorian day of Standard;
// the day before it is the Julian 1582-10-04.
const reformJDN = 2299161

var calendarNames = map[string]Calendar{
	"standard":            Standard,
	"gregorian":           Standard,
	"proleptic_gregorian": ProlepticGregorian,
	"julian":              Julian,
	"noleap":              NoLeap,
	"365_day":             NoLeap,
	"all_leap":            AllLeap,
	"366_day":             AllLeap,
	"360_day":             Day360,
}

// CalendarNames lists the calendar attribute values ParseCalendar accepts,
// in the order CF-1.10 §4.4.1 lists them.
func CalendarNames() []string {
	return []string{"standard", "gregorian", "proleptic_gregorian", "julian",
		"noleap", "365_day", "all_leap", "366_day", "360_day"}
}

// ParseCalendar reads a CF calendar attribute value. Case and surrounding
// blanks are ignored, and an empty value (no calendar attribute) means
// Standard, the CF default (CF-1.10 §4.4.1). "none" and unknown names are
// errors wrapping ErrCalendar.
func ParseCalendar(name string) (Calendar, error) {
	key := strings.ToLower(strings.TrimSpace(name))
	if key == "" {
		return Standard, nil
	}
	if c, ok := calendarNames[key]; ok {
		return c, nil
	}
	if key == "none" {
		return 0, fmt.Errorf("%w: calendar %q has no dates (CF-1.10 §4.4.1), so the time steps cannot be matched to months; "+
			"give the file a real calendar or declare the time axis in the study", ErrCalendar, name)
	}
	return 0, fmt.Errorf("%w: unknown calendar %q; CF-1.10 §4.4.1 names %s", ErrCalendar, name,
		strings.Join(CalendarNames(), ", "))
}

// String returns the canonical CF name of the calendar.
func (c Calendar) String() string {
	switch c {
	case Standard:
		return "standard"
	case ProlepticGregorian:
		return "proleptic_gregorian"
	case Julian:
		return "julian"
	case NoLeap:
		return "noleap"
	case AllLeap:
		return "all_leap"
	case Day360:
		return "360_day"
	}
	return fmt.Sprintf("Calendar(%d)", uint8(c))
}

func (c Calendar) known() bool { return c >= Standard && c <= Day360 }

// HasYearZero reports whether year 0 (and negative years) exist in the
// calendar: false for Standard and Julian, true for the others (CF-1.10 §4.4.1).
func (c Calendar) HasYearZero() bool { return c != Standard && c != Julian }

// IsLeapYear reports whether year has a 29 February (for Day360: never, as
// its February has 30 days and its years 360). Standard uses the Julian rule
// before 1582 and the Gregorian rule from 1582 on.
func (c Calendar) IsLeapYear(year int) bool {
	switch c {
	case Standard:
		if year < 1582 {
			return floorMod(year, 4) == 0
		}
		return gregorianLeap(year)
	case ProlepticGregorian:
		return gregorianLeap(year)
	case Julian:
		return floorMod(year, 4) == 0
	case AllLeap:
		return true
	}
	return false
}

func gregorianLeap(y int) bool {
	return floorMod(y, 4) == 0 && (floorMod(y, 100) != 0 || floorMod(y, 400) == 0)
}

var monthDays = [13]int{0, 31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31}

// monthLength is the nominal length of a month, ignoring the 1582 gap.
func (c Calendar) monthLength(year, month int) int {
	if c == Day360 {
		return 30
	}
	if month == 2 && c.IsLeapYear(year) {
		return 29
	}
	return monthDays[month]
}

// DaysInMonth returns the number of days that exist in the month (1–12) of
// year, or 0 for a month outside 1–12. In Standard, October 1582 has 21 days,
// because 1582-10-05 to 1582-10-14 do not exist.
func (c Calendar) DaysInMonth(year, month int) int {
	if month < 1 || month > 12 || !c.known() {
		return 0
	}
	n := c.monthLength(year, month)
	if c == Standard && year == 1582 && month == 10 {
		n -= 10
	}
	return n
}

// DaysInYear returns the number of days that exist in year: 360, 365 or 366,
// and 355 for 1582 in Standard.
func (c Calendar) DaysInYear(year int) int {
	n := 0
	for m := 1; m <= 12; m++ {
		n += c.DaysInMonth(year, m)
	}
	return n
}

// CheckDay returns nil when year-month-day exists in the calendar, and
// otherwise an error that says why, wrapping ErrDate (ErrRange for a year
// outside MinYear..MaxYear, ErrCalendar for a Calendar that is not one).
func (c Calendar) CheckDay(year, month, day int) error {
	if !c.known() {
		return fmt.Errorf("%w: %v is not a calendar; use ParseCalendar", ErrCalendar, c)
	}
	if year < MinYear || year > MaxYear {
		return fmt.Errorf("%w: year %d is outside %d..%d", ErrRange, year, MinYear, MaxYear)
	}
	if !c.HasYearZero() && year < 1 {
		return fmt.Errorf("%w: year %d does not exist in the %s calendar, whose years start at 1 (CF-1.10 §4.4.1 allows year 0 there only in a deprecated climatology use); "+
			"use proleptic_gregorian or a model calendar for such dates, or declare the time axis in the study", ErrDate, year, c)
	}
	if month < 1 || month > 12 {
		return fmt.Errorf("%w: month %d is not 1–12", ErrDate, month)
	}
	if n := c.monthLength(year, month); day < 1 || day > n {
		return fmt.Errorf("%w: %s-%02d has %d days in the %s calendar, so day %d does not exist",
			ErrDate, formatYear(year), month, n, c, day)
	}
	if c == Standard && year == 1582 && month == 10 && day > 4 && day < 15 {
		return fmt.Errorf("%w: 1582-10-%02d does not exist in the standard calendar: the Julian 1582-10-04 is followed by the Gregorian 1582-10-15; "+
			"use proleptic_gregorian or julian if the file means one of them", ErrDate, day)
	}
	return nil
}

// dayNumber counts days in the calendar: the Julian Day Number for Standard,
// ProlepticGregorian and Julian, and a count from 0000-01-01 for the model
// calendars. The date must be valid.
func (c Calendar) dayNumber(y, m, d int) int64 {
	switch c {
	case Standard:
		if y > 1582 || (y == 1582 && (m > 10 || (m == 10 && d >= 15))) {
			return gregorianJDN(y, m, d)
		}
		return julianJDN(y, m, d)
	case ProlepticGregorian:
		return gregorianJDN(y, m, d)
	case Julian:
		return julianJDN(y, m, d)
	case NoLeap:
		return int64(y)*365 + int64(cumDays[0][m-1]+d-1)
	case AllLeap:
		return int64(y)*366 + int64(cumDays[1][m-1]+d-1)
	case Day360:
		return int64(y)*360 + int64((m-1)*30+d-1)
	}
	return 0 // not a calendar; callers check first
}

// fromDayNumber inverts dayNumber.
func (c Calendar) fromDayNumber(n int64) (y, m, d int) {
	switch c {
	case Standard:
		if n >= reformJDN {
			return gregorianFromJDN(n)
		}
		return julianFromJDN(n)
	case ProlepticGregorian:
		return gregorianFromJDN(n)
	case Julian:
		return julianFromJDN(n)
	case NoLeap:
		return fixedYearFromDays(n, 365, &cumDays[0])
	case AllLeap:
		return fixedYearFromDays(n, 366, &cumDays[1])
	case Day360:
		yy := floorDiv64(n, 360)
		doy := int(n - yy*360)
		return int(yy), doy/30 + 1, doy%30 + 1
	}
	return 0, 0, 0 // not a calendar; callers check first
}

// cumDays[leap][m] is the number of days before month m+1.
var cumDays = [2][13]int{
	{0, 31, 59, 90, 120, 151, 181, 212, 243, 273, 304, 334, 365},
	{0, 31, 60, 91, 121, 152, 182, 213, 244, 274, 305, 335, 366},
}

func fixedYearFromDays(n int64, yearLen int64, cum *[13]int) (y, m, d int) {
	yy := floorDiv64(n, yearLen)
	doy := int(n - yy*yearLen)
	m = 1
	for doy >= cum[m] {
		m++
	}
	return int(yy), m, doy - cum[m-1] + 1
}

// The day-count algorithms count from 1 March so that the leap day ends the
// year; they are exact integer arithmetic for any year (astronomical year
// numbering). The Gregorian constants give JDN 2451545 for 2000-01-01 and the
// Julian ones JDN 0 for the Julian -4712-01-01 (Meeus 1998, Astronomical
// Algorithms, ch. 7).

func marchMonth(m int) int64 { return int64((m + 9) % 12) } // March = 0 … February = 11

func gregorianJDN(y, m, d int) int64 {
	yy := int64(y)
	if m <= 2 {
		yy--
	}
	era := floorDiv64(yy, 400)
	yoe := yy - era*400
	doy := (153*marchMonth(m)+2)/5 + int64(d) - 1
	doe := yoe*365 + yoe/4 - yoe/100 + doy
	return era*146097 + doe + 1721120 // JDN of the Gregorian 0000-03-01
}

func gregorianFromJDN(n int64) (y, m, d int) {
	z := n - 1721120
	era := floorDiv64(z, 146097)
	doe := z - era*146097
	yoe := (doe - doe/1460 + doe/36524 - doe/146096) / 365
	doy := doe - (365*yoe + yoe/4 - yoe/100)
	return civilFromMarch(era*400+yoe, doy)
}

func julianJDN(y, m, d int) int64 {
	yy := int64(y)
	if m <= 2 {
		yy--
	}
	era := floorDiv64(yy, 4)
	yoe := yy - era*4
	doy := (153*marchMonth(m)+2)/5 + int64(d) - 1
	return era*1461 + yoe*365 + doy + 1721118 // JDN of the Julian 0000-03-01
}

func julianFromJDN(n int64) (y, m, d int) {
	z := n - 1721118
	era := floorDiv64(z, 1461)
	doe := z - era*1461
	yoe := (doe - doe/1460) / 365
	doy := doe - 365*yoe
	return civilFromMarch(era*4+yoe, doy)
}

// civilFromMarch turns a March-based year and day of that year into a date.
func civilFromMarch(marchYear, doy int64) (y, m, d int) {
	mp := (5*doy + 2) / 153
	d = int(doy - (153*mp+2)/5 + 1)
	if mp < 10 {
		m = int(mp + 3)
	} else {
		m = int(mp - 9)
	}
	y = int(marchYear)
	if m <= 2 {
		y++
	}
	return y, m, d
}

func floorDiv64(a, b int64) int64 {
	q := a / b
	if (a%b != 0) && ((a < 0) != (b < 0)) {
		q--
	}
	return q
}

func floorMod(a, b int) int {
	r := a % b
	if r != 0 && (r < 0) != (b < 0) {
		r += b
	}
	return r
}

func floorDiv(a, b int) int {
	return int(floorDiv64(int64(a), int64(b)))
}
