package factors

import (
	"math"
	"math/rand/v2"
	"testing"

	"lidscope/relations"
)

// Planted linear model (synthetic truth): 10 "years" of 30 independent
// samples, three correlated factors (ρ = 0.5), y = 2 + 0.8x₁ − 1.5x₂ +
// 0.3x₃ + 0.6ε. Over 400 seeds the 95 % OLS intervals with N_eff = N must
// cover each planted coefficient in 95 % ± 2 % of the 1200 cases (the
// binomial standard deviation is 0.63 %, so the band is ±3.2 sd); with a
// wrong N_eff of 4N the intervals are half as wide and must cover clearly
// less (about 66 %), so the check cannot pass with a wrong covariance.
// The ridge intervals at the cross-validated penalty are reported.
func TestIntervalCoverage(t *testing.T) {
	if testing.Short() {
		t.Skip("coverage study skipped in -short mode")
	}
	beta := []float64{0.8, -1.5, 0.3}
	const seeds, folds, per = 400, 10, 30
	hit, hitWrong, hitRidge, cases := 0, 0, 0, 0
	rec := 0
	for s := 0; s < seeds; s++ {
		rng := rand.New(rand.NewPCG(uint64(s), 2026))
		fs := foldsOf(planted(rng, folds, per, 2, beta, 0.6, 0.5, false), folds)
		all, _ := fs.Pooled()
		f, err := FitMoments(all, 0)
		if err != nil {
			t.Fatal(err)
		}
		cv, err := CrossValidate(fs, nil)
		if err != nil {
			t.Fatal(err)
		}
		n := float64(all.N)
		for j, b := range beta {
			cases++
			if lo, hi := f.Interval(j, n, 0.95); lo <= b && b <= hi {
				hit++
			}
			if lo, hi := f.Interval(j, 4*n, 0.95); lo <= b && b <= hi {
				hitWrong++
			}
			if lo, hi := cv.Fit.Interval(j, n, 0.95); lo <= b && b <= hi {
				hitRidge++
			}
			if math.Abs(f.Coef[j]-b) < 4*f.SE(j, n) {
				rec++
			}
		}
	}
	cov := float64(hit) / float64(cases)
	wrong := float64(hitWrong) / float64(cases)
	t.Logf("95 %% OLS interval coverage %.4f over %d cases; with N_eff = 4N %.4f; ridge at the CV penalty %.4f", cov, cases, wrong, float64(hitRidge)/float64(cases))
	if math.Abs(cov-0.95) > 0.02 {
		t.Errorf("OLS coverage %.4f, want 0.95 ± 0.02", cov)
	}
	if wrong > 0.85 {
		t.Errorf("coverage with a wrong N_eff %.4f: the check does not discriminate", wrong)
	}
	if rec != cases {
		t.Errorf("%d of %d planted coefficients outside 4 standard errors", cases-rec, cases)
	}
}

// One record of the planted model: recovered within the 95 % intervals in
// physical units and per standard deviation (b_j = β_j s_j), the VIFs
// above 1 for correlated factors, the CV R² below the in-sample R², and
// the OLS standard errors equal to relations.Multi.SE on the same
// moments.
func TestPlantedRecovery(t *testing.T) {
	beta := []float64{0.8, -1.5, 0.3}
	rng := rand.New(rand.NewPCG(5, 6))
	fs := foldsOf(planted(rng, 12, 40, 2, beta, 0.6, 0.5, true), 12)
	cv, err := CrossValidate(fs, nil)
	if err != nil {
		t.Fatal(err)
	}
	all, _ := fs.Pooled()
	ols, _ := FitMoments(all, 0)
	n := float64(all.N)
	for j, b := range beta {
		if lo, hi := ols.Interval(j, n, 0.95); !(lo <= b && b <= hi) {
			t.Errorf("factor %d: planted %g outside [%g, %g]", j, b, lo, hi)
		}
		if lo, hi := ols.IntervalSD(j, n, 0.95); !(lo <= b*ols.SD[j] && b*ols.SD[j] <= hi) {
			t.Errorf("factor %d per sd: planted %g outside [%g, %g]", j, b*ols.SD[j], lo, hi)
		}
		if !(ols.VIF[j] > 1.05) {
			t.Errorf("VIF %d = %g for correlated factors", j, ols.VIF[j])
		}
	}
	if !(cv.R2 < ols.R2 && cv.R2 > 0.5) {
		t.Errorf("CV R² %g, in-sample %g", cv.R2, ols.R2)
	}
	if cv.Penalty != cv.Penalties[cv.Best] || cv.Fit.Lambda != cv.Penalty {
		t.Errorf("chosen penalty not recorded: %+v", cv)
	}
	m, err := all.Multiple(3, []int{0, 1, 2})
	if err != nil {
		t.Fatal(err)
	}
	for j := range beta {
		if !near(ols.SE(j, n), m.SE(j, n), 1e-10) || !near(ols.Coef[j], m.Coef[j], 1e-10) {
			t.Errorf("factor %d: SE %g coef %g, relations.Multi %g %g", j, ols.SE(j, n), ols.Coef[j], m.SE(j, n), m.Coef[j])
		}
	}
}

