package cf

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"

	"lidscope/units"
)

// The usability checks are shared by `lidscope inspect` (which calls a
// field NOT USABLE when one fails) and `lidscope run` (which stops with the
// same message), so that a run never computes with a field inspect would
// refuse. Each check has a name; a study that knows better names the check
// to accept its verdict for a dataset, and the run records that.

// Check names. They are study vocabulary (datasets' accept list): keep them
// stable.
const (
	CheckAllMissing       = "all_missing"       // every sampled value is missing
	CheckLooksKelvin      = "looks_kelvin"      // labelled Celsius, values look like kelvin
	CheckLooksCelsius     = "looks_celsius"     // labelled kelvin, values look like Celsius
	CheckTemperatureRange = "temperature_range" // outside 150…350 K
	CheckSSTZero          = "sst_zero"          // SST 0 (stored) everywhere
	CheckCategoricalMask  = "categorical_mask"  // a land/sea fraction of small whole numbers
	CheckWholeNumbers     = "whole_numbers"     // a fraction of small whole numbers (oktas?)
	CheckOktaNine         = "okta_nine"         // oktas holding 9 (sky obscured)
	CheckLooksPercent     = "looks_percent"     // labelled 1, values up to 100
	CheckFractionRange    = "fraction_range"    // a fraction outside 0…1
	CheckPercentBelowOne  = "percent_below_one" // labelled percent, no value above 1
	CheckPressureSmall    = "pressure_small"    // far too small for Pa
	CheckPressureLarge    = "pressure_large"    // above 1200 hPa
	CheckFluxRange        = "flux_range"        // outside 0…1500 W m-2
	CheckOmegaRange       = "omega_range"       // |omega| above 20 Pa s-1
	// CheckNoOceanValues is made by run only (inspect does not know the
	// ocean mask): a quantity without any value over the band's ocean.
	CheckNoOceanValues = "no_ocean_values"
)

// checkWhat describes each check, for messages and the documentation.
var checkWhat = map[string]string{
	CheckAllMissing:       "every sampled value of the field is missing",
	CheckLooksKelvin:      "a temperature labelled Celsius whose values look like kelvin",
	CheckLooksCelsius:     "a temperature labelled kelvin whose values look like Celsius",
	CheckTemperatureRange: "a temperature outside 150…350 K",
	CheckSSTZero:          "SST stored as 0 everywhere",
	CheckCategoricalMask:  "a land or sea fraction made of small whole numbers (a categorical mask)",
	CheckWholeNumbers:     "a fraction made of small whole numbers (oktas, category codes)",
	CheckOktaNine:         "cloud cover in oktas holding 9 (sky obscured, not a cover)",
	CheckLooksPercent:     "a fraction labelled 1 whose values reach 100 (percent)",
	CheckFractionRange:    "a fraction outside 0…1",
	CheckPercentBelowOne:  "a fraction labelled percent whose values never exceed 1",
	CheckPressureSmall:    "a pressure far too small for Pa (hPa?)",
	CheckPressureLarge:    "a pressure above 1200 hPa",
	CheckFluxRange:        "a flux outside 0…1500 W m-2",
	CheckOmegaRange:       "|omega| above 20 Pa s-1",
	CheckNoOceanValues:    "(run only) a quantity without any value over the ocean columns of the band, in every time step",
}

