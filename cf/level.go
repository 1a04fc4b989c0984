package cf

import (
	"errors"
	"fmt"
	"math"

	"lidscope/units"
)

// LevelPick says how a field is taken at one pressure level.
type LevelPick struct {
	Target float64 // Pa
	// Exact: the level exists (within 0.01 Pa) and is read as is (index Lower).
	Exact bool
	// Otherwise the value is interpolated linearly in ln p between levels
	// Lower and Upper (indices into the file's level axis) with weight W on
	// Upper: x = (1−W)·x[Lower] + W·x[Upper], W = ln(p/p_lower)/ln(p_upper/p_lower).
	Lower, Upper int
	W            float64
	PLower       float64 // Pa
	PUpper       float64 // Pa
}

// Describe says what was done, for logs and provenance.
func (l LevelPick) Describe() string {
	if l.Exact {
		return fmt.Sprintf("level %g hPa read directly", l.Target/100)
	}
	return fmt.Sprintf("%g hPa interpolated linearly in ln p between %g and %g hPa (weight %.4f on %g hPa)",
		l.Target/100, l.PLower/100, l.PUpper/100, l.W, l.PUpper/100)
}

// PickLevel chooses how to obtain pressure target (Pa) from the vertical
// coordinate values levels (in the file's units, either order).
func PickLevel(levels []float64, levelUnits string, target float64) (LevelPick, error) {
	conv, err := units.Parse(units.Pressure, levelUnits)
	if err != nil {
		return LevelPick{}, fmt.Errorf("vertical coordinate units: %w; lidscope needs a pressure axis (Pa, hPa or mbar) — set the level units in the study (coordinates.ROLE.level_units) if the file lacks them", err)
	}
	if len(levels) == 0 {
		return LevelPick{}, fmt.Errorf("the vertical coordinate has no levels")
	}
	p := make([]float64, len(levels))
	for i, x := range levels {
		p[i] = conv.Apply(x)
		if !(p[i] > 0) || math.IsInf(p[i], 0) {
			return LevelPick{}, fmt.Errorf("vertical coordinate value %g %s is not a positive pressure", x, levelUnits)
		}
	}
	pick := LevelPick{Target: target}
	for i, x := range p {
		if math.Abs(x-target) < 0.01 {
			pick.Exact, pick.Lower, pick.Upper, pick.PLower, pick.PUpper = true, i, i, x, x
			return pick, nil
		}
	}
	// nearest bracketing pair
	lo, hi := -1, -1
	for i, x := range p {
		if x < target && (lo < 0 || x > p[lo]) {
			lo = i
		}
		if x > target && (hi < 0 || x < p[hi]) {
			hi = i
		}
	}
	if lo < 0 || hi < 0 {
		mn, mx := p[0], p[0]
		for _, x := range p {
			mn, mx = math.Min(mn, x), math.Max(mx, x)
		}
		return LevelPick{}, levelNotInFile(levels, levelUnits, target, mn, mx)
	}
	pick.Lower, pick.Upper, pick.PLower, pick.PUpper = lo, hi, p[lo], p[hi]
	pick.W = math.Log(target/p[lo]) / math.Log(p[hi]/p[lo])
	return pick, nil
}

// ErrLevelNotInFile is wrapped by the error of PickLevel when the levels
// do not reach the target pressure.
var ErrLevelNotInFile = errors.New("the level is not in the file")

// errLevelUnitsSuspect marks a level outside the levels that other level
// units would bring inside (the message names the study key).
var errLevelUnitsSuspect = errors.New("the level units look wrong")

// levelNotInFile explains a target outside the levels mn…mx (Pa). When
// the stored values read in other pressure units would bracket the target
// (e.g. hPa labelled Pa), the units attribute is the likely fault and the
// study's level_units can fix it; otherwise the level is simply not in the
// file and no setting in the study can help.
func levelNotInFile(levels []float64, levelUnits string, target, mn, mx float64) error {
	rmn, rmx := levels[0], levels[0]
	for _, x := range levels {
		rmn, rmx = math.Min(rmn, x), math.Max(rmx, x)
	}
	for _, alt := range []string{"Pa", "hPa"} {
		c, err := units.Parse(units.Pressure, alt)
		if err != nil || alt == levelUnits {
			continue
		}
		a, b := c.Apply(rmn), c.Apply(rmx)
		if cur, err := units.Parse(units.Pressure, levelUnits); err == nil && cur.Scale == c.Scale {
			continue
		}
		// read in the other units, the levels must be atmospheric
		// pressures (0.1…1100 hPa) and bracket the target
		if a >= 10 && b <= 110000 && a <= target+0.01 && b >= target-0.01 {
			return fmt.Errorf("%g hPa lies outside the file's levels (%g…%g hPa, reading the stored values %g…%g as %q): if the levels are in fact %s, set the level units in the study (coordinates.ROLE.level_units: %s): %w", target/100, mn/100, mx/100, rmn, rmx, levelUnits, alt, alt, errLevelUnitsSuspect)
		}
	}
	where := "at higher pressure than (below)"
	if mx < target {
		where = "at lower pressure than (above)"
	}
	return fmt.Errorf("%g hPa lies outside the file's levels (%g…%g hPa), which all lie %s %g hPa: %w, so no setting in the study can help (lidscope does not extrapolate, and the level units are not the fault); give a file whose levels include %g hPa", target/100, mn/100, mx/100, where, target/100, ErrLevelNotInFile, target/100)
}
