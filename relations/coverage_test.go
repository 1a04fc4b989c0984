package relations

import (
	"math"
	"math/rand/v2"
	"testing"

	"lidscope/accumulate"
	"lidscope/regimes"
)

func findReg(t *testing.T, res *Results, dom, season string, g regimes.Regime, resp, pred string) Regression {
	t.Helper()
	for _, r := range res.Regressions {
		if r.Domain == dom && r.Season == season && r.Regime == g && r.Response == resp && r.Predictor == pred {
			return r
		}
	}
	t.Fatalf("no regression %s/%s/%v/%s~%s", dom, season, g, resp, pred)
	return Regression{}
}

// CI coverage over repeated synthetic records (synthetic truth, fixed
// master seed): 400 records of 16 independent cells × 120 months, EIS AR(1)
// with φ = 0.6, cloud noise AR(1) with φ = 0.5, true slope 0.05 per K.
// The 95 % slope interval with N_eff from Bretherton et al. (1999) eq. 31
// must cover the truth in 95 % ± 3.5 % of the records (the binomial
// standard deviation of the coverage over 400 records is 1.1 %, so the
// band is ±3.2 sd), and the naive interval (N_eff = N) must cover clearly
// less (its variance is too small by (1 + φxφe)/(1 − φxφe) = 1.86, so its
// expected coverage is about 85 %): the test cannot pass with a wrong N_eff.
// The correlation interval (Fisher z at N_eff of eq. 31 with the
// predictor and response series) is checked the same way.
func TestCICoverage(t *testing.T) {
	t.Parallel()
	if testing.Short() {
		t.Skip("coverage study skipped in -short mode")
	}
	w := synthWorld{cells: 16, steps: 120, a: 0.2, b: 0.05, sigma: 0.05, phiX: 0.6, phiE: 0.5, sdX: 1.5, meanX: 5, regime: regimes.Subsidence}
	l := w.layout()
	cfg := Defaults()
	cfg.DecorrelationLength = 0 // cells are independent by construction
	const reps = 400
	rng := rand.New(rand.NewPCG(20260101, 7))
	// True correlation of pooled cloud and EIS: b·sdX/√(b²sdX² + σ²).
	bs := w.b * w.sdX
	rho := bs / math.Sqrt(bs*bs+w.sigma*w.sigma)
	var cover, naive, rcover, pcover int
	var slopeSum float64
	for k := 0; k < reps; k++ {
		acc, err := New(cfg, l, nil)
		if err != nil {
			t.Fatal(err)
		}
		w.generate(rng, acc.AddStep)
		res, err := acc.Results()
		if err != nil {
			t.Fatal(err)
		}
		r := findReg(t, res, BandDomain, "all", regimes.Subsidence, "cloud", "eis")
		slopeSum += r.Slope
		if r.SlopeCI.Lo <= w.b && w.b <= r.SlopeCI.Hi {
			cover++
		}
		se := r.SlopeSE * math.Sqrt((r.NEffSlope-2)/(float64(r.N)-2))
		q := tQuantile(0.975, float64(r.N)-2)
		if math.Abs(r.Slope-w.b) <= q*se {
			naive++
		}
		if r.RCI.Lo <= rho && rho <= r.RCI.Hi {
			rcover++
		}
		for _, p := range res.Partials {
			if p.Domain == BandDomain && p.Season == "all" && p.Regime == regimes.Subsidence && p.Response == "cloud" {
				if p.CI[0].Lo <= w.b && w.b <= p.CI[0].Hi {
					pcover++
				}
			}
		}
	}
	c, nc, rc, pc := float64(cover)/reps, float64(naive)/reps, float64(rcover)/reps, float64(pcover)/reps
	t.Logf("coverage: slope %.3f, naive %.3f, correlation %.3f, partial EIS %.3f; mean slope %.5f", c, nc, rc, pc, slopeSum/reps)
	if math.Abs(c-0.95) > 0.035 {
		t.Errorf("slope CI coverage %.3f, want 0.95 ± 0.035", c)
	}
	if math.Abs(rc-0.95) > 0.035 {
		t.Errorf("correlation CI coverage %.3f, want 0.95 ± 0.035", rc)
	}
	if math.Abs(pc-0.95) > 0.035 {
		t.Errorf("partial-regression CI coverage %.3f, want 0.95 ± 0.035", pc)
	}
	if nc > 0.90 {
		t.Errorf("naive CI coverage %.3f should be well below 0.95 (autocorrelated samples)", nc)
	}
	if math.Abs(slopeSum/reps-w.b) > 0.001 {
		t.Errorf("mean slope %.5f, truth %.5f", slopeSum/reps, w.b)
	}
}

