// Package calendar decodes CF time coordinates: it parses the units string
// "<unit> since <reference date-time>" (CF-1.10 §4.4, UDUNITS-2 time units),
// knows the CF calendars of CF-1.10 §4.4.1, and turns the numbers stored in a
// time variable into calendar dates, and back.
//
// # Calendars
//
// Standard (alias gregorian) is the mixed Julian/Gregorian calendar: Julian
// up to 1582-10-04, Gregorian from the next day, 1582-10-15. ProlepticGregorian
// applies the Gregorian leap rule to every year, Julian the Julian rule (every
// fourth year). NoLeap (365_day), AllLeap (366_day) and Day360 (twelve months
// of 30 days) are the model calendars. Names are matched case-insensitively,
// and a missing calendar attribute means standard, as CF-1.10 §4.4.1 says.
// Calendar "none" is refused: it has no dates.
//
// Year numbering follows CF-1.10 §4.4.1: in standard and julian, years start
// at 1 (no year zero and no negative years; CF-1.10 allows year 0 there only in
// a deprecated climatology use, which this package refuses); in the other
// calendars every integer is a year, year 0 included (astronomical numbering,
// as ISO 8601 does for the proleptic Gregorian calendar). Years are limited to
// MinYear..MaxYear.
//
// # Exactness
//
// Dates are held as an integer day number plus integer nanoseconds. A stored
// value is split into its integral and fractional parts; the integral part is
// converted with integer arithmetic, so integral values decode exactly however
// large they are (1e6 hours, 1e9 seconds), and only the fractional part goes
// through floating point, rounded to the nearest nanosecond.
//
// # Month and year units
//
// CF-1.10 §4.4 advises against "months since" and "years since", because
// UDUNITS defines a month as a twelfth of a mean tropical year, not a calendar
// month. They are refused unless Options.CalendarMonths is set. Then "N months
// since R" is read as calendar months counted from R: an integral N is the
// date R moved N calendar months on, keeping R's day of month and time of day;
// a fraction of a month is that fraction of the interval to the next such
// date (so 0.5 months since 2000-01-01 is 2000-01-16T12:00:00). "years since"
// counts steps of twelve calendar months. This is the only reading under which
// monthly data stamped this way lands in the month it belongs to. The day of
// the reference must exist in every month of the calendar (at most 28, or 29
// in all_leap, or 30 in 360_day); otherwise parsing fails. In 360_day the
// reading agrees with 30-day months.
//
// # Absolute day form (extension)
//
// Some tools write a time axis as the date itself, units "day as %Y%m%d.%f",
// values such as 19790115.5 (1979-01-15T12:00:00). This is not CF. It is
// refused unless Options.AbsoluteDays is set; then the integral part is read
// as YYYYMMDD and the fraction as the fraction of that day. A float64 near 2e7
// resolves about 0.3 ms, so the time of day of this form is rounded to the
// nearest millisecond.
//
// # Time zones
//
// A reference date-time may carry a UTC offset ("+05:00", "-6", "+0530",
// "Z", "UTC", "GMT"). Decoded dates are in UTC: "days since 1900-01-01
// 00:00:00 +05:00" has its origin at 1899-12-31T19:00:00 UTC.
//
// Errors wrap the sentinel errors ErrUnits, ErrNotCF, ErrCalendar, ErrDate and
// ErrRange, so callers can tell them apart with errors.Is and add the file and
// variable names.
package calendar
