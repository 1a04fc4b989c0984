package cfwrite

import (
	"strings"
	"testing"

	"lidscope/calendar"
)

// Time units: forms from CF-1.10 §4.4 and its UDUNITS-2 examples; calendar
// facts from CF-1.10 §4.4.1 (common practice: 1900 is a leap year in the
// Julian calendar only; 1582-10-05..14 are skipped by the Gregorian reform).
// Package calendar parses; an accepted string is shown in its normal form,
// with the reference in UTC (ISO 8601, common practice: 12:30 at +05:00 is
// 07:30 UTC). Standard and julian years start at 1 in package calendar
// (its documented choice), so -4712 is refused there.
func TestParseTimeUnits(t *testing.T) {
	cases := []struct {
		units, cal string
		want       string // calendar's normal form; "" when an error is expected
		err        string
	}{
		{"days since 1979-01-01", "standard", "days since 1979-01-01T00:00:00 (standard)", ""},
		{"hours since 1900-1-1 00:00:00", "gregorian", "hours since 1900-01-01T00:00:00 (standard)", ""},
		{"seconds since 1970-01-01T00:00:00Z", "proleptic_gregorian", "seconds since 1970-01-01T00:00:00 (proleptic_gregorian)", ""},
		{"days since 1850-01-01 00:00:0.0", "noleap", "days since 1850-01-01T00:00:00 (noleap)", ""},
		{"minutes since 2000-01-01 12:30 +05:00", "standard", "minutes since 2000-01-01T07:30:00 (standard)", ""},
		{"days since 2000-01-01 00:00:00 -6", "standard", "days since 2000-01-01T06:00:00 (standard)", ""},
		{"days since 2000-01-01 00:00:00 +14:00", "standard", "days since 1999-12-31T10:00:00 (standard)", ""},
		{"d since 2000-01-01 UTC", "standard", "days since 2000-01-01T00:00:00 (standard)", ""},
		{"  hr since 2000-01-01 06:00:30.5  ", "julian", "hours since 2000-01-01T06:00:30.5 (julian)", ""},
		{"days since -4712-01-01", "proleptic_gregorian", "days since -4712-01-01T00:00:00 (proleptic_gregorian)", ""},
		{"days since 2000-02-30", "360_day", "days since 2000-02-30T00:00:00 (360_day)", ""},
		{"days since 2001-02-29", "all_leap", "days since 2001-02-29T00:00:00 (all_leap)", ""},
		{"days since 1582-10-10", "proleptic_gregorian", "days since 1582-10-10T00:00:00 (proleptic_gregorian)", ""},
		{"days since 1900-02-29", "julian", "days since 1900-02-29T00:00:00 (julian)", ""},
		{"days since 1979-01-01", "NoLeap ", "days since 1979-01-01T00:00:00 (noleap)", ""},
		{"days since -4712-01-01", "julian", "", "year -4712 does not exist in the julian calendar"},
		{"DAYS since 2000-01-01", "STANDARD", "", `unit "DAYS" is not one of`},
		{"fortnights since 2000-01-01", "standard", "", `"fortnights" is not a time unit`},
		{"days since 1900-02-29", "proleptic_gregorian", "", "1900-02 has 28 days in the proleptic_gregorian calendar"},
		{"days since 2000-02-29", "noleap", "", "2000-02 has 28 days in the noleap calendar"},
		{"days since 2000-02-30", "standard", "", "2000-02 has 29 days"},
		{"days since 1582-10-10", "standard", "", "1582-10-04 is followed by the Gregorian 1582-10-15"},
		{"months since 1979-01-01", "standard", "", "not a calendar interval"},
		{"years since 0001-01-01", "noleap", "", "not a calendar interval"},
		{"days", "standard", "", "not of the form"},
		{"days since ", "standard", "", "not of the form"},
		{"days SINCE 1979-01-01", "standard", "", "not of the form"},
		{"days since 1979-13-01", "standard", "", "month 13 is not 1–12"},
		{"days since 1979-01-00", "standard", "", "day 0"},
		{"days since 1979-01", "standard", "", "not of the form YYYY-MM-DD"},
		{"days since 1979-01-01 25:00", "standard", "", "hour 25 is not 0–23"},
		{"days since 1979-01-01 00:00:00 +15", "standard", "", "out of range"},
		{"days since 1979-01-01 00:00:00 -12:30", "standard", "", "out of range"},
		{"days since 1979-01-01T", "standard", "", "not of the form YYYY-MM-DD"},
		{"days since 19790101", "standard", "", "not of the form YYYY-MM-DD"},
		{"days since 1979-01-01", "none", "", `calendar "none" is not one of`},
		{"days since 1979-01-01", " ", "", "no calendar given"},
	}
	for _, c := range cases {
		tu, err := parseTimeUnits(c.units, c.cal)
		if c.err != "" {
			if err == nil || !strings.Contains(err.Error(), c.err) {
				t.Errorf("%q (%s): error %v, want one containing %q", c.units, c.cal, err, c.err)
			}
			continue
		}
		if err != nil {
			t.Errorf("%q (%s): %v", c.units, c.cal, err)
			continue
		}
		if got := tu.String(); got != c.want {
			t.Errorf("%q (%s) = %q, want %q", c.units, c.cal, got, c.want)
		}
	}
}

