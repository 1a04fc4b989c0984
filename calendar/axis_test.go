package calendar

import (
	"strings"
	"testing"
)

func decodeAll(t *testing.T, units, cal string, values ...float64) []Date {
	t.Helper()
	d, err := DecodeAxis(values, units, cal, Options{})
	if err != nil {
		t.Fatal(err)
	}
	return d
}

func TestCheckSteps(t *testing.T) {
	d := decodeAll(t, "days since 2000-01-01", "standard", 0, 1, 1, 3, 2, 4)
	p := CheckSteps(d)
	if len(p) != 2 || p[0].Index != 2 || p[0].Kind != Duplicate || p[1].Index != 4 || p[1].Kind != Backward {
		t.Fatalf("CheckSteps = %v", p)
	}
	if got, want := p[0].String(), "time[2] 2000-01-02T00:00:00 duplicates time[1]"; got != want {
		t.Errorf("String() = %q, want %q", got, want)
	}
	if got, want := p[1].String(), "time[4] 2000-01-03T00:00:00 is before time[3] 2000-01-04T00:00:00"; got != want {
		t.Errorf("String() = %q, want %q", got, want)
	}
	if p := CheckSteps(decodeAll(t, "days since 2000-01-01", "", 0, 0.5, 7)); len(p) != 0 {
		t.Errorf("increasing axis: %v", p)
	}
}

func TestClassifyAxis(t *testing.T) {
	// Mid-month stamps of a noleap year, as CMIP-style monthly means write them.
	noleapMid := []float64{15.5, 45, 74.5, 105, 135.5, 166, 196.5, 227.5, 258, 288.5, 319, 349.5}
	daily := make([]float64, 400)
	for i := range daily {
		daily[i] = float64(i) + 0.5
	}
	cases := []struct {
		name   string
		dates  []Date
		want   AxisKind
		reason string
	}{
		{"daily", decodeAll(t, "days since 1999-12-01", "standard", daily...), AxisDaily, "one day"},
		{"daily hours", decodeAll(t, "hours since 2000-01-01", "360_day", 0, 24, 48, 72), AxisDaily, ""},
		{"climatology", decodeAll(t, "days since 2000-01-01", "noleap", noleapMid...), AxisMonthlyClimatology, "January to December 2000"},
		{"13 months", decodeAll(t, "days since 2000-01-01", "noleap", append(noleapMid, 380.5)...), AxisMonthly, ""},
		{"month starts", decodeAll(t, "days since 2000-01-01", "standard", 31, 60, 91, 121, 152), AxisMonthly, ""},
		{"month ends", decodeAll(t, "days since 2000-01-01", "standard", 30, 59, 90, 120, 151), AxisMonthly, ""},
		{"360_day mid-month", decodeAll(t, "days since 1850-01-01", "360_day", 15, 45, 75, 105), AxisMonthly, ""},
		{"from February", decodeAll(t, "days since 2000-01-01", "noleap", append(noleapMid[1:], 380.5)...), AxisMonthly, ""},
		{"gap", decodeAll(t, "days since 2000-01-01", "noleap", 15.5, 45, 105, 135.5), AxisOther, "time[2] 2000-04-16T00:00:00 is not in the month after time[1]"},
		{"start then end", decodeAll(t, "days since 2000-01-01", "standard", 0, 59), AxisOther, "59 days, not 27–32"},
		{"duplicate", decodeAll(t, "days since 2000-01-01", "standard", 0, 1, 1), AxisOther, "duplicates"},
		{"6-hourly", decodeAll(t, "hours since 2000-01-01", "standard", 0, 6, 12), AxisOther, "0.25 days, not 1"},
		{"single", decodeAll(t, "days since 2000-01-01", "standard", 0), AxisOther, "1 time step"},
		{"mixed", []Date{{2000, 1, 1, 0, 0, 0, 0, Standard}, {2000, 1, 2, 0, 0, 0, 0, NoLeap}}, AxisOther, "mixes"},
		{"invalid", []Date{{2000, 1, 1, 0, 0, 0, 0, Standard}, {2000, 1, 2, 0, 0, 0, 0, 0}}, AxisOther, "time[1] is not a valid date"},
	}
	for _, c := range cases {
		got, reason := ClassifyAxis(c.dates)
		if got != c.want || !strings.Contains(reason, c.reason) {
			t.Errorf("%s: ClassifyAxis = %v (%s); want %v (%s)", c.name, got, reason, c.want, c.reason)
		}
	}
	if !AxisMonthlyClimatology.Monthly() || !AxisMonthly.Monthly() || AxisDaily.Monthly() {
		t.Error("AxisKind.Monthly is wrong")
	}
}

