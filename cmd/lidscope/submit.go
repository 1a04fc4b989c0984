package main

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"lidscope/analysis"
	"lidscope/config"
	"lidscope/internal/slurm"
	"lidscope/pipeline"
	"lidscope/relations"
	"lidscope/runfolder"
)

func init() { addCommand(newSubmitCmd) }

// submitOptions are the options of `lidscope submit`.
type submitOptions struct {
	Study       string
	Out         string
	Datasets    []string
	Reference   string
	Pieces      int
	Partition   string
	Time        string
	CPUsPerTask int
	Mem         string
	Account     string
	DryRun      bool
	Status      string // --status OUTDIR
	Only        []int
	Set         setFlags
	// Sbatch and Squeue name the Slurm programs ("": sbatch and squeue
	// on PATH).
	Sbatch, Squeue string
}

func newSubmitCmd(e *env) *cobra.Command {
	o := submitOptions{Set: setFlags{}}
	var datasets, only listFlag
	cmd := &cobra.Command{
		Use:   "submit STUDY [--pieces N] [--out DIR] [--dry-run] | submit --status DIR",
		Short: "run a study on a Slurm cluster: a job array of pieces, merges, a comparison",
		Long: `Writes batch scripts into the submission folder --out (default: the study's output.dir)
and submits them with sbatch: one job array with a task per dataset and piece (lidscope run
--piece K/N), then a merge job per dataset that waits for the array (--dependency=afterok),
then, when the study has two or more datasets, a compare job after the merges (the first
dataset, or --reference, is the reference). Task output goes to DIR/logs/; the scripts, the
sbatch commands and the job ids to DIR/slurm/. A task whose piece is already complete skips
it, so resubmitting redoes only what failed.

--status DIR reports which pieces are complete, queued, failed or missing, and prints the
command that resubmits only those not complete.`,
		Example: `  lidscope submit obs/study.yaml --pieces 4 --out out/cluster --dry-run
  lidscope submit --status out/cluster`,
		Args: func(cmd *cobra.Command, args []string) error {
			if o.Status != "" {
				if len(args) > 0 {
					return usageErr("--status DIR takes no study")
				}
				return nil
			}
			return exactArgs(1, "give exactly one study file (or --status DIR)")(cmd, args)
		},
		ValidArgsFunction: fileArgs(studyExts...),
		RunE: func(cmd *cobra.Command, args []string) error {
			if o.Status == "" {
				o.Study = args[0]
			}
			o.Datasets = datasets
			for _, s := range only {
				n, err := strconv.Atoi(s)
				if err != nil {
					return usageErr("--only wants array task numbers, not %q", s)
				}
				o.Only = append(o.Only, n)
			}
			return runSubmit(cmd.Context(), o, e.stdout)
		},
	}
	fs := cmd.Flags()
	addOutDir(fs, &o.Out, "", "the submission folder (default: the study's output.dir)")
	fs.Var(&datasets, "dataset", "submit only this dataset (repeat, or separate names with commas)")
	textVar(fs, &o.Reference, "reference", "", "NAME", "the reference of the compare job (default: the first dataset)")
	fs.IntVar(&o.Pieces, "pieces", 4, "`N` pieces of each dataset's record (tasks per dataset)")
	textVar(fs, &o.Partition, "partition", "", "NAME", "sbatch --partition")
	textVar(fs, &o.Time, "time", "", "TIME", "sbatch --time of each job (e.g. 1:00:00)")
	fs.IntVar(&o.CPUsPerTask, "cpus-per-task", 0, "`N` CPUs per task, passed to sbatch --cpus-per-task (the tasks use that many worker goroutines)")
	textVar(fs, &o.Mem, "mem", "", "SIZE", "sbatch --mem of each job (e.g. 4G)")
	textVar(fs, &o.Account, "account", "", "NAME", "sbatch --account")
	fs.BoolVar(&o.DryRun, "dry-run", false, "write the scripts and print the sbatch commands without submitting")
	textVar(fs, &o.Status, "status", "", "DIR", "report the pieces of the submission folder DIR and how to resubmit the missing ones")
	fs.Var(&only, "only", "submit only these array tasks (what --status prints)")
	addSet(fs, o.Set, "override a study key for every task, KEY=VALUE (repeatable)")
	return cmd
}

