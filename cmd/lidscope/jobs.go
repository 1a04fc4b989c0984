package main

import (
	"context"
	"fmt"
	"io"
	"log/slog"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"lidscope/analysis"
	"lidscope/config"
	"lidscope/internal/fanout"
	"lidscope/pipeline"
	"lidscope/relations"
)

// childEnv is added to the environment of the child processes of
// run --jobs (the tests set it so that the test binary acts as lidscope).
var childEnv []string

// resolvePiece reads --piece: "K/N", or "/N" with K from a Slurm job
// array (SLURM_ARRAY_TASK_ID, counted from SLURM_ARRAY_TASK_MIN in steps
// of SLURM_ARRAY_TASK_STEP; with SLURM_ARRAY_TASK_COUNT, when set, equal
// to N). "" is the whole record.
func resolvePiece(s string, getenv func(string) string) (pipeline.Piece, error) {
	if s == "" {
		return pipeline.Piece{}, nil
	}
	p, err := pipeline.ParsePiece(s)
	if err != nil {
		return p, usageErr("--piece %s", strings.TrimPrefix(err.Error(), "piece "))
	}
	if p.K != 0 {
		return p, nil
	}
	num := func(name string, def int) (int, error) {
		v := strings.TrimSpace(getenv(name))
		if v == "" {
			return def, nil
		}
		n, err := strconv.Atoi(v)
		if err != nil {
			return 0, fmt.Errorf("--piece /%d: %s=%q is not a whole number", p.N, name, v)
		}
		return n, nil
	}
	if getenv("SLURM_ARRAY_TASK_ID") == "" {
		return p, usageErr("--piece /%d takes K from SLURM_ARRAY_TASK_ID, which is not set (not a Slurm array task); give --piece K/%d", p.N, p.N)
	}
	id, err := num("SLURM_ARRAY_TASK_ID", 0)
	if err != nil {
		return p, err
	}
	lo, err := num("SLURM_ARRAY_TASK_MIN", 1)
	if err != nil {
		return p, err
	}
	step, err := num("SLURM_ARRAY_TASK_STEP", 1)
	if err != nil {
		return p, err
	}
	count, err := num("SLURM_ARRAY_TASK_COUNT", 0)
	if err != nil {
		return p, err
	}
	if count != 0 && count != p.N {
		return p, fmt.Errorf("--piece /%d: the job array has %d tasks (SLURM_ARRAY_TASK_COUNT), not %d; submit an array of %d tasks or give --piece /%d", p.N, count, p.N, p.N, count)
	}
	if step < 1 || (id-lo)%step != 0 {
		return p, fmt.Errorf("--piece /%d: task %d is not on the array's grid (SLURM_ARRAY_TASK_MIN %d, SLURM_ARRAY_TASK_STEP %d)", p.N, id, lo, step)
	}
	p.K = (id-lo)/step + 1
	if p.K < 1 || p.K > p.N {
		return p, fmt.Errorf("--piece /%d: SLURM_ARRAY_TASK_ID %d gives piece %d, outside 1…%d (array from %d in steps of %d)", p.N, id, p.K, p.N, lo, step)
	}
	return p, nil
}

// batchInfo describes the Slurm job this process runs in (none outside).
func batchInfo(getenv func(string) string) []string {
	job := getenv("SLURM_JOB_ID")
	if job == "" {
		return nil
	}
	s := "slurm job " + job
	if a := getenv("SLURM_ARRAY_JOB_ID"); a != "" {
		s += fmt.Sprintf(" (array job %s, task %s)", a, getenv("SLURM_ARRAY_TASK_ID"))
	}
	if n := getenv("SLURM_JOB_NAME"); n != "" {
		s += ", name " + n
	}
	if c := getenv("SLURM_CPUS_PER_TASK"); c != "" {
		s += ", " + c + " CPUs per task"
	}
	return []string{s}
}

