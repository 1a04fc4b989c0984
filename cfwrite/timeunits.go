package cfwrite

import (
	"fmt"
	"strconv"
	"strings"
)

// calendars are the CF-1.10 §4.4.1 calendar names the writer accepts
// ("none" is not accepted: every lidscope time axis has a calendar).
var calendars = []string{
	"standard", "gregorian", "proleptic_gregorian", "julian",
	"noleap", "365_day", "all_leap", "366_day", "360_day",
}

// timeUnits is a parsed CF time unit "<unit> since <reference>".
type timeUnits struct {
	Unit             string // seconds, minutes, hours or days (canonical plural)
	Year, Month, Day int
	Hour, Minute     int
	Second           float64
	HasClock         bool   // a time of day was given
	Zone             string // "" (UTC implied), "Z", "UTC" or an offset such as "+05:30"
	ZoneMinutes      int    // the zone's offset east of UTC, in minutes
}

var timeUnitWords = map[string]string{
	"seconds": "seconds", "second": "seconds", "secs": "seconds", "sec": "seconds", "s": "seconds",
	"minutes": "minutes", "minute": "minutes", "mins": "minutes", "min": "minutes",
	"hours": "hours", "hour": "hours", "hrs": "hours", "hr": "hours", "h": "hours",
	"days": "days", "day": "days", "d": "days",
}

// parseTimeUnits checks a CF time units string (CF-1.10 §4.4, UDUNITS-2
// syntax) against a calendar: the unit must be seconds, minutes, hours or
// days (or their UDUNITS abbreviations); months and years are refused because
// CF-1.10 §4.4 warns that they are not calendar months or years; the
// reference date must exist in the calendar (no 30 February outside
// 360_day, no 29 February in noleap, none of 1582-10-05..14 in standard).
func parseTimeUnits(units, calendar string) (timeUnits, error) {
	var tu timeUnits
	cal, err := checkCalendar(calendar)
	if err != nil {
		return tu, err
	}
	s := strings.TrimSpace(units)
	unit, rest, ok := strings.Cut(s, " since ")
	if !ok {
		return tu, fmt.Errorf("time units %q are not of the form \"<unit> since <date>\" (CF-1.10 §4.4), e.g. \"days since 1979-01-01\"", units)
	}
	unit = strings.TrimSpace(unit)
	canon, ok := timeUnitWords[unit]
	if !ok {
		switch strings.ToLower(unit) {
		case "months", "month", "years", "year", "common_years", "common_year", "yr", "a":
			return tu, fmt.Errorf("time units %q: %q is not a calendar interval in UDUNITS (CF-1.10 §4.4 advises against it); use days, hours, minutes or seconds", units, unit)
		}
		return tu, fmt.Errorf("time units %q: unit %q is not one of days, hours, minutes, seconds (lower case, as UDUNITS-2 spells them)", units, unit)
	}
	tu.Unit = canon
	rest = strings.TrimSpace(rest)
	if err := parseReference(rest, &tu); err != nil {
		return tu, fmt.Errorf("time units %q: reference %q: %w", units, rest, err)
	}
	if err := checkDate(tu.Year, tu.Month, tu.Day, cal); err != nil {
		return tu, fmt.Errorf("time units %q: reference %q: %w", units, rest, err)
	}
	return tu, nil
}

// String formats the units in a canonical form that parseTimeUnits accepts.
func (tu timeUnits) String() string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s since ", tu.Unit)
	if tu.Year < 0 {
		fmt.Fprintf(&b, "-%04d", -tu.Year)
	} else {
		fmt.Fprintf(&b, "%04d", tu.Year)
	}
	fmt.Fprintf(&b, "-%02d-%02d", tu.Month, tu.Day)
	if tu.HasClock || tu.Zone != "" {
		fmt.Fprintf(&b, " %02d:%02d:", tu.Hour, tu.Minute)
		sec := strconv.FormatFloat(tu.Second, 'f', -1, 64)
		if tu.Second < 10 {
			sec = "0" + sec
		}
		b.WriteString(sec)
	}
	switch tu.Zone {
	case "":
	case "Z":
		b.WriteString("Z")
	default:
		b.WriteString(" " + tu.Zone)
	}
	return b.String()
}

func checkCalendar(c string) (string, error) {
	lc := strings.ToLower(strings.TrimSpace(c))
	for _, k := range calendars {
		if lc == k {
			return lc, nil
		}
	}
	if lc == "" {
		return "", fmt.Errorf("no calendar given; name one of %s (CF-1.10 §4.4.1)", strings.Join(calendars, ", "))
	}
	return "", fmt.Errorf("calendar %q is not one of %s (CF-1.10 §4.4.1)", c, strings.Join(calendars, ", "))
}

