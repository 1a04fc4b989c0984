package analysis

import (
	"context"
	"encoding/json"
	"lidscope/regimes"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"lidscope/config"
	"lidscope/figures"
	"lidscope/fixtures"
	"lidscope/internal/testutil"
	"lidscope/netcdf"
	"lidscope/output"
	"lidscope/relations"
)

// dropInputs removes the input lines of the named roles (and the
// analysis.cloud choice when cloud goes) from a generated study.
func dropInputs(t *testing.T, path string, roles ...string) {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var keep []string
	for _, l := range strings.Split(string(b), "\n") {
		drop := false
		for _, r := range roles {
			if strings.HasPrefix(l, "      "+r+":") || r == "low_cloud" && strings.HasPrefix(l, "  cloud: low_cloud") {
				drop = true
			}
		}
		if !drop {
			keep = append(keep, l)
		}
	}
	if err := os.WriteFile(path, []byte(strings.Join(keep, "\n")), 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestOptionalInputsEndToEnd runs the synthetic world (invented data) with
// SST only, with SST and T700, and with every input, and checks that each
// run has exactly the quantities, files and figures its inputs allow, and
// that what the reduced runs have equals the full run's (synthetic truth:
// regimes, crossings and series depend on SST alone, LTS/EIS on SST and
// T700 alone).
func TestOptionalInputsEndToEnd(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	data := privateSmallData(t) // the reduced studies are written beside the full one
	full := filepath.Join(data, fixtures.StudyFile)
	src, err := os.ReadFile(full)
	if err != nil {
		t.Fatal(err)
	}
	run := func(name string, drop ...string) Report {
		t.Helper()
		p := filepath.Join(data, name+".yaml")
		if err := os.WriteFile(p, src, 0o644); err != nil {
			t.Fatal(err)
		}
		dropInputs(t, p, drop...)
		r, err := config.Load(p, config.LoadOptions{LookupEnv: config.NoEnvironment})
		if err != nil {
			t.Fatal(err)
		}
		reps, err := Run(context.Background(), r, nil, Options{OutDir: filepath.Join(dir, name), NoCoastlines: true})
		if err != nil {
			t.Fatal(err)
		}
		return reps[0]
	}
	ref := run("full")
	cases := []struct {
		name        string
		drop        []string
		quantities  []string
		figures     []string // must be drawn
		noFigures   []string // must not be
		absentWords []string
	}{
		{"sst_only", []string{"air_temperature", "low_cloud"}, []string{"sst"},
			[]string{"map_convective_time_fraction", "map_crossing_rate", "map_relative_sst", "series"}, []string{"map_eis", "map_lts", "map_low_cloud"},
			[]string{"no 700 hPa temperature, LTS or EIS", "no cloud statistics", "no relationship analysis"}},
		{"sst_t700", []string{"low_cloud"}, []string{"sst", "t700", "lts", "eis"},
			[]string{"map_convective_time_fraction", "map_crossing_rate", "map_eis", "map_lts", "series"}, []string{"map_low_cloud"},
			[]string{"no cloud statistics", "no relationship analysis"}},
	}
	reps := map[string]Report{}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rep := run(c.name, c.drop...)
			reps[c.name] = rep
			l := rep.Result.Acc.L
			if !slices.Equal(l.Quantities, c.quantities) || l.Cloud != "" {
				t.Errorf("quantities %v (cloud %q), want %v", l.Quantities, l.Cloud, c.quantities)
			}
			// what the run has equals the full run's
			ra := ref.Result.Acc
			full := rep.Result.Acc
			for i := range ra.NCells() {
				if ra.ValidSteps(i) != full.ValidSteps(i) || ra.Track(i) != full.Track(i) {
					t.Fatalf("cell %d: regimes or crossings differ from the full run", i)
				}
			}
			for qi, q := range l.Quantities {
				ri := slices.Index(ra.L.Quantities, q)
				for r := regimes.Regime(0); r < 3; r++ {
					for i := range ra.NCells() {
						if ra.Moments(ri, r, i) != full.Moments(qi, r, i) {
							t.Fatalf("%s regime %d cell %d differs from the full run", q, r, i)
						}
					}
				}
			}
			// the files say which quantities they have, and the absent ones are absent
			var sum struct {
				Quantities []string                   `json:"quantities"`
				Absent     []string                   `json:"absent_quantities"`
				Means      map[string]json.RawMessage `json:"band_mean"`
			}
			b, err := os.ReadFile(filepath.Join(rep.OutDir, output.SummaryJSON))
			if err != nil {
				t.Fatal(err)
			}
			if err := json.Unmarshal(b, &sum); err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(sum.Quantities, c.quantities) || len(sum.Means) != len(c.quantities) {
				t.Errorf("summary.json quantities %v, %d regime means; want %v", sum.Quantities, len(sum.Means), c.quantities)
			}
			absent := strings.Join(sum.Absent, "; ")
			for _, w := range c.absentWords {
				if !strings.Contains(absent, w) {
					t.Errorf("summary.json absent_quantities %q lacks %q", absent, w)
				}
			}
			f, err := netcdf.Open(filepath.Join(rep.OutDir, output.MapsNC))
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			if a, err := f.Attr("quantities"); err != nil {
				t.Errorf("maps.nc quantities attribute: %v", err)
			} else if txt, _ := a.Text(); txt != strings.Join(c.quantities, " ") {
				t.Errorf("maps.nc quantities attribute %q", txt)
			}
			vars, err := f.Vars()
			if err != nil {
				t.Fatal(err)
			}
			for _, v := range vars {
				for _, gone := range []string{"eis", "lts", "low_cloud", "t700"} {
					if !slices.Contains(c.quantities, gone) && strings.HasPrefix(v.Name, gone+"_") {
						t.Errorf("maps.nc has %s, but the run has no %s", v.Name, gone)
					}
				}
			}
			head, err := os.ReadFile(filepath.Join(rep.OutDir, output.SeriesCSV))
			if err != nil {
				t.Fatal(err)
			}
			first := strings.SplitN(string(head), "\n", 2)[0]
			if strings.Contains(first, "low_cloud") || !slices.Contains(c.quantities, "eis") && strings.Contains(first, "eis_") {
				t.Errorf("series.csv header has absent quantities: %s", first)
			}
			for _, n := range relations.OutputNames() {
				if _, err := os.Stat(filepath.Join(rep.OutDir, n)); err == nil {
					t.Errorf("%s written without a relationship analysis", n)
				}
			}
			// every figure's footer says what the run lacks
			svgs, err := figures.Draw(rep.OutDir, figures.Options{Format: "svg", OutDir: filepath.Join(t.TempDir(), "svg"), NoCoastlines: true})
			if err != nil {
				t.Fatal(err)
			}
			for _, p := range svgs {
				b, err := os.ReadFile(p)
				if err != nil {
					t.Fatal(err)
				}
				if !strings.Contains(string(b), "no cloud statistics") {
					t.Errorf("%s: the footer does not say what the run lacks", filepath.Base(p))
				}
			}
			figDir := filepath.Join(rep.OutDir, figures.DefaultDirName)
			for _, n := range c.figures {
				if _, err := os.Stat(filepath.Join(figDir, n+".png")); err != nil {
					t.Errorf("figure %s not drawn: %v", n, err)
				}
			}
			for _, n := range c.noFigures {
				if _, err := os.Stat(filepath.Join(figDir, n+".png")); err == nil {
					t.Errorf("figure %s drawn without its inputs", n)
				}
			}
		})
	}
	// compare compares what both runs have and lists what it could not
	if len(reps) != 2 {
		t.Fatal("a reduced run failed")
	}
	res, _, err := CompareDirs(ref.OutDir, []string{reps["sst_t700"].OutDir, reps["sst_only"].OutDir}, filepath.Join(dir, "cmp"), CompareOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for k, want := range []struct{ has, lacks string }{{"subsidence_eis_mean", "subsidence_low_cloud_mean"}, {"convective_area_fraction_mean", "subsidence_eis_mean"}} {
		c := res.Candidates[k]
		if _, ok := c.Scalar(want.has); !ok {
			t.Errorf("%s: %s not compared", c.Dir, want.has)
		}
		if _, ok := c.Scalar(want.lacks); ok {
			t.Errorf("%s: %s compared, but the run lacks it", c.Dir, want.lacks)
		}
		notes := strings.Join(c.Notes, "; ")
		for _, w := range []string{want.lacks + " not compared", "no relationship results"} {
			if !strings.Contains(notes, w) {
				t.Errorf("%s: notes %q lack %q", c.Dir, notes, w)
			}
		}
		if c.Maps[0].Corr != 1 || c.Maps[0].CRMS != 0 {
			t.Errorf("%s: the convective-fraction map differs from the full run's (SST alone decides it): %+v", c.Dir, c.Maps[0])
		}
	}
}

