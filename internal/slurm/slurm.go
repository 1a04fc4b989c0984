// Package slurm writes and submits the batch scripts that run a study on
// a Slurm cluster as map-reduce: one job array with a task per (dataset ×
// piece) running `lidscope run --piece K/N`, a merge job per dataset that
// waits for the array (--dependency=afterok) and joins the pieces with
// `lidscope merge`, and, for a study with a reference and candidates, a
// compare job after the merges. A dataset in anomaly mode split into
// pieces goes through two stages: a first job array builds each piece's
// climatology (run --climatology-out), a merge job per dataset joins them
// into the climatology of the whole record (merge --climatologies-into),
// and the pieces' array (stage 2) waits for those merges and takes its
// anomalies against it (run --climatology). It calls sbatch and squeue;
// it has no scheduler or daemon of its own. Status reads a submission
// folder back.
//
// A submission folder holds:
//
//	slurm/           the scripts and submission.json (job ids, commands)
//	logs/            every task's standard output and error
//	pieces/D/piece-K the run folder of piece K of dataset D
//	pieces/D/climatology-K.gob, pieces/D/climatology.gob
//	                 anomaly mode: piece K's climatology, the merged one
//	D/               the merged run of dataset D
//	comparison/      the comparison, when there is one
package slurm

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"
)

// Format tags submission.json.
const Format = "lidscope-slurm-submission/1"

// Folder names inside a submission folder (a dataset may not take them).
const (
	ScriptDir  = "slurm"
	LogDir     = "logs"
	PieceDir   = "pieces"
	CompareDir = "comparison"
	RecordFile = "submission.json"
)

// Spec describes one submission.
type Spec struct {
	Program string // absolute path of the lidscope program the tasks run
	// Env are NAME=VALUE pairs the scripts export before running Program.
	Env      []string
	Study    string   // absolute path of the study file
	Out      string   // absolute path of the submission folder
	Datasets []string // in study order
	// Reference is the dataset the others are compared with ("": no
	// compare job; the study has fewer than two datasets).
	Reference string
	Pieces    int
	// Anomaly lists the datasets (of Datasets) whose relationships are in
	// anomaly mode: with more than one piece they go through the two
	// stages (see the package documentation).
	Anomaly []string
	// sbatch options, passed through under sbatch's own names ("" or 0:
	// the cluster's default).
	Partition, Time, Mem, Account string
	CPUsPerTask                   int
	Set                           []string // KEY=VALUE study overrides for every task
	// Only, when set, restricts the job array to these task indices
	// (resubmitting the missing pieces).
	Only []int
	// Command is the lidscope command line that made the submission (for
	// the record and the resubmit hint), without --only and --dry-run.
	Command []string
}

// Check refuses a spec the scripts cannot express.
func (s Spec) Check() error {
	if s.Pieces < 1 {
		return fmt.Errorf("--pieces must be at least 1, not %d", s.Pieces)
	}
	if len(s.Datasets) == 0 {
		return fmt.Errorf("the study has no dataset to submit")
	}
	for _, p := range []string{s.Out, s.Program, s.Study} {
		if strings.ContainsAny(p, " \t\n%'\"\\$`") {
			return fmt.Errorf("path %q: batch scripts here need paths without spaces, quotes, $, ` or %% (sbatch expands %% in log names); use another folder", p)
		}
	}
	for _, d := range s.Datasets {
		switch d {
		case ScriptDir, LogDir, PieceDir, CompareDir:
			return fmt.Errorf("dataset %q: the name is one of the folders of a submission (%s, %s, %s, %s); rename the dataset", d, ScriptDir, LogDir, PieceDir, CompareDir)
		}
	}
	for _, a := range s.Anomaly {
		found := false
		for _, d := range s.Datasets {
			found = found || a == d
		}
		if !found {
			return fmt.Errorf("anomaly-mode dataset %q is not one of the submission's datasets", a)
		}
	}
	n := len(s.Datasets) * s.Pieces
	for _, i := range s.Only {
		if i < 0 || i >= n {
			return fmt.Errorf("--only %d: the array has tasks 0…%d (%d datasets × %d pieces)", i, n-1, len(s.Datasets), s.Pieces)
		}
	}
	return nil
}