func TestYearMonth(t *testing.T) {
	for _, c := range []struct {
		ym    YearMonth
		index int
		text  string
	}{
		{YearMonth{2000, 1}, 24000, "2000-01"},
		{YearMonth{0, 12}, 11, "0000-12"},
		{YearMonth{-1, 12}, -1, "-0001-12"},
		{YearMonth{-1, 1}, -12, "-0001-01"},
	} {
		if c.ym.Index() != c.index || YearMonthOf(c.index) != c.ym || c.ym.String() != c.text {
			t.Errorf("%v: Index %d, YearMonthOf %v, String %q", c.ym, c.ym.Index(), YearMonthOf(c.index), c.ym.String())
		}
	}
	if got := (YearMonth{1999, 11}).AddMonths(3); got != (YearMonth{2000, 2}) {
		t.Errorf("AddMonths = %v", got)
	}
	d := Date{2000, 3, 1, 0, 0, 0, 0, Standard}
	if d.MonthIndex() != 24002 || d.YearMonth() != (YearMonth{2000, 3}) || d.DaysInMonth() != 31 || d.DayOfYear() != 61 {
		t.Errorf("%v: MonthIndex %d, DaysInMonth %d, DayOfYear %d", d, d.MonthIndex(), d.DaysInMonth(), d.DayOfYear())
	}
	if n := (Date{2000, 12, 30, 0, 0, 0, 0, Day360}).DayOfYear(); n != 360 {
		t.Errorf("360_day 2000-12-30: day of year %d, want 360", n)
	}
}

func TestDateMethods(t *testing.T) {
	d, err := NewDate(NoLeap, 1979, 1, 15, 12, 30, 5.25)
	if err != nil {
		t.Fatal(err)
	}
	if d.String() != "1979-01-15T12:30:05.25" || d.Seconds() != 5.25 || d.Nanosecond != 250000000 {
		t.Errorf("NewDate = %v (%v s)", d, d.Seconds())
	}
	for _, c := range []struct {
		d    Date
		want string
	}{
		{Date{-44, 3, 15, 0, 0, 0, 0, ProlepticGregorian}, "-0044-03-15T00:00:00"},
		{Date{12345, 6, 7, 8, 9, 10, 1, NoLeap}, "12345-06-07T08:09:10.000000001"},
		{Date{5, 1, 1, 0, 0, 0, 0, Julian}, "0005-01-01T00:00:00"},
	} {
		if got := c.d.String(); got != c.want {
			t.Errorf("String() = %q, want %q", got, c.want)
		}
	}
	for _, bad := range []struct {
		y, m, d, h, mi int
		s              float64
	}{{2001, 2, 29, 0, 0, 0}, {2000, 1, 1, 24, 0, 0}, {2000, 1, 1, 0, 60, 0}, {2000, 1, 1, 0, 0, 60}, {2000, 1, 1, 0, 0, -1}, {2000, 1, 1, 0, 0, 59.9999999999}} {
		if _, err := NewDate(Standard, bad.y, bad.m, bad.d, bad.h, bad.mi, bad.s); err == nil {
			t.Errorf("NewDate(%v) succeeded", bad)
		}
	}
	a := Date{2000, 1, 1, 0, 0, 0, 0, Standard}
	b := Date{2000, 1, 1, 0, 0, 0, 1, Standard}
	if !a.Before(b) || !b.After(a) || a.Compare(a) != 0 || a.Equal(b) || !a.Equal(a) {
		t.Error("comparison is wrong")
	}
	if a.Equal(Date{2000, 1, 1, 0, 0, 0, 0, ProlepticGregorian}) {
		t.Error("Equal ignores the calendar")
	}
}
