package cf

import (
	"errors"
	"fmt"
	"strings"
	"testing"

	"lidscope/calendar"
)

// cf passes each time coordinate's calendar attribute to the calendar
// package (whose own tests compare with cftime). Day 59 tells the
// calendars apart (CF-1.10 §4.4.1): 1900 is a leap year only in the Julian
// calendar, 2000 is none in noleap, 360_day has 30-day months, all_leap
// has 29 February every year, and 1500 is a leap year in the standard
// (then Julian) calendar but not in the proleptic Gregorian one.
func TestCalendarsPassedThrough(t *testing.T) {
	cases := []struct{ v, cal, day59 string }{
		{"v_std", "standard", "1900-03-01T00:00:00"},
		{"v_greg", "standard", "1900-03-01T00:00:00"}, // "gregorian" is an alias
		{"v_noleap", "noleap", "2000-03-01T00:00:00"},
		{"v_360", "360_day", "2000-02-30T00:00:00"},
		{"v_allleap", "all_leap", "2001-02-29T00:00:00"},
		{"v_julian", "julian", "1900-02-29T00:00:00"},
		{"v_prol", "proleptic_gregorian", "1500-03-01T00:00:00"},
		{"v_none", "standard", "1500-02-29T00:00:00"}, // no attribute: standard
	}
	eachKind(t, "calendars", func(t *testing.T, path string) {
		for _, c := range cases {
			f := mustOpen(t, path, Spec{Role: RoleSST, Var: c.v})
			if f.Time.Calendar != c.cal {
				t.Errorf("%s: calendar %q, want %q", c.v, f.Time.Calendar, c.cal)
			}
			if got := f.Time.Dates[1].String(); got != c.day59 {
				t.Errorf("%s: day 59 is %s, want %s", c.v, got, c.day59)
			}
		}
		_, err := Open([]string{path}, Spec{Role: RoleSST, Var: "v_bad"})
		errHas(t, err, "t_bad", `calendar = "lunar"`, "time.calendar", "360_day")
		if !errors.Is(err, calendar.ErrCalendar) {
			t.Errorf("error does not wrap calendar.ErrCalendar: %v", err)
		}
		// the study's calendar overrides the attribute
		f := mustOpen(t, path, Spec{Role: RoleSST, Var: "v_bad", Overrides: Overrides{Calendar: "360_day"}})
		if f.Time.Calendar != "360_day" || f.Time.Dates[1].String() != "2000-02-30T00:00:00" {
			t.Errorf("override: %s %v", f.Time.Calendar, f.Time.Dates)
		}
	})
}

// Bare "Month" units (no reference date) are not CF (CF-1.10 §4.4): the
// error names the attribute and the study overrides that fix it.
func TestMonthUnits(t *testing.T) {
	eachKind(t, "month_units", func(t *testing.T, path string) {
		_, err := Open([]string{path}, Spec{Role: RoleSST})
		errHas(t, err, "time coordinate time", `attribute units = "Month"`, "time.units", "time.climatology: true", "12 steps")
		if !errors.Is(err, calendar.ErrNotCF) {
			t.Errorf("error does not wrap calendar.ErrNotCF: %v", err)
		}

		f := mustOpen(t, path, Spec{Role: RoleSST, Overrides: Overrides{Climatology: true}})
		if f.Time.Step != StepClimatology || !f.Time.Declared || f.NT() != 12 {
			t.Errorf("climatology override: step %v declared %v NT %d", f.Time.Step, f.Time.Declared, f.NT())
		}
		for i, d := range f.Time.Dates {
			if d.Month != i+1 {
				t.Errorf("step %d is month %d", i, d.Month)
			}
		}
		// last step: deg_C + 273.15, last cell −999 is outside valid_range
		sameValues(t, slab(t, f, 11), []float64{25.5 + 273.15, 26.5 + 273.15, 27.5 + 273.15, 28.5 + 273.15, 29.5 + 273.15, nan}, 1e-4)

		// values 1…12 are months since December 1987
		f = mustOpen(t, path, Spec{Role: RoleSST, Overrides: Overrides{TimeUnits: "months since 1987-12-01"}})
		if f.Time.Step != StepMonthly || f.Time.Dates[0].String() != "1988-01-01T00:00:00" || f.Time.Dates[11].String() != "1988-12-01T00:00:00" {
			t.Errorf("TimeUnits override: %v %v", f.Time.Step, f.Time.Dates)
		}
		if !hasNote([]string{f.Time.Note}, "months since") {
			t.Errorf("note %q", f.Time.Note)
		}
		_, err = Open([]string{path}, Spec{Role: RoleSST, Overrides: Overrides{TimeUnits: "fortnights"}})
		errHas(t, err, `time units "fortnights" from the study`)
	})
}