// Task is one array task: dataset and piece (1…Pieces).
type Task struct {
	Index   int
	Dataset string
	Piece   int
}

// Tasks lists the array's tasks: index = dataset × Pieces + piece − 1.
func (s Spec) Tasks() []Task {
	var out []Task
	for i, d := range s.Datasets {
		for k := 1; k <= s.Pieces; k++ {
			out = append(out, Task{Index: i*s.Pieces + k - 1, Dataset: d, Piece: k})
		}
	}
	return out
}

// TwoStages reports whether the submission has the climatology stage
// (datasets in anomaly mode, split into pieces).
func (s Spec) TwoStages() bool { return s.Pieces > 1 && len(s.Anomaly) > 0 }

// ClimatologyTasks lists the tasks of the climatology array: index =
// (the dataset's place in Anomaly) × Pieces + piece − 1.
func (s Spec) ClimatologyTasks() []Task {
	if !s.TwoStages() {
		return nil
	}
	var out []Task
	for i, d := range s.Anomaly {
		for k := 1; k <= s.Pieces; k++ {
			out = append(out, Task{Index: i*s.Pieces + k - 1, Dataset: d, Piece: k})
		}
	}
	return out
}

// ClimatologyPath is the climatology of piece k of dataset d (stage 1).
func (s Spec) ClimatologyPath(d string, k int) string {
	return filepath.Join(s.Out, PieceDir, d, "climatology-"+strconv.Itoa(k)+".gob")
}

// MergedClimatologyPath is the climatology of dataset d's whole record,
// which its stage-2 pieces take their anomalies against.
func (s Spec) MergedClimatologyPath(d string) string {
	return filepath.Join(s.Out, PieceDir, d, "climatology.gob")
}

func (s Spec) anomaly(d string) bool {
	for _, a := range s.Anomaly {
		if a == d {
			return true
		}
	}
	return false
}

// PiecePath is the run folder of piece k of dataset d (with one piece,
// the dataset's run folder itself).
func (s Spec) PiecePath(d string, k int) string {
	if s.Pieces == 1 {
		return s.RunPath(d)
	}
	return filepath.Join(s.Out, PieceDir, d, "piece-"+strconv.Itoa(k))
}

// RunPath is the merged run folder of dataset d.
func (s Spec) RunPath(d string) string { return filepath.Join(s.Out, d) }

// ComparePath is the comparison folder.
func (s Spec) ComparePath() string { return filepath.Join(s.Out, CompareDir) }

// Script is one batch script.
type Script struct {
	Name string // pieces, merge-DATASET, compare
	Path string
	Text string
	// After names the scripts whose jobs this one waits for (afterok).
	After []string
}

// q quotes a word for bash.
func q(s string) string {
	if s != "" && !strings.ContainsAny(s, " \t\n'\"\\$`!*?[]{}()<>|&;#~") {
		return s
	}
	return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'"
}

func (s Spec) header(name, logName string, array string) string {
	var b strings.Builder
	b.WriteString("#!/bin/bash\n")
	fmt.Fprintf(&b, "# written by lidscope submit for %s; resubmitting runs only what is not complete\n", s.Study)
	fmt.Fprintf(&b, "#SBATCH --job-name=lidscope-%s\n", name)
	if array != "" {
		fmt.Fprintf(&b, "#SBATCH --array=%s\n", array)
	}
	fmt.Fprintf(&b, "#SBATCH --output=%s\n", filepath.Join(s.Out, LogDir, logName+".out"))
	fmt.Fprintf(&b, "#SBATCH --error=%s\n", filepath.Join(s.Out, LogDir, logName+".err"))
	if s.CPUsPerTask > 0 {
		fmt.Fprintf(&b, "#SBATCH --cpus-per-task=%d\n", s.CPUsPerTask)
	}
	for _, o := range [][2]string{{"partition", s.Partition}, {"time", s.Time}, {"mem", s.Mem}, {"account", s.Account}} {
		if o[1] != "" {
			fmt.Fprintf(&b, "#SBATCH --%s=%s\n", o[0], o[1])
		}
	}
	b.WriteString("set -eu\n")
	for _, e := range s.Env {
		fmt.Fprintf(&b, "export %s\n", q(e))
	}
	return b.String()
}

