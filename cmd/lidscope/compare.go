package main

import (
	"context"
	"fmt"
	"io"
	"lidscope/vocab"
	"os"

	"github.com/spf13/cobra"

	"lidscope/analysis"
	"lidscope/compare"
	"lidscope/config"
)

func init() { addCommand(newCompareCmd) }

// compareOptions are the options of `lidscope compare`.
type compareOptions struct {
	Args          []string // a study, or run folders (reference first)
	Reference     string   // study mode: the reference dataset (default: the first)
	Out           string
	Force         bool
	AllowMismatch bool
	NoPlots       bool
	NoCoastlines  bool // leave Earth\'s coastlines off the maps (synthetic worlds)
	Set           setFlags
	Log           logOptions
}

func newCompareCmd(e *env) *cobra.Command {
	o := compareOptions{Set: setFlags{}}
	cmd := &cobra.Command{
		Use:   "compare (REFERENCE_RUN CANDIDATE_RUN... | STUDY) --out DIR",
		Short: "set models side by side with observations",
		Long: `Sets candidates (models) side by side with a reference (observations): map statistics of
convective frequency and crossings per year, tropical-mean SST, convective area fraction and
regime-mean EIS, LTS and cloud; subsidence-regime cloud sensitivities to EIS and LTS and the
partial sensitivities with 95 % intervals and whether each difference lies within the combined
uncertainty; flip fractions and thresholds when both runs have them.

Give finished run folders (the reference first), or one study: then every dataset is run
first into DIR/NAME and the first dataset (or --reference NAME) is the reference.

Given constraint folders (lidscope constrain) of several models by the same observations, it
sets them side by side instead: each factor's observed and modelled sensitivity and each
model's constrained, predicted and actual change, in one table and one figure.`,
		Example: `  lidscope compare demo-out/results/synthetic-demo demo-out/results/synthetic-model --out out/comparison --no-plots`,
		Args:    minArgs(1, "give a study, or a reference run folder and at least one candidate run folder"),
		RunE: func(cmd *cobra.Command, args []string) error {
			o.Args = args
			if o.Out == "" {
				return usageErr("give the folder for the comparison with --out DIR")
			}
			ctx, stop := e.interruptible(cmd.Context())
			defer stop()
			return runCompare(ctx, o, e.stdout, e.stderr)
		},
	}
	fs := cmd.Flags()
	addOutDir(fs, &o.Out, "", "folder for the comparison (required)")
	textVar(fs, &o.Reference, "reference", "", "NAME", "with a study: the reference dataset (default: the first)")
	addForce(fs, &o.Force, "replace existing results")
	fs.BoolVar(&o.AllowMismatch, "allow-mismatch", false, "compare runs made with different studies, periods or regime definitions (every mismatch is listed)")
	addNoPlots(fs, &o.NoPlots, "do not draw the comparison figures")
	fs.BoolVar(&o.NoCoastlines, "no-coastlines", false, "leave Earth's coastlines off the maps (for synthetic worlds such as the demo's)")
	addSet(fs, o.Set, "with a study: override a study key, KEY=VALUE (repeatable)")
	o.Log.register(fs)
	return cmd
}

func runCompare(ctx context.Context, o compareOptions, stdout, stderr io.Writer) error {
	log, err := o.Log.logger(stderr)
	if err != nil {
		return err
	}
	opt := analysis.CompareOptions{Options: analysis.Options{Version: version, Command: os.Args, Force: o.Force, Log: log, NoPlots: o.NoPlots, NoCoastlines: o.NoCoastlines}, AllowMismatch: o.AllowMismatch}
	if allConstraints(o.Args) {
		c, files, err := analysis.CompareConstraints(ctx, o.Args, o.Out, opt.Options)
		if err != nil {
			return err
		}
		writeConstraintComparison(stdout, c)
		for _, f := range files {
			fmt.Fprintf(stdout, "wrote %s\n", f)
		}
		return nil
	}
	var res *compare.Result
	var files []string
	if fi, err := os.Stat(o.Args[0]); err == nil && !fi.IsDir() && len(o.Args) == 1 {
		r, err := config.Load(o.Args[0], config.LoadOptions{Flags: o.Set})
		if err != nil {
			return err
		}
		res, files, err = analysis.CompareStudy(ctx, r, o.Reference, o.Out, opt)
		if err != nil {
			return err
		}
	} else {
		if len(o.Args) < 2 {
			return usageErr("give a reference run folder and at least one candidate run folder")
		}
		res, files, err = analysis.CompareDirs(o.Args[0], o.Args[1:], o.Out, opt)
		if err != nil {
			return err
		}
	}
	writeComparison(stdout, res)
	for _, f := range files {
		fmt.Fprintf(stdout, "wrote %s\n", f)
	}
	return nil
}

func writeComparison(w io.Writer, res *compare.Result) {
	if len(res.Mismatches) > 0 {
		fmt.Fprintf(w, "%s: the runs were made differently (compared anyway, --allow-mismatch):\n", vocab.Mismatch)
		for _, m := range res.Mismatches {
			fmt.Fprintf(w, "  %s\n", m)
		}
	}
	fmt.Fprintf(w, "reference: %s (%s)\n", res.Reference.Name, res.Reference.Meta.Period)
	fmt.Fprintf(w, "%-34s %12s", "", res.Reference.Name)
	for _, c := range res.Candidates {
		fmt.Fprintf(w, " %12s", c.Name)
	}
	fmt.Fprintln(w)
	for _, s := range res.ReferenceScalars {
		fmt.Fprintf(w, "%-34s %12.5g", s.Name+" ["+s.Units+"]", s.Cand)
		for _, c := range res.Candidates {
			if cs, ok := c.Scalar(s.Name); ok {
				fmt.Fprintf(w, " %12.5g", cs.Cand)
			} else {
				fmt.Fprintf(w, " %12s", "—")
			}
		}
		fmt.Fprintln(w)
	}
	for _, c := range res.Candidates {
		for _, m := range c.Maps {
			fmt.Fprintf(w, "%s %s: pattern correlation %.3f, centred RMS difference %.3g %s, bias %+.3g %s (%d band cells)\n", c.Name, m.Name, m.Corr, m.CRMS, m.Units, m.Bias, m.Units, m.N)
		}
	}
	compare.WriteEstimates(w, res, "")
}
