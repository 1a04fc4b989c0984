package config_test

import (
	"math"
	"reflect"
	"slices"
	"strings"
	"testing"

	"lidscope/accumulate"
	"lidscope/cf"
	"lidscope/config"
	"lidscope/regimes"
	"lidscope/relations"
)

// relFiles are the files the relationship test studies name besides baseFiles.
var relFiles = append(append([]string{}, baseFiles...), "om.nc", "pr.nc", "rlut.nc", "rsut.nc")

// TestRelationshipsValidation: each mistake in the relationships section
// is reported with the file, the line of the key, the key path and what to
// do. Lines are counted by hand: head ends at line 6.
func TestRelationshipsValidation(t *testing.T) {
	const rel = "relationships:\n"
	cases := []struct {
		name string
		text string // appended to head
		key  string
		line int
		msg  string
	}{
		{"typo in key", rel + "  mod: anomaly\n", "relationships.mod", 8, `did you mean "mode"?`},
		{"typo in section", "relationship:\n  mode: anomaly\n", "relationship", 7, `did you mean "relationships"?`},
		{"not a table", "relationships: 3\n", "relationships", 7, "must be a table"},
		{"bad mode", rel + "  mode: anomalous\n", "relationships.mode", 8, "climatological, anomaly"},
		{"detrend without anomaly mode", rel + "  mode: climatological\n  detrend: true\n", "relationships.detrend", 9, "needs mode: anomaly"},
		{"detrend not boolean", rel + "  detrend: maybe\n", "relationships.detrend", 8, "true or false"},
		{"enabled not boolean", rel + "  enabled: maybe\n", "relationships.enabled", 8, "true or false"},

		// bins
		{"unknown predictor", rel + "  bins:\n    eiss: [0, 1]\n", "relationships.bins.eiss", 9, `unknown predictor "eiss" in relationships.bins; did you mean "eis"?`},
		{"edges decrease", rel + "  bins:\n    eis: [0, 2, 1]\n", "relationships.bins.eis.2", 9, "must increase"},
		{"edges repeat", rel + "  bins:\n    lts:\n      - 1\n      - 1\n", "relationships.bins.lts.1", 11, "must increase"},
		{"one edge", rel + "  bins:\n    eis: [3]\n", "relationships.bins.eis", 9, "at least 2"},
		{"edge not a number", rel + "  bins:\n    eis: [0, x]\n", "relationships.bins.eis.1", 9, "finite number"},
		{"width does not divide", rel + "  bins:\n    eis: {min: 0, max: 10, width: 3}\n", "relationships.bins.eis.width", 9, "does not divide"},
		{"width not positive", rel + "  bins:\n    eis:\n      min: 0\n      max: 10\n      width: -1\n", "relationships.bins.eis.width", 12, "must be > 0"},
		{"max below min", rel + "  bins:\n    rel_sst: {min: 5, max: 1, width: 1}\n", "relationships.bins.rel_sst", 9, "greater than min"},
		{"width missing", rel + "  bins:\n    eis: {min: 0, max: 10}\n", "relationships.bins.eis", 9, "give all of min, max and width"},
		{"too many bins", rel + "  bins:\n    eis: {min: 0, max: 100, width: 0.001}\n", "relationships.bins.eis.width", 9, "more than 10000"},
		{"bins wrong shape", rel + "  bins:\n    eis: true\n", "relationships.bins.eis", 9, "list of bin edges (K) or a table {min, max, width}"},
		{"unknown key in bins table", rel + "  bins:\n    eis: {min: 0, max: 1, step: 0.1}\n", "relationships.bins.eis.step", 9, "valid: max, min, width"},
		{"ectei not computed", rel + "  bins:\n    ectei: [0, 1]\n", "relationships.bins.ectei", 9, "conventions.ectei: true"},

		// responses
		{"unknown response", rel + "  responses: [low_clouds]\n", "relationships.responses.0", 8, `did you mean "low_cloud"?`},
		{"predictor as response", rel + "  responses: [low_cloud, eis]\n", "relationships.responses.1", 8, "is a predictor"},
		{"response twice", rel + "  responses:\n    - low_cloud\n    - low_cloud\n", "relationships.responses.1", 10, "listed twice"},
		{"response without input", rel + "  responses: [toa_sw_up]\n", "relationships.responses.0", 8, `dataset "base" has no toa_sw_up input`},
		{"cloud is not low cloud", rel + "  responses: [cloud]\n", "relationships.responses.0", 8, "its analysis cloud is low_cloud. Write low_cloud, or analysis_cloud"},
		{"empty responses", rel + "  responses: []\n", "relationships.responses", 8, "empty list"},
		{"responses not names", rel + "  responses: 3\n", "relationships.responses", 8, "a name or a list of names"},

		// patches
		{"patch without name", rel + "  patches:\n    - {south: 0, north: 10, west: 0, east: 10}\n", "relationships.patches.0", 9, "a patch needs a name"},
		{"patch name", rel + "  patches:\n    - {name: 1a, south: 0, north: 10, west: 0, east: 10}\n", "relationships.patches.0.name", 9, "start with a letter"},
		{"patch twice", rel + "  patches:\n    - {name: a, south: 0, north: 10, west: 0, east: 10}\n    - {name: a, south: 0, north: 10, west: 20, east: 30}\n", "relationships.patches.1.name", 10, "used twice (also relationships.patches.0)"},
		{"patch latitudes", rel + "  patches:\n    - {name: a, south: 10, north: 0, west: 0, east: 10}\n", "relationships.patches.0", 9, "south < north"},
		{"patch width", rel + "  patches:\n    - {name: a, south: 0, north: 10, west: 5, east: 5}\n", "relationships.patches.0", 9, "a patch needs a width"},
		{"patch longitude", rel + "  patches:\n    - {name: a, south: 0, north: 10, west: 0, east: 400}\n", "relationships.patches.0", 9, "−180…360"},
		{"patch missing bound", rel + "  patches:\n    - {name: a, south: 0, north: 10, west: 0}\n", "relationships.patches.0", 9, `patch "a" needs east`},
		{"patch reserved name", rel + "  patches:\n    - {name: tropical_band, south: 0, north: 10, west: 0, east: 10}\n", "relationships.patches.0.name", 9, "whole tropical band"},
		{"patch unknown key", rel + "  patches:\n    - {name: a, south: 0, north: 1, west: 0, east: 1, top: 3}\n", "relationships.patches.0.top", 9, `unknown key "top"`},
		{"patches not a list", rel + "  patches: {name: a}\n", "relationships.patches", 8, "must be a list"},

		// delta_t
		{"delta_t zero", rel + "  delta_t: [1, 0]\n", "relationships.delta_t.1", 8, "perturbs nothing"},
		{"delta_t large", rel + "  delta_t: [60]\n", "relationships.delta_t.0", 8, "beyond ±50 K"},
		{"delta_t twice", rel + "  delta_t: [1, -1, 1]\n", "relationships.delta_t.2", 8, "listed twice"},
		{"delta_t not finite", rel + "  delta_t: [.nan]\n", "relationships.delta_t.0", 8, "finite number"},

		// bootstrap
		{"replicates negative", rel + "  bootstrap: {replicates: -1}\n", "relationships.bootstrap.replicates", 8, "give 0 to 100000"},
		{"replicates fractional", rel + "  bootstrap:\n    replicates: 1.5\n", "relationships.bootstrap.replicates", 9, "whole number"},
		{"block length zero", rel + "  bootstrap:\n    block_length: 0\n", "relationships.bootstrap.block_length", 9, "out of range"},
		{"seed negative", rel + "  bootstrap: {seed: -1}\n", "relationships.bootstrap.seed", 8, "out of range"},
		{"seed too large for JSON", rel + "  bootstrap: {seed: 1.0e+20}\n", "relationships.bootstrap.seed", 8, "whole number"},
		{"seed typo", rel + "  bootstrap: {seeds: 1}\n", "relationships.bootstrap.seeds", 8, `did you mean "seed"?`},

		// threshold
		{"indicator typo", rel + "  threshold: {indicator: omgea}\n", "relationships.threshold.indicator", 8, `did you mean "omega"?`},
		{"indicator without input", rel + "  threshold:\n    indicator: omega\n", "relationships.threshold.indicator", 9, `every dataset needs an omega input; dataset "base" has none`},
		{"value without indicator", rel + "  threshold:\n    value: 0\n", "relationships.threshold.value", 9, "used only with threshold.indicator"},
		{"bin width without indicator", rel + "  threshold: {indicator: none, bin_width: 0.1}\n", "relationships.threshold.bin_width", 8, "used only with threshold.indicator"},
		{"value in wrong units", "      omega: om.nc\n" + rel + "  threshold:\n    indicator: omega\n    value: 5 K\n", "relationships.threshold.value", 11, "with units"},
		{"omega value implausible", "      omega: om.nc\n" + rel + "  threshold: {indicator: omega, value: 10}\n", "relationships.threshold.value", 9, "not a plausible omega threshold"},
		{"precipitation in mm/day without units", "      precipitation: pr.nc\n" + rel + "  threshold: {indicator: precipitation, value: 5}\n", "relationships.threshold.value", 9, `"5 mm day-1"`},
		{"olr zero", "      olr: rlut.nc\n" + rel + "  threshold: {indicator: olr, value: 0}\n", "relationships.threshold.value", 9, "not a plausible olr threshold"},
		{"bin width zero", "      olr: rlut.nc\n" + rel + "  threshold: {indicator: olr, bin_width: 0}\n", "relationships.threshold.bin_width", 9, "> 0 and at most 1 K"},
		{"range reversed", "      olr: rlut.nc\n" + rel + "  threshold: {indicator: olr, range: [8, -12]}\n", "relationships.threshold.range", 9, "must exceed"},
		{"range one value", "      olr: rlut.nc\n" + rel + "  threshold: {indicator: olr, range: [1]}\n", "relationships.threshold.range", 9, "[lowest, highest]"},
		{"threshold replicates", "      olr: rlut.nc\n" + rel + "  threshold: {indicator: olr, replicates: 200000}\n", "relationships.threshold.replicates", 9, "give 0 to 100000"},
		{"too many threshold bins", "      olr: rlut.nc\n" + rel + "  threshold: {indicator: olr, bin_width: 0.0001, range: [-40, 40]}\n", "relationships.threshold.bin_width", 9, "more than 100000"},

		// the rest
		{"omega regimes without omega", rel + "  omega_regimes: true\n", "relationships.omega_regimes", 8, "needs an omega input"},
		{"decorrelation length units", rel + "  decorrelation_length: 1000 hPa\n", "relationships.decorrelation_length", 8, "give a length with units"},
		{"decorrelation length negative", rel + "  decorrelation_length: -5\n", "relationships.decorrelation_length", 8, "not a decorrelation length"},
		{"decorrelation length huge", rel + "  decorrelation_length: 30000km\n", "relationships.decorrelation_length", 8, "to 20000 km"},
		{"partial one", rel + "  partial: [eis]\n", "relationships.partial", 8, "give the two predictors"},
		{"partial same", rel + "  partial: [eis, eis]\n", "relationships.partial", 8, "must differ"},
		{"partial not a predictor", rel + "  partial: [eis, cloud]\n", "relationships.partial.1", 8, `"cloud" is not a predictor`},
		{"partial ectei", rel + "  partial: [ectei, sst]\n", "relationships.partial.0", 8, "conventions.ectei: true"},

		// region names feed the relationship files
		{"region name digit first", "analysis:\n  regions:\n    - {name: 1a, south: 0, north: 10, west: 0, east: 10}\n", "analysis.regions.0.name", 9, "start with a letter"},
		{"region name reserved", "analysis:\n  regions:\n    - {name: tropical_band, south: 0, north: 10, west: 0, east: 10}\n", "analysis.regions.0.name", 9, "whole tropical band"},
	}
	dir := dataDir(t, relFiles...)
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			path := writeFile(t, dir, "r.yaml", head+c.text)
			_, err := config.Load(path, noEnv)
			for _, p := range problems(t, err) {
				if p.Key == c.key && strings.Contains(p.Msg, c.msg) {
					if p.Line != c.line {
						t.Errorf("line %d, want %d: %v", p.Line, c.line, p)
					}
					if !strings.HasPrefix(p.Error(), path+":") {
						t.Errorf("message %q does not start with file:line", p.Error())
					}
					return
				}
			}
			t.Errorf("no problem at key %s containing %q; got:\n%v", c.key, c.msg, err)
		})
	}
}

