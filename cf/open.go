// Resolving a variable of one open file into a Field, in named steps.

package cf

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"lidscope/netcdf"
	"lidscope/units"
)

// levelHint is the study key that can fix a level error, or nothing when
// the level is not in the file (no key can help; the error says so).
func levelHint(err error, r Role) string {
	if errors.Is(err, ErrLevelNotInFile) || errors.Is(err, errLevelUnitsSuspect) {
		return ""
	}
	return fmt.Sprintf(" (study key coordinates.%s.level_units)", r)
}

// openOne resolves the spec against one open file, in named steps: the
// variable, its axes, the memory budget, the horizontal layout, the
// vertical level, the time axis, the units and the packing.
func openOne(nf *netcdf.File, spec Spec, kind units.Kind) (*Field, error) {
	path := nf.Path()
	name, v, err := lookupVar(nf, spec)
	if err != nil {
		return nil, err
	}
	cs, err := findCoords(nf, v, spec.Overrides)
	if err != nil {
		return nil, err
	}
	fld := &Field{Role: spec.Role, Var: name, Kind: kind, ti: -1, zi: -1, yi: -1, xi: -1, ndim: len(v.Dims), paths: []string{path}}
	if err := fld.placeAxes(path, v, cs, spec); err != nil {
		return nil, err
	}
	if err := fld.checkBudget(path, v, spec); err != nil {
		return nil, err
	}
	if err := fld.readHorizontal(nf, v, cs); err != nil {
		return nil, err
	}
	if err := fld.pickVertical(nf, v, cs, spec); err != nil {
		return nil, err
	}
	seg, err := fld.readTime(nf, v, cs, spec)
	if err != nil {
		return nil, err
	}
	if err := fld.setUnits(v, spec); err != nil {
		return nil, err
	}
	seg.mask, err = maskOf(v)
	if err != nil {
		err = fmt.Errorf("%s: %w", path, err)
		if !spec.soft(err) {
			return nil, err
		}
		seg.mask = plainMask(v) // no unpacking, only to sample values
		if !seg.mask.isFloatType {
			// packed integers mean nothing unscaled
			fld.Notes = append(fld.Notes, notUnpacked)
		}
	}
	fld.Notes = append(fld.Notes, seg.mask.Notes...)
	fld.segs = []segment{seg}
	return fld, nil
}

// lookupVar finds the spec's variable in the file (by its name in the
// study, else by its role) and checks that it is numeric.
func lookupVar(nf *netcdf.File, spec Spec) (string, *netcdf.Var, error) {
	path := nf.Path()
	name := spec.Var
	if name == "" {
		found, err := FindRole(nf, spec.Role)
		if err != nil {
			return "", nil, err
		}
		name = found
	}
	v, err := nf.Var(name)
	if err != nil {
		if errors.Is(err, netcdf.ErrNotVar) && spec.Var != "" {
			var names []string
			if vs, verr := nf.Vars(); verr == nil {
				for _, x := range vs {
					names = append(names, x.Name)
				}
			}
			return "", nil, fmt.Errorf("%s has no variable %s, the name the study gives for role %s (variables.%s; the file has %s): %w", path, name, spec.Role, spec.Role, strings.Join(names, ", "), err)
		}
		return "", nil, fmt.Errorf("%s: %w", path, err)
	}
	if !v.Type.Numeric() {
		return "", nil, fmt.Errorf("%s: variable %s is of type %s, not numeric", path, name, v.Type)
	}
	return name, v, nil
}

// placeAxes records which dimension of v is time, vertical, latitude and
// longitude, and refuses a variable without latitude and longitude or with
// a dimension longer than 1 that is none of them.
func (fld *Field) placeAxes(path string, v *netcdf.Var, cs []coord, spec Spec) error {
	var unknown []int // dimensions of length > 1 with no recognised axis
	for i, c := range cs {
		switch c.Axis {
		case AxisT:
			fld.ti = i
		case AxisZ:
			fld.zi = i
		case AxisY:
			fld.yi = i
		case AxisX:
			fld.xi = i
		default:
			if v.Dims[i].Len != 1 {
				unknown = append(unknown, i)
			} else if c.Var == nil {
				fld.Notes = append(fld.Notes, fmt.Sprintf("length-1 dimension %s ignored", v.Dims[i].Name))
			}
		}
	}
	if fld.yi < 0 || fld.xi < 0 {
		var dn []string
		for _, d := range v.Dims {
			dn = append(dn, d.Name)
		}
		return fmt.Errorf("%s: variable %s(%s): no latitude/longitude coordinates found (looked for axis, standard_name, units degrees_north/degrees_east, the coordinates attribute and common names); name them in the study (coordinates.%s.lat and coordinates.%s.lon)", path, fld.Var, strings.Join(dn, ", "), spec.Role, spec.Role)
	}
	if len(unknown) > 0 {
		d := v.Dims[unknown[0]]
		return fmt.Errorf("%s: variable %s has dimension %s (length %d) that is neither latitude, longitude, a vertical nor a time axis; lidscope cannot tell what it is — select one index with e.g. `ncks -d %s,0`, or name its coordinate in the study (coordinates.%s)", path, fld.Var, d.Name, d.Len, d.Name, spec.Role)
	}
	return nil
}

