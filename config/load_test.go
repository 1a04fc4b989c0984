package config_test

import (
	"encoding/json"
	"math"
	"os/exec"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"lidscope/cf"
	"lidscope/config"
	"lidscope/internal/testutil"
	"lidscope/metrics"
	"lidscope/regrid"
)

var exampleFiles = []string{"testdata/example.yaml", "testdata/example.toml", "testdata/example.json"}

// TestExampleFormatsAgree: the commented example in YAML, TOML and JSON
// gives the same resolved study.
func TestExampleFormatsAgree(t *testing.T) {
	var first string
	for _, f := range exampleFiles {
		r, err := config.Load(f, noEnv)
		if err != nil {
			t.Fatalf("%s: %v", f, err)
		}
		if r.Format != strings.TrimPrefix(filepath.Ext(f), ".") {
			t.Errorf("%s: format %q", f, r.Format)
		}
		if first == "" {
			first = r.Resolved()
			continue
		}
		if got := r.Resolved(); got != first {
			t.Errorf("%s resolves differently from %s:\n%s\nvs\n%s", f, exampleFiles[0], got, first)
		}
	}
}

// TestExampleFilesHoldTheSameData checks the premise of the test above
// with independent parsers: Python's json and tomllib (standard library)
// must read the TOML and JSON examples as the same data, and PyYAML
// (Debian python3-yaml) the YAML example as that data too.
func TestExampleFilesHoldTheSameData(t *testing.T) {
	t.Run("toml=json", func(t *testing.T) {
		py := testutil.Python(t, "json", "tomllib")
		script := `
import json, sys, tomllib
t = tomllib.load(open(sys.argv[1], "rb"))
j = json.load(open(sys.argv[2]))
assert t == j, "toml != json"
print("equal", len(t["datasets"]))
`
		out, err := exec.Command(py, "-c", script, exampleFiles[1], exampleFiles[2]).CombinedOutput()
		if err != nil || strings.TrimSpace(string(out)) != "equal 2" {
			t.Fatalf("python says: %v\n%s", err, out)
		}
	})
	t.Run("yaml=json", func(t *testing.T) {
		py := testutil.Python(t, "json", "yaml")
		script := `
import json, sys, yaml
y = yaml.safe_load(open(sys.argv[1]))
j = json.load(open(sys.argv[2]))
assert y == j, "yaml != json"
print("equal", len(y["datasets"]))
`
		out, err := exec.Command(py, "-c", script, exampleFiles[0], exampleFiles[2]).CombinedOutput()
		if err != nil || strings.TrimSpace(string(out)) != "equal 2" {
			t.Fatalf("python says: %v\n%s", err, out)
		}
	})
}