// slurmCPUs is SLURM_CPUS_PER_TASK (0 when unset).
func slurmCPUs() int {
	n, err := strconv.Atoi(strings.TrimSpace(os.Getenv("SLURM_CPUS_PER_TASK")))
	if err != nil || n < 1 {
		return 0
	}
	return n
}

// onePieceReason says why a dataset runs in one process whatever --jobs
// says ("" when it can be split).
func onePieceReason(r *config.Study, d *config.Dataset, plan pipeline.Plan, rec pipeline.Record, jobs int) string {
	switch {
	case rec.Climatology:
		return "the record is a 12-month climatology, whose seasonal cycle is one piece"
	case rec.Steps < 2:
		return fmt.Sprintf("the record has %d time step", rec.Steps)
	}
	return ""
}

// runJobs runs each dataset as up to jobs pieces in child processes of
// this program and merges them into the dataset's run folder. The folder
// is locked and checked before the pieces start; the pieces go into a
// hidden folder beside it, removed at the end whatever happens; the merged
// run replaces the folder in one step. A stop signal (ctx) stops every
// child, and the folder is left as it was.
func runJobs(ctx context.Context, o runOptions, r *config.Study, opt analysis.Options, jobs int, bars *progressBars, log *slog.Logger, stdout, stderr io.Writer) error {
	ds, err := analysis.Datasets(r, o.Datasets)
	if err != nil {
		return err
	}
	for _, d := range ds {
		out := analysis.OutDirFor(d, opt.OutDir, len(ds) > 1)
		rep, err := runDatasetJobs(ctx, o, r, d, out, opt, jobs, bars, log, stderr)
		if err != nil {
			return fmt.Errorf("dataset %s: %w", d.Name, err)
		}
		writeRunSummary(stdout, rep)
	}
	return nil
}

