package cfwrite

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"lidscope/netcdf"
)

// Grid is a latitude–longitude grid of cell centres, in degrees.
type Grid struct {
	// Lat and Lon are the cell centres, each strictly increasing or strictly
	// decreasing; latitudes lie in [-90, 90].
	Lat, Lon []float64
	// LatBounds and LonBounds are the cell edges, one pair per centre, in
	// the direction of the centres. Nil means halfway between neighbouring
	// centres, the outer edges half a spacing beyond the end centres, and
	// latitude edges clipped to ±90 (common practice for regular grids).
	LatBounds, LonBounds [][2]float64
}

// Levels are pressure levels in Pa, strictly monotonic and positive.
type Levels struct {
	Pa []float64
	// Bounds are the layer edges in Pa, one pair per level; optional.
	Bounds [][2]float64
}

// TimeAxis describes the time coordinate over the unlimited dimension.
type TimeAxis struct {
	// Units is "<unit> since <reference date>" with unit days, hours,
	// minutes or seconds, e.g. "days since 1979-01-01" (CF-1.10 §4.4).
	Units string
	// Calendar is a CF-1.10 §4.4.1 calendar name, e.g. "standard",
	// "proleptic_gregorian", "noleap", "360_day"; required.
	Calendar string
	// Bounds adds time_bnds(time,bnds); every step is then appended with
	// AppendTimeBounded.
	Bounds bool
}

// Axis is a further coordinate axis, such as the bins of a relationship
// table: a dimension of the same name with a double coordinate variable.
type Axis struct {
	Name         string
	Values       []float64    // strictly monotonic (CF-1.10 §1.3, coordinate variable)
	Bounds       [][2]float64 // optional cell edges; written as NAME_bnds(NAME,bnds)
	Units        string       // UDUNITS string; "1" for dimensionless, "" for none
	LongName     string
	StandardName string
	Attributes   map[string]any
}

// Categories is a categorical axis, e.g. a regime index: a dimension with an
// int coordinate variable whose values are explained by flag_values and
// flag_meanings (CF-1.10 §3.5). No string variables are written.
type Categories struct {
	Name         string
	LongName     string
	StandardName string
	// Meanings are one word per category: letters, digits and the characters
	// _ - . + @ (CF-1.10 §3.5), e.g. "convective", "subsidence".
	Meanings []string
	// Values are the category numbers, strictly increasing; nil means
	// 0, 1, 2, ...
	Values     []int
	Attributes map[string]any
}

// ScalarCoord is a scalar coordinate variable (CF-1.10 §5.7), e.g. the
// pressure of a single-level field, named by a data variable's coordinates
// attribute.
type ScalarCoord struct {
	Name         string
	Value        float64
	Units        string
	StandardName string
	LongName     string
	Positive     string // "up", "down" or ""
	Axis         string // "X", "Y", "Z", "T" or ""
	Attributes   map[string]any
}

// PressureCoord returns the scalar coordinate of a single pressure level in
// Pa, e.g. PressureCoord("plev", 70000) for a 700 hPa field.
func PressureCoord(name string, pa float64) ScalarCoord {
	return ScalarCoord{Name: name, Value: pa, Units: "Pa", StandardName: "air_pressure",
		LongName: "pressure", Positive: "down", Axis: "Z"}
}

// BinsFromEdges returns the centres and bounds of the bins between
// consecutive edges, for Axis.Values and Axis.Bounds. The edges must be
// finite and strictly increasing.
func BinsFromEdges(edges []float64) ([]float64, [][2]float64, error) {
	if len(edges) < 2 {
		return nil, nil, fmt.Errorf("cfwrite: bins need at least 2 edges, got %d", len(edges))
	}
	c := make([]float64, len(edges)-1)
	b := make([][2]float64, len(edges)-1)
	for i := range c {
		lo, hi := edges[i], edges[i+1]
		if math.IsNaN(lo) || math.IsInf(lo, 0) || math.IsNaN(hi) || math.IsInf(hi, 0) {
			return nil, nil, fmt.Errorf("cfwrite: bin edge %d or %d is not finite", i, i+1)
		}
		if !(hi > lo) {
			return nil, nil, fmt.Errorf("cfwrite: bin edges must increase: edge %d = %g, edge %d = %g", i, lo, i+1, hi)
		}
		c[i] = lo + (hi-lo)/2
		b[i] = [2]float64{lo, hi}
	}
	return c, b, nil
}

