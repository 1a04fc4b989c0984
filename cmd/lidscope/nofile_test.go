package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"lidscope/fixtures"
	"lidscope/internal/testutil"
)

// TestRunManyFilesLowFileLimit: a record of 48 monthly files per role
// (four years of sst, air_temperature and low_cloud, split by month with
// cdo splityearmon; 144 files, more than twice the limit) runs with an open-file limit of 64 (ulimit -n 64), set
// with setrlimit in a child process: lidscope opens the files of a record
// as it reads them, a bounded number at once. Before, each role's record
// held every one of its files open from the start.
func TestRunManyFilesLowFileLimit(t *testing.T) {
	const child = "LIDSCOPE_TEST_NOFILE_STUDY"
	if study := os.Getenv(child); study != "" {
		if err := syscall.Setrlimit(syscall.RLIMIT_NOFILE, &syscall.Rlimit{Cur: 64, Max: 64}); err != nil {
			t.Fatal(err)
		}
		out := filepath.Join(t.TempDir(), "results")
		code, stdout, stderr := badRun(t, "--quiet", "--no-plots", "--out", out, study)
		if code != 0 || !strings.Contains(stdout, "48 time steps") {
			t.Fatalf("exit status %d\nstdout:\n%s\nstderr:\n%s", code, stdout, stderr)
		}
		return
	}
	t.Parallel() // here, not in the child, which sets environment variables
	cdo := testutil.Tool(t, "cdo")
	o := badOptions()
	o.Resolution = 4
	o.Years = 4 // 48 monthly files per role, 144 in all, over the limit of 64
	o.YearsPerFile = 4
	d := filepath.Join(t.TempDir(), "world")
	if _, err := fixtures.Generate(d, o); err != nil {
		t.Fatal(err)
	}
	for _, sub := range []string{"sst", "air_temperature", "low_cloud"} {
		f := badFiles(t, d, sub, 1)[0]
		prefix := filepath.Join(d, sub, sub+"_")
		if b, err := exec.Command(cdo, "-s", "splityearmon", f, prefix).CombinedOutput(); err != nil {
			t.Fatalf("cdo splityearmon %s: %v\n%s", f, err, b)
		}
		if err := os.Remove(f); err != nil {
			t.Fatal(err)
		}
		badFiles(t, d, sub, 48)
	}
	study := badStudy(t, d, nil)
	cmd := exec.Command(os.Args[0], "-test.run=^TestRunManyFilesLowFileLimit$", "-test.count=1", "-test.v")
	cmd.Env = append(os.Environ(), child+"="+study)
	var out bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &out
	err := cmd.Run()
	if err != nil || !strings.Contains(out.String(), "--- PASS: TestRunManyFilesLowFileLimit") {
		t.Fatalf("the run with ulimit -n 64 failed (%v):\n%s", err, out.String())
	}
}
