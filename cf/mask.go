package cf

import (
	"fmt"
	"math"
	"strings"

	"lidscope/netcdf"
)

// Packing and missing data, following the NetCDF User Guide, Appendix A
// ("Attribute Conventions": _FillValue, missing_value, valid_min, valid_max,
// valid_range, scale_factor, add_offset) and CF-1.10 §2.5.1 and §8.1:
//
//   - A value is missing when it equals _FillValue, equals any of the
//     missing_value values, or lies outside [valid_min, valid_max]
//     (valid_range gives both). NaN and ±Inf in floating-point data are
//     missing too; both are counted so a run can report them (NaN only
//     where the variable does not declare NaN as its _FillValue or a
//     missing_value: then NaN is its ordinary missing-data marker).
//   - These tests are made on the stored ("packed") values, before
//     unpacking. If missing_value or a valid-range attribute has the type of
//     scale_factor rather than of the variable, it is in the unpacked domain
//     (a frequent writer mistake that netCDF readers tolerate); that is
//     detected and reported as a note, and that attribute is then tested
//     after unpacking. _FillValue always has the variable's type (netCDF-C
//     enforces it), so it is always tested on the stored value.
//   - When no valid range is given, the fill value — explicit or the
//     library default — implies one (NUG Appendix A): a positive fill value
//     defines a valid maximum, a negative one a valid minimum, one step
//     inside it (1 for integer types, two units in the last place of the
//     variable's type for floating-point types).
//     Deviation: a _FillValue of 0 masks only the value 0. Taken literally,
//     the NUG would make 0 a valid minimum and mask every negative value,
//     which silently discards half of a packed or signed field.
//   - When a variable has no _FillValue attribute, the library's default
//     fill value for its type (NC_FILL_FLOAT, NC_FILL_SHORT, …) marks
//     missing data, as the NUG prescribes — except for byte variables,
//     where the NUG says the default fill is not to be used and every value
//     is valid.
//   - Unpacked value = stored × scale_factor + add_offset.

// Default fill values of netCDF-C (netcdf.h NC_FILL_*).
var defaultFill = map[netcdf.Type]float64{
	netcdf.Short:  -32767,
	netcdf.Int:    -2147483647,
	netcdf.Float:  float64(float32(9.9692099683868690e+36)),
	netcdf.Double: 9.9692099683868690e+36,
	netcdf.UByte:  255,
	netcdf.UShort: 65535,
	netcdf.UInt:   4294967295,
	netcdf.Int64:  -9223372036854775806,
	netcdf.UInt64: 18446744073709551614,
}

// Mask describes how stored values become physical ones.
type Mask struct {
	Fill      float64 // _FillValue (or the type's default), NaN if none applies
	FillGiven bool    // true when _FillValue was an attribute
	Missing   []float64
	ValidMin  float64 // -Inf when none
	ValidMax  float64 // +Inf when none
	// ImpliedRange is true when ValidMin/ValidMax come from the fill value
	// (no valid_* attribute), NUG Appendix A.
	ImpliedRange bool
	Packed       bool
	Scale        float64
	Offset       float64
	// Unpacked is true when some missing-value attribute (missing_value or
	// the valid range) is tested after unpacking (see the package doc);
	// MissingUnpacked and RangeUnpacked say which.
	Unpacked        bool
	MissingUnpacked bool
	RangeUnpacked   bool
	Notes           []string // what was found that a user should know
	isFloatType     bool
	// standIn is true for plainMask: the variable's own decoding
	// attributes could not be used (Inspect reads on past them).
	standIn bool
}

// attrList finds attributes by name in a variable's attribute list.
type attrList []netcdf.Attr

func (l attrList) floats(vname, name string) ([]float64, netcdf.Type, bool, error) {
	for _, a := range l {
		if a.Name != name {
			continue
		}
		f, ok := a.Float64s()
		if !ok {
			return nil, a.Type, true, fmt.Errorf("attribute %s:%s is text (%s), it must be numeric (NUG Appendix A); fix the file (e.g. ncatted) or set the variable's decoding in the study", vname, name, a)
		}
		return f, a.Type, true, nil
	}
	return nil, 0, false, nil
}

// maskOf reads the packing and missing-value attributes of v.
func maskOf(v *netcdf.Var) (Mask, error) {
	as, err := v.Attrs()
	if err != nil {
		return Mask{}, fmt.Errorf("reading the attributes of %s: %w", v.Name, err)
	}
	return newMask(v.Name, v.Type, as)
}