// checkBudget refuses what would not fit in memory before reading
// anything large: one horizontal slab, and the time axis, which is
// decoded whole (its values and dates).
func (fld *Field) checkBudget(path string, v *netcdf.Var, spec Spec) error {
	if ny, nx := v.Dims[fld.yi].Len, v.Dims[fld.xi].Len; slabBytes(ny, nx) > budgetOf(spec) {
		return overBudget(path, fld.Var, fmt.Sprintf("%d×%d (%s×%s)", ny, nx, v.Dims[fld.yi].Name, v.Dims[fld.xi].Name), slabBytes(ny, nx), budgetOf(spec))
	}
	if fld.ti >= 0 {
		if nt := v.Dims[fld.ti].Len; mulCap(int64(nt), 64) > budgetOf(spec) {
			return overBudget(path, fld.Var, fmt.Sprintf("%d-step time (%s)", nt, v.Dims[fld.ti].Name), mulCap(int64(nt), 64), budgetOf(spec))
		}
	}
	return nil
}

// readHorizontal reads the latitude and longitude coordinates and their
// bounds (derived from the midpoints, with a note, when the file has none)
// into the field's canonical horizontal layout.
func (fld *Field) readHorizontal(nf *netcdf.File, v *netcdf.Var, cs []coord) error {
	path := nf.Path()
	latV, lonV := cs[fld.yi].Var, cs[fld.xi].Var
	if err := geographic(nf, v, latV, AxisY); err != nil {
		return err
	}
	if err := geographic(nf, v, lonV, AxisX); err != nil {
		return err
	}
	lat, err := readCoord(nf, latV)
	if err != nil {
		return err
	}
	lon, err := readCoord(nf, lonV)
	if err != nil {
		return err
	}
	latB, err := fld.boundsOrNote(nf, latV)
	if err != nil {
		return err
	}
	lonB, err := fld.boundsOrNote(nf, lonV)
	if err != nil {
		return err
	}
	fld.latFirst = fld.yi < fld.xi
	fld.Layout, err = newLayout(path, latV.Name, lonV.Name, lat, lon, latB, lonB, fld.latFirst)
	if err != nil {
		return err
	}
	fld.nyx = len(lat) * len(lon)
	fld.Notes = append(fld.Notes, fld.Layout.Notes...)
	return nil
}

// boundsOrNote reads a coordinate's bounds; missing bounds are not an
// error but a note (the layout derives them from the midpoints).
func (fld *Field) boundsOrNote(nf *netcdf.File, cv *netcdf.Var) ([][2]float64, error) {
	b, err := readBounds(nf, cv)
	var mb errMissingBounds
	if errors.As(err, &mb) {
		fld.Notes = append(fld.Notes, mb.Error()+": bounds derived from midpoints instead")
		return b, nil
	}
	return b, err
}

