package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"os"

	"github.com/spf13/cobra"

	"lidscope/analysis"
	"lidscope/constraint"
)

func init() { addCommand(newConstrainCmd) }

// constrainOptions are the options of `lidscope constrain`.
type constrainOptions struct {
	Observations, Control, Warm string // run folders
	Warming                     string // "4.1K" or a temperature quantity ("sst")
	Level                       float64
	Out                         string
	Force                       bool
	NoPlots                     bool
	Log                         logOptions
}

func newConstrainCmd(e *env) *cobra.Command {
	o := constrainOptions{}
	cmd := &cobra.Command{
		Use:   "constrain OBSERVED_RUN CONTROL_RUN WARM_RUN --warming 4.1K|QUANTITY --out DIR",
		Short: "constrain a model's cloud change under warming by observed sensitivities",
		Long: `Combines the cloud-controlling-factor sensitivities of an observational run with a model's
factor changes between its control and warmer runs (the same study, with a factors block):
for every domain and regime of the factor analysis, and per cell where the runs have maps,
the constrained change per kelvin of global warming, dC/dT = sum over factors of the observed
sensitivity (dC/dx)_obs times the model's factor change per kelvin (dx/dT)_model, with
its interval (the sensitivities' covariance and the factor changes' sampling error), each
factor's contribution, the model's own change and the change its own sensitivities predict.

The warming is a number with units (--warming 4.1K) or a temperature quantity of the runs
(--warming sst: the change of its cell-area-weighted global mean). The result is a run folder
of its own: constraint.json, constraint.csv, constraint_changes.csv, constraint.nc,
provenance.json and figures.`,
		Example: `  lidscope constrain demo-out/results/synthetic-demo demo-out/results/synthetic-model demo-out/results/synthetic-model-warm --warming sst --out out/constraint --no-plots
  lidscope constrain demo-out/results/synthetic-demo demo-out/results/synthetic-model demo-out/results/synthetic-model-warm --warming 4.0K --level 0.9 --out out/constraint-90`,
		Args: exactArgs(3, "give the observational run folder, the model's control run folder and its warm run folder"),
		RunE: func(cmd *cobra.Command, args []string) error {
			o.Observations, o.Control, o.Warm = args[0], args[1], args[2]
			if o.Out == "" {
				return usageErr("give the folder for the constraint with --out DIR")
			}
			ctx, stop := e.interruptible(cmd.Context())
			defer stop()
			return runConstrain(ctx, o, e.stdout, e.stderr)
		},
	}
	fs := cmd.Flags()
	addOutDir(fs, &o.Out, "", "run folder for the constraint (required)")
	textVar(fs, &o.Warming, "warming", "", "K|QUANTITY", "global-mean surface warming of the warm run over the control run, with units (4.1K), or a temperature quantity of the runs to compute it from (sst) (required)")
	fs.Float64Var(&o.Level, "level", 0, "interval `LEVEL`, e.g. 0.9 (default: the level of the observations' factor analysis)")
	addForce(fs, &o.Force, "replace an existing constraint folder")
	addNoPlots(fs, &o.NoPlots, "do not draw the constraint figures")
	o.Log.register(fs)
	return cmd
}

func runConstrain(ctx context.Context, o constrainOptions, stdout, stderr io.Writer) error {
	if o.Warming == "" {
		return usageErr("give the global-mean surface warming with --warming (e.g. --warming 4.1K, or --warming sst to compute it from the runs' SST)")
	}
	co, err := constraint.ParseWarming(o.Warming)
	if err != nil {
		return usageErr("--warming: %v", err)
	}
	if o.Level != 0 && !(o.Level > 0 && o.Level < 1) {
		return usageErr("--level %g: give a level between 0 and 1, e.g. 0.9", o.Level)
	}
	co.Level = o.Level
	log, err := o.Log.logger(stderr)
	if err != nil {
		return err
	}
	opt := analysis.ConstrainOptions{Options: analysis.Options{Version: version, Command: os.Args, Force: o.Force, Log: log, NoPlots: o.NoPlots},
		Constraint: co}
	res, files, err := analysis.Constrain(ctx, o.Observations, o.Control, o.Warm, o.Out, opt)
	if err != nil {
		return err
	}
	writeConstraint(stdout, res)
	for _, f := range files {
		fmt.Fprintf(stdout, "wrote %s\n", f)
	}
	return nil
}

