package main

import (
	"context"
	"fmt"
	"io"
	"os"

	"github.com/spf13/cobra"

	"lidscope/analysis"
)

func init() { addCommand(newDemoCmd) }

// demoOptions are the options of `lidscope demo`.
type demoOptions struct {
	Out      string
	Force    bool
	NoPlots  bool
	Workers  int
	Log      logOptions
	Progress bool
}

func newDemoCmd(e *env) *cobra.Command {
	var o demoOptions
	cmd := &cobra.Command{
		Use:   "demo",
		Short: "generate the synthetic demo world, analyse it and check the result",
		Long: `Writes a synthetic world of invented data (SST with a warm pool, a cold tongue and
upwelling decks; 700-hPa temperature; low cloud that follows EIS) as CF NetCDF files,
writes its study, runs the full analysis on it and checks the results against the
world's known truth. A second synthetic world, a "model", is run and compared with it.
Everything goes into the folder --out: data/, data-model/ and results/.`,
		Args: noArgs("demo takes no arguments; give the folder with --out DIR"),
		RunE: func(cmd *cobra.Command, args []string) error {
			o.Progress = isTerminal(e.stderr) && !o.Log.Quiet
			ctx, stop := e.interruptible(cmd.Context())
			defer stop()
			return runDemo(ctx, o, e.stdout, e.stderr)
		},
	}
	fs := cmd.Flags()
	addOutDir(fs, &o.Out, "lidscope-demo", "folder for the synthetic input files (data/) and the results (results/)")
	addForce(fs, &o.Force, "replace an earlier demo in the folder")
	addNoPlots(fs, &o.NoPlots, "do not draw figures")
	addWorkers(fs, &o.Workers)
	o.Log.register(fs)
	return cmd
}

func runDemo(ctx context.Context, o demoOptions, stdout, stderr io.Writer) error {
	log, err := o.Log.logger(stderr)
	if err != nil {
		return err
	}
	opt := analysis.DemoOptions{Options: analysis.Options{Version: version, Command: os.Args, Force: o.Force, NoPlots: o.NoPlots, Workers: o.Workers, Log: log}}
	var bars *progressBars
	if o.Progress {
		bars = newProgressBars(stderr)
		opt.Progress = bars.set
	}
	d, err := analysis.Demo(ctx, o.Out, opt)
	if bars != nil {
		bars.stop()
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
