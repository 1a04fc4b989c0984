package calendar

import (
	"bytes"
	"encoding/json"
	"errors"
	"lidscope/internal/testutil"
	"math"
	"math/rand/v2"
	"os/exec"
	"testing"
)

// Independent reference: Debian's python3-cftime (Unidata cftime, num2date and
// date2num), run through Debian's python3 by testdata/cftime_check.py.
//
// Where this package and cftime 1.6 deliberately differ, the cases below stay
// out of the comparison or check the difference itself:
//   - cftime's "standard" and "julian" accept negative years (numbered without
//     a year zero); CF-1.10 §4.4.1 does not allow years before 1 there, and
//     neither does this package: such cases must fail here with ErrRange.
//   - cftime ignores a UTC offset written as a bare hour (" -6"); this package
//     applies it as UDUNITS does, so that form is not compared.
//   - cftime's dayofyr and daysinmonth ignore the ten days dropped in October
//     1582 in "standard"; they are not compared.
//   - cftime reads "months since" only for 360_day, as 30-day months, so month
//     units are compared for 360_day only.
// cftime's "standard" calendar is, like CF's, Julian before 1582-10-15 (unlike
// Python's datetime and numpy, which are proleptic Gregorian).

func needCftime(t *testing.T) string {
	t.Helper()
	return testutil.Python(t, "cftime")
}

type cftimeRequest struct {
	Decode [][3]any `json:"decode"`
	Encode [][9]any `json:"encode"`
	Parse  [][2]any `json:"parse"`
}

type cftimeReply struct {
	Version string            `json:"version"`
	Decode  []json.RawMessage `json:"decode"`
	Encode  []json.RawMessage `json:"encode"`
	Parse   []string          `json:"parse"`
}

func runCftime(t *testing.T, req cftimeRequest) cftimeReply {
	t.Helper()
	in, err := json.Marshal(req)
	if err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(needCftime(t), "testdata/cftime_check.py")
	cmd.Stdin = bytes.NewReader(in)
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("testdata/cftime_check.py: %v\n%s", err, stderr.String())
	}
	var rep cftimeReply
	if err := json.Unmarshal(out, &rep); err != nil {
		t.Fatalf("reading cftime_check.py output: %v", err)
	}
	if len(rep.Decode) != len(req.Decode) || len(rep.Encode) != len(req.Encode) || len(rep.Parse) != len(req.Parse) {
		t.Fatalf("cftime_check.py answered %d/%d/%d cases for %d/%d/%d",
			len(rep.Decode), len(rep.Encode), len(rep.Parse), len(req.Decode), len(req.Encode), len(req.Parse))
	}
	t.Logf("cftime %s", rep.Version)
	return rep
}

var allCalendarNames = CalendarNames()

// cftimeUnits are the units compared; yearZero marks references that exist
// only in calendars with a year zero.
var cftimeUnits = []struct {
	units    string
	yearZero bool
}{
	{"seconds since 1970-01-01 00:00:00", false},
	{"minutes since 1582-10-15 00:00", false},
	{"hours since 1800-01-01 00:00:0.0", false},
	{"days since 0001-01-01", false},
	{"days since 1582-10-01 12:00:00", false},
	{"days since 1850-01-01T00:00:00Z", false},
	{"hours since 1900-01-01 00:00:00 +05:00", false},
	{"days since 2000-01-01 06:30:00 -03:30", false},
	{"seconds since 1979-01-01 00:00:00.5", false},
	{"days since 1000-03-01", false},
	{"d since 1900-1-1 0:0:0 UTC", false},
	{"days since 10000-01-01", false},
	{"days since -0100-01-01", true},
	{"days since 0000-01-01", true},
}

// maxMagnitude keeps generated values within a few thousand years.
var maxMagnitude = map[Unit]float64{Seconds: 4e9, Minutes: 6e7, Hours: 1e6, Days: 3e6}

var fixedValues = map[Unit][]float64{
	Seconds: {86399, 86400, 1e9, -1e9},
	Minutes: {1439, 1440, 525600, -525600},
	Hours:   {23, 24, 8784, 1e6, -1e6},
	Days:    {365, 366, 36524, 146097, -146097, 1e6},
}

