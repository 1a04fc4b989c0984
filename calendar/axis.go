package calendar

import "fmt"

// StepKind says what is wrong with a step of a time axis.
type StepKind uint8

// The problems CheckSteps reports.
const (
	// Duplicate: a time equal to the one before it.
	Duplicate StepKind = iota + 1
	// Backward: a time before the one before it.
	Backward
)

// String names the kind.
func (k StepKind) String() string {
	switch k {
	case Duplicate:
		return "duplicate"
	case Backward:
		return "backward"
	}
	return fmt.Sprintf("StepKind(%d)", uint8(k))
}

// StepProblem is a step of a time axis that does not go forward.
type StepProblem struct {
	Index    int // index of the later time of the step
	Kind     StepKind
	Previous Date // the time at Index-1
	Current  Date // the time at Index
}

// String describes the problem, e.g.
// "time[3] 2000-01-01T00:00:00 duplicates time[2]".
func (p StepProblem) String() string {
	if p.Kind == Duplicate {
		return fmt.Sprintf("time[%d] %v duplicates time[%d]", p.Index, p.Current, p.Index-1)
	}
	return fmt.Sprintf("time[%d] %v is before time[%d] %v", p.Index, p.Current, p.Index-1, p.Previous)
}

// CheckSteps reports every step of dates that does not go strictly forward,
// in order. An empty result means the axis increases strictly. Whether a
// decreasing axis is acceptable is the caller's decision.
func CheckSteps(dates []Date) []StepProblem {
	var out []StepProblem
	for i := 1; i < len(dates); i++ {
		switch c := dates[i].Compare(dates[i-1]); {
		case c == 0:
			out = append(out, StepProblem{i, Duplicate, dates[i-1], dates[i]})
		case c < 0:
			out = append(out, StepProblem{i, Backward, dates[i-1], dates[i]})
		}
	}
	return out
}

// AxisKind is the spacing of a time axis.
type AxisKind uint8

// The kinds ClassifyAxis tells apart.
const (
	// AxisOther: none of the kinds below (fewer than two steps, sub-daily,
	// gaps, mixed spacing, or steps that do not go forward).
	AxisOther AxisKind = iota
	// AxisDaily: every step is one day.
	AxisDaily
	// AxisMonthly: every step moves to the next calendar month.
	AxisMonthly
	// AxisMonthlyClimatology: twelve monthly steps, January to December of
	// one year.
	AxisMonthlyClimatology
)

// String names the kind.
func (k AxisKind) String() string {
	switch k {
	case AxisOther:
		return "other"
	case AxisDaily:
		return "daily"
	case AxisMonthly:
		return "monthly"
	case AxisMonthlyClimatology:
		return "12-month climatology"
	}
	return fmt.Sprintf("AxisKind(%d)", uint8(k))
}

// Monthly reports whether the axis has one step per calendar month
// (AxisMonthly or AxisMonthlyClimatology).
func (k AxisKind) Monthly() bool { return k == AxisMonthly || k == AxisMonthlyClimatology }

// Tolerances of ClassifyAxis.
const (
	dailySlack      = 60                 // seconds a daily step may differ from 86400
	minMonthlyStep  = 27 * secondsPerDay // shortest monthly step
	maxMonthlyStep  = 32 * secondsPerDay // longest monthly step
	climatologySize = 12
)

// ClassifyAxis says how a decoded time axis is spaced, and for AxisOther
// why, naming the first step that breaks the pattern. All dates must be of
// one calendar.
//
// Daily: every step is 86400 s, within a minute. Monthly: every step moves to
// the next calendar month and lasts 27–32 days, so stamps at the start,
// middle or end of each month all qualify, as long as one axis keeps to one
// of them. AxisMonthlyClimatology is the twelve-step monthly axis from
// January to December of one year. A plain monthly series of one calendar
// year looks the same: the CF climatology attribute (CF-1.10 §7.4) tells
// them apart, and checking it is the caller's job.
func ClassifyAxis(dates []Date) (AxisKind, string) {
	if len(dates) < 2 {
		return AxisOther, fmt.Sprintf("%d time step(s) cannot show a spacing", len(dates))
	}
	for i, d := range dates {
		if err := d.Validate(); err != nil {
			return AxisOther, fmt.Sprintf("time[%d] is not a valid date: %v", i, err)
		}
		if d.Calendar != dates[0].Calendar {
			return AxisOther, fmt.Sprintf("the axis mixes the %v and %v calendars", dates[0].Calendar, d.Calendar)
		}
	}
	if p := CheckSteps(dates); len(p) > 0 {
		return AxisOther, p[0].String()
	}
	daily, monthly := "", ""
	for i := 1; i < len(dates) && (daily == "" || monthly == ""); i++ {
		sec, ns := dates[i].instant().sub(dates[i-1].instant())
		step := float64(sec) + float64(ns)/nanosPerSec
		if daily == "" && (step < secondsPerDay-dailySlack || step > secondsPerDay+dailySlack) {
			daily = fmt.Sprintf("time[%d]-time[%d] is %.6g days, not 1", i, i-1, step/secondsPerDay)
		}
		if monthly == "" {
			switch {
			case dates[i].MonthIndex() != dates[i-1].MonthIndex()+1:
				monthly = fmt.Sprintf("time[%d] %v is not in the month after time[%d] %v", i, dates[i], i-1, dates[i-1])
			case step < minMonthlyStep || step > maxMonthlyStep:
				monthly = fmt.Sprintf("time[%d]-time[%d] is %.6g days, not 27–32", i, i-1, step/secondsPerDay)
			}
		}
	}
	switch {
	case daily == "":
		return AxisDaily, "one day per step"
	case monthly == "":
		if len(dates) == climatologySize && dates[0].Month == 1 && dates[11].Year == dates[0].Year {
			return AxisMonthlyClimatology, fmt.Sprintf("twelve months, January to December %s", formatYear(dates[0].Year))
		}
		return AxisMonthly, "one calendar month per step"
	}
	return AxisOther, fmt.Sprintf("not daily (%s) and not monthly (%s)", daily, monthly)
}
