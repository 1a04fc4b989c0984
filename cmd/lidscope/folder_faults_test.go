package main

// Fault tests of the run folder as one unit (package runfolder), run on the
// real command line in child processes: the test binary re-runs itself as
// lidscope (TestMain), so the binary is built once, with the test.

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"syscall"
	"testing"
	"time"

	"lidscope/analysis"
	"lidscope/factors"
	"lidscope/figures"
	"lidscope/fixtures"
	"lidscope/internal/testutil"
	"lidscope/runfolder"
)

// asLidscope makes the test binary act as lidscope when set.
const asLidscope = "LIDSCOPE_TEST_AS_MAIN"

func TestMain(m *testing.M) {
	if os.Getenv(asLidscope) == "1" {
		main()
		return
	}
	// run --jobs starts this binary for its pieces: make it act as lidscope.
	childEnv = []string{asLidscope + "=1"}
	testutil.Main(m) // runs the tests, removes the shared worlds (testutil.World), exits
}

// lidscope returns a child process running the command line args.
func lidscope(t *testing.T, args ...string) (*exec.Cmd, *bytes.Buffer) {
	t.Helper()
	self, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(self, args...)
	cmd.Env = append(os.Environ(), asLidscope+"=1")
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	return cmd, &stderr
}

// study returns the study file of a small version of the synthetic demo
// world (invented data: 4° grid, four years), generated once per test
// binary and removed at the end by testutil.Main.
func study(t *testing.T) string {
	t.Helper()
	dir := testutil.World(t, "folder-faults", func(dir string) error {
		o := fixtures.DefaultOptions()
		o.Resolution = 4
		o.Years = 4
		o.YearsPerFile = 2
		_, err := fixtures.Generate(dir, o)
		return err
	})
	return filepath.Join(dir, fixtures.StudyFile)
}

// committedRun checks that dir holds one complete, committed run whose
// every file matches the manifest and whose run state is intact, and
// returns its manifest.
func committedRun(t *testing.T, dir string) *runfolder.Manifest {
	t.Helper()
	// every file a run of the demo study writes: the known names but the
	// figures folder and the factor files (written with a factors section only)
	var need []string
	for _, n := range analysis.KnownNames() {
		if n != figures.DefaultDirName && !slices.Contains(factors.OutputNames(), n) {
			need = append(need, n)
		}
	}
	f, err := runfolder.Open(dir, need...)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if err := f.Verify(); err != nil {
		t.Fatal(err)
	}
	f.Close()
	if _, _, err := analysis.LoadState(dir); err != nil {
		t.Fatal(err)
	}
	return f.Manifest
}

func names(m *runfolder.Manifest) string {
	var s []string
	for _, e := range append(m.Files, m.Extras...) {
		s = append(s, e.Name)
	}
	return strings.Join(s, " ")
}

// A run replacing an earlier one (--force) is killed with SIGKILL at many
// moments spread over the whole run, the last ones around the final move:
// each time the folder holds either the earlier complete run or the new
// complete run, every file matching its manifest, and the next run removes
// what the killed one left.
func TestKilledRunLeavesOldOrNewSet(t *testing.T) {
	t.Parallel() // child processes only; the shared world is read only
	out := filepath.Join(t.TempDir(), "run")
	st := study(t)
	start := time.Now()
	cmd, stderr := lidscope(t, "run", "--out", out, "--quiet", st)
	if err := cmd.Run(); err != nil {
		t.Fatalf("first run: %v\n%s", err, stderr)
	}
	full := time.Since(start)
	m := committedRun(t, out)
	want := names(m)
	var points []float64
	for i := 0; i < 4; i++ { // reading, computing, writing, drawing
		points = append(points, (float64(i)+0.5)/4)
	}
	points = append(points, 0.94, 0.97, 1.0, 1.03, 1.06)
	replaced := 0
	for _, p := range points {
		at := time.Duration(p * float64(full))
		cmd, _ := lidscope(t, "run", "--force", "--out", out, "--quiet", study(t))
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		time.Sleep(at)
		cmd.Process.Signal(syscall.SIGKILL)
		err := cmd.Wait()
		got := committedRun(t, out)
		if names(got) != want {
			t.Fatalf("killed at %v: the folder holds %s, want %s", at, names(got), want)
		}
		state := "the earlier run"
		if got.RunID != m.RunID {
			state = "a new run"
			replaced++
			m = got
		}
		t.Logf("killed at %.2f of a run (%v, %v): %s, %d leftovers", p, at.Round(time.Millisecond), err, state, len(runfolder.Leftovers(out)))
	}
	t.Logf("%d kills, %d found a new complete run", len(points), replaced)
	if len(runfolder.Leftovers(out)) == 0 { // the last kill came after the commit
		os.Mkdir(filepath.Join(filepath.Dir(out), ".run.lidscope-staging-killed"), 0o755)
	}
	cmd, stderr = lidscope(t, "run", "--force", "--no-plots", "--out", out, study(t))
	if err := cmd.Run(); err != nil {
		t.Fatalf("run after the kills: %v\n%s", err, stderr)
	}
	if !strings.Contains(stderr.String(), "removed the staging folder of an interrupted run") {
		t.Errorf("the run after the kills did not report the staging folder it removed: %s", stderr)
	}
	if l := runfolder.Leftovers(out); len(l) > 0 {
		t.Errorf("the next run left %v", l)
	}
	committedRun(t, out)
}

