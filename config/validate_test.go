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
  - name: base
    inputs:
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
		{"typo in dataset", "    ocaen:\n      mask: sst\n", "datasets.0.ocaen", 7, `did you mean "ocean"?`},
		{"typo at top", "analysys:\n  threshold: 1\n", "analysys", 7, `did you mean "analysis"?`},
		{"unknown key far from all", "output:\n  zzzzzz: 1\n", "output.zzzzzz", 8, "valid: dir, plots"},
		{"unknown role in inputs", "      low_clouds: cll.nc\n", "datasets.0.inputs.low_clouds", 7, `unknown role "low_clouds"`},
		{"unknown role in variables", "    variables: {sstt: tos}\n", "datasets.0.variables.sstt", 7, `did you mean "sst"?`},
		{"unknown role in units", "    units:\n      temperature: K\n", "datasets.0.units.temperature", 8, "unknown role"},
		{"unknown role in grid method", "analysis:\n  grid:\n    method: {cloud_low: bilinear}\n", "analysis.grid.method.cloud_low", 9, "unknown role"},
		{"upper-case key", "analysis:\n  Threshold: 1.0\n", "analysis.threshold", 8, "lower case"},
		{"role without input", "    variables: {cloud: clt}\n", "datasets.0.variables.cloud", 7, "has no input"},
		{"bad choice with suggestion", "    metrics:\n      svp: murphy-kop\n", "datasets.0.metrics.svp", 8, `did you mean "murphy-koop"?`},
		{"bad lcl", "    metrics: {lcl: espy}\n", "datasets.0.metrics.lcl", 7, "romps, bolton, linear"},
		{"wrong shape", "    time: 1979\n", "datasets.0.time", 7, "must be a table"},
		{"wrong type", "    time:\n      climatology: yes please\n", "datasets.0.time.climatology", 8, "true or false"},

		// ranges
		{"band south beyond -90", "analysis:\n  band: {south: -95, north: 30}\n", "analysis.band.south", 8, "not a latitude"},
		{"band north beyond 90", "analysis:\n  band:\n    north: 91\n", "analysis.band.north", 9, "not a latitude"},
		{"band reversed", "analysis:\n  band:\n    south: 30\n    north: -30\n", "analysis.band", 8, "south (30°) must be less than north (-30°)"},
		{"threshold too large", "analysis:\n  threshold: 15\n", "analysis.threshold", 8, "|δ| < 10 K"},
		{"threshold too negative", "analysis:\n  threshold: -10\n", "analysis.threshold", 8, "|δ| < 10 K"},
		{"threshold not finite", "analysis:\n  threshold: .nan\n", "analysis.threshold", 8, "finite"},
		{"threshold infinite", "analysis:\n  threshold: .inf\n", "analysis.threshold", 8, "finite"},
		{"transition negative", "analysis:\n  transition: -0.5\n", "analysis.transition", 8, "≥ 0"},
		{"min_ocean_fraction", "      land_fraction: lsm.nc\n    ocean:\n      min_ocean_fraction: 1.5\n", "datasets.0.ocean.min_ocean_fraction", 9, "not a fraction"},
		{"sea ice fraction", "      sea_ice: siconc.nc\n    sea_ice: {max_fraction: -0.1}\n", "datasets.0.sea_ice.max_fraction", 8, "not a fraction"},
		{"min_coverage", "analysis:\n  grid: {min_coverage: 2}\n", "analysis.grid.min_coverage", 8, "not a fraction"},
		{"mask_threshold", "analysis:\n  grid:\n    mask_threshold: -1\n", "analysis.grid.mask_threshold", 9, "not a fraction"},
		{"assumed humidity", "    surface:\n      humidity: 1.2\n", "datasets.0.surface.humidity", 8, "not a relative humidity"},
		{"assumed humidity percent", "    surface:\n      humidity: 120%\n", "datasets.0.surface.humidity", 8, "not a relative humidity"},
		{"surface pressure in hPa without units", "    surface:\n      pressure: 1000\n", "datasets.0.surface.pressure", 8, "1000 Pa is not a surface pressure"},
		{"surface pressure bad units", "    surface:\n      pressure: 1000 psi\n", "datasets.0.surface.pressure", 8, "not a pressure unit"},
		{"month 13", "    time:\n      months: [12, 13]\n", "datasets.0.time.months.1", 8, "not a month"},
		{"month 0", "    time:\n      months: [0]\n", "datasets.0.time.months.0", 8, "not a month"},
		{"month twice", "    time:\n      months: [1, 1]\n", "datasets.0.time.months", 8, "listed twice"},
		{"start after end", "    time:\n      start: \"2001-01\"\n      end: \"2000-12\"\n", "datasets.0.time.start", 8, "after end"},
		{"start not year-month", "    time:\n      start: \"1979/01\"\n", "datasets.0.time.start", 8, "YYYY-MM"},
		{"start month 13", "    time:\n      end: \"1979-13\"\n", "datasets.0.time.end", 8, "not 1–12"},
		{"bad season", "    time: {season: DFJ}\n", "datasets.0.time.season", 7, "DJF, MAM, JJA or SON"},
		{"bad calendar", "    time:\n      calendar: julian_ish\n", "datasets.0.time.calendar", 8, "unknown calendar"},
		{"non-CF time units", "    time:\n      units: Month\n", "datasets.0.time.units", 8, "since"},
		{"bad units override", "    units: {sst: furlongs}\n", "datasets.0.units.sst", 7, "not a temperature unit"},
		{"bad level units", "    coordinates:\n      air_temperature: {level_units: m}\n", "datasets.0.coordinates.air_temperature.level_units", 8, "pressure levels only"},
		{"bad grid resolution", "analysis:\n  grid: {target: 0.7deg}\n", "analysis.grid.target", 8, "divides 180"},
		{"bad grid target", "analysis:\n  grid: {target: sts}\n", "analysis.grid.target", 8, `did you mean "sst"?`},
		{"bad grid method", "analysis:\n  grid:\n    method: {sst: nearest}\n", "analysis.grid.method.sst", 9, "conservative or bilinear"},
		{"bad cloud choice", "analysis:\n  cloud: high_cloud\n", "analysis.cloud", 8, "auto, low_cloud, cloud"},
		{"region without width", "analysis:\n  regions:\n    - {name: a, south: 0, north: 10, west: 20, east: 20}\n", "analysis.regions.0", 9, "needs a width"},
		{"region latitudes", "analysis:\n  regions:\n    - {name: a, south: 10, north: 0, west: 0, east: 20}\n", "analysis.regions.0", 9, "south < north"},
		{"region longitude", "analysis:\n  regions:\n    - {name: a, south: 0, north: 10, west: -200, east: 20}\n", "analysis.regions.0", 9, "−180…360"},
		{"region missing bound", "analysis:\n  regions:\n    - name: a\n      south: 0\n      north: 10\n      west: 0\n", "analysis.regions.0", 9, "needs east"},
		{"region twice", "analysis:\n  regions:\n    - {name: a, south: 0, north: 10, west: 0, east: 20}\n    - {name: a, south: 0, north: 10, west: 30, east: 40}\n", "analysis.regions.1.name", 10, "used twice"},
		{"metrics conventions invalid", "    metrics:\n      lapse_pressure: 600hPa\n", "datasets.0.metrics", 7, "LapsePressure"},

		// contradictions
		{"months and season", "    time:\n      months: [6, 7, 8]\n      season: JJA\n", "datasets.0.time.season", 9, "not both"},
		{"climatology with start", "    time:\n      climatology: true\n      start: \"1979-01\"\n", "datasets.0.time.start", 9, "climatology"},
		{"climatology with units", "    time:\n      climatology: true\n      units: days since 2000-01-01\n", "datasets.0.time.units", 9, "climatology"},
		{"fraction mask without input", "    ocean:\n      mask: fraction\n", "datasets.0.ocean.mask", 8, "needs a land_fraction or sea_fraction input"},
		{"fraction mask, role without input", "      land_fraction: lsm.nc\n    ocean:\n      mask: fraction\n      role: sea_fraction\n", "datasets.0.ocean.mask", 9, "needs a sea_fraction input"},
		{"categorical without input", "    ocean: {mask: categorical}\n", "datasets.0.ocean.mask", 7, "needs a land_fraction"},
		{"role with sst mask", "    ocean:\n      mask: sst\n      role: land_fraction\n", "datasets.0.ocean.role", 9, "used only with"},
		{"ocean_values with fraction mask", "      land_fraction: lsm.nc\n    ocean:\n      ocean_values: [0]\n", "datasets.0.ocean.ocean_values", 9, "only with mask: categorical"},
		{"pressure field without input", "    surface:\n      pressure: field\n", "datasets.0.surface.pressure", 8, "surface_pressure input"},
		{"humidity field without input", "    surface:\n      humidity: field\n", "datasets.0.surface.humidity", 8, "needs a humidity input"},
		{"humidity field ambiguous", "      relative_humidity: hurs.nc\n      dew_point: tdps.nc\n    surface:\n      humidity: field\n", "datasets.0.surface.humidity", 10, "ambiguous"},
		{"humidity role without input", "    surface:\n      humidity: dew_point\n", "datasets.0.surface.humidity", 8, "needs an input"},
		{"air temperature without input", "    surface:\n      temperature: air\n", "datasets.0.surface.temperature", 8, "surface_air_temp input"},
		{"ectei without q", "    metrics:\n      ectei: true\n", "datasets.0.metrics.ectei", 8, "specific_humidity"},
		{"ectei and q as surface humidity", "      specific_humidity: hus.nc\n    surface: {humidity: specific_humidity}\n    metrics: {ectei: true}\n", "datasets.0.metrics.ectei", 9, "cannot be both"},
		{"sea ice without input", "    sea_ice:\n      max_fraction: 0.15\n", "datasets.0.sea_ice", 7, "needs a sea_ice input"},
		{"grid target without input", "analysis:\n  grid:\n    target: olr\n", "analysis.grid.target", 9, "has no olr input"},
		{"cloud choice without input", "analysis:\n  cloud: cloud\n", "datasets.0.inputs", 3, "has no cloud input"},

		// datasets and inputs
		{"no datasets", "datasets: []\n", "datasets", 1, "no datasets"},
		{"no name", "datasets:\n  - inputs:\n      sst: sst.nc\n      air_temperature: ta.nc\n      low_cloud: cll.nc\n", "datasets.0", 2, "needs a name"},
		{"bad name", "datasets:\n  - name: a/b\n    inputs: {sst: sst.nc, air_temperature: ta.nc, cloud: clt.nc}\n", "datasets.0.name", 2, "only letters"},
		{"duplicate name", "  - name: base\n    inputs: {sst: sst.nc, air_temperature: ta.nc, cloud: clt.nc}\n", "datasets.1.name", 7, "used twice"},
		{"missing sst", "datasets:\n  - name: a\n    inputs:\n      air_temperature: ta.nc\n      cloud: clt.nc\n", "datasets.0.inputs", 3, "role sst"},
		{"ectei without air temperature", "datasets:\n  - name: a\n    inputs:\n      sst: sst.nc\n      specific_humidity: ta.nc\n    metrics: {ectei: true}\n", "datasets.0.metrics", 6, "metrics.ectei needs 700 hPa temperature"},
		{"no inputs", "datasets:\n  - name: a\n", "datasets.0", 2, "has no inputs"},
		{"glob matches nothing", "      cloud: [clt.nc, \"cloud_*.nc\"]\n", "datasets.0.inputs.cloud.1", 7, `role cloud: no file matches "cloud_*.nc"`},
		{"missing file", "      sea_ice: missing.nc\n", "datasets.0.inputs.sea_ice", 7, `no file matches "missing.nc"`},
		{"bad glob", "      olr: \"[.nc\"\n", "datasets.0.inputs.olr", 7, "not a valid glob"},
		{"empty input list", "      olr: []\n", "datasets.0.inputs.olr", 7, "empty list"},
		{"input not a string", "      olr: 3\n", "datasets.0.inputs.olr", 7, "must be a file name"},
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
	}{{7, "datasets.0.ocean.mask"}, {9, "datasets.0.time.months.0"}, {11, "analysis.treshold"}, {12, "analysis.band"}}
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
		{"r.toml", `[[datasets]]
name = "base"

[datasets.inputs]
sst = "sst.nc"
air_temperature = "ta.nc"
low_cloud = "cll.nc"

[datasets.ocaen]
mask = "sst"

[[datasets]]
name = "second"
inputs = { sst = "sst.nc", air_temperature = "ta.nc", low_cloud = "cll.nc" }

[datasets.time]
monts = [1]

[analysis]
treshold = 1.5
`, "", 0},
		{"r.json", `{
  "datasets": [
    {
      "name": "base",
      "inputs": {"sst": "sst.nc", "air_temperature": "ta.nc", "low_cloud": "cll.nc"},
      "ocaen": {"mask": "sst"}
    },
    {
      "name": "second",
      "inputs": {"sst": "sst.nc", "air_temperature": "ta.nc", "low_cloud": "cll.nc"},
      "time": {
        "monts": [1]
      }
    }
  ],
  "analysis": {"treshold": 1.5}
}
`, "", 0},
	}
	want := map[string]map[string]int{
		"r.toml": {"datasets.0.ocaen": 9, "datasets.1.time.monts": 17, "analysis.treshold": 20},
		"r.json": {"datasets.0.ocaen": 6, "datasets.1.time.monts": 12, "analysis.treshold": 16},
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
			path := writeFile(t, dir, "r.yaml", "datasets:\n  - name: a\n    inputs:\n"+c.inputs)
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
