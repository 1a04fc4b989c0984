package config_test

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/cf"
	"lidscope/config"
	"lidscope/internal/testutil"
	"lidscope/units"
)

const (
	grid2 = "91×181 lat×lon, regular 2° latitude × 2° longitude; lat -90…90, lon -180…180; bounds derived from midpoints"
	grid1 = "180×360 lat×lon, regular 1° latitude × 1° longitude; lat -89.5…89.5, lon -179.5…179.5; bounds derived from midpoints"
	// the error cf gives for a time axis with bare "Month" units (see cf/time.go and calendar)
	monthProblem = `role sst: x.nc: time coordinate time, attribute units = "Month": time units not in CF form: time units "Month" name a unit but no reference date (no "since <date>"); fix the attribute or declare the time axis in the study`
)

func field(role cf.Role, v, how, grid, time string, problems ...string) cf.VarReport {
	return cf.VarReport{Role: role, Var: v, How: how, Grid: grid, Time: time, Problems: problems}
}

func report(path string, steps int, fields ...cf.VarReport) *cf.FileReport {
	r := &cf.FileReport{Path: path, Fields: fields, Usable: true}
	if steps > 0 {
		r.Dims = []cf.DimReport{{Name: "time", Len: steps, Unlimited: true}, {Name: "lat", Len: 91}}
	}
	return r
}

// unitsProblem is what cf.CheckValues says about values that contradict
// their units (the text inspect reports).
func unitsProblem(t *testing.T, role cf.Role, kind units.Kind, u string, lo, hi float64) string {
	t.Helper()
	c, err := units.Parse(kind, u)
	if err != nil {
		t.Fatal(err)
	}
	ps := cf.CheckValues(role, c, c.Apply(lo), c.Apply(hi), 10, 10)
	if len(ps) == 0 {
		t.Fatalf("cf.CheckValues finds nothing wrong with %g…%g %q", lo, hi, u)
	}
	return ps[0]
}

