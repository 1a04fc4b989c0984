package cf

import (
	"fmt"
	"math"
	"strings"
	"testing"
)

// cloudCDL is a small invented field (synthetic fixture) of one variable
// with the given name, long_name and units, values vals on a 1×3 grid.
func cloudCDL(name, long, units, vals string) string {
	attrs := ""
	if long != "" {
		attrs += fmt.Sprintf(" %s:long_name = %q ;", name, long)
	}
	if units != "" {
		attrs += fmt.Sprintf(" %s:units = %q ;", name, units)
	}
	return fmt.Sprintf(`netcdf cover {
dimensions: time = 1 ; lat = 1 ; lon = 3 ;
variables:
	double time(time) ; time:units = "days since 2001-01-01" ; time:calendar = "standard" ;
	float lat(lat) ; lat:units = "degrees_north" ;
	float lon(lon) ; lon:units = "degrees_east" ;
	float %s(time, lat, lon) ;%s
data:
	time = 15 ; lat = 0 ; lon = 0, 120, 240 ;
	%s = %s ;
}
`, name, attrs, name, vals)
}

// Cloud cover recognised by long name and unit spellings (station and
// reanalysis files without standard_name), marked "confirm", converted
// from oktas (× 1/8), tenths (× 1/10) and percent with the factor logged.
// Oktas: eighths of the sky (WMO code table 2700, from memory); tenths:
// common practice.
func TestCloudByLongNameAndUnits(t *testing.T) {
	cases := []struct {
		name, variable, long, units, vals string
		role                              Role
		scale                             float64
		want                              []float64
	}{
		{"cloudiness, fraction of sky cover", "CLD", "CLOUDINESS", "FRACTION OF SKY COVER", "0.2, 0.5, 0.9", RoleCloud, 1, []float64{0.2, 0.5, 0.9}},
		{"total cloud amount in oktas", "N", "total cloud amount", "oktas", "0, 4, 8", RoleCloud, 0.125, []float64{0, 0.5, 1}},
		{"low cloud amount in tenths", "LCA", "Low cloud amount", "tenths", "1, 5, 10", RoleLowCloud, 0.1, []float64{0.1, 0.5, 1}},
		{"cloud cover in percent", "cover", "Cloud Cover", "%", "10, 50, 90", RoleCloud, 0.01, []float64{0.1, 0.5, 0.9}},
		{"sky-cover units alone", "X", "", "okta", "2, 4, 6", RoleCloud, 0.125, []float64{0.25, 0.5, 0.75}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			path := ncgen(t, cloudCDL(c.variable, c.long, c.units, c.vals), "classic", "cover")
			rep := Inspect(path)
			if len(rep.Fields) != 1 {
				t.Fatalf("fields %+v, other %v, problems %q", rep.Fields, rep.Other, rep.Problems)
			}
			f := rep.Fields[0]
			if f.Role != c.role || f.Var != c.variable || !strings.Contains(strings.Join(f.Notes, "; "), "recognised by long name (and units) only: confirm") {
				t.Errorf("report %+v", f)
			}
			if len(f.Problems) != 0 {
				t.Errorf("problems %q", f.Problems)
			}
			if c.scale != 1 && !strings.Contains(f.Conversion, fmt.Sprintf("× %g", c.scale)) {
				t.Errorf("conversion %q does not log the factor %g", f.Conversion, c.scale)
			}
			// a run uses it only when the study names it
			_, err := Open([]string{path}, Spec{Role: c.role})
			errHas(t, err, "confirm it by naming it in the study", fmt.Sprintf("variables.%s: %s", c.role, c.variable))
			fld := mustOpen(t, path, Spec{Role: c.role, Var: c.variable})
			if fld.Conv.Scale != c.scale {
				t.Errorf("scale %g, want %g", fld.Conv.Scale, c.scale)
			}
			got := slab(t, fld, 0)
			// canonical longitudes −120, 0, 120 hold stored 240, 0, 120
			for i, j := range []int{2, 0, 1} {
				if math.Abs(float64(got[i])-c.want[j]) > 1e-6 {
					t.Errorf("cell %d: %v, want %v", i, got[i], c.want[j])
				}
			}
		})
	}
	// cloud water is not cloud cover
	rep := Inspect(ncgen(t, cloudCDL("CLWC", "cloud liquid water content", "kg kg-1", "1e-5, 2e-5, 3e-5"), "classic", "clwc"))
	if len(rep.Fields) != 0 {
		t.Errorf("cloud liquid water recognised as %+v", rep.Fields)
	}
	// okta 9 (sky obscured) is not a cover
	rep = Inspect(ncgen(t, cloudCDL("N", "total cloud amount", "oktas", "0, 9, 8"), "classic", "okta9"))
	if len(rep.Fields) != 1 || !strings.Contains(strings.Join(rep.Fields[0].Problems, "; "), "okta 9 means sky obscured") {
		t.Errorf("okta 9: %+v", rep.Fields)
	}
}

// An SST product that carries sea-ice concentration (long name, percent):
// both are recognised, the ice by its long name (to confirm).
const sstWithIceCDL = `netcdf sst_ice {
dimensions: time = 1 ; lat = 1 ; lon = 3 ;
variables:
	double time(time) ; time:units = "days since 2001-01-01" ; time:calendar = "standard" ;
	float lat(lat) ; lat:units = "degrees_north" ;
	float lon(lon) ; lon:units = "degrees_east" ;
	float sst(time, lat, lon) ; sst:standard_name = "sea_surface_temperature" ; sst:units = "K" ;
	float icec(time, lat, lon) ; icec:long_name = "Sea Ice Concentration" ; icec:units = "%" ;
data:
	time = 15 ; lat = 0 ; lon = 0, 120, 240 ;
	sst = 300, 301, 302 ;
	icec = 0, 0, 0 ;
}
`

func TestSeaIceByLongName(t *testing.T) {
	rep := Inspect(ncgen(t, sstWithIceCDL, "classic", "sst_ice"))
	roles := map[Role]VarReport{}
	for _, f := range rep.Fields {
		roles[f.Role] = f
	}
	if roles[RoleSST].Var != "sst" || roles[RoleSeaIce].Var != "icec" || !strings.HasPrefix(roles[RoleSeaIce].How, "long name") {
		t.Fatalf("fields %+v", rep.Fields)
	}
	if !rep.Usable {
		t.Errorf("problems %q %q", rep.Problems, roles[RoleSeaIce].Problems)
	}
}