// A single synthetic record: the slope is recovered within its CI, the
// lag-1 autocorrelations are near the planted ones, and the effective
// sample sizes follow from them (synthetic truth).
func TestSyntheticTruthSingle(t *testing.T) {
	w := synthWorld{cells: 20, steps: 240, a: 0.2, b: 0.05, sigma: 0.04, phiX: 0.6, phiE: 0.5, sdX: 1.5, meanX: 5, regime: regimes.Subsidence}
	cfg := Defaults()
	cfg.DecorrelationLength = 0
	acc, err := New(cfg, w.layout(), nil)
	if err != nil {
		t.Fatal(err)
	}
	w.generate(rand.New(rand.NewPCG(99, 1)), acc.AddStep)
	res, err := acc.Results()
	if err != nil {
		t.Fatal(err)
	}
	r := findReg(t, res, BandDomain, "all", regimes.Subsidence, "cloud", "eis")
	if !(r.SlopeCI.Lo <= w.b && w.b <= r.SlopeCI.Hi) {
		t.Errorf("slope %g CI [%g, %g] misses the truth %g", r.Slope, r.SlopeCI.Lo, r.SlopeCI.Hi, w.b)
	}
	if r.SlopeCI.Hi-r.SlopeCI.Lo > 0.01 {
		t.Errorf("slope CI [%g, %g] is implausibly wide", r.SlopeCI.Lo, r.SlopeCI.Hi)
	}
	if math.Abs(r.R1X-w.phiX) > 0.1 || math.Abs(r.R1Resid-w.phiE) > 0.1 {
		t.Errorf("lag-1: predictor %g (planted %g), residual %g (planted %g)", r.R1X, w.phiX, r.R1Resid, w.phiE)
	}
	want := float64(r.N) * corrFactor(r.R1X, r.R1Resid)
	if math.Abs(r.NEffSlope-want) > 1e-9*want {
		t.Errorf("N_eff = %g, want N(1 − r1 r2)/(1 + r1 r2) = %g", r.NEffSlope, want)
	}
	// No regression in the convective regime (no samples there).
	for _, g := range res.Regressions {
		if g.Regime == regimes.Convective {
			t.Errorf("a convective regression appeared with no convective samples: %+v", g)
		}
	}
}

// The default decorrelation length (1000 km) on a 16-cell row of
// 1e10 m² cells: area per step 1.6e11 m² < L² = 1e12 m², so one
// independent area per step and N_eff is the time-only Bretherton size.
func TestIndependentAreaDefault(t *testing.T) {
	w := synthWorld{cells: 16, steps: 120, a: 0.2, b: 0.05, sigma: 0.05, phiX: 0.6, phiE: 0.5, sdX: 1.5, meanX: 5, regime: regimes.Subsidence}
	acc, err := New(Defaults(), w.layout(), nil)
	if err != nil {
		t.Fatal(err)
	}
	w.generate(rand.New(rand.NewPCG(5, 5)), acc.AddStep)
	res, _ := acc.Results()
	r := findReg(t, res, BandDomain, "all", regimes.Subsidence, "cloud", "eis")
	if r.IndependentAreas != 1 {
		t.Errorf("independent areas = %g, want 1", r.IndependentAreas)
	}
	if want := 120 * corrFactor(r.R1X, r.R1Resid); math.Abs(r.NEffSlope-want) > 1e-9*want {
		t.Errorf("N_eff = %g, want T(1 − r1 r2)/(1 + r1 r2) = %g", r.NEffSlope, want)
	}
}

var _ = accumulate.Step{}
