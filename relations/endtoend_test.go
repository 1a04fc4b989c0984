package relations_test

import (
	"context"
	"math"
	"path/filepath"
	"testing"

	"lidscope/accumulate"
	"lidscope/config"
	"lidscope/fixtures"
	"lidscope/pipeline"
	"lidscope/regimes"
	"lidscope/relations"
)

// End to end on the demo scenario (package fixtures, invented data): the
// world is written as CF NetCDF files, read back through the study and
// the pipeline, and the accumulator receives the pipeline's steps. The
// regression of cloud on EIS in the band's subsidence regime must pool the
// same samples as the truth record, land within a few standard errors of
// the truth record's own (unweighted) least-squares fit, and cover the
// planted slope (Physics.CloudSlope) with its confidence interval.
func TestEndToEndDemoWorld(t *testing.T) {
	t.Parallel()
	if testing.Short() {
		t.Skip("end-to-end run skipped in -short mode")
	}
	dir := filepath.Join(t.TempDir(), "world")
	opt := fixtures.DefaultOptions()
	opt.Resolution, opt.Years, opt.YearsPerFile = 4, 4, 2
	opt.Command = []string{"relations-test"}
	tr, err := fixtures.Generate(dir, opt)
	if err != nil {
		t.Fatal(err)
	}
	r, err := config.Load(filepath.Join(dir, "study.yaml"), config.LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	plan, err := pipeline.PlanFor(r, &r.Datasets[0])
	if err != nil {
		t.Fatal(err)
	}
	cfg := relations.Defaults()
	cfg.Classifier = r.Analysis.Classifier()
	var acc *relations.Acc
	plan.NewSinks = func(l accumulate.Layout) ([]pipeline.StepSink, error) {
		a, err := relations.New(cfg, l, nil)
		acc = a
		return []pipeline.StepSink{a}, err
	}
	if _, err := pipeline.Run(context.Background(), plan); err != nil {
		t.Fatal(err)
	}
	res, err := acc.Results()
	if err != nil {
		t.Fatal(err)
	}
	if res.Steps != len(tr.Months) {
		t.Fatalf("%d steps, truth has %d months", res.Steps, len(tr.Months))
	}
	var reg *relations.Regression
	for k := range res.Regressions {
		g := &res.Regressions[k]
		if g.Domain == relations.BandDomain && g.Season == "all" && g.Regime == regimes.Subsidence && g.Predictor == "eis" {
			reg = g
		}
	}
	if reg == nil {
		t.Fatal("no band subsidence cloud–EIS regression")
	}
	ce := tr.CloudEIS
	t.Logf("slope %.5f CI [%.5f, %.5f] (N %d, N_eff %.1f); truth fit %.5f ± %.5f (AR1 %.5f), planted %.3f",
		reg.Slope, reg.SlopeCI.Lo, reg.SlopeCI.Hi, reg.N, reg.NEffSlope, ce.SampleSlope, ce.SlopeSE, ce.SlopeSEAR1, ce.TrueSlope)
	if reg.N != ce.Samples {
		t.Errorf("pooled %d subsidence samples, truth record %d", reg.N, ce.Samples)
	}
	if math.Abs(reg.Slope-ce.SampleSlope) > 3*ce.SlopeSEAR1 {
		t.Errorf("area-weighted slope %g differs from the truth's unweighted fit %g by more than 3 SE (%g)", reg.Slope, ce.SampleSlope, ce.SlopeSEAR1)
	}
	if !(reg.SlopeCI.Lo <= ce.TrueSlope && ce.TrueSlope <= reg.SlopeCI.Hi) {
		t.Errorf("planted slope %g outside the CI [%g, %g]", ce.TrueSlope, reg.SlopeCI.Lo, reg.SlopeCI.Hi)
	}
}
