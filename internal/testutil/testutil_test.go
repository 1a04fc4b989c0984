package testutil

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
)

func TestMain(m *testing.M) { Main(m) }

// recorder is a testing.TB that records Skipf and Fatalf instead of
// ending the goroutine, so the rule for missing tools can be checked.
type recorder struct {
	testing.TB
	skipped, failed string
}

func (r *recorder) Helper()                           {}
func (r *recorder) Skipf(format string, args ...any)  { r.skipped = fmt.Sprintf(format, args...) }
func (r *recorder) Fatalf(format string, args ...any) { r.failed = fmt.Sprintf(format, args...) }

// A missing tool skips without CI and fails with it, naming the Debian
// package; a present one returns its path.
func TestToolMissingSkipsUnlessCI(t *testing.T) {
	for _, ci := range []string{"", "true"} {
		t.Run("CI="+ci, func(t *testing.T) {
			t.Setenv("CI", ci)
			t.Setenv("PATH", t.TempDir()) // nothing on PATH
			r := &recorder{TB: t}
			Tool(r, "ncdump")
			got, other := r.skipped, r.failed
			if ci != "" {
				got, other = r.failed, r.skipped
			}
			if !strings.Contains(got, "ncdump not found") || !strings.Contains(got, "netcdf-bin") || other != "" {
				t.Errorf("skipped %q, failed %q", r.skipped, r.failed)
			}
		})
	}
	dir := t.TempDir()
	exe := filepath.Join(dir, "ncdump")
	if err := os.WriteFile(exe, []byte("#!/bin/sh\n"), 0o755); err != nil {
		t.Fatal(err)
	}
	t.Setenv("PATH", dir)
	r := &recorder{TB: t}
	if p := Tool(r, "ncdump"); p != exe || r.skipped != "" || r.failed != "" {
		t.Errorf("Tool = %q (skipped %q, failed %q), want %s", p, r.skipped, r.failed, exe)
	}
}

func TestRealDataUnset(t *testing.T) {
	t.Setenv(RealDataEnv, "")
	t.Setenv("CI", "")
	r := &recorder{TB: t}
	RealData(r, "cdf/x.nc")
	if !strings.Contains(r.skipped, RealDataEnv) || r.failed != "" {
		t.Errorf("skipped %q, failed %q", r.skipped, r.failed)
	}
}

// Python prefers the first python3 on PATH when it imports the modules
// and otherwise takes Debian's; a module nobody has is reported with the
// Debian package names.
func TestPythonChoice(t *testing.T) {
	if _, err := os.Stat(DebianPython); err != nil {
		t.Skip("no " + DebianPython)
	}
	dir := t.TempDir()
	// A python3 on PATH that imports nothing (exits 1 for -c).
	fake := filepath.Join(dir, "python3")
	if err := os.WriteFile(fake, []byte("#!/bin/sh\nexit 1\n"), 0o755); err != nil {
		t.Fatal(err)
	}
	t.Setenv("PATH", dir)
	if r := findPython([]string{"json"}); r.err != nil || r.path != DebianPython {
		t.Errorf("with a broken python3 first on PATH: %+v, want %s", r, DebianPython)
	}
	if r := findPython(nil); r.path != fake {
		t.Errorf("without modules: %+v, want the first on PATH %s", r, fake)
	}
	r := findPython([]string{"xarray", "no_such_module_here"})
	if r.err == nil || !strings.Contains(r.err.Error(), "python3-xarray") || !strings.Contains(r.err.Error(), fake) {
		t.Errorf("missing module: %v", r.err)
	}
}

// A shared world is built once however many tests ask at once; a private
// world is a copy the test may change.
func TestWorldBuiltOnce(t *testing.T) {
	var mu sync.Mutex
	builds := 0
	build := func(dir string) error {
		mu.Lock()
		builds++
		mu.Unlock()
		return os.WriteFile(filepath.Join(dir, "f.txt"), []byte("x"), 0o644)
	}
	var wg sync.WaitGroup
	dirs := make([]string, 8)
	for i := range dirs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			dirs[i] = World(t, "once", build)
		}()
	}
	wg.Wait()
	if builds != 1 {
		t.Errorf("built %d times, want once", builds)
	}
	for _, d := range dirs {
		if d != dirs[0] {
			t.Errorf("folders differ: %s, %s", d, dirs[0])
		}
	}
	p := PrivateWorld(t, "once", build)
	if p == dirs[0] {
		t.Fatal("the private world is the shared folder")
	}
	if err := os.WriteFile(filepath.Join(p, "f.txt"), []byte("changed"), 0o644); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(filepath.Join(dirs[0], "f.txt")); string(b) != "x" {
		t.Errorf("changing the private world changed the shared one: %q", b)
	}
	r := &recorder{TB: t}
	World(r, "broken", func(string) error { return errors.New("no disk") })
	if !strings.Contains(r.failed, "no disk") {
		t.Errorf("a failed build: failed %q", r.failed)
	}
}

// CDL compiles with ncgen into a NetCDF-4 file (HDF5 signature, the
// format netCDF-4 files have: HDF5 File Format Specification §II.A, from
// memory).
func TestCDL(t *testing.T) {
	out := CDL(t, "netcdf x {\ndimensions:\n\tn = 2 ;\nvariables:\n\tint v(n) ;\ndata:\n\tv = 1, 2 ;\n}\n", filepath.Join(t.TempDir(), "x.nc"))
	b, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	if len(b) < 8 || string(b[1:4]) != "HDF" {
		t.Errorf("%s does not start with the HDF5 signature: % x", out, b[:min(8, len(b))])
	}
}
