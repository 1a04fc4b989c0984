package relations

import (
	"math"
	"math/rand/v2"
	"testing"

	"lidscope/accumulate"
	"lidscope/regimes"
)

// anomalyWorld (synthetic truth, invented data): 20 subsidence cells × 20
// years. EIS = E_i + 2 K·sin(2π month/12) + x (x AR(1), φ = 0.5, sd 1 K)
// + trendEIS·years; cloud = 0.1 + 0.06·(E_i + seasonal) + 0.015·x + noise
// (sd 0.02, AR(1) φ = 0.3) + trendCloud·years. The climatological
// composite slope is 0.055 per K, the anomaly slope is 0.015 per K
// (the two kinds of slope issue 6 item 3 says are not comparable).
func anomalyWorld(rng *rand.Rand, trendEIS, trendCloud float64, add func(*accumulate.Step)) {
	const cells, years = 20, 20
	x := make([]float64, cells)
	e := make([]float64, cells)
	for t := 0; t < 12*years; t++ {
		s := newStep(cells, 4, t)
		seas := 2 * math.Sin(2*math.Pi*float64(t%12)/12)
		yrs := float64(t) / 12
		for i := 0; i < cells; i++ {
			x[i] = ar1(rng, x[i], 0.5)
			e[i] = ar1(rng, e[i], 0.3)
			clim := 8 * float64(i) / cells
			eis := clim + seas + x[i] + trendEIS*yrs
			cloud := 0.1 + 0.06*(clim+seas) + 0.015*x[i] + 0.02*e[i] + trendCloud*yrs
			s.Rel[i] = -1
			s.Regime[i] = regimes.Subsidence
			s.Values[0][i] = float32(299 + 0.2*rng.NormFloat64())
			s.Values[1][i] = float32(eis + 10)
			s.Values[2][i] = float32(eis)
			s.Values[3][i] = float32(cloud)
		}
		add(s)
	}
}

func runAnomaly(t *testing.T, mode Mode, detrend bool, trendEIS, trendCloud float64) Regression {
	t.Helper()
	l := rowLayout(20, "sst", "lts", "eis", "cloud")
	cfg := Defaults()
	cfg.Mode = mode
	cfg.Detrend = detrend
	cfg.DecorrelationLength = 0
	var clim *Climatology
	if mode == Anomaly {
		clim = NewClimatology(l)
		anomalyWorld(rand.New(rand.NewPCG(51, 52)), trendEIS, trendCloud, clim.AddStep) // pass 1
	}
	acc, err := New(cfg, l, clim)
	if err != nil {
		t.Fatal(err)
	}
	anomalyWorld(rand.New(rand.NewPCG(51, 52)), trendEIS, trendCloud, acc.AddStep) // pass 2: same record
	res, err := acc.Results()
	if err != nil {
		t.Fatal(err)
	}
	if res.Mode != mode || res.ModeNote != ModeNote(mode) {
		t.Errorf("results say mode %v (%q)", res.Mode, res.ModeNote)
	}
	return findReg(t, res, BandDomain, "all", regimes.Subsidence, "cloud", "eis")
}

func TestAnomalyModeRecoversAnomalySlope(t *testing.T) {
	c := runAnomaly(t, Climatological, false, 0, 0)
	a := runAnomaly(t, Anomaly, false, 0, 0)
	if !(a.SlopeCI.Lo <= 0.015 && 0.015 <= a.SlopeCI.Hi) {
		t.Errorf("anomaly slope %g CI [%g, %g] misses the planted 0.015 per K", a.Slope, a.SlopeCI.Lo, a.SlopeCI.Hi)
	}
	// Composite slope = (0.06·V + 0.015·1)/(V + 1) with V = var(E_i) +
	// var(seasonal) = 0.16·var(0…19) + 2²/2 = 5.32 + 2 = 7.32 K²: 0.05459.
	V := 0.16*33.25 + 2
	want := (0.06*V + 0.015) / (V + 1)
	if math.Abs(c.Slope-want) > 0.002 {
		t.Errorf("climatological slope %g (CI [%g, %g]), expected the composite %g per K", c.Slope, c.SlopeCI.Lo, c.SlopeCI.Hi, want)
	}
}

// A common trend (EIS +0.1 K/yr, cloud −0.01/yr) biases the anomaly
// slope unless Detrend removes a linear trend per cell and calendar month.
func TestAnomalyDetrend(t *testing.T) {
	raw := runAnomaly(t, Anomaly, false, 0.1, -0.01)
	det := runAnomaly(t, Anomaly, true, 0.1, -0.01)
	if raw.SlopeCI.Lo <= 0.015 && 0.015 <= raw.SlopeCI.Hi {
		t.Errorf("without detrending the trend should bias the slope: %g CI [%g, %g]", raw.Slope, raw.SlopeCI.Lo, raw.SlopeCI.Hi)
	}
	if !(det.SlopeCI.Lo <= 0.015 && 0.015 <= det.SlopeCI.Hi) {
		t.Errorf("detrended slope %g CI [%g, %g] misses 0.015", det.Slope, det.SlopeCI.Lo, det.SlopeCI.Hi)
	}
}

// The climatology's value is the cell-month mean (and trend), checked on a
// hand-made record: one cell, January values 1, 2, 6 in 2001–2003.
func TestClimatologyHand(t *testing.T) {
	l := rowLayout(1, "eis")
	c := NewClimatology(l)
	for k, v := range []float64{1, 2, 6} {
		s := newStep(1, 1, 12*k)
		s.Rel[0], s.Regime[0], s.Values[0][0] = -1, regimes.Subsidence, float32(v)
		c.AddStep(s)
	}
	if got := c.Value(0, 0, 2002, 1, false); got != 3 {
		t.Errorf("mean = %g, want 3", got)
	}
	// Least squares through (2001, 1), (2002, 2), (2003, 6): slope 2.5/yr, value at 2003: 3 + 2.5.
	if got := c.Value(0, 0, 2003, 1, true); math.Abs(got-5.5) > 1e-9 {
		t.Errorf("detrended value in 2003 = %g, want 5.5", got)
	}
	if got := c.Value(0, 1, 2002, 1, false); got != -1 {
		t.Errorf("relative SST climatology = %g, want −1", got)
	}
	if !math.IsNaN(c.Value(0, 0, 2002, 2, false)) {
		t.Error("a month without data must give NaN")
	}
	if _, err := New(Config{}, l, nil); err == nil {
		t.Error("a zero Config must be refused (Partial unset)")
	}
	cfg := Defaults()
	cfg.Mode = Anomaly
	if _, err := New(cfg, l, nil); err == nil {
		t.Error("anomaly mode without a climatology must be refused")
	}
	if _, err := New(Defaults(), l, c); err == nil {
		t.Error("climatological mode with a climatology must be refused")
	}
}
