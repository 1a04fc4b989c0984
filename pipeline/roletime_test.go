package pipeline

import (
	"context"
	"fmt"
	"math"
	"slices"
	"strings"
	"testing"

	"lidscope/cf"
	"lidscope/config"
)

// axisCDL writes a CDL file (invented fixture data) of variable v on a
// 2×3 tropical grid whose time coordinate has the given units and
// calendar attributes (none when empty) and values, on the pressure
// levels plev (hPa; none when empty); the value at step s is val(s)
// everywhere.
func axisCDL(name, v, std, units, timeUnits, calendar string, times, plev []float64, val func(s int) float64) string {
	var b strings.Builder
	fmt.Fprintf(&b, "netcdf %s {\ndimensions: time = %d ; ", name, len(times))
	if len(plev) > 0 {
		fmt.Fprintf(&b, "plev = %d ; ", len(plev))
	}
	b.WriteString("lat = 2 ; lon = 3 ;\nvariables:\n\tdouble time(time) ; time:axis = \"T\" ;")
	if timeUnits != "" {
		fmt.Fprintf(&b, " time:units = %q ;", timeUnits)
	}
	if calendar != "" {
		fmt.Fprintf(&b, " time:calendar = %q ;", calendar)
	}
	b.WriteString("\n")
	dims := "time, lat, lon"
	if len(plev) > 0 {
		b.WriteString("\tdouble plev(plev) ; plev:units = \"hPa\" ; plev:axis = \"Z\" ; plev:positive = \"down\" ;\n")
		dims = "time, plev, lat, lon"
	}
	b.WriteString("\tdouble lat(lat) ; lat:units = \"degrees_north\" ;\n\tdouble lon(lon) ; lon:units = \"degrees_east\" ;\n")
	fmt.Fprintf(&b, "\tfloat %s(%s) ; %s:standard_name = %q ; %s:units = %q ;\ndata:\n", v, dims, v, std, v, units)
	join := func(xs []float64) string {
		s := make([]string, len(xs))
		for i, x := range xs {
			s[i] = fmt.Sprint(x)
		}
		return strings.Join(s, ", ")
	}
	fmt.Fprintf(&b, "\ttime = %s ;\n", join(times))
	if len(plev) > 0 {
		fmt.Fprintf(&b, "\tplev = %s ;\n", join(plev))
	}
	b.WriteString("\tlat = -10, 10 ; lon = 0, 120, 240 ;\n")
	var vals []float64
	for s := range times {
		for range max(1, len(plev)) * 6 {
			vals = append(vals, val(s))
		}
	}
	fmt.Fprintf(&b, "\t%s = %s ;\n}\n", v, join(vals))
	return b.String()
}

func count(from, n int) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = float64(from + i)
	}
	return out
}

// standardMidMonth are mid-month day numbers of 2001 from 2001-01-01
// (standard calendar).
var standardMidMonth = []float64{15, 45, 74, 105, 135, 166, 196, 227, 258, 288, 319, 349}

