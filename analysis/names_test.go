package analysis

import (
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"testing"

	"lidscope/netcdf"
	"lidscope/vocab"
)

// TestEveryOutputNameIsInTheTable runs the demo world through the whole
// analysis (regimes, relationships, comparison) into a temporary folder
// and walks every file it wrote: NetCDF variables, dimensions and
// attributes, CSV headers and JSON keys must all be made of the terms of
// the one table of names (package vocab); no unit sits inside a name;
// numbers and booleans in NetCDF attributes are typed, not text.
func TestEveryOutputNameIsInTheTable(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the demo")
	}
	t.Parallel()
	// The demo of the small world, shared with the truth tests: the same
	// study, so the same outputs and names as the default demo.
	dir, _ := sharedDemo(t)
	// The user's own names (regions, patches, seasons, domains, datasets)
	// may appear inside names; they come from the demo study.
	extra := userNames(t, filepath.Join(dir, "results"))
	bad := map[string][]string{} // name -> where
	note := func(name, where string) {
		if err := vocab.Check(name, extra...); err != nil {
			bad[name] = append(bad[name], where)
		}
	}
	var files []string
	err := filepath.Walk(dir, func(p string, fi os.FileInfo, err error) error {
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(dir, p)
		if fi.IsDir() {
			return nil
		}
		// The synthetic inputs imitate files from elsewhere; only what
		// lidscope wrote is checked (the truth files included).
		inData := strings.HasPrefix(rel, "data")
		switch {
		case strings.HasSuffix(p, ".json"):
			files = append(files, rel)
			var v any
			b, err := os.ReadFile(p)
			if err != nil {
				return err
			}
			if err := json.Unmarshal(b, &v); err != nil {
				t.Errorf("%s: %v", rel, err)
				return nil
			}
			jsonKeys(v, func(k string) { note(k, rel) })
		case strings.HasSuffix(p, ".csv"):
			files = append(files, rel)
			f, err := os.Open(p)
			if err != nil {
				return err
			}
			head, err := csv.NewReader(f).Read()
			f.Close()
			if err != nil {
				t.Errorf("%s: %v", rel, err)
				return nil
			}
			for _, h := range head {
				name, _, _ := strings.Cut(h, " [")
				note(name, rel+" header")
			}
		case strings.HasSuffix(p, ".nc") && !inData:
			files = append(files, rel)
			ncNames(t, p, rel, note)
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if len(files) < 15 {
		t.Fatalf("the demo wrote only %d output files (%v); expected the regime, relationship and comparison files", len(files), files)
	}
	var names []string
	for n := range bad {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		w := bad[n]
		sort.Strings(w)
		t.Errorf("%s (in %s): %v", n, strings.Join(uniq(w), ", "), vocab.Check(n, extra...))
	}
}

func uniq(s []string) []string {
	var out []string
	for i, x := range s {
		if i == 0 || x != s[i-1] {
			out = append(out, x)
		}
	}
	return out
}

func jsonKeys(v any, f func(string)) {
	switch x := v.(type) {
	case map[string]any:
		for k, e := range x {
			f(k)
			jsonKeys(e, f)
		}
	case []any:
		for _, e := range x {
			jsonKeys(e, f)
		}
	}
}

var numberText = regexp.MustCompile(`^\s*[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*$`)

// ncNames checks the dimension, variable and attribute names of one file,
// and that no attribute holds a number or a boolean as text.
func ncNames(t *testing.T, path, rel string, note func(name, where string)) {
	t.Helper()
	f, err := netcdf.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	dims, err := f.Dims()
	if err != nil {
		t.Fatal(err)
	}
	for _, d := range dims {
		note(d.Name, rel+" dimension")
	}
	checkAttrs := func(as []netcdf.Attr, where string) {
		for _, a := range as {
			note(a.Name, where+" attribute")
			if s, ok := a.Text(); ok {
				if a.Name != "units" && !strings.HasSuffix(a.Name, "_units") && (numberText.MatchString(s) || s == "true" || s == "false") {
					t.Errorf("%s attribute %s = %q: a number or boolean written as text; write it typed", where, a.Name, s)
				}
			}
		}
	}
	ga, err := f.Attrs()
	if err != nil {
		t.Fatal(err)
	}
	checkAttrs(ga, rel+" global")
	vars, err := f.Vars()
	if err != nil {
		t.Fatal(err)
	}
	for _, v := range vars {
		note(v.Name, rel+" variable")
		as, err := v.Attrs()
		if err != nil {
			t.Fatal(err)
		}
		checkAttrs(as, rel+" "+v.Name)
	}
}

// userNames collects the names the user gave (regions, patches, seasons,
// domains) from the relationship outputs, and the dataset names.
func userNames(t *testing.T, results string) []string {
	t.Helper()
	out := []string{"synthetic-demo", "synthetic-model", "DJF", "MAM", "JJA", "SON"}
	ms, _ := filepath.Glob(filepath.Join(results, "*", "relationships.json"))
	for _, p := range ms {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		var doc struct {
			Domains []struct{ Name string }
			Flips   []struct{ Patch string }
		}
		if err := json.Unmarshal(b, &doc); err != nil {
			t.Fatal(err)
		}
		for _, d := range doc.Domains {
			out = append(out, d.Name)
		}
		for _, f := range doc.Flips {
			out = append(out, f.Patch)
		}
	}
	if len(out) < 8 {
		t.Fatalf("found no region or patch names in %v", ms)
	}
	// Perturbation sizes appear as signed whole numbers of the patch rows.
	for k := -10; k <= 10; k++ {
		out = append(out, strconv.Itoa(k))
	}
	return out
}
