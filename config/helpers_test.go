package config_test

import (
	"errors"
	"os"
	"path/filepath"
	"testing"

	"lidscope/config"
)

// noEnv keeps the process environment out of a test's Load.
var noEnv = config.LoadOptions{LookupEnv: config.NoEnvironment}

// dataDir makes a temporary folder holding empty files with the given
// names (the loader only checks that input files exist).
func dataDir(t testing.TB, names ...string) string {
	t.Helper()
	dir := t.TempDir()
	for _, n := range names {
		p := filepath.Join(dir, filepath.FromSlash(n))
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, nil, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return dir
}

func writeFile(t *testing.T, dir, name, text string) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// problems returns the problems of a Load error (failing if err is not a
// *config.Error).
func problems(t *testing.T, err error) []config.Problem {
	t.Helper()
	if err == nil {
		t.Fatal("Load succeeded; want problems")
	}
	var e *config.Error
	if !errors.As(err, &e) {
		t.Fatalf("error is %T, not *config.Error: %v", err, err)
	}
	return e.Problems
}

// baseFiles are the files the test studies name.
var baseFiles = []string{"sst.nc", "ta.nc", "cll.nc", "clt.nc", "lsm.nc", "sftof.nc", "ps.nc", "hurs.nc", "tdps.nc", "hus.nc", "siconc.nc", "tas.nc", "all.nc"}
