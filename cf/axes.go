package cf

import (
	"errors"
	"fmt"
	"strings"

	"lidscope/netcdf"
)

// Axis is a coordinate axis kind (CF-1.10 §4).
type Axis int

// Axes.
const (
	AxisNone Axis = iota
	AxisX         // longitude
	AxisY         // latitude
	AxisZ         // vertical (pressure, for lidscope)
	AxisT         // time
)

func (a Axis) String() string {
	return [...]string{"none", "longitude", "latitude", "vertical", "time"}[a]
}

func isNotAttr(err error) bool { return errors.Is(err, netcdf.ErrNotAttr) }

// textAttr returns a text attribute, "" when absent or not text.
func textAttr(v *netcdf.Var, name string) string {
	a, err := v.Attr(name)
	if err != nil {
		return ""
	}
	s, _ := a.Text()
	return strings.TrimSpace(s)
}

// CF-1.10 §4.1 and §4.2: units that identify latitude and longitude.
var latUnits = map[string]bool{"degrees_north": true, "degree_north": true, "degree_n": true,
	"degrees_n": true, "degreen": true, "degreesn": true}
var lonUnits = map[string]bool{"degrees_east": true, "degree_east": true, "degree_e": true,
	"degrees_e": true, "degreee": true, "degreese": true}

// Names accepted as a last resort, when a coordinate variable has no
// axis/standard_name/units that identify it (common in non-CF files).
var latNames = map[string]bool{"lat": true, "latitude": true, "nav_lat": true, "y": false, "lats": true, "rlat": false}
var lonNames = map[string]bool{"lon": true, "longitude": true, "nav_lon": true, "lons": true}
var timeNames = map[string]bool{"time": true, "t": true, "month": true, "months": true, "times": true}
var levNames = map[string]bool{"lev": true, "level": true, "plev": true, "pressure": true, "pres": true,
	"isobaric": true, "p": true, "levelist": true, "pfull": true, "plevel": true}

// axisOf classifies a coordinate variable, returning the axis and how it
// was recognised (for inspect's report).
func axisOf(v *netcdf.Var) (Axis, string) {
	axis := strings.ToUpper(textAttr(v, "axis"))
	sn := strings.ToLower(textAttr(v, "standard_name"))
	u := strings.ToLower(textAttr(v, "units"))
	pos := strings.ToLower(textAttr(v, "positive"))
	switch axis {
	case "X":
		return AxisX, "axis = X"
	case "Y":
		return AxisY, "axis = Y"
	case "Z":
		return AxisZ, "axis = Z"
	case "T":
		return AxisT, "axis = T"
	}
	switch sn {
	case "longitude", "grid_longitude":
		return AxisX, "standard_name = " + sn
	case "latitude", "grid_latitude":
		return AxisY, "standard_name = " + sn
	case "time":
		return AxisT, "standard_name = time"
	case "air_pressure", "height", "altitude", "depth", "model_level_number",
		"atmosphere_hybrid_sigma_pressure_coordinate", "atmosphere_sigma_coordinate":
		return AxisZ, "standard_name = " + sn
	}
	if latUnits[u] {
		return AxisY, "units = " + u
	}
	if lonUnits[u] {
		return AxisX, "units = " + u
	}
	if strings.Contains(u, " since ") {
		return AxisT, "units contain \"since\""
	}
	if pos == "up" || pos == "down" {
		return AxisZ, "positive = " + pos
	}
	if isPressureUnit(u) {
		return AxisZ, "pressure units " + u
	}
	n := strings.ToLower(v.Name)
	switch {
	case latNames[n]:
		return AxisY, "name " + v.Name + " (no CF attribute identifies it)"
	case lonNames[n]:
		return AxisX, "name " + v.Name + " (no CF attribute identifies it)"
	case timeNames[n]:
		return AxisT, "name " + v.Name + " (no CF attribute identifies it)"
	case levNames[n]:
		return AxisZ, "name " + v.Name + " (no CF attribute identifies it)"
	}
	return AxisNone, ""
}

func isPressureUnit(u string) bool {
	switch strings.ToLower(strings.TrimSpace(u)) {
	case "pa", "hpa", "mbar", "millibar", "millibars", "mb", "kpa", "bar", "pascal":
		return true
	}
	return false
}

// coord is a coordinate found for one dimension of a data variable.
type coord struct {
	Axis   Axis
	Dim    int         // index in the data variable's dimension list
	Var    *netcdf.Var // nil when the dimension has no coordinate variable
	How    string
	Length int
}

