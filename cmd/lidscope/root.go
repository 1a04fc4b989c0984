package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"regexp"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"lidscope/cf"
)

// env is what one command line runs with: its writers, and how a command
// that watches its context learns of a signal. Tests build their own (run
// below); main builds the real one.
type env struct {
	stdout, stderr io.Writer
	// signals wraps the context of the commands that stop cleanly on a
	// signal (main: signalContext); nil means no signal handling.
	signals func(context.Context) (context.Context, context.CancelFunc)
	// stopped returns the stop signal that cancelled the command (nil:
	// none, or no signal handling).
	stopped func() os.Signal
}

// interruptible returns the context a long command runs under: with
// e.signals, cancelled on a stop signal. Call stop when the command ends.
func (e *env) interruptible(ctx context.Context) (context.Context, context.CancelFunc) {
	if e.signals == nil {
		return context.WithCancel(ctx)
	}
	return e.signals(ctx)
}

// commandSet lists the constructors of the top-level commands. Each
// command's file adds its own in an init function (addCommand), so adding a
// command is one new file; the tree is built afresh for every command line
// and holds no state between runs.
var commandSet []func(*env) *cobra.Command

// addCommand registers the constructor of a top-level command.
func addCommand(newCmd func(*env) *cobra.Command) { commandSet = append(commandSet, newCmd) }

// newRoot builds the command tree for one command line.
func newRoot(e *env) *cobra.Command {
	root := &cobra.Command{
		Use:   "lidscope",
		Short: "regime-conditioned low-cloud and inversion-strength diagnostics from CF NetCDF",
		Long: `lidscope reads SST, 700-hPa temperature and cloud from CF NetCDF files, computes
LTS and EIS per column, splits ocean columns into convective and subsidence regimes
by SST relative to the tropical mean, and reports regime-conditioned cloud-inversion
relationships and threshold-crossing frequencies, for models and observations alike.

Exit status: 0 success, 1 failure (the message says what, where and what to do),
2 a command-line mistake.`,
		Version:       version,
		SilenceErrors: true,
		SilenceUsage:  true,
	}
	root.SetOut(e.stdout)
	root.SetErr(e.stderr)
	root.SetVersionTemplate("lidscope {{.Version}}\n")
	// --version without a short form: -v is --verbose where a command has it.
	root.Flags().Bool("version", false, "print the lidscope version and exit")
	root.SetFlagErrorFunc(flagError)
	for _, newCmd := range commandSet {
		root.AddCommand(newCmd(e))
	}
	completeChoices(root)
	root.SetHelpCommand(newHelpCmd())
	root.CompletionOptions.DisableDefaultCmd = true // completion.go writes the scripts
	return root
}

// newHelpCmd is `lidscope help [COMMAND...]`: the help of a command on
// stdout, as COMMAND --help prints it; an unknown command is a usage
// mistake.
func newHelpCmd() *cobra.Command {
	return &cobra.Command{
		Use:   "help [COMMAND]...",
		Short: "print the help of a command (as COMMAND --help does)",
		RunE: func(cmd *cobra.Command, args []string) error {
			root := cmd.Root()
			target, rest, err := root.Find(args)
			if err != nil || len(rest) > 0 {
				typed := strings.Join(args, " ")
				if len(rest) > 0 {
					typed = rest[0]
				}
				return usageErr("unknown command %q%s", typed, suggestion(target, typed))
			}
			return target.Help()
		},
		ValidArgsFunction: func(cmd *cobra.Command, args []string, toComplete string) ([]cobra.Completion, cobra.ShellCompDirective) {
			target, _, err := cmd.Root().Find(args)
			if err != nil {
				return nil, cobra.ShellCompDirectiveNoFileComp
			}
			var out []cobra.Completion
			for _, c := range target.Commands() {
				if c.IsAvailableCommand() && strings.HasPrefix(c.Name(), toComplete) {
					out = append(out, cobra.CompletionWithDesc(c.Name(), c.Short))
				}
			}
			return out, cobra.ShellCompDirectiveNoFileComp
		},
	}
}

