package main

// The command lines the documentation shows are run as tests: every
// fenced `lidscope …` line of README.md and every example of every help
// text, against the synthetic demo world (package fixtures through
// analysis.Demo: invented data, labelled synthetic) in a temporary folder.
// Each must exit with status 0, or with the status its line documents in
// a trailing comment ("# exit status 1"). The README can never again show
// a command that fails.

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/spf13/cobra"

	"lidscope/analysis"
	"lidscope/fixtures"
)

// docCommand is one command line of the documentation.
type docCommand struct {
	where string // README.md:LINE or the help of a command
	text  string // as written
	words []word // split as a POSIX shell splits it
	want  int    // the documented exit status
	skip  string // why the line cannot run as written ("" = it runs)
}

// word is one shell word; glob is true when it holds an unquoted *, ? or [.
type word struct {
	text string
	glob bool
}

var exitStatusNote = regexp.MustCompile(`exit status (\d+)`)

// parseCommandLine splits a line the way a POSIX shell does for the
// subset the documentation uses (IEEE Std 1003.1-2017, Shell Command
// Language §2.2 quoting, §2.3 comments): words separated by blanks,
// single and double quotes, backslash escapes, and a # that starts a word
// begins a comment. Operators (| ; & < > $ `) are refused: a documented
// command line is one plain command.
func parseCommandLine(line string) (words []word, comment string, err error) {
	var cur strings.Builder
	in, glob := false, false
	flush := func() {
		if in {
			words = append(words, word{cur.String(), glob})
		}
		cur.Reset()
		in, glob = false, false
	}
	for i := 0; i < len(line); i++ {
		c := line[i]
		switch {
		case c == ' ' || c == '\t':
			flush()
		case c == '#' && !in:
			return words, strings.TrimSpace(line[i+1:]), nil
		case c == '\'':
			j := strings.IndexByte(line[i+1:], '\'')
			if j < 0 {
				return nil, "", fmt.Errorf("unclosed single quote")
			}
			cur.WriteString(line[i+1 : i+1+j])
			in = true
			i += j + 1
		case c == '"':
			in = true
			for i++; ; i++ {
				if i >= len(line) {
					return nil, "", fmt.Errorf("unclosed double quote")
				}
				if line[i] == '"' {
					break
				}
				if strings.ContainsRune("$`", rune(line[i])) {
					return nil, "", fmt.Errorf("%q inside double quotes: expansions are not run", line[i])
				}
				if line[i] == '\\' && i+1 < len(line) && strings.ContainsRune(`$"\`+"`", rune(line[i+1])) {
					i++
				}
				cur.WriteByte(line[i])
			}
		case c == '\\':
			if i+1 < len(line) {
				i++
				cur.WriteByte(line[i])
				in = true
			}
		case strings.ContainsRune("|;&<>$`(){}", rune(c)):
			return nil, "", fmt.Errorf("shell syntax %q: a documented command line is one plain command", c)
		default:
			if c == '*' || c == '?' || c == '[' {
				glob = true
			}
			cur.WriteByte(c)
			in = true
		}
	}
	flush()
	return words, "", nil
}

func TestParseCommandLine(t *testing.T) {
	// want: the words separated by "|", a glob word marked with a leading "~"
	for _, c := range []struct {
		line, want, comment string
	}{
		{`lidscope run obs.yaml --out out/x`, `lidscope|run|obs.yaml|--out|out/x`, ""},
		{`lidscope inspect obs/sst/*.nc   # all the SST files`, `lidscope|inspect|~obs/sst/*.nc`, "all the SST files"},
		{`lidscope run 'my study.yaml' --set "analysis.band={south: -20, north: 20}"`, `lidscope|run|my study.yaml|--set|analysis.band={south: -20, north: 20}`, ""},
		{`lidscope plot a\ b --only 'map_*' "x\"y"`, `lidscope|plot|a b|--only|map_*|x"y`, ""},
		{`lidscope run x#y ''`, `lidscope|run|x#y|`, ""},
		{`lidscope inspect x.nc # exit status 1`, `lidscope|inspect|x.nc`, "exit status 1"},
	} {
		words, comment, err := parseCommandLine(c.line)
		if err != nil {
			t.Errorf("%s: %v", c.line, err)
			continue
		}
		var got []string
		for _, w := range words {
			s := w.text
			if w.glob {
				s = "~" + s
			}
			got = append(got, s)
		}
		if g := strings.Join(got, "|"); g != c.want || comment != c.comment {
			t.Errorf("%s: %s, comment %q; want %s, %q", c.line, g, comment, c.want, c.comment)
		}
	}
	for _, bad := range []string{`lidscope run x | tee log`, `lidscope run x > log`, `lidscope run $STUDY`, `lidscope run 'x`, `lidscope a && lidscope b`} {
		if _, _, err := parseCommandLine(bad); err == nil {
			t.Errorf("%s: accepted", bad)
		}
	}
}