func runDatasetJobs(ctx context.Context, o runOptions, r *config.Study, d *config.Dataset, out string, opt analysis.Options, jobs int, bars *progressBars, log *slog.Logger, stderr io.Writer) (analysis.Report, error) {
	plan, err := pipeline.PlanFor(r, d)
	if err != nil {
		return analysis.Report{}, err
	}
	rec, err := pipeline.Survey(ctx, plan)
	if err != nil {
		return analysis.Report{}, err
	}
	n := min(jobs, rec.Steps)
	if why := onePieceReason(r, d, plan, rec, jobs); why != "" || n < 2 {
		if why != "" {
			log.Warn("running in one process", "dataset", d.Name, "why", why)
		}
		return analysis.RunDataset(ctx, r, d, out, opt)
	}
	st, err := analysis.CreateFolder(out, opt, 0)
	if err != nil {
		return analysis.Report{}, err
	}
	defer st.Close()
	abs, err := filepath.Abs(out)
	if err != nil {
		return analysis.Report{}, err
	}
	// Pieces folders of an earlier run --jobs into out that was killed
	// (the lock on out, held now, says no run is using them).
	prefix := ".lidscope-pieces-" + filepath.Base(abs) + "-"
	if old, _ := filepath.Glob(filepath.Join(filepath.Dir(abs), prefix+"*")); len(old) > 0 {
		for _, p := range old {
			log.Warn("removed the pieces of an interrupted run --jobs", "folder", p)
			os.RemoveAll(p)
		}
	}
	tmp, err := os.MkdirTemp(filepath.Dir(abs), prefix)
	if err != nil {
		return analysis.Report{}, fmt.Errorf("a folder for the pieces beside %s: %w", out, err)
	}
	defer os.RemoveAll(tmp)
	self, err := os.Executable()
	if err != nil {
		return analysis.Report{}, fmt.Errorf("finding this program to run the pieces: %w", err)
	}
	workers := opt.Workers
	if workers <= 0 {
		workers = fanout.CPUs()
	}
	workers = max(1, workers/n)
	anomaly := analysis.NoRelations(plan) == "" && r.RelationsFor(d).Mode == relations.Anomaly
	run := func(stage string, extra func(k int) []string) ([]string, error) {
		spec := fanout.Spec{Program: self, Env: append(os.Environ(), childEnv...), Stderr: stderr}
		var dirs, names []string
		for k := 1; k <= n; k++ {
			p := pipeline.Piece{K: k, N: n}
			dir := filepath.Join(tmp, fmt.Sprintf("piece-%d", k))
			args := []string{"run", o.Study, "--dataset", d.Name, "--piece", p.String(), "--out", dir,
				"--no-plots", "--jobs", "1", "--workers", strconv.Itoa(workers), "--progress-lines", "--log-format", o.Log.Format}
			switch {
			case o.Log.Quiet:
				args = append(args, "--quiet")
			case o.Log.Verbose:
				args = append(args, "--verbose")
			}
			for k, v := range o.Set {
				args = append(args, "--set", k+"="+v)
			}
			args = append(args, extra(k)...)
			name := fmt.Sprintf("%s %s%s", d.Name, p, stage)
			spec.Jobs = append(spec.Jobs, fanout.Job{Name: "piece " + name, Args: args})
			dirs, names = append(dirs, dir), append(names, name)
			if bars != nil {
				lo, hi := p.Bounds(rec.Steps)
				bars.add(name, hi-lo)
			}
		}
		if bars != nil {
			spec.Progress = func(i, done, total int) { bars.set(names[i], done, total) }
		}
		log.Info("running pieces", "dataset", d.Name, "pieces", n, "workers per piece", workers, "stage", stage)
		if err := fanout.Run(ctx, spec); err != nil {
			if e, ok := fanout.Failed(err); ok {
				return nil, fmt.Errorf("%s failed (%v); nothing was written to %s", e.Job, e.Err, out)
			}
			return nil, err
		}
		return dirs, nil
	}
	none := func(int) []string { return nil }
	stage2 := none
	if anomaly {
		// Stage 1: each piece's climatology; merged into the whole
		// record's, which every piece's anomalies are taken against.
		climOf := func(k int) string { return filepath.Join(tmp, fmt.Sprintf("climatology-%d.gob", k)) }
		if _, err := run(" climatology", func(k int) []string { return []string{"--climatology-out", climOf(k)} }); err != nil {
			return analysis.Report{}, err
		}
		var paths []string
		for k := 1; k <= n; k++ {
			paths = append(paths, climOf(k))
		}
		clim, err := analysis.MergeClimatologies(paths)
		if err != nil {
			return analysis.Report{}, err
		}
		all := filepath.Join(tmp, "climatology.gob")
		if err := analysis.WriteClimatology(all, clim); err != nil {
			return analysis.Report{}, err
		}
		stage2 = func(int) []string { return []string{"--climatology", all} }
	}
	dirs, err := run("", stage2)
	if err != nil {
		return analysis.Report{}, err
	}
	note := fmt.Sprintf("computed as %d pieces of the record in %d processes (run --jobs) and merged", n, n)
	if anomaly {
		note += "; anomalies against the merged climatology of every piece"
	}
	return analysis.MergeInto(ctx, st, dirs, opt, &analysis.MergeAs{Study: r.Resolved(), StudyHash: r.Hash(), Plots: r.Output.Plots, Note: note})
}

// runClimatologyStage is run --climatology-out FILE: stage 1 of anomaly
// mode for each dataset (one, from run --jobs) of the piece.
func runClimatologyStage(ctx context.Context, o runOptions, r *config.Study, opt analysis.Options) error {
	ds, err := analysis.Datasets(r, o.Datasets)
	if err != nil {
		return err
	}
	if len(ds) != 1 {
		return usageErr("--climatology-out FILE wants one dataset (--dataset NAME)")
	}
	c, err := analysis.ComputeClimatology(ctx, r, ds[0], opt)
	if err != nil {
		return err
	}
	return analysis.WriteClimatology(o.ClimatologyOut, c)
}