// TestStarter: Starter output for various inspect results loads (when the
// files cover the required roles) and carries the suggestions.
func TestStarter(t *testing.T) {
	byStd := "standard_name x"
	byName := "variable name x and its units"
	clim := "12-month climatology (standard calendar)"
	monthly := "1979-01-16 … 2018-12-16, 480 monthly steps (standard calendar)"
	cases := []struct {
		name    string
		reports func(t *testing.T) []*cf.FileReport
		loads   bool
		has     []string // substrings of the text
		hasNot  []string
		check   func(t *testing.T, r *config.Study)
	}{
		{"complete CF set", func(t *testing.T) []*cf.FileReport {
			return []*cf.FileReport{
				report("sst.nc", 480, field(cf.RoleSST, "tos", byStd, grid2, monthly)),
				report("ta.nc", 480, field(cf.RoleAirTemp, "ta", byStd, grid2, monthly)),
				report("cll.nc", 480, field(cf.RoleLowCloud, "cll", byStd, grid2, monthly)),
			}
		}, true, []string{`sst: "sst.nc"`, `air_temperature: "tos"`[:0] + `air_temperature: "ta"`, "climatology: false", `target: ""`, "mask: sst", "humidity: 0.8"}, []string{"# CHECK", "# MISSING"},
			func(t *testing.T, r *config.Study) {
				d := r.Datasets[0]
				if d.Variables[cf.RoleSST] != "tos" || d.Cloud != cf.RoleLowCloud || d.Time.Climatology {
					t.Errorf("%+v", d)
				}
			}},
		{"non-CF climatology, categorical mask, units suspect", func(t *testing.T) []*cf.FileReport {
			return []*cf.FileReport{
				report("sstdata.nc", 12, field(cf.RoleSST, "sst", byName, "", "", monthProblem)),
				report("ta.nc", 12, field(cf.RoleAirTemp, "t", byStd, grid2, clim, unitsProblem(t, cf.RoleAirTemp, units.Temperature, "degC", 230, 300))),
				report("clt.nc", 12, field(cf.RoleCloud, "clt", byStd, grid2, clim, unitsProblem(t, cf.RoleCloud, units.Fraction, "1", 5, 95))),
				report("landsea.nc", 0, field(cf.RoleLandFraction, "LSMASK", byName, grid1, "", unitsProblem(t, cf.RoleLandFraction, units.Fraction, "1", 0, 4))),
			}
		}, true, []string{"climatology: true", "#   air_temperature: \"K\"", "#   cloud: \"%\"", "mask: categorical", "values: [0]", "target: sst", "CHECK: recognised by its name only"}, []string{"# MISSING", "start:"},
			func(t *testing.T, r *config.Study) {
				d := r.Datasets[0]
				if !d.Time.Climatology || d.Ocean.Method != config.OceanFromCategories || d.Ocean.Role != cf.RoleLandFraction ||
					len(d.Units) != 0 || d.Cloud != cf.RoleCloud || r.Analysis.Grid.TargetRole != cf.RoleSST {
					t.Errorf("%+v %+v", d, r.Analysis.Grid)
				}
				if s := d.Spec(cf.RoleSST); !s.Climatology {
					t.Error("the declared climatology does not reach cf.Spec")
				}
			}},
		{"non-CF time but not 12 steps", func(t *testing.T) []*cf.FileReport {
			return []*cf.FileReport{
				report("sst.nc", 480, field(cf.RoleSST, "sst", byStd, "", "", monthProblem)),
				report("ta.nc", 480, field(cf.RoleAirTemp, "ta", byStd, grid2, monthly)),
				report("cll.nc", 480, field(cf.RoleLowCloud, "cll", byStd, grid2, monthly)),
			}
		}, true, []string{"# sst: {units: \"days since 1979-01-01\", calendar: standard}", "sst: {climatology: true}", `"Month"`}, []string{"\n      climatology: true"},
			func(t *testing.T, r *config.Study) {
				if r.Datasets[0].Time.Climatology {
					t.Error("climatology declared for a 480-step axis")
				}
			}},
		{"climatology next to a monthly record is declared for its role", func(t *testing.T) []*cf.FileReport {
			return []*cf.FileReport{
				report("sst.nc", 12, field(cf.RoleSST, "sst", byStd, "", "", monthProblem)),
				report("ta.nc", 480, field(cf.RoleAirTemp, "ta", byStd, grid2, monthly)),
				report("cll.nc", 480, field(cf.RoleLowCloud, "cll", byStd, grid2, monthly)),
			}
		}, true, []string{"\n      sst: {climatology: true}", "aligned with the dated records by calendar month", `# start: "1979-01"`}, []string{"\n      climatology: true", "# declare how to read it"},
			func(t *testing.T, r *config.Study) {
				tm := r.Datasets[0].Time
				if tm.Climatology || !tm.For(cf.RoleSST).Climatology || tm.For(cf.RoleAirTemp).Climatology {
					t.Errorf("time %+v", tm)
				}
			}},
		{"missing roles", func(t *testing.T) []*cf.FileReport {
			return []*cf.FileReport{report("sst.nc", 480, field(cf.RoleSST, "tos", byStd, grid2, monthly))}
		}, true, []string{"# WITHOUT air_temperature: no file gave 700 hPa temperature, so the run will have no LTS, EIS", "# WITHOUT cloud: no file gave low_cloud or cloud, so the run will have no cloud statistics", "relationship analysis\n# will not run"}, []string{"# MISSING"},
			func(t *testing.T, r *config.Study) {
				if d := r.Datasets[0]; d.Cloud != "" || len(d.Inputs[cf.RoleAirTemp]) != 0 {
					t.Errorf("an SST-only starter should load with no cloud and no air temperature: %+v", d)
				}
			}},
		{"no sst", func(t *testing.T) []*cf.FileReport {
			return []*cf.FileReport{report("ta.nc", 480, field(cf.RoleAirTemp, "ta", byStd, grid2, monthly))}
		}, false, []string{"# MISSING: no file gave sst (required: SST is the minimum)"}, nil, nil},
		{"one record in two files, and another variable", func(t *testing.T) []*cf.FileReport {
			return []*cf.FileReport{
				report("sst_a.nc", 240, field(cf.RoleSST, "tos", byStd, grid2, monthly)),
				report("sst_b.nc", 240, field(cf.RoleSST, "tos", byStd, grid2, monthly)),
				report("sst_other.nc", 240, field(cf.RoleSST, "analysed_sst", byStd, grid1, monthly)),
				report("ta.nc", 480, field(cf.RoleAirTemp, "ta", byStd, grid2, monthly)),
				report("cll.nc", 480, field(cf.RoleLowCloud, "cll", byStd, grid2, monthly)),
			}
		}, true, []string{`sst: ["sst_a.nc", "sst_b.nc"]`, "# CHECK: sst_other.nc also gives sst (variable analysed_sst)"}, nil,
			func(t *testing.T, r *config.Study) {
				if n := len(r.Datasets[0].Inputs[cf.RoleSST]); n != 2 {
					t.Errorf("%d sst files", n)
				}
			}},
		{"humidity, pressure, sea ice, surface air, q on levels", func(t *testing.T) []*cf.FileReport {
			q := field(cf.RoleSpecHum, "hus", byStd, grid2, monthly)
			q.Level = "700 hPa read directly"
			return []*cf.FileReport{
				report("all.nc", 480,
					field(cf.RoleSST, "tos", byStd, grid2, monthly), field(cf.RoleAirTemp, "ta", byStd, grid2, monthly),
					field(cf.RoleLowCloud, "cll", byStd, grid2, monthly), field(cf.RoleRH, "hurs", byStd, grid2, monthly),
					field(cf.RoleSurfacePres, "ps", byStd, grid2, monthly), field(cf.RoleSeaIce, "siconc", byStd, grid2, monthly),
					field(cf.RoleSurfaceAir, "tas", byStd, grid2, monthly), field(cf.RoleSeaFraction, "sftof", byStd, grid2, "")),
				report("hus.nc", 480, q),
			}
		}, true, []string{"humidity: relative_humidity", "pressure: field", "ectei: true", "max_fraction: 0.15", "or air: the surface_air_temperature input", "from: sea_fraction", "mask: fraction"}, nil,
			func(t *testing.T, r *config.Study) {
				d := r.Datasets[0]
				if !d.Metrics.ECTEI || !d.Metrics.PressureField || d.Surface.HumidityRole != cf.RoleRH || !d.SeaIce.Use || d.Ocean.Role != cf.RoleSeaFraction {
					t.Errorf("%+v", d)
				}
				if d.Spec(cf.RoleSpecHum).Level != 70000 {
					t.Error("q is not read at 700 hPa")
				}
			}},
		{"ambiguity and an unusable file", func(t *testing.T) []*cf.FileReport {
			amb := report("cl.nc", 480, field(cf.RoleLowCloud, "cll", byStd, grid2, monthly))
			amb.Problems = []string{"role cloud is ambiguous: variables clt, tcc all qualify; name the one to use in the study (variables: cloud: NAME)"}
			bad := &cf.FileReport{Path: "broken.nc", Problems: []string{"cannot open: NetCDF: Unknown file format"}}
			return []*cf.FileReport{
				report("sst.nc", 480, field(cf.RoleSST, "tos", byStd, grid2, monthly)),
				report("ta.nc", 480, field(cf.RoleAirTemp, "ta", byStd, grid2, monthly)),
				amb, bad, nil,
			}
		}, true, []string{"# not used: broken.nc (cannot open: NetCDF: Unknown file format)", "# CHECK ambiguous role cloud: clt, tcc in cl.nc"}, nil, nil},
		{"file names with glob characters", func(t *testing.T) []*cf.FileReport {
			return []*cf.FileReport{
				report("sst[1].nc", 480, field(cf.RoleSST, "tos", byStd, grid2, monthly)),
				report("ta*.nc", 480, field(cf.RoleAirTemp, "ta", byStd, grid2, monthly)),
				report("cll?.nc", 480, field(cf.RoleLowCloud, "cll", byStd, grid2, monthly)),
			}
		}, true, nil, nil,
			func(t *testing.T, r *config.Study) {
				d := r.Datasets[0]
				if len(d.Inputs[cf.RoleSST]) != 1 || filepath.Base(d.Inputs[cf.RoleSST][0]) != "sst[1].nc" || len(d.Inputs[cf.RoleAirTemp]) != 1 {
					t.Errorf("inputs %v", d.Inputs)
				}
			}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			reps := c.reports(t)
			dir := t.TempDir()
			var names []string
			for _, r := range reps {
				if r != nil {
					names = append(names, r.Path)
				}
			}
			// decoys that a glob would also match
			names = append(names, "sst1.nc", "ta_x.nc", "cllx.nc")
			for _, n := range names {
				if err := os.WriteFile(filepath.Join(dir, n), nil, 0o644); err != nil {
					t.Fatal(err)
				}
			}
			text := config.Starter(reps, nil)
			for _, s := range c.has {
				if !strings.Contains(text, s) {
					t.Errorf("text lacks %q:\n%s", s, text)
				}
			}
			for _, s := range c.hasNot {
				if strings.Contains(text, s) {
					t.Errorf("text has %q:\n%s", s, text)
				}
			}
			p := writeFile(t, dir, "study.yaml", text)
			r, err := config.Load(p, noEnv)
			if c.loads != (err == nil) {
				t.Fatalf("loads = %v, want %v: %v\n%s", err == nil, c.loads, err, text)
			}
			if err == nil && c.check != nil {
				c.check(t, r)
			}
			if !c.loads && !strings.Contains(err.Error(), "needs") {
				t.Errorf("error %v", err)
			}
		})
	}
}