// readmeCommands returns the lidscope lines of the fenced blocks of a
// Markdown file (CommonMark 0.31 §4.5 fenced code blocks: ``` or ~~~).
func readmeCommands(t *testing.T, path string) []docCommand {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var out []docCommand
	fence := ""
	for i, line := range strings.Split(string(b), "\n") {
		trim := strings.TrimSpace(line)
		switch {
		case fence == "" && (strings.HasPrefix(trim, "```") || strings.HasPrefix(trim, "~~~")):
			fence = trim[:3]
		case fence != "" && strings.HasPrefix(trim, fence):
			fence = ""
		case fence != "" && strings.HasPrefix(trim, "lidscope "):
			out = append(out, newDocCommand(t, fmt.Sprintf("%s:%d", filepath.Base(path), i+1), trim))
		}
	}
	if fence != "" {
		t.Errorf("%s: a fenced block is not closed", path)
	}
	return out
}

// helpExamples returns the lidscope lines of the Example of every command
// of the tree, by command.
func helpExamples(t *testing.T) map[string][]docCommand {
	t.Helper()
	out := map[string][]docCommand{}
	root := newRoot(&env{stdout: &bytes.Buffer{}, stderr: &bytes.Buffer{}})
	for _, c := range allCommands(root) {
		for _, line := range strings.Split(c.Example, "\n") {
			if trim := strings.TrimSpace(line); strings.HasPrefix(trim, "lidscope ") {
				out[c.CommandPath()] = append(out[c.CommandPath()], newDocCommand(t, "help of "+c.CommandPath(), trim))
			} else if trim != "" && !strings.HasPrefix(trim, "#") {
				t.Errorf("help of %s: example line %q is neither a lidscope command nor a # comment", c.CommandPath(), trim)
			}
		}
	}
	return out
}

func newDocCommand(t *testing.T, where, text string) docCommand {
	words, comment, err := parseCommandLine(text)
	if err != nil {
		t.Errorf("%s: %s: %v", where, text, err)
		return docCommand{where: where, text: text, skip: err.Error()}
	}
	d := docCommand{where: where, text: text, words: words}
	if m := exitStatusNote.FindStringSubmatch(comment); m != nil {
		d.want, _ = strconv.Atoi(m[1])
	}
	return d
}

// docWorld writes the world the documentation's commands run in, into
// dir: demo-out/ as `lidscope demo --out demo-out` writes it (data/,
// data-model/, data-model-warm/ and results/ with the three runs, their
// comparison and the constraint), and obs/,
// a copy of demo-out/data, the example data folder of the README's session
// (the README says how to make it). The worlds are the demo's scenario on a
// coarser grid and a shorter record (5°, four years from 2001 in files of
// two years), and without figures, to keep the test short; their layout and
// names are the demo's.
func docWorld(t *testing.T, dir string) {
	t.Helper()
	sc := fixtures.DefaultOptions()
	sc.Resolution = 5
	sc.Years = 4
	sc.YearsPerFile = 2
	sc.Factors = true // as the demo: factor analyses, the model's warm twin and its constraint
	sc.Command = []string{"lidscope-test", "docs"}
	demo := filepath.Join(dir, "demo-out")
	_, err := analysis.Demo(context.Background(), demo, analysis.DemoOptions{
		Options:  analysis.Options{Version: version, Command: sc.Command, NoPlots: true},
		Scenario: &sc,
	})
	if err != nil {
		t.Fatalf("the demo world: %v", err)
	}
	if err := os.CopyFS(filepath.Join(dir, "obs"), os.DirFS(filepath.Join(demo, "data"))); err != nil {
		t.Fatal(err)
	}
}

// runDocCommands runs the commands in order in a copy of the world.
func runDocCommands(t *testing.T, world string, cmds []docCommand) {
	t.Helper()
	dir := filepath.Join(t.TempDir(), "w")
	if err := os.CopyFS(dir, os.DirFS(world)); err != nil {
		t.Fatal(err)
	}
	t.Chdir(dir)
	for _, c := range cmds {
		if c.skip != "" {
			continue
		}
		var args []string
		for _, w := range c.words[1:] {
			if !w.glob {
				args = append(args, w.text)
				continue
			}
			m, err := filepath.Glob(w.text)
			if err != nil || len(m) == 0 {
				t.Errorf("%s: %s: %s matches no file in the demo world", c.where, c.text, w.text)
			}
			args = append(args, m...)
		}
		var out, errb bytes.Buffer
		if code := run(args, &out, &errb); code != c.want {
			t.Errorf("%s: %s\nexit status %d, want %d\nstdout:\n%s\nstderr:\n%s", c.where, c.text, code, c.want, tail(out.String()), tail(errb.String()))
		}
	}
}

