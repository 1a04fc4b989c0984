package config_test

import (
	"strings"
	"testing"

	"lidscope/cf"
	"lidscope/config"
)

// head is a valid dataset; every case below appends to it, so its lines
// start at line 7.
const head = `datasets:
  base:
    files:
      sst: sst.nc
      air_temperature: ta.nc
      low_cloud: cll.nc
`

// TestValidation checks that each kind of mistake is reported with the
// file, the line of the key, the key path and a message saying what to do.
// Expected lines are counted by hand in the study text.
func TestValidation(t *testing.T) {
	cases := []struct {
		name string
		text string // appended to head unless it starts with "datasets:"
		key  string
		line int
		msg  string
	}{
		// unknown keys and roles, with the nearest valid name
		{"typo in analysis", "analysis:\n  treshold: 1.5\n", "analysis.treshold", 8, `did you mean "threshold"?`},
		{"typo in dataset", "    ocaen:\n      mask: sst\n", "datasets.base.ocaen", 7, `did you mean "ocean"?`},
		{"typo at top", "analysys:\n  threshold: 1\n", "analysys", 7, `did you mean "analysis"?`},
		{"unknown key far from all", "output:\n  zzzzzz: 1\n", "output.zzzzzz", 8, "valid: dir, plots"},
		{"unknown role in inputs", "      low_clouds: cll.nc\n", "datasets.base.files.low_clouds", 7, `unknown role "low_clouds"`},
		{"unknown role in variables", "    variables: {sstt: tos}\n", "datasets.base.variables.sstt", 7, `did you mean "sst"?`},
		{"unknown role in units", "    units:\n      temperature: K\n", "datasets.base.units.temperature", 8, "unknown role"},
		{"unknown role in grid method", "analysis:\n  grid:\n    method: {cloud_low: bilinear}\n", "analysis.grid.method.cloud_low", 9, "unknown role"},
		{"upper-case key", "analysis:\n  Threshold: 1.0\n", "analysis.threshold", 8, "lower case"},
		{"role without input", "    variables: {cloud: clt}\n", "datasets.base.variables.cloud", 7, "has no files"},
		{"bad choice with suggestion", "    conventions:\n      svp: murphy-kop\n", "datasets.base.conventions.svp", 8, `did you mean "murphy-koop"?`},
		{"bad lcl", "    conventions: {lcl: espy}\n", "datasets.base.conventions.lcl", 7, "romps, bolton, linear"},
		{"wrong shape", "    time: 1979\n", "datasets.base.time", 7, "must be a table"},
		{"wrong type", "    time:\n      climatology: yes please\n", "datasets.base.time.climatology", 8, "true or false"},

		// ranges
		{"band south beyond -90", "analysis:\n  band: {south: -95, north: 30}\n", "analysis.band.south", 8, "not a latitude"},
		{"band north beyond 90", "analysis:\n  band:\n    north: 91\n", "analysis.band.north", 9, "not a latitude"},
		{"band reversed", "analysis:\n  band:\n    south: 30\n    north: -30\n", "analysis.band", 8, "south (30°) must be less than north (-30°)"},
		{"domain south beyond -90", "analysis:\n  domain: {south: -95, north: 30}\n", "analysis.domain", 8, "must be latitudes"},
		{"domain reversed", "analysis:\n  domain: {south: 40, north: -40}\n", "analysis.domain", 8, "south (40°) must be less than north (-40°)"},
		{"domain with west only", "analysis:\n  domain: {south: -40, north: 40, west: 100}\n", "analysis.domain", 8, "both west and east"},
		{"domain without width", "analysis:\n  domain: {west: 100, east: 100}\n", "analysis.domain", 8, "needs a width"},
		{"domain key typo", "analysis:\n  domain: {sout: -40}\n", "analysis.domain.sout", 8, `did you mean "south"?`},
		{"threshold too large", "analysis:\n  threshold: 15\n", "analysis.threshold", 8, "|δ| < 10 K"},
		{"threshold too negative", "analysis:\n  threshold: -10\n", "analysis.threshold", 8, "|δ| < 10 K"},
		{"threshold not finite", "analysis:\n  threshold: .nan\n", "analysis.threshold", 8, "finite"},
		{"threshold infinite", "analysis:\n  threshold: .inf\n", "analysis.threshold", 8, "finite"},
		{"transition negative", "analysis:\n  transition: -0.5\n", "analysis.transition", 8, "≥ 0"},
		{"min_fraction", "      land_fraction: lsm.nc\n    ocean:\n      min_fraction: 1.5\n", "datasets.base.ocean.min_fraction", 9, "not a fraction"},
		{"sea ice fraction", "      sea_ice: siconc.nc\n    sea_ice: {max_fraction: -0.1}\n", "datasets.base.sea_ice.max_fraction", 8, "not a fraction"},
		{"min_coverage", "analysis:\n  grid: {min_coverage: 2}\n", "analysis.grid.min_coverage", 8, "not a fraction"},
		{"mask_threshold", "analysis:\n  grid:\n    mask_threshold: -1\n", "analysis.grid.mask_threshold", 9, "not a fraction"},
		{"assumed humidity", "    surface:\n      humidity: 1.2\n", "datasets.base.surface.humidity", 8, "not a relative humidity"},
		{"assumed humidity percent", "    surface:\n      humidity: 120%\n", "datasets.base.surface.humidity", 8, "not a relative humidity"},
		{"surface pressure in hPa without units", "    surface:\n      pressure: 1000\n", "datasets.base.surface.pressure", 8, "1000 Pa is not a surface pressure"},
		{"surface pressure bad units", "    surface:\n      pressure: 1000 psi\n", "datasets.base.surface.pressure", 8, "not a pressure unit"},
		{"month 13", "    time:\n      months: [12, 13]\n", "datasets.base.time.months.1", 8, "not a month"},
		{"month 0", "    time:\n      months: [0]\n", "datasets.base.time.months.0", 8, "not a month"},
		{"month twice", "    time:\n      months: [1, 1]\n", "datasets.base.time.months", 8, "listed twice"},
		{"start after end", "    time:\n      start: \"2001-01\"\n      end: \"2000-12\"\n", "datasets.base.time.start", 8, "after end"},
		{"start not year-month", "    time:\n      start: \"1979/01\"\n", "datasets.base.time.start", 8, "YYYY-MM"},
		{"start month 13", "    time:\n      end: \"1979-13\"\n", "datasets.base.time.end", 8, "not 1–12"},
		{"bad season", "    time: {season: DFJ}\n", "datasets.base.time.season", 7, "DJF, MAM, JJA or SON"},
		{"bad calendar", "    time:\n      calendar: julian_ish\n", "datasets.base.time.calendar", 8, "unknown calendar"},
		{"non-CF time units", "    time:\n      units: Month\n", "datasets.base.time.units", 8, "since"},
		{"bad units override", "    units: {sst: furlongs}\n", "datasets.base.units.sst", 7, "not a temperature unit"},
		{"bad level units", "    coordinates:\n      air_temperature: {level_units: m}\n", "datasets.base.coordinates.air_temperature.level_units", 8, "pressure levels only"},
		{"bad grid resolution", "analysis:\n  grid: {target: 0.7deg}\n", "analysis.grid.target", 8, "divides 180"},
		{"bad grid target", "analysis:\n  grid: {target: sts}\n", "analysis.grid.target", 8, `did you mean "sst"?`},
		{"bad grid method", "analysis:\n  grid:\n    method: {sst: nearest}\n", "analysis.grid.method.sst", 9, "conservative or bilinear"},
		{"bad cloud choice", "analysis:\n  cloud: high_cloud\n", "analysis.cloud", 8, "auto, low_cloud, cloud"},
		{"region without width", "analysis:\n  regions:\n    - {name: a, south: 0, north: 10, west: 20, east: 20}\n", "analysis.regions.0", 9, "needs a width"},
		{"region latitudes", "analysis:\n  regions:\n    - {name: a, south: 10, north: 0, west: 0, east: 20}\n", "analysis.regions.0", 9, "south < north"},
		{"region longitude", "analysis:\n  regions:\n    - {name: a, south: 0, north: 10, west: -200, east: 20}\n", "analysis.regions.0", 9, "−180…360"},
		{"region missing bound", "analysis:\n  regions:\n    - name: a\n      south: 0\n      north: 10\n      west: 0\n", "analysis.regions.0", 9, "needs east"},
		{"region twice", "analysis:\n  regions:\n    - {name: a, south: 0, north: 10, west: 0, east: 20}\n    - {name: a, south: 0, north: 10, west: 30, east: 40}\n", "analysis.regions.1.name", 10, "used twice"},
		{"metrics conventions invalid", "    conventions:\n      lapse_pressure: 600hPa\n", "datasets.base.conventions", 7, "LapsePressure"},

		// contradictions
		{"months and season", "    time:\n      months: [6, 7, 8]\n      season: JJA\n", "datasets.base.time.season", 9, "not both"},
		{"climatology with start", "    time:\n      climatology: true\n      start: \"1979-01\"\n", "datasets.base.time.start", 9, "climatology"},
		{"climatology with units", "    time:\n      climatology: true\n      units: days since 2000-01-01\n", "datasets.base.time.units", 9, "climatology"},
		{"fraction mask without input", "    ocean:\n      mask: fraction\n", "datasets.base.ocean.mask", 8, "needs a land_fraction or sea_fraction input"},
		{"fraction mask, role without input", "      land_fraction: lsm.nc\n    ocean:\n      mask: fraction\n      from: sea_fraction\n", "datasets.base.ocean.mask", 9, "needs a sea_fraction input"},
		{"categorical without input", "    ocean: {mask: categorical}\n", "datasets.base.ocean.mask", 7, "needs a land_fraction"},
		{"mask input with sst mask", "    ocean:\n      mask: sst\n      from: land_fraction\n", "datasets.base.ocean.from", 9, "used only with"},
		{"values with fraction mask", "      land_fraction: lsm.nc\n    ocean:\n      values: [0]\n", "datasets.base.ocean.values", 9, "only with mask: categorical"},
		{"pressure field without input", "    surface:\n      pressure: field\n", "datasets.base.surface.pressure", 8, "surface_pressure input"},
		{"humidity field without input", "    surface:\n      humidity: field\n", "datasets.base.surface.humidity", 8, "needs a humidity input"},
		{"humidity field ambiguous", "      relative_humidity: hurs.nc\n      dew_point_temperature: tdps.nc\n    surface:\n      humidity: field\n", "datasets.base.surface.humidity", 10, "ambiguous"},
		{"humidity role without input", "    surface:\n      humidity: dew_point_temperature\n", "datasets.base.surface.humidity", 8, "needs an input"},
		{"air temperature without input", "    surface:\n      temperature: air\n", "datasets.base.surface.temperature", 8, "surface_air_temperature input"},
		{"ectei without q", "    conventions:\n      ectei: true\n", "datasets.base.conventions.ectei", 8, "specific_humidity"},
		{"ectei and q as surface humidity", "      specific_humidity: hus.nc\n    surface: {humidity: specific_humidity}\n    conventions: {ectei: true}\n", "datasets.base.conventions.ectei", 9, "cannot be both"},
		{"sea ice without input", "    sea_ice:\n      max_fraction: 0.15\n", "datasets.base.sea_ice", 7, "needs a sea_ice input"},
		{"grid target without input", "analysis:\n  grid:\n    target: olr\n", "analysis.grid.target", 9, "has no olr input"},
		{"cloud choice without input", "analysis:\n  cloud: cloud\n", "datasets.base.files", 3, "has no cloud input"},

		// per-role time declarations
		{"role time for a mask", "      land_fraction: lsm.nc\n    time:\n      land_fraction: {calendar: noleap}\n", "datasets.base.time.land_fraction", 9, "fixed field"},
		{"role time without files", "    time:\n      olr: {calendar: noleap}\n", "datasets.base.time.olr", 8, "has no files"},
		{"role time units not CF", "    time:\n      sst: {units: Month}\n", "datasets.base.time.sst.units", 8, "since"},
		{"role time calendar", "    time:\n      low_cloud:\n        calendar: gregorain\n", "datasets.base.time.low_cloud.calendar", 9, "unknown calendar"},
		{"role time typo", "    time:\n      sst: {unit: days since 2000-01-01}\n", "datasets.base.time.sst.unit", 8, `did you mean "units"?`},
		{"role in time misspelt", "    time:\n      low_clod: {calendar: noleap}\n", "datasets.base.time.low_clod", 8, `did you mean "low_cloud"?`},
		{"every role a climatology, with start", "    time:\n      sst: {climatology: true}\n      air_temperature: {climatology: true}\n      low_cloud: {climatology: true}\n      start: \"1979-01\"\n", "datasets.base.time.start", 11, "every time axis is declared a climatology"},
		{"role climatology with units", "    time:\n      sst: {climatology: true, units: days since 2000-01-01}\n", "datasets.base.time.sst.units", 8, "climatology"},
		{"role units with the dataset's calendar", "    time:\n      calendar: standard\n      sst: {units: days since 2000-02-30}\n", "datasets.base.time.sst.units", 9, "dataset's"},

		// datasets and files
		{"no datasets", "datasets: {}\n", "datasets", 1, "no datasets"},
		{"old key inputs", "datasets:\n  a:\n    inputs: {sst: sst.nc}\n", "datasets.a.inputs", 3, `"inputs" is a key of the earlier study layout; it is called "files" now`},
		{"old key metrics", "    metrics: {svp: bolton}\n", "datasets.base.metrics", 7, `it is called "conventions" now`},
		{"old key ocean role", "    ocean: {role: land_fraction}\n", "datasets.base.ocean.role", 7, `it is called "from" now`},
		{"old key inputs.all", "      all: all.nc\n", "datasets.base.files.all", 7, `it is called "any" now`},
		{"environment names alike", "  base_2:\n    files: {sst: sst.nc, air_temperature: ta.nc, cloud: clt.nc}\n  base-2:\n    files: {sst: sst.nc, air_temperature: ta.nc, cloud: clt.nc}\n", "datasets.base-2", 9, "differ only in - and _"},
		{"old list form", "datasets:\n  - name: a\n    files:\n      sst: sst.nc\n      air_temperature: ta.nc\n      low_cloud: cll.nc\n", "datasets", 1, "table keyed by dataset name, not a list"},
		{"bad name", "datasets:\n  a.b:\n    files: {sst: sst.nc, air_temperature: ta.nc, cloud: clt.nc}\n", "datasets.a.b", 2, "lower-case letters, digits, _ and -"},
		{"name with capitals", "datasets:\n  Obs:\n    files: {sst: sst.nc, air_temperature: ta.nc, cloud: clt.nc}\n", "datasets.obs", 2, "lower case"},
		{"missing sst", "datasets:\n  a:\n    files:\n      air_temperature: ta.nc\n      cloud: clt.nc\n", "datasets.a.files", 3, "role sst"},
		{"ectei without air temperature", "datasets:\n  a:\n    files:\n      sst: sst.nc\n      specific_humidity: ta.nc\n    conventions: {ectei: true}\n", "datasets.a.conventions", 6, "conventions.ectei needs 700 hPa temperature"},
		{"no files", "datasets:\n  a:\n    about: x\n", "datasets.a", 2, "has no files"},
		{"glob matches nothing", "      cloud: [clt.nc, \"cloud_*.nc\"]\n", "datasets.base.files.cloud.1", 7, `role cloud: no file matches "cloud_*.nc"`},
		{"missing file", "      sea_ice: missing.nc\n", "datasets.base.files.sea_ice", 7, `no file matches "missing.nc"`},
		{"bad glob", "      olr: \"[.nc\"\n", "datasets.base.files.olr", 7, "not a valid glob"},
		{"empty input list", "      olr: []\n", "datasets.base.files.olr", 7, "empty list"},
		{"input not a string", "      olr: 3\n", "datasets.base.files.olr", 7, "must be a file name"},
	}
	dir := dataDir(t, baseFiles...)
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			text := c.text
			if !strings.HasPrefix(text, "datasets:") {
				text = head + text
			}
			path := writeFile(t, dir, "r.yaml", text)
			_, err := config.Load(path, noEnv)
			ps := problems(t, err)
			for _, p := range ps {
				if p.Key == c.key && strings.Contains(p.Msg, c.msg) {
					if p.Line != c.line {
						t.Errorf("line %d, want %d: %v", p.Line, c.line, p)
					}
					if p.File != path {
						t.Errorf("file %q, want %q", p.File, path)
					}
					if !strings.HasPrefix(p.Error(), path) {
						t.Errorf("message %q does not start with the file", p.Error())
					}
					return
				}
			}
			t.Errorf("no problem at key %s containing %q; got:\n%v", c.key, c.msg, err)
		})
	}
}