// TestRelationshipsLinesInOtherFormats: TOML and JSON problems of the
// section name their lines too.
func TestRelationshipsLinesInOtherFormats(t *testing.T) {
	dir := dataDir(t, relFiles...)
	cases := []struct {
		file, text string
		want       map[string]int
	}{
		{"r.toml", `[datasets.base]
files = { sst = "sst.nc", air_temperature = "ta.nc", low_cloud = "cll.nc" }

[relationships]
mode = "anomaly"
delta_t = [1, 0]

[relationships.bins]
eis = { min = 0, max = 10, width = 3 }

[relationships.bootstrap]
sed = 4
`, map[string]int{"relationships.delta_t.1": 6, "relationships.bins.eis.width": 9, "relationships.bootstrap.sed": 12}},
		{"r.json", `{
  "datasets": {"base": {"files": {"sst": "sst.nc", "air_temperature": "ta.nc", "low_cloud": "cll.nc"}}},
  "relationships": {
    "delta_t": [1,
                0],
    "bins": {"eis": {"min": 0, "max": 10, "width": 3}},
    "bootstrap": {
      "sed": 4
    }
  }
}
`, map[string]int{"relationships.delta_t.1": 5, "relationships.bins.eis.width": 6, "relationships.bootstrap.sed": 8}},
	}
	for _, c := range cases {
		t.Run(c.file, func(t *testing.T) {
			_, err := config.Load(writeFile(t, dir, c.file, c.text), noEnv)
			ps := problems(t, err)
			got := map[string]int{}
			for _, p := range ps {
				got[p.Key] = p.Line
			}
			for k, line := range c.want {
				if got[k] != line {
					t.Errorf("%s: line %d, want %d (%v)", k, got[k], line, err)
				}
			}
			if len(ps) != len(c.want) {
				t.Errorf("%d problems, want %d: %v", len(ps), len(c.want), err)
			}
		})
	}
}

