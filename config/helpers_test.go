package config_test

import (
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/config"
)

// need skips the test when an external tool is missing, unless CI is set,
// in which case it fails (CI installs the tools).
func need(t *testing.T, tool string) string {
	t.Helper()
	p, err := exec.LookPath(tool)
	if err != nil {
		if os.Getenv("CI") != "" {
			t.Fatalf("%s is required in CI but not found: %v", tool, err)
		}
		t.Skipf("%s not found; skipping (install it, or set CI=true to make this a failure)", tool)
	}
	return p
}

// python returns Debian's /usr/bin/python3 after checking that it can
// import the modules given (skip or fail as need does).
func python(t *testing.T, modules ...string) string {
	t.Helper()
	const py = "/usr/bin/python3"
	if _, err := os.Stat(py); err != nil {
		if os.Getenv("CI") != "" {
			t.Fatalf("%s is required in CI: %v", py, err)
		}
		t.Skipf("%s not found; skipping", py)
	}
	if len(modules) > 0 {
		out, err := exec.Command(py, "-c", "import "+strings.Join(modules, ", ")).CombinedOutput()
		if err != nil {
			if os.Getenv("CI") != "" {
				t.Fatalf("%s cannot import %v (CI must install them): %v\n%s", py, modules, err, out)
			}
			t.Skipf("%s cannot import %v; skipping: %s", py, modules, out)
		}
	}
	return py
}

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
