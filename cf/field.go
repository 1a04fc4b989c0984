package cf

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"
	"sync"
	"sync/atomic"

	"lidscope/netcdf"
	"lidscope/units"
)

// Spec says which variable to read for a role and how.
type Spec struct {
	Role Role
	// Var is the variable name; empty means: find the role in the file
	// (by standard_name, then by unambiguous name and units).
	Var string
	// Level is the pressure (Pa) to take from a variable with a vertical
	// axis (e.g. 70000 for T700). Zero for single-level fields.
	Level float64
	Overrides
	// collect, when set (Inspect only), receives each problem that the
	// open can read past instead of stopping at it; see openCollecting.
	collect *[]string
	// MemoryBudget bounds the bytes reading one time step may allocate
	// (0: DefaultMemoryBudget); a larger grid is refused before reading
	// its coordinates, with an error wrapping ErrOverBudget.
	MemoryBudget int64
}

// segment is one file's part of a field's record. Only the segment being
// read keeps its file open (see Field.use): an open NetCDF-4 file holds
// HDF5 chunk caches (up to 16 MiB per variable by netCDF-C's default), so
// keeping every file of a long record open would make memory grow with the
// number of files instead of staying bounded.
type segment struct {
	path  string
	file  *netcdf.File // nil while closed
	v     *netcdf.Var  // nil while closed
	shape []int        // the variable's shape when first opened
	nt    int          // time steps in this file (1 for a field without time)
	times []Date
	mask  Mask
}

// Field is one variable for one role, possibly spread over several files
// along time, delivered slab by slab in the canonical layout and in SI
// units, with missing values as NaN.
type Field struct {
	Role   Role
	Var    string
	Kind   units.Kind
	Conv   units.Conversion // stored (unpacked) units → SI
	Layout *Layout
	Level  *LevelPick // nil for single-level fields
	Time   *TimeAxis  // nil for a field without a time axis
	// Notes records every conversion and reordering applied, in plain words.
	Notes []string

	segs []segment
	mu   sync.Mutex // guards opening and closing the segments' files
	// index of each axis in the variable's dimension list (-1 if absent)
	ti, zi, yi, xi int
	ndim           int
	latFirst       bool
	nyx            int
	infCount       atomic.Int64
	nanCount       atomic.Int64
	paths          []string
}

// Paths lists the files the field is read from, in time order.
func (f *Field) Paths() []string { return f.paths }

// NT is the number of time steps (1 for a field without a time axis).
func (f *Field) NT() int {
	n := 0
	for _, s := range f.segs {
		n += s.nt
	}
	return n
}

// Len is the number of cells in a canonical slab.
func (f *Field) Len() int { return f.Layout.NLat() * f.Layout.NLon() }

// InfCount is how many ±Inf stored values have been read (and masked) so far.
func (f *Field) InfCount() int64 { return f.infCount.Load() }

// NaNCount is how many stored NaN values have been read (and masked) so far,
// not counting NaN where the variable declares it as its _FillValue or a
// missing_value (then NaN is the file's ordinary missing-data marker).
func (f *Field) NaNCount() int64 { return f.nanCount.Load() }

// PathAt returns the file that holds time step t of the record ("" when t
// is out of range).
func (f *Field) PathAt(t int) string {
	seg, _, err := f.locate(t)
	if err != nil {
		return ""
	}
	return seg.path
}

// Close releases the files.
func (f *Field) Close() error {
	var errs []error
	f.mu.Lock()
	defer f.mu.Unlock()
	for i := range f.segs {
		errs = append(errs, f.segs[i].close())
	}
	return errors.Join(errs...)
}

