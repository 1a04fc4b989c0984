package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/spf13/cobra"

	"lidscope/analysis"
	"lidscope/config"
)

func init() { addCommand(newRunCmd) }

// runOptions are the options of `lidscope run`.
type runOptions struct {
	Study        string
	Datasets     []string
	Out          string
	Force        bool
	NoPlots      bool
	NoCoastlines bool // leave Earth\'s coastlines off the maps (synthetic worlds)
	Workers      int
	Set          setFlags
	Log          logOptions
	Progress     bool // draw a progress line (terminal only)
	Profile      profileOptions
	// MemoryBudget, when set, overrides the study's limits.memory_budget.
	MemoryBudget byteSize
}

func newRunCmd(e *env) *cobra.Command {
	o := runOptions{Set: setFlags{}}
	var datasets listFlag
	cmd := &cobra.Command{
		Use:   "run STUDY",
		Short: "run the regime analysis of a study's datasets",
		Long: `Runs the regime analysis of every dataset of STUDY (or --dataset NAME) in one
streaming pass and writes maps, series, tables, summary.json and provenance.json
into the folder --out (default: the study's output.dir/DATASET).`,
		Example: `  lidscope run obs/study.yaml --out out/obs
  lidscope run obs/study.yaml --set analysis.threshold=1.0 --out out/obs-delta1.0 --quiet --no-plots`,
		Args:              exactArgs(1, "give exactly one study file"),
		ValidArgsFunction: fileArgs(studyExts...),
		RunE: func(cmd *cobra.Command, args []string) error {
			o.Study = args[0]
			o.Datasets = datasets
			o.Progress = isTerminal(e.stderr) && !o.Log.Quiet
			ctx, stop := e.interruptible(cmd.Context())
			defer stop()
			return runRun(ctx, o, e.stdout, e.stderr)
		},
	}
	fs := cmd.Flags()
	fs.Var(&datasets, "dataset", "run only this dataset (repeat, or separate names with commas)")
	addOutDir(fs, &o.Out, "", "folder for the results (default: the study's output.dir/DATASET)")
	addForce(fs, &o.Force, "replace existing results")
	addNoPlots(fs, &o.NoPlots, "do not draw figures")
	fs.BoolVar(&o.NoCoastlines, "no-coastlines", false, "leave Earth's coastlines off the maps (for synthetic worlds such as the demo's)")
	addWorkers(fs, &o.Workers)
	addSet(fs, o.Set, "override a study key, KEY=VALUE (repeatable; wins over LIDSCOPE_* variables and the file)")
	addMemoryBudget(fs, &o.MemoryBudget)
	o.Log.register(fs)
	o.Profile.register(fs)
	return cmd
}

func runRun(ctx context.Context, o runOptions, stdout, stderr io.Writer) (err error) {
	log, err := o.Log.logger(stderr)
	if err != nil {
		return err
	}
	stopProfile, err := o.Profile.start()
	if err != nil {
		return err
	}
	defer func() {
		if perr := stopProfile(); err == nil {
			err = perr
		}
	}()
	if o.MemoryBudget > 0 {
		o.Set["limits.memory_budget"] = fmt.Sprint(int64(o.MemoryBudget))
	}
	r, err := config.Load(o.Study, config.LoadOptions{Flags: o.Set})
	if err != nil {
		return err
	}
	opt := analysis.Options{Version: version, Command: os.Args, OutDir: o.Out, Force: o.Force, NoPlots: o.NoPlots, NoCoastlines: o.NoCoastlines, Workers: o.Workers, Log: log}
	if o.Progress {
		opt.Progress = progressLine(stderr)
	}
	reps, err := analysis.Run(ctx, r, o.Datasets, opt)
	if o.Progress {
		fmt.Fprint(stderr, "\r\033[K")
	}
	if err != nil {
		return err
	}
	for _, rep := range reps {
		writeRunSummary(stdout, rep)
	}
	return nil
}

func writeRunSummary(w io.Writer, rep analysis.Report) {
	res := rep.Result
	fmt.Fprintf(w, "dataset %s: %d time steps (%s) on %s\n", rep.Dataset, len(res.Labels), rep.Meta.Period, res.Grid)
	fmt.Fprintf(w, "  regimes: %s\n", rep.Meta.Regimes)
	if len(rep.Meta.Absent) > 0 {
		// a run without an optional input says what it has and lacks
		fmt.Fprintf(w, "  quantities: %s\n", strings.Join(res.Acc.L.Quantities, ", "))
		for _, a := range rep.Meta.Absent {
			fmt.Fprintf(w, "  without: %s\n", a)
		}
	}
	for _, n := range res.Notes {
		fmt.Fprintf(w, "  note: %s\n", n)
	}
	fmt.Fprintf(w, "  results in %s\n", rep.OutDir)
}

// progressLine returns a progress callback that redraws one line.
func progressLine(w io.Writer) func(string, int, int) {
	return func(ds string, done, total int) {
		const width = 30
		k := done * width / max(total, 1)
		fmt.Fprintf(w, "\r\033[K%s [%s%s] %d/%d steps", ds, strings.Repeat("#", k), strings.Repeat(".", width-k), done, total)
	}
}

// isTerminal reports whether w is a character device (a terminal).
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	fi, err := f.Stat()
	return err == nil && fi.Mode()&os.ModeCharDevice != 0
}