// tail keeps the end of a long output.
func tail(s string) string {
	if len(s) > 3000 {
		return "…" + s[len(s)-3000:]
	}
	return s
}

// TestDocumentedCommands runs the README's command lines, in order, in
// one copy of the demo world, and the examples of each help text, in
// order, in a fresh copy each.
func TestDocumentedCommands(t *testing.T) {
	readme := readmeCommands(t, filepath.Join("..", "..", "README.md"))
	examples := helpExamples(t)
	if len(readme) < 5 || len(examples) < 5 {
		t.Fatalf("%d README command lines and examples of %d commands: the extraction is broken", len(readme), len(examples))
	}
	world := t.TempDir()
	docWorld(t, world)
	t.Run("README", func(t *testing.T) { runDocCommands(t, world, readme) })
	var paths []string
	for p := range examples {
		paths = append(paths, p)
	}
	slices.Sort(paths)
	for _, p := range paths {
		t.Run("help/"+strings.ReplaceAll(p, " ", "_"), func(t *testing.T) { runDocCommands(t, world, examples[p]) })
	}
}

// The README's Commands table is truthful: every command of the tree has
// a row, every row names a command, and every flag a row shows is a flag
// of that command.
func TestREADMECommandTable(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	text := string(b)
	start := strings.Index(text, "\n## Commands\n")
	if start < 0 {
		t.Fatal("README has no Commands section")
	}
	section := text[start+1:]
	if end := strings.Index(section[3:], "\n## "); end >= 0 {
		section = section[:end+3]
	}
	root := newRoot(&env{stdout: &bytes.Buffer{}, stderr: &bytes.Buffer{}})
	root.InitDefaultCompletionCmd()
	rowOf := map[string]bool{}
	cell := regexp.MustCompile("`(lidscope [^`]*)`")
	flag := regexp.MustCompile(`(?:^|[\s\[(|])(--[a-z][a-z0-9-]*|-[a-zA-Z])\b`)
	for _, line := range strings.Split(section, "\n") {
		if !strings.HasPrefix(line, "| `lidscope") {
			continue
		}
		first := strings.SplitN(line, " | ", 2)[0]
		for _, m := range cell.FindAllStringSubmatch(first, -1) {
			fields := strings.Fields(m[1])
			cmd, rest, err := root.Find(fields[1:])
			if err != nil || cmd == root {
				t.Errorf("README Commands table: %q names no command", m[1])
				continue
			}
			rowOf[cmd.CommandPath()] = true
			for _, f := range flag.FindAllStringSubmatch(strings.Join(rest, " "), -1) {
				name := f[1]
				var found bool
				if strings.HasPrefix(name, "--") {
					found = cmd.Flags().Lookup(name[2:]) != nil || cmd.InheritedFlags().Lookup(name[2:]) != nil
				} else {
					found = cmd.Flags().ShorthandLookup(name[1:]) != nil
				}
				if !found {
					t.Errorf("README Commands table: %s has no flag %s (row %q)", cmd.CommandPath(), name, m[1])
				}
			}
		}
	}
	for _, c := range allCommands(root) {
		if c == root || !c.IsAvailableCommand() || c.Name() == "help" || (c.HasParent() && c.Parent().Name() == "completion") {
			continue
		}
		if !rowOf[c.CommandPath()] && !(c.HasSubCommands() && anyRow(rowOf, c)) {
			t.Errorf("README Commands table has no row for %s", c.CommandPath())
		}
	}
}

// anyRow reports whether a subcommand of c has a row.
func anyRow(rows map[string]bool, c *cobra.Command) bool {
	for _, s := range c.Commands() {
		if rows[s.CommandPath()] {
			return true
		}
	}
	return false
}

// The README opens with one paragraph and then the two commands of a new
// user, `make demo` and `make test`.
func TestREADMEOpening(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	blocks := strings.Split(strings.TrimSpace(string(b)), "\n\n")
	if len(blocks) < 3 || !strings.HasPrefix(blocks[0], "# ") {
		t.Fatalf("README does not start with a title and two blocks")
	}
	if p := blocks[1]; strings.HasPrefix(p, "#") || strings.HasPrefix(p, "```") || strings.HasPrefix(p, "*") || strings.HasPrefix(p, "|") {
		t.Errorf("README's first block after the title is not a paragraph:\n%s", p)
	}
	lines := strings.Split(blocks[2], "\n")
	if len(lines) != 4 || !strings.HasPrefix(lines[0], "```") || !strings.HasPrefix(lines[1], "make demo") ||
		!strings.HasPrefix(lines[2], "make test") || lines[3] != "```" {
		t.Errorf("README's paragraph is not followed by the block of `make demo` and `make test`:\n%s", blocks[2])
	}
}