// Open opens a field from one or more files. With several files they are
// one record along time: sorted by their first decoded time and checked for
// equal grids and levels, duplicated or overlapping time steps (errors) and
// gaps (notes naming the dates).
func Open(paths []string, spec Spec) (*Field, error) {
	if len(paths) == 0 {
		return nil, fmt.Errorf("role %s: no input files", spec.Role)
	}
	kind, ok := KindOf(spec.Role)
	if !ok {
		return nil, fmt.Errorf("unknown role %q (known: %v)", spec.Role, Roles())
	}
	var fld *Field
	var files []*netcdf.File
	fail := func(err error) (*Field, error) {
		for _, f := range files {
			f.Close()
		}
		return nil, err
	}
	for _, p := range paths {
		if err := CheckRegular(p); err != nil {
			return fail(fmt.Errorf("role %s: %w", spec.Role, err))
		}
		if err := checkClassicSize(p); err != nil {
			return fail(fmt.Errorf("role %s: %w", spec.Role, err))
		}
		nf, err := netcdf.Open(p)
		if err != nil {
			return fail(fmt.Errorf("role %s: %w%s", spec.Role, err, openHint(err)))
		}
		files = append(files, nf)
		one, err := openOne(nf, spec, kind)
		if err != nil {
			return fail(fmt.Errorf("role %s: %w", spec.Role, err))
		}
		if fld == nil {
			fld = one
			continue
		}
		if err := fld.appendSegment(one); err != nil {
			return fail(fmt.Errorf("role %s: %w", spec.Role, err))
		}
		// Files are opened again as reading reaches them, so a record of
		// many files needs one open file at a time, whatever the
		// open-file limit.
		if err := fld.segs[len(fld.segs)-1].close(); err != nil {
			return fail(fmt.Errorf("role %s: %w", spec.Role, err))
		}
	}
	if err := fld.orderSegments(); err != nil {
		return fail(fmt.Errorf("role %s: %w", spec.Role, err))
	}
	// Keep only the first file of the record open; the others are opened
	// when reading reaches them.
	for i := 1; i < len(fld.segs); i++ {
		if err := fld.segs[i].close(); err != nil {
			fld.Close()
			return nil, fmt.Errorf("role %s: %w", spec.Role, err)
		}
	}
	return fld, nil
}

// close closes the segment's file if it is open.
func (s *segment) close() error {
	if s.file == nil {
		return nil
	}
	err := s.file.Close()
	s.file, s.v = nil, nil
	return err
}

// use makes seg the one segment of fld whose file is open, reopening it if
// needed and closing the others. Call with fld.mu held.
func (fld *Field) use(seg *segment) error {
	if seg.file == nil {
		if err := CheckRegular(seg.path); err != nil {
			return fmt.Errorf("role %s: reopening: %w", fld.Role, err)
		}
		nf, err := netcdf.Open(seg.path)
		if err != nil {
			return fmt.Errorf("role %s: reopening %s: %w%s", fld.Role, seg.path, err, openHint(err))
		}
		v, err := nf.Var(fld.Var)
		if err == nil && !slices.Equal(v.Shape(), seg.shape) {
			err = fmt.Errorf("variable %s has shape %v, not %v as when it was opened: the file changed during the run", fld.Var, v.Shape(), seg.shape)
		}
		if err != nil {
			nf.Close()
			return fmt.Errorf("role %s: reopening %s: %w", fld.Role, seg.path, err)
		}
		seg.file, seg.v = nf, v
	}
	for i := range fld.segs {
		if s := &fld.segs[i]; s != seg {
			if err := s.close(); err != nil {
				return fmt.Errorf("role %s: %w", fld.Role, err)
			}
		}
	}
	return nil
}

// openHint says what to do about a file netCDF-C could not open.
func openHint(err error) string {
	switch {
	case errors.Is(err, netcdf.ErrHDF5):
		return " (the NetCDF-4/HDF5 file is damaged or truncated; check it with ncdump -h and copy or download it again)"
	case errors.Is(err, netcdf.ErrNotNetCDF):
		return " (the file is not NetCDF, or is truncated or damaged; check it with ncdump -h and copy or download it again)"
	}
	return ""
}

func (fld *Field) appendSegment(o *Field) error {
	a, b := fld.segs[0].path, o.segs[0].path
	if o.Var != fld.Var {
		return fmt.Errorf("%s has the field as variable %s but %s as %s; name the variable in the study", a, fld.Var, b, o.Var)
	}
	if same, why := SameGrid(fld.Layout, o.Layout, 1e-4); !same {
		return fmt.Errorf("files of one record must share a grid: %s and %s differ (%s)", a, b, why)
	}
	if (fld.Level == nil) != (o.Level == nil) || (fld.Level != nil && *fld.Level != *o.Level) {
		return fmt.Errorf("files of one record must share the vertical axis: %s and %s differ", a, b)
	}
	if (fld.Time == nil) != (o.Time == nil) {
		return fmt.Errorf("%s has a time axis but %s does not", a, b)
	}
	if fld.Conv.Scale != o.Conv.Scale || fld.Conv.Offset != o.Conv.Offset {
		return fmt.Errorf("files of one record must share units: %s uses %q, %s uses %q", a, fld.Conv.From, b, o.Conv.From)
	}
	if fld.Time != nil && fld.Time.Calendar != o.Time.Calendar {
		return fmt.Errorf("files of one record must share a calendar: %s uses %s, %s uses %s", a, fld.Time.Calendar, b, o.Time.Calendar)
	}
	if fld.ti != o.ti || fld.zi != o.zi || fld.yi != o.yi || fld.xi != o.xi || fld.ndim != o.ndim {
		return fmt.Errorf("files of one record must share the dimension order of %s: %s and %s differ", fld.Var, a, b)
	}
	fld.segs = append(fld.segs, o.segs...)
	fld.paths = append(fld.paths, o.paths...)
	for _, n := range o.Notes {
		if !contains(fld.Notes, n) {
			fld.Notes = append(fld.Notes, b+": "+n)
		}
	}
	return nil
}

