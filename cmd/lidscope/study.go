package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"lidscope/cf"
	"lidscope/config"
)

// studyInitOptions are the options of `lidscope study init`.
type studyInitOptions struct {
	Files []string
	Out   string // "" prints to stdout
	Force bool
}

// studyCheckOptions are the options of `lidscope study check`.
type studyCheckOptions struct {
	Study string
	Set   map[string]string
}

const studyUsage = `usage: lidscope study init [--out study.yaml] [--force] FILE...
       lidscope study check [--set KEY=VALUE]... STUDY

init   inspects the NetCDF files and writes a commented starter study: each
       role with its files and variable, suggested overrides for what inspect
       flagged, and every default written out. Without --out it is printed.
check  loads a study, reports every problem (file:line: key: message), and
       prints the fully resolved study and its SHA-256.`

func cmdStudy(args []string, stdout, stderr io.Writer) error {
	if len(args) == 0 {
		fmt.Fprintln(stderr, studyUsage)
		return usageErr("give a subcommand: init or check")
	}
	switch args[0] {
	case "init":
		return cmdStudyInit(args[1:], stdout, stderr)
	case "check":
		return cmdStudyCheck(args[1:], stdout, stderr)
	case "-h", "--help", "help":
		fmt.Fprintln(stderr, studyUsage)
		return flag.ErrHelp
	}
	fmt.Fprintln(stderr, studyUsage)
	return usageErr("unknown subcommand %q (use init or check)", args[0])
}

// parseInterspersed parses flags that may come before, between or after
// the positional arguments, and returns the positional arguments.
func parseInterspersed(fs *flag.FlagSet, args []string) ([]string, error) {
	var pos []string
	for {
		if err := parseFlags(fs, args); err != nil {
			return nil, err
		}
		rest := fs.Args()
		if len(rest) == 0 {
			return pos, nil
		}
		if rest[0] == "--" {
			return append(pos, rest[1:]...), nil
		}
		pos = append(pos, rest[0])
		args = rest[1:]
	}
}

func cmdStudyInit(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("study init", stderr)
	var o studyInitOptions
	fs.StringVar(&o.Out, "out", "", "write the study to this file (.yaml) instead of printing it")
	fs.BoolVar(&o.Force, "force", false, "overwrite the --out file if it exists")
	fs.Usage = func() {
		fmt.Fprintln(stderr, studyUsage)
		fs.PrintDefaults()
	}
	files, err := parseInterspersed(fs, args)
	if err != nil {
		return err
	}
	o.Files = files
	if len(o.Files) == 0 {
		return usageErr("give at least one NetCDF file")
	}
	if o.Out != "" {
		switch strings.ToLower(filepath.Ext(o.Out)) {
		case ".yaml", ".yml":
		default:
			return usageErr("--out %s: the starter study is YAML; name the file .yaml", o.Out)
		}
	}
	return runStudyInit(o, stdout, stderr)
}

// runStudyInit inspects the files and prints or writes the starter.
func runStudyInit(o studyInitOptions, stdout, stderr io.Writer) error {
	reports := make([]*cf.FileReport, len(o.Files))
	paths := make([]string, len(o.Files))
	for i, f := range o.Files {
		reports[i] = cf.Inspect(f)
		paths[i] = f
		if o.Out != "" {
			paths[i] = relativeTo(filepath.Dir(o.Out), f)
		}
	}
	text := config.Starter(reports, paths)
	if o.Out == "" {
		_, err := io.WriteString(stdout, text)
		return err
	}
	flags := os.O_WRONLY | os.O_CREATE | os.O_EXCL
	if o.Force {
		flags = os.O_WRONLY | os.O_CREATE | os.O_TRUNC
	}
	f, err := os.OpenFile(o.Out, flags, 0o644)
	if errors.Is(err, os.ErrExist) {
		return fmt.Errorf("%s exists; lidscope does not overwrite it without --force", o.Out)
	}
	if err != nil {
		return fmt.Errorf("writing the study: %w", err)
	}
	if _, err := io.WriteString(f, text); err != nil {
		f.Close()
		return fmt.Errorf("writing the study %s: %w", o.Out, err)
	}
	if err := f.Close(); err != nil {
		return fmt.Errorf("writing the study %s: %w", o.Out, err)
	}
	fmt.Fprintf(stdout, "wrote %s\n", o.Out)
	if _, err := config.Load(o.Out, config.LoadOptions{LookupEnv: config.NoEnvironment}); err != nil {
		fmt.Fprintf(stderr, "note: the starter does not load yet; edit it where marked MISSING or CHECK:\n%v\n", err)
	} else {
		fmt.Fprintf(stdout, "it loads; review the lines marked CHECK (lidscope study check %s)\n", o.Out)
	}
	return nil
}

// relativeTo writes path relative to dir when it can, else absolute.
func relativeTo(dir, path string) string {
	ad, err1 := filepath.Abs(dir)
	ap, err2 := filepath.Abs(path)
	if err1 != nil || err2 != nil {
		return path
	}
	if r, err := filepath.Rel(ad, ap); err == nil {
		return r
	}
	return ap
}

func cmdStudyCheck(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("study check", stderr)
	o := studyCheckOptions{Set: map[string]string{}}
	fs.Func("set", "override a study key, KEY=VALUE (e.g. analysis.threshold=1.0); repeatable", func(s string) error {
		k, v, ok := strings.Cut(s, "=")
		if !ok || strings.TrimSpace(k) == "" {
			return fmt.Errorf("%q is not KEY=VALUE (e.g. analysis.threshold=1.0)", s)
		}
		o.Set[strings.TrimSpace(k)] = v
		return nil
	})
	fs.Usage = func() {
		fmt.Fprintln(stderr, studyUsage)
		fs.PrintDefaults()
	}
	pos, err := parseInterspersed(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usageErr("give exactly one study file")
	}
	o.Study = pos[0]
	return runStudyCheck(o, stdout)
}

// runStudyCheck loads the study (with the process environment) and
// prints its resolved text and hash.
func runStudyCheck(o studyCheckOptions, w io.Writer) error {
	r, err := config.Load(o.Study, config.LoadOptions{Flags: o.Set})
	if err != nil {
		return err
	}
	for _, ov := range r.Overrides {
		fmt.Fprintf(w, "# %s = %s (%s)\n", ov.Key, ov.Value, ov.Origin)
	}
	fmt.Fprintf(w, "# sha256 %s\n", r.Hash())
	_, err = io.WriteString(w, r.Resolved())
	return err
}
