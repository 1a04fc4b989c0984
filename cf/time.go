package cf

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"lidscope/calendar"
	"lidscope/netcdf"
)

// Date is a decoded CF date in its calendar.
type Date = calendar.Date

// Step is the sampling of a time axis.
type Step int

// Samplings lidscope tells apart.
const (
	StepUnknown     Step = iota
	StepMonthly          // one step per calendar month
	StepClimatology      // 12 steps, one per calendar month, no year
	StepDaily
	StepAnnual
	StepIrregular
)

func (s Step) String() string {
	return [...]string{"unknown", "monthly", "12-month climatology", "daily", "annual", "irregular"}[s]
}

// TimeAxis is a decoded time coordinate.
type TimeAxis struct {
	Var      string
	Units    string
	Calendar string
	Dates    []Date
	Step     Step
	// Declared is true when the study declared the axis (overrides).
	Declared bool
	Note     string
	// Why says what makes an irregular axis irregular.
	Why             string
	climatologyAttr bool
	days            []float64 // day numbers of a daily axis (for Gaps)
	dayUnits        calendar.Units
}

// dayOnly formats the date part of d, YYYY-MM-DD.
func dayOnly(d Date) string {
	s := d.String()
	if i := strings.IndexByte(s, 'T'); i > 0 {
		return s[:i]
	}
	return s
}

// Span describes the axis, e.g. "1979-01-16 … 2018-12-16, 480 monthly steps (standard calendar)".
func (ta *TimeAxis) Span() string {
	if len(ta.Dates) == 0 {
		return "no time steps"
	}
	if ta.Step == StepClimatology {
		return fmt.Sprintf("12-month climatology (%s calendar)", ta.Calendar)
	}
	if len(ta.Dates) == 1 {
		return fmt.Sprintf("%s, 1 step (%s calendar)", ta.Dates[0].String(), ta.Calendar)
	}
	return fmt.Sprintf("%s … %s, %d %s steps (%s calendar)", ta.Dates[0].String(), ta.Dates[len(ta.Dates)-1].String(), len(ta.Dates), ta.Step, ta.Calendar)
}

// classify sets Step from the dates (calendar.ClassifyAxis), and also
// recognises a monthly axis with missing months, whose gaps Gaps reports.
func (ta *TimeAxis) classify() {
	if ta.Declared && ta.Step == StepClimatology {
		return
	}
	k, why := calendar.ClassifyAxis(ta.Dates)
	switch k {
	case calendar.AxisDaily:
		ta.Step = StepDaily
		return
	case calendar.AxisMonthly:
		ta.Step = StepMonthly
		return
	case calendar.AxisMonthlyClimatology:
		// Twelve months of one year: a climatology when stamped in year 0
		// or 1 (common practice) or flagged by the CF climatology attribute.
		if ta.Dates[0].Year <= 1 || ta.climatologyAttr {
			ta.Step = StepClimatology
		} else {
			ta.Step = StepMonthly
		}
		return
	}
	n := len(ta.Dates)
	if n < 2 {
		ta.Step = StepUnknown
		return
	}
	// Daily with a few missing days, which Gaps reports.
	if days, tu, ok := dayNumbers(ta.Dates); ok {
		whole, ones := true, 0
		for i := 1; i < n; i++ {
			d := days[i] - days[i-1]
			if math.Abs(d-math.Round(d)) > 1.0/1440 || d < 0.5 {
				whole = false
				break
			}
			if math.Round(d) == 1 {
				ones++
			}
		}
		if whole && ones*10 >= (n-1)*9 {
			ta.Step, ta.days, ta.dayUnits = StepDaily, days, tu
			return
		}
	}
	ones, twelves := 0, 0
	for i := 1; i < n; i++ {
		switch ta.Dates[i].MonthIndex() - ta.Dates[i-1].MonthIndex() {
		case 1:
			ones++
		case 12:
			twelves++
		}
		if ta.Dates[i].MonthIndex()-ta.Dates[i-1].MonthIndex() < 1 {
			ta.Step, ta.Why = StepIrregular, why
			return
		}
	}
	// Monthly with gaps (which Gaps reports): every step moves on by whole
	// months, most by one, and the stamps keep to one day of the month
	// (within 3 days, or all at month ends).
	lo, hi := ta.Dates[0].Day, ta.Dates[0].Day
	for _, d := range ta.Dates {
		lo, hi = min(lo, d.Day), max(hi, d.Day)
	}
	sameDay := hi-lo <= 3 || lo >= 28
	switch {
	case twelves == n-1:
		ta.Step = StepAnnual
	case sameDay && ones*2 >= n-1:
		ta.Step = StepMonthly
	default:
		ta.Step, ta.Why = StepIrregular, why
	}
}

// dayNumbers returns each date as days since the first one, in their
// calendar, and the units that turn a day number back into a date.
func dayNumbers(dates []Date) ([]float64, calendar.Units, bool) {
	tu, err := calendar.ParseUnits("days since "+dates[0].String(), dates[0].Calendar, calendar.Options{})
	if err != nil {
		return nil, tu, false
	}
	out := make([]float64, len(dates))
	for i, d := range dates {
		if out[i], err = tu.Encode(d); err != nil {
			return nil, tu, false
		}
	}
	return out, tu, true
}

