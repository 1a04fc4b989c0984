package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/spf13/pflag"

	"lidscope/internal/figurestest"
)

// The command line follows the GNU conventions (common practice, GNU
// Coding Standards §4.8 "Standards for Command Line Interfaces"): --help
// on stdout with exit status 0, --version, long options before or after
// the arguments, and one wording for every unknown flag.
func TestCommandLineConventions(t *testing.T) {
	missing := filepath.Join(t.TempDir(), "missing")
	for _, c := range []struct {
		args       []string
		code       int
		out, errs  string // substrings of stdout and stderr ("" = anything)
		emptyOut   bool
		emptyError bool
	}{
		{args: []string{"--help"}, code: 0, out: "Available Commands:", emptyError: true},
		{args: []string{"-h"}, code: 0, out: "calc", emptyError: true},
		{args: []string{"help", "run"}, code: 0, out: "lidscope run STUDY", emptyError: true},
		{args: []string{"run", "--help"}, code: 0, out: "--set", emptyError: true},
		{args: []string{"study", "check", "-h"}, code: 0, out: "lidscope study check STUDY", emptyError: true},
		{args: []string{"--version"}, code: 0, out: "lidscope " + version + "\n", emptyError: true},
		{args: []string{"version"}, code: 0, out: "lidscope " + version + "\n", emptyError: true},
		{args: nil, code: 2, errs: "give a command", emptyOut: true},
		{args: []string{"frobnicate"}, code: 2, errs: `unknown command "frobnicate"`, emptyOut: true},
		{args: []string{"inpsect"}, code: 2, errs: `unknown command "inpsect" (did you mean "inspect"?)`, emptyOut: true},
		{args: []string{"study", "inti", "x.nc"}, code: 2, errs: `unknown subcommand "inti" (did you mean "init"?)`, emptyOut: true},
		// one wording for unknown flags, long or short, in every command
		{args: []string{"run", "--bogus", "s.yaml"}, code: 2, errs: "lidscope run: unknown flag --bogus\n", emptyOut: true},
		{args: []string{"inspect", "f.nc", "-x"}, code: 2, errs: "lidscope inspect: unknown flag -x\n", emptyOut: true},
		{args: []string{"run", "-qx", "s.yaml"}, code: 2, errs: "lidscope run: unknown flag -x\n", emptyOut: true},
		{args: []string{"study", "init", "--bogus", "f.nc"}, code: 2, errs: "lidscope study init: unknown flag --bogus\n", emptyOut: true},
		{args: []string{"run", "s.yaml", "--out"}, code: 2, errs: "flag --out (-o) needs a value", emptyOut: true},
		{args: []string{"run", "--workers", "many", "s.yaml"}, code: 2, errs: `--workers "many": want a whole number`, emptyOut: true},
		// flags after the arguments reach the command: these fail on the
		// missing files (status 1), not on the command line (status 2)
		{args: []string{"run", missing + ".yaml", "--set", "analysis.threshold=1.0", "--out", missing}, code: 1, errs: "missing.yaml"},
		{args: []string{"run", missing + ".yaml", "-s", "analysis.threshold=1.0", "-o", missing, "-q", "-f"}, code: 1, errs: "missing.yaml"},
		{args: []string{"inspect", missing + ".nc", "--json"}, code: 1, out: `"usable": false`},
		{args: []string{"merge", missing + "1", missing + "2", "--out", missing}, code: 1, errs: "missing1"},
		{args: []string{"merge", missing + "1", missing + "2"}, code: 2, errs: "--out DIR"},
		{args: []string{"completion", "bash"}, code: 0, out: "bash completion", emptyError: true},
		{args: []string{"completion", "zsh"}, code: 0, out: "compdef", emptyError: true},
		{args: []string{"completion", "fish"}, code: 0, out: "complete -c lidscope", emptyError: true},
		{args: []string{"completion"}, code: 2, errs: "give the shell", emptyOut: true},
		{args: []string{"completion", "tcsh"}, code: 2, errs: `no completion for the shell "tcsh"`, emptyOut: true},
		{args: []string{"help", "frobnicate"}, code: 2, errs: `unknown command "frobnicate"`, emptyOut: true},
		{args: []string{"help", "study", "init"}, code: 0, out: "lidscope study init FILE...", emptyError: true},
		// completion of flag values and arguments (cobra's __complete protocol)
		{args: []string{"__complete", "calc", "--svp", ""}, code: 0, out: "murphy-koop\nbolton\n"},
		{args: []string{"__complete", "plot", "run", "--only", "map_e"}, code: 0, out: "map_eis"},
		{args: []string{"__complete", "run", ""}, code: 0, out: "yaml\nyml\ntoml\njson\n"},
	} {
		var out, errb bytes.Buffer
		code := run(c.args, &out, &errb)
		if code != c.code || !strings.Contains(out.String(), c.out) || !strings.Contains(errb.String(), c.errs) ||
			(c.emptyOut && out.Len() > 0) || (c.emptyError && errb.Len() > 0) {
			t.Errorf("lidscope %s: exit %d (want %d)\nstdout %q (want %q)\nstderr %q (want %q)",
				strings.Join(c.args, " "), code, c.code, out.String(), c.out, errb.String(), c.errs)
		}
	}
}

