package regimes

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

func TestClassify(t *testing.T) {
	c := Classifier{Delta: 1.5}
	h := Classifier{Delta: 1.5, HalfWidth: 0.25}
	cases := []struct {
		c    Classifier
		x    float64
		want Regime
	}{
		{c, 2, Convective}, {c, 1.5, Subsidence}, {c, 1.5000001, Convective}, {c, -3, Subsidence},
		{c, math.NaN(), Missing},
		{h, 1.76, Convective}, {h, 1.75, Transition}, {h, 1.5, Transition}, {h, 1.25, Transition},
		{h, 1.2499, Subsidence},
	}
	for _, tc := range cases {
		if got := tc.c.Classify(tc.x); got != tc.want {
			t.Errorf("%+v.Classify(%v) = %v, want %v", tc.c, tc.x, got, tc.want)
		}
	}
	if (Classifier{Delta: math.Inf(1)}).Validate() == nil || (Classifier{HalfWidth: -1}).Validate() == nil {
		t.Error("invalid classifiers accepted")
	}
}

// TestBandWeights checks the band weight of cells straddling the band edge
// against the exact spherical area fraction: the area between latitudes
// φ1 and φ2 is proportional to sin φ2 − sin φ1 (common practice; exact
// for a sphere).
func TestBandWeights(t *testing.T) {
	lb := [][2]float64{{-40, -20}, {-20, 0}, {0, 20}, {20, 40}}
	area := []float64{1, 1, 1, 1}
	w := Band{-30, 30}.Weights(lb, area)
	s := func(d float64) float64 { return math.Sin(d * math.Pi / 180) }
	edge := (s(-20) - s(-30)) / (s(-20) - s(-40))
	want := []float64{edge, 1, 1, edge}
	for i := range w {
		if math.Abs(w[i]-want[i]) > 1e-12 {
			t.Errorf("w[%d] = %v, want %v", i, w[i], want[i])
		}
	}
}

func TestTropicalMeanAndRelative(t *testing.T) {
	sst := []float32{300, 290, float32(math.NaN()), 280}
	w := []float64{1, 3, 1, 0}
	ocean := []bool{true, true, true, true}
	m, sw, ok := TropicalMean(sst, w, ocean)
	if !ok || sw != 4 || math.Abs(m-292.5) > 1e-9 {
		t.Fatalf("mean = %v (%v, %v), want 292.5 from (300·1 + 290·3)/4", m, sw, ok)
	}
	rel := make([]float32, 4)
	Relative(sst, m, []bool{true, false, true, true}, rel)
	if rel[0] != 7.5 || rel[1] == rel[1] || rel[2] == rel[2] || rel[3] != -12.5 {
		t.Fatalf("rel = %v", rel)
	}
	if _, _, ok := TropicalMean(sst, []float64{0, 0, 0, 0}, nil); ok {
		t.Error("mean over no cells reported ok")
	}
}

func seq(s string) []Regime {
	out := make([]Regime, len(s))
	for i, c := range s {
		out[i] = map[rune]Regime{'c': Convective, 's': Subsidence, 't': Transition, '.': Missing}[c]
	}
	return out
}

func TestTrackHandCases(t *testing.T) {
	cases := []struct {
		s                   string
		crossings           int32
		convRuns, convSteps int64
		subsRuns, subsSteps int64
	}{
		{"", 0, 0, 0, 0, 0},
		{"....", 0, 0, 0, 0, 0},
		{"cccc", 0, 1, 4, 0, 0},
		{"ccss", 1, 1, 2, 1, 2},
		{"ctcs", 1, 1, 3, 1, 1},   // c t c: one convective run of 3 steps, then s
		{"ctts", 1, 1, 1, 1, 1},   // transition between different regimes belongs to neither run
		{"c..c.s", 1, 1, 4, 1, 1}, // missing steps inside a run count toward it
		{"scscs", 4, 2, 2, 3, 3},
		{".sscc.", 1, 1, 2, 1, 2},
	}
	for _, tc := range cases {
		tr := NewTrack()
		for _, r := range seq(tc.s) {
			tr.Add(r)
		}
		cr, cs := tr.Runs(Convective)
		sr, ss := tr.Runs(Subsidence)
		if tr.Crossings != tc.crossings || cr != tc.convRuns || cs != tc.convSteps || sr != tc.subsRuns || ss != tc.subsSteps {
			t.Errorf("%q: crossings %d runs c %d/%d s %d/%d; want %d, c %d/%d, s %d/%d", tc.s,
				tr.Crossings, cr, cs, sr, ss, tc.crossings, tc.convRuns, tc.convSteps, tc.subsRuns, tc.subsSteps)
		}
		if int(tr.Steps) != len(tc.s) {
			t.Errorf("%q: steps %d", tc.s, tr.Steps)
		}
	}
	tr := NewTrack()
	for _, r := range seq("ccccss") {
		tr.Add(r)
	}
	if d := tr.MeanDwell(Convective); d != 4 {
		t.Errorf("mean convective dwell %v, want 4", d)
	}
}

// TestTrackMergeEqualsSinglePass splits random sequences at every point
// (and into three pieces) and checks that merging gives exactly the
// single-pass result.
func TestTrackMergeEqualsSinglePass(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	letters := "csst.c"
	for n := 0; n < 400; n++ {
		l := rng.IntN(30)
		b := make([]byte, l)
		for i := range b {
			b[i] = letters[rng.IntN(len(letters))]
		}
		s := seq(string(b))
		whole := NewTrack()
		for _, r := range s {
			whole.Add(r)
		}
		for cut := 0; cut <= l; cut++ {
			for cut2 := cut; cut2 <= l; cut2 += 3 {
				parts := [][]Regime{s[:cut], s[cut:cut2], s[cut2:]}
				m := NewTrack()
				for _, p := range parts {
					tp := NewTrack()
					for _, r := range p {
						tp.Add(r)
					}
					m.Merge(tp)
				}
				if fmt.Sprint(summary(m)) != fmt.Sprint(summary(whole)) {
					t.Fatalf("%q split at %d,%d: merged %v, single pass %v", b, cut, cut2, summary(m), summary(whole))
				}
			}
		}
	}
}

func summary(t Track) []int64 {
	cr, cs := t.Runs(Convective)
	sr, ss := t.Runs(Subsidence)
	return []int64{int64(t.Steps), int64(t.Crossings), cr, cs, sr, ss, int64(t.First), int64(t.Last), int64(t.FirstAt), int64(t.LastAt)}
}

func ExampleClassifier() {
	c := Classifier{Delta: 1.5}
	for _, rel := range []float64{2.1, 0.3, math.NaN()} {
		fmt.Println(rel, c.Classify(rel))
	}
	// Output:
	// 2.1 convective
	// 0.3 subsidence
	// NaN missing
}