// parseReference reads "Y-M-D[( |T)h:m[:s[.f]]][ zone]".
func parseReference(s string, tu *timeUnits) error {
	if s == "" {
		return fmt.Errorf("the reference date is missing")
	}
	date, clock := s, ""
	if i := strings.IndexAny(s, " T"); i >= 0 {
		date, clock = s[:i], strings.TrimLeft(s[i+1:], " ")
		if clock == "" {
			return fmt.Errorf("nothing follows the date separator")
		}
	}
	neg := strings.HasPrefix(date, "-")
	if neg {
		date = date[1:]
	}
	parts := strings.Split(date, "-")
	if len(parts) != 3 {
		return fmt.Errorf("the date is not year-month-day")
	}
	y, err := digits(parts[0], 1, 5, "year")
	if err != nil {
		return err
	}
	if neg {
		y = -y
	}
	m, err := digits(parts[1], 1, 2, "month")
	if err != nil {
		return err
	}
	d, err := digits(parts[2], 1, 2, "day")
	if err != nil {
		return err
	}
	tu.Year, tu.Month, tu.Day = y, m, d
	if m < 1 || m > 12 {
		return fmt.Errorf("month %d is not 1–12", m)
	}
	if clock == "" {
		return nil
	}
	if c := clock[0]; c == '+' || c == '-' || c == 'Z' || c == 'U' {
		// "1979-01-01 +05:00" or "1979-01-01 UTC": a zone without a clock.
		return parseZone(clock, tu)
	}
	// A zone may follow the clock, after a blank or directly (Z, +hh:mm).
	zone := ""
	if i := strings.IndexByte(clock, ' '); i >= 0 {
		clock, zone = clock[:i], strings.TrimSpace(clock[i+1:])
		if zone == "" {
			return fmt.Errorf("trailing blank after the time of day")
		}
	} else if i := strings.IndexAny(clock, "Z+-"); i >= 0 {
		clock, zone = clock[:i], clock[i:]
	}
	hms := strings.Split(clock, ":")
	if len(hms) < 2 || len(hms) > 3 {
		return fmt.Errorf("the time of day %q is not hh:mm or hh:mm:ss", clock)
	}
	h, err := digits(hms[0], 1, 2, "hour")
	if err != nil {
		return err
	}
	mi, err := digits(hms[1], 1, 2, "minute")
	if err != nil {
		return err
	}
	sec := 0.0
	if len(hms) == 3 {
		whole, frac, hasFrac := strings.Cut(hms[2], ".")
		if _, err := digits(whole, 1, 2, "second"); err != nil {
			return err
		}
		if hasFrac && frac != "" {
			if _, err := digits(frac, 1, 9, "fraction of a second"); err != nil {
				return err
			}
		}
		sec, err = strconv.ParseFloat(hms[2], 64)
		if err != nil {
			return fmt.Errorf("second %q: %w", hms[2], err)
		}
	}
	if h > 23 || mi > 59 || sec >= 60 {
		return fmt.Errorf("the time of day %q is out of range", clock)
	}
	tu.Hour, tu.Minute, tu.Second, tu.HasClock = h, mi, sec, true
	if zone != "" {
		return parseZone(zone, tu)
	}
	return nil
}

func parseZone(z string, tu *timeUnits) error {
	switch z {
	case "Z", "UTC":
		tu.Zone = z
		return nil
	}
	if z[0] != '+' && z[0] != '-' {
		return fmt.Errorf("time zone %q is not Z, UTC or a ±hh[:mm] offset", z)
	}
	sign := 1
	if z[0] == '-' {
		sign = -1
	}
	hh, mm, hasMin := strings.Cut(z[1:], ":")
	if !hasMin && len(hh) == 4 {
		hh, mm, hasMin = hh[:2], hh[2:], true
	}
	h, err := digits(hh, 1, 2, "zone hour")
	if err != nil {
		return err
	}
	m := 0
	if hasMin {
		if m, err = digits(mm, 2, 2, "zone minute"); err != nil {
			return err
		}
	}
	if h > 14 || m > 59 {
		return fmt.Errorf("time zone %q is out of range", z)
	}
	tu.Zone = fmt.Sprintf("%c%02d:%02d", z[0], h, m)
	tu.ZoneMinutes = sign * (h*60 + m)
	return nil
}

// digits parses a run of minN..maxN ASCII digits.
func digits(s string, minN, maxN int, what string) (int, error) {
	if len(s) < minN || len(s) > maxN {
		return 0, fmt.Errorf("%s %q must have %d to %d digits", what, s, minN, maxN)
	}
	n := 0
	for i := 0; i < len(s); i++ {
		if s[i] < '0' || s[i] > '9' {
			return 0, fmt.Errorf("%s %q is not a number", what, s)
		}
		n = n*10 + int(s[i]-'0')
	}
	return n, nil
}

// checkDate checks that a day exists in the calendar (CF-1.10 §4.4.1).
func checkDate(y, m, d int, cal string) error {
	if d < 1 {
		return fmt.Errorf("day %d is not a day of the month", d)
	}
	n := daysInMonth(y, m, cal)
	if d > n {
		return fmt.Errorf("%04d-%02d-%02d does not exist in the %s calendar (month %d has %d days)", y, m, d, cal, m, n)
	}
	if (cal == "standard" || cal == "gregorian") && y == 1582 && m == 10 && d > 4 && d < 15 {
		return fmt.Errorf("1582-10-%02d does not exist in the %s calendar (1582-10-04 is followed by 1582-10-15)", d, cal)
	}
	return nil
}

func daysInMonth(y, m int, cal string) int {
	if cal == "360_day" {
		return 30
	}
	lengths := [...]int{31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31}
	if m != 2 {
		return lengths[m-1]
	}
	julianLeap := y%4 == 0
	gregorianLeap := y%4 == 0 && (y%100 != 0 || y%400 == 0)
	leap := false
	switch cal {
	case "all_leap", "366_day":
		leap = true
	case "noleap", "365_day":
		leap = false
	case "julian":
		leap = julianLeap
	case "proleptic_gregorian":
		leap = gregorianLeap
	default: // standard, gregorian: Julian before the 1582 reform
		if y < 1582 {
			leap = julianLeap
		} else {
			leap = gregorianLeap
		}
	}
	if leap {
		return 29
	}
	return 28
}