// clearNaN puts 0 in the NaN field (the indicator threshold's "default"),
// so that reflect.DeepEqual can compare configurations.
func clearNaN(c relations.Config) relations.Config {
	if math.IsNaN(c.IndicatorThreshold) {
		c.IndicatorThreshold = 0
	}
	return c
}

// TestRelationshipsDefaults: without a relationships section the
// configuration is relations.Defaults() with the analysis's regime
// definition and regions, and each dataset's responses are its analysis
// cloud (plus toa_sw_up when it names one), as documented.
func TestRelationshipsDefaults(t *testing.T) {
	dir := dataDir(t, relFiles...)
	p := writeFile(t, dir, "r.yaml", head+`      toa_sw_up: rsut.nc
  second:
    files: {sst: sst.nc, air_temperature: ta.nc, cloud: clt.nc}
analysis:
  threshold: 1.2
  transition: 0.3
  regions:
    - {name: box_a, south: -10, north: 10, west: 170, east: -170}
`)
	r, err := config.Load(p, noEnv)
	if err != nil {
		t.Fatal(err)
	}
	want := relations.Defaults()
	want.Classifier = regimes.Classifier{Delta: 1.2, HalfWidth: 0.3}
	want.Regimes = regimes.Definition{Band: regimes.Band{South: -30, North: 30}, Rule: regimes.RuleRelativeSST, Delta: 1.2, HalfWidth: 0.3}
	want.Regions = []accumulate.Region{{Name: "box_a", South: -10, North: 10, West: 170, East: -170}}
	if got := r.Relations; !reflect.DeepEqual(clearNaN(got), clearNaN(want)) || !math.IsNaN(got.IndicatorThreshold) {
		t.Errorf("Relations\n%+v\nwant\n%+v", got, want)
	}
	if got := r.Relations.Text(); got != want.Text() {
		t.Errorf("text\n%s\nwant\n%s", got, want.Text())
	}
	for i, resp := range [][]string{{"low_cloud", "toa_sw_up"}, {"cloud"}} {
		d := &r.Datasets[i]
		if !slices.Equal(d.RelationResponses, resp) {
			t.Errorf("%s: responses %v, want %v", d.Name, d.RelationResponses, resp)
		}
		c := r.RelationsFor(d)
		w := want
		w.Responses = resp
		if !reflect.DeepEqual(clearNaN(c), clearNaN(w)) {
			t.Errorf("%s: RelationsFor\n%+v\nwant\n%+v", d.Name, c, w)
		}
		if err := c.Validate(); err != nil {
			t.Errorf("%s: %v", d.Name, err)
		}
	}
	// RelationsFor returns copies: changing one leaves the study alone.
	c := r.RelationsFor(&r.Datasets[0])
	c.DeltaT[0], c.Regions[0].Name, c.Responses[0] = 99, "changed", "x"
	if r.Relations.DeltaT[0] != -4 || r.Relations.Regions[0].Name != "box_a" || r.Datasets[0].RelationResponses[0] != "low_cloud" {
		t.Error("RelationsFor shares slices with the study")
	}
}

