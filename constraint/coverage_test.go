package constraint

import (
	"math"
	"math/rand/v2"
	"testing"

	"lidscope/accumulate"
	"lidscope/factors"
	"lidscope/regimes"
	"lidscope/relations"
)

// The synthetic-truth worlds of the coverage study (invented): a 2×8 grid
// of ocean cells in the subsidence regime, 10 years of months, three
// factors (sst K, eis K, rh700 fraction) with seasonal cycles and AR(1)
// anomalies (ρ = 0.5) that share a common part across the cells (so the
// domain means vary), and a response
//
//	y = 0.3 + 0.05·season + Σ_k β_k (x_k − x0_k) + 0.01 ε   (ε white, per cell)
//
// which is linear in the factors, means included: a warm world with the
// factor means moved by Δμ has the response mean moved by Σ β Δμ.
var (
	trueObsBeta   = [3]float64{-0.01, 0.04, 0.4}
	trueModelBeta = [3]float64{-0.005, 0.02, 0.2}
	baseMean      = [3]float64{298, 5, 0.6}
	dMean         = [3]float64{4, 1, -0.02} // warm − control, with ΔT = 4 K
	anomSD        = [3]float64{0.3, 0.4, 0.03}
)

const (
	covNLat, covNLon, covYears = 2, 8, 10
	covWarming                 = 4.0
)

func covUnits(q string) string {
	switch q {
	case "sst", "eis":
		return "K"
	}
	return "1"
}

// coverageRun generates one world and fits it with factors.Acc (OLS).
func coverageRun(t testing.TB, seed uint64, beta, mean [3]float64, maps bool) *Run {
	t.Helper()
	n := covNLat * covNLon
	l := accumulate.Layout{NLat: covNLat, NLon: covNLon, Quantities: []string{"sst", "eis", "rh700", "low_cloud"}, Cloud: "low_cloud"}
	for j := range covNLat {
		l.Lat = append(l.Lat, -10+20*float64(j))
	}
	for i := range covNLon {
		l.Lon = append(l.Lon, -170+40*float64(i))
	}
	for c := 0; c < n; c++ {
		a := 1e11 * math.Cos(l.Lat[c/covNLon]*math.Pi/180)
		l.Area = append(l.Area, a)
		l.BandWeight = append(l.BandWeight, a)
	}
	rng := rand.New(rand.NewPCG(seed, 0x636f76))
	var shared [3]float64
	cell := make([][3]float64, n)
	var steps []*accumulate.Step
	sums := make([][4]float64, n)
	for y := range covYears {
		for m := 1; m <= 12; m++ {
			s := &accumulate.Step{Year: 2000 + y, Month: m, Regime: make([]regimes.Regime, n), Rel: make([]float32, n)}
			vals := make([][]float32, 4)
			for q := range vals {
				vals[q] = make([]float32, n)
			}
			season := math.Sin(2 * math.Pi * float64(m) / 12)
			for k := range 3 {
				shared[k] = 0.5*shared[k] + math.Sqrt(0.75)*rng.NormFloat64()
			}
			for c := range n {
				s.Regime[c] = regimes.Subsidence
				yv := 0.3 + 0.05*season + 0.01*rng.NormFloat64()
				for k := range 3 {
					cell[c][k] = 0.5*cell[c][k] + math.Sqrt(0.75)*rng.NormFloat64()
					x := mean[k] + [3]float64{2, 1, 0.1}[k]*season + anomSD[k]*(0.8*shared[k]+0.6*cell[c][k])
					vals[k][c] = float32(x)
					yv += beta[k] * (x - baseMean[k])
				}
				vals[3][c] = float32(yv)
				for q := range 4 {
					sums[c][q] += float64(vals[q][c])
				}
			}
			s.Values = vals
			steps = append(steps, s)
		}
	}
	clim := relations.NewClimatology(l)
	for _, s := range steps {
		clim.AddStep(s)
	}
	cfg := factors.Config{Factors: []string{"sst", "eis", "rh700"}, Response: "low_cloud", Method: factors.MethodOLS, Level: 0.95,
		CellFoldYears: 5, Maps: maps}
	a, err := factors.New(cfg, l, clim)
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range steps {
		a.AddStep(s)
	}
	res := a.Results(covUnits)
	r := NewRun("synthetic", res)
	// The response's domain mean and its standard error, as factors.json
	// records them (here from the fit's own series: mean of the domain
	// means, standard error with the response's N_eff taken as the fit's).
	for _, f := range res.Fits {
		var sy float64
		for c := range n {
			sy += sums[c][3]
		}
		nt := float64(len(steps))
		r.SetResponseMean(f.Domain, f.Regime, sy/(nt*float64(n)), 0)
	}
	if maps {
		cm := &cellMeans{Lat: l.Lat, Lon: l.Lon, Mean: map[string][]float64{}, Units: map[string]string{}}
		for q, name := range l.Quantities {
			v := make([]float64, n)
			for c := range n {
				v[c] = sums[c][q] / float64(len(steps))
			}
			cm.Mean[name], cm.Units[name] = v, covUnits(name)
		}
		r.cells = cm
	}
	return r
}

