package relations

import (
	"math"
	"math/rand/v2"
	"testing"

	"lidscope/regimes"
)

// A hand-computed case of issue 6 item 4: four band cells, a patch over
// the first two; relative SST inside becomes SST* + ΔT(1 − f), outside
// SST* − ΔT f, f the patch's share of the band ocean area of the step.
//
// Band weights (= areas) 1, 3, 2, 2 (×1e10 m²); δ = 0 K.
// Step 1: SST* = −0.3, −0.8, 0.4, 0.9 (S S C C); f = 4/8 = 0.5.
//
//	ΔT = +1: inside +0.5 → 0.2 (C), −0.3 (S): cell 0 flips (weight 1 of 4);
//	         outside −0.5 → −0.1 (S), 0.4 (C): cell 2 flips (2 of 4).
//	ΔT = +2: inside +1 → both C (4 of 4); outside −1 → both S (4 of 4).
//	ΔT = −1: inside −0.5 and outside +0.5: nothing flips.
//
// Step 2: cell 1 missing, cell 2 at 0.35: f = 1/5 = 0.2.
//
//	ΔT = +1: inside +0.8 → 0.5 (C): flips (1 of 1); outside −0.2 → 0.15, 0.7: none (0 of 4).
//	ΔT = +2: inside +1.6 → C (1 of 1); outside −0.4 → −0.05 (S), 0.5: cell 2 flips (2 of 4).
//	ΔT = −1: inside −0.8, outside +0.2: none.
//
// Over both steps (inside area × time 5, outside 8):
//
//	ΔT = +1: changed inside 2/5, outside 2/8; convective inside 0 → 2/5, outside 8/8 → 6/8.
//	ΔT = +2: inside 5/5, outside 6/8; convective inside 0 → 1, outside 1 → 2/8.
func TestFlipsHandComputed(t *testing.T) {
	l := rowLayout(4, "sst", "lts", "eis", "cloud")
	w := []float64{1, 3, 2, 2}
	for i := range w {
		l.Area[i], l.BandWeight[i] = w[i]*1e10, w[i]*1e10
	}
	cfg := Defaults()
	cfg.Patches = []Patch{{Name: "west", South: -10, North: 10, West: -180, East: -50}}
	cfg.DeltaT = []float64{-1, 0, 1, 2}
	acc, err := New(cfg, l, nil)
	if err != nil {
		t.Fatal(err)
	}
	rels := [][]float64{{-0.3, -0.8, 0.4, 0.9}, {-0.3, math.NaN(), 0.35, 0.9}}
	for k, rel := range rels {
		s := newStep(4, 4, k)
		for i, x := range rel {
			s.Rel[i] = float32(x)
			s.Regime[i] = cfg.Classifier.Classify(float64(s.Rel[i]))
		}
		acc.AddStep(s)
	}
	res, err := acc.Results()
	if err != nil {
		t.Fatal(err)
	}
	pf := res.Flips[0]
	if pf.Cells != 2 || math.Abs(pf.FMean-0.35) > 1e-12 || math.Abs(pf.FMin-0.2) > 1e-12 || math.Abs(pf.FMax-0.5) > 1e-12 {
		t.Errorf("patch cells %d, f mean/min/max %g %g %g; want 2, 0.35, 0.2, 0.5", pf.Cells, pf.FMean, pf.FMin, pf.FMax)
	}
	want := map[float64]FlipRow{
		-1: {Changed: 0, ConvectiveBefore: 0, ConvectiveAfter: 0, OutChanged: 0, OutConvectiveBefore: 1, OutConvectiveAfter: 1},
		0:  {Changed: 0, ConvectiveBefore: 0, ConvectiveAfter: 0, OutChanged: 0, OutConvectiveBefore: 1, OutConvectiveAfter: 1},
		1: {Changed: 0.4, ToConvective: 0.4, ConvectiveBefore: 0, ConvectiveAfter: 0.4,
			OutChanged: 0.25, OutFromConvective: 0.25, OutConvectiveBefore: 1, OutConvectiveAfter: 0.75},
		2: {Changed: 1, ToConvective: 1, ConvectiveBefore: 0, ConvectiveAfter: 1,
			OutChanged: 0.75, OutFromConvective: 0.75, OutConvectiveBefore: 1, OutConvectiveAfter: 0.25},
	}
	for _, r := range pf.Rows {
		wr := want[r.DeltaT]
		wr.DeltaT = r.DeltaT
		got := []float64{r.Changed, r.ToConvective, r.FromConvective, r.ConvectiveBefore, r.ConvectiveAfter, r.OutChanged, r.OutToConvective, r.OutFromConvective, r.OutConvectiveBefore, r.OutConvectiveAfter}
		exp := []float64{wr.Changed, wr.ToConvective, wr.FromConvective, wr.ConvectiveBefore, wr.ConvectiveAfter, wr.OutChanged, wr.OutToConvective, wr.OutFromConvective, wr.OutConvectiveBefore, wr.OutConvectiveAfter}
		for k := range got {
			if math.Abs(got[k]-exp[k]) > 1e-12 {
				t.Errorf("ΔT = %g: field %d = %g, hand-computed %g (row %+v)", r.DeltaT, k, got[k], exp[k], r)
			}
		}
	}
	if got := pf.Rows[2].ConvectiveChange(); math.Abs(got-0.4) > 1e-12 {
		t.Errorf("convective change inside at +1 K = %g, want 0.4", got)
	}
	if got := pf.Rows[2].OutConvectiveChange(); math.Abs(got+0.25) > 1e-12 {
		t.Errorf("convective change outside at +1 K = %g, want −0.25", got)
	}
}