// TestRelationshipsTyped: every key reaches relations.Config in SI units.
func TestRelationshipsTyped(t *testing.T) {
	dir := dataDir(t, relFiles...)
	p := writeFile(t, dir, "r.yaml", head+`      omega: om.nc
      specific_humidity: hus.nc
    conventions: {ectei: true}
relationships:
  mode: anomaly
  detrend: true
  bins:
    eis: {min: -3, max: 3, width: 0.5}
    ectei: [-2, 0, 2]
  responses: [analysis_cloud, omega, low_cloud]
  seasons: true
  patches:
    - {name: east_pacific, south: -10, north: 10, west: -130, east: -80}
  delta_t: [-2, 2]
  bootstrap: {replicates: 500, block_length: 6, seed: 9007199254740992}
  threshold:
    indicator: omega
    value: -10 hPa day-1
    bin_width: 0.1
    range: [-6, 4]
    replicates: 200
  omega_regimes: true
  decorrelation_length: 500 km
  partial: [ectei, rel_sst]
`)
	r, err := config.Load(p, noEnv)
	if err != nil {
		t.Fatal(err)
	}
	c := r.Relations
	if c.Mode != relations.Anomaly || !c.Detrend || !c.Seasons || !c.OmegaBins {
		t.Errorf("mode %v detrend %v seasons %v omega %v", c.Mode, c.Detrend, c.Seasons, c.OmegaBins)
	}
	wantBins := map[string][]float64{"eis": {-3, -2.5, -2, -1.5, -1, -0.5, 0, 0.5, 1, 1.5, 2, 2.5, 3}, "ectei": {-2, 0, 2}}
	if !reflect.DeepEqual(c.Bins, wantBins) {
		t.Errorf("bins %v", c.Bins)
	}
	if !slices.Equal(c.Responses, []string{"analysis_cloud", "omega", "low_cloud"}) {
		t.Errorf("responses as written %v", c.Responses)
	}
	// analysis_cloud is low_cloud here, so low_cloud counts once
	if got := r.Datasets[0].RelationResponses; !slices.Equal(got, []string{"low_cloud", "omega"}) {
		t.Errorf("resolved responses %v", got)
	}
	if !reflect.DeepEqual(c.Patches, []relations.Patch{{Name: "east_pacific", South: -10, North: 10, West: -130, East: -80}}) {
		t.Errorf("patches %+v", c.Patches)
	}
	if !slices.Equal(c.DeltaT, []float64{-2, 2}) {
		t.Errorf("delta_t %v", c.DeltaT)
	}
	if c.Bootstrap != (relations.Bootstrap{N: 500, BlockLength: 6, Seed: 1 << 53}) {
		t.Errorf("bootstrap %+v", c.Bootstrap)
	}
	// 10 hPa per day = 1000 Pa / 86400 s
	if c.Indicator != "omega" || math.Abs(c.IndicatorThreshold-(-1000.0/86400)) > 1e-15 ||
		c.ThresholdBinWidth != 0.1 || c.ThresholdRange != [2]float64{-6, 4} || c.ThresholdReplicates != 200 {
		t.Errorf("threshold %q %v %v %v %v", c.Indicator, c.IndicatorThreshold, c.ThresholdBinWidth, c.ThresholdRange, c.ThresholdReplicates)
	}
	if c.DecorrelationLength != 5e5 || c.Partial != [2]string{"ectei", "rel_sst"} {
		t.Errorf("decorrelation %v partial %v", c.DecorrelationLength, c.Partial)
	}
	if err := r.RelationsFor(&r.Datasets[0]).Validate(); err != nil {
		t.Error(err)
	}
	if res := r.Resolved(); !strings.Contains(res, `"indicator": "omega",`) || !strings.Contains(res, `"value": -0.011574074074074073`) {
		t.Errorf("resolved text lacks the indicator:\n%s", r.Resolved())
	}
}

