package config_test

import (
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"lidscope/cf"
	"lidscope/config"
)

// TestGlobs: patterns are expanded relative to the study's folder (not
// the working directory), sorted, without duplicates and without folders.
func TestGlobs(t *testing.T) {
	dir := dataDir(t, "sst/sst_2001.nc", "sst/sst_1999.nc", "sst/sst_2000.nc", "sst/readme.txt",
		"ta/a.nc", "ta/b.nc", "cl/c.nc", "abs/x.nc", "lsm.nc")
	if err := os.Mkdir(filepath.Join(dir, "sst", "folder.nc"), 0o755); err != nil {
		t.Fatal(err)
	}
	sub := filepath.Join(dir, "studies")
	if err := os.Mkdir(sub, 0o755); err != nil {
		t.Fatal(err)
	}
	abs := filepath.Join(dir, "abs", "*.nc")
	p := writeFile(t, sub, "r.yaml", `datasets:
  g:
    files:
      sst: "../sst/*.nc"
      air_temperature: ["../ta/b.nc", "../ta/*.nc", "../ta/a.nc"]
      low_cloud: "../cl/c.nc"
      olr: "`+abs+`"
      land_fraction: ../lsm.nc
`)
	// run from another folder: the study's folder must be used
	wd, _ := os.Getwd()
	if err := os.Chdir(t.TempDir()); err != nil {
		t.Fatal(err)
	}
	defer os.Chdir(wd)
	r, err := config.Load(p, noEnv)
	if err != nil {
		t.Fatal(err)
	}
	in := r.Datasets[0].Inputs
	want := map[cf.Role][]string{
		cf.RoleSST:          {filepath.Join(dir, "sst/sst_1999.nc"), filepath.Join(dir, "sst/sst_2000.nc"), filepath.Join(dir, "sst/sst_2001.nc")},
		cf.RoleAirTemp:      {filepath.Join(dir, "ta/a.nc"), filepath.Join(dir, "ta/b.nc")},
		cf.RoleLowCloud:     {filepath.Join(dir, "cl/c.nc")},
		cf.RoleOLR:          {filepath.Join(dir, "abs/x.nc")},
		cf.RoleLandFraction: {filepath.Join(dir, "lsm.nc")},
	}
	for role, w := range want {
		if !reflect.DeepEqual(in[role], w) {
			t.Errorf("%s: %v, want %v", role, in[role], w)
		}
	}
	if len(in) != len(want) {
		t.Errorf("roles %v", r.Datasets[0].Roles())
	}
	// the resolved text names files relative to the study's folder
	res := r.Resolved()
	if !strings.Contains(res, `"../sst/sst_1999.nc"`) || !strings.Contains(res, `"`+filepath.ToSlash(filepath.Join(dir, "abs/x.nc"))+`"`) {
		t.Errorf("resolved files:\n%s", res)
	}
	if r.Datasets[0].Ocean.Method != config.OceanFromFraction || r.Datasets[0].Ocean.Role != cf.RoleLandFraction {
		t.Errorf("a land_fraction input makes the fraction mask the default: %+v", r.Datasets[0].Ocean)
	}
}

// TestAllInputs: files.any gives every role the settings read and that no
// other key gives.
func TestAllInputs(t *testing.T) {
	dir := dataDir(t, baseFiles...)
	p := writeFile(t, dir, "r.yaml", `datasets:
  model:
    files:
      any: all.nc
      sst: sst.nc
    surface: {pressure: field, humidity: relative_humidity}
    ocean: {mask: fraction}
    sea_ice: {max_fraction: 0.1}
analysis:
  cloud: cloud
`)
	r, err := config.Load(p, noEnv)
	if err != nil {
		t.Fatal(err)
	}
	d := r.Datasets[0]
	all := []string{filepath.Join(dir, "all.nc")}
	if !reflect.DeepEqual(d.All, all) || !reflect.DeepEqual(d.Inputs[cf.RoleSST], []string{filepath.Join(dir, "sst.nc")}) {
		t.Errorf("all %v, sst %v", d.All, d.Inputs[cf.RoleSST])
	}
	for _, role := range []cf.Role{cf.RoleAirTemp, cf.RoleCloud, cf.RoleSurfacePres, cf.RoleRH, cf.RoleLandFraction, cf.RoleSeaIce} {
		if !reflect.DeepEqual(d.Inputs[role], all) {
			t.Errorf("%s: %v; want the files.any files", role, d.Inputs[role])
		}
	}
	for _, role := range []cf.Role{cf.RoleLowCloud, cf.RoleOLR, cf.RoleOmega, cf.RoleDewPoint} {
		if _, ok := d.Inputs[role]; ok {
			t.Errorf("%s is read although no setting needs it", role)
		}
	}
	if !d.SeaIce.Use || d.Cloud != cf.RoleCloud || d.Ocean.Role != cf.RoleLandFraction {
		t.Errorf("sea ice %+v, cloud %s, ocean %+v", d.SeaIce, d.Cloud, d.Ocean)
	}
	// humidity "field" cannot tell which role files.any holds
	p = writeFile(t, dir, "r2.yaml", "datasets:\n  m:\n    files: {any: all.nc}\n    surface: {humidity: field}\n")
	ps := problems(t, func() error { _, err := config.Load(p, noEnv); return err }())
	if len(ps) != 1 || !strings.Contains(ps[0].Msg, "write which humidity role") || ps[0].Line != 4 {
		t.Errorf("problems %v", ps)
	}
}
