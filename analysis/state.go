package analysis

import (
	"bytes"
	"crypto/sha256"
	"encoding/gob"
	"encoding/hex"
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"lidscope/accumulate"
	"lidscope/output"
	"lidscope/relations"
	"lidscope/stage"
)

// StateFile holds a finished run's complete accumulators (regime
// statistics and relationships) and provenance, so that runs over
// consecutive pieces of a record (split by time range or by file set) can
// be merged later into exactly what one run over the whole record gives
// (see Merge).
const StateFile = "run-state.gob"

// stateFormat tags the run state; bump it whenever runState changes.
// Version 2 added the relationship accumulator.
const stateFormat = "lidscope-run-state/2"

type runState struct {
	Format string
	Meta   output.Meta
	Acc    []byte // accumulate.Acc.Encode
	Rel    []byte // relations.Acc.Encode
	// NoRelations, when set, says why the run has no relationship
	// analysis (an optional input absent); Rel is then empty.
	NoRelations string
}

// saveState writes the run state; rel is nil exactly when the run has no
// relationship analysis, and noRel then says why.
func saveState(dir string, meta output.Meta, acc *accumulate.Acc, rel *relations.Acc, noRel string) error {
	if rel == nil && noRel == "" {
		return fmt.Errorf("writing the run state in %s: no relationship accumulator to save", dir)
	}
	var ab, rb bytes.Buffer
	if err := acc.Encode(&ab); err != nil {
		return err
	}
	if rel != nil {
		if err := rel.Encode(&rb); err != nil {
			return err
		}
	}
	var buf bytes.Buffer
	if err := gob.NewEncoder(&buf).Encode(runState{Format: stateFormat, Meta: meta, Acc: ab.Bytes(), Rel: rb.Bytes(), NoRelations: noRel}); err != nil {
		return fmt.Errorf("encoding the run state: %w", err)
	}
	st, err := stage.New(dir, ".lidscope-state-*")
	if err != nil {
		return err
	}
	defer st.Remove()
	if err := st.WriteFile(StateFile, buf.Bytes()); err != nil {
		return fmt.Errorf("writing %s: %w", filepath.Join(dir, StateFile), err)
	}
	return st.Commit([]string{StateFile}, true)
}

// loadedState is a decoded run state; rel is nil unless asked for, or
// when the run had no relationship analysis (noRel says why).
type loadedState struct {
	meta  output.Meta
	acc   *accumulate.Acc
	rel   *relations.Acc
	noRel string
}

// loadState reads the state a run left in dir, with the relationship
// accumulator when withRel is set.
func loadState(dir string, withRel bool) (loadedState, error) {
	p := filepath.Join(dir, StateFile)
	b, err := os.ReadFile(p)
	if err != nil {
		return loadedState{}, fmt.Errorf("%w (is %s a lidscope run folder?)", err, dir)
	}
	var s runState
	if err := gob.NewDecoder(bytes.NewReader(b)).Decode(&s); err != nil {
		return loadedState{}, fmt.Errorf("%s: %w", p, err)
	}
	if s.Format != stateFormat {
		return loadedState{}, fmt.Errorf("%s: run state format %q, this lidscope reads %q: re-run the analysis of %s with this version", p, s.Format, stateFormat, dir)
	}
	acc, err := accumulate.Decode(bytes.NewReader(s.Acc))
	if err != nil {
		return loadedState{}, fmt.Errorf("%s: %w", p, err)
	}
	ls := loadedState{meta: s.Meta, acc: acc, noRel: s.NoRelations}
	if withRel && s.NoRelations == "" {
		if len(s.Rel) == 0 {
			return loadedState{}, fmt.Errorf("%s: the run state holds no relationship accumulator (the file is damaged): re-run the analysis of %s", p, dir)
		}
		if ls.rel, err = relations.DecodeAcc(bytes.NewReader(s.Rel)); err != nil {
			return loadedState{}, fmt.Errorf("%s: %w", p, err)
		}
	}
	return ls, nil
}

// LoadState reads the provenance and the regime accumulator of the state
// a run left in dir.
func LoadState(dir string) (output.Meta, *accumulate.Acc, error) {
	s, err := loadState(dir, false)
	return s.meta, s.acc, err
}

