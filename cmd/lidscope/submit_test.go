package main

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"lidscope/analysis"
	"lidscope/fixtures"
	"lidscope/internal/runcmp"
	"lidscope/internal/slurm"
)

// twoWorlds writes the synthetic demo world (invented data) and its
// synthetic model (analysis.ModelScenario) into dir/obs and dir/model and
// a study with both datasets (the reference first) as dir/both.yaml.
func twoWorlds(t *testing.T, dir string) string {
	t.Helper()
	o := fixtures.DefaultOptions()
	o.Resolution, o.Years, o.YearsPerFile = 5, 4, 2
	var blocks []string
	var rest string
	for _, w := range []struct {
		sub string
		opt fixtures.Options
	}{{"obs", o}, {"model", analysis.ModelScenario(o)}} {
		if _, err := fixtures.Generate(filepath.Join(dir, w.sub), w.opt); err != nil {
			t.Fatal(err)
		}
		b, err := os.ReadFile(filepath.Join(dir, w.sub, fixtures.StudyFile))
		if err != nil {
			t.Fatal(err)
		}
		text := string(b)
		i, j := strings.Index(text, "datasets:\n"), strings.Index(text, "analysis:\n")
		if i < 0 || j < i {
			t.Fatalf("the demo study has no datasets and analysis sections:\n%s", text)
		}
		block := regexp.MustCompile(`(?m)^(      \w+: )"([^"]+)"`).ReplaceAllString(text[i+len("datasets:\n"):j], `$1"`+w.sub+`/$2"`)
		blocks = append(blocks, block)
		rest = text[j:]
	}
	study := filepath.Join(dir, "both.yaml")
	if err := os.WriteFile(study, []byte("# two synthetic worlds (invented data)\ndatasets:\n"+strings.Join(blocks, "")+rest), 0o644); err != nil {
		t.Fatal(err)
	}
	return study
}

// --dry-run writes the scripts (valid bash), prints the sbatch commands
// and submits nothing; --status then reports every piece missing and the
// command that submits them.
func TestSubmitDryRun(t *testing.T) {
	dir := t.TempDir()
	study := twoWorlds(t, dir)
	out := filepath.Join(dir, "cluster")
	var stdout bytes.Buffer
	o := submitOptions{Study: study, Out: out, Pieces: 3, Partition: "short", Time: "0:10:00", CPUsPerTask: 2, Mem: "2G", Account: "clim", DryRun: true, Set: setFlags{}}
	if err := runSubmit(context.Background(), o, &stdout); err != nil {
		t.Fatal(err)
	}
	text := stdout.String()
	for _, want := range []string{"pieces_job=$(sbatch --parsable " + filepath.Join(out, "slurm", "pieces.sh"),
		"--dependency=afterok:$pieces_job", "--dependency=afterok:$merge_", "compare.sh"} {
		if !strings.Contains(text, want) {
			t.Errorf("dry run output lacks %q:\n%s", want, text)
		}
	}
	pieces, err := os.ReadFile(filepath.Join(out, "slurm", "pieces.sh"))
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"#SBATCH --array=0-5", "#SBATCH --partition=short", "#SBATCH --time=0:10:00", "#SBATCH --mem=2G",
		"#SBATCH --account=clim", "#SBATCH --cpus-per-task=2", "#SBATCH --output=" + filepath.Join(out, "logs")} {
		if !strings.Contains(string(pieces), want) {
			t.Errorf("pieces.sh lacks %q:\n%s", want, pieces)
		}
	}
	scripts, _ := filepath.Glob(filepath.Join(out, "slurm", "*.sh"))
	if len(scripts) != 4 { // pieces, two merges, compare
		t.Errorf("scripts %v, want pieces, merge-DATASET ×2, compare", scripts)
	}
	for _, s := range scripts {
		if b, err := exec.Command("bash", "-n", s).CombinedOutput(); err != nil {
			t.Errorf("bash -n %s: %v\n%s", s, err, b)
		}
	}
	// The array task arithmetic: task 4 of 2 datasets × 3 pieces is the
	// second dataset's second piece.
	cmd := exec.Command("bash", filepath.Join(out, "slurm", "pieces.sh"))
	cmd.Env = append(os.Environ(), "SLURM_ARRAY_TASK_ID=4")
	stub := filepath.Join(dir, "stub")
	if err := os.WriteFile(stub, []byte("#!/bin/sh\necho \"$@\"\n"), 0o755); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(filepath.Join(out, "slurm", "pieces.sh"))
	if err != nil {
		t.Fatal(err)
	}
	self, _ := os.Executable()
	stubbed := filepath.Join(dir, "pieces-stub.sh")
	os.WriteFile(stubbed, []byte(strings.ReplaceAll(string(b), self, stub)), 0o755)
	cmd.Args = []string{"bash", stubbed}
	got, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("%v: %s", err, got)
	}
	if want := "--piece 2/3 --out " + filepath.Join(out, "pieces", "synthetic-model", "piece-2"); !strings.Contains(string(got), "--dataset synthetic-model") || !strings.Contains(string(got), want) {
		t.Errorf("task 4 runs %q, want dataset synthetic-model and %q", got, want)
	}
	stdout.Reset()
	if err := runSubmit(context.Background(), submitOptions{Status: out}, &stdout); err != nil {
		t.Fatal(err)
	}
	if s := stdout.String(); !strings.Contains(s, "missing 1 (task 0), 2 (task 1), 3 (task 2)") || !strings.Contains(s, "--only 0,1,2,3,4,5") {
		t.Errorf("status of a dry run:\n%s", s)
	}
	rec, err := slurm.ReadRecord(out)
	if err != nil || !rec.DryRun || len(rec.Scripts) != 4 || len(rec.Sbatch) != 4 {
		t.Errorf("record %+v, %v", rec, err)
	}
}

