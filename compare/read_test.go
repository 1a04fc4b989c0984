package compare

import (
	"errors"
	"math"
	"path/filepath"
	"testing"
)

// Read gives back what Write wrote: the reference's name, folder and
// estimates, each candidate's estimates with their intervals and verdicts
// (the hand-checked comparison of TestEstimatesByHand: near within, far
// outside), in the comparison's order of estimates; a folder without
// comparison.json is refused with ErrNotComparison.
func TestReadGivesBackWhatWriteWrote(t *testing.T) {
	conv := []float64{0, 0.25, 0.5, 1}
	ref := withRel(run(t, "obs", conv), rel(0.05, 0.001, cfgText))
	near := withRel(run(t, "near", conv), rel(0.051, 0.001, cfgText))
	far := withRel(run(t, "far", conv), rel(0.0515, 0.001, cfgText))
	res, err := Compare(ref, []Run{near, far}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	if _, err := Write(dir, res, WriteOptions{Version: "test"}); err != nil {
		t.Fatal(err)
	}
	back, err := Read(dir)
	if err != nil {
		t.Fatal(err)
	}
	if back.Reference.Name != "obs" || back.Reference.Dir != "obs" || back.Reference.Meta.Period != "p" || back.Version != "test" ||
		back.RegimeText != res.Reference.Meta.Regimes.String() {
		t.Errorf("reference read back as %+v (regimes %q, version %q)", back.Reference, back.RegimeText, back.Version)
	}
	same := func(a, b float64) bool { return a == b || math.IsNaN(a) && math.IsNaN(b) }
	check := func(what string, got, want []Estimate, cand bool) {
		t.Helper()
		if len(got) != len(want) {
			t.Fatalf("%s: %d estimates read back, %d written", what, len(got), len(want))
		}
		for i, w := range want {
			g := got[i]
			ok := g.Name == w.Name && g.Kind == w.Kind && g.Units == w.Units && same(g.Ref, w.Ref) && same(g.RefCI.Lo, w.RefCI.Lo) && same(g.RefCI.Hi, w.RefCI.Hi)
			if cand {
				ok = ok && same(g.Cand, w.Cand) && same(g.CandCI.Lo, w.CandCI.Lo) && same(g.CandCI.Hi, w.CandCI.Hi) &&
					same(g.Diff, w.Diff) && same(g.Combined, w.Combined) && g.Tested == w.Tested && g.Within == w.Within
			}
			if !ok {
				t.Errorf("%s %d: read back %+v, wrote %+v", what, i, g, w)
			}
		}
	}
	check("reference", back.ReferenceEstimates, res.ReferenceEstimates, false)
	if len(back.Candidates) != 2 {
		t.Fatalf("%d candidates read back", len(back.Candidates))
	}
	for i, c := range res.Candidates {
		if back.Candidates[i].Name != c.Name {
			t.Errorf("candidate %d read back as %q, wrote %q", i, back.Candidates[i].Name, c.Name)
		}
		check(c.Name, back.Candidates[i].Estimates, c.Estimates, true)
	}
	if e := back.Candidates[0].Estimates[0]; !e.Within || !e.Tested {
		t.Errorf("near's slope on EIS: %+v, want within", e)
	}
	if e := back.Candidates[1].Estimates[0]; e.Within || !e.Tested {
		t.Errorf("far's slope on EIS: %+v, want outside", e)
	}
	if _, err := Read(filepath.Join(dir, "none")); !errors.Is(err, ErrNotComparison) {
		t.Errorf("a folder without comparison.json: %v", err)
	}
}
