package main

import (
	"bytes"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/cf"
	"lidscope/config"
	"lidscope/internal/testutil"
)

// A fraction's sample range is printed without a dangling "1" (as the
// demo's console lines are); the JSON keeps units "1".
func TestInspectTextFraction(t *testing.T) {
	path := testutil.CDL(t, `// Synthetic test fixture (invented values): one low-cloud fraction in percent.
netcdf frac {
dimensions: lat = 2 ; lon = 2 ;
variables:
	float lat(lat) ; lat:units = "degrees_north" ;
	float lon(lon) ; lon:units = "degrees_east" ;
	float cll(lat, lon) ; cll:units = "%" ; cll:standard_name = "low_type_cloud_area_fraction" ;
data:
	lat = 0, 10 ; lon = 0, 10 ;
	cll = 20, 30, 40, 50 ;
}`, filepath.Join(t.TempDir(), "frac.nc"))
	var buf bytes.Buffer
	if err := runInspect(inspectOptions{Files: []string{path}}, &buf); err != nil {
		t.Fatalf("runInspect: %v\n%s", err, buf.String())
	}
	if out := buf.String(); !strings.Contains(out, "sample:   0.2 … 0.5 (after conversion)") {
		t.Errorf("text report lacks the sample range without units:\n%s", out)
	}
}

// study init names the dataset after what the files share, not after
// the first file of a record (sst_200101-200512), and says so.
func TestStudyInitName(t *testing.T) {
	rep := func(path, id string) *cf.FileReport {
		return &cf.FileReport{Path: path, SourceID: id, Usable: true, Fields: []cf.VarReport{{Var: "sst", Role: cf.RoleSST}}}
	}
	cases := []struct {
		reports    []*cf.FileReport
		name, from string
	}{
		{[]*cf.FileReport{rep("/data/obs/sst/sst_200101-200512.nc", ""), rep("/data/obs/low_cloud/cll_200101-200512.nc", "")}, "obs", "the files' folder obs"},
		{[]*cf.FileReport{rep("/data/obs/sst/sst_200101-200512.nc", ""), rep("/data/obs/sst/sst_200601-201012.nc", "")}, "obs", "the files' folder obs"},
		{[]*cf.FileReport{rep("/runs/a/tos_Omon_x.nc", "CESM2"), rep("/runs/b/clt_Amon_x.nc", "CESM2")}, "cesm2", "the files' source_id attribute"},
		{[]*cf.FileReport{rep("/runs/a/tos.nc", "CESM2"), rep("/runs/a/clt.nc", "NorESM2-LM")}, "a", "the files' folder a"},
		{[]*cf.FileReport{rep("/sst/x_2001.nc", "")}, "x_2001", "the first file's name"},
	}
	for _, c := range cases {
		name, from := config.StarterName(c.reports)
		if name != c.name || from != c.from {
			t.Errorf("StarterName(%s …) = %q (%s), want %q (%s)", c.reports[0].Path, name, from, c.name, c.from)
		}
	}
}