// TestFormatsTable: small studies written in each format (and with keys in
// another order, defaults spelt out, or comments) resolve identically.
func TestFormatsTable(t *testing.T) {
	dir := dataDir(t, baseFiles...)
	groups := []struct {
		name  string
		files map[string]string
	}{
		{"minimal", map[string]string{
			"a.yaml": "datasets:\n  m:\n    files: {sst: sst.nc, air_temperature: ta.nc, low_cloud: cll.nc}\n",
			"b.toml": "[datasets.m]\nfiles = { sst = \"sst.nc\", air_temperature = \"ta.nc\", low_cloud = \"cll.nc\" }\n",
			"c.json": `{"datasets": {"m": {"files": {"sst": "sst.nc", "air_temperature": "ta.nc", "low_cloud": "cll.nc"}}}}`,
			// every default spelt out, keys in another order, a list where a string would do
			"d.yml": `# defaults written out
output: {plots: true, dir: out}
analysis:
  transition: 0
  threshold: 1.5
  band: {north: 30, south: -30}
  cloud: auto
  grid: {target: "", min_coverage: 0.5, mask_threshold: 0.5}
datasets:
  m:
    files:
      low_cloud: [cll.nc]
      air_temperature: ta.nc
      sst: ["sst.nc", "ss*.nc"]
    about: ""
    ocean: {mask: sst}
    surface: {pressure: 100000, humidity: 80%, temperature: sst}
    conventions: {svp: murphy-koop, lcl: romps, t850: mean, lapse_pressure: 850 hPa, lapse_moisture: qs, ectei: false}
    time: {climatology: false}
`,
		}},
		{"settings", map[string]string{
			"a.yaml": `datasets:
  run-1:
    files:
      sst: sst.nc
      air_temperature: ta.nc
      cloud: clt.nc
      sea_fraction: sftof.nc
      relative_humidity: hurs.nc
    time: {season: djf, start: "1980-01", end: "1989-12"}
    surface: {humidity: field, pressure: 1013.25hPa}
    conventions: {svp: bolton, lcl: linear, constants: {rd: 287.0}}
analysis:
  threshold: 1.0
  regions: [{name: r1, south: -20, north: 0, west: 170, east: -100}]
  grid: {target: 2.5deg, method: {cloud: bilinear}}
`,
			"b.toml": `[analysis]
threshold = 1.0
regions = [{ name = "r1", south = -20, north = 0, west = 170, east = -100 }]
grid = { target = "2.5deg", method = { cloud = "bilinear" } }

[datasets.run-1]
time = { months = [12, 1, 2], start = "1980-01", end = "1989-12" }
surface = { humidity = "relative_humidity", pressure = 101325 }
conventions = { svp = "bolton", lcl = "linear", constants = { rd = 287 } }

[datasets.run-1.files]
sst = "sst.nc"
air_temperature = "ta.nc"
cloud = "clt.nc"
sea_fraction = "sftof.nc"
relative_humidity = "hurs.nc"
`,
			"c.json": `{"datasets": {"run-1": {
  "files": {"sst": "sst.nc", "air_temperature": "ta.nc", "cloud": "clt.nc", "sea_fraction": "sftof.nc", "relative_humidity": "hurs.nc"},
  "ocean": {"mask": "fraction", "from": "sea_fraction", "min_fraction": 0.5},
  "time": {"months": [1, 2, 12], "start": "1980-01", "end": "1989-12"},
  "surface": {"humidity": "field", "pressure": "1013.25 hPa"},
  "conventions": {"svp": "bolton", "lcl": "linear", "constants": {"rd": 287.0}}}},
 "analysis": {"threshold": 1, "regions": [{"name": "r1", "south": -20, "north": 0, "west": 170, "east": 260}],
              "grid": {"target": "2.5deg", "method": {"cloud": "bilinear"}}}}`,
		}},
	}
	for _, g := range groups {
		t.Run(g.name, func(t *testing.T) {
			var ref, refName string
			for name, text := range g.files {
				p := writeFile(t, dir, name, text)
				r, err := config.Load(p, noEnv)
				if err != nil {
					t.Fatalf("%s: %v", name, err)
				}
				if ref == "" {
					ref, refName = r.Resolved(), name
					continue
				}
				if got := r.Resolved(); got != ref {
					if g.name == "settings" && strings.Contains(got, `"east": 260`) != strings.Contains(ref, `"east": 260`) {
						continue // the same box written in the other longitude convention resolves as written
					}
					t.Errorf("%s differs from %s:\n%s\n---\n%s", name, refName, got, ref)
				}
			}
		})
	}
}

// TestDefaults: a minimal study gets the documented defaults.
func TestDefaults(t *testing.T) {
	dir := dataDir(t, baseFiles...)
	p := writeFile(t, dir, "r.yaml", "datasets:\n  m:\n    files: {sst: sst.nc, air_temperature: ta.nc, low_cloud: cll.nc, cloud: clt.nc}\n")
	r, err := config.Load(p, noEnv)
	if err != nil {
		t.Fatal(err)
	}
	a := r.Analysis
	// δ = 1.5 K: convective onset near 27.5 °C (Graham & Barnett 1987,
	// Science 238) minus a tropical-mean SST near 26 °C (from memory).
	if a.Threshold != 27.5-26.0 || a.Transition != 0 {
		t.Errorf("threshold %v, transition %v", a.Threshold, a.Transition)
	}
	if a.Band.South != -30 || a.Band.North != 30 {
		t.Errorf("band %+v; want 30°S–30°N (common practice)", a.Band)
	}
	if a.Grid.Target != "" || a.Grid.MinCoverage != 0.5 || a.Grid.MaskThreshold != 0.5 || a.Grid.MethodFor(cf.RoleSST) != regrid.Conservative {
		t.Errorf("grid %+v", a.Grid)
	}
	if r.Output.Dir != filepath.Join(dir, "out") || !r.Output.Plots {
		t.Errorf("output %+v", r.Output)
	}
	d := r.Datasets[0]
	if d.Cloud != cf.RoleLowCloud {
		t.Errorf("cloud %s; low_cloud is preferred when both are given", d.Cloud)
	}
	if d.OutputDir != filepath.Join(dir, "out", "m") {
		t.Errorf("output dir %s", d.OutputDir)
	}
	if d.Ocean.Method != config.OceanWhereSST || d.SeaIce.Use {
		t.Errorf("ocean %+v, sea ice %+v", d.Ocean, d.SeaIce)
	}
	if d.Metrics.Text() != metrics.DefaultConventions().Text() {
		t.Errorf("metrics %s\nwant the metrics defaults %s", d.Metrics.Text(), metrics.DefaultConventions().Text())
	}
	if d.Surface.TemperatureRole != cf.RoleSST || d.Surface.PressureRole != "" || d.Surface.HumidityRole != "" {
		t.Errorf("surface %+v", d.Surface)
	}
	if !d.Selects(1850, 1) || !d.Selects(2100, 12) || d.Selects(2000, 13) {
		t.Error("by default every month of every year is selected")
	}
	if len(r.Hash()) != 64 || r.Hash() != r.Hash() {
		t.Errorf("hash %q", r.Hash())
	}
	if !strings.HasPrefix(r.Resolved(), "{\n  \"format\": \""+config.ResolvedFormat+"\"") {
		t.Errorf("resolved text starts %q", r.Resolved()[:40])
	}
}

