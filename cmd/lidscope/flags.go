package main

import (
	"fmt"
	"io"
	"log/slog"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

// The flags several commands share, each declared by one function so that
// its name, short form and meaning are the same everywhere:
//
//	--out DIR, -o DIR      a folder the command writes into
//	--output FILE, -o FILE the one file a command writes (commands that write one file)
//	--force, -f            replace what an earlier run wrote
//	--set KEY=VALUE, -s    override a study key (repeatable)
//	--quiet, -q / --verbose, -v / --log-format   logging
//	--workers N, --no-plots

// addOutDir declares --out/-o, the folder a command writes into.
func addOutDir(fs *pflag.FlagSet, p *string, def, usage string) {
	textVarP(fs, p, "out", "o", def, "DIR", usage)
}

// addOutputFile declares --output/-o, the one file a command writes.
func addOutputFile(fs *pflag.FlagSet, p *string, usage string) {
	textVarP(fs, p, "output", "o", "", "FILE", usage)
}

// addForce declares --force/-f.
func addForce(fs *pflag.FlagSet, p *bool, usage string) {
	fs.BoolVarP(p, "force", "f", false, usage)
}

// addSet declares the repeatable --set/-s KEY=VALUE into s.
func addSet(fs *pflag.FlagSet, s setFlags, usage string) {
	fs.VarP(s, "set", "s", usage)
}

// addWorkers declares --workers.
func addWorkers(fs *pflag.FlagSet, p *int) {
	fs.IntVar(p, "workers", 0, "`N` worker goroutines for the column math (0: one per CPU)")
}

// addNoPlots declares --no-plots.
func addNoPlots(fs *pflag.FlagSet, p *bool, usage string) {
	fs.BoolVar(p, "no-plots", false, usage)
}

// logOptions are the logging flags of the commands that log.
type logOptions struct {
	Format  string // text | json
	Quiet   bool
	Verbose bool
}

func (l *logOptions) register(fs *pflag.FlagSet) {
	textVar(fs, &l.Format, "log-format", "text", "text|json", "log format")
	fs.BoolVarP(&l.Quiet, "quiet", "q", false, "log errors only, and no progress display")
	fs.BoolVarP(&l.Verbose, "verbose", "v", false, "log details (every conversion and note)")
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

func (s setFlags) String() string { return "" }
func (s setFlags) Type() string   { return "KEY=VALUE" }
func (s setFlags) Set(v string) error {
	k, val, ok := strings.Cut(v, "=")
	if !ok || strings.TrimSpace(k) == "" {
		return fmt.Errorf("--set wants KEY=VALUE (e.g. analysis.threshold=1.0)")
	}
	s[strings.TrimSpace(k)] = val
	return nil
}

// listFlag collects repeated or comma-separated values.
type listFlag []string

func (l *listFlag) String() string { return strings.Join(*l, ",") }
func (l *listFlag) Type() string   { return "NAME[,NAME]" }
func (l *listFlag) Set(v string) error {
	for _, s := range strings.Split(v, ",") {
		if s = strings.TrimSpace(s); s != "" {
			*l = append(*l, s)
		}
	}
	return nil
}

// Positional-argument checks: each says what to give, as a usage error.

// exactArgs wants n arguments; msg says what they are.
func exactArgs(n int, msg string) cobra.PositionalArgs {
	return func(_ *cobra.Command, args []string) error {
		switch {
		case len(args) == n:
		case len(args) == 0:
			return usageErr("%s", msg)
		default:
			return usageErr("%s (got %d: %s)", msg, len(args), strings.Join(args, " "))
		}
		return nil
	}
}

// minArgs wants at least n arguments; msg says what they are.
func minArgs(n int, msg string) cobra.PositionalArgs {
	return func(_ *cobra.Command, args []string) error {
		if len(args) < n {
			return usageErr("%s", msg)
		}
		return nil
	}
}

// noArgs refuses arguments; msg says what to give instead.
func noArgs(msg string) cobra.PositionalArgs {
	return func(_ *cobra.Command, args []string) error {
		if len(args) > 0 {
			return usageErr("%s (got %q)", msg, args)
		}
		return nil
	}
}

// textValue is a string flag whose help shows a placeholder of what to
// give (DIR, FILE, TEMP, or the choices a|b|c) instead of "string".
type textValue struct {
	p           *string
	placeholder string
}

func (v *textValue) String() string     { return *v.p }
func (v *textValue) Set(s string) error { *v.p = s; return nil }
func (v *textValue) Type() string       { return v.placeholder }

// choices returns the values of a placeholder "a|b|c", or nil.
func (v *textValue) choices() []string {
	if !strings.Contains(v.placeholder, "|") {
		return nil
	}
	return strings.Split(v.placeholder, "|")
}

// textVarP declares a string flag shown as --name PLACEHOLDER; a
// placeholder "a|b|c" lists the values the flag takes (and completes).
func textVarP(fs *pflag.FlagSet, p *string, name, short, def, placeholder, usage string) {
	*p = def
	fs.VarP(&textValue{p, placeholder}, name, short, usage)
}

// textVar is textVarP without a short form.
func textVar(fs *pflag.FlagSet, p *string, name, def, placeholder, usage string) {
	textVarP(fs, p, name, "", def, placeholder, usage)
}

// completeChoices registers, for every flag of cmd and its subcommands
// whose placeholder lists choices, the completion of those choices.
func completeChoices(cmd *cobra.Command) {
	for _, c := range allCommands(cmd) {
		c.LocalNonPersistentFlags().VisitAll(func(f *pflag.Flag) {
			if v, ok := f.Value.(*textValue); ok && v.choices() != nil {
				ch := v.choices()
				_ = c.RegisterFlagCompletionFunc(f.Name, func(*cobra.Command, []string, string) ([]cobra.Completion, cobra.ShellCompDirective) {
					return ch, cobra.ShellCompDirectiveNoFileComp
				})
			}
		})
	}
}

// fileArgs completes positional arguments with files of these extensions
// (".nc", ".yaml", ...).
func fileArgs(exts ...string) cobra.CompletionFunc {
	trimmed := make([]string, len(exts))
	for i, e := range exts {
		trimmed[i] = strings.TrimPrefix(e, ".")
	}
	return func(*cobra.Command, []string, string) ([]cobra.Completion, cobra.ShellCompDirective) {
		return trimmed, cobra.ShellCompDirectiveFilterFileExt
	}
}

// dirArgs completes positional arguments with folders.
func dirArgs(*cobra.Command, []string, string) ([]cobra.Completion, cobra.ShellCompDirective) {
	return nil, cobra.ShellCompDirectiveFilterDirs
}

// netcdfExts are the usual file name extensions of NetCDF files.
var netcdfExts = []string{"nc", "nc4", "cdf", "netcdf"}

// studyExts are the file name extensions of a study.
var studyExts = []string{"yaml", "yml", "toml", "json"}
