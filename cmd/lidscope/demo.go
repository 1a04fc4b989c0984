package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"os/signal"

	"lidscope/analysis"
)

// demoOptions are the options of `lidscope demo`.
type demoOptions struct {
	Out      string
	Force    bool
	NoPlots  bool
	Workers  int
	Log      logOptions
	Progress bool
}

func cmdDemo(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("demo", stderr)
	var o demoOptions
	fs.StringVar(&o.Out, "out", "lidscope-demo", "folder for the synthetic input files (data/) and the results (results/)")
	fs.BoolVar(&o.Force, "force", false, "replace an earlier demo in the folder")
	fs.BoolVar(&o.NoPlots, "no-plots", false, "do not draw figures")
	fs.IntVar(&o.Workers, "workers", 0, "worker goroutines for the column math (0: one per CPU)")
	o.Log.register(fs)
	fs.Usage = func() {
		fmt.Fprintln(stderr, "usage: lidscope demo [--out DIR] [--force]\n\nWrites a synthetic world of invented data (SST with a warm pool, a cold tongue and\nupwelling decks; 700-hPa temperature; low cloud that follows EIS) as CF NetCDF files,\nwrites its study, runs the full analysis on it and checks the results against the\nworld's known truth.")
		fs.PrintDefaults()
	}
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() != 0 {
		return usageErr("demo takes no arguments")
	}
	o.Progress = isTerminal(stderr) && !o.Log.Quiet
	return runDemo(o, stdout, stderr)
}

func runDemo(o demoOptions, stdout, stderr io.Writer) error {
	log, err := o.Log.logger(stderr)
	if err != nil {
		return err
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	opt := analysis.DemoOptions{Options: analysis.Options{Version: version, Command: os.Args, Force: o.Force, NoPlots: o.NoPlots, Workers: o.Workers, Log: log}}
	if o.Progress {
		opt.Progress = progressLine(stderr)
	}
	d, err := analysis.Demo(ctx, o.Out, opt)
	if o.Progress {
		fmt.Fprint(stderr, "\r\033[K")
	}
	if err != nil {
		return err
	}
	d.WriteSummary(stdout)
	for _, c := range d.Checks {
		if !c.OK() {
			return fmt.Errorf("the analysis did not recover the synthetic truth (%s); this is a bug, please report it", c.What)
		}
	}
	return nil
}
