package cf

import (
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
		return LevelPick{}, fmt.Errorf("%g hPa lies outside the file's levels (%g…%g hPa): lidscope does not extrapolate; supply data that include it", target/100, mn/100, mx/100)
	}
	pick.Lower, pick.Upper, pick.PLower, pick.PUpper = lo, hi, p[lo], p[hi]
	pick.W = math.Log(target/p[lo]) / math.Log(p[hi]/p[lo])
	return pick, nil
}