// TestRelationshipsPerDataset: responses resolve per dataset, with the
// analysis cloud of each; files.any gives any role, which is then read.
func TestRelationshipsPerDataset(t *testing.T) {
	dir := dataDir(t, relFiles...)
	two := head + `  second:
    files: {sst: sst.nc, air_temperature: ta.nc, cloud: clt.nc, toa_sw_up: rsut.nc}
  third:
    files: {any: all.nc}
`
	t.Run("analysis_cloud", func(t *testing.T) {
		r, err := config.Load(writeFile(t, dir, "r.yaml", two+"relationships:\n  responses: [analysis_cloud]\n"), noEnv)
		if err != nil {
			t.Fatal(err)
		}
		for i, want := range []string{"low_cloud", "cloud", "low_cloud"} {
			if got := r.Datasets[i].RelationResponses; !slices.Equal(got, []string{want}) {
				t.Errorf("dataset %d: %v, want [%s]", i, got, want)
			}
		}
	})
	t.Run("default", func(t *testing.T) {
		r, err := config.Load(writeFile(t, dir, "r.yaml", two), noEnv)
		if err != nil {
			t.Fatal(err)
		}
		// toa_sw_up by default only where the dataset names it
		for i, want := range [][]string{{"low_cloud"}, {"cloud", "toa_sw_up"}, {"low_cloud"}} {
			if got := r.Datasets[i].RelationResponses; !slices.Equal(got, want) {
				t.Errorf("dataset %d: %v, want %v", i, got, want)
			}
		}
		if _, ok := r.Datasets[2].Inputs[cf.RoleSWUp]; ok {
			t.Error("toa_sw_up read from files.any without being asked for")
		}
	})
	t.Run("low_cloud missing in one dataset", func(t *testing.T) {
		_, err := config.Load(writeFile(t, dir, "r.yaml", two+"relationships:\n  responses: [low_cloud]\n"), noEnv)
		ps := problems(t, err)
		if len(ps) != 1 || ps[0].Key != "relationships.responses.0" || ps[0].Line != 12 ||
			!strings.Contains(ps[0].Msg, `low_cloud is the low cloud cover (role low_cloud), but dataset "second" has no low_cloud input: its analysis cloud is cloud`) {
			t.Errorf("%v", err)
		}
	})
	t.Run("files.any gives the roles asked for", func(t *testing.T) {
		r, err := config.Load(writeFile(t, dir, "r.yaml", `datasets:
  m:
    files: {any: all.nc}
relationships:
  responses: [cloud, toa_sw_up]
  threshold: {indicator: precipitation, value: 3 mm day-1}
  omega_regimes: true
`), noEnv)
		if err != nil {
			t.Fatal(err)
		}
		d := r.Datasets[0]
		for _, role := range []cf.Role{cf.RoleLowCloud, cf.RoleCloud, cf.RoleSWUp, cf.RolePrecip, cf.RoleOmega} {
			if len(d.Inputs[role]) != 1 {
				t.Errorf("role %s not read from files.any: %v", role, d.Inputs)
			}
		}
		if d.Spec(cf.RoleOmega).Level != 50000 {
			t.Error("omega is not read at 500 hPa")
		}
		if got := r.Relations.IndicatorThreshold; math.Abs(got-3.0/86400) > 1e-18 {
			t.Errorf("threshold %v", got)
		}
	})
}

