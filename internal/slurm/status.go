package slurm

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
)

// State of one piece, merge or comparison.
type State string

const (
	Complete State = "complete" // a committed run folder
	Queued   State = "queued"   // pending or running (squeue)
	Failed   State = "failed"   // the task ran (its log exists) and left no complete folder
	Missing  State = "missing"  // never ran
)

// PieceStatus is the state of one task.
type PieceStatus struct {
	Task
	State State
	Log   string // its error log, when there is one
}

// Report is the state of a submission folder.
type Report struct {
	Record *Record
	Pieces []PieceStatus
	// Climatology and MergedClimatology are stage 1 of anomaly mode (see
	// Spec.TwoStages): each piece's climatology, and each dataset's
	// merged one; empty without that stage.
	Climatology       []PieceStatus
	MergedClimatology map[string]State
	Merged            map[string]State // dataset → its merged run
	Compare           State            // "" when the submission has no comparison
	Resubmit          []string         // the command that resubmits what is not complete ("" when all is)
}

// Checks tell Status what is complete: Committed(dir, piece) reports
// whether dir holds a complete run of that piece ("" for a merged run or
// a comparison). Queued lists the array task indices squeue shows.
type Checks struct {
	Committed func(dir, piece string) bool
	// Compared reports whether dir holds a complete comparison.
	Compared func(dir string) bool
	Queued   func(arrayJob string) (map[int]bool, error)
}

// Status reads the submission folder out.
func Status(out string, c Checks) (*Report, error) {
	rec, err := ReadRecord(out)
	if err != nil {
		return nil, err
	}
	s := rec.Spec(out)
	rep := &Report{Record: rec, Merged: map[string]State{}}
	queued := map[int]bool{}
	if id := rec.Jobs["pieces"]; id != "" && !rec.DryRun && c.Queued != nil {
		if q, err := c.Queued(id); err == nil {
			queued = q
		}
	}
	logOf := taskLogs(out, "pieces")
	var redo []int
	for _, t := range s.Tasks() {
		ps := PieceStatus{Task: t}
		piece := fmt.Sprintf("%d/%d", t.Piece, s.Pieces)
		if s.Pieces == 1 {
			piece = ""
		}
		switch {
		case c.Committed(s.PiecePath(t.Dataset, t.Piece), piece):
			ps.State = Complete
		case queued[t.Index]:
			ps.State = Queued
		case logOf[t.Index] != "":
			ps.State, ps.Log = Failed, logOf[t.Index]
		default:
			ps.State = Missing
		}
		if ps.State == Failed || ps.State == Missing {
			redo = append(redo, t.Index)
		}
		rep.Pieces = append(rep.Pieces, ps)
	}
	if s.TwoStages() {
		rep.Climatology, rep.MergedClimatology = climatologyStatus(out, s, rec, c)
	}
	for _, d := range s.Datasets {
		if c.Committed(s.RunPath(d), "") {
			rep.Merged[d] = Complete
		} else {
			rep.Merged[d] = Missing
		}
	}
	if s.Reference != "" && len(s.Datasets) > 1 {
		rep.Compare = Missing
		if c.Compared(s.ComparePath()) {
			rep.Compare = Complete
		}
	}
	incomplete := len(redo) > 0 || rep.Compare == Missing
	for _, st := range rep.Merged {
		incomplete = incomplete || st != Complete
	}
	if incomplete && len(rec.Command) > 0 {
		cmd := append([]string{}, rec.Command...)
		if len(redo) > 0 {
			var w []string
			for _, i := range redo {
				w = append(w, strconv.Itoa(i))
			}
			cmd = append(cmd, "--only", strings.Join(w, ","))
		}
		for i := range cmd {
			cmd[i] = q(cmd[i])
		}
		rep.Resubmit = cmd
	}
	return rep, nil
}

// climatologyStatus is the state of stage 1 of anomaly mode: each
// piece's climatology file, and each dataset's merged climatology.
func climatologyStatus(out string, s Spec, rec *Record, c Checks) ([]PieceStatus, map[string]State) {
	merged := map[string]State{}
	cq := map[int]bool{}
	if id := rec.Jobs["climatology"]; id != "" && !rec.DryRun && c.Queued != nil {
		if q, err := c.Queued(id); err == nil {
			cq = q
		}
	}
	clogs := taskLogs(out, "climatology")
	var pieces []PieceStatus
	for _, t := range s.ClimatologyTasks() {
		ps := PieceStatus{Task: t}
		switch {
		case fileExists(s.ClimatologyPath(t.Dataset, t.Piece)):
			ps.State = Complete
		case cq[t.Index]:
			ps.State = Queued
		case clogs[t.Index] != "":
			ps.State, ps.Log = Failed, clogs[t.Index]
		default:
			ps.State = Missing
		}
		pieces = append(pieces, ps)
	}
	for _, d := range s.Anomaly {
		merged[d] = Missing
		if fileExists(s.MergedClimatologyPath(d)) {
			merged[d] = Complete
		}
	}
	return pieces, merged
}