func (s Spec) sets() string {
	var b strings.Builder
	for _, kv := range s.Set {
		b.WriteString(" --set " + q(kv))
	}
	return b.String()
}

// Array is the array of all tasks, or of Only.
func (s Spec) Array() string {
	if len(s.Only) > 0 {
		var w []string
		for _, i := range s.Only {
			w = append(w, strconv.Itoa(i))
		}
		return strings.Join(w, ",")
	}
	return fmt.Sprintf("0-%d", len(s.Datasets)*s.Pieces-1)
}

// Scripts returns the batch scripts of the submission in submission order.
func (s Spec) Scripts() []Script {
	dir := filepath.Join(s.Out, ScriptDir)
	var ds []string
	for _, d := range s.Datasets {
		ds = append(ds, q(d))
	}
	var scripts []Script
	var climMerges []string
	if s.TwoStages() {
		// Stage 1: each piece's climatology, then the whole record's.
		var as []string
		for _, d := range s.Anomaly {
			as = append(as, q(d))
		}
		var b strings.Builder
		b.WriteString(s.header("climatology", "climatology-%A_%a", fmt.Sprintf("0-%d", len(s.Anomaly)*s.Pieces-1)))
		fmt.Fprintf(&b, "datasets=(%s)\npieces=%d\n", strings.Join(as, " "), s.Pieces)
		b.WriteString("i=$SLURM_ARRAY_TASK_ID\nd=${datasets[$(( i / pieces ))]}\nk=$(( i % pieces + 1 ))\n")
		fmt.Fprintf(&b, "mkdir -p %s/\"$d\"\n", q(filepath.Join(s.Out, PieceDir)))
		fmt.Fprintf(&b, "exec %s run %s --dataset \"$d\" --piece \"$k/$pieces\" --climatology-out %s/\"$d\"/climatology-\"$k\".gob --jobs 1 --quiet%s\n",
			q(s.Program), q(s.Study), q(filepath.Join(s.Out, PieceDir)), s.sets())
		scripts = append(scripts, Script{Name: "climatology", Path: filepath.Join(dir, "climatology.sh"), Text: b.String()})
		for _, d := range s.Anomaly {
			name := "merge-climatology-" + d
			var m strings.Builder
			m.WriteString(s.header(name, name+"-%j", ""))
			fmt.Fprintf(&m, "exec %s merge --climatologies-into %s", q(s.Program), q(s.MergedClimatologyPath(d)))
			for k := 1; k <= s.Pieces; k++ {
				m.WriteString(" " + q(s.ClimatologyPath(d, k)))
			}
			m.WriteString("\n")
			scripts = append(scripts, Script{Name: name, Path: filepath.Join(dir, name+".sh"), Text: m.String(), After: []string{"climatology"}})
			climMerges = append(climMerges, name)
		}
	}
	var b strings.Builder
	b.WriteString(s.header("pieces", "pieces-%A_%a", s.Array()))
	fmt.Fprintf(&b, "datasets=(%s)\npieces=%d\n", strings.Join(ds, " "), s.Pieces)
	b.WriteString("i=$SLURM_ARRAY_TASK_ID\nd=${datasets[$(( i / pieces ))]}\nk=$(( i % pieces + 1 ))\n")
	clim := ""
	if s.TwoStages() {
		// stage 2: the anomaly datasets' pieces against the merged climatology
		var cs []string
		for _, d := range s.Datasets {
			c := "''"
			if s.anomaly(d) {
				c = q(s.MergedClimatologyPath(d))
			}
			cs = append(cs, c)
		}
		fmt.Fprintf(&b, "climatologies=(%s)\nc=${climatologies[$(( i / pieces ))]}\n", strings.Join(cs, " "))
		clim = " ${c:+--climatology \"$c\"}"
	}
	if s.Pieces == 1 {
		fmt.Fprintf(&b, "exec %s run %s --dataset \"$d\" --out %s/\"$d\" --jobs 1 --no-plots --quiet%s\n", q(s.Program), q(s.Study), q(s.Out), s.sets())
	} else {
		fmt.Fprintf(&b, "exec %s run %s --dataset \"$d\" --piece \"$k/$pieces\"%s --out %s/\"$d\"/piece-\"$k\" --jobs 1 --no-plots --quiet%s\n",
			q(s.Program), q(s.Study), clim, q(filepath.Join(s.Out, PieceDir)), s.sets())
	}
	scripts = append(scripts, Script{Name: "pieces", Path: filepath.Join(dir, "pieces.sh"), Text: b.String(), After: climMerges})
	var merges []string
	if s.Pieces > 1 {
		for _, d := range s.Datasets {
			name := "merge-" + d
			var m strings.Builder
			m.WriteString(s.header(name, name+"-%j", ""))
			fmt.Fprintf(&m, "exec %s merge", q(s.Program))
			for k := 1; k <= s.Pieces; k++ {
				m.WriteString(" " + q(s.PiecePath(d, k)))
			}
			fmt.Fprintf(&m, " --out %s --force\n", q(s.RunPath(d)))
			scripts = append(scripts, Script{Name: name, Path: filepath.Join(dir, name+".sh"), Text: m.String(), After: []string{"pieces"}})
			merges = append(merges, name)
		}
	} else {
		merges = []string{"pieces"}
	}
	if s.Reference != "" && len(s.Datasets) > 1 {
		var c strings.Builder
		c.WriteString(s.header("compare", "compare-%j", ""))
		fmt.Fprintf(&c, "exec %s compare %s", q(s.Program), q(s.RunPath(s.Reference)))
		for _, d := range s.Datasets {
			if d != s.Reference {
				c.WriteString(" " + q(s.RunPath(d)))
			}
		}
		fmt.Fprintf(&c, " --out %s --force --quiet\n", q(s.ComparePath()))
		scripts = append(scripts, Script{Name: "compare", Path: filepath.Join(dir, "compare.sh"), Text: c.String(), After: merges})
	}
	return scripts
}

