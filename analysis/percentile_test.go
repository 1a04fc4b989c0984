package analysis

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"testing"

	"lidscope/config"
	"lidscope/fixtures"
	"lidscope/output"
	"lidscope/regimes"
)

// The percentile-of-SST regime definition on the synthetic world: with
// analysis.rule sst_percentile and p = 70, each step's convective share of
// the band's ocean area is 1 − p/100 = 0.3 by construction, less the
// weight of the cells at the percentile itself (the cell that straddles it
// and any of equal SST): never more, and not less than a few cells' share
// (synthetic truth: the rule's definition, not the world's physics). The
// outputs record the rule.
func TestPercentileRegimeDefinition(t *testing.T) {
	dir := privateSmallData(t)
	sp := filepath.Join(dir, fixtures.StudyFile)
	b, err := os.ReadFile(sp)
	if err != nil {
		t.Fatal(err)
	}
	th := regexp.MustCompile(`(?m)^  threshold: .*$`)
	if !th.Match(b) {
		t.Fatalf("the synthetic study has no analysis threshold line:\n%s", b)
	}
	b = th.ReplaceAll(b, []byte("  rule: sst_percentile\n  percentile: 70"))
	pp := filepath.Join(dir, "percentile.yaml")
	if err := os.WriteFile(pp, b, 0o644); err != nil {
		t.Fatal(err)
	}
	out := t.TempDir()
	r, err := config.Load(pp, config.LoadOptions{LookupEnv: config.NoEnvironment, Flags: map[string]string{"output.dir": out}})
	if err != nil {
		t.Fatal(err)
	}
	if d := r.Analysis.Regimes(); d.Rule != regimes.RuleSSTPercentile || d.Percentile != 70 {
		t.Fatalf("study decodes to %+v", d)
	}
	reps, err := Run(context.Background(), r, nil, Options{NoPlots: true})
	if err != nil {
		t.Fatal(err)
	}
	acc := reps[0].Result.Acc
	var tot, wmax float64
	for i, w := range acc.L.BandWeight {
		if w > 0 && acc.Cells.Valid[i] > 0 {
			tot += w
			wmax = math.Max(wmax, w)
		}
	}
	tol := 3 * wmax / tot
	for _, p := range acc.Series {
		if f := p.AreaFraction[regimes.Convective]; f > 0.3+1e-9 || f < 0.3-tol {
			t.Errorf("%s: convective share %v, want 0.3 − [0, %.3g] (the cells at the percentile)", p.Label, f, tol)
		}
	}
	sb, err := os.ReadFile(filepath.Join(reps[0].OutDir, output.SummaryJSON))
	if err != nil {
		t.Fatal(err)
	}
	var sum struct {
		Regime struct {
			Text       string
			Rule       string
			Percentile struct{ Value *float64 }
			Delta      struct{ Value *float64 }
		} `json:"regime_definition"`
	}
	if err := json.Unmarshal(sb, &sum); err != nil {
		t.Fatal(err)
	}
	if sum.Regime.Rule != "sst_percentile" || sum.Regime.Percentile.Value == nil || *sum.Regime.Percentile.Value != 70 || sum.Regime.Delta.Value != nil {
		t.Errorf("summary.json regime_definition %+v", sum.Regime)
	}
}