// Folds built from pieces merged with relations.CoMoments.Merge give the
// same pooled moments, fits and cross-validation as one pass per fold.
func TestFoldPiecesMerge(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 9))
	ss := planted(rng, 5, 37, 1, []float64{0.5, 0.2}, 0.3, 0.4, true)
	one := foldsOf(ss, 5)
	pieces := Folds{Pieces: make([]relations.CoMoments, 5)}
	for f := range pieces.Pieces {
		parts := []relations.CoMoments{relations.NewCoMoments(3), relations.NewCoMoments(3), relations.NewCoMoments(3)}
		for _, s := range ss {
			if s.fold == f {
				parts[rng.IntN(3)].Add([]float64{s.x[0], s.x[1], s.y}, s.w)
			}
		}
		pieces.Pieces[f] = relations.NewCoMoments(3)
		for _, p := range parts {
			pieces.Pieces[f].Merge(p)
		}
	}
	single := relations.NewCoMoments(3)
	for _, s := range ss {
		single.Add([]float64{s.x[0], s.x[1], s.y}, s.w)
	}
	a, _ := one.Pooled()
	b, _ := pieces.Pooled()
	for i := range a.C {
		if !near(a.C[i], single.C[i], 1e-12) || !near(b.C[i], single.C[i], 1e-12) {
			t.Errorf("co-moment %d: folds %g, pieces %g, one pass %g", i, a.C[i], b.C[i], single.C[i])
		}
	}
	ca, err := CrossValidate(one, nil)
	if err != nil {
		t.Fatal(err)
	}
	cb, err := CrossValidate(pieces, nil)
	if err != nil {
		t.Fatal(err)
	}
	if ca.Best != cb.Best || !near(ca.R2, cb.R2, 1e-12) {
		t.Errorf("chosen %d vs %d, CV R² %g vs %g", ca.Best, cb.Best, ca.R2, cb.R2)
	}
	for k := range ca.SSE {
		if !near(ca.SSE[k], cb.SSE[k], 1e-11) {
			t.Errorf("penalty %g: SSE %g vs %g", ca.Penalties[k], ca.SSE[k], cb.SSE[k])
		}
	}
	for j := range ca.Fit.Coef {
		if !near(ca.Fit.Coef[j], cb.Fit.Coef[j], 1e-12) {
			t.Errorf("coefficient %d: %g vs %g", j, ca.Fit.Coef[j], cb.Fit.Coef[j])
		}
	}
}

// Bad input is refused with an error, never a silent number.
func TestFitErrors(t *testing.T) {
	c := relations.NewCoMoments(3)
	for i := 0; i < 10; i++ {
		c.Add([]float64{float64(i), 2 * float64(i), float64(i % 3)}, 1)
	}
	if _, err := FitMoments(c, 0); err == nil {
		t.Error("collinear factors fitted by OLS")
	}
	if _, err := FitMoments(c, 0.1); err != nil {
		t.Errorf("ridge must fit collinear factors: %v", err)
	}
	if _, err := FitMoments(c, -1); err == nil {
		t.Error("negative penalty accepted")
	}
	d := relations.NewCoMoments(2)
	d.Add([]float64{1, 2}, 1)
	d.Add([]float64{2, 3}, 1)
	if _, err := FitMoments(d, 0); err == nil {
		t.Error("two samples fitted a line with an interval")
	}
	if _, err := CrossValidate(Folds{Pieces: []relations.CoMoments{c}}, nil); err == nil {
		t.Error("cross-validation over one fold accepted")
	}
	f, _ := FitMoments(c, 0.1)
	if lo, hi := f.Interval(0, 3, 0.95); !math.IsNaN(lo) || !math.IsNaN(hi) {
		t.Errorf("interval at N_eff ≤ p+1 must be NaN: %g %g", lo, hi)
	}
}