// TestAllProblemsAtOnce: every problem is reported in one error, one per
// line, in line order, each naming file:line and key.
func TestAllProblemsAtOnce(t *testing.T) {
	dir := dataDir(t, baseFiles...)
	text := head + `    ocean: {mask: fraction}
    time:
      months: [13]
analysis:
  treshold: 2
  band: {south: 40, north: 30}
`
	path := writeFile(t, dir, "r.yaml", text)
	_, err := config.Load(path, noEnv)
	ps := problems(t, err)
	want := []struct {
		line int
		key  string
	}{{7, "datasets.base.ocean.mask"}, {9, "datasets.base.time.months.0"}, {11, "analysis.treshold"}, {12, "analysis.band"}}
	if len(ps) != len(want) {
		t.Fatalf("%d problems, want %d:\n%v", len(ps), len(want), err)
	}
	for i, w := range want {
		if ps[i].Line != w.line || ps[i].Key != w.key {
			t.Errorf("problem %d = %v; want line %d key %s", i, ps[i], w.line, w.key)
		}
	}
	lines := strings.Split(err.Error(), "\n")
	if len(lines) != 1+len(want) || !strings.Contains(lines[0], "4 problems") {
		t.Errorf("error text:\n%s", err)
	}
	for _, l := range lines[1:] {
		if !strings.HasPrefix(strings.TrimSpace(l), path+":") {
			t.Errorf("line %q does not start with file:line", l)
		}
	}
}

