package cf

import (
	"strings"
	"testing"

	"lidscope/netcdf"
)

// Coordinates are identified as CF-1.10 §4 and §5 say: by the axis
// attribute, by standard_name, by units (degrees_north/east, "since" for
// time, pressure units), by positive (vertical), through the coordinates
// attribute (auxiliary coordinates), and — not CF, common practice — by a
// lone 1-D variable over a dimension whose name differs.
func TestFindCoords(t *testing.T) {
	cases := []struct {
		v    string
		want map[Axis]string // axis → how (substring)
	}{
		{"v_axis", map[Axis]string{AxisY: "axis = Y", AxisX: "axis = X"}},
		{"v_sn", map[Axis]string{AxisY: "standard_name = latitude", AxisX: "standard_name = longitude"}},
		{"v_units", map[Axis]string{AxisY: "units = degree_n", AxisX: "units = degrees_e"}},
		{"v_aux", map[Axis]string{AxisY: "auxiliary coordinate glat", AxisX: "auxiliary coordinate glon"}},
		{"v_mismatch", map[Axis]string{AxisY: "names differ", AxisX: "names differ"}},
		{"v_pos", map[Axis]string{AxisZ: "positive = down", AxisT: "since", AxisY: "units = degrees_north"}},
	}
	eachKind(t, "coords", func(t *testing.T, path string) {
		nf, err := netcdf.Open(path)
		if err != nil {
			t.Fatal(err)
		}
		defer nf.Close()
		for _, c := range cases {
			v, err := nf.Var(c.v)
			if err != nil {
				t.Fatal(err)
			}
			cs, err := findCoords(nf, v, Overrides{})
			if err != nil {
				t.Errorf("%s: %v", c.v, err)
				continue
			}
			got := map[Axis]string{}
			for _, co := range cs {
				got[co.Axis] = co.How
			}
			for ax, how := range c.want {
				if !strings.Contains(got[ax], how) {
					t.Errorf("%s: %s found by %q, want %q", c.v, ax, got[ax], how)
				}
			}
			// and the data can be read through them
			f, err := Open([]string{path}, Spec{Role: RoleSST, Var: c.v, Level: map[bool]float64{true: 70000}[c.v == "v_pos"],
				Overrides: Overrides{LevelUnits: map[bool]string{true: "hPa"}[c.v == "v_pos"]}})
			if err != nil {
				t.Errorf("Open %s: %v", c.v, err)
				continue
			}
			want := []float64{1, 2, 3, 4, 5, 6}
			if c.v == "v_pos" { // 700 hPa is the third level
				want = []float64{21, 22, 23, 24, 25, 26}
			}
			sameValues(t, slab(t, f, 0), want, 0)
			f.Close()
		}
		_, err = Open([]string{path}, Spec{Role: RoleSST, Var: "v_none"})
		errHas(t, err, "v_none(y0, x0)", "no latitude/longitude coordinates", "coordinates.sst.lat")
		// the vertical axis of v_pos has no units: an error that says how to fix it
		_, err = Open([]string{path}, Spec{Role: RoleSST, Var: "v_pos", Level: 70000})
		errHas(t, err, "v_pos", "zp", "level units in the study", "coordinates.sst.level_units")
	})
}

func TestCoordOverrides(t *testing.T) {
	path := fixture(t, "coords", "classic")
	// v_none has no coordinates; study overrides cannot invent them, but
	// naming a coordinate of another dimension is an error that says so.
	_, err := Open([]string{path}, Spec{Role: RoleSST, Var: "v_none", Overrides: Overrides{Lat: "ya"}})
	errHas(t, err, "ya", "is not a dimension of v_none")
	_, err = Open([]string{path}, Spec{Role: RoleSST, Var: "v_none", Overrides: Overrides{Lat: "nothere"}})
	errHas(t, err, "nothere", "not in the file")
	// an override that names the right variable wins over detection
	f := mustOpen(t, path, Spec{Role: RoleSST, Var: "v_mismatch", Overrides: Overrides{Lat: "lat", Lon: "lon"}})
	sameValues(t, slab(t, f, 0), []float64{1, 2, 3, 4, 5, 6}, 0)
}

// Rotated-pole and projected axes are not latitudes and longitudes
// (CF-1.10 §5.6): reading them as such would be silently wrong.
func TestNonGeographicAxesRefused(t *testing.T) {
	cdl := `netcdf rot {
dimensions: rlat = 2 ; rlon = 2 ; y = 2 ; x = 2 ; la = 2 ; lo = 2 ;
variables:
	double rlat(rlat) ; rlat:standard_name = "grid_latitude" ; rlat:units = "degrees" ; rlat:axis = "Y" ;
	double rlon(rlon) ; rlon:standard_name = "grid_longitude" ; rlon:units = "degrees" ; rlon:axis = "X" ;
	char rotated_pole ; rotated_pole:grid_mapping_name = "rotated_latitude_longitude" ;
	float tas(rlat, rlon) ; tas:units = "K" ; tas:standard_name = "air_temperature" ; tas:grid_mapping = "rotated_pole" ;
	double y(y) ; y:standard_name = "projection_y_coordinate" ; y:units = "m" ; y:axis = "Y" ;
	double x(x) ; x:standard_name = "projection_x_coordinate" ; x:units = "m" ; x:axis = "X" ;
	float tproj(y, x) ; tproj:units = "K" ;
	double la(la) ; la:axis = "Y" ; la:units = "degrees" ;
	double lo(lo) ; lo:axis = "X" ; lo:units = "degrees" ;
	char lcc ; lcc:grid_mapping_name = "lambert_conformal_conic" ;
	float tlcc(la, lo) ; tlcc:units = "K" ; tlcc:grid_mapping = "lcc" ;
	float trad(la, lo) ; trad:units = "K" ;
data:
	rlat = -1, 1 ; rlon = -1, 1 ; y = 0, 1000 ; x = 0, 1000 ; la = 0, 1 ; lo = 0, 1 ;
	tas = 1, 2, 3, 4 ; tproj = 1, 2, 3, 4 ; tlcc = 1, 2, 3, 4 ; trad = 1, 2, 3, 4 ;
}`
	path := ncgen(t, cdl, "classic", "rot")
	for v, want := range map[string][]string{
		"tas":   {"rotated-pole", "grid_latitude", "regrid"},
		"tproj": {"map-projection", "projection_y_coordinate", "regrid"},
		"tlcc":  {"lambert_conformal_conic", "grid_mapping lcc", "regrid"},
	} {
		_, err := Open([]string{path}, Spec{Role: RoleSurfaceAir, Var: v})
		errHas(t, err, want...)
	}
	// axes in degrees with no grid mapping are geographic
	f := mustOpen(t, path, Spec{Role: RoleSurfaceAir, Var: "trad"})
	sameValues(t, slab(t, f, 0), []float64{1, 2, 3, 4}, 0)
}
