package archtest

import (
	"fmt"
	"go/ast"
	"go/parser"
	"go/token"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"
)

// The size limits of a function outside the hot kernels: a newcomer reads
// one screenful-sized piece at a time. Lines count from the func keyword
// to the closing brace; the cyclomatic complexity is McCabe's (1976)
// count of decision points plus one, as gocyclo counts it: if, for,
// range, each non-default case of a switch or select, && and ||.
const (
	maxLines = 120
	maxCyclo = 30
)

// exceptions are the functions allowed above the limits, each with its
// reason. Keep the list short; a function leaves it when it is split.
var exceptions = map[string]string{
	// Hot kernels: one pass over every column of every time step; their
	// length is the inlined inner loop, measured by benchmarks.
	"metrics.Kernel.computeBlock": "hot kernel: the slab's inner loop over columns (benchmarked in metrics)",
	"metrics.Kernel.check":        "hot kernel: the per-column range check of computeBlock, one flat switch (the ranges themselves are metrics/limits.go)",
	"relations.Acc.AddStep":       "hot kernel: every step's relationship statistics (owned by the performance work, issue 17)",

	// Not split yet (issue 12): each leaves the list when it is split.
	"cmd/lidscope.runSubmit":  "not split yet",
	"fixtures.generator.step": "not split yet",
	"pipeline.openInputs":     "not split yet",
}

// funcStat is one function's size.
type funcStat struct {
	name  string // package folder, receiver type, name: "relations.Acc.AddStep"
	pos   string // file:line
	lines int
	cyclo int
}

// cyclomatic returns McCabe's complexity of a function body.
func cyclomatic(body ast.Node) int {
	c := 1
	ast.Inspect(body, func(n ast.Node) bool {
		switch n := n.(type) {
		case *ast.IfStmt, *ast.ForStmt, *ast.RangeStmt:
			c++
		case *ast.CaseClause:
			if n.List != nil {
				c++
			}
		case *ast.CommClause:
			if n.Comm != nil {
				c++
			}
		case *ast.BinaryExpr:
			if n.Op == token.LAND || n.Op == token.LOR {
				c++
			}
		}
		return true
	})
	return c
}

// funcName is "pkg.Recv.Name" or "pkg.Name", pkg the folder relative to
// the module root.
func funcName(pkg string, fd *ast.FuncDecl) string {
	name := fd.Name.Name
	if fd.Recv != nil && len(fd.Recv.List) > 0 {
		t := fd.Recv.List[0].Type
		if s, ok := t.(*ast.StarExpr); ok {
			t = s.X
		}
		switch x := t.(type) {
		case *ast.IndexExpr:
			t = x.X
		case *ast.IndexListExpr:
			t = x.X
		}
		if id, ok := t.(*ast.Ident); ok {
			name = id.Name + "." + name
		}
	}
	return pkg + "." + name
}

// funcStats measures every function of the module's non-test Go files.
func funcStats(t *testing.T, root string) []funcStat {
	t.Helper()
	fset := token.NewFileSet()
	var out []funcStat
	err := filepath.WalkDir(root, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() {
			if p != root && (strings.HasPrefix(d.Name(), ".") || d.Name() == "testdata") {
				return filepath.SkipDir
			}
			return nil
		}
		if !strings.HasSuffix(p, ".go") || strings.HasSuffix(p, "_test.go") {
			return nil
		}
		f, err := parser.ParseFile(fset, p, nil, parser.SkipObjectResolution)
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(root, p)
		pkg := filepath.ToSlash(filepath.Dir(rel))
		for _, decl := range f.Decls {
			fd, ok := decl.(*ast.FuncDecl)
			if !ok || fd.Body == nil {
				continue
			}
			start := fset.Position(fd.Pos())
			out = append(out, funcStat{
				name:  funcName(pkg, fd),
				pos:   fmt.Sprintf("%s:%d", filepath.ToSlash(rel), start.Line),
				lines: fset.Position(fd.End()).Line - start.Line + 1,
				cyclo: cyclomatic(fd.Body),
			})
		}
		return nil
	})
	if err != nil {
		t.Fatalf("reading the module's Go files under %s: %v", root, err)
	}
	return out
}

// TestFunctionSizes fails on a function longer than maxLines or more
// complex than maxCyclo that is not among the justified exceptions, and
// on an exception that no longer needs its place; with -v it lists the
// largest functions.
func TestFunctionSizes(t *testing.T) {
	root, err := filepath.Abs(filepath.Join("..", ".."))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(root, "go.mod")); err != nil {
		t.Fatalf("module root %s: %v", root, err)
	}
	fns := funcStats(t, root)
	sort.Slice(fns, func(i, j int) bool {
		if fns[i].lines != fns[j].lines {
			return fns[i].lines > fns[j].lines
		}
		return fns[i].name < fns[j].name
	})
	for i, f := range fns {
		if i == 15 {
			break
		}
		t.Logf("%4d lines  cyclomatic %3d  %s (%s)", f.lines, f.cyclo, f.name, f.pos)
	}
	seen := map[string]bool{}
	for _, f := range fns {
		over := f.lines > maxLines || f.cyclo > maxCyclo
		if _, ok := exceptions[f.name]; ok {
			seen[f.name] = true
			if !over {
				t.Errorf("%s (%s) is within the limits now (%d lines, cyclomatic %d): remove it from the exceptions in internal/archtest/funcsize_test.go",
					f.name, f.pos, f.lines, f.cyclo)
			}
			continue
		}
		if over {
			t.Errorf("%s (%s) has %d lines and cyclomatic complexity %d; the limits are %d and %d: split it into named steps (or, for a hot kernel, add it with its reason to the exceptions in internal/archtest/funcsize_test.go)",
				f.name, f.pos, f.lines, f.cyclo, maxLines, maxCyclo)
		}
	}
	for name := range exceptions {
		if !seen[name] {
			t.Errorf("exception %s names no function: remove it from internal/archtest/funcsize_test.go", name)
		}
	}
}