// The map-reduce on a real one-node Slurm cluster (scripts/slurm-local:
// Debian's slurm-wlm and munge, started without systemd): the two
// synthetic worlds as 4 pieces each, a merge per dataset after the array,
// a comparison after the merges; the merged runs equal single-process
// runs file by file, and --status says everything is complete.
func TestSubmitOnLocalCluster(t *testing.T) {
	if os.Geteuid() != 0 {
		t.Skip("the one-node Slurm cluster (scripts/slurm-local) needs root")
	}
	script, err := filepath.Abs(filepath.Join("..", "..", "scripts", "slurm-local"))
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range []string{"slurmctld", "slurmd", "munged", "sbatch", "squeue"} {
		if _, err := exec.LookPath(p); err != nil {
			if _, err := os.Stat("/usr/sbin/" + p); err == nil {
				continue
			}
			if os.Getenv("CI") == "" {
				t.Skipf("Slurm is not installed (%s missing; scripts/slurm-local install installs slurm-wlm and munge)", p)
			}
			t.Fatalf("CI: %s missing: .ci/run must run scripts/slurm-local install before the tests", p)
		}
	}
	start := time.Now()
	cluster, err := os.MkdirTemp("", "lidscope-slurm-")
	if err != nil {
		t.Fatal(err)
	}
	os.Chmod(cluster, 0o755) // the munge user reaches its socket inside
	t.Cleanup(func() {
		if b, err := exec.Command(script, "stop", cluster).CombinedOutput(); err != nil {
			t.Errorf("stopping the cluster: %v\n%s", err, b)
		}
		os.RemoveAll(cluster)
	})
	if b, err := exec.Command(script, "start", cluster).CombinedOutput(); err != nil {
		t.Fatalf("starting the one-node cluster: %v\n%s", err, b)
	}
	t.Setenv("SLURM_CONF", filepath.Join(cluster, "slurm.conf"))
	dir, err := os.MkdirTemp("", "lidscope-submit-")
	if err != nil {
		t.Fatal(err)
	}
	os.Chmod(dir, 0o755)
	if os.Getenv("LIDSCOPE_KEEP_SUBMIT") == "" {
		t.Cleanup(func() { os.RemoveAll(dir) })
	}
	study := twoWorlds(t, dir)
	out := filepath.Join(dir, "cluster")
	rec := submitAndCheck(t, dir, study, out, setFlags{})
	if _, err := os.Stat(filepath.Join(out, "comparison")); err != nil {
		t.Errorf("no comparison: %v", err)
	}
	// The tasks recorded their Slurm job in the provenance.
	if b, err := os.ReadFile(filepath.Join(out, rec.Datasets[0], "provenance.json")); err != nil || !strings.Contains(string(b), "slurm job") {
		t.Errorf("the merged provenance does not name the Slurm jobs (%v)", err)
	}
	t.Logf("climatological: %d jobs and checks took %v", len(rec.Spec(out).Tasks()), time.Since(start).Round(time.Second))
	// Anomaly mode: the climatology array, its merges, then the pieces
	// against them.
	mid := time.Now()
	arec := submitAndCheck(t, dir, study, filepath.Join(dir, "cluster-anomaly"), setFlags{"relationships.mode": "anomaly"})
	if len(arec.Anomaly) != 2 || arec.Jobs["climatology"] == "" {
		t.Errorf("the anomaly submission has no climatology stage: %+v", arec)
	}
	t.Logf("anomaly mode: %d + %d jobs and checks took %v", len(arec.Spec(out).ClimatologyTasks()), len(arec.Spec(out).Tasks()), time.Since(mid).Round(time.Second))
	t.Logf("cluster start, both submissions and checks took %v", time.Since(start).Round(time.Second))
}

