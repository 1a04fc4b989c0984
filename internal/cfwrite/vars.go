package cfwrite

import (
	"fmt"
	"math"
	"strings"

	"lidscope/netcdf"
)

// DataType is the on-disk type of a data variable.
type DataType int

// Data types. The zero value is Float32.
const (
	Float32 DataType = iota
	Float64
	Int32
)

func (t DataType) String() string {
	switch t {
	case Float32:
		return "float32"
	case Float64:
		return "float64"
	case Int32:
		return "int32"
	}
	return fmt.Sprintf("DataType(%d)", int(t))
}

// Default fill values (see the package documentation for the choice).
const (
	DefaultFill      = 1e20        // float32 and float64 variables
	DefaultFillInt32 = -2147483647 // int32 variables: NC_FILL_INT
)

// VarSpec declares a data variable.
type VarSpec struct {
	Name string
	// Dims are dimension names, e.g. {DimTime, DimLat, DimLon}, {DimTime},
	// {"regime", "eis_bin"}, or none for a scalar. Time, when present, comes
	// first, and T, Z, Y, X keep that relative order (CF-1.10 §2.4).
	Dims []string
	// Type is the on-disk type; the zero value is Float32.
	Type DataType
	// Units is a UDUNITS string; required ("1" for dimensionless).
	Units string
	// LongName and StandardName: at least one is required.
	LongName     string
	StandardName string
	// CellMethods, e.g. "time: mean area: mean where sea" (CF-1.10 §7.3),
	// is checked for syntax and for the Appendix E method names.
	CellMethods string
	// Coordinates names auxiliary and scalar coordinate variables already
	// declared in the file (CF-1.10 §5), blank-separated.
	Coordinates string
	// Fill is the _FillValue; 0 means DefaultFill (DefaultFillInt32 for
	// Int32). A NaN written is stored as this value; a finite value equal
	// to it is refused, since readers would take it for missing.
	Fill float64
	// Attributes are further attributes: string, float64, float32, int,
	// int32 or slices of the numbers. valid_min, valid_max, valid_range,
	// actual_range and missing_value are converted to the variable's type,
	// as CF-1.10 §2.5.1 requires.
	Attributes map[string]any
	// Chunks overrides the default chunk sizes (see the package
	// documentation), one per dimension.
	Chunks []int
}

// Var is a data variable being written.
type Var struct {
	w       *Writer
	name    string
	nv      *netcdf.Var
	typ     DataType
	dims    []*dim
	timed   bool  // first dimension is time
	shape   []int // lengths of the dimensions after time (all of them when untimed)
	slab    int   // values per time step (or in the whole variable when untimed)
	fill    float64
	fill32  float32
	steps   []bool // steps written (timed)
	written bool   // written (untimed)
}

// Name returns the variable name.
func (v *Var) Name() string { return v.name }

// Shape returns the variable's dimension lengths; the time length is the
// number of steps appended so far.
func (v *Var) Shape() []int {
	v.w.mu.Lock()
	defer v.w.mu.Unlock()
	out := make([]int, 0, len(v.dims))
	if v.timed {
		n := 0
		if v.w.time != nil {
			n = v.w.time.n
		}
		out = append(out, n)
	}
	return append(out, v.shape...)
}

// AddVar declares a data variable and returns the handle to write it.
func (w *Writer) AddVar(s VarSpec) (*Var, error) {
	w.mu.Lock()
	defer w.mu.Unlock()
	if err := w.state(); err != nil {
		return nil, err
	}
	if err := w.define("AddVar " + s.Name); err != nil {
		return nil, err
	}
	v, err := w.addVar(s)
	if err != nil {
		return nil, w.fail(fmt.Errorf("cfwrite: %s: variable %q: %w", w.path, s.Name, err))
	}
	return v, nil
}

var axisOrder = map[byte]int{'T': 0, 'Z': 1, 'Y': 2, 'X': 3}

