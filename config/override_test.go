package config_test

import (
	"strings"
	"testing"

	"lidscope/cf"
	"lidscope/config"
	"lidscope/metrics"
)

func envOf(m map[string]string) func(string) (string, bool) {
	return func(k string) (string, bool) {
		v, ok := m[k]
		return v, ok
	}
}

// TestPrecedence: flags > environment > file > defaults.
func TestPrecedence(t *testing.T) {
	dir := dataDir(t, baseFiles...)
	withFile := writeFile(t, dir, "with.yaml", head+"analysis:\n  threshold: 1.2\n")
	without := writeFile(t, dir, "without.yaml", head)
	cases := []struct {
		name  string
		file  string
		env   map[string]string
		flags map[string]string
		want  float64
	}{
		{"default", without, nil, nil, 1.5},
		{"file", withFile, nil, nil, 1.2},
		{"env over file", withFile, map[string]string{"LIDSCOPE_ANALYSIS_THRESHOLD": "0.8"}, nil, 0.8},
		{"env over default", without, map[string]string{"LIDSCOPE_ANALYSIS_THRESHOLD": "0.8"}, nil, 0.8},
		{"flag over env", withFile, map[string]string{"LIDSCOPE_ANALYSIS_THRESHOLD": "0.8"}, map[string]string{"analysis.threshold": "2.5"}, 2.5},
		{"flag over file", withFile, nil, map[string]string{"analysis.threshold": "-1"}, -1},
		{"empty env ignored", withFile, map[string]string{"LIDSCOPE_ANALYSIS_THRESHOLD": ""}, nil, 1.2},
		{"flag null restores the default", withFile, map[string]string{"LIDSCOPE_ANALYSIS_THRESHOLD": "0.8"}, map[string]string{"analysis.threshold": "null"}, 1.5},
		{"other variables ignored", withFile, map[string]string{"LIDSCOPE_THRESHOLD": "3", "ANALYSIS_THRESHOLD": "3"}, nil, 1.2},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r, err := config.Load(c.file, config.LoadOptions{Flags: c.flags, LookupEnv: envOf(c.env)})
			if err != nil {
				t.Fatal(err)
			}
			if r.Analysis.Threshold != c.want {
				t.Errorf("threshold %v, want %v", r.Analysis.Threshold, c.want)
			}
		})
	}
}

// TestOverrideKinds: per-dataset keys by dataset name, lists, tables,
// and the record of what was applied.
func TestOverrideKinds(t *testing.T) {
	dir := dataDir(t, baseFiles...)
	p := writeFile(t, dir, "r.yaml", head+`  second-run:
    files: {sst: sst.nc, air_temperature: ta.nc, cloud: clt.nc}
analysis:
  regions:
    - {name: a, south: 0, north: 10, west: 0, east: 10}
`)
	env := map[string]string{
		"LIDSCOPE_DATASETS_SECOND_RUN_CONVENTIONS_SVP": "bolton", // - is _ in environment names
		"LIDSCOPE_DATASETS_BASE_TIME_MONTHS":           "12,1,2",
		"LIDSCOPE_DATASETS_SECOND_RUN_FILES_LOW_CLOUD": "cll.nc",
		"LIDSCOPE_DATASETS_BASE_TIME_SST_CALENDAR":     "noleap",
		"LIDSCOPE_ANALYSIS_REGIONS_0_NAME":             "renamed",
		"LIDSCOPE_OUTPUT_PLOTS":                        "false",
	}
	flags := map[string]string{
		"datasets.base.time.months":                "[6, 7, 8]", // wins over the environment
		"analysis.band":                            "{south: -20, north: 20}",
		"datasets.second-run.surface.humidity":     "75%",
		"datasets.base.time.low_cloud.climatology": "false",
		"datasets.*.time.end":                      "2010-12", // every dataset
		"Analysis.Transition":                      "0.25",    // keys are case-folded like the file's
	}
	r, err := config.Load(p, config.LoadOptions{Flags: flags, LookupEnv: envOf(env)})
	if err != nil {
		t.Fatal(err)
	}
	d0, d1 := r.Datasets[0], r.Datasets[1]
	if got := d0.Time.Months; len(got) != 3 || got[0] != 6 {
		t.Errorf("months %v", got)
	}
	if d1.Metrics.SVP != metrics.SVPBolton || d0.Metrics.SVP != metrics.SVPMurphyKoop {
		t.Errorf("svp %v %v", d0.Metrics.SVP, d1.Metrics.SVP)
	}
	if d1.Cloud != "low_cloud" || len(d1.Inputs["low_cloud"]) != 1 {
		t.Errorf("second dataset cloud %s, inputs %v", d1.Cloud, d1.Inputs)
	}
	if d1.Metrics.AssumedRH != 0.75 {
		t.Errorf("assumed RH %v", d1.Metrics.AssumedRH)
	}
	if r.Analysis.Regions[0].Name != "renamed" || r.Analysis.Band.South != -20 || r.Analysis.Transition != 0.25 || r.Output.Plots {
		t.Errorf("analysis %+v, output %+v", r.Analysis, r.Output)
	}
	if d0.Time.For(cf.RoleSST).Calendar != "noleap" || d0.Time.For(cf.RoleAirTemp).Calendar != "" || d0.Spec(cf.RoleSST).Calendar != "noleap" {
		t.Errorf("per-role time from the environment: %+v", d0.Time.ByRole)
	}
	if _, ok := d0.Time.ByRole[cf.RoleLowCloud]; !ok {
		t.Errorf("per-role time from a flag: %+v", d0.Time.ByRole)
	}
	if d0.Time.End == nil || d1.Time.End == nil || d0.Time.End.String() != "2010-12" || d1.Time.End.String() != "2010-12" {
		t.Errorf("datasets.* sets every dataset: %v %v", d0.Time.End, d1.Time.End)
	}
	if len(r.Overrides) != 13 {
		t.Errorf("%d overrides recorded: %+v", len(r.Overrides), r.Overrides)
	}
	for _, o := range r.Overrides {
		if !strings.HasPrefix(o.Origin, "flag ") && !strings.HasPrefix(o.Origin, "environment LIDSCOPE_") {
			t.Errorf("origin %q", o.Origin)
		}
	}
	// the override changes the resolved text, so provenance sees it
	r0, err := config.Load(p, noEnv)
	if err != nil {
		t.Fatal(err)
	}
	if r0.Hash() == r.Hash() {
		t.Error("overrides do not change the hash")
	}
}