// TestTypedSettings: values reach the typed study in SI units and the
// metrics conventions that the kernels take.
func TestTypedSettings(t *testing.T) {
	dir := dataDir(t, baseFiles...)
	p := writeFile(t, dir, "r.yaml", `datasets:
  m:
    files:
      sst: sst.nc
      air_temperature: ta.nc
      cloud: clt.nc
      surface_air_temperature: tas.nc
      surface_pressure: ps.nc
      dew_point_temperature: tdps.nc
      specific_humidity: hus.nc
      land_fraction: lsm.nc
      sea_ice: siconc.nc
    variables: {sst: tos}
    units: {sst: degC}
    coordinates:
      air_temperature: {lat: y, lon: x, level: plev, time: t, level_units: hPa}
    time:
      units: "days since 1850-01-01"
      calendar: 360_day
      months: [6, 7]
      sst: {units: "months since 1979-01-01"}   # the calendar is the dataset's
      cloud: {climatology: true}                # the dataset's units do not apply
      air_temperature: {calendar: noleap}       # the units are the dataset's
    ocean: {mask: categorical, values: [0, 2]}
    sea_ice: {max_fraction: 0.3}
    surface: {pressure: field, humidity: field, temperature: air}
    conventions: {ectei: true, ectei_beta: 0.3, ectei_surface: saturated, t850: field, lapse_pressure: 900hPa, lapse_moisture: rs}
analysis:
  cloud: cloud
  grid: {target: land_fraction}
`)
	r, err := config.Load(p, noEnv)
	if err != nil {
		t.Fatal(err)
	}
	d := r.Datasets[0]
	m := d.Metrics
	if m.Surface != metrics.SurfaceAir || !m.PressureField || m.Humidity != metrics.HumidityDewPoint ||
		!m.ECTEI || m.ECTEIBeta != 0.3 || m.ECTEISurface != metrics.ECTEISaturated || !m.T850Field ||
		m.LapsePressure != 90000 || m.LapseMoisture != metrics.LapseRs {
		t.Errorf("metrics %+v", m)
	}
	if d.Surface != (config.Surface{TemperatureRole: cf.RoleSurfaceAir, PressureRole: cf.RoleSurfacePres, HumidityRole: cf.RoleDewPoint}) {
		t.Errorf("surface %+v", d.Surface)
	}
	if d.Ocean.Method != config.OceanFromCategories || d.Ocean.Role != cf.RoleLandFraction || len(d.Ocean.OceanValues) != 2 {
		t.Errorf("ocean %+v", d.Ocean)
	}
	if !d.SeaIce.Use || d.SeaIce.MaxFraction != 0.3 {
		t.Errorf("sea ice %+v", d.SeaIce)
	}
	if d.Cloud != cf.RoleCloud || r.Analysis.Grid.TargetRole != cf.RoleLandFraction {
		t.Errorf("cloud %s, grid %+v", d.Cloud, r.Analysis.Grid)
	}

	// Spec: levels, overrides, time overrides except for the masks.
	ta := d.Spec(cf.RoleAirTemp)
	if ta.Level != 70000 || ta.Lat != "y" || ta.Lon != "x" || ta.Overrides.Level != "plev" || ta.Time != "t" || ta.LevelUnits != "hPa" ||
		ta.TimeUnits != "days since 1850-01-01" || ta.Calendar != "noleap" || ta.Climatology || ta.Var != "" {
		t.Errorf("air temperature spec %+v", ta)
	}
	if s := d.Spec(cf.RoleSST); s.Var != "tos" || s.Units != "degC" || s.Level != 0 || s.Calendar != "360_day" ||
		s.TimeUnits != "months since 1979-01-01" || s.Climatology {
		t.Errorf("sst spec %+v", s)
	}
	if c := d.Spec(cf.RoleCloud); !c.Climatology || c.TimeUnits != "" || c.Calendar != "360_day" {
		t.Errorf("cloud spec %+v", c)
	}
	// roles without their own declaration have the dataset's
	if p := d.Spec(cf.RoleSurfacePres); p.TimeUnits != "days since 1850-01-01" || p.Calendar != "360_day" || p.Climatology {
		t.Errorf("surface pressure spec %+v", p)
	}
	if len(d.Time.ByRole) != 3 || d.Time.For(cf.RoleOmega) != d.Time.TimeDecl() {
		t.Errorf("time by role %+v", d.Time.ByRole)
	}
	if !d.Selects(1900, 6) || d.Selects(1900, 8) {
		t.Error("months 6 and 7 are selected (sst is not a climatology)")
	}
	// the resolved text (which every output records) shows each role's
	// declaration complete, under the key the study uses
	var res struct {
		Datasets map[string]struct {
			Time map[string]any `json:"time"`
		} `json:"datasets"`
	}
	if err := json.Unmarshal([]byte(r.Resolved()), &res); err != nil {
		t.Fatal(err)
	}
	tm := res.Datasets["m"].Time
	if !reflect.DeepEqual(tm["cloud"], map[string]any{"units": "", "calendar": "360_day", "climatology": true}) ||
		!reflect.DeepEqual(tm["air_temperature"], map[string]any{"units": "days since 1850-01-01", "calendar": "noleap", "climatology": false}) ||
		tm["units"] != "days since 1850-01-01" || tm["omega"] != nil {
		t.Errorf("resolved time %v", tm)
	}
	if q := d.Spec(cf.RoleSpecHum); q.Level != 70000 {
		t.Errorf("q700 for ECTEI: spec %+v", q)
	}
	if t850 := d.SpecAt(cf.RoleAirTemp, 85000); t850.Level != 85000 || t850.Overrides.Level != "plev" {
		t.Errorf("T850 spec %+v", t850)
	}
	if lsm := d.Spec(cf.RoleLandFraction); lsm.TimeUnits != "" || lsm.Calendar != "" || lsm.Climatology {
		t.Errorf("mask spec carries time overrides: %+v", lsm)
	}
	if om := d.Spec(cf.RoleOmega); om.Level != 50000 {
		t.Errorf("omega spec %+v", om)
	}
	if got := d.Roles(); len(got) != 9 || got[0] != cf.RoleSST {
		t.Errorf("roles %v", got)
	}
}