// writeConstraint prints the constraint's headline numbers.
func writeConstraint(w io.Writer, res *constraint.Result) {
	cu := "K-1"
	scale, su := 1.0, ""
	if res.ResponseUnits == "1" || res.ResponseUnits == "" {
		scale, su = 100, "% "
	}
	fmt.Fprintf(w, "%s (control %s, warm %s) constrained by %s\n", res.Control.Dataset, res.Control.Dataset, res.Warm.Dataset, res.Observations.Dataset)
	fmt.Fprintf(w, "  warming ΔT = %.4g K (%s)\n", res.Warming, res.WarmingSource)
	fmt.Fprintf(w, "  change of %s per K of warming [%s%s], %g %% intervals:\n", res.Response, su, cu, 100*res.Level)
	fmt.Fprintf(w, "  %-36s %26s %26s %26s\n", "domain, regime", "constrained", "predicted (own sens.)", "actual")
	iv := func(e constraint.Estimate) string {
		if math.IsNaN(e.Value) {
			return "—"
		}
		return fmt.Sprintf("%+.3g [%+.3g, %+.3g]", scale*e.Value, scale*e.Lo, scale*e.Hi)
	}
	for _, d := range res.Domains {
		fmt.Fprintf(w, "  %-36s %26s %26s %26s\n", d.Domain+", "+d.Regime, iv(d.Constrained), iv(d.Predicted), iv(d.Actual))
	}
	if i := analysis.Headline(res); i < len(res.Domains) {
		d := res.Domains[i]
		fmt.Fprintf(w, "  contributions to the constrained change, %s %s [%s%s]:\n", d.Domain, d.Regime, su, cu)
		for _, f := range d.Factors {
			fmt.Fprintf(w, "    %-12s %+.3g ± %.2g (observed sensitivity %.3g %s per %s, model change %.3g %s per K)\n",
				f.Factor, scale*f.Contribution, scale*f.ContributionSE, f.ObsCoef, res.ResponseUnits, f.Units, f.PerKelvin, f.Units)
		}
	}
	for _, n := range res.Notes {
		fmt.Fprintf(w, "  note: %s\n", n)
	}
}

// allConstraints reports whether every argument is a constraint folder.
func allConstraints(args []string) bool {
	for _, a := range args {
		if !analysis.IsConstraintFolder(a) {
			return false
		}
	}
	return len(args) > 0
}

// writeConstraintComparison prints a comparison of constraints.
func writeConstraintComparison(w io.Writer, c *constraint.Comparison) {
	scale, su := 1.0, ""
	if c.ResponseUnits == "1" || c.ResponseUnits == "" {
		scale, su = 100, "% "
	}
	fmt.Fprintf(w, "models constrained by %s, %s %s (%g %% intervals)\n", c.Observations.Dataset, c.Domain, c.Regime, 100*c.Level)
	fmt.Fprintf(w, "  %-24s", "sensitivity")
	fmt.Fprintf(w, " %14s", c.Observations.Dataset)
	for _, m := range c.Models {
		fmt.Fprintf(w, " %14s", m.Name)
	}
	fmt.Fprintln(w)
	for i, f := range c.Factors {
		fmt.Fprintf(w, "  %-24s %14.4g", f.Name+" ["+c.ResponseUnits+" per "+f.Units+"]", c.ObsCoef[i])
		for _, m := range c.Models {
			fmt.Fprintf(w, " %14.4g", m.ModelCoef[i])
		}
		fmt.Fprintln(w)
	}
	for _, m := range c.Models {
		fmt.Fprintf(w, "  %s: constrained %+.3g [%+.3g, %+.3g], actual %+.3g %sK-1 (ΔT %.3g K)\n", m.Name,
			scale*m.Constrained.Value, scale*m.Constrained.Lo, scale*m.Constrained.Hi, scale*m.Actual.Value, su, m.Warming)
	}
}