// TestOverrideProblems: bad override keys and values are reported with
// their origin instead of a line.
func TestOverrideProblems(t *testing.T) {
	dir := dataDir(t, baseFiles...)
	p := writeFile(t, dir, "r.yaml", head)
	cases := []struct {
		flags map[string]string
		env   map[string]string
		key   string
		org   string
		msg   string
	}{
		{map[string]string{"analysis.treshold": "1"}, nil, "analysis.treshold", "flag analysis.treshold", `did you mean "threshold"?`},
		{map[string]string{"datasets.bsae.about": "x"}, nil, "datasets.bsae.about", "flag datasets.bsae.about", `no dataset "bsae", and flags and the environment cannot add one; did you mean "base"?`},
		{map[string]string{"datasets.other.about": "x"}, nil, "datasets.other.about", "flag datasets.other.about", "the study has: base"},
		{map[string]string{"datasets.base": "{about: x}"}, nil, "datasets.base", "flag datasets.base", "set its keys"},
		{map[string]string{"datasets.0.about": "x"}, nil, "datasets.0.about", "flag datasets.0.about", `no dataset "0"`},
		{map[string]string{"datasets.base.time.sst.unit": "x"}, nil, "datasets.base.time.sst.unit", "flag datasets.base.time.sst.unit", `did you mean "units"?`},
		{map[string]string{"analysis.threshold.x": "1"}, nil, "analysis.threshold.x", "flag analysis.threshold.x", "no keys inside"},
		{map[string]string{"analysis..threshold": "1"}, nil, "analysis..threshold", "flag analysis..threshold", "dotted key path"},
		{map[string]string{"analysis.regions.0.name": "x"}, nil, "analysis.regions.0.name", "flag analysis.regions.0.name", "no elements"},
		{nil, map[string]string{"LIDSCOPE_ANALYSIS_THRESHOLD": "warm"}, "analysis.threshold", "environment LIDSCOPE_ANALYSIS_THRESHOLD", "must be a number"},
		{nil, map[string]string{"LIDSCOPE_DATASETS_BASE_CONVENTIONS_LCL": "rompps"}, "datasets.base.conventions.lcl", "environment LIDSCOPE_DATASETS_BASE_CONVENTIONS_LCL", `did you mean "romps"?`},
		{map[string]string{"analysis.band": "{south: -20, nord: 20}"}, nil, "analysis.band.nord", "flag analysis.band", `did you mean "north"?`},
	}
	for _, c := range cases {
		_, err := config.Load(p, config.LoadOptions{Flags: c.flags, LookupEnv: envOf(c.env)})
		ps := problems(t, err)
		found := false
		for _, pr := range ps {
			if pr.Key == c.key && pr.Origin == c.org && strings.Contains(pr.Msg, c.msg) && pr.Line == 0 &&
				strings.Contains(pr.Error(), "(from "+c.org+")") {
				found = true
			}
		}
		if !found {
			t.Errorf("%v %v: want key %s from %s saying %q; got %v", c.flags, c.env, c.key, c.org, c.msg, err)
		}
	}
}

func TestEnvName(t *testing.T) {
	for k, want := range map[string]string{
		"analysis.threshold":                            "LIDSCOPE_ANALYSIS_THRESHOLD",
		"datasets.obs.conventions.svp":                  "LIDSCOPE_DATASETS_OBS_CONVENTIONS_SVP",
		"datasets.model-12.coordinates.sst.level_units": "LIDSCOPE_DATASETS_MODEL_12_COORDINATES_SST_LEVEL_UNITS",
		"datasets.obs.time.low_cloud.units":             "LIDSCOPE_DATASETS_OBS_TIME_LOW_CLOUD_UNITS",
		"analysis.grid.min_coverage":                    "LIDSCOPE_ANALYSIS_GRID_MIN_COVERAGE",
	} {
		if got := config.EnvName(k); got != want {
			t.Errorf("EnvName(%q) = %q, want %q", k, got, want)
		}
	}
}