// TestStarterPaths: paths[i] names the file of reports[i] in the study.
func TestStarterPaths(t *testing.T) {
	reps := []*cf.FileReport{report("/data/x/sst.nc", 0, field(cf.RoleSST, "tos", "standard_name", grid2, ""))}
	if txt := config.Starter(reps, []string{"../x/sst.nc"}); !strings.Contains(txt, `sst: "../x/sst.nc"`) {
		t.Errorf("paths not used:\n%s", txt)
	}
	if txt := config.Starter(reps, nil); !strings.Contains(txt, `sst: "/data/x/sst.nc"`) || !strings.Contains(txt, "\n  x:  # named after the files' folder x; rename it") {
		t.Errorf("report path not used:\n%s", txt)
	}
}

// TestStarterOnRealFiles runs inspect on real files nobody here wrote
// (Debian's libncarg-data, unpacked by `make realdata` into
// $LIDSCOPE_REALDATA): an SST climatology with the non-CF time units
// "Month" (cdf/sstdata_netcdf.nc) and a categorical 0–4 land-sea mask
// (cdf/landsea.nc), plus CF climatologies of air temperature and low cloud
// compiled here with ncgen. The starter must load, and cf must then open
// every input with the Spec the study gives, which for the SST is only
// possible through the declared climatology.
func TestStarterOnRealFiles(t *testing.T) {
	real := testutil.RealData(t, ".")
	ncgen := testutil.Tool(t, "ncgen")
	dir := t.TempDir()
	for name, cdl := range map[string]string{"ta_clim.nc": taCDL, "cll_clim.nc": cllCDL} {
		cdlPath := writeFile(t, dir, name+".cdl", cdl)
		if out, err := exec.Command(ncgen, "-k", "nc4", "-o", filepath.Join(dir, name), cdlPath).CombinedOutput(); err != nil {
			t.Fatalf("ncgen: %v\n%s", err, out)
		}
	}
	files := []string{filepath.Join(real, "cdf", "sstdata_netcdf.nc"), filepath.Join(real, "cdf", "landsea.nc"),
		filepath.Join(dir, "ta_clim.nc"), filepath.Join(dir, "cll_clim.nc")}
	var reps []*cf.FileReport
	var paths []string
	for _, f := range files {
		reps = append(reps, cf.Inspect(f))
		paths = append(paths, f)
	}
	text := config.Starter(reps, paths)
	for _, s := range []string{"climatology: true", "mask: categorical", `land_fraction: "LSMASK"`, "target: sst"} {
		if !strings.Contains(text, s) {
			t.Errorf("starter lacks %q:\n%s", s, text)
		}
	}
	p := writeFile(t, dir, "study.yaml", text)
	r, err := config.Load(p, noEnv)
	if err != nil {
		t.Fatalf("%v\n%s", err, text)
	}
	d := &r.Datasets[0]
	for _, role := range d.Roles() {
		fld, err := cf.Open(d.Inputs[role], d.Spec(role))
		if err != nil {
			t.Errorf("%s: cf cannot open the input with the study's Spec: %v", role, err)
			continue
		}
		if role == cf.RoleSST && (fld.Time == nil || fld.Time.Step != cf.StepClimatology || fld.NT() != 12) {
			t.Errorf("sst time axis %+v", fld.Time)
		}
		fld.Close()
	}
}