// stepFrom returns x moved n units in the last place, in the precision of
// the variable's type (float32 or float64): dir −1 moves down, +1 up.
func stepFrom(x float64, n int, dir float64, float32Type bool) float64 {
	if float32Type {
		y := float32(x)
		for i := 0; i < n; i++ {
			y = math.Nextafter32(y, float32(dir)*float32(math.Inf(1)))
		}
		return float64(y)
	}
	for i := 0; i < n; i++ {
		x = math.Nextafter(x, dir*math.Inf(1))
	}
	return x
}

// newMask builds the decoding rules of a variable named vname, of stored
// type typ, from its attributes. It is pure: no file access.
func newMask(vname string, typ netcdf.Type, as []netcdf.Attr) (Mask, error) {
	l := attrList(as)
	m := Mask{Fill: math.NaN(), ValidMin: math.Inf(-1), ValidMax: math.Inf(1), Scale: 1,
		isFloatType: typ == netcdf.Float || typ == netcdf.Double}
	unpackedType, err := m.readPacking(l, vname)
	if err != nil {
		return m, err
	}
	inUnpacked := func(t netcdf.Type) bool {
		return m.Packed && t != typ && t == unpackedType && (t == netcdf.Float || t == netcdf.Double)
	}
	if err := m.readFill(l, vname, typ); err != nil {
		return m, err
	}
	miss, mt, hasMiss, err := l.floats(vname, "missing_value")
	if err != nil {
		return m, err
	}
	if hasMiss {
		m.Missing = miss
		m.MissingUnpacked = inUnpacked(mt)
	}
	if err := m.readValidRange(l, vname, typ, inUnpacked); err != nil {
		return m, err
	}
	m.noteUnpacked(vname)
	return m, nil
}

// readPacking reads scale_factor and add_offset (NUG Appendix A) and
// returns the type of the unpacked values (that of scale_factor, else of
// add_offset).
func (m *Mask) readPacking(l attrList, vname string) (netcdf.Type, error) {
	scale, st, hasScale, err := l.floats(vname, "scale_factor")
	if err != nil {
		return 0, err
	}
	off, ot, hasOff, err := l.floats(vname, "add_offset")
	if err != nil {
		return 0, err
	}
	if hasScale {
		if len(scale) != 1 {
			return 0, fmt.Errorf("%s:scale_factor has %d values, it must have one (NUG Appendix A); fix the file", vname, len(scale))
		}
		m.Packed, m.Scale = true, scale[0]
		if m.Scale == 0 || math.IsNaN(m.Scale) || math.IsInf(m.Scale, 0) {
			return 0, fmt.Errorf("%s:scale_factor is %g: values cannot be unpacked; fix the file", vname, m.Scale)
		}
	}
	if hasOff {
		if len(off) != 1 {
			return 0, fmt.Errorf("%s:add_offset has %d values, it must have one (NUG Appendix A); fix the file", vname, len(off))
		}
		m.Packed, m.Offset = true, off[0]
		if math.IsNaN(m.Offset) || math.IsInf(m.Offset, 0) {
			return 0, fmt.Errorf("%s:add_offset is %g: values cannot be unpacked; fix the file", vname, m.Offset)
		}
	}
	if !hasScale {
		return ot, nil
	}
	return st, nil
}

// readFill reads _FillValue, else the netCDF default fill of the type.
func (m *Mask) readFill(l attrList, vname string, typ netcdf.Type) error {
	fill, _, hasFill, err := l.floats(vname, "_FillValue")
	if err != nil {
		return err
	}
	if hasFill {
		if len(fill) != 1 {
			return fmt.Errorf("%s:_FillValue has %d values, it must have one (NUG Appendix A); fix the file", vname, len(fill))
		}
		m.Fill, m.FillGiven = fill[0], true
	} else if d, ok := defaultFill[typ]; ok {
		m.Fill = d
	}
	return nil
}