// orderSegments sorts files by first time and checks the joined axis.
func (fld *Field) orderSegments() error {
	if fld.Time == nil {
		if len(fld.segs) > 1 {
			return fmt.Errorf("%d files given for a field without a time axis (%s); give one file", len(fld.segs), strings.Join(fld.paths, ", "))
		}
		return nil
	}
	sort.SliceStable(fld.segs, func(i, j int) bool { return fld.segs[i].times[0].Before(fld.segs[j].times[0]) })
	fld.paths = fld.paths[:0]
	var all []Date
	for j, s := range fld.segs {
		fld.paths = append(fld.paths, s.path)
		all = append(all, s.times...)
		if j == 0 {
			continue
		}
		// Each file's own axis increases (decodeTimeAxis checks it), so the
		// record increases when every file starts after its predecessor ends.
		prev := fld.segs[j-1]
		last, first := prev.times[len(prev.times)-1], s.times[0]
		if first.After(last) {
			continue
		}
		a, b := prev.path, s.path
		if d, ok := commonDate(prev.times, s.times); ok {
			return fmt.Errorf("time step %s appears twice, in %s and in %s: remove the duplicate file or limit the time range", d, a, b)
		}
		return fmt.Errorf("files overlap in time: %s runs to %s but %s starts at %s; remove the overlap", a, last, b, first)
	}
	fld.Time.Dates = all
	fld.Time.classify()
	if gaps := fld.Time.Gaps(); len(gaps) > 0 {
		fld.Notes = append(fld.Notes, "gaps in the record: "+strings.Join(gaps, "; "))
	}
	return nil
}

// commonDate returns the first date of b that is also in a (both increase).
func commonDate(a, b []Date) (Date, bool) {
	i, j := 0, 0
	for i < len(a) && j < len(b) {
		switch c := a[i].Compare(b[j]); {
		case c == 0:
			return b[j], true
		case c < 0:
			i++
		default:
			j++
		}
	}
	return Date{}, false
}

// soft records err as a problem and reports true when the spec collects
// problems (Inspect reads on past it); otherwise it reports false and the
// caller returns err.
func (s Spec) soft(err error) bool {
	if s.collect == nil {
		return false
	}
	*s.collect = append(*s.collect, err.Error())
	return true
}

// Scratch holds the buffers ReadSlab needs; one per goroutine.
type Scratch struct {
	a, b     []float64
	a32, b32 []float32
}

// SlabRange describes the values a read wrote: how many are valid (not
// NaN), and the smallest and largest of them (+Inf and −Inf when none is).
type SlabRange struct {
	Valid    int
	Min, Max float64
}

// ReadSlab reads time step t into dst (len Len()), canonical layout, SI
// units, NaN where missing. s may be nil (buffers are then allocated).
func (fld *Field) ReadSlab(t int, dst []float32, s *Scratch) error {
	_, err := fld.ReadSlabRange(t, dst, s)
	return err
}

// ReadSlabRange is ReadSlab that also returns the range of the values
// written, found in the same pass (for plausibility checks without a second
// scan). Variables whose values are exact in float32 (float, byte and short
// integers) are read in that precision; the values written are the same as
// when read as double, since every such value converts to float64 exactly.
func (fld *Field) ReadSlabRange(t int, dst []float32, s *Scratch) (SlabRange, error) {
	if len(dst) != fld.Len() {
		return SlabRange{}, fmt.Errorf("role %s: slab buffer has %d cells, the grid has %d", fld.Role, len(dst), fld.Len())
	}
	if s == nil {
		s = &Scratch{}
	}
	seg, lt, err := fld.locate(t)
	if err != nil {
		return SlabRange{}, err
	}
	zi := 0
	if fld.Level != nil {
		zi = fld.Level.Lower
	}
	interp := fld.Level != nil && !fld.Level.Exact
	narrow, err := fld.read(seg, lt, zi, s, false)
	if err != nil {
		return SlabRange{}, err
	}
	if interp {
		if _, err := fld.read(seg, lt, fld.Level.Upper, s, true); err != nil {
			return SlabRange{}, err
		}
	}
	var infs, nans int64
	var r SlabRange
	if narrow {
		r, infs, nans = decodeSlab(fld, &seg.mask, dst, s.a32[:fld.nyx], s.b32[:fld.nyx], interp)
	} else {
		r, infs, nans = decodeSlab(fld, &seg.mask, dst, s.a[:fld.nyx], s.b[:fld.nyx], interp)
	}
	if infs > 0 {
		fld.infCount.Add(infs)
	}
	if nans > 0 {
		fld.nanCount.Add(nans)
	}
	return r, nil
}

