package analysis

import (
	"context"
	"fmt"
	"math"

	"lidscope/constraint"
	"lidscope/figures"
	"lidscope/runfolder"
)

// ConstrainOptions control Constrain.
type ConstrainOptions struct {
	Options
	// Constraint gives the warming (constraint.ParseWarming reads it from
	// the command line) and the interval level.
	Constraint constraint.Options
}

// Constrain computes the observational constraint of the model runs
// control and warm by the observational run obs (all three run folders
// with a factor analysis) and writes it, with its figures unless NoPlots,
// into the run folder out, all at once or not at all (package runfolder).
// It returns the result and the files written.
func Constrain(ctx context.Context, obs, control, warm, out string, opt ConstrainOptions) (*constraint.Result, []string, error) {
	var runs [3]*constraint.Run
	for i, d := range []string{obs, control, warm} {
		var err error
		if runs[i], err = constraint.Load(d); err != nil {
			return nil, nil, err
		}
	}
	res, err := constraint.Compute(runs[0], runs[1], runs[2], opt.Constraint)
	if err != nil {
		return nil, nil, err
	}
	known := append(constraint.OutputNames(), figures.DefaultDirName)
	st, err := runfolder.Create(out, runfolder.Options{Replace: opt.Force, Known: known, Estimate: 8 << 20, Version: opt.Version})
	if err != nil {
		return nil, nil, err
	}
	defer st.Close()
	if err := constraint.Stage(st, res, constraint.Meta{Version: opt.Version, Command: opt.Command}); err != nil {
		return nil, nil, err
	}
	var files []string
	for _, n := range constraint.OutputNames() {
		if n == constraint.MapsFile && res.Cells == nil {
			continue
		}
		files = append(files, st.FinalPath(n))
	}
	if !opt.NoPlots {
		paths, err := figures.DrawConstraint(st.Path(figures.DefaultDirName), ConstraintFigures(res, opt.Version), figures.Options{})
		if err != nil {
			return nil, nil, err
		}
		for _, p := range paths {
			files = append(files, st.FinalPath(figures.DefaultDirName+"/"+baseName(p)))
		}
	}
	if _, err := st.Commit(ctx); err != nil {
		return nil, nil, err
	}
	return res, files, nil
}

func baseName(p string) string {
	for i := len(p) - 1; i >= 0; i-- {
		if p[i] == '/' {
			return p[i+1:]
		}
	}
	return p
}

// Headline returns the index of the domain a constraint is summarised
// by: the tropical band's subsidence regime when it has a constrained
// change, else the first domain that has one.
func Headline(res *constraint.Result) int {
	first := -1
	for i, d := range res.Domains {
		if math.IsNaN(d.Constrained.Value) {
			continue
		}
		if d.Domain == "tropical_band" && d.Regime == "subsidence" {
			return i
		}
		if first < 0 {
			first = i
		}
	}
	return max(first, 0)
}

// ConstraintFigures turns a constraint into what figures.DrawConstraint
// draws.
func ConstraintFigures(res *constraint.Result, version string) figures.ConstraintFigures {
	iv := func(e constraint.Estimate) figures.Interval {
		return figures.Interval{Value: e.Value, Lo: e.Lo, Hi: e.Hi}
	}
	z := constraintZ(res.Level)
	cf := figures.ConstraintFigures{
		Dataset: fmt.Sprintf("%s (control %s, warm %s) constrained by %s", modelName(res), res.Control.Dataset, res.Warm.Dataset, res.Observations.Dataset),
		Period:  fmt.Sprintf("ΔT = %.4g K (%s)", res.Warming, res.WarmingSource),
		Regimes: "as in the runs' factor analyses (one study for the model's control and warm runs); domains: the tropical band and the study's regions",
		Version: version, StudyHash: res.Control.StudyHash, Response: res.Response, ResponseUnits: res.ResponseUnits,
		Level: res.Level, Warming: res.Warming, Headline: Headline(res)}
	for _, f := range res.Factors {
		cf.Factors = append(cf.Factors, f.Name)
	}
	for _, d := range res.Domains {
		cd := figures.ConstraintDomain{Label: figures.ConstraintLabel(d.Domain, d.Regime),
			Constrained: iv(d.Constrained), Predicted: iv(d.Predicted), Actual: iv(d.Actual)}
		for _, f := range d.Factors {
			cd.Contrib = append(cd.Contrib, figures.Interval{Value: f.Contribution, Lo: f.Contribution - z*f.ContributionSE, Hi: f.Contribution + z*f.ContributionSE})
			cd.ModelContrib = append(cd.ModelContrib, figures.Interval{Value: f.ModelContribution,
				Lo: f.ModelContribution - z*f.ModelContributionSE, Hi: f.ModelContribution + z*f.ModelContributionSE})
		}
		cf.Domains = append(cf.Domains, cd)
	}
	return cf
}

// constraintZ is the normal quantile of the intervals of a constraint
// (from a domain whose interval is known, else 1.96 for 95 %).
func constraintZ(level float64) float64 {
	return constraint.NormalQuantile(level)
}

func modelName(res *constraint.Result) string {
	if res.Control.Dataset != "" {
		return res.Control.Dataset
	}
	return "the model"
}