// Every command and flag has a help text, and the flags every command
// shares keep one name, short form and kind of value.
func TestCommandTreeHelp(t *testing.T) {
	root := newRoot(&env{stdout: &bytes.Buffer{}, stderr: &bytes.Buffer{}})
	shared := map[string]struct{ short, kind string }{
		"out": {"o", "DIR"}, "output": {"o", "FILE"}, "force": {"f", "bool"},
		"set": {"s", "KEY=VALUE"}, "quiet": {"q", "bool"}, "verbose": {"v", "bool"},
	}
	for _, cmd := range allCommands(root) {
		if cmd.Short == "" {
			t.Errorf("%s has no short description", cmd.CommandPath())
		}
		cmd.LocalFlags().VisitAll(func(f *pflag.Flag) {
			if f.Hidden {
				return
			}
			if f.Usage == "" {
				t.Errorf("%s --%s has no help text", cmd.CommandPath(), f.Name)
			}
			// the placeholder help shows (--workers N, not --workers int):
			// pflag takes it from a `backticked` word of the usage, else
			// from the value's Go type name
			if ph, _ := pflag.UnquoteUsage(f); goTypeNames[ph] {
				t.Errorf("%s --%s shows the Go type %q as its placeholder; put the placeholder in backticks in its usage (e.g. \"`N` worker goroutines\")", cmd.CommandPath(), f.Name, ph)
			}
			if s, ok := shared[f.Name]; ok && (f.Shorthand != s.short || f.Value.Type() != s.kind) {
				t.Errorf("%s --%s: short -%s of type %s, want -%s of type %s", cmd.CommandPath(), f.Name, f.Shorthand, f.Value.Type(), s.short, s.kind)
			}
		})
		if cmd.LocalFlags().Lookup("out") != nil && cmd.LocalFlags().Lookup("output") != nil && !cmd.LocalFlags().Lookup("out").Hidden {
			t.Errorf("%s has both --out (a folder) and --output (a file)", cmd.CommandPath())
		}
	}
}

// goTypeNames are the placeholders pflag shows for a flag of a Go type
// whose usage names none.
var goTypeNames = map[string]bool{"int": true, "int32": true, "int64": true, "uint": true, "float": true,
	"float32": true, "float64": true, "string": true, "strings": true, "duration": true, "ints": true, "stringArray": true}

// A refusal to replace earlier results names the command-line flag that
// allows it (--force), never the Go option behind it.
func TestRefusalsNameFlags(t *testing.T) {
	study := keysWorld(t)
	out := filepath.Join(t.TempDir(), "res")
	demo := t.TempDir()
	if err := os.MkdirAll(filepath.Join(demo, "data"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(demo, "data", "study.yaml"), []byte("# an earlier demo\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	runDir := filepath.Join(t.TempDir(), "run")
	if _, err := figurestest.Write(runDir, figurestest.Spec{}); err != nil {
		t.Fatal(err)
	}
	steps := [][]string{
		{"run", study, "--out", out, "-q", "--no-plots"},
		{"run", study, "--out", out, "-q", "--no-plots"},
		{"merge", out, out, "--out", out},
		{"demo", "--out", demo, "-q"},
		{"plot", runDir, "--only", "series"},
		{"plot", runDir, "--only", "series"},
	}
	refusals := 0
	for i, args := range steps {
		var stdout, stderr bytes.Buffer
		code := run(args, &stdout, &stderr)
		msg := stderr.String()
		if i == 0 || i == 4 {
			if code != 0 {
				t.Fatalf("lidscope %s: exit %d: %s", strings.Join(args, " "), code, msg)
			}
			continue
		}
		refusals++
		if code != 1 || !strings.Contains(msg, "--force") || strings.Contains(msg, "Options") {
			t.Errorf("lidscope %s: exit %d, stderr %q; want 1 and a message naming --force and no Go option", strings.Join(args, " "), code, msg)
		}
	}
	if refusals != 4 {
		t.Fatalf("%d refusals checked", refusals)
	}
}