// addVar checks the spec in named steps (name, type, dimensions, metadata,
// fill value, chunks) and then defines the variable.
func (w *Writer) addVar(s VarSpec) (*Var, error) {
	if err := checkName(s.Name); err != nil {
		return nil, err
	}
	if prev, ok := w.names[s.Name]; ok {
		return nil, fmt.Errorf("the name is already used by the %s", prev)
	}
	nt, size, err := ncType(s.Type)
	if err != nil {
		return nil, err
	}
	v := &Var{w: w, name: s.Name, typ: s.Type, slab: 1}
	if err := v.placeDims(s.Dims); err != nil {
		return nil, err
	}
	if err := w.checkVarMeta(s); err != nil {
		return nil, err
	}
	if err := v.setFill(s.Fill); err != nil {
		return nil, err
	}
	extra, err := extraAttrs(s.Attributes, []string{"standard_name", "long_name", "units", "cell_methods", "coordinates", "_FillValue"}, nt)
	if err != nil {
		return nil, err
	}
	chunks, err := v.chunks(s.Chunks, size)
	if err != nil {
		return nil, err
	}
	nv, err := w.nc.DefVar(s.Name, nt, s.Dims)
	if err != nil {
		return nil, err
	}
	if len(chunks) > 0 {
		if err := nv.SetChunking(chunks); err != nil {
			return nil, err
		}
		// Writes cover whole chunks unless a chunk holds several time
		// steps (a series written step by step): for the others no chunk
		// cache, so each chunk is compressed and written when it is put
		// rather than held until Close (netCDF-C's default cache keeps a
		// dirty chunk of up to 16 MiB per variable).
		if !v.timed || chunks[0] == 1 {
			if err := nv.SetChunkCache(0, 0, 0); err != nil {
				return nil, err
			}
		}
	}
	if err := w.deflate(nv); err != nil {
		return nil, err
	}
	if err := putAttrs(nv, append(v.attrs(s), extra...)); err != nil {
		return nil, err
	}
	v.nv = nv
	w.names[s.Name] = "data variable"
	w.varNames[s.Name] = v
	w.vars = append(w.vars, v)
	return v, nil
}

// ncType is the netCDF type of a DataType and its size in bytes.
func ncType(t DataType) (netcdf.Type, int, error) {
	switch t {
	case Float32:
		return netcdf.Float, 4, nil
	case Float64:
		return netcdf.Double, 8, nil
	case Int32:
		return netcdf.Int, 4, nil
	}
	return 0, 0, fmt.Errorf("unknown Type %v; use Float32, Float64 or Int32", t)
}

// placeDims resolves the variable's dimensions, which must be declared,
// distinct, time first if at all, and in the CF order T, Z, Y, X.
func (v *Var) placeDims(names []string) error {
	seen := map[string]bool{}
	last := -1
	for i, dn := range names {
		d, ok := v.w.dims[dn]
		if !ok {
			return fmt.Errorf("dimension %q is not declared; declare it first (SetGrid, SetLevels, SetTime, AddAxis or AddCategories)", dn)
		}
		if seen[dn] {
			return fmt.Errorf("dimension %q appears twice in %v", dn, names)
		}
		seen[dn] = true
		if dn == DimTime {
			if i != 0 {
				return fmt.Errorf("time must be the first dimension, got %v", names)
			}
			v.timed = true
		} else {
			v.shape = append(v.shape, d.n)
			v.slab *= d.n
		}
		if o, ok := axisOrder[d.axis]; ok {
			if o < last {
				return fmt.Errorf("dimensions %v are not in the order T, Z, Y, X that CF-1.10 §2.4 recommends", names)
			}
			last = o
		}
		v.dims = append(v.dims, d)
	}
	return nil
}

