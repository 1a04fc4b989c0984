package main

import (
	"context"
	"fmt"
	"io"
	"os"

	"github.com/spf13/cobra"

	"lidscope/analysis"
)

func init() { addCommand(newMergeCmd) }

// mergeOptions are the options of `lidscope merge`.
type mergeOptions struct {
	Runs      []string
	Out       string
	Force     bool
	AllowGaps bool // merge pieces that leave gaps in the record
	// ClimatologyInto, when set, merges the climatologies of stage 1 of
	// anomaly mode (run --climatology-out files, in time order) into this
	// file instead of run folders (used by lidscope submit).
	ClimatologyInto string
}

func newMergeCmd(e *env) *cobra.Command {
	var o mergeOptions
	cmd := &cobra.Command{
		Use:   "merge RUN_DIR RUN_DIR... --out DIR",
		Short: "join runs over consecutive pieces of a record into the result of one run",
		Long: `Joins finished runs of one dataset over consecutive pieces of its record (split by
time range or by file set) into the results one run over the whole record gives,
written into the folder --out.`,
		Example: `  lidscope run obs/study.yaml --set 'datasets.*.time.end=2002-12' --out out/part1 --no-plots
  lidscope run obs/study.yaml --set 'datasets.*.time.start=2003-01' --out out/part2 --no-plots
  lidscope merge out/part1 out/part2 --out out/merged`,
		Args:              minArgs(2, "give at least two run folders"),
		ValidArgsFunction: dirArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			o.Runs = args
			if o.ClimatologyInto != "" {
				return runMergeClimatologies(o, e.stdout)
			}
			if o.Out == "" {
				return usageErr("give the folder for the merged results with --out DIR")
			}
			ctx, stop := e.interruptible(cmd.Context())
			defer stop()
			return runMerge(ctx, o, e.stdout)
		},
	}
	addOutDir(cmd.Flags(), &o.Out, "", "folder for the merged results (required)")
	addForce(cmd.Flags(), &o.Force, "replace existing results in --out")
	cmd.Flags().BoolVar(&o.AllowGaps, "allow-gaps", false, "merge pieces that leave gaps in the record (e.g. a missing year); the gaps are recorded in the provenance")
	cmd.Flags().StringVar(&o.ClimatologyInto, "climatologies-into", "", "anomaly mode in pieces: merge the climatology FILEs given (run --climatology-out, in time order) into this file (used by submit)")
	_ = cmd.Flags().MarkHidden("climatologies-into")
	return cmd
}

// runMergeClimatologies merges stage-1 climatologies into one file.
func runMergeClimatologies(o mergeOptions, stdout io.Writer) error {
	c, err := analysis.MergeClimatologies(o.Runs)
	if err != nil {
		return err
	}
	if err := analysis.WriteClimatology(o.ClimatologyInto, c); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "merged %d climatologies (%d time steps) into %s\n", len(o.Runs), c.Steps(), o.ClimatologyInto)
	return nil
}

func runMerge(ctx context.Context, o mergeOptions, stdout io.Writer) error {
	rep, err := analysis.MergeContext(ctx, o.Runs, o.Out, analysis.Options{Version: version, Command: os.Args, Force: o.Force, AllowGaps: o.AllowGaps, Batch: batchInfo(os.Getenv)})
	if err != nil {
		return err
	}
	fmt.Fprintf(stdout, "dataset %s: merged %d runs (%s, %d time steps) into %s\n", rep.Dataset, len(o.Runs), rep.Meta.Period, len(rep.Meta.TimeValues), rep.OutDir)
	return nil
}