func decodeCases() [][3]any {
	rng := rand.New(rand.NewPCG(2024, 10))
	var cases [][3]any
	for _, cu := range cftimeUnits {
		for _, cal := range allCalendarNames {
			c, _ := ParseCalendar(cal)
			if cu.yearZero && !c.HasYearZero() {
				continue
			}
			u, err := ParseUnits(cu.units, c, Options{})
			if err != nil {
				panic(cu.units + ": " + err.Error())
			}
			values := append([]float64{0, 1, -1, 0.5}, fixedValues[u.Unit()]...)
			max := maxMagnitude[u.Unit()]
			for range 6 { // dyadic fractions: exact microseconds in every unit
				values = append(values, math.Round((2*rng.Float64()-1)*max)+float64(rng.IntN(64))/64)
			}
			for range 2 { // arbitrary fractions
				values = append(values, (2*rng.Float64()-1)*max)
			}
			for _, v := range values {
				cases = append(cases, [3]any{v, cu.units, cal})
			}
		}
	}
	// Month units: cftime reads them only for 360_day, as 30-day months,
	// which is also what calendar months are in 360_day.
	for _, v := range []float64{0, 1, 11, 12, 13, -1, -13, 1200, 0.5, 2.25, -0.75} {
		cases = append(cases, [3]any{v, "months since 2000-01-15", "360_day"})
	}
	return cases
}

// roundMicro rounds a decoded date to the microsecond, as cftime reports.
func roundMicro(d Date) Date {
	t := d.instant()
	us := (t.ns + 500) / 1000
	r, err := instant{t.sec, 0}.add(0, us*1000).date(d.Calendar)
	if err != nil {
		panic(err)
	}
	return r
}

func TestDecodeMatchesCftime(t *testing.T) {
	needCftime(t)
	cases := decodeCases()
	rep := runCftime(t, cftimeRequest{Decode: cases})
	compared, rejected := 0, 0
	for i, c := range cases {
		v, units, cal := c[0].(float64), c[1].(string), c[2].(string)
		u, err := Parse(units, cal, Options{CalendarMonths: true})
		if err != nil {
			t.Fatalf("Parse(%q, %q): %v", units, cal, err)
		}
		got, gotErr := u.Decode(v)
		var want []int
		if err := json.Unmarshal(rep.Decode[i], &want); err != nil {
			var msg string
			_ = json.Unmarshal(rep.Decode[i], &msg)
			if gotErr == nil {
				t.Errorf("Decode(%v) with %q (%s) = %v, cftime fails: %s", v, units, cal, got, msg)
			}
			continue
		}
		wantDate := Date{want[0], want[1], want[2], want[3], want[4], want[5], want[6] * 1000, u.Calendar()}
		if !u.Calendar().HasYearZero() && want[0] < 1 {
			// CF-1.10 §4.4.1: no years before 1 in standard and julian.
			if !errors.Is(gotErr, ErrRange) {
				t.Errorf("Decode(%v) with %q (%s) = %v, %v; want ErrRange (cftime gives year %d, which CF-1.10 does not allow)",
					v, units, cal, got, gotErr, want[0])
			}
			rejected++
			continue
		}
		if gotErr != nil {
			t.Errorf("Decode(%v) with %q (%s): %v; cftime gives %v", v, units, cal, gotErr, wantDate)
			continue
		}
		r := roundMicro(got)
		if r.Year != want[0] || r.Month != want[1] || r.Day != want[2] || r.Hour != want[3] || r.Minute != want[4] ||
			math.Abs(r.Seconds()-wantDate.Seconds()) > 1e-6+1e-9 {
			t.Errorf("Decode(%v) with %q (%s) = %v, cftime gives %v", v, units, cal, got, wantDate)
		}
		compared++
	}
	t.Logf("%d decoded dates equal cftime's; %d year<1 dates rejected as CF-1.10 requires", compared, rejected)
	if compared < 300 {
		t.Fatalf("only %d cases compared", compared)
	}
}