// Overrides lets a study name coordinate variables that a file does not
// declare in a CF way, and fix non-CF metadata.
type Overrides struct {
	Lat, Lon, Level, Time string // coordinate variable names
	Units                 string // units of the data variable
	LevelUnits            string // units of the vertical coordinate
	TimeUnits             string // CF time units for the time coordinate
	Calendar              string
	// Climatology declares the time axis as 12 calendar months, January
	// first, whatever the file's time coordinate says.
	Climatology bool
}

// findCoords identifies the coordinate of each dimension of v: a
// coordinate variable (a 1-D variable named like its dimension, CF §1.2),
// or a 1-D auxiliary coordinate named in the coordinates attribute (CF §5),
// or a study override.
func findCoords(f *netcdf.File, v *netcdf.Var, ov Overrides) ([]coord, error) {
	cs := make([]coord, len(v.Dims))
	byDim := map[string]*netcdf.Var{}
	for i, d := range v.Dims {
		cs[i] = coord{Dim: i, Length: d.Len}
		if cv, err := f.Var(d.Name); err == nil && len(cv.Dims) == 1 && cv.Dims[0].Name == d.Name {
			byDim[d.Name] = cv
		}
	}
	// auxiliary coordinates
	aux := map[string]*netcdf.Var{}
	for _, name := range strings.Fields(textAttr(v, "coordinates")) {
		cv, err := f.Var(name)
		if err != nil {
			return nil, fmt.Errorf("%s: variable %s: coordinates attribute names %q, which is not in the file (CF-1.10 §5): %w", f.Path(), v.Name, name, err)
		}
		switch len(cv.Dims) {
		case 0:
			continue // scalar coordinate, e.g. a single pressure level (CF §5.7)
		case 1:
			aux[cv.Dims[0].Name] = cv
		default:
			ax, _ := axisOf(cv)
			if ax == AxisX || ax == AxisY {
				return nil, fmt.Errorf("%s: variable %s has 2-D %s coordinate %s (a curvilinear grid): lidscope reads rectilinear lat–lon grids only; regrid the file first (e.g. cdo remapcon)", f.Path(), v.Name, ax, cv.Name)
			}
		}
	}
	overrides := map[Axis]string{AxisY: ov.Lat, AxisX: ov.Lon, AxisZ: ov.Level, AxisT: ov.Time}
	for ax, name := range overrides {
		if name == "" {
			continue
		}
		cv, err := f.Var(name)
		if err != nil {
			return nil, fmt.Errorf("%s: the study names %s as the %s coordinate, but it is not in the file: %w", f.Path(), name, ax, err)
		}
		if len(cv.Dims) != 1 {
			return nil, fmt.Errorf("%s: the study names %s as the %s coordinate, but it has %d dimensions (need 1)", f.Path(), name, ax, len(cv.Dims))
		}
		found := false
		for i, d := range v.Dims {
			if d.Name == cv.Dims[0].Name {
				cs[i].Axis, cs[i].Var, cs[i].How = ax, cv, "study override"
				found = true
			}
		}
		if !found {
			return nil, fmt.Errorf("%s: the study names %s as the %s coordinate, but its dimension %s is not a dimension of %s", f.Path(), name, ax, cv.Dims[0].Name, v.Name)
		}
	}
	for i, d := range v.Dims {
		if cs[i].Axis != AxisNone {
			continue
		}
		// Candidates in order of precedence: the coordinate variable (CF
		// §1.2), a 1-D auxiliary coordinate named in the coordinates
		// attribute (CF §5), and — not CF, but common — the only 1-D variable
		// over the dimension that looks like a coordinate although its name
		// differs (dimension "latitude", variable "lat"). The first one whose
		// attributes identify an axis wins.
		type cand struct {
			v   *netcdf.Var
			how string
		}
		var cands []cand
		if cv := byDim[d.Name]; cv != nil {
			cands = append(cands, cand{cv, "coordinate variable " + d.Name})
		}
		if cv := aux[d.Name]; cv != nil {
			cands = append(cands, cand{cv, "auxiliary coordinate " + cv.Name + " (coordinates attribute)"})
		}
		for _, c := range cands {
			if ax, why := axisOf(c.v); ax != AxisNone {
				cs[i].Axis, cs[i].Var, cs[i].How = ax, c.v, c.how+" ("+why+")"
				break
			}
		}
		if cs[i].Axis == AxisNone {
			if alt := loneCoord(f, v, d.Name); alt != nil {
				ax, why := axisOf(alt)
				cs[i].Axis, cs[i].Var = ax, alt
				cs[i].How = "1-D variable " + alt.Name + " over dimension " + d.Name + " (not a CF coordinate variable: names differ) (" + why + ")"
			}
		}
	}
	// An axis must not be claimed twice.
	seen := map[Axis]int{}
	for i, c := range cs {
		if c.Axis == AxisNone {
			continue
		}
		if j, dup := seen[c.Axis]; dup {
			return nil, fmt.Errorf("%s: variable %s: dimensions %s and %s both look like %s; name the right one in the study (the coordinates key)", f.Path(), v.Name, v.Dims[j].Name, v.Dims[i].Name, c.Axis)
		}
		seen[c.Axis] = i
	}
	return cs, nil
}

