package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"lidscope/fixtures"
)

// ensembleWorld writes a synthetic reference world (invented data) into
// dir/obs and n synthetic candidate worlds, each with its own planted
// cloud slope and seed, into dir/runs/MODEL/rK, and a study dir/study.yaml
// with the reference and an ensemble block of the folders form.
func ensembleWorld(t *testing.T, dir string, n int) string {
	t.Helper()
	models := []string{"alpha", "beta", "gamma"}
	o := fixtures.DefaultOptions()
	o.Resolution, o.Years, o.YearsPerFile = 5, 2, 2
	o.Command = []string{"lidscope-test", "ensemble"}
	if _, err := fixtures.Generate(filepath.Join(dir, "obs"), o); err != nil {
		t.Fatal(err)
	}
	for i := 0; i < n; i++ {
		c := o
		c.Seed = uint64(100 + i)
		c.Physics.CloudSlope = o.Physics.CloudSlope * (0.5 + 0.25*float64(i))
		if _, err := fixtures.Generate(filepath.Join(dir, "runs", models[i%3], fmt.Sprintf("r%d", i/3+1)), c); err != nil {
			t.Fatal(err)
		}
	}
	b, err := os.ReadFile(filepath.Join(dir, "obs", fixtures.StudyFile))
	if err != nil {
		t.Fatal(err)
	}
	text := string(b)
	i, j := strings.Index(text, "datasets:\n"), strings.Index(text, "analysis:\n")
	body := text[i+len("datasets:\n") : j]
	body = body[strings.Index(body, "\n")+1:] // the dataset's keys, without its name
	files := regexp.MustCompile(`(?m)^(      \w+: )"([^"]+)"`)
	obs := files.ReplaceAllString(body, `$1"obs/$2"`)
	cand := regexp.MustCompile(`(?m)^`).ReplaceAllString(strings.TrimRight(files.ReplaceAllString(body, `$1"{folder}/$2"`), "\n"), "  ")
	study := "# a synthetic reference and ensemble (invented data)\ndatasets:\n  obs:\n" + obs +
		"ensemble:\n  names: \"{model}-{member}\"\n  folders: \"runs/{model}/{member}\"\n  dataset:\n" + cand + "\n" + text[j:]
	p := filepath.Join(dir, "study.yaml")
	if err := os.WriteFile(p, []byte(study), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// The folders form end to end: study check and inspect STUDY list the
// expanded datasets with their folders (inspect checking every file);
// compare STUDY with five candidates draws an ensemble figure per
// sensitivity and no compare_sensitivities; plot redraws the ensemble
// figures from the comparison folder byte for byte.
func TestEnsembleFoldersEndToEnd(t *testing.T) {
	dir := t.TempDir()
	study := ensembleWorld(t, dir, 5)
	var out, errb bytes.Buffer
	if code := run([]string{"study", "check", study}, &out, &errb); code != 0 {
		t.Fatalf("study check: exit %d: %s", code, errb.String())
	}
	for _, w := range []string{"# ensemble: 5 datasets\n", "#   alpha-r1  folder runs/alpha/r1\n", "#   beta-r2   folder runs/beta/r2\n"} {
		if !strings.Contains(out.String(), w) {
			t.Errorf("study check lacks %q:\n%s", w, out.String())
		}
	}
	out.Reset()
	if code := run([]string{"inspect", study}, &out, &errb); code != 0 {
		t.Fatalf("inspect STUDY: exit %d: %s\n%s", code, errb.String(), out.String())
	}
	for _, w := range []string{"6 dataset(s)", "dataset gamma-r1 (ensemble, folder runs/gamma/r1)", "runs/gamma/r1/sst/", "[usable]"} {
		if !strings.Contains(out.String(), w) {
			t.Errorf("inspect STUDY lacks %q:\n%s", w, out.String())
		}
	}
	out.Reset()
	if code := run([]string{"inspect", study, "--json"}, &out, &errb); code != 0 {
		t.Fatalf("inspect STUDY --json: exit %d: %s", code, errb.String())
	}
	var doc struct {
		Datasets []struct {
			Name, Folder string
			Files        map[string][]struct{ Usable bool }
		}
	}
	if err := json.Unmarshal(out.Bytes(), &doc); err != nil || len(doc.Datasets) != 6 || doc.Datasets[2].Folder != "runs/alpha/r2" || len(doc.Datasets[2].Files["sst"]) != 1 {
		t.Errorf("inspect --json: %v %+v", err, doc)
	}
	// a damaged file of one candidate: NOT USABLE, exit status 1
	bad, _ := filepath.Glob(filepath.Join(dir, "runs", "beta", "r1", "sst", "*.nc"))
	if len(bad) != 1 {
		t.Fatalf("beta-r1's SST files: %v", bad)
	}
	keep, _ := os.ReadFile(bad[0])
	os.WriteFile(bad[0], keep[:len(keep)/3], 0o644)
	out.Reset()
	if code := run([]string{"inspect", study}, &out, &errb); code != 1 || !strings.Contains(out.String(), "[NOT USABLE]") {
		t.Errorf("a damaged file: exit %d:\n%s", code, out.String())
	}
	os.WriteFile(bad[0], keep, 0o644)

	cmp := filepath.Join(dir, "cmp")
	out.Reset()
	if code := run([]string{"compare", study, "--out", cmp, "--no-coastlines", "--set", "output.plots=false"}, &out, &errb); code != 0 {
		t.Fatalf("compare: exit %d: %s", code, errb.String())
	}
	figs, _ := filepath.Glob(filepath.Join(cmp, "figures", "compare_ensemble_*.png"))
	var names []string
	for _, f := range figs {
		names = append(names, filepath.Base(f))
	}
	if got := strings.Join(names, " "); got != "compare_ensemble_low_cloud_on_eis.png compare_ensemble_low_cloud_on_lts.png compare_ensemble_low_cloud_partial_eis_given_sst.png compare_ensemble_low_cloud_partial_sst_given_eis.png" {
		t.Errorf("ensemble figures: %s", got)
	}
	if _, err := os.Stat(filepath.Join(cmp, "figures", "compare_sensitivities.png")); err == nil {
		t.Error("compare_sensitivities drawn for five candidates")
	}
	again := filepath.Join(dir, "again")
	only := strings.Join([]string{"compare_ensemble_low_cloud_on_eis", "compare_ensemble_low_cloud_on_lts"}, ",")
	if code := run([]string{"plot", cmp, "--only", only, "--out", again}, &out, &errb); code != 0 {
		t.Fatalf("plot COMPARISON: exit %d: %s", code, errb.String())
	}
	for _, n := range []string{"compare_ensemble_low_cloud_on_eis.png", "compare_ensemble_low_cloud_on_lts.png"} {
		a, _ := os.ReadFile(filepath.Join(cmp, "figures", n))
		b, err := os.ReadFile(filepath.Join(again, n))
		if err != nil || len(a) == 0 || !bytes.Equal(a, b) {
			t.Errorf("%s redrawn differs (%v)", n, err)
		}
	}
}
