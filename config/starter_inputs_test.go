package config_test

import (
	"path/filepath"
	"strings"
	"testing"

	"lidscope/cf"
	"lidscope/config"
	"lidscope/internal/testutil"
)

// Invented fixtures (synthetic): an SST product that carries sea-ice
// concentration, and a cloudiness file recognised by long name and units
// only (CLD, "CLOUDINESS", "FRACTION OF SKY COVER").
const sstIceCDL = `netcdf sst_ice {
dimensions: time = 2 ; lat = 2 ; lon = 3 ;
variables:
	double time(time) ; time:units = "days since 2001-01-01" ; time:calendar = "standard" ;
	float lat(lat) ; lat:units = "degrees_north" ;
	float lon(lon) ; lon:units = "degrees_east" ;
	float sst(time, lat, lon) ; sst:standard_name = "sea_surface_temperature" ; sst:units = "K" ;
	float icec(time, lat, lon) ; icec:long_name = "Sea Ice Concentration" ; icec:units = "%" ;
data:
	time = 15, 45 ; lat = -10, 10 ; lon = 0, 120, 240 ;
	sst = 300, 301, 302, 299, 298, 297,  300, 301, 302, 299, 298, 297 ;
	icec = 0, 0, 0, 0, 0, 0,  0, 0, 0, 0, 0, 0 ;
}
`

const cloudinessCDL = `netcdf cld {
dimensions: time = 2 ; lat = 2 ; lon = 3 ;
variables:
	double time(time) ; time:units = "days since 2001-01-01" ; time:calendar = "standard" ;
	float lat(lat) ; lat:units = "degrees_north" ;
	float lon(lon) ; lon:units = "degrees_east" ;
	float CLD(time, lat, lon) ; CLD:long_name = "CLOUDINESS" ; CLD:units = "FRACTION OF SKY COVER" ;
data:
	time = 15, 45 ; lat = -10, 10 ; lon = 0, 120, 240 ;
	CLD = 0.2, 0.3, 0.4, 0.5, 0.6, 0.7,  0.2, 0.3, 0.4, 0.5, 0.6, 0.7 ;
}
`

// TestStarterSeaIceAndCloudByLongName: the starter offers the existing
// sea-ice option when an SST product carries an ice variable, and names a
// cloud variable recognised by long name with "by long name: confirm"; the
// text loads and every role opens with the study's Spec.
func TestStarterSeaIceAndCloudByLongName(t *testing.T) {
	dir := t.TempDir()
	var files []string
	for name, cdl := range map[string]string{"sst_ice.nc": sstIceCDL, "cld.nc": cloudinessCDL} {
		files = append(files, testutil.CDL(t, cdl, filepath.Join(dir, name)))
	}
	var reps []*cf.FileReport
	for _, f := range files {
		reps = append(reps, cf.Inspect(f))
	}
	text := config.Starter(reps, files)
	for _, want := range []string{
		`sea_ice: "` + filepath.Join(dir, "sst_ice.nc") + `"`,
		"    sea_ice:\n      max_fraction: 0.15",
		`cloud: "CLD"  # CHECK: by long name: confirm`,
		"# WITHOUT air_temperature",
	} {
		if !strings.Contains(text, want) {
			t.Errorf("starter lacks %q:\n%s", want, text)
		}
	}
	p := writeFile(t, dir, "study.yaml", text)
	r, err := config.Load(p, noEnv)
	if err != nil {
		t.Fatalf("%v\n%s", err, text)
	}
	d := &r.Datasets[0]
	if !d.SeaIce.Use || d.Cloud != cf.RoleCloud || d.Variables[cf.RoleCloud] != "CLD" || d.Variables[cf.RoleSeaIce] != "icec" {
		t.Errorf("dataset %+v", d)
	}
	for _, role := range d.Roles() {
		f, err := cf.Open(d.Inputs[role], d.Spec(role))
		if err != nil {
			t.Errorf("%s: %v", role, err)
			continue
		}
		f.Close()
	}
}
