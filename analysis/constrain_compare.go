package analysis

import (
	"context"
	"os"
	"path/filepath"

	"lidscope/constraint"
	"lidscope/figures"
	"lidscope/runfolder"
)

// IsConstraintFolder reports whether dir holds a constraint (lidscope
// constrain), so that compare sets constraints side by side.
func IsConstraintFolder(dir string) bool {
	_, err := os.Stat(filepath.Join(dir, constraint.JSONFile))
	return err == nil
}

// CompareConstraints sets several models' constraints by the same
// observations side by side (constraint.CompareModels, the tropical band's
// subsidence regime) and writes the table and, unless NoPlots, the figure
// into the run folder out, all at once or not at all.
func CompareConstraints(ctx context.Context, dirs []string, out string, opt Options) (*constraint.Comparison, []string, error) {
	var results []*constraint.Result
	for _, d := range dirs {
		f, err := runfolder.Open(d, constraint.JSONFile)
		if err != nil {
			return nil, nil, err
		}
		r, err := constraint.Read(d)
		f.Close()
		if err != nil {
			return nil, nil, err
		}
		results = append(results, r)
	}
	c, err := constraint.CompareModels(results, dirs, "", "")
	if err != nil {
		return nil, nil, err
	}
	st, err := runfolder.Create(out, runfolder.Options{Replace: opt.Force, Known: []string{constraint.ComparisonCSVFile, figures.DefaultDirName},
		Estimate: 4 << 20, Version: opt.Version})
	if err != nil {
		return nil, nil, err
	}
	defer st.Close()
	b, err := constraint.ComparisonCSV(c)
	if err == nil {
		err = st.WriteFile(constraint.ComparisonCSVFile, b)
	}
	if err != nil {
		return nil, nil, err
	}
	files := []string{st.FinalPath(constraint.ComparisonCSVFile)}
	if !opt.NoPlots {
		paths, err := figures.DrawConstraint(st.Path(figures.DefaultDirName), ComparisonFigures(c, opt.Version), figures.Options{})
		if err != nil {
			return nil, nil, err
		}
		for _, p := range paths {
			files = append(files, st.FinalPath(figures.DefaultDirName+"/"+filepath.Base(p)))
		}
	}
	if _, err := st.Commit(ctx); err != nil {
		return nil, nil, err
	}
	return c, files, nil
}

// ComparisonFigures turns a comparison of constraints into what
// figures.DrawConstraint draws (its Models form).
func ComparisonFigures(c *constraint.Comparison, version string) figures.ConstraintFigures {
	z := constraint.NormalQuantile(c.Level)
	iv := func(e constraint.Estimate) figures.Interval {
		return figures.Interval{Value: e.Value, Lo: e.Lo, Hi: e.Hi}
	}
	ci := func(v, se float64) figures.Interval { return figures.Interval{Value: v, Lo: v - z*se, Hi: v + z*se} }
	cf := figures.ConstraintFigures{
		Dataset: "models constrained by " + c.Observations.Dataset,
		Period:  "each model's own warming ΔT (its control and warm runs)",
		Regimes: "as in the runs' factor analyses; domain " + figures.ConstraintLabel(c.Domain, c.Regime),
		Version: version, StudyHash: c.Observations.StudyHash, Response: c.Response, ResponseUnits: c.ResponseUnits,
		Level: c.Level, Observations: c.Observations.Dataset,
	}
	for i, f := range c.Factors {
		cf.Factors = append(cf.Factors, f.Name)
		cf.FactorUnits = append(cf.FactorUnits, f.Units)
		cf.ObsCoef = append(cf.ObsCoef, ci(c.ObsCoef[i], c.ObsCoefSE[i]))
	}
	for _, m := range c.Models {
		cf.Models = append(cf.Models, m.Name)
		var mc []figures.Interval
		for i := range c.Factors {
			mc = append(mc, ci(m.ModelCoef[i], m.ModelCoefSE[i]))
		}
		cf.ModelCoef = append(cf.ModelCoef, mc)
		cf.Domains = append(cf.Domains, figures.ConstraintDomain{Label: figures.ConstraintLabel(c.Domain, c.Regime),
			Constrained: iv(m.Constrained), Predicted: iv(m.Predicted), Actual: iv(m.Actual)})
	}
	return cf
}