// monotonic checks that x is finite and strictly monotonic; it returns +1
// for increasing, -1 for decreasing (0 for a single value).
func monotonic(x []float64) (int, error) {
	if len(x) == 0 {
		return 0, errors.New("no values")
	}
	for i, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, fmt.Errorf("value %d is %v; coordinates must be finite (CF-1.10 §5)", i, v)
		}
	}
	if len(x) == 1 {
		return 0, nil
	}
	dir := 1
	if x[1] < x[0] {
		dir = -1
	}
	for i := 1; i < len(x); i++ {
		if d := x[i] - x[i-1]; d == 0 || (d > 0) != (dir > 0) {
			return 0, fmt.Errorf("values %d and %d (%g, %g) break strict monotonicity; coordinate variables must be strictly monotonic (CF-1.10 §1.3)", i-1, i, x[i-1], x[i])
		}
	}
	return dir, nil
}

// edgesFromCentres returns bounds halfway between centres, extrapolating
// half a spacing at the ends; shared edges are the same float64 values.
func edgesFromCentres(c []float64) ([][2]float64, error) {
	if len(c) < 2 {
		return nil, errors.New("a single centre does not determine cell edges; give the bounds")
	}
	e := make([]float64, len(c)+1)
	for i := 1; i < len(c); i++ {
		e[i] = c[i-1] + (c[i]-c[i-1])/2
	}
	e[0] = c[0] - (c[1]-c[0])/2
	n := len(c)
	e[n] = c[n-1] + (c[n-1]-c[n-2])/2
	b := make([][2]float64, n)
	for i := range b {
		b[i] = [2]float64{e[i], e[i+1]}
	}
	return b, nil
}

// checkBounds checks that each centre lies within its finite, non-empty cell.
func checkBounds(c []float64, b [][2]float64) error {
	if len(b) != len(c) {
		return fmt.Errorf("%d bounds pairs for %d values; give one pair per value", len(b), len(c))
	}
	for i, p := range b {
		if checkFinite(p[:]) != nil {
			return fmt.Errorf("bounds %d (%v) are not finite", i, p)
		}
		lo, hi := math.Min(p[0], p[1]), math.Max(p[0], p[1])
		if lo == hi {
			return fmt.Errorf("bounds %d (%v) enclose no interval", i, p)
		}
		if c[i] < lo || c[i] > hi {
			return fmt.Errorf("value %d (%g) lies outside its bounds %v", i, c[i], p)
		}
	}
	return nil
}

func flatten(b [][2]float64) []float64 {
	out := make([]float64, 0, 2*len(b))
	for _, p := range b {
		out = append(out, p[0], p[1])
	}
	return out
}

// needBounds defines the bnds dimension on first use.
func (w *Writer) needBounds() error {
	if w.bounds {
		return nil
	}
	if err := w.claim(DimBounds, "bounds dimension"); err != nil {
		return err
	}
	if _, err := w.nc.DefDim(DimBounds, 2); err != nil {
		return fmt.Errorf("cfwrite: %s: dimension %s: %w", w.path, DimBounds, err)
	}
	w.dims[DimBounds] = &dim{name: DimBounds, n: 2}
	w.bounds = true
	return nil
}

// defDim defines a fixed dimension.
func (w *Writer) defDim(name string, n int, axis byte) error {
	if _, err := w.nc.DefDim(name, n); err != nil {
		return fmt.Errorf("cfwrite: %s: dimension %s: %w", w.path, name, err)
	}
	w.dims[name] = &dim{name: name, n: n, axis: axis}
	return nil
}