// Merge joins finished runs over consecutive, non-overlapping pieces of one
// dataset's record and writes the merged results to out: the regime
// outputs, the relationship outputs (relations.Write) and the merged run
// state. The runs must agree on everything but the period: dataset,
// metrics conventions, regime definition, grid, quantities, regions, calendar,
// sampling and the relationship configuration. Runs whose relationships
// are anomalies (relations.Anomaly) are refused: each piece took its
// anomalies against the climatology of its own period, so no merge gives
// what one run over the record gives; run such a record in one piece.
func Merge(dirs []string, out string, opt Options) (Report, error) {
	if len(dirs) < 2 {
		return Report{}, fmt.Errorf("give at least two run folders to merge")
	}
	type run struct {
		dir  string
		meta output.Meta
		acc  *accumulate.Acc
		rel  *relations.Acc
		// noRel: the run has no relationship analysis, and why
		noRel string
	}
	if !opt.Force {
		for _, n := range append(append(output.OutputNames(), relations.OutputNames()...), StateFile) {
			if _, err := os.Stat(filepath.Join(out, n)); err == nil {
				return Report{}, fmt.Errorf("%s already holds results (%s); use --force to replace them or choose another --out", out, n)
			}
		}
	}
	var runs []run
	for _, d := range dirs {
		s, err := loadState(d, true)
		if err != nil {
			return Report{}, err
		}
		if len(s.meta.TimeValues) == 0 {
			return Report{}, fmt.Errorf("%s: the run has no time steps", d)
		}
		runs = append(runs, run{d, s.meta, s.acc, s.rel, s.noRel})
	}
	sort.SliceStable(runs, func(i, j int) bool { return runs[i].meta.TimeValues[0] < runs[j].meta.TimeValues[0] })
	first := runs[0]
	var problems []string
	for _, r := range runs[1:] {
		a, b := first.meta, r.meta
		check := func(what string, x, y any) {
			if fmt.Sprint(x) != fmt.Sprint(y) {
				problems = append(problems, fmt.Sprintf("%s: %s has %v, %s has %v", what, first.dir, x, r.dir, y))
			}
		}
		check("dataset", a.Dataset, b.Dataset)
		check("metrics conventions", a.MetricsConventions, b.MetricsConventions)
		check("regime definition", a.RegimeDefinition, b.RegimeDefinition)
		check("time steps per year", a.StepsPerYear, b.StepsPerYear)
		check("calendar", a.Calendar, b.Calendar)
		check("time units", a.TimeUnits, b.TimeUnits)
		check("quantities", a.Absent, b.Absent)
		if (first.rel == nil) != (r.rel == nil) {
			problems = append(problems, fmt.Sprintf("relationship analysis: %s has %s, %s has %s", first.dir, relWord(first.noRel), r.dir, relWord(r.noRel)))
		}
	}
	for i := 1; i < len(runs); i++ {
		p, q := runs[i-1].meta, runs[i].meta
		if q.TimeValues[0] <= p.TimeValues[len(p.TimeValues)-1] {
			problems = append(problems, fmt.Sprintf("periods overlap: %s (%s) and %s (%s)", runs[i-1].dir, p.Period, runs[i].dir, q.Period))
		}
	}
	if len(problems) > 0 {
		return Report{}, fmt.Errorf("cannot merge these runs:\n  %s", strings.Join(problems, "\n  "))
	}
	if first.rel != nil && first.rel.Mode() == relations.Anomaly {
		// relations.Acc.Merge would refuse too (the climatologies differ);
		// say what to do at the level of lidscope's runs.
		return Report{}, fmt.Errorf("cannot merge these runs: their relationship analysis is in anomaly mode (relationships.mode: %s), and each of %s took its anomalies against the climatology of its own period, so no merge gives what one run over the whole record gives; "+
			"run the whole record in one run, or use relationships.mode: %s for runs meant to be merged", relations.Anomaly, strings.Join(dirs, ", "), relations.Climatological)
	}
	acc, rel := first.acc, first.rel
	meta := first.meta
	hashes := []string{}
	studies := []string{}
	for i, r := range runs {
		hashes = append(hashes, r.meta.StudyHash)
		studies = append(studies, fmt.Sprintf("# run %d: %s (%s)\n%s", i+1, r.dir, r.meta.Period, r.meta.Study))
		if i == 0 {
			continue
		}
		if err := acc.Merge(r.acc); err != nil {
			return Report{}, fmt.Errorf("merging %s: %w", r.dir, err)
		}
		if rel == nil {
			// no relationship analysis in any piece (checked above)
		} else if err := rel.Merge(r.rel); err != nil {
			return Report{}, fmt.Errorf("merging the relationship analysis of %s: %w", r.dir, err)
		}
		meta.TimeValues = append(meta.TimeValues, r.meta.TimeValues...)
		if meta.TimeBounds != nil && r.meta.TimeBounds != nil {
			meta.TimeBounds = append(meta.TimeBounds, r.meta.TimeBounds...)
		} else {
			meta.TimeBounds = nil
		}
		meta.Inputs = append(meta.Inputs, r.meta.Inputs...)
		meta.Notes = append(meta.Notes, r.meta.Notes...)
		if r.meta.Start.Before(meta.Start) {
			meta.Start = r.meta.Start
		}
	}
	meta.Notes = append(meta.Notes, fmt.Sprintf("merged from %d runs: %s", len(runs), strings.Join(dirs, ", ")))
	meta.Period = strings.SplitN(first.meta.Period, " … ", 2)[0] + " … " + lastOf(runs[len(runs)-1].meta.Period)
	meta.Study = strings.Join(studies, "\n")
	sum := sha256.Sum256([]byte(strings.Join(hashes, "+")))
	meta.StudyHash = hex.EncodeToString(sum[:])
	meta.Version = opt.Version
	meta.Command = strings.Join(opt.Command, " ")
	meta.End = time.Now()
	var relRes *relations.Results
	if rel != nil {
		if n, m := rel.Steps(), len(meta.TimeValues); n != m {
			return Report{}, fmt.Errorf("the merged relationship analysis has %d time steps, the merged record %d: a run state is damaged; re-run the pieces", n, m)
		}
		var err error
		if relRes, err = rel.Results(); err != nil {
			return Report{}, fmt.Errorf("merged relationship analysis: %w", err)
		}
	}
	files, err := writeResults(out, acc, meta, relRes, rel, first.noRel, opt)
	if err != nil {
		return Report{}, err
	}
	return Report{Dataset: meta.Dataset, OutDir: out, Files: files, Meta: meta, Relations: relRes}, nil
}

// relWord describes a run's relationship analysis for a merge problem.
func relWord(noRel string) string {
	if noRel == "" {
		return "one"
	}
	return "none (" + noRel + ")"
}

func lastOf(period string) string {
	parts := strings.Split(period, " … ")
	return parts[len(parts)-1]
}