// Record is submission.json: what was submitted, how, and the job ids.
type Record struct {
	Format    string            `json:"format"`
	Study     string            `json:"study"`
	Program   string            `json:"program"`
	Datasets  []string          `json:"datasets"`
	Reference string            `json:"reference,omitempty"`
	Pieces    int               `json:"pieces"`
	Anomaly   []string          `json:"anomaly_datasets,omitempty"`
	Command   []string          `json:"command"`
	Scripts   []string          `json:"scripts"`
	Sbatch    []string          `json:"sbatch_commands"`
	Jobs      map[string]string `json:"job_ids"`
	Only      []int             `json:"only,omitempty"`
	DryRun    bool              `json:"dry_run"`
	Submitted string            `json:"submitted"`
	// Earlier are the records of earlier submissions into the folder.
	Earlier []Record `json:"earlier,omitempty"`
}

// Sbatch runs sbatch with args and returns its standard output.
type Sbatch func(args ...string) (string, error)

// Submit writes the scripts into s.Out/slurm (and makes s.Out/logs) and
// submits them in order with sbatch --parsable, each with
// --dependency=afterok on the jobs it waits for; with dryRun it writes the
// scripts and returns the commands (as shell lines using variables for the
// job ids) without calling sbatch. The record is written to
// s.Out/slurm/submission.json either way.
func Submit(s Spec, sbatch Sbatch, dryRun bool) (*Record, error) {
	if err := s.Check(); err != nil {
		return nil, err
	}
	for _, d := range []string{filepath.Join(s.Out, ScriptDir), filepath.Join(s.Out, LogDir)} {
		if err := os.MkdirAll(d, 0o755); err != nil {
			return nil, err
		}
	}
	rec := &Record{Format: Format, Study: s.Study, Program: s.Program, Datasets: s.Datasets, Reference: s.Reference, Pieces: s.Pieces, Anomaly: s.Anomaly,
		Command: s.Command, Jobs: map[string]string{}, Only: s.Only, DryRun: dryRun, Submitted: time.Now().UTC().Format(time.RFC3339)}
	if old, err := ReadRecord(s.Out); err == nil {
		earlier := old.Earlier
		old.Earlier = nil
		rec.Earlier = append(earlier, *old)
	}
	scripts := s.Scripts()
	for _, sc := range scripts {
		if err := os.WriteFile(sc.Path, []byte(sc.Text), 0o755); err != nil {
			return nil, err
		}
		rec.Scripts = append(rec.Scripts, sc.Path)
	}
	variable := func(name string) string { return strings.ReplaceAll(name, "-", "_") + "_job" }
	for _, sc := range scripts {
		args := []string{"--parsable"}
		if sc.Name == "pieces" && len(s.Only) > 0 {
			args = append(args, "--array="+s.Array())
		}
		var deps, depVars []string
		for _, a := range sc.After {
			deps = append(deps, rec.Jobs[a])
			depVars = append(depVars, "$"+variable(a))
		}
		line := func(ids []string) []string {
			a := append([]string{}, args...)
			if len(ids) > 0 {
				a = append(a, "--dependency=afterok:"+strings.Join(ids, ":"))
			}
			return append(a, sc.Path)
		}
		if dryRun {
			rec.Sbatch = append(rec.Sbatch, variable(sc.Name)+"=$(sbatch "+strings.Join(line(depVars), " ")+")")
			rec.Jobs[sc.Name] = "$" + variable(sc.Name)
			continue
		}
		a := line(deps)
		rec.Sbatch = append(rec.Sbatch, "sbatch "+strings.Join(a, " "))
		out, err := sbatch(a...)
		if err != nil {
			writeRecord(s.Out, rec)
			return rec, fmt.Errorf("sbatch %s: %w", strings.Join(a, " "), err)
		}
		id, _, _ := strings.Cut(strings.TrimSpace(out), ";") // --parsable: "ID" or "ID;CLUSTER"
		if _, err := strconv.Atoi(id); err != nil {
			writeRecord(s.Out, rec)
			return rec, fmt.Errorf("sbatch %s printed %q, not a job id", strings.Join(a, " "), out)
		}
		rec.Jobs[sc.Name] = id
	}
	return rec, writeRecord(s.Out, rec)
}

