package pipeline

import (
	"context"
	"fmt"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/cf"
	"lidscope/internal/testutil"
	"lidscope/metrics"
	"lidscope/regimes"
)

// ncgenFile compiles CDL text (invented fixture data) with ncgen
// (netcdf-bin) into dir/name.
func ncgenFile(t *testing.T, dir, name, cdl string) string {
	t.Helper()
	return testutil.CDL(t, cdl, filepath.Join(dir, name))
}

// cdlField writes a CDL file of variable v on a 2×3 tropical grid with nt
// time steps stamped at times (in "days since ORIGIN", noleap), on the
// pressure levels plev (hPa; none when empty), whose value at step s is
// val(s) everywhere.
func cdlField(name, v, std, units, origin string, times []float64, plev []float64, val func(s int) float64) string {
	var b strings.Builder
	nt := len(times)
	fmt.Fprintf(&b, "netcdf %s {\ndimensions: time = %d ; ", name, nt)
	if len(plev) > 0 {
		fmt.Fprintf(&b, "plev = %d ; ", len(plev))
	}
	b.WriteString("lat = 2 ; lon = 3 ;\nvariables:\n")
	fmt.Fprintf(&b, "\tdouble time(time) ; time:units = \"days since %s\" ; time:calendar = \"noleap\" ; time:axis = \"T\" ;\n", origin)
	dims := "time, lat, lon"
	if len(plev) > 0 {
		b.WriteString("\tdouble plev(plev) ; plev:units = \"hPa\" ; plev:axis = \"Z\" ; plev:positive = \"down\" ;\n")
		dims = "time, plev, lat, lon"
	}
	b.WriteString("\tdouble lat(lat) ; lat:units = \"degrees_north\" ;\n\tdouble lon(lon) ; lon:units = \"degrees_east\" ;\n")
	fmt.Fprintf(&b, "\tfloat %s(%s) ; %s:standard_name = %q ; %s:units = %q ;\ndata:\n", v, dims, v, std, v, units)
	var ts []string
	for _, x := range times {
		ts = append(ts, fmt.Sprint(x))
	}
	fmt.Fprintf(&b, "\ttime = %s ;\n", strings.Join(ts, ", "))
	if len(plev) > 0 {
		var ps []string
		for _, p := range plev {
			ps = append(ps, fmt.Sprint(p))
		}
		fmt.Fprintf(&b, "\tplev = %s ;\n", strings.Join(ps, ", "))
	}
	b.WriteString("\tlat = -10, 10 ; lon = 0, 120, 240 ;\n")
	var vals []string
	nl := max(1, len(plev))
	for s := 0; s < nt; s++ {
		for range nl * 6 {
			vals = append(vals, fmt.Sprint(val(s)))
		}
	}
	fmt.Fprintf(&b, "\t%s = %s ;\n}\n", v, strings.Join(vals, ", "))
	return b.String()
}

// midMonth are noleap mid-month day numbers from 1 January of a year.
var midMonth = []float64{15, 45, 74, 105, 135, 166, 196, 227, 258, 288, 319, 349}

func monthlyYears(years int) []float64 {
	var out []float64
	for y := 0; y < years; y++ {
		for _, d := range midMonth {
			out = append(out, float64(365*y)+d)
		}
	}
	return out
}

// TestAlignClimatologyWithRecords covers a 12-month climatology of one
// role beside monthly years of another (aligned by calendar month, with a
// note) and a single-month field beside a 12-month climatology (aligned
// with that month). SST is the same everywhere, 290 K + the month number,
// so the tropical mean of each step names the month the run used.
func TestAlignClimatologyWithRecords(t *testing.T) {
	dir := t.TempDir()
	sstOf := func(month int) float64 { return 290 + float64(month) }
	sstClim := ncgenFile(t, dir, "sst_clim.nc", cdlField("sst_clim", "tos", "sea_surface_temperature", "K", "0001-01-01", midMonth, nil, func(s int) float64 { return sstOf(s + 1) }))
	sstYears := ncgenFile(t, dir, "sst_years.nc", cdlField("sst_years", "tos", "sea_surface_temperature", "K", "2001-01-01", monthlyYears(2), nil, func(s int) float64 { return sstOf(s%12 + 1) }))
	taClim := ncgenFile(t, dir, "ta_clim.nc", cdlField("ta_clim", "ta", "air_temperature", "K", "0001-01-01", midMonth, []float64{850, 700}, func(s int) float64 { return 283 }))
	taYears := ncgenFile(t, dir, "ta_years.nc", cdlField("ta_years", "ta", "air_temperature", "K", "2001-01-01", monthlyYears(2), []float64{850, 700}, func(s int) float64 { return 283 }))
	taJuly := ncgenFile(t, dir, "ta_july.nc", cdlField("ta_july", "ta", "air_temperature", "K", "2001-01-01", []float64{196}, []float64{850, 700}, func(s int) float64 { return 283 }))
	cases := []struct {
		name, sst, ta string
		labels        []string // first and last
		steps         int
		month         func(k int) int // calendar month of step k
		note          string
		climatology   bool // the run is over a 12-month climatology
	}{
		{"climatological SST, monthly years of T700", sstClim, taYears, []string{"2001-01", "2002-12"}, 24, func(k int) int { return k%12 + 1 }, "sst (tos) is a 12-month climatology and air_temperature (ta) a dated record", false},
		{"monthly years of SST, climatological T700", sstYears, taClim, []string{"2001-01", "2002-12"}, 24, func(k int) int { return k%12 + 1 }, "air_temperature (ta) is a 12-month climatology; it is aligned with the sst record", false},
		{"climatological SST, a single month of T700", sstClim, taJuly, []string{"2001-07", "2001-07"}, 1, func(int) int { return 7 }, "the run follows that month", false},
		// both climatologies: the steps are calendar months, labelled Jan … Dec
		{"climatological SST and T700", sstClim, taClim, []string{"Jan", "Dec"}, 12, func(k int) int { return k + 1 }, "", true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := Plan{
				Dataset: "align", SST: Input{Paths: []string{c.sst}, Spec: cf.Spec{Role: cf.RoleSST}},
				T700:  &Input{Paths: []string{c.ta}, Spec: cf.Spec{Role: cf.RoleAirTemp, Level: 70000}},
				Ocean: Ocean{Kind: "sst"}, Metrics: metrics.DefaultConventions(),
				Regimes: regimes.Definition{Delta: 1.5, Band: regimes.Band{South: -30, North: 30}},
			}
			res, err := Run(context.Background(), p)
			if err != nil {
				t.Fatal(err)
			}
			if len(res.Labels) != c.steps || res.Labels[0] != c.labels[0] || res.Labels[len(res.Labels)-1] != c.labels[1] {
				t.Fatalf("labels %v, want %d from %s to %s", res.Labels, c.steps, c.labels[0], c.labels[1])
			}
			for k, sp := range res.Acc.Series {
				if want := sstOf(c.month(k)); math.Abs(sp.TropMean-want) > 1e-4 {
					t.Errorf("step %s: tropical-mean SST %v, want %v (month %d)", sp.Label, sp.TropMean, want, c.month(k))
				}
			}
			if notes := strings.Join(res.Notes, "\n"); !strings.Contains(notes, c.note) {
				t.Errorf("notes lack %q:\n%s", c.note, notes)
			}
			if (res.Sampling == cf.StepClimatology) != c.climatology {
				t.Errorf("sampling %v", res.Sampling)
			}
		})
	}
}
