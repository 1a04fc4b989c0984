package analysis

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"lidscope/config"
	"lidscope/fixtures"
	"lidscope/internal/runcmp"
	"lidscope/pipeline"
)

// Maps are stored as float32 (ε ≈ 6e-8), and merged means and variances
// are summed in another order: 1e-6 relative is rounding.
//
// mergeKeys are the outputs' records of how a run was made, which differ
// between a merge and one run by design: the study text and hash (a merge
// records each piece's), and the notes (a merge names its pieces).
var mergeKeys = []string{"study_hash", "study", "notes", "lidscope_command", "command", "processing_notes"}

// Pieces K/N of the selected record, merged, give the single run's
// results, file by file (to rounding); a piece already done is skipped,
// and redone when an input changed. The record is the synthetic world
// (invented data), with a season selection so that pieces are split after
// selecting.
func TestPiecesMergeToTheSingleRun(t *testing.T) {
	dir := t.TempDir()
	data := filepath.Join(dir, "data")
	if _, err := fixtures.Generate(data, *smallWorld()); err != nil {
		t.Fatal(err)
	}
	rp := filepath.Join(data, fixtures.StudyFile)
	for _, tc := range []struct {
		name  string
		n     int
		flags map[string]string
	}{
		{"whole-record-3", 3, nil},
		{"summer-months-4", 4, map[string]string{"datasets.*.time.months": "6,7,8"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r, err := config.Load(rp, config.LoadOptions{LookupEnv: config.NoEnvironment, Flags: tc.flags})
			if err != nil {
				t.Fatal(err)
			}
			base := filepath.Join(dir, tc.name)
			whole, err := Run(context.Background(), r, nil, Options{OutDir: filepath.Join(base, "whole"), NoPlots: true})
			if err != nil {
				t.Fatal(err)
			}
			var dirs []string
			steps := 0
			for k := 1; k <= tc.n; k++ {
				out := filepath.Join(base, fmt.Sprintf("piece-%d", k))
				reps, err := Run(context.Background(), r, nil, Options{OutDir: out, NoPlots: true, Piece: pipeline.Piece{K: k, N: tc.n}})
				if err != nil {
					t.Fatal(err)
				}
				if reps[0].Meta.Piece != fmt.Sprintf("%d/%d", k, tc.n) {
					t.Errorf("piece %d records piece %q", k, reps[0].Meta.Piece)
				}
				steps += len(reps[0].Result.Labels)
				dirs = append(dirs, out)
			}
			if n := len(whole[0].Result.Labels); steps != n {
				t.Fatalf("the pieces hold %d steps, the record %d", steps, n)
			}
			m, err := Merge(dirs, filepath.Join(base, "merged"), Options{})
			if err != nil {
				t.Fatal(err)
			}
			names, _ := runcmp.Names(whole[0].OutDir)
			if len(names) < 8 {
				t.Fatalf("only %d result files to compare: %v", len(names), names)
			}
			d, err := runcmp.Folders(whole[0].OutDir, m.OutDir, runcmp.Options{Tol: 1e-6, IgnoreKeys: mergeKeys})
			if err != nil {
				t.Fatal(err)
			}
			for _, x := range d {
				t.Errorf("merged pieces differ from the single run: %s", x)
			}
			// A control: one piece alone is not the whole record.
			if d, _ := runcmp.Folders(whole[0].OutDir, dirs[0], runcmp.Options{IgnoreKeys: mergeKeys}); len(d) == 0 {
				t.Error("piece 1 compares equal to the whole record: the comparison cannot fail")
			}
		})
	}
}