// waitFor polls until cond holds or the process ends.
func waitFor(t *testing.T, cmd *exec.Cmd, what string, cond func() bool) {
	t.Helper()
	for i := 0; i < 2000; i++ {
		if cond() {
			return
		}
		if cmd.ProcessState != nil {
			break
		}
		time.Sleep(5 * time.Millisecond)
	}
	t.Fatalf("%s never happened", what)
}

// While one run replaces a folder, a second run into it, and a plot, a
// merge or a comparison of it, fail at once and name the process; the
// first run then finishes.
func TestConcurrentRunsIntoOneFolder(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "run")
	var so, se bytes.Buffer
	if code := run([]string{"run", "--out", out, "--quiet", "--no-plots", study(t)}, &so, &se); code != 0 {
		t.Fatalf("run: exit %d\n%s", code, se.String())
	}
	first, stderr := lidscope(t, "run", "--force", "--out", out, "--quiet", study(t))
	done := make(chan error, 1)
	if err := first.Start(); err != nil {
		t.Fatal(err)
	}
	go func() { done <- first.Wait() }()
	pid := fmt.Sprintf("pid %d", first.Process.Pid)
	waitFor(t, first, "the lock", func() bool {
		b, _ := os.ReadFile(runfolder.LockPath(out))
		return bytes.Contains(b, []byte(pid))
	})
	for _, args := range [][]string{
		{"run", "--out", out, study(t)},
		{"run", "--force", "--out", out, study(t)},
		{"plot", out, "--out", filepath.Join(dir, "figs")},
		{"merge", out, out, "--out", filepath.Join(dir, "merged")},
		{"compare", out, out, "--out", filepath.Join(dir, "cmp")},
	} {
		second, errb := lidscope(t, args...)
		err := second.Run()
		var ee *exec.ExitError
		if !errors.As(err, &ee) || ee.ExitCode() != 1 || !strings.Contains(errb.String(), "in use by another lidscope process ("+pid) {
			t.Errorf("%v while another run writes: %v\n%s", args, err, errb)
		}
		select {
		case <-done:
			t.Fatalf("the first run ended before %v was refused: the refusal was not at once", args)
		default:
		}
	}
	if err := <-done; err != nil {
		t.Fatalf("first run: %v\n%s", err, stderr)
	}
	committedRun(t, out)
}

// SIGTERM and SIGHUP stop a run as Ctrl-C does: exit status 143 or 129,
// no staging folder left, the earlier run untouched.
func TestStopSignals(t *testing.T) {
	out := filepath.Join(t.TempDir(), "run")
	cmd, stderr := lidscope(t, "run", "--out", out, "--quiet", "--no-plots", study(t))
	if err := cmd.Run(); err != nil {
		t.Fatalf("first run: %v\n%s", err, stderr)
	}
	m := committedRun(t, out)
	for _, c := range []struct {
		sig    syscall.Signal
		status int
	}{{syscall.SIGTERM, 143}, {syscall.SIGHUP, 129}, {syscall.SIGINT, 130}} {
		cmd, stderr := lidscope(t, "run", "--force", "--out", out, "--quiet", study(t))
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		waitFor(t, cmd, "the staging folder", func() bool { return len(runfolder.Leftovers(out)) > 0 })
		time.Sleep(50 * time.Millisecond)
		cmd.Process.Signal(c.sig)
		err := cmd.Wait()
		var ee *exec.ExitError
		if !errors.As(err, &ee) || ee.ExitCode() != c.status || !strings.Contains(stderr.String(), "stopped by") {
			t.Errorf("%v: %v (want exit status %d)\n%s", c.sig, err, c.status, stderr)
		}
		if l := runfolder.Leftovers(out); len(l) > 0 {
			t.Errorf("%v left %v", c.sig, l)
		}
		if got := committedRun(t, out); got.RunID != m.RunID {
			t.Errorf("%v: the earlier run was replaced", c.sig)
		}
	}
}

// copyDir copies the regular files of a run folder (one level of
// subfolders).
func copyDir(t *testing.T, from, to string) {
	t.Helper()
	err := filepath.WalkDir(from, func(p string, d os.DirEntry, err error) error {
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(from, p)
		if d.IsDir() {
			return os.MkdirAll(filepath.Join(to, rel), 0o755)
		}
		b, err := os.ReadFile(p)
		if err != nil {
			return err
		}
		return os.WriteFile(filepath.Join(to, rel), b, 0o644)
	})
	if err != nil {
		t.Fatal(err)
	}
}