func encodeCases() ([][9]any, []Date) {
	rng := rand.New(rand.NewPCG(7, 1582))
	units := []string{"days since 1850-01-01", "seconds since 1970-01-01 00:00:00", "hours since 1800-01-01 00:00:0.0",
		"minutes since 1582-10-15 00:00", "days since 1582-10-01 12:00:00", "hours since 1900-01-01 00:00:00 +05:00"}
	var cases [][9]any
	var dates []Date
	add := func(units string, d Date) {
		cases = append(cases, [9]any{units, d.Calendar.String(), d.Year, d.Month, d.Day, d.Hour, d.Minute, d.Second, d.Nanosecond / 1000})
		dates = append(dates, d)
	}
	for _, cal := range []Calendar{Standard, ProlepticGregorian, Julian, NoLeap, AllLeap, Day360} {
		edges := []Date{{1582, 10, 4, 23, 59, 59, 999999000, cal}, {1582, 10, 15, 0, 0, 0, 0, cal},
			{2000, 2, cal.DaysInMonth(2000, 2), 12, 0, 0, 0, cal}, {1900, 2, cal.DaysInMonth(1900, 2), 6, 0, 0, 0, cal},
			{1999, 12, cal.DaysInMonth(1999, 12), 18, 30, 0, 0, cal}}
		for _, units := range units {
			for _, d := range edges { // both sides of the 1582 reform, month ends
				add(units, d)
			}
			for range 8 {
				y := 1 + rng.IntN(2600)
				m := 1 + rng.IntN(12)
				d := Date{y, m, 1 + rng.IntN(cal.monthLength(y, m)), rng.IntN(24), rng.IntN(60), rng.IntN(60), rng.IntN(1000000) * 1000, cal}
				if d.Validate() != nil { // the 1582 gap of standard
					d.Day = 15
				}
				add(units, d)
			}
		}
	}
	return cases, dates
}

func TestEncodeMatchesCftime(t *testing.T) {
	needCftime(t)
	cases, dates := encodeCases()
	rep := runCftime(t, cftimeRequest{Encode: cases})
	for i, c := range cases {
		units := c[0].(string)
		var want float64
		if err := json.Unmarshal(rep.Encode[i], &want); err != nil {
			t.Errorf("cftime cannot encode %v in %q: %s", dates[i], units, rep.Encode[i])
			continue
		}
		u, err := ParseUnits(units, dates[i].Calendar, Options{})
		if err != nil {
			t.Fatal(err)
		}
		got, err := u.Encode(dates[i])
		if err != nil {
			t.Errorf("Encode(%v) in %q: %v", dates[i], units, err)
			continue
		}
		unit := float64(u.Unit().seconds())
		// cftime's float64 result resolves about a microsecond at these magnitudes.
		if tol := (2e-6 + 4*math.Abs(want)*unit*0x1p-52) / unit; math.Abs(got-want) > tol {
			t.Errorf("Encode(%v) in %q (%v) = %.17g, cftime gives %.17g (diff %.3g s)", dates[i], units, dates[i].Calendar, got, want, (got-want)*unit)
		}
	}
	t.Logf("%d encoded values equal cftime's", len(cases))
}

// Both must refuse a reference date that the calendar does not have, and
// accept one that it has (CF-1.10 §4.4.1 calendar definitions).
func TestReferenceValidityMatchesCftime(t *testing.T) {
	needCftime(t)
	cases := [][2]any{
		{"days since 1582-10-10", "standard"}, {"days since 1582-10-10", "gregorian"},
		{"days since 1582-10-10", "proleptic_gregorian"}, {"days since 1582-10-10", "julian"},
		{"days since 1582-10-04", "standard"}, {"days since 1582-10-15", "standard"},
		{"days since 2000-02-29", "noleap"}, {"days since 2000-02-29", "365_day"},
		{"days since 2000-02-29", "all_leap"}, {"days since 1900-02-29", "all_leap"},
		{"days since 1900-02-29", "julian"}, {"days since 1900-02-29", "proleptic_gregorian"},
		{"days since 1900-02-29", "standard"}, {"days since 1500-02-29", "standard"},
		{"days since 1500-02-29", "proleptic_gregorian"}, {"days since 2001-02-30", "360_day"},
		{"days since 2001-02-30", "standard"}, {"days since 2001-02-30", "all_leap"},
		{"days since 2001-02-31", "360_day"}, {"days since 2001-13-01", "standard"},
		{"days since 2001-01-01 24:00", "standard"}, {"days since 2001-01-01 23:60", "noleap"},
		{"days since 0000-01-01", "standard"}, {"days since 0000-01-01", "julian"},
		{"days since 0000-01-01", "noleap"}, {"days since 0000-01-01", "proleptic_gregorian"},
		{"days since 2001-4-31", "julian"}, {"days since 2001-4-31", "360_day"},
	}
	rep := runCftime(t, cftimeRequest{Parse: cases})
	for i, c := range cases {
		_, err := Parse(c[0].(string), c[1].(string), Options{})
		if ok := err == nil; ok != (rep.Parse[i] == "ok") {
			t.Errorf("Parse(%q, %q): err = %v; cftime: %s", c[0], c[1], err, rep.Parse[i])
		}
	}
}
