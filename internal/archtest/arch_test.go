// Package archtest checks that the package-import table in DEVELOPERS.md is
// the project's real import graph, so the contributor guide cannot drift
// from the code.
package archtest

import (
	"bufio"
	"bytes"
	"flag"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strings"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the import table in DEVELOPERS.md from the code")

const (
	begin = "<!-- imports:begin (internal/archtest checks this table; go test ./internal/archtest -update rewrites it) -->"
	end   = "<!-- imports:end -->"
)

// graph returns, for every package of the module (test files excluded),
// the module packages it imports, as "pkg: dep dep …" lines sorted by
// package, paths relative to the module.
func graph(t *testing.T, root string) []string {
	t.Helper()
	cmd := exec.Command("go", "list", "-f", "{{.ImportPath}}|{{join .Imports \" \"}}", "./...")
	cmd.Dir = root
	out, err := cmd.Output()
	if err != nil {
		var stderr []byte
		if ee, ok := err.(*exec.ExitError); ok {
			stderr = ee.Stderr
		}
		t.Fatalf("go list ./... in %s: %v\n%s", root, err, stderr)
	}
	const mod = "lidscope/"
	var lines []string
	sc := bufio.NewScanner(bytes.NewReader(out))
	for sc.Scan() {
		pkg, imps, _ := strings.Cut(sc.Text(), "|")
		var deps []string
		for _, imp := range strings.Fields(imps) {
			if strings.HasPrefix(imp, mod) {
				deps = append(deps, strings.TrimPrefix(imp, mod))
			}
		}
		sort.Strings(deps)
		name := strings.TrimPrefix(pkg, mod)
		if pkg == "lidscope" {
			name = "."
		}
		lines = append(lines, strings.TrimSpace(name+": "+strings.Join(deps, " ")))
	}
	sort.Strings(lines)
	return lines
}

// section returns the text of DEVELOPERS.md between the lines starting
// with the markers b and e.
func section(t *testing.T, text, path, b, e string) (int, int) {
	t.Helper()
	i, j := strings.Index(text, b), strings.Index(text, e)
	if i < 0 || j < i {
		t.Fatalf("%s: no section between %q and %q", path, b, e)
	}
	return i + len(b), j
}

// TestDevelopersLayers checks the layer list of DEVELOPERS.md: every
// package of the module is on exactly one layer, and imports only
// packages on lower layers (so data flows one way and nothing reaches
// back up).
func TestDevelopersLayers(t *testing.T) {
	root, err := filepath.Abs(filepath.Join("..", ".."))
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(root, "DEVELOPERS.md")
	doc, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	i, j := section(t, string(doc), path, "<!-- layers:begin -->", "<!-- layers:end -->")
	layer := map[string]int{}
	for _, l := range strings.Split(string(doc)[i:j], "\n") {
		l = strings.TrimSpace(l)
		if !strings.HasPrefix(l, "layer ") {
			continue
		}
		head, pkgs, ok := strings.Cut(l, ":")
		var n int
		if _, err := fmt.Sscanf(head, "layer %d", &n); err != nil || !ok {
			t.Fatalf("%s: cannot read the layer line %q", path, l)
		}
		for _, p := range strings.Fields(pkgs) {
			if _, dup := layer[p]; dup {
				t.Errorf("%s: package %s is on two layers", path, p)
			}
			layer[p] = n
		}
	}
	seen := map[string]bool{}
	for _, l := range graph(t, root) {
		pkg, deps, _ := strings.Cut(l, ":")
		seen[pkg] = true
		lp, ok := layer[pkg]
		if !ok {
			t.Errorf("%s: package %s is on no layer; add it to the layer list", path, pkg)
			continue
		}
		for _, d := range strings.Fields(deps) {
			if ld, ok := layer[d]; !ok {
				t.Errorf("%s imports %s, which is on no layer", pkg, d)
			} else if ld >= lp {
				t.Errorf("%s (layer %d) imports %s (layer %d): imports must go to lower layers", pkg, lp, d, ld)
			}
		}
	}
	for p := range layer {
		if seen[p] {
			continue
		}
		t.Errorf("%s: the layer list names %s, which is not a package of the module", path, p)
	}
}

func TestDevelopersImportTable(t *testing.T) {
	root, err := filepath.Abs(filepath.Join("..", ".."))
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(root, "DEVELOPERS.md")
	doc, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	text := string(doc)
	i, j := section(t, text, path, begin, end)
	i -= len(begin)
	want := graph(t, root)
	block := "```text\n" + strings.Join(want, "\n") + "\n```\n"
	if *update {
		text = text[:i+len(begin)] + "\n" + block + text[j:]
		if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	var got []string
	for _, l := range strings.Split(text[i+len(begin):j], "\n") {
		l = strings.TrimSpace(l)
		if l == "" || strings.HasPrefix(l, "```") {
			continue
		}
		got = append(got, l)
	}
	if strings.Join(got, "\n") != strings.Join(want, "\n") {
		var diff strings.Builder
		gs, ws := map[string]bool{}, map[string]bool{}
		for _, l := range got {
			gs[l] = true
		}
		for _, l := range want {
			ws[l] = true
		}
		for _, l := range want {
			if !gs[l] {
				fmt.Fprintf(&diff, "  code has:     %s\n", l)
			}
		}
		for _, l := range got {
			if !ws[l] {
				fmt.Fprintf(&diff, "  DEVELOPERS.md: %s\n", l)
			}
		}
		t.Errorf("%s: the import table differs from the code (update the diagram above it too, then run go test ./internal/archtest -update):\n%s", path, diff.String())
	}
}
