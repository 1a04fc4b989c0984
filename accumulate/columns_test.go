package accumulate

import (
	"bytes"
	"math"
	"math/big"
	"math/rand/v2"
	"testing"

	"lidscope/regimes"
)

// exactMoments is the reference: mean and Σ(x − mean)² of the float32
// values in exact rational arithmetic (math/big), rounded once.
func exactMoments(xs []float32) (mean, m2 float64) {
	n := new(big.Rat).SetInt64(int64(len(xs)))
	sum := new(big.Rat)
	for _, x := range xs {
		sum.Add(sum, new(big.Rat).SetFloat64(float64(x)))
	}
	mu := new(big.Rat).Quo(sum, n)
	ss := new(big.Rat)
	for _, x := range xs {
		d := new(big.Rat).Sub(new(big.Rat).SetFloat64(float64(x)), mu)
		ss.Add(ss, d.Mul(d, d))
	}
	mean, _ = mu.Float64()
	m2, _ = ss.Float64()
	return mean, m2
}

// TestSumAgainstExactArithmetic: the shifted sums of a column, added value
// by value and merged from pieces, against exact rational arithmetic.
func TestSumAgainstExactArithmetic(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	gen := func(n int, f func(k int) float64) []float32 {
		xs := make([]float32, n)
		for k := range xs {
			xs[k] = float32(f(k))
		}
		return xs
	}
	for _, c := range []struct {
		name       string
		xs         []float32
		tolMean    float64 // relative
		tolM2      float64 // relative
		zeroSpread bool
	}{
		{"constant low cloud (a regime with one value)", gen(480, func(int) float64 { return 0.1 }), 0, 0, true},
		{"SST in K with a seasonal cycle", gen(14600, func(k int) float64 { return 300 + 3*math.Sin(2*math.Pi*float64(k)/365) + 0.3*rng.NormFloat64() }), 1e-15, 1e-11, false},
		{"first value far out (a spike)", append([]float32{400}, gen(2000, func(int) float64 { return 285 + 0.05*rng.NormFloat64() })...), 1e-15, 1e-9, false},
		{"cloud fraction 0…1", gen(5000, func(int) float64 { return rng.Float64() }), 1e-15, 1e-12, false},
	} {
		t.Run(c.name, func(t *testing.T) {
			mean, m2 := exactMoments(c.xs)
			one := emptySum()
			for _, x := range c.xs {
				one.add(x)
			}
			// three pieces merged, each with its own shift
			var pieces Sum
			pieces = emptySum()
			for _, cut := range [][2]int{{0, len(c.xs) / 3}, {len(c.xs) / 3, len(c.xs) / 2}, {len(c.xs) / 2, len(c.xs)}} {
				p := emptySum()
				for _, x := range c.xs[cut[0]:cut[1]] {
					p.add(x)
				}
				pieces.merge(p)
			}
			for name, s := range map[string]Sum{"one pass": one, "three pieces": pieces} {
				m := s.Moments()
				if m.N != int64(len(c.xs)) || m.W != float64(len(c.xs)) {
					t.Fatalf("%s: n %d, w %g, want %d", name, m.N, m.W, len(c.xs))
				}
				if d := math.Abs(m.Mean-mean) / math.Abs(mean); d > c.tolMean {
					t.Errorf("%s: mean %.17g, exact %.17g (relative %.2g > %.2g)", name, m.Mean, mean, d, c.tolMean)
				}
				if c.zeroSpread {
					if m.M2 != 0 || m.Mean != float64(c.xs[0]) {
						t.Errorf("%s: constant sample: mean %.17g, M2 %g; want %.17g and 0 exactly", name, m.Mean, m.M2, float64(c.xs[0]))
					}
					continue
				}
				if d := math.Abs(m.M2-m2) / m2; d > c.tolM2 {
					t.Errorf("%s: M2 %.17g, exact %.17g (relative %.2g > %.2g)", name, m.M2, m2, d, c.tolM2)
				}
			}
		})
	}
	if m := emptySum().Moments(); m.N != 0 || m.W != 0 || !math.IsNaN(m.MeanOrNaN()) {
		t.Errorf("empty sum: %+v", m)
	}
}

func TestIndex(t *testing.T) {
	for _, c := range []struct {
		n     int
		cells []int32
	}{{5, nil}, {6, []int32{1, 2, 5}}, {4, []int32{}}, {3, []int32{0, 1, 2}}} {
		x := NewIndex(c.n, c.cells)
		want := map[int]int{}
		if c.cells == nil {
			for i := 0; i < c.n; i++ {
				want[i] = i
			}
		}
		for k, i := range c.cells {
			want[int(i)] = k
		}
		for i := 0; i < c.n; i++ {
			k, ok := want[i]
			if !ok {
				k = -1
			}
			if got := x.Slot(i); got != k {
				t.Errorf("%v: slot of %d = %d, want %d", c.cells, i, got, k)
			}
		}
		for lo := 0; lo <= c.n; lo++ {
			for hi := lo; hi <= c.n; hi++ {
				from, to := x.Slots(lo, hi)
				cnt := 0
				for i := lo; i < hi; i++ {
					if _, ok := want[i]; ok {
						cnt++
					}
				}
				if to-from != cnt || (cnt > 0 && int(x.Cell[from]) < lo) {
					t.Errorf("%v: slots of [%d,%d) = [%d,%d), %d kept", c.cells, lo, hi, from, to, cnt)
				}
			}
		}
	}
}