// allInOneCDL is an invented file (synthetic fixture) holding SST and
// temperature on levels but no cloud: read through files.any.
const allInOneCDL = `netcdf all_in_one {
dimensions: time = 2 ; plev = 2 ; lat = 2 ; lon = 3 ;
variables:
	double time(time) ; time:units = "days since 2001-01-01" ; time:calendar = "standard" ;
	double plev(plev) ; plev:units = "hPa" ; plev:axis = "Z" ;
	float lat(lat) ; lat:units = "degrees_north" ;
	float lon(lon) ; lon:units = "degrees_east" ;
	float tos(time, lat, lon) ; tos:standard_name = "sea_surface_temperature" ; tos:units = "K" ;
	float ta(time, plev, lat, lon) ; ta:standard_name = "air_temperature" ; ta:units = "K" ;
data:
	time = 15, 45 ; plev = 850, 700 ; lat = -10, 10 ; lon = 0, 120, 240 ;
	tos = 300, 302, 298, 299, 301, 297,  300, 302, 298, 299, 301, 297 ;
	ta = 290, 290, 290, 290, 290, 290,  283, 283, 283, 283, 283, 283,  290, 290, 290, 290, 290, 290,  283, 283, 283, 283, 283, 283 ;
}
`

// A study that reads its roles from files.any runs without the optional
// roles those files do not hold, and says so.
func TestInputsAllWithoutCloud(t *testing.T) {
	dir := t.TempDir()
	nc := testutil.CDL(t, allInOneCDL, filepath.Join(dir, "all.nc"))
	p := filepath.Join(dir, "study.yaml")
	study := "datasets:\n  all-in-one:\n    files:\n      any: \"" + nc + "\"\n    ocean: {mask: sst}\noutput: {dir: \"" + dir + "\", plots: false}\n"
	if err := os.WriteFile(p, []byte(study), 0o644); err != nil {
		t.Fatal(err)
	}
	r, err := config.Load(p, config.LoadOptions{LookupEnv: config.NoEnvironment})
	if err != nil {
		t.Fatal(err)
	}
	reps, err := Run(context.Background(), r, nil, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if q := reps[0].Result.Acc.L.Quantities; !slices.Equal(q, []string{"sst", "t700", "lts", "eis"}) {
		t.Errorf("quantities %v", q)
	}
	if n := strings.Join(reps[0].Result.Notes, "\n"); !strings.Contains(n, "low_cloud is not in the files of files.any, so the run goes without it") {
		t.Errorf("notes:\n%s", n)
	}
}