// defCoord defines a variable whose values are written on leaving define
// mode (nil values: written later, as time is).
func (w *Writer) defCoord(name string, t netcdf.Type, dims []string, values []float64, attrs []attr) (*netcdf.Var, error) {
	v, err := w.nc.DefVar(name, t, dims)
	if err != nil {
		return nil, fmt.Errorf("cfwrite: %s: variable %s: %w", w.path, name, err)
	}
	if err := w.deflate(v); err != nil {
		return nil, fmt.Errorf("cfwrite: %s: variable %s: %w", w.path, name, err)
	}
	if err := putAttrs(v, attrs); err != nil {
		return nil, fmt.Errorf("cfwrite: %s: variable %s: %w", w.path, name, err)
	}
	if values != nil {
		shape := make([]int, len(dims))
		for i, d := range dims {
			shape[i] = w.dims[d].n
		}
		w.coords[name] = &coordVar{v: v, values: values, shape: shape}
		w.order = append(w.order, name)
	}
	return v, nil
}

// declaring runs one declaration under the lock, in define mode; a
// declaration that fails fails the writer (the file is discarded).
func (w *Writer) declaring(what string, declare func() error) error {
	w.mu.Lock()
	defer w.mu.Unlock()
	if err := w.state(); err != nil {
		return err
	}
	if err := w.define(what); err != nil {
		return err
	}
	if err := declare(); err != nil {
		return w.fail(err)
	}
	return nil
}

// coordDecl is one coordinate axis to declare: a dimension, the
// coordinate variable of the same name and, when bounds are given,
// NAME_bnds(NAME, bnds).
type coordDecl struct {
	name   string
	what   string // what the name is claimed as (named in later clash messages)
	bwhat  string // what NAME_bnds is claimed as
	axis   byte   // 'X', 'Y', 'Z' or 0
	typ    netcdf.Type
	values []float64    // copied
	bounds [][2]float64 // nil: no bounds variable
	attrs  []attr       // with "bounds" naming NAME_bnds when there are bounds
}

func (c coordDecl) boundsName() string { return c.name + "_bnds" }

// declareCoords declares the axes in phases (every name claimed, every
// dimension defined, the bnds dimension if any axis has bounds, then each
// coordinate variable followed by its bounds), which fixes the order of
// the dimensions and variables in the file.
func (w *Writer) declareCoords(cs ...coordDecl) error {
	for _, c := range cs {
		if err := w.claim(c.name, c.what); err != nil {
			return err
		}
	}
	withBounds := false
	for _, c := range cs {
		if c.bounds != nil {
			withBounds = true
			if err := w.claim(c.boundsName(), c.bwhat); err != nil {
				return err
			}
		}
	}
	for _, c := range cs {
		if err := w.defDim(c.name, len(c.values), c.axis); err != nil {
			return err
		}
	}
	if withBounds {
		if err := w.needBounds(); err != nil {
			return err
		}
	}
	for _, c := range cs {
		if _, err := w.defCoord(c.name, c.typ, []string{c.name}, append([]float64(nil), c.values...), c.attrs); err != nil {
			return err
		}
		if c.bounds != nil {
			if _, err := w.defCoord(c.boundsName(), netcdf.Double, []string{c.name, DimBounds}, flatten(c.bounds), nil); err != nil {
				return err
			}
		}
	}
	return nil
}

// given returns the attributes whose value is not the empty string.
func given(attrs ...attr) []attr {
	var out []attr
	for _, a := range attrs {
		if a.value != "" {
			out = append(out, a)
		}
	}
	return out
}

// SetGrid declares the lat and lon dimensions with their coordinate and
// bounds variables (CF-1.10 §4.1, §4.2, §7.1).
func (w *Writer) SetGrid(g Grid) error {
	return w.declaring("SetGrid", func() error { return w.setGrid(g) })
}