// timeCDL builds a one-cell file with the given time values.
func timeCDL(units, cal string, times []float64) string {
	var ts, vs []string
	for _, x := range times {
		ts = append(ts, fmt.Sprint(x))
		vs = append(vs, "290")
	}
	return fmt.Sprintf(`netcdf tx {
dimensions: time = %d ; lat = 1 ; lon = 1 ;
variables:
	double time(time) ; time:units = %q ; time:calendar = %q ;
	float lat(lat) ; lat:units = "degrees_north" ;
	float lon(lon) ; lon:units = "degrees_east" ;
	float sst(time, lat, lon) ; sst:units = "K" ; sst:standard_name = "sea_surface_temperature" ;
data:
	time = %s ; lat = 0 ; lon = 0 ;
	sst = %s ;
}`, len(times), units, cal, strings.Join(ts, ", "), strings.Join(vs, ", "))
}

// Gap dates worked out by hand: from 2000-02-27 (standard calendar, 2000
// is a leap year) day 3 is 1 March, days 6–8 are 4–6 March and day 14 is 12
// March; in noleap from 2001-02-27, day 2 is 1 March and day 10 is 9 March.
func TestTimeAxisKinds(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name, units, cal string
		times            []float64
		step             Step
		gaps             string
		err              string
	}{
		{"daily", "days since 2000-01-01", "standard", []float64{0, 1, 2, 3}, StepDaily, "", ""},
		{"daily with gaps", "days since 2000-02-27", "standard", []float64{0, 1, 2, 3, 4, 5, 9, 10, 11, 12, 13, 15, 16, 17, 18, 19, 20, 21, 22, 23, 24},
			StepDaily, "2000-03-04 … 2000-03-06 missing (3 days); 2000-03-12 missing", ""},
		{"daily noleap across February", "days since 2001-02-27", "noleap", []float64{0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 11}, StepDaily, "2001-03-09 missing", ""},
		{"monthly with gaps", "days since 2000-01-01", "360_day", []float64{15, 45, 75, 105, 195, 225, 255, 285, 315, 345, 375, 405, 435, 465, 495}, StepMonthly, "2000-05 … 2000-06 missing (2 months)", ""},
		{"annual", "days since 2000-01-01", "noleap", []float64{0, 365, 730}, StepAnnual, "", ""},
		{"climatology in year 1", "days since 0001-01-01", "noleap", []float64{15, 45, 74, 105, 135, 166, 196, 227, 258, 288, 319, 349}, StepClimatology, "", ""},
		{"not increasing", "days since 2000-01-01", "standard", []float64{0, 2, 1}, 0, "", "not increasing at index 2"},
		{"duplicate", "days since 2000-01-01", "standard", []float64{0, 1, 1}, 0, "", "not increasing at index 2"},
		{"no since", "days", "standard", []float64{0, 1}, 0, "", `attribute units = "days"`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			path := ncgen(t, timeCDL(c.units, c.cal, c.times), "classic", "tx")
			f, err := Open([]string{path}, Spec{Role: RoleSST})
			if c.err != "" {
				errHas(t, err, c.err, "time")
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			if f.Time.Step != c.step {
				t.Errorf("step %v, want %v (%s)", f.Time.Step, c.step, f.Time.Why)
			}
			gaps := strings.Join(f.Time.Gaps(), "; ")
			if gaps != c.gaps {
				t.Errorf("gaps %q, want %q", gaps, c.gaps)
			}
			if c.gaps != "" && !hasNote(f.Notes, c.gaps) {
				t.Errorf("notes %q lack the gaps", f.Notes)
			}
		})
	}
}
