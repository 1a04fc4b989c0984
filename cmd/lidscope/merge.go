package main

import (
	"fmt"
	"io"
	"os"

	"lidscope/analysis"
)

// mergeOptions are the options of `lidscope merge`.
type mergeOptions struct {
	Runs  []string
	Out   string
	Force bool
}

func cmdMerge(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("merge", stderr)
	var o mergeOptions
	fs.StringVar(&o.Out, "out", "", "folder for the merged results (required)")
	fs.BoolVar(&o.Force, "force", false, "replace existing results in --out")
	fs.Usage = func() {
		fmt.Fprintln(stderr, "usage: lidscope merge --out DIR RUN_DIR RUN_DIR...\n\nJoins finished runs of one dataset over consecutive pieces of its record (split by time\nrange or by file set) into the results one run over the whole record gives.")
		fs.PrintDefaults()
	}
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	o.Runs = fs.Args()
	if o.Out == "" {
		return usageErr("--out is required")
	}
	if len(o.Runs) < 2 {
		return usageErr("give at least two run folders")
	}
	return runMerge(o, stdout)
}

func runMerge(o mergeOptions, stdout io.Writer) error {
	rep, err := analysis.Merge(o.Runs, o.Out, analysis.Options{Version: version, Command: os.Args, Force: o.Force})
	if err != nil {
		return err
	}
	fmt.Fprintf(stdout, "dataset %s: merged %d runs (%s, %d time steps) into %s\n", rep.Dataset, len(o.Runs), rep.Meta.Period, len(rep.Meta.TimeValues), rep.OutDir)
	return nil
}