// checkVarMeta checks the units, names, cell methods and coordinates of a
// variable spec.
func (w *Writer) checkVarMeta(s VarSpec) error {
	if strings.TrimSpace(s.Units) == "" {
		return fmt.Errorf("Units is empty; give the UDUNITS units (\"1\" for a dimensionless quantity)")
	}
	if s.LongName == "" && s.StandardName == "" {
		return fmt.Errorf("give a LongName or a StandardName (CF-1.10 §3.2, §3.3)")
	}
	if err := checkStandardName(s.StandardName); err != nil {
		return err
	}
	if s.CellMethods != "" {
		if _, err := parseCellMethods(s.CellMethods); err != nil {
			return err
		}
	}
	for _, c := range words(s.Coordinates) {
		if _, ok := w.names[c]; !ok {
			if _, ok := w.varNames[c]; !ok {
				return fmt.Errorf("coordinates names %q, which is not a variable of the file; declare it first", c)
			}
		}
	}
	return nil
}

// setFill sets the fill value (0: the default of the type), which must be
// representable in the variable's type.
func (v *Var) setFill(want float64) error {
	fill := want
	switch v.typ {
	case Float32:
		if fill == 0 {
			fill = DefaultFill
		}
		if math.IsNaN(fill) || math.IsInf(fill, 0) || math.Abs(fill) > math.MaxFloat32 {
			return fmt.Errorf("Fill %v is not a finite float32", want)
		}
		v.fill32 = float32(fill)
		v.fill = float64(v.fill32)
	case Float64:
		if fill == 0 {
			fill = DefaultFill
		}
		if math.IsNaN(fill) || math.IsInf(fill, 0) {
			return fmt.Errorf("Fill %v is not finite", want)
		}
		v.fill = fill
	case Int32:
		if fill == 0 {
			fill = DefaultFillInt32
		}
		if fill != math.Trunc(fill) || fill < math.MinInt32 || fill > math.MaxInt32 {
			return fmt.Errorf("Fill %v is not an int32", want)
		}
		v.fill = fill
	}
	return nil
}

// chunks returns the chunk sizes of the spec, checked against the dimensions,
// or the default ones for values of size bytes.
func (v *Var) chunks(spec []int, size int) ([]int, error) {
	if spec == nil {
		return defaultChunks(v.dims, size), nil
	}
	if len(spec) != len(v.dims) {
		return nil, fmt.Errorf("Chunks %v has %d sizes for %d dimensions", spec, len(spec), len(v.dims))
	}
	for i, c := range spec {
		if c < 1 || (v.dims[i].n > 0 && c > v.dims[i].n) {
			return nil, fmt.Errorf("chunk size %d for dimension %s must be 1..%d", c, v.dims[i].name, v.dims[i].n)
		}
	}
	return spec, nil
}

// attrs are the variable's CF attributes in their order in the file:
// standard_name, long_name, units, _FillValue (in the variable's type),
// cell_methods, coordinates.
func (v *Var) attrs(s VarSpec) []attr {
	attrs := given(attr{"standard_name", s.StandardName}, attr{"long_name", s.LongName})
	attrs = append(attrs, attr{"units", strings.TrimSpace(s.Units)})
	switch s.Type {
	case Float32:
		attrs = append(attrs, attr{"_FillValue", v.fill32})
	case Float64:
		attrs = append(attrs, attr{"_FillValue", v.fill})
	case Int32:
		attrs = append(attrs, attr{"_FillValue", int32(v.fill)})
	}
	if s.CellMethods != "" {
		attrs = append(attrs, attr{"cell_methods", s.CellMethods})
	}
	if s.Coordinates != "" {
		attrs = append(attrs, attr{"coordinates", strings.Join(words(s.Coordinates), " ")})
	}
	return attrs
}

const (
	seriesChunkBytes = 64 << 10 // target chunk size along time for non-map variables
	maxChunkSteps    = 4096
	maxChunkBytes    = 4 << 20 // above this, outer dimensions are chunked by 1
)

