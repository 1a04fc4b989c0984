package config

import (
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// TestNestingLimit: a study nested far deeper than any study needs is a
// clear error naming the line, in every format, before a parser recurses
// into it (a TOML inline table nested 1000 deep took 3 s to parse, so
// 100 000 deep would not finish), and the example studies still load.
func TestNestingLimit(t *testing.T) {
	const n = 100000
	yamlBlock := func(levels int) string {
		var b strings.Builder
		for i := 0; i < levels; i++ {
			b.WriteString(strings.Repeat(" ", i) + "k:\n")
		}
		return b.String()
	}
	cases := []struct {
		name, format, src string
		line              int
	}{
		{"JSON arrays", "json", `{"datasets": ` + strings.Repeat("[", n) + strings.Repeat("]", n) + "}", 1},
		{"JSON objects", "json", strings.Repeat(`{"a":`, n) + "1" + strings.Repeat("}", n), 1},
		{"YAML flow lists", "yaml", "datasets:\n  - name: x\n    inputs: " + strings.Repeat("[", n) + strings.Repeat("]", n) + "\n", 3},
		{"YAML flow maps", "yaml", "a: " + strings.Repeat("{b: ", n) + "1" + strings.Repeat("}", n) + "\n", 1},
		{"YAML block maps", "yaml", yamlBlock(200), MaxDepth + 1},
		{"YAML nested list items", "yaml", "a:\n" + strings.Repeat("- ", 100) + "x\n", 2},
		{"TOML arrays", "toml", "a = " + strings.Repeat("[", n) + strings.Repeat("]", n) + "\n", 1},
		{"TOML inline tables", "toml", "a = " + strings.Repeat("{b = ", n) + "1" + strings.Repeat("}", n) + "\n", 1},
		{"TOML dotted key", "toml", "\n" + strings.Repeat("a.", n) + "b = 1\n", 2},
		{"TOML table header", "toml", "x = 1\n[" + strings.Repeat("a.", n) + "b]\n", 2},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := parse("deep."+c.format, c.format, []byte(c.src))
			if err == nil {
				t.Fatal("a study nested far too deep was accepted")
			}
			for _, want := range []string{"deep." + c.format, "nest", "levels deep", "line " + strconv.Itoa(c.line)} {
				if !strings.Contains(err.Error(), want) {
					t.Errorf("error lacks %q: %v", want, err)
				}
			}
		})
	}
	// Within the limit, strings that hold brackets and ordinary flow syntax
	// are no nesting.
	ok := []struct{ format, src string }{
		{"yaml", "a: \"[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[\"\nb: '{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{'\nc: [1, [2, [3]]] # [[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[\n"},
		{"toml", "a = \"[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[\"\nb = '''\n{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{{\n'''\nc = 1.5\n[x.y.z]\nd = {e = [1.5, 2.5], f.g = 2}\n"},
		{"json", `{"a": "[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[\"[[[[[[[[[[[[[", "b": [[1], {"c": [2]}]}`},
	}
	for _, c := range ok {
		if _, err := parse("ok."+c.format, c.format, []byte(c.src)); err != nil {
			t.Errorf("%s: %v\n%s", c.format, err, c.src)
		}
	}
	for _, ext := range []string{"yaml", "toml", "json"} {
		p := filepath.Join("testdata", "example."+ext)
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		if err := checkDepth(p, ext, b); err != nil {
			t.Errorf("the example study is refused: %v", err)
		}
	}
}

// FuzzParseDepth: whatever the text, parse returns an error or a tree
// nested no deeper than MaxDepth, and never panics or overflows the stack.
func FuzzParseDepth(f *testing.F) {
	f.Add("yaml", "a: [[1]]\n")
	f.Add("yaml", "a: &x [1]\nb: [*x, [*x]]\n")
	f.Add("toml", "a = {b = {c = 1}}\n[d.e]\nf.g = 1\n")
	f.Add("json", `{"a": [[[{"b": 1}]]]}`)
	f.Add("toml", "a = '''\n[[[\n'''\n")
	f.Fuzz(func(t *testing.T, format, src string) {
		switch format {
		case "yaml", "toml", "json":
		default:
			return
		}
		if len(src) > 1<<14 {
			return
		}
		tree, err := parse("fuzz."+format, format, []byte(src))
		if err != nil {
			return
		}
		if d := treeDepth(tree, MaxDepth+1); d > MaxDepth {
			t.Fatalf("a tree %d deep was accepted", d)
		}
	})
}
