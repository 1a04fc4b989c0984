package cfwrite

import (
	"fmt"
	"slices"
	"strings"

	"lidscope/calendar"
)

// calendarIntervals are unit words that UDUNITS-2 reads as fixed lengths
// (a month is 1/12 of a tropical year) although they look like calendar
// intervals; CF-1.10 §4.4 advises against them, and the writer refuses them.
var calendarIntervals = []string{"months", "month", "years", "year", "common_years", "common_year", "yr", "yrs", "a"}

// maxZoneEast and maxZoneWest bound the UTC offset of a reference date, in
// minutes: the offsets of real time zones lie within UTC-12:00..UTC+14:00
// (common practice).
const maxZoneEast, maxZoneWest = 14 * 60, 12 * 60

// parseTimeUnits checks a time axis's units and calendar before the writer
// declares them. Package calendar parses them, the same parser lidscope
// reads time axes with, so that the writer only writes what it reads back:
// "<unit> since <reference>" (CF-1.10 §4.4) with a reference date that
// exists in the calendar. The writer adds rules of its own for what it
// writes: the calendar is named (CF-1.10 §4.4.1; readers default to
// standard, a written file says which), "since" and the unit are written in
// lower case as UDUNITS-2 spells them, the unit is days, hours, minutes or
// seconds (not months or years, which CF-1.10 §4.4 warns are not calendar
// intervals), and a UTC offset is that of a real time zone.
func parseTimeUnits(units, cal string) (calendar.Units, error) {
	c := strings.ToLower(strings.TrimSpace(cal))
	names := calendar.CalendarNames()
	switch {
	case c == "":
		return calendar.Units{}, fmt.Errorf("no calendar given; name one of %s (CF-1.10 §4.4.1)", strings.Join(names, ", "))
	case !slices.Contains(names, c):
		return calendar.Units{}, fmt.Errorf("calendar %q is not one of %s (CF-1.10 §4.4.1)", cal, strings.Join(names, ", "))
	}
	fields := strings.Fields(units)
	if len(fields) < 3 || fields[1] != "since" {
		return calendar.Units{}, fmt.Errorf("time units %q are not of the form \"<unit> since <date>\" (CF-1.10 §4.4), e.g. \"days since 1979-01-01\"", units)
	}
	switch unit := fields[0]; {
	case slices.Contains(calendarIntervals, strings.ToLower(unit)):
		return calendar.Units{}, fmt.Errorf("time units %q: %q is not a calendar interval in UDUNITS (CF-1.10 §4.4 advises against it); use days, hours, minutes or seconds", units, unit)
	case unit != strings.ToLower(unit):
		return calendar.Units{}, fmt.Errorf("time units %q: unit %q is not one of days, hours, minutes, seconds (lower case, as UDUNITS-2 spells them)", units, unit)
	}
	u, err := calendar.Parse(units, c, calendar.Options{})
	if err != nil {
		return calendar.Units{}, err
	}
	if off := u.UTCOffset(); off > maxZoneEast || off < -maxZoneWest {
		return calendar.Units{}, fmt.Errorf("time units %q: the UTC offset %+d min is out of range for a time zone (UTC-12:00 to UTC+14:00)", units, off)
	}
	return u, nil
}