// defaultChunks chooses chunk sizes (see the package documentation).
func defaultChunks(dims []*dim, size int) []int {
	if len(dims) == 0 {
		return nil
	}
	c := make([]int, len(dims))
	spatial := false
	stepBytes := size
	for i, d := range dims {
		if d.axis == 'Y' || d.axis == 'X' {
			spatial = true
		}
		if i == 0 && d.axis == 'T' {
			continue
		}
		c[i] = d.n
		stepBytes *= d.n
	}
	if dims[0].axis == 'T' {
		if spatial {
			c[0] = 1
		} else {
			c[0] = max(1, min(maxChunkSteps, seriesChunkBytes/stepBytes))
		}
	}
	bytes := size
	for _, n := range c {
		bytes *= n
	}
	for i := range c {
		if bytes <= maxChunkBytes {
			break
		}
		if d := dims[i]; d.axis == 'Y' || d.axis == 'X' || c[i] == 1 {
			continue
		}
		bytes /= c[i]
		c[i] = 1
	}
	return c
}

// Write writes the whole variable: for a variable over time, every step
// appended so far (time outermost, then the other dimensions in order,
// the last varying fastest); otherwise all its values. NaN is stored as the
// fill value.
func (v *Var) Write(data []float64) error {
	w := v.w
	w.mu.Lock()
	defer w.mu.Unlock()
	if err := w.state(); err != nil {
		return err
	}
	n := 1
	if v.timed {
		n = w.time.n
		if n == 0 {
			return w.fail(fmt.Errorf("cfwrite: %s: variable %s: no time steps yet; append the time values (AppendTime) before writing", w.path, v.name))
		}
	}
	if len(data) != n*v.slab {
		return w.fail(fmt.Errorf("cfwrite: %s: variable %s: Write got %d values, the variable holds %d (%s)", w.path, v.name, len(data), n*v.slab, v.describe(n)))
	}
	if err := w.endDefine(); err != nil {
		return w.fail(err)
	}
	start := make([]int, len(v.dims))
	count := append([]int(nil), v.shape...)
	if v.timed {
		count = append([]int{n}, count...)
	}
	if err := v.put(start, count, data); err != nil {
		return w.fail(err)
	}
	if v.timed {
		for len(v.steps) < n {
			v.steps = append(v.steps, false)
		}
		for i := range n {
			v.steps[i] = true
		}
	} else {
		v.written = true
	}
	return nil
}

// WriteStep writes the slab of one time step: all the values over the
// variable's other dimensions, the last varying fastest (for [time][lat][lon]
// one [lat][lon] map, row by row of latitude). step is an index returned by
// AppendTime. NaN is stored as the fill value.
func (v *Var) WriteStep(step int, data []float64) error {
	w := v.w
	w.mu.Lock()
	defer w.mu.Unlock()
	if err := w.state(); err != nil {
		return err
	}
	if !v.timed {
		return w.fail(fmt.Errorf("cfwrite: %s: variable %s has no time dimension; use Write", w.path, v.name))
	}
	if step < 0 || step >= w.time.n {
		return w.fail(fmt.Errorf("cfwrite: %s: variable %s: step %d is not on the time axis (%d steps appended); append its time value first (AppendTime)", w.path, v.name, step, w.time.n))
	}
	if len(data) != v.slab {
		return w.fail(fmt.Errorf("cfwrite: %s: variable %s: step %d: slab has %d values, want %d (%s)", w.path, v.name, step, len(data), v.slab, v.describe(0)))
	}
	start := make([]int, len(v.dims))
	start[0] = step
	count := append([]int{1}, v.shape...)
	if err := v.put(start, count, data); err != nil {
		return w.fail(err)
	}
	for len(v.steps) <= step {
		v.steps = append(v.steps, false)
	}
	v.steps[step] = true
	return nil
}

// describe names the expected shape, e.g. "lat×lon = 3×4".
func (v *Var) describe(steps int) string {
	var names, lens []string
	for _, d := range v.dims {
		if d.axis == 'T' && d.name == DimTime {
			if steps == 0 {
				continue
			}
			names = append(names, "time")
			lens = append(lens, fmt.Sprint(steps))
			continue
		}
		names = append(names, d.name)
		lens = append(lens, fmt.Sprint(d.n))
	}
	if len(names) == 0 {
		return "a scalar"
	}
	return strings.Join(names, "×") + " = " + strings.Join(lens, "×")
}