// decodeSlab puts the stored values a (and b, the upper level when
// interpolating) into dst: canonical order, decoded (fill, missing and
// valid range, packing), interpolated, converted to SI; the range of the
// result is found on the way.
func decodeSlab[T float32 | float64](fld *Field, m *Mask, dst []float32, a, b []T, interp bool) (r SlabRange, infs, nans int64) {
	countNaN := !m.nanDeclared()
	lo, hi := float32(math.Inf(1)), float32(math.Inf(-1))
	valid := 0
	for k, src := range fld.Layout.src {
		x := float64(a[src])
		if math.IsInf(x, 0) {
			infs++
		} else if x != x && countNaN {
			nans++
		}
		y := m.Decode(x)
		if interp {
			x2 := float64(b[src])
			if math.IsInf(x2, 0) {
				infs++
			} else if x2 != x2 && countNaN {
				nans++
			}
			y2 := m.Decode(x2)
			w := fld.Level.W
			y = (1-w)*y + w*y2 // NaN if either is missing
		}
		v := float32(fld.Conv.Apply(y))
		dst[k] = v
		if v == v {
			valid++
			lo, hi = min(lo, v), max(hi, v)
		}
	}
	return SlabRange{Valid: valid, Min: float64(lo), Max: float64(hi)}, infs, nans
}

func (fld *Field) locate(t int) (*segment, int, error) {
	if t < 0 {
		return nil, 0, fmt.Errorf("role %s: time step %d out of range", fld.Role, t)
	}
	lt := t
	for i := range fld.segs {
		if lt < fld.segs[i].nt {
			return &fld.segs[i], lt, nil
		}
		lt -= fld.segs[i].nt
	}
	return nil, 0, fmt.Errorf("role %s: time step %d out of range (record has %d)", fld.Role, t, fld.NT())
}

// readAllAsDouble makes read take every type as double (tests compare the
// two paths).
var readAllAsDouble = false

// read reads level z of local step t of seg into s.a (s.b when upper),
// or, when the variable's values are exact in float32, into s.a32 (s.b32)
// in the file's precision; narrow says which.
func (fld *Field) read(seg *segment, t, z int, s *Scratch, upper bool) (narrow bool, err error) {
	start := make([]int, fld.ndim)
	count := make([]int, fld.ndim)
	for i := range count {
		count[i] = 1
	}
	if fld.ti >= 0 {
		start[fld.ti] = t
	}
	if fld.zi >= 0 {
		start[fld.zi] = z
	}
	count[fld.yi] = len(fld.Layout.storedLat)
	count[fld.xi] = len(fld.Layout.storedLon)
	fld.mu.Lock()
	defer fld.mu.Unlock()
	if err := fld.use(seg); err != nil {
		return false, err
	}
	switch seg.v.Type {
	case netcdf.Float, netcdf.Byte, netcdf.UByte, netcdf.Short, netcdf.UShort:
		if readAllAsDouble {
			break
		}
		narrow = true
		if cap(s.a32) < fld.nyx {
			s.a32 = make([]float32, fld.nyx)
			s.b32 = make([]float32, fld.nyx)
		}
		dst := s.a32[:fld.nyx]
		if upper {
			dst = s.b32[:fld.nyx]
		}
		err = seg.v.ReadFloat32(start, count, dst)
	}
	if !narrow {
		if cap(s.a) < fld.nyx {
			s.a = make([]float64, fld.nyx)
			s.b = make([]float64, fld.nyx)
		}
		dst := s.a[:fld.nyx]
		if upper {
			dst = s.b[:fld.nyx]
		}
		err = seg.v.ReadFloat64(start, count, dst)
	}
	if err != nil {
		return narrow, fmt.Errorf("%s: reading %s at time step %d: %w (the file may be truncated or damaged)", seg.path, fld.Var, t, err)
	}
	return narrow, nil
}

