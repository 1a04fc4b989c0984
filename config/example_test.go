package config_test

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"lidscope/cf"
	"lidscope/config"
)

// Load a study and read what the pipeline needs from it.
func ExampleLoad() {
	r, err := config.Load("testdata/example.yaml", config.LoadOptions{LookupEnv: config.NoEnvironment})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("threshold:", r.Analysis.Threshold, "K;", r.Analysis.Classifier())
	for _, d := range r.Datasets {
		fmt.Printf("%s: cloud from %s, %d sst file(s), ocean mask %v, %s\n",
			d.Name, d.Cloud, len(d.Inputs[cf.RoleSST]), d.Ocean.Method, d.Metrics.SVP)
	}
	// Output:
	// threshold: 1.5 K; convective where SST − tropical-mean SST > 1.5 K, subsidence otherwise
	// obs-synthetic: cloud from low_cloud, 2 sst file(s), ocean mask fraction, murphy-koop
	// model-synthetic: cloud from low_cloud, 1 sst file(s), ocean mask sst, murphy-koop
}

// Flags win over the environment, which wins over the file.
func ExampleLoad_overrides() {
	env := map[string]string{
		"LIDSCOPE_ANALYSIS_THRESHOLD":                     "1.0",
		"LIDSCOPE_DATASETS_OBS_SYNTHETIC_CONVENTIONS_LCL": "bolton",
	}
	r, err := config.Load("testdata/example.yaml", config.LoadOptions{
		Flags: map[string]string{"analysis.threshold": "2.0"},
		LookupEnv: func(name string) (string, bool) {
			v, ok := env[name]
			return v, ok
		},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(r.Analysis.Threshold, r.Datasets[0].Metrics.LCL, r.Datasets[1].Metrics.LCL)
	for _, o := range r.Overrides {
		fmt.Println(o.Key, "=", o.Value, "from", o.Origin)
	}
	// Output:
	// 2 bolton romps
	// analysis.threshold = 1.0 from environment LIDSCOPE_ANALYSIS_THRESHOLD
	// datasets.obs-synthetic.conventions.lcl = bolton from environment LIDSCOPE_DATASETS_OBS_SYNTHETIC_CONVENTIONS_LCL
	// analysis.threshold = 2.0 from flag analysis.threshold
}

// Every problem of a study comes in one error, each with file, line and key.
func ExampleError() {
	dir, _ := os.MkdirTemp("", "study")
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "r.yaml")
	os.WriteFile(filepath.Join(dir, "sst.nc"), nil, 0o644)
	os.WriteFile(path, []byte(`datasets:
  test:
    files:
      sst: sst.nc
    variables:
      low_cloud: CLDLOW
analysis:
  treshold: 1.5
`), 0o644)
	_, err := config.Load(path, config.LoadOptions{LookupEnv: config.NoEnvironment})
	fmt.Println(strings.ReplaceAll(err.Error(), path, "r.yaml"))
	// Output:
	// study r.yaml has 2 problems:
	//   r.yaml:6: datasets.test.variables.low_cloud: role low_cloud has no files (files.low_cloud); give them or remove this entry
	//   r.yaml:8: analysis.treshold: unknown key "treshold" in analysis; did you mean "threshold"?
}

// Spec gives cf what it needs to read a role, with the role's own time
// declaration where it has one (toa_sw_up here).
func ExampleDataset_Spec() {
	r, _ := config.Load("testdata/example.yaml", config.LoadOptions{LookupEnv: config.NoEnvironment})
	d, _ := r.Dataset("obs-synthetic")
	s := d.Spec(cf.RoleAirTemp)
	fmt.Println(s.Level, s.Overrides.Level, s.LevelUnits, s.Calendar)
	s = d.Spec(cf.RoleSST)
	fmt.Println(s.Var, s.Units)
	s = d.Spec(cf.RoleSWUp)
	fmt.Printf("%s, %s\n", s.TimeUnits, s.Calendar)
	// Output:
	// 70000 plev hPa noleap
	// tos degC
	// days since 1979-01-01, noleap
}

// Parse reads a study from text, for a program that builds one without
// writing a file; relative file patterns are resolved against dir.
func ExampleParse() {
	src := []byte(`
datasets:
  obs:
    files:
      sst: "example/sst/*.nc"
      air_temperature: example/ta_1979-1998.nc
      low_cloud: "example/cloud/cll_*.nc"
    time:
      low_cloud: {units: "months since 1979-01-01", calendar: 360_day}
analysis:
  threshold: 1.0
`)
	r, err := config.Parse(src, "yaml", "testdata", config.LoadOptions{LookupEnv: config.NoEnvironment})
	if err != nil {
		fmt.Println(err)
		return
	}
	d := r.Datasets[0]
	fmt.Println(d.Name, len(d.Inputs[cf.RoleSST]), "sst files;", r.Analysis.Classifier())
	fmt.Println(d.Spec(cf.RoleLowCloud).TimeUnits, "/", d.Spec(cf.RoleSST).TimeUnits == "")

	_, err = config.Parse([]byte("datasets:\n  obs:\n    files: {sst: nowhere.nc}\n"), "yaml", "testdata", config.LoadOptions{LookupEnv: config.NoEnvironment})
	fmt.Println(err)
	// Output:
	// obs 2 sst files; convective where SST − tropical-mean SST > 1 K, subsidence otherwise
	// months since 1979-01-01 / true
	// study (study text) has a problem:
	//   (study text):3: datasets.obs.files.sst: dataset "obs", role sst: no file matches "nowhere.nc" (relative to the study's folder testdata); check the path
}

func ExampleStudy_Dataset() {
	r, _ := config.Load("testdata/example.yaml", config.LoadOptions{LookupEnv: config.NoEnvironment})
	_, err := r.Dataset("obs")
	fmt.Println(err)
	// Output:
	// study testdata/example.yaml has no dataset "obs"; its datasets are: obs-synthetic, model-synthetic
}

func ExampleTimeSelection_Selects() {
	r, _ := config.Load("testdata/example.yaml", config.LoadOptions{LookupEnv: config.NoEnvironment})
	d := r.Datasets[0] // 1979-01 … 2018-12, months 12, 1, 2
	fmt.Println(d.Selects(1979, 1), d.Selects(1979, 6), d.Selects(2019, 1))
	// Output:
	// true false false
}

func ExampleRegion_Contains() {
	box := config.Region{Name: "dateline", South: -10, North: 10, West: 170, East: -170}
	fmt.Println(box.Contains(0, 175), box.Contains(0, -175), box.Contains(0, 185), box.Contains(0, 160))
	// Output:
	// true true true false
}

func ExampleOceanMask_IsOcean() {
	m := config.OceanMask{Method: config.OceanFromFraction, Role: cf.RoleLandFraction, MinOceanFraction: 0.5}
	fmt.Println(m.IsOcean(0), m.IsOcean(0.3), m.IsOcean(0.8))
	// Output:
	// true true false
}

func ExampleEnvName() {
	fmt.Println(config.EnvName("datasets.obs-v2.surface.humidity"))
	// Output:
	// LIDSCOPE_DATASETS_OBS_V2_SURFACE_HUMIDITY
}

// Starter writes a study from what cf.Inspect found.
func ExampleStarter() {
	reports := []*cf.FileReport{{
		Path: "obs.nc",
		Fields: []cf.VarReport{
			{Role: cf.RoleSST, Var: "tos", How: "standard_name sea_surface_temperature"},
			{Role: cf.RoleAirTemp, Var: "ta", How: "standard_name air_temperature"},
			{Role: cf.RoleLowCloud, Var: "cll", How: "standard_name low_type_cloud_area_fraction"},
		},
	}}
	text := config.Starter(reports, nil)
	for _, line := range strings.Split(text, "\n") {
		if strings.HasPrefix(line, "      sst:") || strings.HasPrefix(line, "      low_cloud:") {
			fmt.Println(strings.TrimSpace(line))
		}
	}
	// Output:
	// sst: "obs.nc"
	// low_cloud: "obs.nc"
	// sst: "tos"
	// low_cloud: "cll"
}

// RelationsFor gives relations.New the relationship analysis of one
// dataset, with the responses resolved for it.
func ExampleStudy_RelationsFor() {
	r, err := config.Load("testdata/example.yaml", config.LoadOptions{LookupEnv: config.NoEnvironment})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("as written:", r.Relations.Responses)
	for i := range r.Datasets {
		d := &r.Datasets[i]
		c := r.RelationsFor(d)
		fmt.Printf("%s: %v, responses %v, indicator %s, L = %g m, %d patch(es), regime %v\n",
			d.Name, c.Mode, c.Responses, c.Indicator, c.DecorrelationLength, len(c.Patches), c.Classifier)
	}
	// Output:
	// as written: [analysis_cloud toa_sw_up]
	// obs-synthetic: climatological, responses [low_cloud toa_sw_up], indicator omega, L = 1e+06 m, 1 patch(es), regime convective where SST − tropical-mean SST > 1.5 K, subsidence otherwise
	// model-synthetic: climatological, responses [low_cloud toa_sw_up], indicator omega, L = 1e+06 m, 1 patch(es), regime convective where SST − tropical-mean SST > 1.5 K, subsidence otherwise
}