// plot, merge and compare refuse a folder without a complete committed
// run, name the missing files, exit with status 1 and write nothing.
func TestIncompleteFolderIsRefused(t *testing.T) {
	dir := t.TempDir()
	good := filepath.Join(dir, "good")
	var so, se bytes.Buffer
	if code := run([]string{"run", "--out", good, "--quiet", "--no-plots", study(t)}, &so, &se); code != 0 {
		t.Fatalf("run: exit %d\n%s", code, se.String())
	}
	noManifest := filepath.Join(dir, "no-manifest")
	copyDir(t, good, noManifest)
	os.Remove(filepath.Join(noManifest, runfolder.ManifestFile))
	os.Remove(filepath.Join(noManifest, "maps.nc"))
	noMaps := filepath.Join(dir, "no-maps")
	copyDir(t, good, noMaps)
	os.Remove(filepath.Join(noMaps, "maps.nc"))
	cut := filepath.Join(dir, "cut-state")
	copyDir(t, good, cut)
	os.Truncate(filepath.Join(cut, analysis.StateFile), 1000)
	for _, c := range []struct {
		args []string
		out  string // must not exist afterwards
		want []string
	}{
		{[]string{"plot", noManifest}, filepath.Join(noManifest, "figures"), []string{"not a complete lidscope run", "missing: run-manifest.json, maps.nc"}},
		{[]string{"plot", noMaps}, filepath.Join(noMaps, "figures"), []string{"missing: maps.nc"}},
		{[]string{"merge", "--out", filepath.Join(dir, "m1"), good, noMaps}, filepath.Join(dir, "m1"), []string{noMaps + " is not a complete lidscope run", "missing: maps.nc"}},
		{[]string{"merge", "--out", filepath.Join(dir, "m2"), good, cut}, filepath.Join(dir, "m2"), []string{cut, "changed since the run: run-state.gob"}},
		{[]string{"compare", "--out", filepath.Join(dir, "c1"), good, noManifest}, filepath.Join(dir, "c1"), []string{noManifest + " is not a complete lidscope run", "run-manifest.json"}},
		{[]string{"compare", "--out", filepath.Join(dir, "c2"), noMaps, good}, filepath.Join(dir, "c2"), []string{"missing: maps.nc"}},
	} {
		var so, se bytes.Buffer
		code := run(c.args, &so, &se)
		if code != 1 {
			t.Errorf("%v: exit %d, want 1\n%s", c.args, code, se.String())
		}
		for _, w := range c.want {
			if !strings.Contains(se.String(), w) {
				t.Errorf("%v: stderr %q lacks %q", c.args, se.String(), w)
			}
		}
		if _, err := os.Stat(c.out); err == nil {
			t.Errorf("%v wrote %s", c.args, c.out)
		}
	}
	// Figures that plot adds to a committed run keep it complete, and a
	// later --force run replaces them with the folder.
	for _, args := range [][]string{{"plot", good, "--only", "series"}, {"plot", good, "--only", "series", "--force"}} {
		if code := run(args, &so, &se); code != 0 {
			t.Fatalf("%v: exit %d\n%s", args, code, se.String())
		}
	}
	committedRun(t, good)
	if code := run([]string{"run", "--force", "--out", good, "--quiet", "--no-plots", study(t)}, &so, &se); code != 0 {
		t.Fatalf("run --force over plotted figures: exit %d\n%s", code, se.String())
	}
	if _, err := os.Stat(filepath.Join(good, "figures")); err == nil {
		t.Error("the figures of the earlier run survived its replacement")
	}
}

// mountTmpfs mounts a tmpfs with the options at dir (as root), or skips.
func mountTmpfs(t *testing.T, dir, opts string) {
	t.Helper()
	os.MkdirAll(dir, 0o755)
	if os.Geteuid() != 0 || exec.Command("mount", "-t", "tmpfs", "-o", opts, "tmpfs", dir).Run() != nil {
		t.Skip("needs root to mount a tmpfs (runfolder's tests cover the checks)")
	}
	t.Cleanup(func() { exec.Command("umount", dir).Run() })
}

// An output folder on a read-only file system, or on one without room for
// the estimated outputs, is refused before any computation, naming the
// folder.
func TestPreflightRefusesBeforeComputing(t *testing.T) {
	dir := t.TempDir()
	ro, small := filepath.Join(dir, "ro"), filepath.Join(dir, "small")
	mountTmpfs(t, ro, "ro,size=1m")
	mountTmpfs(t, small, "size=1m")
	for _, c := range []struct{ out, want string }{
		{filepath.Join(ro, "run"), ro + " must be writable"},
		{filepath.Join(small, "run"), "no room for the outputs in " + small},
	} {
		var so, se bytes.Buffer
		if code := run([]string{"run", "--out", c.out, "--quiet", study(t)}, &so, &se); code != 1 || !strings.Contains(se.String(), c.want) {
			t.Errorf("run --out %s: exit %d, %q; want 1 and %q", c.out, code, se.String(), c.want)
		}
		if _, err := os.Stat(c.out); err == nil {
			t.Errorf("%s was created", c.out)
		}
	}
}
