package main

import (
	"bytes"
	"encoding/json"
	"path/filepath"
	"slices"
	"sort"
	"strings"
	"testing"

	"lidscope/config"
	"lidscope/fixtures"
)

// keysWorld generates a small synthetic world (package fixtures: invented
// data) and returns its study.
func keysWorld(t *testing.T) string {
	t.Helper()
	o := fixtures.DefaultOptions()
	o.Name = "keys"
	o.Resolution = 5
	o.Years = 1
	o.YearsPerFile = 1
	o.Command = []string{"lidscope-test", "calc-keys"}
	dir := filepath.Join(t.TempDir(), "world")
	if _, err := fixtures.Generate(dir, o); err != nil {
		t.Fatalf("fixtures.Generate: %v", err)
	}
	return filepath.Join(dir, "study.yaml")
}

// studyMetricsKeys returns the dotted prefix of the first dataset's keys
// in --set form, and every key config reads under that dataset's metrics
// and surface tables, in environment-variable form. The list comes from
// config's schema itself: Load asks for the environment variable of every
// key of the schema (config.EnvName), and the test records the names.
func studyMetricsKeys(t *testing.T, study string) (prefix string, keys []string) {
	t.Helper()
	asked := map[string]bool{}
	r, err := config.Load(study, config.LoadOptions{LookupEnv: func(name string) (string, bool) {
		asked[name] = true
		return "", false
	}})
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range []string{"datasets.0", "datasets." + r.Datasets[0].Name} {
		if asked[config.EnvName(p+".conventions.svp")] {
			prefix = p
		}
	}
	if prefix == "" {
		t.Fatalf("no environment variable for the svp key of dataset %q among %d asked", r.Datasets[0].Name, len(asked))
	}
	for name := range asked {
		for _, table := range []string{"conventions", "surface"} {
			if strings.HasPrefix(name, config.EnvName(prefix+"."+table+".")) {
				keys = append(keys, name)
			}
		}
	}
	sort.Strings(keys)
	return prefix, keys
}

// calcFlagFor is the naming rule of calcStudyKeys: the study key with "-"
// for "_", without "conventions." and "constants.", "surface." as "surface-".
func calcFlagFor(key string) string {
	k := strings.TrimPrefix(key, "conventions.")
	k = strings.TrimPrefix(k, "constants.")
	k = strings.Replace(k, "surface.", "surface-", 1)
	return strings.ReplaceAll(k, "_", "-")
}

// The metrics-conventions flags of calc and the study keys of the same
// settings have the same names and values (so a user can copy one to the
// other), both ways: every key config reads under a dataset's metrics and
// surface tables has its calc flag, and every calc flag of calcStudyKeys is
// such a key. When config's schema gains, loses or renames a key, this test
// fails until calc follows.
func TestCalcFlagsAreStudyKeys(t *testing.T) {
	prefix, studyKeys := studyMetricsKeys(t, keysWorld(t))
	cmd := newCalcCmd(&env{stdout: &bytes.Buffer{}, stderr: &bytes.Buffer{}})
	var calcKeys []string
	for _, k := range calcStudyKeys {
		calcKeys = append(calcKeys, config.EnvName(prefix+"."+k.Key))
		if want := calcFlagFor(k.Key); k.Flag != want {
			t.Errorf("study key %s: calc flag --%s, want --%s", k.Key, k.Flag, want)
		}
		f := cmd.Flags().Lookup(k.Flag)
		if f == nil {
			t.Errorf("calc has no flag --%s (study key %s)", k.Flag, k.Key)
		} else if !strings.Contains(f.Usage, "[study key "+k.Key+"]") {
			t.Errorf("calc --%s: help %q does not name study key %s", k.Flag, f.Usage, k.Key)
		}
	}
	sort.Strings(calcKeys)
	for _, k := range studyKeys {
		if !slices.Contains(calcKeys, k) {
			t.Errorf("study key %s has no calc flag in calcStudyKeys", k)
		}
	}
	for _, k := range calcKeys {
		if !slices.Contains(studyKeys, k) {
			t.Errorf("calc's %s is not a key config reads (it asks for %v)", k, studyKeys)
		}
	}
}