// run executes a command line without signal handling (what tests call)
// and returns the exit status.
func run(args []string, stdout, stderr io.Writer) int {
	return execute(context.Background(), args, &env{stdout: stdout, stderr: stderr})
}

// execute runs one command line and returns the process exit status:
// 0 success, 1 a failure (reported on stderr), 2 a usage error.
func execute(ctx context.Context, args []string, e *env) int {
	root := newRoot(e)
	if len(args) == 0 {
		// A bare `lidscope` is a usage mistake: the list of commands on
		// stderr, exit status 2 (`lidscope --help` prints it on stdout).
		root.SetOut(e.stderr)
		_ = root.Usage()
		fmt.Fprintln(e.stderr, "lidscope: give a command")
		return 2
	}
	root.SetArgs(args)
	cmd, err := root.ExecuteContextC(ctx)
	if cmd == nil {
		cmd = root
	}
	name := cmd.CommandPath()
	if e.stopped != nil && err != nil {
		if s := e.stopped(); s != nil {
			// Stopped by a signal before it finished: the command's
			// output folder is as it was before the command.
			fmt.Fprintf(e.stderr, "%s: stopped by %s; the output folder is as it was (nothing of this run was written)\n", name, signalName(s))
			return signalStatus(s)
		}
	}
	switch {
	case err == nil:
		return 0
	case errors.Is(err, errFailed):
		return 1
	case isCobraUsage(err):
		// cobra's own wording, with our suggestion
		typed := cobraUnknown.FindStringSubmatch(err.Error())[1]
		err = usageErr("unknown command %q%s", typed, suggestion(cmd, typed))
		fallthrough
	case errors.Is(err, errUsage):
		fmt.Fprintf(e.stderr, "%s: %s\n", name, cf.SafeText(usageText(err)))
		if !errors.Is(err, errNoHint) {
			fmt.Fprintf(e.stderr, "Run '%s --help' for usage.\n", name)
		}
		return 2
	}
	// No raw control characters reach the terminal (a file name holding
	// an escape sequence is shown escaped).
	fmt.Fprintf(e.stderr, "%s: %s\n", name, cf.SafeText(flagWords.Replace(err.Error())))
	return 1
}

// flagWords names, in the library's messages, the command-line flag of a
// Go option (the library speaks to Go callers too): a user reads --force,
// not Options.Force.
var flagWords = strings.NewReplacer(
	"(--force, Options.Force)", "(--force)",
	"set Options.Overwrite to replace", "use --force to replace",
	"allow replacing them (WriteOptions.Force)", "use --force to replace them",
	"Allow replacing it (Options.Force)", "Use --force to replace it",
	"allow overwriting (Options.Overwrite)", "use --force to replace it",
	"(Options.Force)", "(--force)",
	"(Options.Overwrite)", "(--force)",
	"Options.Force", "--force",
	"Options.Overwrite", "--force",
)

// isCobraUsage reports the usage mistakes cobra finds itself (an unknown
// command, before any of ours runs).
func isCobraUsage(err error) bool {
	return cobraUnknown.MatchString(err.Error())
}

// cobraUnknown is cobra's message for an unknown command.
var cobraUnknown = regexp.MustCompile(`^unknown command "([^"]*)" for`)

// errUsage marks a command-line mistake (exit status 2).
var errUsage = errors.New("usage")

// errNoHint marks a usage error whose message already says where to look.
var errNoHint = errors.New("no hint")

// errFailed marks a run whose problems were already reported (exit status 1,
// nothing more to print).
var errFailed = errors.New("failed")

// usageError is a command-line mistake: its message says what was wrong
// and what to write instead.
type usageError struct {
	msg    string
	noHint bool
}

func (u *usageError) Error() string { return u.msg }
func (u *usageError) Is(target error) bool {
	return target == errUsage || (u.noHint && target == errNoHint)
}