func TestDatasetLookup(t *testing.T) {
	r, err := config.Load("testdata/example.yaml", noEnv)
	if err != nil {
		t.Fatal(err)
	}
	d, err := r.Dataset("model-synthetic")
	if err != nil || d.Name != "model-synthetic" {
		t.Fatalf("%v %v", d, err)
	}
	_, err = r.Dataset("model-synthetik")
	if err == nil || !strings.Contains(err.Error(), `did you mean "model-synthetic"?`) || !strings.Contains(err.Error(), "obs-synthetic, model-synthetic") {
		t.Errorf("error %v", err)
	}
}

func TestSelects(t *testing.T) {
	ym := func(y, m int) string { return string(rune('0'+m%10)) + string(rune('0'+y%10)) }
	_ = ym
	dir := dataDir(t, baseFiles...)
	cases := []struct {
		time string
		in   [][2]int
		out  [][2]int
	}{
		{`{start: "1980-03", end: "1981-02"}`, [][2]int{{1980, 3}, {1980, 12}, {1981, 2}}, [][2]int{{1980, 2}, {1981, 3}, {1979, 12}}},
		{`{season: DJF, start: "1980-12"}`, [][2]int{{1980, 12}, {1981, 1}, {2050, 2}}, [][2]int{{1980, 1}, {1980, 11}, {1981, 3}}},
		{`{months: [7], end: "2000-07"}`, [][2]int{{2000, 7}, {1, 7}}, [][2]int{{2001, 7}, {2000, 6}}},
		{`{climatology: true, season: JJA}`, [][2]int{{1, 6}, {0, 8}, {9999, 7}}, [][2]int{{1, 5}, {1, 9}}},
		// sst declared a climatology beside dated records: start and end
		// select the years of the record the run follows
		{`{sst: {climatology: true}, season: JJA, start: "1990-01"}`, [][2]int{{1990, 6}, {2000, 8}}, [][2]int{{1989, 7}, {1990, 5}}},
		// another role's climatology does not make the record one
		{`{low_cloud: {climatology: true}, end: "2000-07"}`, [][2]int{{2000, 7}, {1, 7}}, [][2]int{{2001, 7}}},
	}
	for _, c := range cases {
		p := writeFile(t, dir, "r.yaml", head+"    time: "+c.time+"\n")
		r, err := config.Load(p, noEnv)
		if err != nil {
			t.Fatal(err)
		}
		d := &r.Datasets[0]
		for _, x := range c.in {
			if !d.Selects(x[0], x[1]) {
				t.Errorf("%s: %d-%02d should be selected", c.time, x[0], x[1])
			}
		}
		for _, x := range c.out {
			if d.Selects(x[0], x[1]) {
				t.Errorf("%s: %d-%02d should not be selected", c.time, x[0], x[1])
			}
		}
	}
}