// On random fields: ΔT = 0 flips nothing and the flipped share grows
// monotonically with |ΔT| on each side, inside and outside, with and
// without a transition band.
func TestFlipsZeroAndMonotonic(t *testing.T) {
	for _, h := range []float64{0, 0.3} {
		l := rowLayout(40, "sst", "lts", "eis", "cloud")
		rng := rand.New(rand.NewPCG(8, 9))
		for i := range l.Area {
			l.Area[i] = 1e10 * (0.5 + rng.Float64())
			l.BandWeight[i] = l.Area[i]
		}
		cfg := Defaults()
		cfg.Classifier = regimes.Classifier{Delta: 0.5, HalfWidth: h}
		cfg.Patches = []Patch{{Name: "p", South: -5, North: 5, West: -100, East: 60}}
		cfg.DeltaT = nil
		for d := -4.0; d <= 4.0001; d += 0.25 {
			cfg.DeltaT = append(cfg.DeltaT, math.Round(d*100)/100)
		}
		acc, err := New(cfg, l, nil)
		if err != nil {
			t.Fatal(err)
		}
		for k := 0; k < 36; k++ {
			s := newStep(40, 4, k)
			for i := range s.Rel {
				s.Rel[i] = float32(1.5 * rng.NormFloat64())
				if rng.IntN(10) == 0 {
					s.Rel[i] = float32(math.NaN())
				}
				s.Regime[i] = cfg.Classifier.Classify(float64(s.Rel[i]))
			}
			acc.AddStep(s)
		}
		res, _ := acc.Results()
		rows := res.Flips[0].Rows
		zero := -1
		for k, r := range rows {
			if r.DeltaT == 0 {
				zero = k
				if r.Changed != 0 || r.OutChanged != 0 || r.ConvectiveChange() != 0 || r.OutConvectiveChange() != 0 {
					t.Errorf("h = %g: ΔT = 0 gives flips %+v", h, r)
				}
			}
		}
		if zero < 0 {
			t.Fatal("ΔT = 0 missing from the grid")
		}
		for k := zero + 1; k < len(rows); k++ {
			a, b := rows[k-1], rows[k]
			if b.Changed < a.Changed || b.OutChanged < a.OutChanged || b.ConvectiveAfter < a.ConvectiveAfter || b.OutConvectiveAfter > a.OutConvectiveAfter {
				t.Errorf("h = %g: not monotonic from ΔT %g to %g: %+v → %+v", h, a.DeltaT, b.DeltaT, a, b)
			}
		}
		for k := zero - 1; k >= 0; k-- {
			a, b := rows[k+1], rows[k]
			if b.Changed < a.Changed || b.OutChanged < a.OutChanged || b.ConvectiveAfter > a.ConvectiveAfter || b.OutConvectiveAfter < a.OutConvectiveAfter {
				t.Errorf("h = %g: not monotonic from ΔT %g to %g", h, a.DeltaT, b.DeltaT)
			}
		}
		if rows[len(rows)-1].Changed == 0 || rows[0].Changed == 0 {
			t.Errorf("h = %g: ±4 K flips nothing; the test data cannot exercise monotonicity", h)
		}
	}
}