// submitAndCheck submits study (2 datasets × 4 pieces) into out on the
// running cluster, waits until squeue shows none of its jobs, checks that
// --status calls everything complete and that each merged run equals a
// single-process run of its dataset, file by file.
func submitAndCheck(t *testing.T, dir, study, out string, set setFlags) *slurm.Record {
	t.Helper()
	var stdout bytes.Buffer
	if err := runSubmit(context.Background(), submitOptions{Study: study, Out: out, Pieces: 4, CPUsPerTask: 1, Time: "0:05:00", Set: set}, &stdout); err != nil {
		t.Fatal(err)
	}
	t.Logf("%s", stdout.String())
	rec, err := slurm.ReadRecord(out)
	if err != nil {
		t.Fatal(err)
	}
	var ids []string
	for _, id := range rec.Jobs {
		ids = append(ids, id)
	}
	// generous: a loaded machine runs the 11–21 jobs two at a time
	deadline := time.Now().Add(300 * time.Second)
	for {
		b, err := exec.Command("squeue", "-h", "-j", strings.Join(ids, ","), "-o", "%i %T").Output()
		if err == nil && strings.TrimSpace(string(b)) == "" {
			break
		}
		if time.Now().After(deadline) {
			logs, _ := filepath.Glob(filepath.Join(out, "logs", "*.err"))
			var tail []string
			for _, l := range logs {
				c, _ := os.ReadFile(l)
				tail = append(tail, l+": "+string(c))
			}
			t.Fatalf("jobs still queued after 300 s: %s\n%s", b, strings.Join(tail, "\n"))
		}
		time.Sleep(time.Second)
	}
	stdout.Reset()
	if err := runSubmit(context.Background(), submitOptions{Status: out}, &stdout); err != nil {
		t.Fatal(err)
	}
	if s := stdout.String(); !strings.Contains(s, "everything is complete") {
		logs, _ := filepath.Glob(filepath.Join(out, "logs", "*.err"))
		for _, l := range logs {
			c, _ := os.ReadFile(l)
			if len(c) > 0 {
				t.Logf("%s:\n%s", l, c)
			}
		}
		t.Fatalf("status after the jobs ended:\n%s", s)
	}
	for _, d := range rec.Datasets {
		single := filepath.Join(dir, "single-"+filepath.Base(out)+"-"+d)
		var so, se bytes.Buffer
		if err := runRun(context.Background(), runOptions{Study: study, Datasets: []string{d}, Out: single, NoPlots: true, Jobs: 1, Set: set, Log: logOptions{Format: "text"}}, &so, &se); err != nil {
			t.Fatal(err)
		}
		diffs, err := runcmp.Folders(single, filepath.Join(out, d), runcmp.Options{Tol: 1e-6, IgnoreKeys: jobsKeys})
		if err != nil {
			t.Fatal(err)
		}
		for _, x := range diffs {
			t.Errorf("%s, dataset %s: the merged pieces differ from one run: %s", filepath.Base(out), d, x)
		}
	}
	return rec
}