// The same value written to a study key and to its calc flag gives the
// same metrics conventions (metrics.Conventions.Text, the record every
// output carries). Values that name a field of a file have the column's
// value as calc counterpart (calcArgs).
func TestCalcFlagValuesAreStudyValues(t *testing.T) {
	study := keysWorld(t)
	prefix, _ := studyMetricsKeys(t, study)
	cases := []struct {
		key, value string
		calcArgs   []string // default: --FLAG VALUE
		ectei      bool     // compare with ECTEI on (calc: --q700 4g/kg)
	}{
		{key: "surface.temperature", value: "sst"},
		{key: "surface.pressure", value: "1013hPa"},
		{key: "surface.pressure", value: "101000"},
		{key: "surface.humidity", value: "0.75"},
		{key: "surface.humidity", value: "75%"},
		{key: "conventions.svp", value: "bolton"},
		{key: "conventions.svp", value: "murphy-koop"},
		{key: "conventions.lcl", value: "romps"},
		{key: "conventions.lcl", value: "bolton"},
		{key: "conventions.lcl", value: "linear"},
		{key: "conventions.t850", value: "mean"},
		{key: "conventions.t850", value: "field", calcArgs: []string{"--t850", "288K"}},
		{key: "conventions.lapse_pressure", value: "800hPa"},
		{key: "conventions.lapse_moisture", value: "rs"},
		{key: "conventions.lapse_moisture", value: "qs"},
		{key: "conventions.ectei", value: "false", calcArgs: []string{"--ectei=false"}},
		{key: "conventions.ectei_beta", value: "0.3", ectei: true},
		{key: "conventions.ectei_surface", value: "saturated", ectei: true},
		{key: "conventions.ectei_surface", value: "air", ectei: true},
		{key: "conventions.constants.rd", value: "287.05"},
		{key: "conventions.constants.rv", value: "461.52"},
		{key: "conventions.constants.cpd", value: "1005.7"},
		{key: "conventions.constants.lv0", value: "2.5e6"},
		{key: "conventions.constants.lv_slope", value: "2370"},
		{key: "conventions.constants.g", value: "9.81"},
		{key: "conventions.constants.p0", value: "101325"},
	}
	tested := map[string]bool{}
	for _, c := range cases {
		tested[c.key] = true
		r, err := config.Load(study, config.LoadOptions{LookupEnv: config.NoEnvironment,
			Flags: map[string]string{prefix + "." + c.key: c.value}})
		if err != nil {
			t.Errorf("%s: %s: %v", c.key, c.value, err)
			continue
		}
		m := r.Datasets[0].Metrics
		args := []string{"calc", "--sst", "290K", "--t700", "282K", "--json"}
		if c.calcArgs != nil {
			args = append(args, c.calcArgs...)
		} else {
			args = append(args, "--"+calcFlagFor(c.key), c.value)
		}
		if c.ectei {
			m.ECTEI = true
			args = append(args, "--q700", "4g/kg")
		}
		var out, errb bytes.Buffer
		if code := run(args, &out, &errb); code != 0 {
			t.Errorf("lidscope %s: exit %d: %s", strings.Join(args, " "), code, errb.String())
			continue
		}
		var rep calcReport
		if err := json.Unmarshal(out.Bytes(), &rep); err != nil {
			t.Fatal(err)
		}
		if rep.Conventions != m.Text() {
			t.Errorf("%s: %s in a study gives\n  %s\nlidscope %s gives\n  %s", c.key, c.value, m.Text(), strings.Join(args[1:], " "), rep.Conventions)
		}
	}
	for _, k := range calcStudyKeys {
		if !tested[k.Key] {
			t.Errorf("no value of study key %s (calc --%s) is compared", k.Key, k.Flag)
		}
	}
}