// loneCoord returns the only 1-D variable (other than v) whose dimension is
// dim and whose attributes identify it as a coordinate, or nil.
func loneCoord(f *netcdf.File, v *netcdf.Var, dim string) *netcdf.Var {
	vars, err := f.Vars()
	if err != nil {
		return nil
	}
	var found *netcdf.Var
	for _, c := range vars {
		if c.Name == v.Name || len(c.Dims) != 1 || c.Dims[0].Name != dim {
			continue
		}
		if ax, _ := axisOf(c); ax == AxisNone {
			continue
		}
		if found != nil {
			return nil // ambiguous
		}
		found = c
	}
	return found
}

// geographic checks that cv, recognised as the latitude (AxisY) or
// longitude (AxisX) coordinate of data variable v, is geographic — in
// degrees north or east — and not the axis of a rotated-pole or projected
// grid (CF-1.10 §4.1, §4.2, §5.6), whose values are not latitudes and
// longitudes at all.
func geographic(f *netcdf.File, v, cv *netcdf.Var, ax Axis) error {
	sn := strings.ToLower(textAttr(cv, "standard_name"))
	u := strings.ToLower(textAttr(cv, "units"))
	what := "latitude"
	if ax == AxisX {
		what = "longitude"
	}
	regrid := "lidscope reads geographic latitude–longitude grids only; regrid the file to one first (e.g. cdo remapbil,r360x180)"
	switch {
	case sn == "grid_latitude" || sn == "grid_longitude":
		return fmt.Errorf("%s: variable %s: its %s coordinate %s is a rotated-pole axis (standard_name %s, CF-1.10 §5.6): %s", f.Path(), v.Name, what, cv.Name, sn, regrid)
	case strings.HasPrefix(sn, "projection_"):
		return fmt.Errorf("%s: variable %s: its %s coordinate %s is a map-projection axis (standard_name %s, CF-1.10 §5.6): %s", f.Path(), v.Name, what, cv.Name, sn, regrid)
	case strings.Contains(u, "radian"):
		return fmt.Errorf("%s: variable %s: %s coordinate %s is in radians; lidscope needs degrees (%s); convert it (e.g. ncap2) or regrid", f.Path(), v.Name, what, cv.Name, map[Axis]string{AxisX: "degrees_east", AxisY: "degrees_north"}[ax])
	case (ax == AxisY && latUnits[u]) || (ax == AxisX && lonUnits[u]):
		return nil // CF units identify a geographic axis whatever else is said
	case u != "" && !strings.HasPrefix(u, "deg"):
		return fmt.Errorf("%s: variable %s: %s coordinate %s has units %q, not degrees: it is not a geographic %s; %s", f.Path(), v.Name, what, cv.Name, textAttr(cv, "units"), what, regrid)
	}
	// Units "degrees" or none: geographic unless a grid mapping says the
	// grid is rotated or projected.
	gm := strings.Fields(strings.ReplaceAll(textAttr(v, "grid_mapping"), ":", " "))
	if len(gm) > 0 {
		if gv, err := f.Var(gm[0]); err == nil {
			if name := textAttr(gv, "grid_mapping_name"); name != "" && name != "latitude_longitude" {
				return fmt.Errorf("%s: variable %s is on a %s grid (grid_mapping %s, CF-1.10 §5.6), so its %s coordinate %s (units %q) is not a geographic %s: %s", f.Path(), v.Name, name, gv.Name, what, cv.Name, textAttr(cv, "units"), what, regrid)
			}
		}
	}
	return nil
}