// FindRole returns the variable of file nf that fills role r, or an error
// that says why none or several qualify.
func FindRole(nf *netcdf.File, r Role) (string, error) {
	cands, amb, rej, err := roleCandidates(nf)
	if err != nil {
		return "", err
	}
	if m, ok := cands[r]; ok {
		if m.ByLongName {
			return "", fmt.Errorf("%s: variable %s looks like role %s by its %s only; confirm it by naming it in the study (variables.%s: %s)", nf.Path(), m.Var, r, m.How, r, m.Var)
		}
		return m.Var, nil
	}
	for _, a := range amb {
		if strings.HasPrefix(a, "role "+string(r)+" ") {
			return "", fmt.Errorf("%s: %s", nf.Path(), a)
		}
	}
	var why []string
	for _, x := range rej {
		if x.Role == r {
			why = append(why, x.String())
		}
	}
	msg := fmt.Sprintf("%s: no variable found for role %s (by standard_name %s or by name); name it in the study (variables.%s: NAME)", nf.Path(), r, strings.Join(specOf(r).StandardNames, " / "), r)
	if len(why) > 0 {
		msg += "; " + strings.Join(why, "; ")
	}
	return "", errors.New(msg)
}

// rejection is a variable whose standard_name or name suggests a role but
// whose coordinates make it unusable.
type rejection struct {
	Role Role
	Var  string
	Hint string // how the role was suggested
	Err  error
}

func (x rejection) String() string {
	return fmt.Sprintf("variable %s (%s) looks like role %s but cannot be used: %v", x.Var, x.Hint, x.Role, x.Err)
}

// roleHints returns the roles a variable's standard_name, or failing
// that its name, suggests, ignoring levels and units.
func roleHints(v *netcdf.Var) ([]Role, string) {
	sn := strings.ToLower(textAttr(v, "standard_name"))
	var out []Role
	if sn != "" {
		for _, s := range roleSpecs {
			if contains(s.StandardNames, sn) {
				out = append(out, s.Role)
			}
		}
		return out, "standard_name " + sn
	}
	for _, s := range roleSpecs {
		if contains(s.Names, strings.ToLower(v.Name)) {
			out = append(out, s.Role)
		}
	}
	return out, "by its name"
}

func specOf(r Role) roleSpec {
	for _, s := range roleSpecs {
		if s.Role == r {
			return s
		}
	}
	return roleSpec{}
}

// roleCandidates matches every data variable of a file against the roles.
func roleCandidates(nf *netcdf.File) (map[Role]RoleMatch, []string, []rejection, error) {
	vars, err := nf.Vars()
	if err != nil {
		return nil, nil, nil, fmt.Errorf("%s: %w", nf.Path(), err)
	}
	skip := auxNames(nf, vars)
	var all []RoleMatch
	var rej []rejection
	for _, v := range vars {
		if skip[v.Name] || !v.Type.Numeric() {
			continue
		}
		if len(v.Dims) == 1 {
			// A 1-D series (e.g. a station's or an area mean's SST) is not
			// a field; say so when its name suggests a role.
			roles, hint := roleHints(v)
			for _, r := range roles {
				rej = append(rej, rejection{r, v.Name, hint, fmt.Errorf("it has 1 dimension (%s, length %d), but a field needs latitude and longitude dimensions (a map per time step, not a series)", v.Dims[0].Name, v.Dims[0].Len)})
			}
			continue
		}
		if len(v.Dims) < 2 {
			continue
		}
		cs, err := findCoords(nf, v, Overrides{})
		if err != nil {
			roles, hint := roleHints(v)
			for _, r := range roles {
				rej = append(rej, rejection{r, v.Name, hint, err})
			}
			continue
		}
		hasLev := false // a pressure axis (depth or height axes do not count)
		nlev := 0
		for _, c := range cs {
			if c.Axis == AxisZ && c.Var != nil && isPressureUnit(textAttr(c.Var, "units")) {
				hasLev, nlev = true, c.Length
			}
		}
		if !hasLev {
			if _, ok := scalarLevel(nf, v); ok {
				hasLev = true
			}
		}
		for _, m := range matchRoles(v, hasLev) {
			m.NLevels = nlev
			all = append(all, m)
		}
	}
	m, amb := assignRoles(all)
	return m, amb, rej, nil
}

// auxNames returns the names of coordinate and bounds variables.
func auxNames(nf *netcdf.File, vars []*netcdf.Var) map[string]bool {
	skip := map[string]bool{}
	for _, v := range vars {
		if len(v.Dims) == 1 && v.Dims[0].Name == v.Name {
			skip[v.Name] = true
		}
		for _, an := range []string{"bounds", "climatology"} {
			if b := textAttr(v, an); b != "" {
				skip[b] = true
			}
		}
		for _, c := range strings.Fields(textAttr(v, "coordinates")) {
			skip[c] = true
		}
	}
	return skip
}
