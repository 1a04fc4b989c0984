package main

import (
	"bytes"
	"lidscope/internal/testutil"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/config"
)

// studySample compiles the synthetic sample of fixtures/sample (invented
// values: SST in degC, air temperature on pressure levels, low cloud in
// percent) into dir/name with ncgen.
func studySample(t *testing.T, dir, name string) string {
	t.Helper()
	return testutil.CompileCDL(t, filepath.Join("..", "..", "fixtures", "sample", "sample.cdl"), filepath.Join(dir, name))
}

func TestStudyInitPrints(t *testing.T) {
	nc := studySample(t, t.TempDir(), "sample.nc")
	var out, errb bytes.Buffer
	if code := run([]string{"study", "init", nc}, &out, &errb); code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	for _, s := range []string{`sst: "` + nc + `"`, `air_temperature: "ta"`, `low_cloud: "cll"`, "datasets:", "analysis:"} {
		if !strings.Contains(out.String(), s) {
			t.Errorf("output lacks %q:\n%s", s, out.String())
		}
	}
}

func TestStudyInitWrites(t *testing.T) {
	data := t.TempDir()
	nc := studySample(t, data, "sample.nc")
	studies := filepath.Join(t.TempDir(), "studies")
	if err := os.Mkdir(studies, 0o755); err != nil {
		t.Fatal(err)
	}
	outFile := filepath.Join(studies, "r.yaml")
	var out, errb bytes.Buffer
	// flags after the files are accepted too
	if code := run([]string{"study", "init", nc, "--output", outFile}, &out, &errb); code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	if !strings.Contains(out.String(), "it loads") || errb.Len() != 0 {
		t.Errorf("stdout %q, stderr %q", out.String(), errb.String())
	}
	text, err := os.ReadFile(outFile)
	if err != nil {
		t.Fatal(err)
	}
	// the file is named relative to the study's folder
	rel, _ := filepath.Rel(studies, nc)
	if !strings.Contains(string(text), `sst: "`+rel+`"`) {
		t.Errorf("study does not name %s:\n%s", rel, text)
	}
	r, err := config.Load(outFile, config.LoadOptions{LookupEnv: config.NoEnvironment})
	if err != nil {
		t.Fatal(err)
	}
	if got := r.Datasets[0].Inputs["sst"]; len(got) != 1 || filepath.Clean(got[0]) != filepath.Join(studies, rel) {
		t.Errorf("sst input %v", got)
	}

	// no overwrite without --force
	out.Reset()
	errb.Reset()
	if err := os.WriteFile(outFile, []byte("keep me"), 0o644); err != nil {
		t.Fatal(err)
	}
	if code := run([]string{"study", "init", "-o", outFile, nc}, &out, &errb); code != 1 || !strings.Contains(errb.String(), "--force") {
		t.Errorf("exit %d, stderr %q", code, errb.String())
	}
	if b, _ := os.ReadFile(outFile); string(b) != "keep me" {
		t.Error("file overwritten without --force")
	}
	if code := run([]string{"study", "init", "-f", "--output", outFile, nc}, &out, &errb); code != 0 {
		t.Errorf("--force: exit %d, stderr %q", code, errb.String())
	}
	if b, _ := os.ReadFile(outFile); string(b) == "keep me" {
		t.Error("--force did not overwrite")
	}

	// study check prints the resolved study and its hash, with overrides
	out.Reset()
	errb.Reset()
	if code := run([]string{"study", "check", outFile, "--set", "analysis.threshold=1.0"}, &out, &errb); code != 0 {
		t.Fatalf("check: exit %d: %s", code, errb.String())
	}
	r, err = config.Load(outFile, config.LoadOptions{LookupEnv: config.NoEnvironment, Flags: map[string]string{"analysis.threshold": "1.0"}})
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(out.String(), "# sha256 "+r.Hash()) || !strings.Contains(out.String(), `"threshold": 1,`) ||
		!strings.Contains(out.String(), "# analysis.threshold = 1.0 (flag analysis.threshold)") {
		t.Errorf("check output:\n%s", out.String())
	}
}

// TestStudyInitIncomplete: a starter that lacks required roles is still
// written, with a note naming what is missing.
func TestStudyInitIncomplete(t *testing.T) {
	dir := t.TempDir()
	// a file with no usable variable
	bad := filepath.Join(dir, "not-netcdf.nc")
	if err := os.WriteFile(bad, []byte("plain text"), 0o644); err != nil {
		t.Fatal(err)
	}
	outFile := filepath.Join(dir, "r.yaml")
	var out, errb bytes.Buffer
	if code := run([]string{"study", "init", "--output", outFile, bad}, &out, &errb); code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	if !strings.Contains(errb.String(), "does not load yet") || !strings.Contains(errb.String(), "needs files for role sst") {
		t.Errorf("stderr %q", errb.String())
	}
	text, _ := os.ReadFile(outFile)
	if !strings.Contains(string(text), "# not used: not-netcdf.nc") || !strings.Contains(string(text), "# MISSING: no file gave sst") {
		t.Errorf("study:\n%s", text)
	}
}

func TestStudyUsage(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct {
		args   []string
		code   int
		msg    string
		stdout bool // msg is on stdout (help), not stderr
	}{
		{[]string{"study"}, 2, "give a subcommand", false},
		{[]string{"study", "make"}, 2, "unknown subcommand", false},
		{[]string{"study", "init"}, 2, "at least one NetCDF file", false},
		{[]string{"study", "init", "--output", "r.toml", "x.nc"}, 2, "name the file .yaml", false},
		{[]string{"study", "init", "--out", "r.yaml", "x.nc"}, 2, "--output FILE", false},
		{[]string{"study", "init", "--bogus", "x.nc"}, 2, "unknown flag --bogus", false},
		{[]string{"study", "check"}, 2, "exactly one study", false},
		{[]string{"study", "check", "--set", "novalue", "r.yaml"}, 2, "KEY=VALUE", false},
		{[]string{"study", "check", filepath.Join(dir, "missing.yaml")}, 1, "missing.yaml", false},
		{[]string{"study", "init", "-h"}, 0, "lidscope study init FILE...", true},
	} {
		var out, errb bytes.Buffer
		code := run(c.args, &out, &errb)
		got := errb.String()
		if c.stdout {
			got = out.String()
		}
		if code != c.code || !strings.Contains(got, c.msg) {
			t.Errorf("%v: exit %d, output %q; want %d and %q", c.args, code, got, c.code, c.msg)
		}
	}
	// a study with problems: exit 1, every problem listed
	p := filepath.Join(dir, "bad.yaml")
	os.WriteFile(p, []byte("datasets:\n  x:\n    about: no files\nanalysis:\n  treshold: 1\n"), 0o644)
	var out, errb bytes.Buffer
	if code := run([]string{"study", "check", p}, &out, &errb); code != 1 ||
		!strings.Contains(errb.String(), p+":5: analysis.treshold") || !strings.Contains(errb.String(), p+":2: datasets.x") {
		t.Errorf("exit %d, stderr %q", code, errb.String())
	}
}