// TestRelationshipsFormats: the section written in YAML, TOML and JSON,
// with bins as a table or as the same edges listed, defaults spelt out or
// left out, resolves identically; a change of any decision changes the
// hash.
func TestRelationshipsFormats(t *testing.T) {
	dir := dataDir(t, relFiles...)
	ds := "datasets:\n  m:\n    files: {sst: sst.nc, air_temperature: ta.nc, low_cloud: cll.nc, olr: rlut.nc}\n"
	files := map[string]string{
		"a.yaml": ds + `relationships:
  mode: anomaly
  bins: {eis: {min: -2, max: 2, width: 0.5}, rel_sst: [-1, 0, 1]}
  patches: [{name: p, south: -5, north: 5, west: 160, east: -150}]
  threshold: {indicator: olr, value: 230}
  decorrelation_length: 800km
`,
		"b.toml": `[datasets.m]
files = { sst = "sst.nc", air_temperature = "ta.nc", low_cloud = "cll.nc", olr = "rlut.nc" }

[relationships]
mode = "anomaly"
detrend = false
responses = "analysis_cloud"
patches = [{ name = "p", south = -5, north = 5, west = 160, east = -150 }]
decorrelation_length = 800000

[relationships.bins]
eis = [-2, -1.5, -1, -0.5, 0, 0.5, 1, 1.5, 2]
rel_sst = { min = -1, max = 1, width = 1 }

[relationships.threshold]
indicator = "olr"
value = "230 W m-2"
bin_width = 0.05
range = [-12, 8]
`,
		"c.json": `{"datasets": {"m": {"files": {"sst": "sst.nc", "air_temperature": "ta.nc", "low_cloud": "cll.nc", "olr": "rlut.nc"}}},
 "relationships": {"mode": "anomaly", "seasons": false, "responses": ["low_cloud"], "delta_t": [-4, -3, -2, -1, 1, 2, 3, 4],
   "bins": {"rel_sst": [-1, 0, 1], "eis": {"min": -2, "max": 2, "width": 0.5}},
   "patches": [{"name": "p", "south": -5, "north": 5, "west": 160, "east": -150}],
   "bootstrap": {"replicates": 0, "block_length": 12, "seed": 20040101},
   "threshold": {"indicator": "olr", "value": 230, "replicates": 1000},
   "decorrelation_length": "800 km", "partial": ["eis", "sst"], "omega_regimes": false}}`,
	}
	var ref, refName string
	for _, name := range []string{"a.yaml", "b.toml", "c.json"} {
		r, err := config.Load(writeFile(t, dir, name, files[name]), noEnv)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if ref == "" {
			ref, refName = r.Resolved(), name
			continue
		}
		if got := r.Resolved(); got != ref {
			t.Errorf("%s differs from %s:\n%s\n---\n%s", name, refName, got, ref)
		}
	}
	base, err := config.Load(writeFile(t, dir, "a.yaml", files["a.yaml"]), noEnv)
	if err != nil {
		t.Fatal(err)
	}
	for _, flag := range []map[string]string{
		{"relationships.mode": "climatological"},
		{"relationships.seasons": "true"},
		{"relationships.delta_t": "[-1, 1]"},
		{"relationships.bootstrap.seed": "7"},
		{"relationships.threshold.value": "220"},
		{"relationships.decorrelation_length": "0"},
		{"relationships.partial": "[lts, sst]"},
		{"relationships.bins.eis": "[-1, 0, 1]"},
		{"relationships.patches": "[{name: q, south: -5, north: 5, west: 160, east: -150}]"},
	} {
		r, err := config.Load(writeFile(t, dir, "a.yaml", files["a.yaml"]), config.LoadOptions{Flags: flag, LookupEnv: config.NoEnvironment})
		if err != nil {
			t.Fatalf("%v: %v", flag, err)
		}
		if r.Hash() == base.Hash() {
			t.Errorf("%v does not change the hash", flag)
		}
	}
}

