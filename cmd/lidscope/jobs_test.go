package main

import (
	"bytes"
	"context"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"lidscope/internal/runcmp"
	"lidscope/runfolder"
)

// jobsKeys differ between run --jobs N and one process by design: the
// notes (the merged run says it was computed in pieces).
var jobsKeys = []string{"notes", "processing_notes"}

// run --jobs 2 (two child processes of this binary, merged) gives the
// results of --jobs 1, file by file (to float32 rounding: maps are stored
// as float32 and merged moments are summed in another order).
func TestJobsTwoEqualsJobsOne(t *testing.T) {
	dir := t.TempDir()
	s := study(t)
	res := map[int]string{}
	for _, jobs := range []int{1, 2} {
		out := filepath.Join(dir, "jobs"+string(rune('0'+jobs)))
		var stdout, stderr bytes.Buffer
		o := runOptions{Study: s, Out: out, NoPlots: true, Jobs: jobs, Set: setFlags{}, Log: logOptions{Format: "text"}}
		if err := runRun(context.Background(), o, &stdout, &stderr); err != nil {
			t.Fatalf("--jobs %d: %v\n%s", jobs, err, stderr.String())
		}
		if got := strings.Contains(stdout.String(), "computed as 2 pieces"); got != (jobs == 2) {
			t.Errorf("--jobs %d: the summary says pieces %v:\n%s", jobs, got, stdout.String())
		}
		committedRun(t, out)
		res[jobs] = out
	}
	d, err := runcmp.Folders(res[1], res[2], runcmp.Options{Tol: 1e-6, IgnoreKeys: jobsKeys})
	if err != nil {
		t.Fatal(err)
	}
	for _, x := range d {
		t.Errorf("--jobs 2 differs from --jobs 1: %s", x)
	}
	if left, _ := filepath.Glob(filepath.Join(dir, ".lidscope-pieces-*")); len(left) > 0 {
		t.Errorf("pieces folders left: %v", left)
	}
}

// SIGTERM to run --jobs 2 stops both children and leaves neither the
// output folder nor the pieces: exit status 143.
func TestJobsStopSignal(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "run")
	cmd, stderr := lidscope(t, "run", "--jobs", "2", "--workers", "2", "--out", out, "--quiet", study(t))
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	waitFor(t, cmd, "the pieces' staging folders", func() bool { return len(piecesStaging(dir)) > 0 })
	cmd.Process.Signal(syscall.SIGTERM)
	err := cmd.Wait()
	var ee *exec.ExitError
	if !errors.As(err, &ee) {
		t.Skipf("the run ended before the signal (%v): too fast to interrupt here", err)
	}
	if ee.ExitCode() != 143 {
		t.Errorf("exit status %d, want 143\n%s", ee.ExitCode(), stderr.String())
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("the output folder exists after SIGTERM: %v", err)
	}
	if left, _ := filepath.Glob(filepath.Join(dir, ".lidscope-pieces-*")); len(left) > 0 {
		t.Errorf("pieces folders left: %v", left)
	}
	if left := runfolder.Leftovers(out); len(left) > 0 {
		t.Errorf("staging left: %v", left)
	}
}

// piecesStaging lists the staging folders of pieces being written.
func piecesStaging(dir string) []string {
	out, _ := filepath.Glob(filepath.Join(dir, ".lidscope-pieces-*", ".piece-*.lidscope-staging-*"))
	return out
}

// --piece /N takes K from the Slurm array variables (sbatch(1): the task
// id, and the array's minimum, step and count; common practice).
func TestResolvePiece(t *testing.T) {
	for _, tc := range []struct {
		flag string
		env  map[string]string
		want string // K/N, or "" for an error
	}{
		{"3/4", nil, "3/4"},
		{"/4", map[string]string{"SLURM_ARRAY_TASK_ID": "2", "SLURM_ARRAY_TASK_MIN": "0", "SLURM_ARRAY_TASK_COUNT": "4"}, "3/4"},
		{"/4", map[string]string{"SLURM_ARRAY_TASK_ID": "4"}, "4/4"}, // without MIN: tasks 1…N
		{"/3", map[string]string{"SLURM_ARRAY_TASK_ID": "14", "SLURM_ARRAY_TASK_MIN": "10", "SLURM_ARRAY_TASK_STEP": "2", "SLURM_ARRAY_TASK_MAX": "14"}, "3/3"},
		{"/4", nil, ""},
		{"/4", map[string]string{"SLURM_ARRAY_TASK_ID": "1", "SLURM_ARRAY_TASK_COUNT": "8"}, ""},
		{"/4", map[string]string{"SLURM_ARRAY_TASK_ID": "0", "SLURM_ARRAY_TASK_MIN": "1"}, ""},
		{"/4", map[string]string{"SLURM_ARRAY_TASK_ID": "x"}, ""},
		{"5/4", nil, ""},
	} {
		p, err := resolvePiece(tc.flag, func(k string) string { return tc.env[k] })
		if tc.want == "" {
			if err == nil {
				t.Errorf("--piece %s with %v: piece %v, want an error", tc.flag, tc.env, p)
			}
			continue
		}
		if err != nil || p.String() != tc.want {
			t.Errorf("--piece %s with %v: %v, %v; want %s", tc.flag, tc.env, p, err, tc.want)
		}
	}
}

// Anomaly mode under --jobs 2: stage 1 (each piece's climatology) in two
// processes, merged, then stage 2 in two processes against it; the
// results are those of --jobs 1 (one process, both stages over the whole
// record), file by file.
func TestJobsAnomalyTwoStages(t *testing.T) {
	dir := t.TempDir()
	s := study(t)
	res := map[int]string{}
	for _, jobs := range []int{1, 2} {
		out := filepath.Join(dir, "anomaly-jobs"+string(rune('0'+jobs)))
		var stdout, stderr bytes.Buffer
		o := runOptions{Study: s, Out: out, NoPlots: true, Jobs: jobs, Set: setFlags{"relationships.mode": "anomaly"}, Log: logOptions{Format: "text"}}
		if err := runRun(context.Background(), o, &stdout, &stderr); err != nil {
			t.Fatalf("--jobs %d: %v\n%s", jobs, err, stderr.String())
		}
		if got := strings.Contains(stdout.String(), "merged climatology"); got != (jobs == 2) {
			t.Errorf("--jobs %d: the summary mentions the merged climatology: %v\n%s", jobs, got, stdout.String())
		}
		res[jobs] = out
	}
	d, err := runcmp.Folders(res[1], res[2], runcmp.Options{Tol: 1e-6, IgnoreKeys: jobsKeys})
	if err != nil {
		t.Fatal(err)
	}
	for _, x := range d {
		t.Errorf("anomaly --jobs 2 differs from --jobs 1: %s", x)
	}
}
