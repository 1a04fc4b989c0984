package config_test

import (
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"lidscope/config"
)

// folderStudy names one candidate per folder runs/MODEL/MEMBER (lines
// counted by hand: names is line 2, folders line 3, files.sst line 6).
const folderStudy = `ensemble:
  names: "{model}-{member}"
  folders: "runs/{model}/{member}"
  dataset:
    files:
      sst: "{folder}/sst_*.nc"
  each:
    beta-r1:
      variables: {sst: ts}
datasets:
  obs:
    files: {sst: sst.nc}
`

// folderFiles: three member folders, a file where a folder could be
// (runs/gamma is not a folder), and a model folder without member
// folders (runs/delta).
var folderFiles = []string{"runs/alpha/r1/sst_1.nc", "runs/alpha/r2/sst_1.nc", "runs/beta/r1/sst_1.nc",
	"runs/gamma", "runs/delta/sst_1.nc", "sst.nc"}

// TestEnsembleFolders: every folder matching ensemble.folders is one
// dataset, named from the matched folder names; {folder} is the matched
// folder; over can fill a placeholder first; each applies by name.
func TestEnsembleFolders(t *testing.T) {
	cases := []struct {
		name, text, want string
	}{
		{"every folder", folderStudy, "alpha-r1 alpha-r2 beta-r1 obs"},
		{"over fills model first", strings.Replace(folderStudy, "  folders:", "  over: {model: [alpha]}\n  folders:", 1) +
			"", "alpha-r1 alpha-r2 obs"},
		{"glob syntax beside a placeholder", strings.Replace(strings.Replace(folderStudy, `"runs/{model}/{member}"`, `"runs/{model}/*1"`, 1), `"{model}-{member}"`, `"{model}"`, 1), "alpha beta obs"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			text := c.text
			if c.name == "over fills model first" || c.name == "glob syntax beside a placeholder" {
				text = strings.Replace(text, "  each:\n    beta-r1:\n      variables: {sst: ts}\n", "", 1)
			}
			dir := dataDir(t, folderFiles...)
			r, err := config.Parse([]byte(text), "yaml", dir, noEnv)
			if err != nil {
				t.Fatal(err)
			}
			var names []string
			for _, ds := range r.Datasets {
				names = append(names, ds.Name)
			}
			if got := strings.Join(names, " "); got != c.want {
				t.Errorf("datasets %q, want %q", got, c.want)
			}
		})
	}
	dir := dataDir(t, folderFiles...)
	r, err := config.Parse([]byte(folderStudy), "yaml", dir, noEnv)
	if err != nil {
		t.Fatal(err)
	}
	var members []string
	for _, m := range r.Ensemble {
		members = append(members, m.Name+"="+m.Folder+"("+m.Values["model"]+","+m.Values["member"]+")")
	}
	if got, want := strings.Join(members, " "), "alpha-r1=runs/alpha/r1(alpha,r1) alpha-r2=runs/alpha/r2(alpha,r2) beta-r1=runs/beta/r1(beta,r1)"; got != want {
		t.Errorf("members %s, want %s", got, want)
	}
	for _, c := range []struct{ name, file, variable string }{{"alpha-r2", "runs/alpha/r2/sst_1.nc", ""}, {"beta-r1", "runs/beta/r1/sst_1.nc", "ts"}} {
		ds, err := r.Dataset(c.name)
		if err != nil {
			t.Fatal(err)
		}
		if fs := ds.Inputs["sst"]; len(fs) != 1 || !strings.HasSuffix(fs[0], c.file) {
			t.Errorf("%s: sst files %v, want …%s", c.name, fs, c.file)
		}
		if ds.Variables["sst"] != c.variable {
			t.Errorf("%s: sst variable %q, want %q", c.name, ds.Variables["sst"], c.variable)
		}
	}
	// a folder without the files: a problem of that dataset's files
	if _, err := config.Parse([]byte(strings.Replace(folderStudy, "{folder}/sst_*.nc", "{folder}/deep/sst_*.nc", 1)), "yaml", dir, noEnv); err == nil ||
		!strings.Contains(err.Error(), `dataset "alpha-r1", role sst: no file matches "runs/alpha/r1/deep/sst_*.nc"`) {
		t.Errorf("folders without the files: %v, want the datasets' file problems", err)
	}
}