// where names the position of flat index i of a hyperslab.
func (v *Var) where(start, count []int, i int) string {
	idx := make([]int, len(count))
	for k := len(count) - 1; k >= 0; k-- {
		idx[k] = start[k] + i%count[k]
		i /= count[k]
	}
	parts := make([]string, len(idx))
	for k, d := range v.dims {
		parts[k] = fmt.Sprintf("%s=%d", d.name, idx[k])
	}
	if len(parts) == 0 {
		return "the scalar value"
	}
	return strings.Join(parts, ", ")
}

// put converts data to the variable's type, NaN to fill, and writes it.
func (v *Var) put(start, count []int, data []float64) error {
	w := v.w
	bad := func(i int, why string) error {
		return fmt.Errorf("cfwrite: %s: variable %s: value %v at %s %s", w.path, v.name, data[i], v.where(start, count, i), why)
	}
	switch v.typ {
	case Float32:
		if cap(w.buf32) < len(data) {
			w.buf32 = make([]float32, len(data))
		}
		buf := w.buf32[:len(data)]
		for i, x := range data {
			switch {
			case x != x: // NaN
				buf[i] = v.fill32
				continue
			case math.IsInf(x, 0) || math.Abs(x) > math.MaxFloat32:
				return bad(i, "cannot be stored as float32; only NaN marks missing data (stored as _FillValue)")
			}
			f := float32(x)
			if f == v.fill32 {
				return bad(i, fmt.Sprintf("equals the _FillValue %g and would read back as missing", v.fill32))
			}
			buf[i] = f
		}
		if err := v.nv.WriteFloat32(start, count, buf); err != nil {
			return fmt.Errorf("cfwrite: %s: variable %s: %w", w.path, v.name, err)
		}
	default:
		if cap(w.buf64) < len(data) {
			w.buf64 = make([]float64, len(data))
		}
		buf := w.buf64[:len(data)]
		for i, x := range data {
			switch {
			case x != x:
				buf[i] = v.fill
				continue
			case math.IsInf(x, 0):
				return bad(i, "is not finite; only NaN marks missing data (stored as _FillValue)")
			case v.typ == Int32 && (x != math.Trunc(x) || x < math.MinInt32 || x > math.MaxInt32):
				return bad(i, "is not an int32, the variable's type")
			case x == v.fill:
				return bad(i, fmt.Sprintf("equals the _FillValue %g and would read back as missing", v.fill))
			}
			buf[i] = x
		}
		if err := v.nv.WriteFloat64(start, count, buf); err != nil {
			return fmt.Errorf("cfwrite: %s: variable %s: %w", w.path, v.name, err)
		}
	}
	return nil
}

// complete reports variables or steps that were never written.
func (v *Var) complete() error {
	w := v.w
	if !v.timed {
		if !v.written {
			return fmt.Errorf("cfwrite: %s: variable %s was declared but never written; write it (Var.Write) or leave it out", w.path, v.name)
		}
		return nil
	}
	var missing []string
	count := 0
	for i := range w.time.n {
		if i >= len(v.steps) || !v.steps[i] {
			count++
			if len(missing) < 5 {
				missing = append(missing, fmt.Sprint(i))
			}
		}
	}
	if count > 0 {
		list := strings.Join(missing, ", ")
		if count > len(missing) {
			list += ", ..."
		}
		return fmt.Errorf("cfwrite: %s: variable %s: %d of %d time steps were not written (steps %s); write every step (WriteStep) or store NaN for missing data", w.path, v.name, count, w.time.n, list)
	}
	return nil
}

// Field is a variable's declaration with its whole data, for WriteFields.
type Field struct {
	Spec VarSpec
	Data []float64
}

// WriteFields declares every field, then writes each one's whole data
// (Var.Write), in order: the pattern of a file of maps, all declared
// before any is written.
func (w *Writer) WriteFields(fs []Field) error {
	vars := make([]*Var, len(fs))
	for i, f := range fs {
		v, err := w.AddVar(f.Spec)
		if err != nil {
			return err
		}
		vars[i] = v
	}
	for i, f := range fs {
		if err := vars[i].Write(f.Data); err != nil {
			return err
		}
	}
	return nil
}