// TestLinesInOtherFormats: TOML and JSON problems name the line too.
func TestLinesInOtherFormats(t *testing.T) {
	dir := dataDir(t, baseFiles...)
	cases := []struct {
		file, text, key string
		line            int
	}{
		{"r.toml", `[datasets.base]
about = "first"

[datasets.base.files]
sst = "sst.nc"
air_temperature = "ta.nc"
low_cloud = "cll.nc"

[datasets.base.ocaen]
mask = "sst"

[datasets.second]
files = { sst = "sst.nc", air_temperature = "ta.nc", low_cloud = "cll.nc" }

[datasets.second.time]
monts = [1]

[analysis]
treshold = 1.5
`, "", 0},
		{"r.json", `{
  "datasets": {
    "base": {
      "about": "first",
      "files": {"sst": "sst.nc", "air_temperature": "ta.nc", "low_cloud": "cll.nc"},
      "ocaen": {"mask": "sst"}
    },
    "second": {
      "files": {"sst": "sst.nc", "air_temperature": "ta.nc", "low_cloud": "cll.nc"},
      "time": {
        "monts": [1]
      }
    }
  },
  "analysis": {"treshold": 1.5}
}
`, "", 0},
	}
	want := map[string]map[string]int{
		"r.toml": {"datasets.base.ocaen": 9, "datasets.second.time.monts": 16, "analysis.treshold": 19},
		"r.json": {"datasets.base.ocaen": 6, "datasets.second.time.monts": 11, "analysis.treshold": 15},
	}
	for _, c := range cases {
		t.Run(c.file, func(t *testing.T) {
			path := writeFile(t, dir, c.file, c.text)
			_, err := config.Load(path, noEnv)
			ps := problems(t, err)
			got := map[string]int{}
			for _, p := range ps {
				got[p.Key] = p.Line
			}
			for k, line := range want[c.file] {
				if got[k] != line {
					t.Errorf("%s: line %d, want %d (problems: %v)", k, got[k], line, err)
				}
			}
			if len(ps) != len(want[c.file]) {
				t.Errorf("%d problems, want %d: %v", len(ps), len(want[c.file]), err)
			}
		})
	}
}