// Invented CF climatologies (12 monthly steps of year 1) on a small grid.
var taCDL = `netcdf ta_clim {
dimensions: time = 12 ; plev = 2 ; lat = 2 ; lon = 3 ;
variables:
	double time(time) ; time:units = "days since 0001-01-01" ; time:calendar = "noleap" ; time:axis = "T" ;
	double plev(plev) ; plev:units = "hPa" ; plev:axis = "Z" ; plev:positive = "down" ;
	double lat(lat) ; lat:units = "degrees_north" ;
	double lon(lon) ; lon:units = "degrees_east" ;
	float ta(time, plev, lat, lon) ; ta:standard_name = "air_temperature" ; ta:units = "K" ;
data:
	time = 15, 45, 74, 105, 135, 166, 196, 227, 258, 288, 319, 349 ;
	plev = 850, 700 ; lat = -10, 10 ; lon = 0, 120, 240 ;
	ta = ` + repeatValues("290, 290, 290, 290, 290, 290, 283, 283, 283, 283, 283, 283", 12) + ` ;
}
`

var cllCDL = `netcdf cll_clim {
dimensions: time = 12 ; lat = 2 ; lon = 3 ;
variables:
	double time(time) ; time:units = "days since 0001-01-01" ; time:calendar = "noleap" ; time:axis = "T" ;
	double lat(lat) ; lat:units = "degrees_north" ;
	double lon(lon) ; lon:units = "degrees_east" ;
	float cll(time, lat, lon) ; cll:standard_name = "low_type_cloud_area_fraction" ; cll:units = "1" ;
data:
	time = 15, 45, 74, 105, 135, 166, 196, 227, 258, 288, 319, 349 ;
	lat = -10, 10 ; lon = 0, 120, 240 ;
	cll = ` + repeatValues("0.3, 0.2, 0.4, 0.5, 0.1, 0.2", 12) + ` ;
}
`

func repeatValues(s string, n int) string {
	parts := make([]string, n)
	for i := range parts {
		parts[i] = s
	}
	return strings.Join(parts, ", ")
}
