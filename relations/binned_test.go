package relations

import (
	"math"
	"testing"

	"lidscope/regimes"
)

// Hand-computed binned, joint and omega tables (issue 6 items 1 and 6):
// three band cells of weights 1, 2, 3 (×1e10 m²), two steps, all
// subsidence at relative SST −1 K.
//
//	step 1: EIS 2.5, 2.2, 5.5 K; cloud 0.2, 0.4, 0.6; omega −15, 5, 45 hPa d-1
//	step 2: EIS 2.7, 20, 5.1 K;  cloud 0.3, 0.1, 0.5; omega −15, 95, 150 hPa d-1
//
// EIS bin [2, 3): (0.2, w1), (0.4, w2), (0.3, w1): W = 4, mean 1.3/4 =
// 0.325, population variance (0.125²·1 + 0.075²·2 + 0.025²·1)/4 =
// 0.006875; N = 3 from 2 steps. Bin [5, 6): (0.6, 3), (0.5, 3): mean 0.55,
// std 0.05. EIS 20 K is out of range. N_eff (default L = 1000 km: one
// independent area per step; lag-1 not estimable from 2 steps, taken as
// 0) = min(N, 1·2) = 2, so the standard error is std/√(2 − 1).
//
// Joint (relative SST [−1, −0.5) × EIS): area shares of all samples with
// both valid (12e10): [2, 3) 4/12, [5, 6) 6/12.
//
// Omega (10 hPa d-1 bins, Bony et al. 2004): [−20, −10) weight 2 of 12
// (cloud 0.25), [0, 10) 2 (0.4), [40, 50) 3 (0.6), [90, 100) 2 (0.1);
// 150 hPa d-1 out of range; PDF = share/10 per hPa d-1.
func TestBinnedJointOmegaHand(t *testing.T) {
	l := rowLayout(3, "sst", "lts", "eis", "cloud", "omega")
	for i, w := range []float64{1, 2, 3} {
		l.Area[i], l.BandWeight[i] = w*1e10, w*1e10
	}
	cfg := Defaults()
	cfg.OmegaBins = true
	acc, err := New(cfg, l, nil)
	if err != nil {
		t.Fatal(err)
	}
	data := []struct{ eis, cloud, omega []float64 }{
		{[]float64{2.5, 2.2, 5.5}, []float64{0.2, 0.4, 0.6}, []float64{-15, 5, 45}},
		{[]float64{2.7, 20, 5.1}, []float64{0.3, 0.1, 0.5}, []float64{-15, 95, 150}},
	}
	for k, d := range data {
		s := newStep(3, 5, k)
		for i := 0; i < 3; i++ {
			s.Rel[i], s.Regime[i] = -1, regimes.Subsidence
			s.Values[0][i], s.Values[1][i] = 299, float32(d.eis[i]+10)
			s.Values[2][i], s.Values[3][i] = float32(d.eis[i]), float32(d.cloud[i])
			s.Values[4][i] = float32(d.omega[i] * hPaPerDayToPaPerS)
		}
		acc.AddStep(s)
	}
	res, err := acc.Results()
	if err != nil {
		t.Fatal(err)
	}
	near := func(what string, got, want float64) {
		t.Helper()
		if math.Abs(got-want) > 1e-6*math.Max(1, math.Abs(want)) {
			t.Errorf("%s = %.9g, hand-computed %.9g", what, got, want)
		}
	}
	var bt *Binned
	for k := range res.Binned {
		b := &res.Binned[k]
		if b.Domain == BandDomain && b.Season == "all" && b.Regime == regimes.Subsidence && b.Predictor == "eis" && b.Response == "cloud" {
			bt = b
		}
	}
	if bt == nil {
		t.Fatal("binned cloud~EIS table missing")
	}
	b23, b56 := bt.Bins[8], bt.Bins[11] // edges −6, −5, …: bin 8 is [2, 3)
	if b23.Lower != 2 || b23.Upper != 3 || b56.Lower != 5 {
		t.Fatalf("bins %v %v", b23, b56)
	}
	near("[2,3) mean", b23.Mean, 0.325)
	near("[2,3) std", b23.Std, math.Sqrt(0.006875))
	near("[2,3) area", b23.Area, 4e10)
	near("[2,3) N_eff", b23.NEff, 2)
	near("[2,3) stderr", b23.StdErr, math.Sqrt(0.006875))
	if b23.N != 3 || b23.Steps != 2 || b56.N != 2 || b56.Steps != 2 {
		t.Errorf("counts %d/%d and %d/%d, want 3/2 and 2/2", b23.N, b23.Steps, b56.N, b56.Steps)
	}
	near("[5,6) mean", b56.Mean, 0.55)
	near("[5,6) std", b56.Std, 0.05)
	if bt.OutOfRange != 1 {
		t.Errorf("out of range %d, want 1", bt.OutOfRange)
	}
	for k, b := range bt.Bins {
		if k != 8 && k != 11 && (b.N != 0 || !math.IsNaN(b.Mean)) {
			t.Errorf("bin %d should be empty: %+v", k, b)
		}
	}
	var jt *Joint
	for k := range res.Joint {
		if j := &res.Joint[k]; j.Domain == BandDomain && j.Season == "all" && j.Response == "cloud" {
			jt = j
		}
	}
	ne := len(jt.EISEdge) - 1
	near("joint freq [2,3)", jt.Frequency[14*ne+8], 4.0/12)
	near("joint freq [5,6)", jt.Frequency[14*ne+11], 0.5)
	near("joint mean [2,3)", jt.Mean[14*ne+8], 0.325)
	near("joint mean [5,6)", jt.Mean[14*ne+11], 0.55)
	var sum float64
	for _, f := range jt.Frequency {
		sum += f
	}
	near("joint frequencies sum (one sample out of range)", sum, 10.0/12)

	var oc *OmegaComposite
	for k := range res.Omega {
		if o := &res.Omega[k]; o.Domain == BandDomain && o.Season == "all" {
			oc = o
		}
	}
	if oc == nil || len(oc.Bins) != 20 {
		t.Fatalf("omega composite: %+v", oc)
	}
	want := map[int][2]float64{8: {2.0 / 12, 0.25}, 10: {2.0 / 12, 0.4}, 14: {3.0 / 12, 0.6}, 19: {2.0 / 12, 0.1}}
	for b, ob := range oc.Bins {
		w, ok := want[b]
		if !ok {
			if ob.N != 0 {
				t.Errorf("omega bin %d [%g, %g) should be empty", b, ob.Lower, ob.Upper)
			}
			continue
		}
		near("omega frequency", ob.Frequency, w[0])
		near("omega pdf", ob.PDF, w[0]/10)
		near("omega cloud mean", oc.Responses[0].Mean[b], w[1])
	}
	if oc.Bins[8].Lower != -20 || oc.OutOfRange != 1 {
		t.Errorf("omega bin 8 lower %g, out of range %d", oc.Bins[8].Lower, oc.OutOfRange)
	}
}

func TestBinOf(t *testing.T) {
	e := []float64{0, 1, 2, 4}
	cases := []struct {
		x    float64
		want int
	}{{-0.1, -1}, {0, 0}, {0.5, 0}, {1, 1}, {3.9, 2}, {4, 2}, {4.1, -1}, {math.NaN(), -1}}
	for _, c := range cases {
		if got := binOf(e, c.x); got != c.want {
			t.Errorf("binOf(%g) = %d, want %d", c.x, got, c.want)
		}
	}
}