// CheckNames lists the names of the usability checks, sorted.
func CheckNames() []string {
	out := make([]string, 0, len(checkWhat))
	for k := range checkWhat {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// DescribeCheck says what a check refuses ("" for an unknown name).
func DescribeCheck(name string) string { return checkWhat[name] }

// Problem is one failed usability check of a field.
type Problem struct {
	Check string // one of the Check* names
	Text  string // what was found and what to do
}

func (p Problem) String() string { return p.Text }

// Assessment is the verdict of the usability checks on a field, from a
// sample of its time steps (the first, middle and last).
type Assessment struct {
	Min, Max     float64 // sampled SI values (valid only when Valid > 0)
	Valid, Total int     // sampled values present, and all sampled values
	Problems     []Problem
	Notes        []string
}

// Usable is true when no check failed.
func (a Assessment) Usable() bool { return len(a.Problems) == 0 }

// Assess reads the first, middle and last time steps of fld and applies
// the usability checks. It is what `inspect` reports and what `run`
// refuses to compute with. The field's NaN and Inf counts are left as they
// were, so a run counts every value once.
func Assess(fld *Field) (Assessment, error) {
	var a Assessment
	inf0, nan0 := fld.InfCount(), fld.NaNCount()
	defer func() {
		fld.infCount.Add(inf0 - fld.InfCount())
		fld.nanCount.Add(nan0 - fld.NaNCount())
	}()
	buf := make([]float32, fld.Len())
	lo, hi := math.Inf(1), math.Inf(-1)
	nt := fld.NT()
	var s Scratch
	for _, t := range uniq([]int{0, nt / 2, nt - 1}) {
		if err := fld.ReadSlab(t, buf, &s); err != nil {
			return a, err
		}
		for _, x := range buf {
			a.Total++
			if x == x {
				a.Valid++
				lo, hi = math.Min(lo, float64(x)), math.Max(hi, float64(x))
			}
		}
	}
	if a.Valid > 0 {
		a.Min, a.Max = lo, hi
	}
	if !slices.Contains(fld.Notes, notUnpacked) { // stored integers: no SI values to check
		a.Problems = ValueProblems(fld.Role, fld.Conv, lo, hi, a.Valid, a.Total)
	}
	if n := fld.InfCount() - inf0; n > 0 {
		a.Notes = append(a.Notes, fmt.Sprintf("%d infinite values in the sampled steps (treated as missing)", n))
	}
	return a, nil
}

// CheckValues is ValueProblems as text.
func CheckValues(r Role, conv units.Conversion, lo, hi float64, valid, total int) []string {
	var out []string
	for _, p := range ValueProblems(r, conv, lo, hi, valid, total) {
		out = append(out, p.Text)
	}
	return out
}

// ValueProblems compares the range of SI values of a role with what is
// physically possible and reports what looks like mislabelled units. It
// never converts anything: the study must confirm or override the units.
func ValueProblems(r Role, conv units.Conversion, lo, hi float64, valid, total int) []Problem {
	var out []Problem
	add := func(check, text string) { out = append(out, Problem{check, strings.TrimSpace(text)}) }
	if total > 0 && valid == 0 {
		add(CheckAllMissing, "every sampled value is missing (check _FillValue / missing_value and the variable)")
		return out
	}
	if valid == 0 {
		return nil
	}
	rawLo, rawHi := (lo-conv.Offset)/conv.Scale, (hi-conv.Offset)/conv.Scale
	rng := fmt.Sprintf("stored values %.4g…%.4g %q", rawLo, rawHi, conv.From)
	switch conv.Kind {
	case units.Temperature:
		temperatureProblems(add, r, conv, lo, hi, rawLo, rawHi, rng)
	case units.Fraction:
		fractionProblems(add, r, conv, lo, hi, rawHi, rng)
	case units.Pressure:
		if hi < 2000 && hi > 0 {
			add(CheckPressureSmall, rng+": far too small for Pa; if these are hPa set units."+string(r)+": hPa in the study")
		} else if hi > 120000 {
			add(CheckPressureLarge, rng+": above 1200 hPa; check the units")
		}
	case units.Flux:
		if hi > 1500 || lo < -1 {
			add(CheckFluxRange, rng+": outside 0…1500 W m-2; check the units")
		}
	case units.Omega:
		if math.Max(math.Abs(lo), math.Abs(hi)) > 20 {
			add(CheckOmegaRange, rng+": |omega| above 20 Pa s-1; check the units (hPa day-1?)")
		}
	}
	return out
}

// temperatureProblems adds the problems of a temperature's sampled range:
// kelvin labelled Celsius or the reverse, impossible values, an SST of 0.
func temperatureProblems(add func(check, text string), r Role, conv units.Conversion, lo, hi, rawLo, rawHi float64, rng string) {
	switch {
	case conv.Offset != 0 && rawLo > 150 && rawHi < 350:
		add(CheckLooksKelvin, rng+": these look like kelvin, not Celsius; if so set units."+string(r)+": K in the study")
	case conv.Offset == 0 && rawHi < 100 && rawLo > -100:
		add(CheckLooksCelsius, rng+": these look like degrees Celsius, not kelvin; if so set units."+string(r)+": degC in the study")
	case lo < 150 || hi > 350:
		add(CheckTemperatureRange, rng+": outside 150…350 K, impossible for "+string(r))
	}
	// (a tolerance: slabs are float32, so 0 °C comes back as 273.15f)
	if r == RoleSST && math.Abs(rawLo) < 1e-3 && math.Abs(rawHi) < 1e-3 {
		add(CheckSSTZero, rng+": SST is 0 everywhere in the sampled steps; suspicious (a land mask or fill?)")
	}
}

// fractionProblems adds the problems of a fraction's sampled range:
// categorical masks, oktas, tenths or percent not declared, okta 9, values
// outside 0…1.
func fractionProblems(add func(check, text string), r Role, conv units.Conversion, lo, hi, rawHi float64, rng string) {
	switch {
	case conv.Scale == 1 && hi > 1.05 && hi <= 10 && hi == math.Trunc(hi) && lo == math.Trunc(lo) && (r == RoleLandFraction || r == RoleSeaFraction):
		add(CheckCategoricalMask, rng+": small whole numbers, not a 0–1 fraction: probably a categorical mask; declare in the study which values are ocean")
	case conv.Scale == 1 && hi > 1.05 && hi <= 10 && hi == math.Trunc(hi) && lo == math.Trunc(lo):
		add(CheckWholeNumbers, rng+": small whole numbers, not a 0–1 fraction (oktas 0–8? tenths 0–10? category codes?); for cloud cover in oktas set units."+string(r)+": oktas (× 0.125), in tenths units."+string(r)+": tenths (× 0.1) in the study; otherwise convert them to a fraction first")
	case conv.Scale == 0.125 && hi > 1.0001 && hi <= 1.126:
		add(CheckOktaNine, rng+": okta 9 means sky obscured (WMO code table 2700, from memory), not a cover; declare it missing in the file (e.g. ncatted -a missing_value,VAR,o,f,9)")
	case conv.Scale == 1 && hi > 1.05 && hi <= 100.5:
		add(CheckLooksPercent, rng+": values up to 100 look like percent; if so set units."+string(r)+": % in the study")
	case hi > 1.05 || lo < -0.05:
		add(CheckFractionRange, rng+": a fraction must lie in 0…1")
	case conv.Scale == 0.01 && rawHi <= 1.0 && rawHi > 0:
		add(CheckPercentBelowOne, rng+": labelled percent but no value exceeds 1; if these are 0–1 fractions set units."+string(r)+": 1 in the study")
	}
}