// Cell methods: syntax of CF-1.10 §7.3, methods of Appendix E; the valid
// examples are forms shown in §7.3 and §7.4.
func TestParseCellMethods(t *testing.T) {
	ok := []string{
		"time: mean",
		"time: mean area: mean where sea",
		"lat: lon: standard_deviation",
		"time: mean (interval: 1 day)",
		"time: maximum within days time: mean over days",
		"area: mean where sea_ice over sea",
		"time: point",
		"time: sum (comment: invented) area: mean",
	}
	for _, s := range ok {
		cms, err := parseCellMethods(s)
		if err != nil {
			t.Errorf("%q: %v", s, err)
			continue
		}
		if got := formatCellMethods(cms); got != s {
			t.Errorf("%q formats back as %q", s, got)
		}
	}
	bad := map[string]string{
		"":                      "is empty",
		"mean":                  `expected "name:"`,
		"time: average":         `"average" is not a CF cell method`,
		"time:":                 "no method",
		"time: mean (unclosed":  "unclosed",
		"time: mean where":      "unexpected",
		"time: mean extra":      `unexpected "extra"`,
		"time:mean":             `expected "name:"`,
		"time: mean where sea:": "must be followed by a word",
		"time: (x) mean":        "no method",
		"time: mean) ":          "without '('",
		"2d: mean":              "must begin with a letter",
		"time: mean (a (b) c)":  "nested",
	}
	for s, want := range bad {
		if _, err := parseCellMethods(s); err == nil || !strings.Contains(err.Error(), want) {
			t.Errorf("%q: error %v, want one containing %q", s, err, want)
		}
	}
}

func TestDefaultChunks(t *testing.T) {
	T := &dim{name: "time", axis: 'T'}
	Z := &dim{name: "plev", n: 37, axis: 'Z'}
	Y := &dim{name: "lat", n: 721, axis: 'Y'}
	X := &dim{name: "lon", n: 1440, axis: 'X'}
	R := &dim{name: "regime", n: 2}
	B := &dim{name: "bin", n: 20}
	cases := []struct {
		dims []*dim
		size int
		want []int
	}{
		{[]*dim{T, Y, X}, 4, []int{1, 721, 1440}},       // one map per chunk
		{[]*dim{T, Z, Y, X}, 4, []int{1, 1, 721, 1440}}, // one level of one step
		{[]*dim{T}, 8, []int{4096}},                     // series: capped
		{[]*dim{T, R, B}, 4, []int{409, 2, 20}},         // 64 KiB of table steps
		{[]*dim{R, B}, 4, []int{2, 20}},                 // small: one chunk
		{[]*dim{Z, Y, X}, 4, []int{1, 721, 1440}},       // large: split outer
		{nil, 4, nil},
	}
	for _, c := range cases {
		got := defaultChunks(c.dims, c.size)
		if len(got) != len(c.want) {
			t.Errorf("%v: %v, want %v", c.dims, got, c.want)
			continue
		}
		for i := range got {
			if got[i] != c.want[i] {
				t.Errorf("chunks %v, want %v", got, c.want)
				break
			}
		}
	}
}

func TestShellJoin(t *testing.T) {
	got := shellJoin([]string{"lidscope", "maps", "--out=a.nc", "my file.nc", "it's", ""})
	want := `lidscope maps --out=a.nc 'my file.nc' 'it'\''s' ''`
	if got != want {
		t.Errorf("shellJoin = %s, want %s", got, want)
	}
}

// Whatever the writer accepts keeps its own rules (a named calendar, a
// lower-case unit of fixed length, a real time zone) and is read back by
// package calendar: the value 0 decodes to the reference.
func FuzzParseTimeUnits(f *testing.F) {
	for _, s := range []string{"days since 1979-01-01", "hours since 1900-1-1 00:00:00",
		"seconds since 1970-01-01T00:00:00Z", "minutes since 2000-01-01 12:30 +05:00",
		"d since -4712-01-01 UTC", "days since 2000-01-01 00:00:00 -6", "days since 2000-02-30"} {
		f.Add(s, "standard")
		f.Add(s, "360_day")
		f.Add(s, "proleptic_gregorian")
	}
	f.Fuzz(func(t *testing.T, units, cal string) {
		tu, err := parseTimeUnits(units, cal)
		if err != nil {
			return
		}
		if strings.TrimSpace(cal) == "" {
			t.Fatalf("%q accepted without a calendar", units)
		}
		if w := strings.Fields(units)[0]; w != strings.ToLower(w) {
			t.Fatalf("%q accepted with unit word %q", units, w)
		}
		switch tu.Unit() {
		case calendar.Seconds, calendar.Minutes, calendar.Hours, calendar.Days:
		default:
			t.Fatalf("%q accepted with unit %v", units, tu.Unit())
		}
		if off := tu.UTCOffset(); off < -12*60 || off > 14*60 {
			t.Fatalf("%q accepted with UTC offset %d min", units, off)
		}
		d, err := tu.Decode(0)
		if err != nil || !d.Equal(tu.Reference()) {
			t.Fatalf("%q: 0 decodes to %v (%v), want the reference %v", units, d, err, tu.Reference())
		}
	})
}

func FuzzParseCellMethods(f *testing.F) {
	for _, s := range []string{"time: mean", "time: mean area: mean where sea", "lat: lon: mean",
		"time: mean (interval: 1 day)", "time: maximum within days time: mean over days", "time: mean where"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		cms, err := parseCellMethods(s)
		if err != nil {
			return
		}
		canon := formatCellMethods(cms)
		cms2, err := parseCellMethods(canon)
		if err != nil {
			t.Fatalf("%q parsed, but its canonical form %q does not: %v", s, canon, err)
		}
		if got := formatCellMethods(cms2); got != canon {
			t.Fatalf("%q: canonical form %q reformats as %q", s, canon, got)
		}
	})
}