// TestColumnsKeepOnlyTheirCells: an accumulator that keeps some columns
// gives, at those, what one keeping every column gives, and nothing
// elsewhere; the series and regions do not change.
func TestColumnsKeepOnlyTheirCells(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	l := layout()
	l.Columns = []int32{0, 3, 4, 5, 9}
	some, err := New(l)
	if err != nil {
		t.Fatal(err)
	}
	all, _ := New(layout())
	for i := 0; i < 30; i++ {
		s := randomStep(rng, i)
		for _, a := range []*Acc{some, all} {
			a.AddCells(s, 0, 5)
			a.AddCells(s, 5, 12)
			a.AddStep(s)
		}
	}
	kept := map[int]bool{0: true, 3: true, 4: true, 5: true, 9: true}
	for i := 0; i < 12; i++ {
		for q := range l.Quantities {
			for r := regimes.Regime(0); r < nreg; r++ {
				got, want := some.Moments(q, r, i), all.Moments(q, r, i)
				if !kept[i] {
					if got.N != 0 || some.ValidSteps(i) != 0 {
						t.Fatalf("cell %d is not kept but has %d values", i, got.N)
					}
					continue
				}
				if got != want {
					t.Fatalf("cell %d quantity %d regime %d: %+v, all columns %+v", i, q, r, got, want)
				}
			}
		}
		if kept[i] && (some.Track(i) != all.Track(i) || some.RelMoments(i) != all.RelMoments(i)) {
			t.Fatalf("cell %d: track or relative SST differs", i)
		}
	}
	if !math.IsNaN(some.ConvectiveFraction()[1]) || some.ConvectiveFraction()[3] != all.ConvectiveFraction()[3] {
		t.Error("convective fraction of kept/not kept columns")
	}
	for k := range some.Series {
		if some.Series[k].AreaFraction != all.Series[k].AreaFraction {
			t.Fatal("the band series depends on the kept columns")
		}
	}
	if err := some.Merge(all); err == nil {
		t.Error("merging accumulators that keep different columns succeeded")
	}
	l.Columns = []int32{3, 1}
	if _, err := New(l); err == nil {
		t.Error("columns out of order accepted")
	}
}

// TestNoTransitionKeepsTwoRegimes: without a transition band no sums are
// kept for the transition regime; the other regimes' statistics, the
// encoding round trip and merging are as with all three, and a transition
// step is refused.
func TestNoTransitionKeepsTwoRegimes(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	l := layout()
	l.NoTransition = true
	two, err := New(l)
	if err != nil {
		t.Fatal(err)
	}
	three, _ := New(layout())
	for i := 0; i < 25; i++ {
		s := randomStep(rng, i) // δ = 0.5 K, h = 0: no transition steps
		for _, a := range []*Acc{two, three} {
			a.AddCells(s, 0, 12)
			a.AddStep(s)
		}
	}
	if two.Cells.Values[0][regimes.Transition] != nil {
		t.Error("transition sums kept without a transition band")
	}
	for i := range two.NCells() {
		for q := range l.Quantities {
			for r := regimes.Regime(0); r < nreg; r++ {
				if two.Moments(q, r, i) != three.Moments(q, r, i) {
					t.Fatalf("cell %d quantity %d regime %v differs", i, q, r)
				}
			}
		}
	}
	var buf bytes.Buffer
	if err := two.Encode(&buf); err != nil {
		t.Fatal(err)
	}
	back, err := Decode(&buf)
	if err != nil {
		t.Fatal(err)
	}
	if err := back.Merge(two); err != nil {
		t.Fatal(err)
	}
	if m := back.Moments(1, regimes.Subsidence, 4); m.N != 2*two.Moments(1, regimes.Subsidence, 4).N {
		t.Errorf("merged %d values, want twice %d", m.N, two.Moments(1, regimes.Subsidence, 4).N)
	}
	if err := three.Merge(two); err == nil {
		t.Error("merged a run without a transition band into one with")
	}
	defer func() {
		if recover() == nil {
			t.Error("a transition step was accepted without a transition band")
		}
	}()
	s := randomStep(rng, 30)
	s.Regime[4] = regimes.Transition
	two.AddCells(s, 0, 12)
}
