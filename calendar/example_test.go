package calendar_test

import (
	"errors"
	"fmt"

	"lidscope/calendar"
)

// Decoding a model time axis: days since 1850 in a 365-day calendar. The
// values are synthetic.
func ExampleDecodeAxis() {
	dates, err := calendar.DecodeAxis([]float64{15.5, 45, 74.5}, "days since 1850-01-01 00:00:00", "noleap", calendar.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, d := range dates {
		fmt.Println(d, d.YearMonth())
	}
	// Output:
	// 1850-01-16T12:00:00 1850-01
	// 1850-02-15T00:00:00 1850-02
	// 1850-03-16T12:00:00 1850-03
}

func ExampleParseUnits() {
	u, err := calendar.ParseUnits("hours since 1900-01-01 00:00:0.0 +05:00", calendar.Standard, calendar.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(u.Unit(), u.Reference(), u.UTCOffset())
	// Output: hours 1899-12-31T19:00:00 300
}

func ExampleParseUnits_notCF() {
	_, err := calendar.ParseUnits("Month", calendar.Standard, calendar.Options{})
	fmt.Println(errors.Is(err, calendar.ErrNotCF))
	fmt.Println(err)
	// Output:
	// true
	// time units not in CF form: time units "Month" name a unit but no reference date (no "since <date>"), so the values cannot be placed in time; CF-1.10 §4.4 time units are "<unit> since <date>", e.g. "days since 1850-01-01"; fix the attribute or declare the time axis in the study
}

func ExampleParse() {
	u, err := calendar.Parse("days since 1582-10-04", "gregorian", calendar.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	d, _ := u.Decode(1)
	fmt.Println(d, u.Calendar())
	// Output: 1582-10-15T00:00:00 standard
}

func ExampleParseCalendar() {
	for _, name := range []string{"", "365_day", "Gregorian", "none"} {
		c, err := calendar.ParseCalendar(name)
		fmt.Printf("%q: %v %v\n", name, c, err != nil)
	}
	// Output:
	// "": standard false
	// "365_day": noleap false
	// "Gregorian": standard false
	// "none": Calendar(0) true
}

// Integral values decode exactly, however large.
func ExampleUnits_Decode() {
	u, _ := calendar.Parse("hours since 1800-01-01", "standard", calendar.Options{})
	d, _ := u.Decode(1e6)
	fmt.Println(d)
	// Output: 1914-01-30T16:00:00
}

func ExampleUnits_Encode() {
	u, _ := calendar.Parse("days since 2000-01-01", "360_day", calendar.Options{})
	d, _ := calendar.NewDate(calendar.Day360, 2000, 2, 30, 12, 0, 0)
	v, _ := u.Encode(d)
	fmt.Println(v)
	// Output: 59.5
}

// "months since" needs the opt-in, and then counts calendar months.
func ExampleOptions() {
	_, err := calendar.Parse("months since 1979-01-01", "standard", calendar.Options{})
	fmt.Println(errors.Is(err, calendar.ErrUnits))
	u, _ := calendar.Parse("months since 1979-01-01", "standard", calendar.Options{CalendarMonths: true})
	for _, v := range []float64{0.5, 1.5, 12} {
		d, _ := u.Decode(v)
		fmt.Println(d)
	}
	a, _ := calendar.Parse("day as %Y%m%d.%f", "standard", calendar.Options{AbsoluteDays: true})
	d, _ := a.Decode(19790115.25)
	fmt.Println(d)
	// Output:
	// true
	// 1979-01-16T12:00:00
	// 1979-02-15T00:00:00
	// 1980-01-01T00:00:00
	// 1979-01-15T06:00:00
}

func ExampleDecodeBounds() {
	cells, _ := calendar.DecodeBounds([]float64{0, 31, 31, 59}, "days since 2001-01-01", "noleap", calendar.Options{})
	for _, c := range cells {
		fmt.Println(c)
	}
	// Output:
	// 2001-01-01T00:00:00/2001-02-01T00:00:00
	// 2001-02-01T00:00:00/2001-03-01T00:00:00
}

func ExampleClassifyAxis() {
	mid := []float64{15.5, 45, 74.5, 105, 135.5, 166, 196.5, 227.5, 258, 288.5, 319, 349.5}
	dates, _ := calendar.DecodeAxis(mid, "days since 0001-01-01", "noleap", calendar.Options{})
	fmt.Println(calendar.ClassifyAxis(dates))
	fmt.Println(calendar.ClassifyAxis(dates[:5]))
	fmt.Println(calendar.ClassifyAxis([]calendar.Date{dates[0], dates[2]}))
	// Output:
	// 12-month climatology twelve months, January to December 0001
	// monthly one calendar month per step
	// other not daily (time[1]-time[0] is 59 days, not 1) and not monthly (time[1] 0001-03-16T12:00:00 is not in the month after time[0] 0001-01-16T12:00:00)
}

func ExampleCheckSteps() {
	dates, _ := calendar.DecodeAxis([]float64{0, 1, 1, 0.5}, "days since 2000-01-01", "", calendar.Options{})
	for _, p := range calendar.CheckSteps(dates) {
		fmt.Println(p)
	}
	// Output:
	// time[2] 2000-01-02T00:00:00 duplicates time[1]
	// time[3] 2000-01-01T12:00:00 is before time[2] 2000-01-02T00:00:00
}

func ExampleDate_JulianDay() {
	d, _ := calendar.NewDate(calendar.Standard, 2000, 1, 1, 12, 0, 0)
	jd, _ := d.JulianDay()
	fmt.Println(jd)
	// Output: 2.451545e+06
}

func ExampleDate_String() {
	d, _ := calendar.NewDate(calendar.ProlepticGregorian, -44, 3, 15, 6, 30, 1.5)
	fmt.Println(d, d.DayOfYear(), d.DaysInMonth())
	// Output: -0044-03-15T06:30:01.5 75 31
}

func ExampleYearMonth() {
	ym := calendar.YearMonth{Year: 1999, Month: 11}
	fmt.Println(ym, ym.AddMonths(3), ym.Index())
	// Output: 1999-11 2000-02 23998
}

// A 12-month climatology is labelled by calendar month.
func ExampleMonthAbbrev() {
	fmt.Println(calendar.MonthAbbrev(1), calendar.MonthAbbrev(7), calendar.MonthAbbrev(12), calendar.MonthAbbrev(13) == "")
	// Output: Jan Jul Dec true
}
