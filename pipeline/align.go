package pipeline

import (
	"fmt"
	"strings"

	"lidscope/calendar"
	"lidscope/cf"
)

// stepRef is one analysis time step and the matching index of each field.
type stepRef struct {
	label       string
	date        calendar.Date
	year, month int
	idx         []int // by field slot (inputs.timed)
}

// timeKey is how steps are matched: year-month for monthly data, the date
// for daily data, the month for a climatology.
func timeKey(ta *cf.TimeAxis, t int) string {
	d := ta.Dates[t]
	switch ta.Step {
	case cf.StepClimatology:
		return fmt.Sprintf("M%02d", d.Month)
	case cf.StepMonthly, cf.StepAnnual, cf.StepUnknown:
		return d.YearMonth().String()
	}
	return d.String()[:10]
}

// axisOf picks the field whose time axis the run follows: SST's, unless
// SST is a 12-month climatology and another input has a dated record
// (monthly years, or a single month), whose steps the run then follows,
// each using the SST of its calendar month.
func axisOf(in *inputs) *field {
	sst := in.sst
	if sst.f.Time == nil || sst.f.Time.Step != cf.StepClimatology {
		return sst
	}
	for _, f := range in.timed {
		if f != sst && f.f.Time != nil && f.f.Time.Step != cf.StepClimatology {
			return f
		}
	}
	return sst
}

// align matches the time steps of every timed field to the axis the run
// follows (axisOf, kept in in.axis): dated records by year and month
// (monthly) or date (daily), a 12-month climatology by calendar month
// (with a note). It returns the steps per year, the steps every field
// has, and notes on what was aligned, skipped or dropped.
func align(in *inputs, sel func(y, m int) bool) (float64, []stepRef, []string, error) {
	sst := in.sst
	axis := axisOf(in)
	in.axis = axis
	ta := axis.f.Time
	spy := 12.0
	switch ta.Step {
	case cf.StepDaily:
		spy = 365.25
	case cf.StepAnnual:
		spy = 1
	case cf.StepIrregular:
		return 0, nil, nil, fmt.Errorf("role %s: the time axis is irregular (%s); lidscope needs monthly or daily steps", axis.role, ta.Why)
	}
	var notes []string
	for _, f := range in.timed {
		if f.f.Time == nil {
			if f.f.NT() != 1 {
				return 0, nil, nil, fmt.Errorf("role %s has no time axis", f.role)
			}
			continue
		}
		f.index = map[string]int{}
		for t := range f.f.Time.Dates {
			f.index[timeKey(f.f.Time, t)] = t
		}
		clim := f.f.Time.Step == cf.StepClimatology
		if f != axis && f.f.Time.Calendar != ta.Calendar && !clim {
			return 0, nil, nil, fmt.Errorf("role %s (%s) uses the %s calendar but %s (%s) uses %s; lidscope matches time steps by date and will not mix calendars — convert one (e.g. cdo setcalendar), or, if a file's calendar attribute is wrong, declare the calendar in the study (time.calendar)",
				f.role, strings.Join(f.f.Paths(), ", "), f.f.Time.Calendar, axis.role, strings.Join(axis.f.Paths(), ", "), ta.Calendar)
		}
		if f != axis && clim && ta.Step != cf.StepClimatology {
			notes = append(notes, fmt.Sprintf("%s (%s) is a 12-month climatology; it is aligned with the %s record (%s) by calendar month, so every year of the record uses the same %s of each month",
				f.role, f.f.Var, axis.role, ta.Span(), f.role))
		}
	}
	var steps []stepRef
	missing := map[cf.Role][]string{}
	unselected := 0
	for t, d := range ta.Dates {
		if sel != nil && !sel(d.Year, d.Month) {
			unselected++
			continue
		}
		st := stepRef{label: d.YearMonth().String(), date: d, year: d.Year, month: d.Month, idx: make([]int, len(in.timed))}
		if ta.Step == cf.StepDaily {
			st.label = d.String()[:10]
		}
		if ta.Step == cf.StepClimatology {
			st.label = calendar.MonthAbbrev(d.Month) // a calendar month, not a date
		}
		ok := true
		for _, f := range in.timed {
			if f.f.Time == nil {
				st.idx[f.slot] = 0
				continue
			}
			key := timeKey(ta, t)
			if f.f.Time.Step == cf.StepClimatology {
				key = fmt.Sprintf("M%02d", d.Month)
			}
			i, found := f.index[key]
			if !found {
				missing[f.role] = append(missing[f.role], st.label)
				ok = false
				continue
			}
			st.idx[f.slot] = i
		}
		if ok {
			steps = append(steps, st)
		}
	}
	if unselected > 0 {
		notes = append(notes, fmt.Sprintf("%d %s time steps outside the study's time selection skipped", unselected, axis.role))
	}
	for _, r := range cf.Roles() {
		if m := missing[r]; len(m) > 0 {
			ex := m
			if len(ex) > 4 {
				ex = append(append([]string{}, m[:2]...), "…", m[len(m)-1])
			}
			notes = append(notes, fmt.Sprintf("%d %s time steps dropped because %s has no matching step (%s)", len(m), axis.role, r, strings.Join(ex, ", ")))
		}
	}
	if axis != sst {
		what := fmt.Sprintf("its %d steps", len(steps))
		if len(steps) == 1 {
			what = "that month"
		}
		notes = append(notes, fmt.Sprintf("sst (%s) is a 12-month climatology and %s (%s) a dated record (%s): the run follows %s, each step with the sst of its calendar month, so regimes and crossings describe the climatological SST, sampled at the months of the %s record",
			sst.f.Var, axis.role, axis.f.Var, ta.Span(), what, axis.role))
	}
	return spy, steps, notes, nil
}

// coverage lists the period each time-dependent input covers.
func coverage(timed []*field) string {
	var parts []string
	for _, f := range timed {
		if f.f.Time == nil {
			continue
		}
		parts = append(parts, fmt.Sprintf("%s %s (%s)", f.role, f.f.Time.Span(), strings.Join(f.f.Paths(), ", ")))
	}
	return strings.Join(parts, "; ")
}
