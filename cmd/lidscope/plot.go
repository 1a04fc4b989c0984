package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"lidscope/analysis"
	"lidscope/compare"
	"lidscope/constraint"
	"lidscope/figures"
	"lidscope/runfolder"
)

func init() { addCommand(newPlotCmd) }

// plotOptions are the options of `lidscope plot`.
type plotOptions struct {
	RunDir   string
	Format   string
	Only     []string
	Out      string
	Force    bool
	DPI      float64
	Palettes map[string]string
	List     bool
	// NoCoastlines leaves Earth's coastlines off the maps (synthetic worlds).
	NoCoastlines bool
}

// paletteFlag collects repeated KIND=MAP colour-map choices.
type paletteFlag map[string]string

func (p paletteFlag) String() string { return "" }
func (p paletteFlag) Type() string   { return "KIND=MAP" }
func (p paletteFlag) Set(v string) error {
	k, m, ok := strings.Cut(v, "=")
	if !ok || strings.TrimSpace(k) == "" || strings.TrimSpace(m) == "" {
		return fmt.Errorf("--palette wants KIND=MAP (e.g. eis=fulcrum)")
	}
	p[strings.TrimSpace(k)] = strings.TrimSpace(m)
	return nil
}

func newPlotCmd(e *env) *cobra.Command {
	o := plotOptions{Palettes: map[string]string{}}
	var only listFlag
	cmd := &cobra.Command{
		Use:   "plot (RUN_DIR | COMPARISON_DIR)",
		Short: "draw the figures of a finished run or comparison",
		Long: `Draws the figures of a finished run from its output files (maps.nc, series.nc,
summary.json, and the relationship files when present), without recomputing, into
the folder --out (default RUN_DIR/` + figures.DefaultDirName + `). Figures whose inputs the run
lacks are skipped unless named with --only.

Given a comparison folder (lidscope compare --out), draws the comparison's figures again from
its comparison.json: the sensitivity and ensemble figures from the comparison alone, the map
figures from the compared runs' folders (which must still be there; --only NAME,... draws
only some).

Given a constraint folder (lidscope constrain --out), draws its two figures again from its
constraint.json.`,
		Example: `  lidscope plot --list
  lidscope plot demo-out/results/synthetic-demo --no-coastlines --out figures
  lidscope plot demo-out/results/synthetic-demo --no-coastlines --format svg --only map_eis,series --out figures-svg
  lidscope plot demo-out/results/comparison --no-coastlines --out comparison-figures
  lidscope plot demo-out/results/constraint --format svg --out constraint-figures`,
		ValidArgsFunction: dirArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			o.Only = only
			if o.List {
				return listFigures(e.stdout)
			}
			if err := exactArgs(1, "give exactly one run directory")(cmd, args); err != nil {
				return err
			}
			o.RunDir = args[0]
			if !plotContains(figures.Formats, strings.ToLower(o.Format)) {
				return usageErr("--format must be one of %s, not %q", strings.Join(figures.Formats, ", "), o.Format)
			}
			if isComparison(o.RunDir) {
				return runPlotComparison(o, e.stdout) // its own figure names
			}
			if analysis.IsConstraintFolder(o.RunDir) {
				return runPlotConstraint(o, e.stdout)
			}
			for _, n := range o.Only {
				if !plotContains(figures.Names(), n) {
					return usageErr("--only: no figure %q; the figures are %s", n, strings.Join(figures.Names(), ", "))
				}
			}
			return runPlot(o, e.stdout)
		},
	}
	fs := cmd.Flags()
	textVar(fs, &o.Format, "format", "png", strings.Join(figures.Formats, "|"), "figure format: "+strings.Join(figures.Formats, ", "))
	fs.Var(&only, "only", "draw only the named figure (repeat the flag or separate names with commas; see --list)")
	addOutDir(fs, &o.Out, "", "folder for the figures (default RUN_DIR/"+figures.DefaultDirName+")")
	addForce(fs, &o.Force, "replace figures that exist already")
	fs.Float64Var(&o.DPI, "dpi", 200, "resolution of PNG figures, `DPI` (dots per inch)")
	fs.Var(paletteFlag(o.Palettes), "palette", "colour map for a kind of quantity, KIND=MAP (repeatable; kinds: "+
		strings.Join(figures.PaletteKeys(), ", ")+"; maps: "+strings.Join(figures.PaletteNames(), ", ")+", each also NAME-reversed)")
	fs.BoolVar(&o.NoCoastlines, "no-coastlines", false, "leave Earth's coastlines off the maps (for synthetic worlds such as the demo's)")
	fs.BoolVar(&o.List, "list", false, "list the figures and what they show, then exit")
	_ = cmd.RegisterFlagCompletionFunc("only", func(*cobra.Command, []string, string) ([]cobra.Completion, cobra.ShellCompDirective) {
		return figures.Names(), cobra.ShellCompDirectiveNoFileComp
	})
	return cmd
}