// pickVertical picks the spec's level on the vertical axis, or checks
// that a single-level field is at it (a scalar pressure coordinate, CF
// §5.7), or that a field without a level in the spec has one level.
func (fld *Field) pickVertical(nf *netcdf.File, v *netcdf.Var, cs []coord, spec Spec) error {
	path, name := nf.Path(), fld.Var
	if fld.zi >= 0 {
		zv := cs[fld.zi].Var
		if spec.Level == 0 {
			if v.Dims[fld.zi].Len != 1 {
				return fmt.Errorf("%s: variable %s has %d vertical levels but role %s is a single-level field; choose a level in the study", path, name, v.Dims[fld.zi].Len, spec.Role)
			}
			return nil
		}
		lv, err := readCoord(nf, zv)
		if err != nil {
			return err
		}
		lu := spec.LevelUnits
		if lu == "" {
			lu = textAttr(zv, "units")
		}
		pick, err := PickLevel(lv, lu, spec.Level)
		if err != nil {
			err = roleText{fmt.Errorf("%s: variable %s, vertical coordinate %s: %w%s", path, name, zv.Name, err, levelHint(err, spec.Role)), spec.Role}
			if !spec.soft(err) {
				return err
			}
			pick = LevelPick{Exact: true} // the first level, only to sample values
		}
		fld.Level = &pick
		return nil
	}
	if spec.Level == 0 {
		return nil
	}
	// A single-level file may still be the right level, declared by a
	// scalar coordinate (CF §5.7), e.g. plev = 70000.
	if p, ok := scalarLevel(nf, v); ok {
		if math.Abs(p-spec.Level) > 0.01 {
			if err := fmt.Errorf("%s: variable %s is on the single level %g hPa, but %g hPa is needed; the level is not in the file, so no setting in the study can help: give a file that has it", path, name, p/100, spec.Level/100); !spec.soft(err) {
				return err
			}
		}
		fld.Notes = append(fld.Notes, fmt.Sprintf("single level %g hPa (scalar coordinate)", p/100))
	} else if err := fmt.Errorf("%s: variable %s has no vertical axis, so lidscope cannot tell whether it is at %g hPa; give a file with a pressure axis or a scalar pressure coordinate (CF-1.10 §5.7)", path, name, spec.Level/100); !spec.soft(err) {
		return err
	}
	return nil
}

// readTime decodes the time axis (dates of every step) into the field
// and returns the file's segment of the record.
func (fld *Field) readTime(nf *netcdf.File, v *netcdf.Var, cs []coord, spec Spec) (segment, error) {
	path, name := nf.Path(), fld.Var
	seg := segment{path: path, file: nf, v: v, shape: v.Shape(), nt: 1}
	if fld.ti >= 0 {
		ta, err := decodeTimeAxis(nf, cs[fld.ti].Var, spec.Overrides)
		switch {
		case err == nil:
			fld.Time = ta
			seg.times = ta.Dates
			seg.nt = len(ta.Dates)
		case spec.soft(err):
			// read on without dates, only to sample values
			seg.nt = v.Dims[fld.ti].Len
		default:
			return seg, err
		}
		if seg.nt == 0 {
			return seg, fmt.Errorf("%s: variable %s has no time steps", path, name)
		}
	} else if spec.Climatology {
		if err := fmt.Errorf("%s: the study declares a 12-month climatology but variable %s has no time axis", path, name); !spec.soft(err) {
			return seg, err
		}
	}
	return seg, nil
}

// setUnits sets the conversion from the variable's units (the study's,
// else its units attribute) to SI.
func (fld *Field) setUnits(v *netcdf.Var, spec Spec) error {
	path, name, kind := fld.paths[0], fld.Var, fld.Kind
	u := spec.Units
	uSrc := "study"
	if u == "" {
		u = textAttr(v, "units")
		uSrc = "units attribute"
		if _, err := v.Attr("units"); err != nil && kind != units.Fraction {
			if err := fmt.Errorf("%s: variable %s has no units attribute; set its units in the study (units.%s: %s, if that is what it is)", path, name, spec.Role, kind.SI()); !spec.soft(err) {
				return err
			}
			u = kind.SI() // only to sample values
		}
	}
	var err error
	fld.Conv, err = units.Parse(kind, u)
	if err != nil {
		err = fmt.Errorf("%s: variable %s (%s): %w; set units.%s in the study if the file is wrong", path, name, uSrc, err, spec.Role)
		if !spec.soft(err) {
			return err
		}
		fld.Conv, _ = units.Parse(kind, kind.SI()) // only to sample values
		fld.Conv.From = u
	}
	if !fld.Conv.Identity() {
		fld.Notes = append(fld.Notes, "units "+fld.Conv.String())
	}
	return nil
}

func scalarLevel(nf *netcdf.File, v *netcdf.Var) (float64, bool) {
	for _, name := range strings.Fields(textAttr(v, "coordinates")) {
		cv, err := nf.Var(name)
		if err != nil || len(cv.Dims) != 0 {
			continue
		}
		if ax, _ := axisOf(cv); ax != AxisZ {
			continue
		}
		c, err := units.Parse(units.Pressure, textAttr(cv, "units"))
		if err != nil {
			continue
		}
		x, err := cv.ReadAllFloat64()
		if err != nil || len(x) != 1 {
			continue
		}
		return c.Apply(x[0]), true
	}
	return 0, false
}
