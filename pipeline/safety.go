package pipeline

import (
	"fmt"
	"strings"

	"lidscope/accumulate"
	"lidscope/cf"
	"lidscope/regimes"
)

// checkUsable applies the usability checks of `lidscope inspect`
// (cf.Assess) to an opened input and refuses it with the same message,
// unless the plan accepts the check. An accepted check becomes a note (it
// goes into the provenance). The categorical-mask checks do not apply to a
// mask the study declares categorical: the study has said which values
// are ocean.
func checkUsable(p *Plan, f *field, isMask bool, notes *[]string) error {
	a, err := cf.Assess(f.f)
	if err != nil {
		return err
	}
	var refused []string
	var checks []string
	for _, pr := range a.Problems {
		if isMask && p.Ocean.Kind == OceanCategorical && (pr.Check == cf.CheckCategoricalMask || pr.Check == cf.CheckWholeNumbers) {
			continue
		}
		if p.Accept[pr.Check] {
			*notes = append(*notes, fmt.Sprintf("%s (%s): check %s accepted by the study (accept): %s", f.role, f.f.Var, pr.Check, pr.Text))
			continue
		}
		refused = append(refused, fmt.Sprintf("%s [check %s]", pr.Text, pr.Check))
		checks = append(checks, pr.Check)
	}
	if len(refused) == 0 {
		return nil
	}
	units := fmt.Sprintf("units attribute %q", f.f.Conv.From)
	if f.studyUnits {
		units = fmt.Sprintf("units %q from the study, units.%s", f.f.Conv.From, f.role)
	}
	return &UnusableError{Role: f.role, Var: f.f.Var, Paths: f.f.Paths(), Units: units, Checks: checks,
		Text: strings.Join(refused, "; ")}
}

// UnusableError is an input that `lidscope inspect` calls NOT USABLE; the
// run stops before computing anything.
type UnusableError struct {
	Role   cf.Role
	Var    string
	Paths  []string
	Units  string   // where the units come from, e.g. `units attribute "K"`
	Checks []string // the failed checks, by name
	Text   string
}

func (e *UnusableError) Error() string {
	where := ""
	if len(e.Paths) > 0 {
		where = cf.QuotePath(e.Paths[0])
	}
	if e.Units != "" {
		where += " (" + e.Units + ")"
	}
	switch n := len(e.Paths) - 1; {
	case n == 1:
		where += " and 1 more file of its record"
	case n > 1:
		where += fmt.Sprintf(" and %d more files of its record", n)
	}
	return fmt.Sprintf("role %s, variable %s in %s is NOT USABLE (as lidscope inspect reports): %s; fix the input, or, if the values are right, accept the check for this dataset in the study (accept: [%s])",
		e.Role, e.Var, where, e.Text, strings.Join(e.Checks, ", "))
}

// runBytes estimates (from below) what a run allocates on the analysis
// grid of n cells: the two step buffers of every field, each field's
// native slab and read buffers, the per-column work arrays, and the
// per-column accumulator of nq quantities.
func runBytes(all []*field, n int, nq int) int64 {
	cells := int64(n)
	var b int64
	for _, f := range all {
		nat := int64(f.f.Len())
		b += nat * (4 + 8 + 8) // native slab and the two read buffers
		if f.w != nil {
			b += cells * 4
		}
		b += 2 * cells * 4 // step buffers
	}
	// every cell counted as an analysed column: the mask is not read yet
	perCell := int64(4*4+1+1+4+8) + int64(accumulate.BytesPerColumn(nq, 3))
	return b + cells*perCell
}

// checkRunBudget refuses a run whose analysis grid would not fit in the
// memory budget, before the large allocations.
func checkRunBudget(p *Plan, all []*field, nlat, nlon, nq int) error {
	budget := p.MemoryBudget
	if budget <= 0 {
		budget = cf.DefaultMemoryBudget()
	}
	need := runBytes(all, nlat*nlon, nq)
	if need <= budget {
		return nil
	}
	return fmt.Errorf("the analysis grid of %d×%d (lat×lon) cells with %d inputs needs at least %s, more than the memory budget of %s; choose a coarser analysis grid (analysis.grid.target, e.g. 2deg), or, if the machine has the memory, raise the budget (--memory-budget, or limits.memory_budget in the study): %w",
		nlat, nlon, len(all), cf.FormatBytes(need), cf.FormatBytes(budget), cf.ErrOverBudget)
}

// checkOceanValues refuses a run in which a quantity has no value over any
// ocean column of the band in any time step (a cloud field present only
// over land, an LTS that every column rejected): each of its regime means
// would be empty, null in summary.json, and a null must never stand for a
// bad input. The study may accept it (cf.CheckNoOceanValues).
func checkOceanValues(p *Plan, acc *accumulate.Acc, bandW []float64, steps int, notes *[]string) error {
	for q, name := range acc.L.Quantities {
		var n int64
		for _, r := range regimes.All {
			for i, w := range bandW {
				if w > 0 {
					n += acc.Moments(q, r, i).N
				}
			}
		}
		if n > 0 {
			continue
		}
		what := fmt.Sprintf("no %s value over any ocean column of the band %g…%g°N in any of the %d time steps", name, p.Regimes.Band.South, p.Regimes.Band.North, steps)
		if p.Accept[cf.CheckNoOceanValues] {
			*notes = append(*notes, fmt.Sprintf("check %s accepted by the study (accept): %s", cf.CheckNoOceanValues, what))
			continue
		}
		return fmt.Errorf("%s: every regime mean of %s would be empty (null in summary.json); check that input's missing values and the ocean mask (ocean.mask, ocean.min_ocean_fraction), or, if that is right, accept the check for this dataset in the study (accept: [%s])",
			what, name, cf.CheckNoOceanValues)
	}
	return nil
}