func TestPieceAlreadyDoneIsSkipped(t *testing.T) {
	dir := t.TempDir()
	data := filepath.Join(dir, "data")
	if _, err := fixtures.Generate(data, *smallWorld()); err != nil {
		t.Fatal(err)
	}
	r, err := config.Load(filepath.Join(data, fixtures.StudyFile), config.LoadOptions{LookupEnv: config.NoEnvironment})
	if err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "p2")
	opt := Options{OutDir: out, NoPlots: true, Piece: pipeline.Piece{K: 2, N: 3}}
	first, err := Run(context.Background(), r, nil, opt)
	if err != nil || first[0].Skipped != "" {
		t.Fatalf("first run: %v, skipped %q", err, first[0].Skipped)
	}
	again, err := Run(context.Background(), r, nil, opt)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(again[0].Skipped, "already complete") {
		t.Errorf("the same piece again was not skipped: %q", again[0].Skipped)
	}
	// A different study (another threshold) is not the same piece.
	r2, err := config.Load(filepath.Join(data, fixtures.StudyFile), config.LoadOptions{LookupEnv: config.NoEnvironment, Flags: map[string]string{"analysis.threshold": "0.5"}})
	if err != nil {
		t.Fatal(err)
	}
	if m, ok := donePiece(out, r2, mustPlan(t, r2), opt.Piece, ""); ok {
		t.Errorf("a piece of another study counts as done: %+v", m.StudyHash)
	}
	// Another piece into the folder is not skipped (refused: results there).
	other := opt
	other.Piece = pipeline.Piece{K: 1, N: 3}
	if reps, err := Run(context.Background(), r, nil, other); err == nil {
		t.Errorf("piece 1/3 into the folder of piece 2/3: no error, skipped %q", reps[0].Skipped)
	}
	// An input touched since: redone (refused without Force, run with it).
	in := first[0].Meta.Inputs[0].Path
	later := time.Now().Add(time.Hour)
	if err := os.Chtimes(in, later, later); err != nil {
		t.Fatal(err)
	}
	if reps, err := Run(context.Background(), r, nil, opt); err == nil {
		t.Errorf("a changed input: no error, skipped %q", reps[0].Skipped)
	}
}