// trueConstrained is Σ_k β_obs,k Δμ_k / ΔT.
func trueConstrained() float64 {
	var s float64
	for k := range 3 {
		s += trueObsBeta[k] * dMean[k] / covWarming
	}
	return s
}

// TestConstraintCoverage: over 1000 independent triples of worlds
// (observations, control, warm; fixed master seed) the 95 % interval of
// the constrained change covers the true Σ β_obs Δμ/ΔT in 95 % ± 2.5 % of
// them (the binomial standard deviation over 1000 triples is 0.7 %, so the
// band is ±3.6 sd). The interval propagates both the sensitivities'
// covariance and the factor changes' sampling error; with the factor
// changes taken as exact (no dxCov) it must cover clearly less — the
// design makes both parts of the variance matter, so the test cannot pass
// with half of the propagation missing.
func TestConstraintCoverage(t *testing.T) {
	t.Parallel()
	if testing.Short() {
		t.Skip("coverage study skipped in -short mode")
	}
	const reps = 1000
	truth := trueConstrained()
	var cover, naive int
	var sumErr float64
	for r := range reps {
		seed := uint64(1000 + 3*r)
		obs := coverageRun(t, seed, trueObsBeta, baseMean, false)
		ctrl := coverageRun(t, seed+1, trueModelBeta, baseMean, false)
		var wm [3]float64
		for k := range 3 {
			wm[k] = baseMean[k] + dMean[k]
		}
		warm := coverageRun(t, seed+2, trueModelBeta, wm, false)
		res, err := Compute(obs, ctrl, warm, Options{Warming: covWarming})
		if err != nil {
			t.Fatal(err)
		}
		d, ok := res.Domain("tropical_band", "subsidence")
		if !ok {
			t.Fatal("no band fit")
		}
		c := d.Constrained
		sumErr += c.Value - truth
		if c.Lo <= truth && truth <= c.Hi {
			cover++
		}
		// The same with the factor changes taken as exact.
		of, _ := obs.Factors.Fit("tropical_band", "subsidence")
		beta := make([]float64, 3)
		dx := make([]float64, 3)
		for k := range 3 {
			beta[k] = of.Sens[k].Coef
			dx[k] = d.Factors[k].PerKelvin * covWarming
		}
		nv, err := factors.Constrain(beta, of.Cov, dx, nil, covWarming, 0.95)
		if err != nil {
			t.Fatal(err)
		}
		if nv.Lo <= truth && truth <= nv.Hi {
			naive++
		}
	}
	fc, fn := float64(cover)/reps, float64(naive)/reps
	t.Logf("constrained change %.5g per K: 95 %% interval coverage %.3f over %d triples (factor changes as exact: %.3f); mean error %.2g",
		truth, fc, reps, fn, sumErr/reps)
	if fc < 0.925 || fc > 0.975 {
		t.Errorf("coverage %.3f, want 0.95 ± 0.025", fc)
	}
	if !(fn < fc-0.04) {
		t.Errorf("the interval without the factor changes' error covers %.3f, not clearly less than %.3f: the test design does not exercise it", fn, fc)
	}
}