func runSubmit(ctx context.Context, o submitOptions, stdout io.Writer) error {
	if o.Status != "" {
		rep, err := slurm.Status(o.Status, slurm.Checks{Committed: isCommitted, Compared: isCompared, Queued: squeueTasks(o.Squeue)})
		if err != nil {
			return err
		}
		rep.Write(stdout, o.Status)
		return nil
	}
	r, err := config.Load(o.Study, config.LoadOptions{Flags: o.Set})
	if err != nil {
		return err
	}
	ds, err := analysis.Datasets(r, o.Datasets)
	if err != nil {
		return err
	}
	out := o.Out
	if out == "" {
		out = r.Output.Dir
	}
	abs := func(p string) (string, error) {
		a, err := filepath.Abs(p)
		if err != nil {
			return "", fmt.Errorf("%s: %w", p, err)
		}
		return a, nil
	}
	if out, err = abs(out); err != nil {
		return err
	}
	study, err := abs(o.Study)
	if err != nil {
		return err
	}
	program, err := os.Executable()
	if err != nil {
		return fmt.Errorf("finding this program for the batch scripts: %w", err)
	}
	s := slurm.Spec{Program: program, Env: childEnv, Study: study, Out: out, Pieces: o.Pieces,
		Partition: o.Partition, Time: o.Time, Mem: o.Mem, Account: o.Account, CPUsPerTask: o.CPUsPerTask, Only: o.Only}
	for _, d := range ds {
		s.Datasets = append(s.Datasets, d.Name)
		if o.Pieces > 1 {
			// Refuse now what every task would refuse later.
			plan, err := pipeline.PlanFor(r, d)
			if err != nil {
				return err
			}
			rec, err := pipeline.Survey(ctx, plan)
			if err != nil {
				return fmt.Errorf("dataset %s: %w", d.Name, err)
			}
			why := onePieceReason(r, d, plan, rec, o.Pieces)
			if why == "" && !r.RelationsOff && analysis.NoRelations(plan) == "" && r.RelationsFor(d).Mode == relations.Anomaly {
				// two stages: the climatology of the whole record first
				s.Anomaly = append(s.Anomaly, d.Name)
			}
			if why != "" {
				return fmt.Errorf("dataset %s: cannot be split into pieces: %s; submit it with --pieces 1", d.Name, why)
			}
			if rec.Steps < o.Pieces {
				return fmt.Errorf("dataset %s: the selected record has %d time steps, fewer than --pieces %d", d.Name, rec.Steps, o.Pieces)
			}
		}
	}
	if len(ds) > 1 {
		s.Reference = s.Datasets[0]
		if o.Reference != "" {
			if _, err := r.Dataset(o.Reference); err != nil {
				return err
			}
			s.Reference = o.Reference
		}
	}
	for k, v := range o.Set {
		s.Set = append(s.Set, k+"="+v)
	}
	s.Command = []string{program, "submit", study, "--out", out, "--pieces", strconv.Itoa(o.Pieces)}
	for _, d := range o.Datasets {
		s.Command = append(s.Command, "--dataset", d)
	}
	if o.Reference != "" {
		s.Command = append(s.Command, "--reference", o.Reference)
	}
	for _, f := range [][2]string{{"--partition", o.Partition}, {"--time", o.Time}, {"--mem", o.Mem}, {"--account", o.Account}} {
		if f[1] != "" {
			s.Command = append(s.Command, f[0], f[1])
		}
	}
	if o.CPUsPerTask > 0 {
		s.Command = append(s.Command, "--cpus-per-task", strconv.Itoa(o.CPUsPerTask))
	}
	for _, kv := range s.Set {
		s.Command = append(s.Command, "--set", kv)
	}
	sbatch := o.Sbatch
	if sbatch == "" {
		sbatch = "sbatch"
	}
	if !o.DryRun {
		if _, err := exec.LookPath(sbatch); err != nil {
			return fmt.Errorf("sbatch is not on PATH (%v): run this on a Slurm login node, or use --dry-run to write the scripts only", err)
		}
	}
	rec, err := slurm.Submit(s, func(args ...string) (string, error) {
		c := exec.CommandContext(ctx, sbatch, args...)
		var errb bytes.Buffer
		c.Stderr = &errb
		b, err := c.Output()
		if err != nil {
			return "", fmt.Errorf("%v: %s", err, strings.TrimSpace(errb.String()))
		}
		return string(b), nil
	}, o.DryRun)
	if err != nil {
		return err
	}
	fmt.Fprintf(stdout, "scripts in %s\n", filepath.Join(out, slurm.ScriptDir))
	if o.DryRun {
		fmt.Fprintln(stdout, "dry run: submit with")
	}
	for _, c := range rec.Sbatch {
		fmt.Fprintf(stdout, "  %s\n", c)
	}
	if !o.DryRun {
		fmt.Fprint(stdout, "submitted:")
		if id := rec.Jobs["climatology"]; id != "" {
			fmt.Fprintf(stdout, " climatology array %s (stage 1 of anomaly mode),", id)
			for _, d := range s.Anomaly {
				fmt.Fprintf(stdout, " its merge for %s %s,", d, rec.Jobs["merge-climatology-"+d])
			}
		}
		fmt.Fprintf(stdout, " array %s", rec.Jobs["pieces"])
		for _, d := range s.Datasets {
			if id := rec.Jobs["merge-"+d]; id != "" {
				fmt.Fprintf(stdout, ", merge %s %s", d, id)
			}
		}
		if id := rec.Jobs["compare"]; id != "" {
			fmt.Fprintf(stdout, ", compare %s", id)
		}
		fmt.Fprintf(stdout, "\nlogs in %s; follow with: lidscope submit --status %s\n", filepath.Join(out, slurm.LogDir), out)
	}
	return nil
}

// isCommitted reports whether dir holds a complete, committed run (of
// piece, when given).
func isCommitted(dir, piece string) bool {
	f, err := runfolder.Open(dir)
	if err != nil {
		return false
	}
	f.Close()
	if piece == "" {
		return true
	}
	meta, _, err := analysis.LoadState(dir)
	return err == nil && meta.Piece == piece
}

// isCompared reports whether dir holds a finished comparison (compare
// writes its files as one unit, comparison.json among them).
func isCompared(dir string) bool {
	_, err := os.Stat(filepath.Join(dir, "comparison.json"))
	return err == nil
}

// squeueTasks lists the array tasks of job id that squeue shows
// (pending or running).
func squeueTasks(prog string) func(string) (map[int]bool, error) {
	if prog == "" {
		prog = "squeue"
	}
	return func(id string) (map[int]bool, error) {
		b, err := exec.Command(prog, "-h", "-r", "-j", id, "-o", "%K").Output()
		if err != nil {
			return nil, err
		}
		out := map[int]bool{}
		for _, l := range strings.Fields(string(b)) {
			if n, err := strconv.Atoi(l); err == nil {
				out[n] = true
			}
		}
		return out, nil
	}
}