// taskLogs finds the error logs of the array script name's tasks
// (logs/NAME-JOB_TASK.err): task index → the latest job's log.
func taskLogs(out, name string) map[int]string {
	logs, _ := filepath.Glob(filepath.Join(out, LogDir, name+"-*_*.err"))
	logOf := map[int]string{}
	sort.Strings(logs)
	for _, l := range logs {
		b := strings.TrimSuffix(filepath.Base(l), ".err")
		if i := strings.LastIndexByte(b, '_'); i >= 0 {
			if n, err := strconv.Atoi(b[i+1:]); err == nil {
				logOf[n] = l // the latest job's log (ids sort as text of equal length, mostly)
			}
		}
	}
	return logOf
}

func fileExists(p string) bool {
	fi, err := os.Stat(p)
	return err == nil && fi.Mode().IsRegular()
}

// Write prints the report.
func (r *Report) Write(w io.Writer, out string) {
	rec := r.Record
	fmt.Fprintf(w, "submission %s: study %s, %d dataset(s) × %d piece(s)", out, rec.Study, len(rec.Datasets), rec.Pieces)
	if len(r.Climatology) > 0 {
		fmt.Fprintf(w, ", anomaly mode in two stages for %s", strings.Join(rec.Anomaly, ", "))
	}
	if rec.DryRun {
		fmt.Fprint(w, " (dry run: nothing was submitted)")
	}
	fmt.Fprintln(w)
	var ids []string
	for k, v := range rec.Jobs {
		ids = append(ids, k+" "+v)
	}
	sort.Strings(ids)
	if len(ids) > 0 {
		fmt.Fprintf(w, "  jobs: %s\n", strings.Join(ids, ", "))
	}
	byDS := map[string][]PieceStatus{}
	for _, p := range r.Pieces {
		byDS[p.Dataset] = append(byDS[p.Dataset], p)
	}
	climOf := map[string][]PieceStatus{}
	for _, p := range r.Climatology {
		climOf[p.Dataset] = append(climOf[p.Dataset], p)
	}
	for _, d := range rec.Datasets {
		if cs := climOf[d]; len(cs) > 0 {
			fmt.Fprintf(w, "dataset %s, stage 1 (climatology):", d)
			writeGroups(w, cs)
			fmt.Fprintf(w, " merged climatology: %s\n", r.MergedClimatology[d])
			for _, p := range cs {
				if p.State == Failed {
					fmt.Fprintf(w, "  climatology of piece %d failed: see %s\n", p.Piece, p.Log)
				}
			}
		}
		if len(climOf[d]) > 0 {
			fmt.Fprintf(w, "dataset %s, stage 2 (anomalies):", d)
		} else {
			fmt.Fprintf(w, "dataset %s:", d)
		}
		writeGroups(w, byDS[d])
		fmt.Fprintf(w, " merged run: %s\n", r.Merged[d])
		for _, p := range byDS[d] {
			if p.State == Failed {
				fmt.Fprintf(w, "  piece %d failed: see %s\n", p.Piece, p.Log)
			}
		}
	}
	if r.Compare != "" {
		fmt.Fprintf(w, "comparison: %s\n", r.Compare)
	}
	if len(r.Resubmit) > 0 {
		fmt.Fprintf(w, "to resubmit what is not complete (complete pieces are kept; the merges and the comparison follow):\n  %s\n", strings.Join(r.Resubmit, " "))
		if len(r.Climatology) > 0 {
			fmt.Fprintln(w, "(in anomaly mode the climatology stage runs again in full, one read of the record; stage-2 pieces made against the same climatology are kept)")
		}
	} else if !rec.DryRun {
		fmt.Fprintln(w, "everything is complete")
	}
}

// writeGroups prints the tasks by state: " complete 1 (task 0), 2 (task 1); missing …;".
func writeGroups(w io.Writer, ps []PieceStatus) {
	groups := map[State][]string{}
	for _, p := range ps {
		groups[p.State] = append(groups[p.State], fmt.Sprintf("%d (task %d)", p.Piece, p.Index))
	}
	for _, st := range []State{Complete, Queued, Failed, Missing} {
		if len(groups[st]) > 0 {
			fmt.Fprintf(w, " %s %s;", st, strings.Join(groups[st], ", "))
		}
	}
}