// TestPerRoleTime runs studies whose roles need different time
// declarations (study key time.ROLE): the situations of real files that
// come from different sources. SST is 290 K + the month number and the
// cloud fraction the month number / 100 everywhere, so each step's
// tropical-mean SST and band-mean cloud name the months the run paired.
func TestPerRoleTime(t *testing.T) {
	dir := t.TempDir()
	sstOf := func(month int) float64 { return 290 + float64(month) }
	cloudOf := func(month int) float64 { return float64(month) / 100 }
	files := map[string]string{
		// a non-CF "Month" axis counting from 1 …
		"sst_month1.nc": axisCDL("sst_month1", "tos", "sea_surface_temperature", "K", "Month", "", count(1, 12), nil, func(s int) float64 { return sstOf(s + 1) }),
		// … and one counting from 0
		"cll_month0.nc": axisCDL("cll_month0", "cll", "low_type_cloud_area_fraction", "1", "Month", "", count(0, 12), nil, func(s int) float64 { return cloudOf(s + 1) }),
		// CF axes, 2001
		"ta_cf.nc":  axisCDL("ta_cf", "ta", "air_temperature", "K", "days since 2001-01-01", "standard", standardMidMonth, []float64{850, 700}, func(int) float64 { return 283 }),
		"cll_cf.nc": axisCDL("cll_cf", "cll", "low_type_cloud_area_fraction", "1", "days since 2001-01-01", "standard", standardMidMonth, nil, func(s int) float64 { return cloudOf(s + 1) }),
		"sst_cf.nc": axisCDL("sst_cf", "tos", "sea_surface_temperature", "K", "days since 2001-01-01", "standard", standardMidMonth, nil, func(s int) float64 { return sstOf(s + 1) }),
		// a year-0 axis in the standard calendar, where year 0 does not
		// exist (CF-1.10 §4.4.1)
		"clt_year0.nc": axisCDL("clt_year0", "clt", "cloud_area_fraction", "1", "hours since 0000-01-01 00:00:00", "", func() []float64 {
			h := make([]float64, 12)
			for i, d := range standardMidMonth {
				h[i] = 24 * d
			}
			return h
		}(), nil, func(s int) float64 { return cloudOf(s + 1) }),
	}
	for name, cdl := range files {
		ncgenFile(t, dir, name, cdl)
	}
	// The study of each case: {FILES} and {TIME} filled in.
	const study = `datasets:
  mixed:
    files: {FILES}
    time: TIME
analysis:
  cloud: CLOUD
output: {plots: false}
`
	cases := []struct {
		name, files, time, cloud string
		wantErr                  string // from config.Parse or Run; "" = runs
		note                     string
	}{
		{"Month axes from 1 and from 0, each declared",
			"{sst: sst_month1.nc, low_cloud: cll_month0.nc, air_temperature: ta_cf.nc}",
			`{sst: {units: "months since 2000-12-01"}, low_cloud: {units: "months since 2001-01-01"}}`, "low_cloud", "",
			`low_cloud (cll): time axis read with the study's time units "months since 2001-01-01", standard calendar`},
		// one declaration for the whole dataset fits one of the two Month
		// axes only
		{"one declaration for both Month axes",
			"{sst: sst_month1.nc, low_cloud: cll_month0.nc}",
			`{units: "months since 2000-12-01"}`, "low_cloud", "", "shifted"},
		{"year-0 axis declared a climatology beside a CF axis",
			"{sst: sst_cf.nc, cloud: clt_year0.nc, air_temperature: ta_cf.nc}",
			`{cloud: {climatology: true}}`, "cloud", "", "cloud (clt) is a 12-month climatology"},
		// the Month SST axis declared a 12-month climatology on its own:
		// the run follows the dated records, from the start the study sets
		{"Month SST axis a climatology beside dated records",
			"{sst: sst_month1.nc, low_cloud: cll_cf.nc, air_temperature: ta_cf.nc}",
			`{sst: {climatology: true}, start: "2001-03"}`, "low_cloud", "", "sst (tos) is a 12-month climatology and air_temperature (ta) a dated record"},
		{"year-0 axis undeclared",
			"{sst: sst_cf.nc, cloud: clt_year0.nc}",
			`{}`, "cloud", "year 0 does not exist in the standard calendar", ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			src := strings.NewReplacer("{FILES}", c.files, "TIME", c.time, "CLOUD", c.cloud).Replace(study)
			r, err := config.Parse([]byte(src), "yaml", dir, config.LoadOptions{LookupEnv: config.NoEnvironment})
			if err != nil {
				t.Fatalf("%v\n%s", err, src)
			}
			d := &r.Datasets[0]
			p, err := PlanFor(r, d)
			if err != nil {
				t.Fatal(err)
			}
			res, err := Run(context.Background(), p)
			if c.wantErr != "" {
				if err == nil || !strings.Contains(err.Error(), c.wantErr) {
					t.Fatalf("error %v; want one saying %q", err, c.wantErr)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			steps, first, last := 12, "2001-01", "2001-12"
			switch {
			case c.note == "shifted":
				steps, last = 11, "2001-11" // the cloud axis ends a month early
			case strings.Contains(c.time, "start"):
				steps, first = 10, "2001-03"
			}
			if len(res.Labels) != steps || res.Labels[0] != first || res.Labels[steps-1] != last {
				t.Fatalf("labels %v, want %s … %s", res.Labels, first, last)
			}
			qc := slices.Index(res.Acc.L.Quantities, c.cloud)
			if qc < 0 {
				t.Fatalf("no %s among the quantities %v", c.cloud, res.Acc.L.Quantities)
			}
			shift := 0
			if c.note == "shifted" {
				// the Month-0 cloud read with the sst's declaration is one
				// month early: step 2001-01 pairs SST of January with the
				// cloud of February
				shift = 1
			} else if c.note != "" && !strings.Contains(strings.Join(res.Notes, "\n"), c.note) {
				t.Errorf("notes lack %q:\n%s", c.note, strings.Join(res.Notes, "\n"))
			}
			for k, sp := range res.Acc.Series {
				month := k + 1 + 12 - steps
				if c.note == "shifted" {
					month = k + 1
				}
				if math.Abs(sp.TropMean-sstOf(month)) > 1e-4 {
					t.Errorf("step %s: tropical-mean SST %v, want %v", sp.Label, sp.TropMean, sstOf(month))
				}
				cl := math.NaN()
				for _, x := range sp.Means[qc] {
					if !math.IsNaN(x) {
						cl = x
					}
				}
				if want := cloudOf(month + shift); math.Abs(cl-want) > 1e-6 {
					t.Errorf("step %s: band-mean %s %v, want %v", sp.Label, c.cloud, cl, want)
				}
			}
		})
	}
}

// TestPerRoleTimeSpec: the time declaration each role gets from the study
// (its own, else the dataset's) is the one cf decodes with: the same
// Month values read with the two declarations of the first case above
// give the same dates, and with the dataset's declaration alone they do
// not.
func TestPerRoleTimeSpec(t *testing.T) {
	dir := t.TempDir()
	ncgenFile(t, dir, "sst.nc", axisCDL("sst", "tos", "sea_surface_temperature", "K", "Month", "", count(1, 12), nil, func(int) float64 { return 300 }))
	ncgenFile(t, dir, "cll.nc", axisCDL("cll", "cll", "low_type_cloud_area_fraction", "1", "Month", "", count(0, 12), nil, func(int) float64 { return 0.3 }))
	for _, c := range []struct {
		time    string
		sameAxe bool
	}{
		{`{units: "months since 2000-12-01", low_cloud: {units: "months since 2001-01-01"}}`, true},
		{`{units: "months since 2000-12-01"}`, false},
	} {
		src := "datasets:\n  m:\n    files: {sst: sst.nc, low_cloud: cll.nc}\n    time: " + c.time + "\n"
		r, err := config.Parse([]byte(src), "yaml", dir, config.LoadOptions{LookupEnv: config.NoEnvironment})
		if err != nil {
			t.Fatal(err)
		}
		d := &r.Datasets[0]
		var axes [2][]string
		for i, role := range []cf.Role{cf.RoleSST, cf.RoleLowCloud} {
			f, err := cf.Open(d.Inputs[role], d.Spec(role))
			if err != nil {
				t.Fatalf("%s: %v", role, err)
			}
			for _, dt := range f.Time.Dates {
				axes[i] = append(axes[i], dt.YearMonth().String())
			}
			if !f.Time.Declared {
				t.Errorf("%s: the time axis is not marked as declared in the study", role)
			}
			f.Close()
		}
		if same := slices.Equal(axes[0], axes[1]); same != c.sameAxe || axes[0][0] != "2001-01" {
			t.Errorf("time %s: sst %v, low_cloud %v", c.time, axes[0], axes[1])
		}
	}
}
