package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"log/slog"
	"os"
	"os/signal"
	"strings"

	"lidscope/analysis"
	"lidscope/config"
)

// logOptions are the logging flags shared by run and demo.
type logOptions struct {
	Format  string // text | json
	Quiet   bool
	Verbose bool
}

func (l *logOptions) register(fs *flag.FlagSet) {
	fs.StringVar(&l.Format, "log-format", "text", "log format: text or json")
	fs.BoolVar(&l.Quiet, "quiet", false, "log errors only, and no progress display")
	fs.BoolVar(&l.Verbose, "verbose", false, "log details (every conversion and note)")
}

func (l logOptions) logger(w io.Writer) (*slog.Logger, error) {
	level := slog.LevelWarn
	switch {
	case l.Quiet:
		level = slog.LevelError
	case l.Verbose:
		level = slog.LevelInfo
	}
	ho := &slog.HandlerOptions{Level: level}
	switch l.Format {
	case "text":
		return slog.New(slog.NewTextHandler(w, ho)), nil
	case "json":
		return slog.New(slog.NewJSONHandler(w, ho)), nil
	}
	return nil, usageErr("--log-format must be text or json, not %q", l.Format)
}

// setFlags collects repeated --set key=value overrides.
type setFlags map[string]string

func (s setFlags) String() string { return fmt.Sprint(map[string]string(s)) }
func (s setFlags) Set(v string) error {
	k, val, ok := strings.Cut(v, "=")
	if !ok || strings.TrimSpace(k) == "" {
		return fmt.Errorf("--set wants KEY=VALUE (e.g. analysis.threshold=1.0), got %q", v)
	}
	s[strings.TrimSpace(k)] = val
	return nil
}

// runOptions are the options of `lidscope run`.
type runOptions struct {
	Study    string
	Datasets []string
	Out      string
	Force    bool
	NoPlots  bool
	Workers  int
	Set      setFlags
	Log      logOptions
	Progress bool // draw a progress line (terminal only)
}

func cmdRun(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("run", stderr)
	o := runOptions{Set: setFlags{}}
	var dataset string
	fs.StringVar(&dataset, "dataset", "", "run only this dataset (comma-separated names for several)")
	fs.StringVar(&o.Out, "out", "", "output folder (default: the study's output.dir/<dataset>)")
	fs.BoolVar(&o.Force, "force", false, "replace existing results")
	fs.BoolVar(&o.NoPlots, "no-plots", false, "do not draw figures")
	fs.IntVar(&o.Workers, "workers", 0, "worker goroutines for the column math (0: one per CPU)")
	fs.Var(o.Set, "set", "override a study key, KEY=VALUE (repeatable; wins over LIDSCOPE_* variables and the file)")
	o.Log.register(fs)
	fs.Usage = func() {
		fmt.Fprintln(stderr, "usage: lidscope run [options] STUDY\n\nRuns the regime analysis of every dataset of STUDY (or --dataset NAME) in one\nstreaming pass and writes maps, series, tables, summary.json and provenance.json.")
		fs.PrintDefaults()
	}
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() != 1 {
		return usageErr("give exactly one study file")
	}
	o.Study = fs.Arg(0)
	if dataset != "" {
		o.Datasets = strings.Split(dataset, ",")
	}
	o.Progress = isTerminal(stderr) && !o.Log.Quiet
	return runRun(o, stdout, stderr)
}

func runRun(o runOptions, stdout, stderr io.Writer) error {
	log, err := o.Log.logger(stderr)
	if err != nil {
		return err
	}
	r, err := config.Load(o.Study, config.LoadOptions{Flags: o.Set})
	if err != nil {
		return err
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	opt := analysis.Options{Version: version, Command: os.Args, OutDir: o.Out, Force: o.Force, NoPlots: o.NoPlots, Workers: o.Workers, Log: log}
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
	fmt.Fprintf(w, "  regimes: %s\n", rep.Meta.RegimeDefinition)
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
