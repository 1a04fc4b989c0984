package output

import (
	"slices"
	"strings"
	"testing"
)

// TestSplitCommand: POSIX shell quoting (IEEE Std 1003.1-2017, Shell
// Command Language §2.2.1–2.2.3, from memory).
func TestSplitCommand(t *testing.T) {
	cases := []struct {
		in   string
		want []string
		bad  bool
	}{
		{in: "lidscope run --out res", want: []string{"lidscope", "run", "--out", "res"}},
		{in: "  a \t b\n", want: []string{"a", "b"}},
		{in: `a 'b c' "d e"`, want: []string{"a", "b c", "d e"}},
		{in: `a 'it'\''s'`, want: []string{"a", "it's"}},
		{in: `a "x\"y" "\$HOME" "a\b"`, want: []string{"a", `x"y`, "$HOME", `a\b`}},
		{in: `a b\ c`, want: []string{"a", "b c"}},
		{in: `a ''`, want: []string{"a", ""}},
		{in: "a 'δ = 1.5 K'", want: []string{"a", "δ = 1.5 K"}},
		{in: `a 'b`, bad: true},
		{in: `a "b`, bad: true},
		{in: `a b\`, bad: true},
	}
	for _, c := range cases {
		got, err := splitCommand(c.in)
		if c.bad {
			if err == nil {
				t.Errorf("splitCommand(%q) = %q, want an error", c.in, got)
			}
			if args := commandArgs(c.in); len(args) != 1 || args[0] != c.in {
				t.Errorf("commandArgs(%q) = %q, want the line kept whole", c.in, args)
			}
			continue
		}
		if err != nil || !slices.Equal(got, c.want) {
			t.Errorf("splitCommand(%q) = %q, %v; want %q", c.in, got, err, c.want)
		}
	}
	if got := commandArgs(" "); !slices.Equal(got, []string{"lidscope"}) {
		t.Errorf("commandArgs of an empty line = %q", got)
	}
}

// quote single-quotes an argument for a POSIX shell.
func quote(s string) string { return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'" }

// FuzzSplitCommand: splitting never panics, and the words it returns,
// quoted again, split back to the same words.
func FuzzSplitCommand(f *testing.F) {
	for _, s := range []string{"lidscope run --out res", `a 'b c' "d\"e" f\ g`, `'`, `"\`, "a\\\nb", ""} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		args, err := splitCommand(s)
		if err != nil {
			return
		}
		var q []string
		for _, a := range args {
			q = append(q, quote(a))
		}
		again, err := splitCommand(strings.Join(q, " "))
		if err != nil || !slices.Equal(again, args) {
			t.Fatalf("%q split to %q; quoted again it splits to %q (%v)", s, args, again, err)
		}
	})
}