// Gaps lists missing months of a monthly axis, as "1990-03 … 1990-05
// missing (3 months)", and missing days of a daily axis, as "1990-03-02 …
// 1990-03-04 missing (3 days)".
func (ta *TimeAxis) Gaps() []string {
	if ta.Step == StepDaily && ta.days != nil {
		var out []string
		for i := 1; i < len(ta.days); i++ {
			k := int(math.Round(ta.days[i] - ta.days[i-1]))
			if k <= 1 {
				continue
			}
			first, err1 := ta.dayUnits.Decode(ta.days[i-1] + 1)
			last, err2 := ta.dayUnits.Decode(ta.days[i] - 1)
			if err1 != nil || err2 != nil {
				out = append(out, fmt.Sprintf("%d days missing after %s", k-1, ta.Dates[i-1]))
				continue
			}
			if k == 2 {
				out = append(out, fmt.Sprintf("%s missing", dayOnly(first)))
			} else {
				out = append(out, fmt.Sprintf("%s … %s missing (%d days)", dayOnly(first), dayOnly(last), k-1))
			}
		}
		return out
	}
	if ta.Step != StepMonthly {
		return nil
	}
	var out []string
	for i := 1; i < len(ta.Dates); i++ {
		a, b := ta.Dates[i-1].YearMonth(), ta.Dates[i].YearMonth()
		if k := b.Index() - a.Index(); k > 1 {
			first, last := a.AddMonths(1), b.AddMonths(-1)
			if k == 2 {
				out = append(out, fmt.Sprintf("%s missing", first))
			} else {
				out = append(out, fmt.Sprintf("%s … %s missing (%d months)", first, last, k-1))
			}
		}
	}
	return out
}

// decodeTimeAxis decodes the time coordinate cv, applying study overrides.
func decodeTimeAxis(nf *netcdf.File, cv *netcdf.Var, ov Overrides) (*TimeAxis, error) {
	path := nf.Path()
	ta := &TimeAxis{Var: cv.Name}
	n := cv.Dims[0].Len
	if ov.Climatology {
		if n != 12 {
			return nil, fmt.Errorf("%s: the study declares %s a 12-month climatology, but it has %d steps", path, cv.Name, n)
		}
		ta.Declared, ta.Step, ta.Calendar = true, StepClimatology, "standard"
		ta.Units = "calendar month (declared in the study)"
		for m := 1; m <= 12; m++ {
			d, err := calendar.NewDate(calendar.Standard, 1, m, 15, 0, 0, 0)
			if err != nil {
				return nil, err
			}
			ta.Dates = append(ta.Dates, d)
		}
		ta.Note = "time axis declared in the study as a 12-month climatology, January first"
		return ta, nil
	}
	u := ov.TimeUnits
	if u == "" {
		u = textAttr(cv, "units")
		if _, err := cv.Attr("units"); err != nil {
			return nil, fmt.Errorf("%s: time coordinate %s has no units attribute (CF-1.10 §4.4 needs \"<unit> since <date>\"); set time.units in the study, or time.climatology: true for a 12-month climatology", path, cv.Name)
		}
	} else {
		ta.Declared = true
	}
	calName := ov.Calendar
	if calName == "" {
		calName = textAttr(cv, "calendar")
	}
	tu, err := calendar.Parse(u, calName, calendar.Options{CalendarMonths: true})
	if err != nil {
		where := fmt.Sprintf("time coordinate %s, attribute units = %q", cv.Name, u)
		if ov.TimeUnits != "" {
			where = fmt.Sprintf("time coordinate %s, time units %q from the study", cv.Name, u)
		}
		if errors.Is(err, calendar.ErrCalendar) {
			where = fmt.Sprintf("time coordinate %s, attribute calendar = %q", cv.Name, calName)
			if ov.Calendar != "" {
				where = fmt.Sprintf("time coordinate %s, calendar %q from the study", cv.Name, calName)
			}
			return nil, fmt.Errorf("%s: %s: %w; set time.calendar in the study (one of %s)", path, where, err, strings.Join(calendar.CalendarNames(), ", "))
		}
		hint := "; fix it in the study: time.units with CF units for these values (e.g. \"months since 1988-01-01\")"
		if n == 12 {
			hint += ", or time.climatology: true — the axis has 12 steps, which looks like a 12-month climatology, January first"
		}
		return nil, fmt.Errorf("%s: %s: %w%s", path, where, err, hint)
	}
	ta.Units, ta.Calendar = u, tu.Calendar().String()
	ta.climatologyAttr = textAttr(cv, "climatology") != ""
	vals, err := readCoord(nf, cv)
	if err != nil {
		return nil, err
	}
	ta.Dates = make([]Date, n)
	for i, x := range vals {
		d, err := tu.Decode(x)
		if err != nil {
			return nil, fmt.Errorf("%s: time coordinate %s[%d] = %g (%s): %w", path, cv.Name, i, x, u, err)
		}
		ta.Dates[i] = d
	}
	if strings.Contains(strings.ToLower(u), "month") {
		ta.Note = "\"months since\" read as calendar months from the reference date (CF advises against month units)"
	}
	for i := 1; i < n; i++ {
		if !ta.Dates[i-1].Before(ta.Dates[i]) {
			return nil, fmt.Errorf("%s: time coordinate %s is not increasing at index %d (%s then %s); CF-1.10 §4.4 needs a monotonic axis", path, cv.Name, i, ta.Dates[i-1], ta.Dates[i])
		}
	}
	ta.classify()
	return ta, nil
}