// Anomaly mode in two stages: --dry-run writes a climatology array, a
// climatology merge per dataset after it, the pieces' array after both
// merges (each piece against its dataset's merged climatology), the run
// merges and the compare, every job after what it needs (afterok). The
// scripts then run here as Slurm would run them, in that order, task by
// task (bash, SLURM_ARRAY_TASK_ID): the merged runs equal single-process
// anomaly runs file by file, and --status reports both stages complete.
func TestSubmitAnomalyTwoStages(t *testing.T) {
	dir := t.TempDir()
	study := twoWorlds(t, dir)
	out := filepath.Join(dir, "cluster")
	set := setFlags{"relationships.mode": "anomaly"}
	var stdout bytes.Buffer
	if err := runSubmit(context.Background(), submitOptions{Study: study, Out: out, Pieces: 2, DryRun: true, Set: set}, &stdout); err != nil {
		t.Fatal(err)
	}
	rec, err := slurm.ReadRecord(out)
	if err != nil {
		t.Fatal(err)
	}
	// the dependency graph, from the sbatch lines in submission order
	line := regexp.MustCompile(`^(\w+)_job=\$\(sbatch --parsable (?:--dependency=afterok:(\S+) )?(\S+)\)$`)
	after := map[string]string{}
	defined := map[string]bool{}
	var order []string
	for _, l := range rec.Sbatch {
		m := line.FindStringSubmatch(l)
		if m == nil {
			t.Fatalf("sbatch line %q", l)
		}
		var deps []string
		for _, d := range strings.Split(m[2], ":") {
			if d == "" {
				continue
			}
			v := strings.TrimSuffix(strings.TrimPrefix(d, "$"), "_job")
			if !defined[v] {
				t.Errorf("%s waits for %s, submitted later", m[1], v)
			}
			deps = append(deps, v)
		}
		defined[m[1]] = true
		order = append(order, m[1])
		after[m[1]] = strings.Join(deps, " ")
	}
	want := map[string]string{
		"climatology":                      "",
		"merge_climatology_synthetic_demo": "climatology", "merge_climatology_synthetic_model": "climatology",
		"pieces":               "merge_climatology_synthetic_demo merge_climatology_synthetic_model",
		"merge_synthetic_demo": "pieces", "merge_synthetic_model": "pieces",
		"compare": "merge_synthetic_demo merge_synthetic_model",
	}
	if len(after) != len(want) {
		t.Errorf("jobs %v, want %d", order, len(want))
	}
	for j, d := range want {
		if got, ok := after[j]; !ok || got != d {
			t.Errorf("job %s waits for %q, want %q", j, got, d)
		}
	}
	scripts := map[string]string{}
	for _, p := range rec.Scripts {
		scripts[strings.ReplaceAll(strings.TrimSuffix(filepath.Base(p), ".sh"), "-", "_")] = p
		if b, err := exec.Command("bash", "-n", p).CombinedOutput(); err != nil {
			t.Errorf("bash -n %s: %v\n%s", p, err, b)
		}
	}
	// Run the graph here, in submission order, as Slurm would.
	tasks := map[string]int{"climatology": 4, "pieces": 4}
	for _, j := range order {
		n, array := tasks[j]
		if !array {
			n = 1
		}
		for i := 0; i < n; i++ {
			c := exec.Command("bash", scripts[j])
			c.Env = append(os.Environ(), fmt.Sprintf("SLURM_ARRAY_TASK_ID=%d", i))
			if b, err := c.CombinedOutput(); err != nil {
				t.Fatalf("%s task %d: %v\n%s", j, i, err, b)
			}
		}
	}
	stdout.Reset()
	if err := runSubmit(context.Background(), submitOptions{Status: out}, &stdout); err != nil {
		t.Fatal(err)
	}
	for _, w := range []string{"anomaly mode in two stages for synthetic-demo, synthetic-model",
		"dataset synthetic-model, stage 1 (climatology): complete 1 (task 2), 2 (task 3); merged climatology: complete",
		"dataset synthetic-model, stage 2 (anomalies): complete 1 (task 2), 2 (task 3); merged run: complete", "comparison: complete"} {
		if !strings.Contains(stdout.String(), w) {
			t.Errorf("status lacks %q:\n%s", w, stdout.String())
		}
	}
	for _, d := range rec.Datasets {
		single := filepath.Join(dir, "single-"+d)
		var so, se bytes.Buffer
		if err := runRun(context.Background(), runOptions{Study: study, Datasets: []string{d}, Out: single, NoPlots: true, Jobs: 1, Set: set, Log: logOptions{Format: "text"}}, &so, &se); err != nil {
			t.Fatal(err)
		}
		diffs, err := runcmp.Folders(single, filepath.Join(out, d), runcmp.Options{Tol: 1e-6, IgnoreKeys: jobsKeys})
		if err != nil {
			t.Fatal(err)
		}
		for _, x := range diffs {
			t.Errorf("dataset %s: the two-stage pieces differ from one anomaly run: %s", d, x)
		}
	}
}
