// Command lidscope computes lower-tropospheric stability (LTS), estimated
// inversion strength (EIS) and SST-regime diagnostics from CF-compliant NetCDF
// files. This file only dispatches: each subcommand parses its flags into an
// options struct and calls the library.
package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"sort"
)

// version is the lidscope version, written into every output's provenance.
// Release builds may set it with -ldflags "-X main.version=...".
var version = "0.1.0-dev"

// command is one subcommand: it parses args and writes to stdout/stderr.
type command struct {
	summary string
	run     func(args []string, stdout, stderr io.Writer) error
}

func commands() map[string]command {
	return map[string]command{
		"calc":    {"compute LTS, EIS and their ingredients for one column", cmdCalc},
		"run":     {"run the regime analysis of a study's datasets (run STUDY)", cmdRun},
		"compare": {"set models side by side with observations (compare --out DIR REF_RUN RUN... | STUDY)", cmdCompare},
		"merge":   {"join runs over consecutive pieces of a record (merge --out DIR RUN...)", cmdMerge},
		"demo":    {"generate the synthetic demo world, analyse it and check the result", cmdDemo},
		"inspect": {"report what lidscope recognises in NetCDF files, and every problem", cmdInspect},
		"plot":    {"draw the figures of a finished run (plot RUN_DIR)", cmdPlot},
		"study":   {"write a commented starter study from NetCDF files (study init FILE...)", cmdStudy},
		"version": {"print the lidscope version", func(_ []string, w, _ io.Writer) error {
			_, err := fmt.Fprintln(w, "lidscope", version)
			return err
		}},
	}
}

// errUsage marks a command-line mistake (exit status 2).
var errUsage = errors.New("usage")

// errFailed marks a run whose problems were already reported (exit status 1,
// nothing more to print).
var errFailed = errors.New("failed")

func main() {
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

// run executes the command line and returns the process exit status:
// 0 success, 1 a failure (reported on stderr), 2 a usage error.
func run(args []string, stdout, stderr io.Writer) int {
	cmds := commands()
	if len(args) == 0 || args[0] == "-h" || args[0] == "--help" || args[0] == "help" {
		usage(stderr, cmds)
		if len(args) == 0 {
			return 2
		}
		return 0
	}
	c, ok := cmds[args[0]]
	if !ok {
		fmt.Fprintf(stderr, "lidscope: unknown command %q\n\n", args[0])
		usage(stderr, cmds)
		return 2
	}
	err := c.run(args[1:], stdout, stderr)
	switch {
	case err == nil:
		return 0
	case errors.Is(err, flag.ErrHelp):
		return 0
	case errors.Is(err, errUsage):
		fmt.Fprintf(stderr, "lidscope %s: %v\n", args[0], err)
		return 2
	case errors.Is(err, errFailed):
		return 1
	}
	fmt.Fprintf(stderr, "lidscope %s: %v\n", args[0], err)
	return 1
}

func usage(w io.Writer, cmds map[string]command) {
	fmt.Fprintln(w, "usage: lidscope COMMAND [options] [arguments]")
	fmt.Fprintln(w, "\ncommands:")
	names := make([]string, 0, len(cmds))
	for n := range cmds {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		fmt.Fprintf(w, "  %-10s %s\n", n, cmds[n].summary)
	}
	fmt.Fprintln(w, "\nRun 'lidscope COMMAND -h' for a command's options.")
}

// newFlags returns a flag set that reports errors to stderr and returns
// them (never exits).
func newFlags(name string, stderr io.Writer) *flag.FlagSet {
	fs := flag.NewFlagSet("lidscope "+name, flag.ContinueOnError)
	fs.SetOutput(stderr)
	return fs
}

// usageErr wraps a command-line mistake so run exits with status 2.
func usageErr(format string, a ...any) error {
	return fmt.Errorf("%w: %s", errUsage, fmt.Sprintf(format, a...))
}

// parseFlags parses args, turning a flag mistake into a usage error.
func parseFlags(fs *flag.FlagSet, args []string) error {
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return err
		}
		return fmt.Errorf("%w: %v", errUsage, err)
	}
	return nil
}
