package analysis

import (
	"context"
	"lidscope/regimes"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/config"
	"lidscope/fixtures"
	"lidscope/output"
	"lidscope/relations"
)

// smallWorld is a coarse, short synthetic world (invented data) for tests.
func smallWorld() *fixtures.Options {
	o := fixtures.DefaultOptions()
	o.Resolution = 4
	o.Years = 4
	o.YearsPerFile = 2
	return &o
}

// TestDemoRecoversTruth is the synthetic-truth test of the whole job: the
// analysis of the generated files reproduces what the generator built in.
func TestDemoRecoversTruth(t *testing.T) {
	t.Parallel()
	dir, d := sharedDemo(t)
	if len(d.Checks) < 4 {
		t.Fatalf("only %d checks", len(d.Checks))
	}
	for _, c := range d.Checks {
		if !c.OK() {
			t.Errorf("%s: got %v, truth %v (tolerance %v)", c.What, c.Got, c.Want, c.Tol)
		}
	}
	for _, n := range append(output.OutputNames(), StateFile) {
		if _, err := os.Stat(filepath.Join(d.Reports[0].OutDir, n)); err != nil {
			t.Errorf("missing output %s: %v", n, err)
		}
	}
	// A second demo into the same folder is refused without Force.
	if _, err := Demo(context.Background(), dir, DemoOptions{Scenario: smallWorld()}); err == nil {
		t.Error("demo overwrote an earlier demo without Force")
	}
}

// TestSplitRunsMergeToTheSingleRun runs the record in one piece and in two
// time ranges, merges the two, and compares every accumulated statistic.
func TestSplitRunsMergeToTheSingleRun(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	rp := filepath.Join(smallData(t), fixtures.StudyFile)
	run := func(out string, flags map[string]string) Report {
		t.Helper()
		r, err := config.Load(rp, config.LoadOptions{LookupEnv: config.NoEnvironment, Flags: flags})
		if err != nil {
			t.Fatal(err)
		}
		reps, err := Run(context.Background(), r, nil, Options{OutDir: out, NoPlots: true}) // the checks are of the statistics
		if err != nil {
			t.Fatal(err)
		}
		return reps[0]
	}
	whole := run(filepath.Join(dir, "whole"), nil)
	a := run(filepath.Join(dir, "a"), map[string]string{"datasets.synthetic-demo.time.end": "2002-07"})
	b := run(filepath.Join(dir, "b"), map[string]string{"datasets.synthetic-demo.time.start": "2002-08"})
	// merge in the wrong order on purpose: Merge sorts by time
	m, err := Merge([]string{b.OutDir, a.OutDir}, filepath.Join(dir, "merged"), Options{NoPlots: true})
	if err != nil {
		t.Fatal(err)
	}
	_, acc, err := LoadState(m.OutDir)
	if err != nil {
		t.Fatal(err)
	}
	w := whole.Result.Acc
	close := func(x, y float64) bool {
		return x == y || (x != x && y != y) || math.Abs(x-y) <= 1e-9*math.Max(1, math.Abs(y))
	}
	if acc.Cells.Steps != w.Cells.Steps || len(acc.Series) != len(w.Series) {
		t.Fatalf("steps %d vs %d", acc.Cells.Steps, w.Cells.Steps)
	}
	for i := range w.NCells() {
		if acc.ValidSteps(i) != w.ValidSteps(i) || acc.Track(i) != w.Track(i) {
			t.Fatalf("cell %d: counts or crossing track differ: %+v vs %+v", i, acc.Track(i), w.Track(i))
		}
		for q := range w.L.Quantities {
			for r := regimes.Regime(0); r < 3; r++ {
				x, y := acc.Moments(q, r, i), w.Moments(q, r, i)
				if x.N != y.N || !close(x.Mean, y.Mean) || !close(x.M2, y.M2) {
					t.Fatalf("cell %d quantity %d regime %d: %+v vs %+v", i, q, r, x, y)
				}
			}
		}
	}
	for k := range w.Regions {
		for q := range w.Regions[k].Values {
			for r := 0; r < 3; r++ {
				x, y := acc.Regions[k].Values[q][r], w.Regions[k].Values[q][r]
				if x.N != y.N || !close(x.Mean, y.Mean) || !close(x.M2, y.M2) {
					t.Fatalf("region %d: %+v vs %+v", k, x, y)
				}
			}
		}
	}
	// The relationships: the merged accumulators give the single run's
	// results for every statistic (to the merge's rounding), in the report
	// and in the files written next to the regime outputs.
	if m.Relations == nil || whole.Relations == nil {
		t.Fatalf("relationship results: merged %v, whole %v", m.Relations != nil, whole.Relations != nil)
	}
	if len(whole.Relations.Regressions) == 0 || len(whole.Relations.Binned) == 0 || len(whole.Relations.Flips) == 0 {
		t.Fatal("the single run has no relationships to compare")
	}
	if d := diffResults(whole.Relations, m.Relations, 1e-9); len(d) > 0 {
		t.Errorf("merged relationships differ from the single run: %v", d)
	}
	if d := diffResults(whole.Relations, a.Relations, 1e-9); len(d) == 0 {
		t.Error("the first piece's relationships compare equal to the whole record's")
	}
	for _, n := range relations.OutputNames() {
		if _, err := os.Stat(filepath.Join(m.OutDir, n)); err != nil {
			t.Errorf("merged run lacks %s: %v", n, err)
		}
	}
	fw, err := relations.ReadResults(whole.OutDir)
	if err != nil {
		t.Fatal(err)
	}
	fm, err := relations.ReadResults(m.OutDir)
	if err != nil {
		t.Fatal(err)
	}
	if d := diffResults(fw, fm, 1e-9); len(d) > 0 {
		t.Errorf("merged %s differs from the single run's: %v", relations.OutputNames(), d)
	}
	// The merged state holds the merged relationship accumulator.
	s, err := loadState(m.OutDir, true)
	if err != nil {
		t.Fatal(err)
	}
	if s.rel.Steps() != len(whole.Meta.TimeValues) {
		t.Errorf("merged state: %d relationship steps, want %d", s.rel.Steps(), len(whole.Meta.TimeValues))
	}
	// Overlapping runs are refused.
	if _, err := Merge([]string{whole.OutDir, a.OutDir}, filepath.Join(dir, "bad"), Options{}); err == nil || !strings.Contains(err.Error(), "overlap") {
		t.Errorf("overlapping runs merged: %v", err)
	}
}

// TestDemoComparisonSeesTheModel: the synthetic model was built with a
// stronger warm pool and weaker upwelling (ModelScenario), so its maps
// differ from the reference's, while a run compared with itself does not.
func TestDemoComparisonSeesTheModel(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	_, d := sharedDemo(t)
	if d.Comparison == nil || len(d.Comparison.Candidates) != 1 {
		t.Fatal("no comparison")
	}
	c := d.Comparison.Candidates[0]
	if c.Maps[0].Corr >= 1 || c.Maps[0].CRMS <= 0 {
		t.Errorf("the model's convective-fraction map is indistinguishable from the reference: %+v", c.Maps[0])
	}
	self, _, err := CompareDirs(d.Reports[0].OutDir, []string{d.Reports[0].OutDir}, filepath.Join(dir, "self"), CompareOptions{Options: Options{NoPlots: true}})
	if err != nil {
		t.Fatal(err)
	}
	if m := self.Candidates[0].Maps[0]; m.Corr != 1 || m.CRMS != 0 {
		t.Errorf("self comparison: %+v", m)
	}
}