func listFigures(w io.Writer) error {
	names := figures.Names()
	for _, n := range names {
		d, _ := figures.Describe(n)
		if _, err := fmt.Fprintf(w, "%-26s %s\n", n, d); err != nil {
			return err
		}
	}
	fmt.Fprintln(w, "\nof a comparison folder (plot COMPARISON_DIR):")
	for _, c := range figures.ComparisonFigures {
		if _, err := fmt.Fprintf(w, "%-32s %s\n", c[0], c[1]); err != nil {
			return err
		}
	}
	return nil
}

// runPlot draws the figures and prints the paths written.
func runPlot(o plotOptions, w io.Writer) error {
	paths, err := figures.Draw(o.RunDir, figures.Options{
		Format: o.Format, Only: o.Only, OutDir: o.Out, Force: o.Force, DPI: o.DPI, Palettes: o.Palettes,
		NoCoastlines: o.NoCoastlines,
	})
	for _, p := range paths {
		fmt.Fprintln(w, p)
	}
	if err != nil {
		return err
	}
	if len(paths) == 0 {
		return fmt.Errorf("no figure could be drawn from %s", o.RunDir)
	}
	return nil
}

// isComparison reports whether dir holds a comparison (comparison.json)
// rather than a run (whose manifest a comparison lacks).
func isComparison(dir string) bool {
	if _, err := os.Stat(filepath.Join(dir, compare.JSONFile)); err != nil {
		return false
	}
	_, err := os.Stat(filepath.Join(dir, runfolder.ManifestFile))
	return err != nil
}

// runPlotComparison draws a comparison's figures again from its folder.
func runPlotComparison(o plotOptions, w io.Writer) error {
	res, err := compare.Read(o.RunDir)
	if err != nil {
		return err
	}
	out := o.Out
	if out == "" {
		out = filepath.Join(o.RunDir, compare.FiguresDir)
	}
	paths, err := figures.DrawComparison(res, figures.CompareOptions{OutDir: out, Format: o.Format, DPI: o.DPI, Force: o.Force,
		Palettes: o.Palettes, NoCoastlines: o.NoCoastlines, Only: o.Only})
	for _, p := range paths {
		fmt.Fprintln(w, p)
	}
	if err != nil {
		return err
	}
	if len(paths) == 0 {
		return fmt.Errorf("no figure could be drawn from the comparison in %s", o.RunDir)
	}
	return nil
}

func plotContains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

// runPlotConstraint draws a constraint's figures again from its
// constraint.json.
func runPlotConstraint(o plotOptions, w io.Writer) error {
	res, err := constraint.Read(o.RunDir)
	if err != nil {
		return err
	}
	out := o.Out
	if out == "" {
		out = filepath.Join(o.RunDir, figures.DefaultDirName)
	}
	paths, err := figures.DrawConstraint(out, analysis.ConstraintFigures(res, version), figures.Options{Format: o.Format, DPI: o.DPI, Force: o.Force})
	for _, p := range paths {
		fmt.Fprintln(w, p)
	}
	return err
}