// TestRelationshipsOverrides: the keys are reachable from flags and the
// environment, with problems named by their origin.
func TestRelationshipsOverrides(t *testing.T) {
	dir := dataDir(t, relFiles...)
	p := writeFile(t, dir, "r.yaml", head+"      omega: om.nc\nrelationships:\n  bins:\n    eis: {min: -6, max: 14, width: 1}\n")
	env := map[string]string{
		"LIDSCOPE_RELATIONSHIPS_MODE":                "anomaly",
		"LIDSCOPE_RELATIONSHIPS_BINS_EIS_WIDTH":      "2",
		"LIDSCOPE_RELATIONSHIPS_RESPONSES":           "low_cloud,omega",
		"LIDSCOPE_RELATIONSHIPS_THRESHOLD_INDICATOR": "omega",
		"LIDSCOPE_RELATIONSHIPS_BOOTSTRAP_SEED":      "11",
	}
	flags := map[string]string{"relationships.detrend": "true", "relationships.bins.lts": "{min: 0, max: 4, width: 2}", "relationships.threshold.value": "-5 hPa day-1"}
	r, err := config.Load(p, config.LoadOptions{Flags: flags, LookupEnv: envOf(env)})
	if err != nil {
		t.Fatal(err)
	}
	c := r.Relations
	if c.Mode != relations.Anomaly || !c.Detrend || c.Bootstrap.Seed != 11 || c.Indicator != "omega" ||
		math.Abs(c.IndicatorThreshold+500.0/86400) > 1e-15 || !slices.Equal(r.Datasets[0].RelationResponses, []string{"low_cloud", "omega"}) {
		t.Errorf("%+v; responses %v", c, r.Datasets[0].RelationResponses)
	}
	if !reflect.DeepEqual(c.Bins, map[string][]float64{"eis": {-6, -4, -2, 0, 2, 4, 6, 8, 10, 12, 14}, "lts": {0, 2, 4}}) {
		t.Errorf("bins %v", c.Bins)
	}
	_, err = config.Load(p, config.LoadOptions{Flags: map[string]string{"relationships.bins.eis": "[1, 0]"}, LookupEnv: config.NoEnvironment})
	ps := problems(t, err)
	if len(ps) != 1 || ps[0].Key != "relationships.bins.eis.1" || ps[0].Origin != "flag relationships.bins.eis" || ps[0].Line != 0 {
		t.Errorf("%v", err)
	}
	// an empty bins table is no bins table, from a flag as from the file
	for _, text := range []string{head + "relationships:\n  bins: {}\n", head + "relationships:\n  bins:\n    eis:\n"} {
		q := writeFile(t, dir, "empty.yaml", text)
		for _, flags := range []map[string]string{nil, {"relationships.bins": "{}"}, {"relationships.bins": "{eis: null}"}} {
			r, err := config.Load(q, config.LoadOptions{Flags: flags, LookupEnv: config.NoEnvironment})
			if err != nil {
				t.Errorf("%q with %v: %v", text, flags, err)
			} else if r.Relations.Bins != nil {
				t.Errorf("%q with %v: bins %v, want the defaults (nil)", text, flags, r.Relations.Bins)
			}
		}
	}
	_, err = config.Load(p, config.LoadOptions{LookupEnv: envOf(map[string]string{"LIDSCOPE_RELATIONSHIPS_DELTA_T": "1,0"})})
	ps = problems(t, err)
	if len(ps) != 1 || ps[0].Key != "relationships.delta_t.1" || ps[0].Origin != "environment LIDSCOPE_RELATIONSHIPS_DELTA_T" {
		t.Errorf("%v", err)
	}
}