func mustPlan(t *testing.T, r *config.Study) pipeline.Plan {
	t.Helper()
	p, err := pipeline.PlanFor(r, &r.Datasets[0])
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// Anomaly mode in pieces, by two stages: stage 1 builds each piece's
// climatology (ComputeClimatology), the climatologies merge into that of
// the whole record (through their files), stage 2 runs each piece's
// anomaly relationships against it; merged, the pieces give the single
// anomaly run's results file by file (to rounding).
func TestAnomalyPiecesMergeByTwoStages(t *testing.T) {
	dir := t.TempDir()
	data := filepath.Join(dir, "data")
	if _, err := fixtures.Generate(data, *smallWorld()); err != nil {
		t.Fatal(err)
	}
	for _, detrend := range []string{"false", "true"} {
		t.Run("detrend="+detrend, func(t *testing.T) {
			r, err := config.Load(filepath.Join(data, fixtures.StudyFile), config.LoadOptions{LookupEnv: config.NoEnvironment,
				Flags: map[string]string{"relationships.mode": "anomaly", "relationships.detrend": detrend}})
			if err != nil {
				t.Fatal(err)
			}
			base := filepath.Join(dir, "detrend-"+detrend)
			whole, err := Run(context.Background(), r, nil, Options{OutDir: filepath.Join(base, "whole"), NoPlots: true})
			if err != nil {
				t.Fatal(err)
			}
			const n = 3
			var clims, dirs []string
			for k := 1; k <= n; k++ {
				c, err := ComputeClimatology(context.Background(), r, &r.Datasets[0], Options{Piece: pipeline.Piece{K: k, N: n}})
				if err != nil {
					t.Fatal(err)
				}
				p := filepath.Join(base, fmt.Sprintf("clim-%d.gob", k))
				if err := WriteClimatology(p, c); err != nil {
					t.Fatal(err)
				}
				clims = append(clims, p)
			}
			clim, err := MergeClimatologies(clims)
			if err != nil {
				t.Fatal(err)
			}
			for k := 1; k <= n; k++ {
				out := filepath.Join(base, fmt.Sprintf("piece-%d", k))
				if _, err := Run(context.Background(), r, nil, Options{OutDir: out, NoPlots: true, Piece: pipeline.Piece{K: k, N: n}, Climatology: clim}); err != nil {
					t.Fatal(err)
				}
				dirs = append(dirs, out)
			}
			m, err := Merge(dirs, filepath.Join(base, "merged"), Options{})
			if err != nil {
				t.Fatal(err)
			}
			d, err := runcmp.Folders(whole[0].OutDir, m.OutDir, runcmp.Options{Tol: 1e-6, IgnoreKeys: mergeKeys})
			if err != nil {
				t.Fatal(err)
			}
			for _, x := range d {
				t.Errorf("anomaly pieces by two stages differ from the single run: %s", x)
			}
			// A stage-2 piece already done is skipped against the same
			// climatology only: against another one (piece 1's own), or
			// none, its anomalies would differ.
			own, err := ReadClimatology(clims[0])
			if err != nil {
				t.Fatal(err)
			}
			p1 := pipeline.Piece{K: 1, N: n}
			for _, c := range []struct {
				what string
				base string
				done bool
			}{{"the same climatology", clim.Fingerprint(), true}, {"piece 1's own climatology", own.Fingerprint(), false}, {"no climatology given", "", false}} {
				if _, ok := donePiece(dirs[0], r, mustPlan(t, r), p1, c.base); ok != c.done {
					t.Errorf("piece 1 done against %s: %v, want %v", c.what, ok, c.done)
				}
			}
			if again, err := Run(context.Background(), r, nil, Options{OutDir: dirs[0], NoPlots: true, Piece: p1, Climatology: clim}); err != nil || again[0].Skipped == "" {
				t.Errorf("piece 1 again against the same climatology: %v, not skipped", err)
			}
		})
	}
}

// A piece of a multi-file record hashes and records only the files that
// hold its steps (the synthetic world with one file per year and role, two
// years, in two pieces: each piece reads one year's files); the skip still
// sees a change to the other year's files (it could move the piece's
// steps), and a file added to the record.
func TestPieceReadsOnlyItsFiles(t *testing.T) {
	dir := badLibWorld(t)
	sst := badLibSST(t, dir) // 2001, 2002
	load := func() *config.Study {
		r, err := config.Load(filepath.Join(dir, fixtures.StudyFile), config.LoadOptions{LookupEnv: config.NoEnvironment})
		if err != nil {
			t.Fatal(err)
		}
		return r
	}
	r := load()
	all := 0
	for _, ps := range datasetPaths(&r.Datasets[0]) {
		all += len(ps)
	}
	out := filepath.Join(t.TempDir(), "p1")
	opt := Options{OutDir: out, NoPlots: true, Piece: pipeline.Piece{K: 1, N: 2}}
	reps, err := Run(context.Background(), r, nil, opt)
	if err != nil {
		t.Fatal(err)
	}
	m := reps[0].Meta
	if len(m.Listed) != all {
		t.Errorf("%d files listed, the study lists %d", len(m.Listed), all)
	}
	roles := map[string]bool{}
	for _, in := range m.Inputs {
		roles[in.Role] = true
		if strings.Contains(filepath.Base(in.Path), "2002") {
			t.Errorf("piece 1/2 (2001) read %s", in.Path)
		}
		if len(in.SHA256) != 64 {
			t.Errorf("%s: SHA-256 %q", in.Path, in.SHA256)
		}
	}
	// sst, air_temperature and low_cloud have a file per year; the land
	// mask is one file: 4 files of 7
	if len(m.Inputs) != len(roles) || len(m.Inputs) != 4 || all != 7 {
		t.Errorf("piece 1/2 read %d files of %d roles, want 4 of 4; the record has %d files, want 7", len(m.Inputs), len(roles), all)
	}
	if again, err := Run(context.Background(), r, nil, opt); err != nil || again[0].Skipped == "" {
		t.Fatalf("the same piece again: %v, not skipped", err)
	}
	// a file added to the record: the steps move
	extra := filepath.Join(filepath.Dir(sst[1]), "zz-extra.nc")
	b, err := os.ReadFile(sst[1])
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(extra, b, 0o644); err != nil {
		t.Fatal(err)
	}
	if _, ok := donePiece(out, load(), mustPlan(t, r), opt.Piece, ""); ok {
		t.Error("a file added to the record went unseen by the skip")
	}
	if err := os.Remove(extra); err != nil {
		t.Fatal(err)
	}
	if _, ok := donePiece(out, load(), mustPlan(t, r), opt.Piece, ""); !ok {
		t.Fatal("control: with the file removed again the piece is not done")
	}
	// the other year's SST file touched: redone
	later := time.Now().Add(time.Hour)
	if err := os.Chtimes(sst[1], later, later); err != nil {
		t.Fatal(err)
	}
	if _, ok := donePiece(out, load(), mustPlan(t, r), opt.Piece, ""); ok {
		t.Error("a change to a file outside the piece went unseen by the skip")
	}
	// a file outside the piece changed while the piece runs: its time
	// axis was read when the record was opened, so the run fails
	p2 := Options{OutDir: filepath.Join(t.TempDir(), "p2"), NoPlots: true, Piece: pipeline.Piece{K: 2, N: 2}, Progress: func(_ string, done, _ int) {
		if done == 3 {
			os.Chtimes(sst[0], later.Add(time.Hour), later.Add(time.Hour))
		}
	}}
	if _, err := Run(context.Background(), load(), nil, p2); !errors.Is(err, ErrInputChanged) || !strings.Contains(err.Error(), sst[0]) {
		t.Errorf("2001 touched while piece 2/2 ran: %v, want ErrInputChanged naming %s", err, sst[0])
	}
}