// usageErr returns a usage error (exit status 2) with a formatted message.
func usageErr(format string, a ...any) error {
	return &usageError{msg: fmt.Sprintf(format, a...)}
}

// usageText is the message of a usage error.
func usageText(err error) string {
	var u *usageError
	if errors.As(err, &u) {
		return u.msg
	}
	return err.Error()
}

// flagError turns pflag's parse errors into usage errors with one wording
// for each kind of mistake, naming the flag as it is written.
func flagError(cmd *cobra.Command, err error) error {
	var (
		notExist *pflag.NotExistError
		needs    *pflag.ValueRequiredError
		invalid  *pflag.InvalidValueError
		syntax   *pflag.InvalidSyntaxError
	)
	switch {
	case errors.As(err, &notExist):
		name := "--" + notExist.GetSpecifiedName()
		if s := notExist.GetSpecifiedShortnames(); s != "" {
			name = "-" + unknownShort(cmd, s) // in a group such as -qx, the unknown letter
		}
		return usageErr("unknown flag %s", name)
	case errors.As(err, &needs):
		return usageErr("flag %s needs a value", flagName(needs.GetFlag()))
	case errors.As(err, &invalid):
		f := invalid.GetFlag()
		var cause any = errors.Unwrap(invalid)
		switch {
		case f != nil && strings.HasPrefix(f.Value.Type(), "int"):
			cause = "want a whole number"
		case f != nil && strings.HasPrefix(f.Value.Type(), "float"):
			cause = "want a number"
		case f != nil && f.Value.Type() == "bool":
			cause = "want true or false"
		case cause == nil:
			cause = invalid
		}
		return usageErr("%s %q: %v", flagName(f), invalid.GetValue(), cause)
	case errors.As(err, &syntax):
		return usageErr("bad flag syntax %s", syntax.GetSpecifiedFlag())
	}
	return usageErr("%v", err)
}

// unknownShort returns the first letter of a group of short flags that is
// not a flag of cmd.
func unknownShort(cmd *cobra.Command, group string) string {
	for _, c := range group {
		if cmd.Flags().ShorthandLookup(string(c)) == nil {
			return string(c)
		}
	}
	return group[:1]
}

// flagName writes a flag the way a user types it (--out, or --out/-o).
func flagName(f *pflag.Flag) string {
	if f == nil {
		return "the flag"
	}
	if f.Shorthand != "" {
		return "--" + f.Name + " (-" + f.Shorthand + ")"
	}
	return "--" + f.Name
}

// suggestion returns " (did you mean X?)" for a mistyped command name, else
// " (use A, B or C)" listing the commands of cmd.
func suggestion(cmd *cobra.Command, typed string) string {
	if typed != "" {
		if cmd.SuggestionsMinimumDistance <= 0 {
			cmd.SuggestionsMinimumDistance = 2 // cobra's default, which it sets on the root only
		}
		if s := cmd.SuggestionsFor(typed); len(s) > 0 {
			return fmt.Sprintf(" (did you mean %q?)", s[0])
		}
	}
	var names []string
	for _, c := range cmd.Commands() {
		if c.IsAvailableCommand() {
			names = append(names, c.Name())
		}
	}
	if len(names) == 0 {
		return ""
	}
	if len(names) == 1 {
		return " (use " + names[0] + ")"
	}
	return " (use " + strings.Join(names[:len(names)-1], ", ") + " or " + names[len(names)-1] + ")"
}

// groupRunE is the run function of a command that only holds subcommands:
// without one, or with an unknown one, it is a usage mistake.
func groupRunE(cmd *cobra.Command, args []string) error {
	if len(args) == 0 {
		return usageErr("give a subcommand%s", suggestion(cmd, ""))
	}
	return usageErr("unknown subcommand %q%s", args[0], suggestion(cmd, args[0]))
}

// allCommands returns cmd and every command below it, depth first.
func allCommands(cmd *cobra.Command) []*cobra.Command {
	out := []*cobra.Command{cmd}
	for _, c := range cmd.Commands() {
		out = append(out, allCommands(c)...)
	}
	return out
}