// TestStarterRelationships: the commented relationships block of the
// starter shows the defaults: uncommented, the study decides the same.
func TestStarterRelationships(t *testing.T) {
	const std = "standard_name x"
	for _, c := range []struct {
		name   string
		fields []cf.VarReport
		note   string
	}{
		{"plain", nil, `indicator: ""  # off; omega, precipitation or olr need that input`},
		{"toa and omega", []cf.VarReport{{Role: cf.RoleSWUp, Var: "rsut", How: std}, {Role: cf.RoleOmega, Var: "wap", How: std}},
			"CHECK: omega is given, so indicator: omega would estimate it"},
	} {
		t.Run(c.name, func(t *testing.T) {
			fields := append([]cf.VarReport{{Role: cf.RoleSST, Var: "tos", How: std}, {Role: cf.RoleAirTemp, Var: "ta", How: std},
				{Role: cf.RoleLowCloud, Var: "cll", How: std}}, c.fields...)
			text := config.Starter([]*cf.FileReport{{Path: "all.nc", Fields: fields, Usable: true}}, nil)
			if !strings.Contains(text, c.note) {
				t.Errorf("starter lacks %q:\n%s", c.note, text)
			}
			dir := dataDir(t, "all.nc")
			r0, err := config.Load(writeFile(t, dir, "r0.yaml", text), noEnv)
			if err != nil {
				t.Fatal(err)
			}
			i := strings.Index(text, "\n# relationships:\n")
			if i < 0 {
				t.Fatalf("no relationships block:\n%s", text)
			}
			var b strings.Builder
			b.WriteString(text[:i+1])
			n := 0
			for _, l := range strings.Split(strings.TrimSuffix(text[i+1:], "\n"), "\n") {
				if !strings.HasPrefix(l, "# ") {
					t.Fatalf("line %q in the block is not commented", l)
				}
				b.WriteString(l[2:] + "\n")
				n++
			}
			r1, err := config.Load(writeFile(t, dir, "r1.yaml", b.String()), noEnv)
			if err != nil {
				t.Fatalf("%v\n%s", err, b.String())
			}
			if n < 15 || r0.Resolved() != r1.Resolved() {
				t.Errorf("uncommented block (%d lines) decides otherwise:\n%s\n---\n%s", n, r1.Resolved(), r0.Resolved())
			}
		})
	}
}
