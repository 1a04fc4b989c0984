package config_test

import (
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"lidscope/config"
)

// ensembleStudy names four candidate datasets from one template (lines
// counted by hand: names is line 2, dataset.files.sst line 9).
const ensembleStudy = `ensemble:
  names: "{model}-{member}"
  over:
    model: [alpha, beta]
    member: [m1, m2]
  dataset:
    variables: {sst: tos}
    files:
      sst: "runs/{model}/{member}/sst.nc"
  each:
    beta-m2:
      variables: {sst: ts}
`

var ensembleFiles = []string{"runs/alpha/m1/sst.nc", "runs/alpha/m2/sst.nc", "runs/beta/m1/sst.nc", "runs/beta/m2/sst.nc", "sst.nc"}

// TestEnsembleExpands checks the expanded names, the placeholder filled in
// every string, and a per-dataset override laid over the template.
func TestEnsembleExpands(t *testing.T) {
	dir := dataDir(t, ensembleFiles...)
	r, err := config.Parse([]byte(ensembleStudy+"datasets:\n  obs:\n    files: {sst: sst.nc}\n"), "yaml", dir, noEnv)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, ds := range r.Datasets {
		names = append(names, ds.Name)
	}
	want := "alpha-m1 alpha-m2 beta-m1 beta-m2 obs"
	if got := strings.Join(names, " "); got != want {
		t.Fatalf("datasets %q, want %q", got, want)
	}
	cases := []struct{ name, file, variable string }{
		{"alpha-m1", "runs/alpha/m1/sst.nc", "tos"},
		{"alpha-m2", "runs/alpha/m2/sst.nc", "tos"},
		{"beta-m1", "runs/beta/m1/sst.nc", "tos"},
		{"beta-m2", "runs/beta/m2/sst.nc", "ts"}, // ensemble.each
	}
	for _, c := range cases {
		ds, err := r.Dataset(c.name)
		if err != nil {
			t.Fatal(err)
		}
		files := ds.Inputs["sst"]
		if len(files) != 1 || !strings.HasSuffix(files[0], c.file) {
			t.Errorf("%s: sst files %v, want …%s", c.name, files, c.file)
		}
		if got := ds.Variables["sst"]; got != c.variable {
			t.Errorf("%s: sst variable %q, want %q", c.name, got, c.variable)
		}
	}
}

// TestEnsembleProblems: each mistake is reported at its key and line.
func TestEnsembleProblems(t *testing.T) {
	cases := []struct {
		name, text, key string
		line            int
		msg             string
	}{
		{"bad placeholder in files", strings.Replace(ensembleStudy, "{member}/sst", "{membr}/sst", 1), "ensemble.dataset.files.sst", 9, `placeholder {membr} is not one of ensemble.over (member, model); did you mean "member"?`},
		{"bad placeholder in names", strings.Replace(ensembleStudy, `"{model}-{member}"`, `"{model}-{run}-{member}"`, 1), "ensemble.names", 2, "placeholder {run}"},
		{"names misses a placeholder", strings.Replace(ensembleStudy, `"{model}-{member}"`, `"{model}"`, 1), "ensemble.names", 2, "does not use {member}"},
		{"name clash with explicit dataset", ensembleStudy + "datasets:\n  alpha-m2:\n    files: {sst: sst.nc}\n", "datasets.alpha-m2", 14, `dataset "alpha-m2" is also named by the ensemble`},
		{"each names no member", strings.Replace(ensembleStudy, "    beta-m2:", "    beta-m3:", 1), "ensemble.each.beta-m3", 11, "is not one of the ensemble's datasets"},
		{"unknown ensemble key", ensembleStudy + "  ovr: 1\n", "ensemble.ovr", 13, `did you mean "over"?`},
		{"empty list", strings.Replace(ensembleStudy, "[m1, m2]", "[]", 1), "ensemble.over.member", 5, "non-empty list"},
		{"repeated value", strings.Replace(ensembleStudy, "[m1, m2]", "[m1, m1]", 1), "ensemble.over.member.1", 5, "given twice"},
		{"no template", "ensemble:\n  names: \"{m}\"\n  over: {m: [a]}\n", "ensemble.dataset", 1, "give the dataset table"},
		{"expanded dataset checked at its template line", strings.Replace(ensembleStudy, "    variables: {sst: tos}\n", "    variables: {sstt: tos}\n", 1), "datasets.alpha-m1.variables.sstt", 7, `did you mean "sst"?`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := dataDir(t, ensembleFiles...)
			_, err := config.Parse([]byte(c.text), "yaml", dir, noEnv)
			var found bool
			for _, p := range problems(t, err) {
				if p.Key == c.key && p.Line == c.line && strings.Contains(p.Msg, c.msg) {
					found = true
				}
			}
			if !found {
				t.Errorf("no problem at %s line %d containing %q; got:\n%v", c.key, c.line, c.msg, err)
			}
		})
	}
}

// TestREADMEEnsembleLoads: the README's ensemble example expands to the
// datasets it says.
func TestREADMEEnsembleLoads(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	var block string
	for _, m := range regexp.MustCompile("(?s)```yaml\n(.*?)```").FindAllStringSubmatch(string(b), -1) {
		if strings.HasPrefix(m[1], "ensemble:") {
			block = m[1]
		}
	}
	if block == "" {
		t.Fatal("README.md has no yaml block starting with ensemble:")
	}
	var files []string
	for _, m := range []string{"alpha", "beta"} {
		for _, e := range []string{"m1", "m2"} {
			files = append(files, "runs/"+m+"/"+e+"/sst_1.nc", "runs/"+m+"/"+e+"/cll_1.nc")
		}
	}
	r, err := config.Parse([]byte(block), "yaml", dataDir(t, files...), noEnv)
	if err != nil {
		t.Fatalf("%v\n%s", err, block)
	}
	var names []string
	for _, ds := range r.Datasets {
		names = append(names, ds.Name)
	}
	if got := strings.Join(names, ", "); got != "alpha-m1, alpha-m2, beta-m1, beta-m2" {
		t.Errorf("README ensemble gives %s", got)
	}
	if ds, _ := r.Dataset("beta-m2"); ds == nil || ds.Variables["sst"] != "ts" {
		t.Errorf("beta-m2 lacks its own sst variable")
	}
}