// TestEnsembleFoldersProblems: each mistake of the folders form is
// reported at its key and line.
func TestEnsembleFoldersProblems(t *testing.T) {
	cases := []struct {
		name, text, key string
		line            int
		msg             string
	}{
		{"no folder matches", strings.Replace(folderStudy, "runs/{model}/{member}", "models/{model}/{member}", 1), "ensemble.folders", 3, "matches no folder"},
		{"names run together", strings.Replace(folderStudy, `"{model}-{member}"`, `"{model}{member}"`, 1) + "  ab:\n    files: {sst: sst.nc}\n", "ensemble.names", 2, ""},
		{"no placeholder of its own", strings.Replace(folderStudy, "runs/{model}/{member}", "runs/alpha/r1", 1), "ensemble.folders", 3, "has no {placeholder}"},
		{"folder is reserved", strings.Replace(folderStudy, "runs/{model}/{member}", "runs/{folder}/{member}", 1), "ensemble.folders", 3, "is the matched folder itself"},
		{"names misses a folder placeholder", strings.Replace(folderStudy, `"{model}-{member}"`, `"{model}"`, 1), "ensemble.names", 2, "does not use {member}"},
		{"unknown placeholder in files", strings.Replace(folderStudy, "{folder}/sst", "{foldr}/sst", 1), "ensemble.dataset.files.sst", 6, `placeholder {foldr} is not one of ensemble.over or ensemble.folders`},
		{"name clash with datasets", strings.Replace(folderStudy, "  obs:\n", "  alpha-r1:\n", 1), "datasets.alpha-r1", 11, "also named by the ensemble"},
		{"each names no dataset", strings.Replace(folderStudy, "    beta-r1:", "    beta-r2:", 1), "ensemble.each.beta-r2", 8, "is not one of the ensemble's datasets"},
	}
	// runs/a/bc and runs/ab/c both give "abc" with names "{model}{member}"
	files := append(append([]string{}, folderFiles...), "runs/a/bc/sst_1.nc", "runs/ab/c/sst_1.nc")
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := dataDir(t, files...)
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
			if c.name == "names run together" && !strings.Contains(err.Error(), `folder runs/a/bc and folder runs/ab/c both give the dataset name "abc"`) {
				t.Errorf("the clash does not name both folders: %v", err)
			}
		})
	}
}

// TestREADMEEnsembleFoldersLoads: the README's folders example expands to
// one dataset per member folder.
func TestREADMEEnsembleFoldersLoads(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	var block string
	for _, m := range regexp.MustCompile("(?s)```yaml\n(.*?)```").FindAllStringSubmatch(string(b), -1) {
		if strings.Contains(m[1], "  folders:") {
			block = m[1]
		}
	}
	if block == "" {
		t.Fatal("README.md has no yaml block with an ensemble's folders")
	}
	dir := dataDir(t, "runs/alpha/r1/sst_1.nc", "runs/alpha/r1/cll_1.nc", "runs/beta/r2/sst_1.nc", "runs/beta/r2/cll_1.nc")
	r, err := config.Parse([]byte(block), "yaml", dir, noEnv)
	if err != nil {
		t.Fatalf("%v\n%s", err, block)
	}
	var names []string
	for _, ds := range r.Datasets {
		names = append(names, ds.Name+":"+filepath.Base(filepath.Dir(ds.Inputs["low_cloud"][0])))
	}
	if got := strings.Join(names, ", "); got != "alpha-r1:r1, beta-r2:r2" {
		t.Errorf("README folders ensemble gives %s", got)
	}
}