func writeRecord(out string, rec *Record) error {
	b, err := json.MarshalIndent(rec, "", "  ")
	if err != nil {
		return err
	}
	p := filepath.Join(out, ScriptDir, RecordFile)
	tmp := p + ".tmp"
	if err := os.WriteFile(tmp, append(b, '\n'), 0o644); err != nil {
		return err
	}
	return os.Rename(tmp, p)
}

// ReadRecord reads the submission record of the folder out.
func ReadRecord(out string) (*Record, error) {
	p := filepath.Join(out, ScriptDir, RecordFile)
	b, err := os.ReadFile(p)
	if err != nil {
		if os.IsNotExist(err) {
			return nil, fmt.Errorf("%s is not a submission folder: it has no %s (made by lidscope submit)", out, filepath.Join(ScriptDir, RecordFile))
		}
		return nil, err
	}
	var r Record
	if err := json.Unmarshal(b, &r); err != nil {
		return nil, fmt.Errorf("%s: %w", p, err)
	}
	if r.Format != Format {
		return nil, fmt.Errorf("%s: format %q, not %s", p, r.Format, Format)
	}
	return &r, nil
}

// Spec rebuilds the spec of a record (for paths and task numbering).
func (r *Record) Spec(out string) Spec {
	return Spec{Program: r.Program, Study: r.Study, Out: out, Datasets: r.Datasets, Reference: r.Reference, Pieces: r.Pieces, Anomaly: r.Anomaly, Command: r.Command}
}
