package constraint

import (
	"fmt"
	"math"
	"strings"

	"lidscope/factors"
	"lidscope/vocab"
)

// ModelRow is one model of a Comparison: its sensitivities beside the
// observed ones and its constrained, predicted and actual changes of one
// domain and regime.
type ModelRow struct {
	Name, Dir string
	Warming   float64
	// ModelCoef and ModelCoefSE are per factor (Comparison.Factors).
	ModelCoef, ModelCoefSE         []float64
	Constrained, Predicted, Actual Estimate
}

// Comparison sets several models' constraints by one set of observations
// side by side, for one domain and regime.
type Comparison struct {
	Observations            RunInfo
	Response, ResponseUnits string
	Level                   float64
	Factors                 []factors.FactorInfo
	Domain, Regime          string
	// ObsCoef and ObsCoefSE are the observed sensitivities per factor.
	ObsCoef, ObsCoefSE []float64
	Models             []ModelRow
}

// CompareModels gathers the constraints of several models (results of
// Compute or Read, in the order given) by the same observations, for one
// domain and regime ("" and "": the tropical band's subsidence regime).
// It refuses constraints by different observations, factors or responses.
func CompareModels(results []*Result, dirs []string, domain, regime string) (*Comparison, error) {
	if len(results) == 0 {
		return nil, fmt.Errorf("constraint: give at least one constraint folder to compare")
	}
	if domain == "" && regime == "" {
		domain, regime = "tropical_band", "subsidence"
	}
	first := results[0]
	c := &Comparison{Observations: first.Observations, Response: first.Response, ResponseUnits: first.ResponseUnits, Level: first.Level,
		Factors: first.Factors, Domain: domain, Regime: regime}
	list := func(r *Result) string {
		var s []string
		for _, f := range r.Factors {
			s = append(s, f.Name+" ["+f.Units+"]")
		}
		return strings.Join(s, ", ")
	}
	for i, r := range results {
		dir := ""
		if i < len(dirs) {
			dir = dirs[i]
		}
		switch {
		case r.Observations.Dataset != first.Observations.Dataset || r.Observations.StudyHash != first.Observations.StudyHash:
			return nil, fmt.Errorf("constraint: %s constrains by %s (study %s), %s by %s (study %s): compare constraints by the same observations: %w",
				dirs[0], first.Observations.Dataset, first.Observations.StudyHash, dir, r.Observations.Dataset, r.Observations.StudyHash, ErrMismatch)
		case r.Level != first.Level:
			return nil, fmt.Errorf("constraint: %s has %g %% intervals, %s %g %%: compare constraints made at one level (--level): %w", dirs[0], 100*first.Level, dir, 100*r.Level, ErrMismatch)
		case list(r) != list(first) || r.Response != first.Response:
			return nil, fmt.Errorf("constraint: %s has factors %s for %s, %s has %s for %s: %w", dirs[0], list(first), first.Response, dir, list(r), r.Response, ErrMismatch)
		}
		d, ok := r.Domain(domain, regime)
		if !ok {
			return nil, fmt.Errorf("constraint: %s has no constraint of %s/%s; choose a domain and regime every model has", dir, domain, regime)
		}
		if c.ObsCoef == nil {
			for _, f := range d.Factors {
				c.ObsCoef = append(c.ObsCoef, f.ObsCoef)
				c.ObsCoefSE = append(c.ObsCoefSE, f.ObsCoefSE)
			}
		}
		row := ModelRow{Name: r.Control.Dataset, Dir: dir, Warming: r.Warming, Constrained: d.Constrained, Predicted: d.Predicted, Actual: d.Actual}
		for _, f := range d.Factors {
			row.ModelCoef = append(row.ModelCoef, f.ModelCoef)
			row.ModelCoefSE = append(row.ModelCoefSE, f.ModelCoefSE)
		}
		c.Models = append(c.Models, row)
	}
	return c, nil
}

// ComparisonCSVFile is the table of a comparison of constraints.
const ComparisonCSVFile = "constraint_comparison.csv"

// ComparisonRows is the comparison as one long table: one row per model
// (the observations first) and number — each factor's sensitivity, then
// the constrained, predicted and actual changes — with its standard error,
// interval and units.
func ComparisonRows(c *Comparison) [][]string {
	z := NormalQuantile(c.Level)
	rows := [][]string{{"dataset", "role", "domain", "regime", "name", "value", vocab.StdErr, vocab.CILower, vocab.CIUpper, "units"}}
	add := func(ds, role, name string, v, se float64, lo, hi float64, u string) {
		rows = append(rows, []string{ds, role, c.Domain, c.Regime, name, ff(v), ff(se), ff(lo), ff(hi), u})
	}
	for i, f := range c.Factors {
		ku := vocab.SlopeUnits(c.ResponseUnits, f.Units)
		add(c.Observations.Dataset, "observations", f.Name+"_"+vocab.Coefficient, c.ObsCoef[i], c.ObsCoefSE[i], c.ObsCoef[i]-z*c.ObsCoefSE[i], c.ObsCoef[i]+z*c.ObsCoefSE[i], ku)
	}
	cu := changeUnits(c.ResponseUnits)
	for _, m := range c.Models {
		for i, f := range c.Factors {
			ku := vocab.SlopeUnits(c.ResponseUnits, f.Units)
			add(m.Name, "model", f.Name+"_"+vocab.Coefficient, m.ModelCoef[i], m.ModelCoefSE[i], m.ModelCoef[i]-z*m.ModelCoefSE[i], m.ModelCoef[i]+z*m.ModelCoefSE[i], ku)
		}
		for _, e := range []struct {
			name string
			e    Estimate
		}{{constrainedKey, m.Constrained}, {predictedKey, m.Predicted}, {actualKey, m.Actual}} {
			add(m.Name, "model", e.name, e.e.Value, e.e.SE, e.e.Lo, e.e.Hi, cu)
		}
		add(m.Name, "model", "warming", m.Warming, math.NaN(), math.NaN(), math.NaN(), "K")
	}
	return rows
}

// ComparisonCSV is ComparisonRows as CSV.
func ComparisonCSV(c *Comparison) ([]byte, error) { return csvBytes(ComparisonRows(c)) }