func (w *Writer) setGrid(g Grid) error {
	latB, lonB, err := w.gridBounds(g)
	if err != nil {
		return err
	}
	return w.declareCoords(
		coordDecl{name: DimLat, what: "grid", bwhat: "grid", axis: 'Y', typ: netcdf.Double, values: g.Lat, bounds: latB,
			attrs: []attr{{"standard_name", "latitude"}, {"long_name", "latitude"}, {"units", "degrees_north"}, {"axis", "Y"}, {"bounds", "lat_bnds"}}},
		coordDecl{name: DimLon, what: "grid", bwhat: "grid", axis: 'X', typ: netcdf.Double, values: g.Lon, bounds: lonB,
			attrs: []attr{{"standard_name", "longitude"}, {"long_name", "longitude"}, {"units", "degrees_east"}, {"axis", "X"}, {"bounds", "lon_bnds"}}},
	)
}

// gridBounds checks the grid and returns its cell edges (derived from the
// centres when not given, latitude edges clipped to ±90).
func (w *Writer) gridBounds(g Grid) (latB, lonB [][2]float64, err error) {
	if _, err := monotonic(g.Lat); err != nil {
		return nil, nil, fmt.Errorf("cfwrite: %s: latitudes: %w", w.path, err)
	}
	if _, err := monotonic(g.Lon); err != nil {
		return nil, nil, fmt.Errorf("cfwrite: %s: longitudes: %w", w.path, err)
	}
	for i, v := range g.Lat {
		if v < -90 || v > 90 {
			return nil, nil, fmt.Errorf("cfwrite: %s: latitude %d is %g, outside [-90, 90]", w.path, i, v)
		}
	}
	latB, lonB = g.LatBounds, g.LonBounds
	if latB == nil {
		if latB, err = edgesFromCentres(g.Lat); err != nil {
			return nil, nil, fmt.Errorf("cfwrite: %s: latitudes: %w", w.path, err)
		}
		for i := range latB {
			for k := range latB[i] {
				latB[i][k] = math.Max(-90, math.Min(90, latB[i][k]))
			}
		}
	}
	if lonB == nil {
		if lonB, err = edgesFromCentres(g.Lon); err != nil {
			return nil, nil, fmt.Errorf("cfwrite: %s: longitudes: %w", w.path, err)
		}
	}
	if err := checkBounds(g.Lat, latB); err != nil {
		return nil, nil, fmt.Errorf("cfwrite: %s: latitude bounds: %w", w.path, err)
	}
	for i, p := range latB {
		if p[0] < -90 || p[0] > 90 || p[1] < -90 || p[1] > 90 {
			return nil, nil, fmt.Errorf("cfwrite: %s: latitude bounds %d (%v) lie outside [-90, 90]", w.path, i, p)
		}
	}
	if err := checkBounds(g.Lon, lonB); err != nil {
		return nil, nil, fmt.Errorf("cfwrite: %s: longitude bounds: %w", w.path, err)
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, p := range lonB {
		lo, hi = math.Min(lo, math.Min(p[0], p[1])), math.Max(hi, math.Max(p[0], p[1]))
	}
	if hi-lo > 360+1e-9 {
		return nil, nil, fmt.Errorf("cfwrite: %s: longitude bounds span %g degrees, more than 360", w.path, hi-lo)
	}
	return latB, lonB, nil
}

// SetLevels declares the plev dimension and coordinate (CF-1.10 §4.3):
// air_pressure in Pa, positive "down", axis Z, with plev_bnds if bounds are
// given.
func (w *Writer) SetLevels(l Levels) error {
	return w.declaring("SetLevels", func() error { return w.setLevels(l) })
}

func (w *Writer) setLevels(l Levels) error {
	if _, err := monotonic(l.Pa); err != nil {
		return fmt.Errorf("cfwrite: %s: pressure levels: %w", w.path, err)
	}
	for i, p := range l.Pa {
		if p <= 0 || p > 2e5 {
			return fmt.Errorf("cfwrite: %s: pressure level %d is %g Pa; levels are in Pa (e.g. 70000 for 700 hPa)", w.path, i, p)
		}
	}
	attrs := []attr{{"standard_name", "air_pressure"}, {"long_name", "pressure"}, {"units", "Pa"},
		{"positive", "down"}, {"axis", "Z"}}
	if l.Bounds != nil {
		if err := checkBounds(l.Pa, l.Bounds); err != nil {
			return fmt.Errorf("cfwrite: %s: pressure level bounds: %w", w.path, err)
		}
		attrs = append(attrs, attr{"bounds", "plev_bnds"})
	}
	return w.declareCoords(coordDecl{name: DimPlev, what: "pressure levels", bwhat: "pressure levels", axis: 'Z',
		typ: netcdf.Double, values: l.Pa, bounds: l.Bounds, attrs: attrs})
}

// AddAxis declares a further axis: a dimension and a double coordinate
// variable of the same name, with NAME_bnds when bounds are given.
func (w *Writer) AddAxis(a Axis) error {
	return w.declaring("AddAxis", func() error { return w.addAxis(a) })
}

func (w *Writer) addAxis(a Axis) error {
	if _, err := monotonic(a.Values); err != nil {
		return fmt.Errorf("cfwrite: %s: axis %q: %w", w.path, a.Name, err)
	}
	if err := checkStandardName(a.StandardName); err != nil {
		return fmt.Errorf("cfwrite: %s: axis %q: %w", w.path, a.Name, err)
	}
	if a.Bounds != nil {
		if err := checkBounds(a.Values, a.Bounds); err != nil {
			return fmt.Errorf("cfwrite: %s: axis %q bounds: %w", w.path, a.Name, err)
		}
	}
	extra, err := extraAttrs(a.Attributes, []string{"standard_name", "long_name", "units", "bounds", "_FillValue"}, netcdf.Double)
	if err != nil {
		return fmt.Errorf("cfwrite: %s: axis %q: %w", w.path, a.Name, err)
	}
	attrs := given(attr{"standard_name", a.StandardName}, attr{"long_name", a.LongName}, attr{"units", a.Units})
	if a.Bounds != nil {
		attrs = append(attrs, attr{"bounds", a.Name + "_bnds"})
	}
	d := coordDecl{name: a.Name, what: "axis", bwhat: "bounds of axis " + a.Name, typ: netcdf.Double,
		values: a.Values, bounds: a.Bounds, attrs: append(attrs, extra...)}
	return w.declareCoords(d)
}

// checkMeaning checks one flag_meanings word (CF-1.10 §3.5).
func checkMeaning(s string) error {
	if s == "" {
		return errors.New("empty meaning")
	}
	for i := 0; i < len(s); i++ {
		if c := s[i]; !isNameByte(c) && !strings.ContainsRune("-.+@", rune(c)) {
			return fmt.Errorf("meaning %q may use only letters, digits and _ - . + @ (CF-1.10 §3.5); join words with '_'", s)
		}
	}
	return nil
}

// AddCategories declares a categorical axis: a dimension and an int
// coordinate variable of the same name carrying flag_values and
// flag_meanings.
func (w *Writer) AddCategories(c Categories) error {
	return w.declaring("AddCategories", func() error { return w.addCategories(c) })
}

func (w *Writer) addCategories(c Categories) error {
	if len(c.Meanings) == 0 {
		return fmt.Errorf("cfwrite: %s: categories %q: no meanings given", w.path, c.Name)
	}
	vals := c.Values
	if vals == nil {
		vals = make([]int, len(c.Meanings))
		for i := range vals {
			vals[i] = i
		}
	}
	if len(vals) != len(c.Meanings) {
		return fmt.Errorf("cfwrite: %s: categories %q: %d values for %d meanings", w.path, c.Name, len(vals), len(c.Meanings))
	}
	fv := make([]float64, len(vals))
	for i, v := range vals {
		if i > 0 && v <= vals[i-1] {
			return fmt.Errorf("cfwrite: %s: categories %q: values must increase strictly (a coordinate variable, CF-1.10 §1.3); %d follows %d", w.path, c.Name, v, vals[i-1])
		}
		fv[i] = float64(v)
	}
	flagValues, err := toInt32s(vals)
	if err != nil {
		return fmt.Errorf("cfwrite: %s: categories %q: %w", w.path, c.Name, err)
	}
	for _, m := range c.Meanings {
		if err := checkMeaning(m); err != nil {
			return fmt.Errorf("cfwrite: %s: categories %q: %w", w.path, c.Name, err)
		}
	}
	if err := checkStandardName(c.StandardName); err != nil {
		return fmt.Errorf("cfwrite: %s: categories %q: %w", w.path, c.Name, err)
	}
	attrs := given(attr{"standard_name", c.StandardName}, attr{"long_name", c.LongName})
	attrs = append(attrs, attr{"flag_values", flagValues}, attr{"flag_meanings", strings.Join(c.Meanings, " ")})
	extra, err := extraAttrs(c.Attributes, []string{"standard_name", "long_name", "flag_values", "flag_meanings", "_FillValue"}, netcdf.Int)
	if err != nil {
		return fmt.Errorf("cfwrite: %s: categories %q: %w", w.path, c.Name, err)
	}
	return w.declareCoords(coordDecl{name: c.Name, what: "categorical axis", typ: netcdf.Int, values: fv,
		attrs: append(attrs, extra...)})
}

// AddScalarCoord declares a scalar coordinate variable (CF-1.10 §5.7).
func (w *Writer) AddScalarCoord(s ScalarCoord) error {
	return w.declaring("AddScalarCoord", func() error { return w.addScalar(s) })
}

func (w *Writer) addScalar(s ScalarCoord) error {
	if checkFinite([]float64{s.Value}) != nil {
		return fmt.Errorf("cfwrite: %s: scalar coordinate %q: value %v is not finite", w.path, s.Name, s.Value)
	}
	if err := checkStandardName(s.StandardName); err != nil {
		return fmt.Errorf("cfwrite: %s: scalar coordinate %q: %w", w.path, s.Name, err)
	}
	switch s.Positive {
	case "", "up", "down":
	default:
		return fmt.Errorf("cfwrite: %s: scalar coordinate %q: positive %q must be \"up\" or \"down\" (CF-1.10 §4.3)", w.path, s.Name, s.Positive)
	}
	switch s.Axis {
	case "", "X", "Y", "Z", "T":
	default:
		return fmt.Errorf("cfwrite: %s: scalar coordinate %q: axis %q must be X, Y, Z or T (CF-1.10 §4)", w.path, s.Name, s.Axis)
	}
	if s.StandardName == "" && s.LongName == "" {
		return fmt.Errorf("cfwrite: %s: scalar coordinate %q: give a StandardName or a LongName", w.path, s.Name)
	}
	attrs := given(attr{"standard_name", s.StandardName}, attr{"long_name", s.LongName},
		attr{"units", s.Units}, attr{"positive", s.Positive}, attr{"axis", s.Axis})
	extra, err := extraAttrs(s.Attributes, []string{"standard_name", "long_name", "units", "positive", "axis", "_FillValue"}, netcdf.Double)
	if err != nil {
		return fmt.Errorf("cfwrite: %s: scalar coordinate %q: %w", w.path, s.Name, err)
	}
	attrs = append(attrs, extra...)
	if err := w.claim(s.Name, "scalar coordinate"); err != nil {
		return err
	}
	if _, err := w.defCoord(s.Name, netcdf.Double, nil, []float64{s.Value}, attrs); err != nil {
		return err
	}
	w.scalars[s.Name] = true
	return nil
}