func TestRegionContains(t *testing.T) {
	cases := []struct {
		r       config.Region
		in, out [][2]float64 // lat, lon
	}{
		{config.Region{South: -10, North: 10, West: 90, East: 160},
			[][2]float64{{0, 90}, {10, 160}, {-10, 120}, {0, 120 - 360}}, [][2]float64{{0, 89}, {11, 120}, {0, 161}, {0, -90}}},
		// crosses 180°, written in −180…180
		{config.Region{South: -30, North: -10, West: 170, East: -100},
			[][2]float64{{-20, 175}, {-20, -175}, {-20, 185}, {-20, -100}}, [][2]float64{{-20, 160}, {-20, -90}, {-5, 180}}},
		// crosses 0°, written in 0…360
		{config.Region{South: 0, North: 20, West: 340, East: 20},
			[][2]float64{{10, 0}, {10, -10}, {10, 350}, {10, 380}}, [][2]float64{{10, 30}, {10, 300}}},
		// the whole circle
		{config.Region{South: -5, North: 5, West: -180, East: 180},
			[][2]float64{{0, 0}, {0, 179.9}, {0, -180}}, [][2]float64{{6, 0}}},
	}
	for _, c := range cases {
		for _, p := range c.in {
			if !c.r.Contains(p[0], p[1]) {
				t.Errorf("%+v should contain %v", c.r, p)
			}
		}
		for _, p := range c.out {
			if c.r.Contains(p[0], p[1]) {
				t.Errorf("%+v should not contain %v", c.r, p)
			}
		}
	}
	if (config.Region{South: -90, North: 90, West: 0, East: 10}).Contains(math.NaN(), 5) {
		t.Error("NaN latitude inside")
	}
}

func TestOceanAndIce(t *testing.T) {
	land := config.OceanMask{Method: config.OceanFromFraction, Role: cf.RoleLandFraction, MinOceanFraction: 0.5}
	sea := config.OceanMask{Method: config.OceanFromFraction, Role: cf.RoleSeaFraction, MinOceanFraction: 0.5}
	cat := config.OceanMask{Method: config.OceanFromCategories, Role: cf.RoleLandFraction, OceanValues: []float64{0, 2}}
	sstm := config.OceanMask{Method: config.OceanWhereSST}
	for _, c := range []struct {
		m    config.OceanMask
		v    float64
		want bool
	}{
		{land, 0, true}, {land, 0.5, true}, {land, 0.51, false}, {land, 1, false}, {land, math.NaN(), false},
		{sea, 1, true}, {sea, 0.5, true}, {sea, 0.49, false},
		{cat, 0, true}, {cat, 2, true}, {cat, 1, false}, {cat, 4, false},
		{sstm, 300, true}, {sstm, math.NaN(), false},
	} {
		if got := c.m.IsOcean(c.v); got != c.want {
			t.Errorf("%v IsOcean(%v) = %v", c.m, c.v, got)
		}
	}
	ice := config.SeaIce{Use: true, MaxFraction: 0.15}
	if ice.Excludes(0.15) || !ice.Excludes(0.16) || ice.Excludes(math.NaN()) || (config.SeaIce{MaxFraction: 0.15}).Excludes(1) {
		t.Error("sea-ice exclusion")
	}
}
