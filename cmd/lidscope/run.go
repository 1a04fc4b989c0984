package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"strings"
	"sync"

	"github.com/spf13/cobra"

	"lidscope/analysis"
	"lidscope/config"
	"lidscope/internal/fanout"
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
	Progress     bool // draw progress bars (terminal only)
	Profile      profileOptions
	// MemoryBudget, when set, overrides the study's limits.memory_budget.
	MemoryBudget byteSize
	// Piece is --piece: "K/N", "/N" (K from a Slurm job array) or "".
	Piece string
	// Jobs is how many processes run the pieces of each dataset (0 or 1:
	// this process alone).
	Jobs int
	// ProgressLines prints machine-readable progress lines on stdout
	// (for the parent of run --jobs).
	ProgressLines bool
	// ClimatologyOut runs stage 1 of anomaly mode only (the climatology
	// of the piece, written to this file); Climatology is the file of the
	// merged climatology that stage 2 takes its anomalies against.
	ClimatologyOut, Climatology string
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
  lidscope run obs/study.yaml --set analysis.threshold=1.0 --out out/obs-delta1.0 --quiet --no-plots
  lidscope run obs/study.yaml --jobs 2 --out out/obs-2jobs --no-plots
  lidscope run obs/study.yaml --piece 1/2 --out out/obs-piece1 --no-plots`,
		Args:              exactArgs(1, "give exactly one study file"),
		ValidArgsFunction: fileArgs(studyExts...),
		RunE: func(cmd *cobra.Command, args []string) error {
			o.Study = args[0]
			o.Datasets = datasets
			o.Progress = isTerminal(e.stderr) && !o.Log.Quiet && !o.ProgressLines
			if !cmd.Flags().Changed("jobs") {
				o.Jobs = fanout.CPUs()
			}
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
	fs.StringVar(&o.Piece, "piece", "", "run only piece `K/N`: the K-th of N contiguous pieces of each dataset's selected record (or /N: K from the Slurm job array); merge the N run folders afterwards")
	fs.IntVar(&o.Jobs, "jobs", 0, "`N` processes running pieces of each dataset at once, merged at the end (default: the CPUs available: SLURM_CPUS_PER_TASK, else the affinity mask)")
	fs.BoolVar(&o.ProgressLines, "progress-lines", false, "print progress as machine-readable lines on stdout (used by --jobs)")
	_ = fs.MarkHidden("progress-lines")
	fs.StringVar(&o.ClimatologyOut, "climatology-out", "", "anomaly mode, stage 1: write the climatology of the record (or piece) to FILE and stop (used by --jobs)")
	fs.StringVar(&o.Climatology, "climatology", "", "anomaly mode, stage 2: take the anomalies against the climatology in FILE (used by --jobs)")
	_ = fs.MarkHidden("climatology-out")
	_ = fs.MarkHidden("climatology")
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
	piece, err := resolvePiece(o.Piece, os.Getenv)
	if err != nil {
		return err
	}
	workers := o.Workers
	if workers == 0 {
		workers = slurmCPUs() // 0 outside Slurm: one per CPU
	}
	opt := analysis.Options{Version: version, Command: os.Args, OutDir: o.Out, Force: o.Force, NoPlots: o.NoPlots, NoCoastlines: o.NoCoastlines, Workers: workers, Log: log,
		Piece: piece, Batch: batchInfo(os.Getenv)}
	if o.Climatology != "" {
		if opt.Climatology, err = analysis.ReadClimatology(o.Climatology); err != nil {
			return err
		}
	}
	jobs := o.Jobs
	if jobs < 1 || !piece.Whole() {
		jobs = 1
	}
	var bars *progressBars
	switch {
	case o.ProgressLines:
		var mu sync.Mutex
		opt.Progress = func(_ string, done, total int) {
			mu.Lock()
			fmt.Fprint(stdout, fanout.ProgressLine(done, total))
			mu.Unlock()
		}
	case o.Progress:
		bars = newProgressBars(stderr)
		opt.Progress = bars.set
	}
	stopBars := func() {
		if bars != nil {
			bars.stop()
			bars = nil
		}
	}
	defer stopBars()
	if o.ClimatologyOut != "" {
		return runClimatologyStage(ctx, o, r, opt)
	}
	if jobs > 1 {
		err := runJobs(ctx, o, r, opt, jobs, bars, log, stdout, stderr)
		stopBars()
		return err
	}
	reps, err := analysis.Run(ctx, r, o.Datasets, opt)
	stopBars()
	if err != nil {
		return err
	}
	for _, rep := range reps {
		if rep.Skipped != "" {
			fmt.Fprintln(stdout, rep.Skipped)
			continue
		}
		writeRunSummary(stdout, rep)
	}
	return nil
}

func writeRunSummary(w io.Writer, rep analysis.Report) {
	steps, grid, notes := len(rep.Meta.TimeValues), rep.Meta.Grid.String(), rep.Meta.Notes
	if res := rep.Result; res != nil {
		steps, grid, notes = len(res.Labels), res.Grid.String(), res.Notes
	}
	fmt.Fprintf(w, "dataset %s: %d time steps (%s) on %s\n", rep.Dataset, steps, rep.Meta.Period, grid)
	fmt.Fprintf(w, "  regimes: %s\n", rep.Meta.Regimes)
	if len(rep.Meta.Absent) > 0 {
		// a run without an optional input says what it has and lacks
		if res := rep.Result; res != nil {
			fmt.Fprintf(w, "  quantities: %s\n", strings.Join(res.Acc.L.Quantities, ", "))
		}
		for _, a := range rep.Meta.Absent {
			fmt.Fprintf(w, "  without: %s\n", a)
		}
	}
	for _, n := range notes {
		fmt.Fprintf(w, "  note: %s\n", n)
	}
	fmt.Fprintf(w, "  results in %s\n", rep.OutDir)
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