// readValidRange reads valid_range, else valid_min/valid_max, else the
// range the fill value implies (NUG Appendix A); inUnpacked tells whether
// an attribute of a type applies to unpacked values.
func (m *Mask) readValidRange(l attrList, vname string, typ netcdf.Type, inUnpacked func(netcdf.Type) bool) error {
	vr, vt, hasRange, err := l.floats(vname, "valid_range")
	if err != nil {
		return err
	}
	vmin, mint, hasMin, err := l.floats(vname, "valid_min")
	if err != nil {
		return err
	}
	vmax, maxt, hasMax, err := l.floats(vname, "valid_max")
	if err != nil {
		return err
	}
	one := func(name string, x []float64) (float64, error) {
		if len(x) != 1 || math.IsNaN(x[0]) {
			return 0, fmt.Errorf("%s:%s = %v must be one number (NUG Appendix A); fix the file", vname, name, x)
		}
		return x[0], nil
	}
	switch {
	case hasRange:
		if len(vr) != 2 || !(vr[0] <= vr[1]) {
			return fmt.Errorf("%s:valid_range = %v must be two increasing values (NUG Appendix A); fix the file", vname, vr)
		}
		m.ValidMin, m.ValidMax = vr[0], vr[1]
		m.RangeUnpacked = inUnpacked(vt)
		if hasMin || hasMax {
			m.Notes = append(m.Notes, "valid_range given together with valid_min/valid_max; valid_range used (NUG Appendix A)")
		}
	case hasMin || hasMax:
		if hasMin {
			if m.ValidMin, err = one("valid_min", vmin); err != nil {
				return err
			}
		}
		if hasMax {
			if m.ValidMax, err = one("valid_max", vmax); err != nil {
				return err
			}
		}
		if m.ValidMin > m.ValidMax {
			return fmt.Errorf("%s: valid_min %g is above valid_max %g, so no value would be valid; fix the file", vname, m.ValidMin, m.ValidMax)
		}
		m.RangeUnpacked = (hasMin && inUnpacked(mint)) || (hasMax && inUnpacked(maxt))
		if hasMin && hasMax && inUnpacked(mint) != inUnpacked(maxt) {
			return fmt.Errorf("%s: valid_min and valid_max have different types, one of the stored data and one of scale_factor, so it is unclear whether they apply before or after unpacking; fix the file", vname)
		}
	case m.Fill != 0 && !math.IsNaN(m.Fill):
		// NUG Appendix A: the fill value (explicit or default) implies a
		// valid range, one step inside it.
		m.ImpliedRange = true
		if m.Fill > 0 {
			if m.isFloatType {
				m.ValidMax = stepFrom(m.Fill, 2, -1, typ == netcdf.Float)
			} else {
				m.ValidMax = m.Fill - 1
			}
		} else {
			if m.isFloatType {
				m.ValidMin = stepFrom(m.Fill, 2, +1, typ == netcdf.Float)
			} else {
				m.ValidMin = m.Fill + 1
			}
		}
	}
	return nil
}

// noteUnpacked sets Unpacked and says which attributes apply to unpacked
// values.
func (m *Mask) noteUnpacked(vname string) {
	m.Unpacked = m.MissingUnpacked || m.RangeUnpacked
	if m.Unpacked {
		var which []string
		if m.MissingUnpacked {
			which = append(which, "missing_value")
		}
		if m.RangeUnpacked {
			which = append(which, "the valid range")
		}
		m.Notes = append(m.Notes, fmt.Sprintf("%s of %s %s the type of scale_factor, not of the stored data: applied to unpacked values", strings.Join(which, " and "), vname, map[bool]string{true: "have", false: "has"}[len(which) > 1]))
	}
}

// nanDeclared reports whether the variable declares NaN as its _FillValue
// or as one of its missing_value values.
func (m *Mask) nanDeclared() bool {
	if m.FillGiven && math.IsNaN(m.Fill) {
		return true
	}
	for _, v := range m.Missing {
		if math.IsNaN(v) {
			return true
		}
	}
	return false
}

// Decode turns one stored value into a physical value (NaN if missing),
// before any units conversion.
func (m *Mask) Decode(x float64) float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) || x == m.Fill {
		return math.NaN()
	}
	y := x
	if m.Packed {
		y = x*m.Scale + m.Offset
	}
	mv := x
	if m.MissingUnpacked {
		mv = y
	}
	for _, v := range m.Missing {
		if mv == v {
			return math.NaN()
		}
	}
	rv := x
	if m.RangeUnpacked {
		rv = y
	}
	if rv < m.ValidMin || rv > m.ValidMax {
		return math.NaN()
	}
	return y
}

// Describe says, in plain words, how values are decoded.
func (m *Mask) Describe() string {
	var parts []string
	if m.Packed {
		parts = append(parts, fmt.Sprintf("packed: value = stored × %g + %g", m.Scale, m.Offset))
	}
	switch {
	case m.FillGiven:
		parts = append(parts, fmt.Sprintf("_FillValue %.7g", m.Fill))
	case !math.IsNaN(m.Fill):
		parts = append(parts, fmt.Sprintf("no _FillValue: library default %.7g masks", m.Fill))
	}
	if len(m.Missing) > 0 {
		parts = append(parts, fmt.Sprintf("missing_value %.7g", m.Missing))
	}
	if !math.IsInf(m.ValidMin, -1) || !math.IsInf(m.ValidMax, 1) {
		what := "valid"
		if m.ImpliedRange {
			what = "valid (implied by the fill value)"
		}
		parts = append(parts, fmt.Sprintf("%s %.7g…%.7g", what, m.ValidMin, m.ValidMax))
	}
	if len(parts) == 0 {
		return "no packing, no missing-value attributes (NaN masks)"
	}
	return strings.Join(parts, "; ")
}
