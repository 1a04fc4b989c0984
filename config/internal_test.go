package config

import (
	"fmt"
	"os"
	"strings"
	"testing"

	"lidscope/cf"
	"lidscope/vocab"
)

// TestDistance checks the edit distance on worked examples: kitten →
// sitting is 3 (the classic Levenshtein example, common practice); a
// transposition costs 1; "ca" → "abc" is 3 for the optimal-string-alignment
// distance (2 for unrestricted Damerau–Levenshtein; the textbook example
// of the difference, from memory).
func TestDistance(t *testing.T) {
	for _, c := range []struct {
		a, b string
		want int
	}{
		{"kitten", "sitting", 3}, {"", "abc", 3}, {"abc", "", 3}, {"flaw", "lawn", 2},
		{"ocaen", "ocean", 1}, {"sts", "sst", 1}, {"ca", "abc", 3}, {"threshold", "threshold", 0},
		{"treshold", "threshold", 1},
	} {
		if got := distance(c.a, c.b); got != c.want {
			t.Errorf("distance(%q, %q) = %d, want %d", c.a, c.b, got, c.want)
		}
		if got := distance(c.b, c.a); got != c.want {
			t.Errorf("distance(%q, %q) = %d, want %d (symmetry)", c.b, c.a, got, c.want)
		}
	}
	if n := nearest("zzzzzz", []string{"dir", "plots"}); n != "" {
		t.Errorf("nearest suggests %q for an unrelated word", n)
	}
	if n := nearest("nord", []string{"north", "south"}); n != "north" {
		t.Errorf("nearest(nord) = %q", n)
	}
}

// TestEnvNamesUnique: no two overridable keys share an environment
// variable name, so LIDSCOPE_… is never ambiguous.
func TestEnvNamesUnique(t *testing.T) {
	ds := map[string]any{}
	tree := map[string]any{
		"datasets": map[string]any{"obs": ds, "model-run": ds, "m12": ds, "obs_2": ds},
		"analysis": map[string]any{"regions": []any{map[string]any{}, map[string]any{}}},
	}
	seen := map[string]string{}
	paths := envPaths(tree)
	for _, p := range paths {
		n := EnvName(p)
		if q, dup := seen[n]; dup {
			t.Errorf("%s and %s share %s", p, q, n)
		}
		seen[n] = p
	}
	for _, want := range []string{"datasets.m12.files.any", "datasets.obs.coordinates.sst.level_units", "datasets.model-run.time.sst.calendar", "analysis.regions", "analysis.regions.1.east", "output.plots"} {
		if _, ok := seen[EnvName(want)]; !ok {
			t.Errorf("%s cannot be overridden from the environment", want)
		}
	}
	// whole lists come before their elements
	idx := map[string]int{}
	for i, p := range paths {
		idx[p] = i
	}
	if idx["analysis.regions"] > idx["analysis.regions.0.name"] {
		t.Error("analysis.regions is applied after its elements")
	}
}

func TestParseValue(t *testing.T) {
	for _, c := range []struct {
		raw    string
		want   string // fmt of the value
		remove bool
	}{
		{"1.5", "1.5", false}, {"true", "true", false}, {"[12, 1, 2]", "[12 1 2]", false},
		{"*.nc", "*.nc", false}, {"sst/*.nc", "sst/*.nc", false}, {"null", "<nil>", true}, {"~", "<nil>", true},
		{"", "", false}, {"# x", "# x", false}, {"{South: 1}", "map[south:1]", false}, {"1979-01", "1979-01", false},
	} {
		v, rm := parseValue(c.raw)
		if got := strings.TrimSpace(fmtValue(v)); got != c.want || rm != c.remove {
			t.Errorf("parseValue(%q) = %s, %v; want %s, %v", c.raw, got, rm, c.want, c.remove)
		}
	}
}

func fmtValue(v any) string {
	if v == nil {
		return "<nil>"
	}
	return fmt.Sprint(v)
}

// TestYAMLLines: the YAML line index follows nested tables and lists.
func TestYAMLLines(t *testing.T) {
	src := "datasets:\n  a:\n    files:\n      sst: x\n  b:\n    time:\n      months:\n        - 1\n        - 2\nanalysis: {band: {south: 1}}\n"
	ix := indexLines("yaml", []byte(src))
	for p, want := range map[string]int{
		"datasets": 1, "datasets.a": 2, "datasets.a.files.sst": 4, "datasets.b": 5, "datasets.b.about": 5,
		"datasets.b.time.months.1": 9, "analysis.band.south": 10, "datasets.b.time.unknown": 6,
	} {
		if got := ix.line(p); got != want {
			t.Errorf("line(%s) = %d, want %d", p, got, want)
		}
	}
}

// TestEveryKeyDocumented: every key of the schema is described in doc.go,
// and the commented example uses only keys of the schema (Load checks
// that) and mentions each table.
func TestEveryKeyDocumented(t *testing.T) {
	doc, err := os.ReadFile("doc.go")
	if err != nil {
		t.Fatal(err)
	}
	example, err := os.ReadFile("testdata/example.yaml")
	if err != nil {
		t.Fatal(err)
	}
	var walk func(k *key, path string)
	walk = func(k *key, path string) {
		switch k.kind {
		case kTable, kEdges, kNamed:
			if k.roles != nil {
				walk(k.roles, join(path, "<role>"))
			}
			for _, n := range k.names() {
				if k.kind == kTable && k.keys[n] == nil {
					continue // a role key (walked above)
				}
				if !strings.Contains(string(doc), n) {
					t.Errorf("key %s is not described in doc.go", join(path, n))
				}
				c := k.child(n)
				if k.kind == kTable && c.kind == kTable && !strings.Contains(string(example), n+":") {
					t.Errorf("table %s is not in testdata/example.yaml", join(path, n))
				}
				if k.kind == kNamed {
					if n == "" {
						t.Errorf("%s accepts an empty name", path)
					}
					if c == k.elem && n == k.choices[0] {
						walk(c, join(path, "<"+k.what+">"))
					}
					continue
				}
				walk(c, join(path, n))
			}
		case kRoles, kList:
			walk(k.elem, path)
		case kNames:
			walk(k.elem, join(path, "<"+k.what+">"))
		}
	}
	walk(schema, "")
}

// The study reads each role at the level of the one role table of vocab
// (vocab.DefaultLevel: T700, omega500; the humidities near-surface, as the
// surface humidity of the LCL, Wood and Bretherton 2006), and specific
// humidity at 700 hPa when ECTEI uses q700 (Kawai, Koshiro and Webb 2017).
func TestLevelOfFromRoleTable(t *testing.T) {
	for _, ectei := range []bool{false, true} {
		d := &Dataset{}
		d.Metrics.ECTEI = ectei
		for _, r := range cf.Roles() {
			want := vocab.DefaultLevel(string(r))
			if r == cf.RoleSpecHum && ectei {
				want = 70000
			}
			if got := d.Spec(r).Level; got != want {
				t.Errorf("ECTEI %v: Spec(%s).Level = %g Pa, want %g Pa", ectei, r, got, want)
			}
		}
		if got := d.Spec(cf.RoleRH).Level; got != 0 {
			t.Errorf("relative_humidity read at %g Pa by default, want single level (near-surface)", got)
		}
	}
}