// TestParseErrors: text that is not YAML/TOML/JSON, or a file that is not
// there, gives an error naming the file; an unknown extension says which
// ones are accepted.
func TestParseErrors(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct{ name, text, want string }{
		{"bad.yaml", "datasets: [\n", "not valid YAML"},
		{"bad.toml", "datasets = [[\n", "not valid TOML"},
		{"bad.json", "{\"datasets\": ", "not valid JSON"},
		{"list.yaml", "- a\n- b\n", "not valid YAML"},
		{"r.ini", "x=1", ".yaml (or .yml), .toml or .json"},
	} {
		p := writeFile(t, dir, c.name, c.text)
		_, err := config.Load(p, noEnv)
		if err == nil || !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), p) {
			t.Errorf("%s: error %v; want it to name the file and say %q", c.name, err, c.want)
		}
	}
	_, err := config.Load(dir+"/missing.yaml", noEnv)
	if err == nil || !strings.Contains(err.Error(), "missing.yaml") {
		t.Errorf("missing file: %v", err)
	}
}

// SST is the only input a study needs: without air_temperature the run
// has no LTS/EIS, without a cloud input no cloud statistics (issue 16).
func TestOptionalInputs(t *testing.T) {
	dir := dataDir(t, baseFiles...)
	for _, c := range []struct {
		name, inputs string
		airTemp      bool
	}{
		{"sst only", "      sst: sst.nc\n", false},
		{"sst and T700", "      sst: sst.nc\n      air_temperature: ta.nc\n", true},
	} {
		t.Run(c.name, func(t *testing.T) {
			path := writeFile(t, dir, "r.yaml", "datasets:\n  a:\n    files:\n"+c.inputs)
			r, err := config.Load(path, noEnv)
			if err != nil {
				t.Fatal(err)
			}
			d := r.Datasets[0]
			if d.Cloud != "" {
				t.Errorf("Cloud = %q without a cloud input", d.Cloud)
			}
			if got := len(d.Inputs[cf.RoleAirTemp]) > 0; got != c.airTemp {
				t.Errorf("air temperature input present = %v, want %v", got, c.airTemp)
			}
			if len(r.RelationsFor(&d).Responses) != 0 {
				t.Errorf("relationship responses %v without a cloud input", r.RelationsFor(&d).Responses)
			}
		})
	}
}
