package config_test

import (
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"lidscope/cf"
	"lidscope/config"
)

// The study shown in README.md's "Studies" section loads as written (with
// empty files in place of the data, as the loader only checks that files
// exist), and the per-role time declaration it shows reaches that role.
func TestREADMEStudyLoads(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	readme := string(b)
	i := strings.Index(readme, "\n## Studies\n")
	if i < 0 {
		t.Fatal("README.md has no Studies section")
	}
	block := regexp.MustCompile("(?s)```yaml\n(.*?)```").FindStringSubmatch(readme[i:])
	if block == nil {
		t.Fatal("the Studies section has no yaml block")
	}
	dir := dataDir(t, "sst/a.nc", "ta/a.nc", "cll/a.nc", "sftlf.nc")
	p := writeFile(t, dir, "study.yaml", block[1])
	r, err := config.Load(p, noEnv)
	if err != nil {
		t.Fatalf("%v\n%s", err, block[1])
	}
	d, err := r.Dataset("obs")
	if err != nil {
		t.Fatal(err)
	}
	if s := d.Spec(cf.RoleLowCloud); s.TimeUnits == "" || d.Spec(cf.RoleSST).TimeUnits != "" {
		t.Errorf("per-role time: low_cloud %q, sst %q", s.TimeUnits, d.Spec(cf.RoleSST).TimeUnits)
	}
	// the override examples of the section name keys of that study
	section := readme[i : i+1+strings.Index(readme[i+1:], "\n## ")]
	sets := regexp.MustCompile("--set ([a-z_.*-]+)=([^ `]+)").FindAllStringSubmatch(section, -1)
	envs := regexp.MustCompile("(LIDSCOPE_[A-Z_]+)=([^ `]+)").FindAllStringSubmatch(section, -1)
	if len(sets) == 0 || len(envs) < 2 {
		t.Fatalf("the Studies section shows %d --set and %d environment examples", len(sets), len(envs))
	}
	for _, m := range sets {
		r, err := config.Load(p, config.LoadOptions{LookupEnv: config.NoEnvironment, Flags: map[string]string{m[1]: m[2]}})
		if err != nil || len(r.Overrides) != 1 {
			t.Errorf("--set %s=%s: %v", m[1], m[2], err)
		}
	}
	for _, m := range envs {
		r, err := config.Load(p, config.LoadOptions{LookupEnv: envOf(map[string]string{m[1]: m[2]})})
		if err != nil || len(r.Overrides) != 1 {
			t.Errorf("%s=%s: %v (the variable must name a key of the study)", m[1], m[2], err)
		}
	}
}
