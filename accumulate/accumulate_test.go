package accumulate

import (
	"bytes"
	"encoding/gob"
	"errors"
	"math"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"

	"lidscope/regimes"
)

func layout() Layout {
	l := Layout{NLat: 3, NLon: 4, Quantities: []string{"eis", "cloud"},
		Regions: []Region{{Name: "box", South: -10, North: 10, West: 170, East: -170}}}
	l.Lat = []float64{-20, 0, 20}
	l.Lon = []float64{-175, -90, 0, 175}
	for j := 0; j < 3; j++ {
		for i := 0; i < 4; i++ {
			l.Area = append(l.Area, 1+float64(j))
			w := 0.0
			if j == 1 {
				w = 2
			}
			l.BandWeight = append(l.BandWeight, w)
		}
	}
	return l
}

func randomStep(rng *rand.Rand, t int) *Step {
	n := 12
	s := &Step{Label: "step", Year: 2000 + t/12, Month: t%12 + 1, TropMean: 300, Rel: make([]float32, n), Regime: make([]regimes.Regime, n)}
	s.Values = [][]float32{make([]float32, n), make([]float32, n)}
	c := regimes.Classifier{Delta: 0.5}
	for i := 0; i < n; i++ {
		s.Rel[i] = float32(rng.NormFloat64())
		if i == 5 && t%3 == 0 {
			s.Rel[i] = float32(math.NaN())
		}
		s.Regime[i] = c.Classify(float64(s.Rel[i]))
		s.Values[0][i] = float32(5 + rng.NormFloat64())
		s.Values[1][i] = float32(rng.Float64())
	}
	return s
}

func TestMergeEqualsSinglePass(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	steps := make([]*Step, 50)
	for i := range steps {
		steps[i] = randomStep(rng, i)
	}
	whole, _ := New(layout())
	for _, s := range steps {
		whole.AddCells(s, 0, 12)
		whole.AddStep(s)
	}
	a, _ := New(layout())
	b, _ := New(layout())
	for i, s := range steps {
		x := a
		if i >= 17 {
			x = b
		}
		x.AddCells(s, 0, 7) // two ranges, as parallel workers would
		x.AddCells(s, 7, 12)
		x.AddStep(s)
	}
	if err := a.Merge(b); err != nil {
		t.Fatal(err)
	}
	close := func(x, y float64) bool { return x == y || math.Abs(x-y) <= 1e-12*math.Max(1, math.Abs(y)) }
	for i := 0; i < 12; i++ {
		if a.ValidSteps(i) != whole.ValidSteps(i) || a.Track(i).Crossings != whole.Track(i).Crossings {
			t.Fatalf("cell %d: counts differ", i)
		}
		for q := 0; q < 2; q++ {
			for r := regimes.Regime(0); r < nreg; r++ {
				x, y := a.Moments(q, r, i), whole.Moments(q, r, i)
				if x.N != y.N || !close(x.Mean, y.Mean) || !close(x.M2, y.M2) {
					t.Fatalf("cell %d q %d r %d: %+v vs %+v", i, q, r, x, y)
				}
			}
		}
	}
	if len(a.Series) != 50 || a.Cells.Steps != 50 {
		t.Fatalf("series %d steps %d", len(a.Series), a.Cells.Steps)
	}
	x, y := a.Regions[0].Values[0][regimes.Subsidence], whole.Regions[0].Values[0][regimes.Subsidence]
	if !close(x.Mean, y.Mean) || !close(x.M2, y.M2) || x.N == 0 {
		t.Fatalf("region: %+v vs %+v", x, y)
	}
	bad := layout()
	bad.NLon = 5
	if err := a.Merge(&Acc{L: bad}); err == nil {
		t.Error("merging different grids succeeded")
	}
}

// TestBandSeriesByHand: one step with two band cells of weight 2 — one
// convective, one subsidence — gives area fractions ½, ½.
func TestBandSeriesByHand(t *testing.T) {
	a, _ := New(layout())
	s := &Step{Rel: make([]float32, 12), Regime: make([]regimes.Regime, 12), Values: [][]float32{make([]float32, 12), make([]float32, 12)}}
	for i := range s.Regime {
		s.Regime[i] = regimes.Missing
	}
	s.Regime[4], s.Regime[5] = regimes.Convective, regimes.Subsidence
	s.Values[0][4], s.Values[0][5] = 1, 7
	a.AddCells(s, 0, 12)
	a.AddStep(s)
	p := a.Series[0]
	if p.AreaFraction[regimes.Convective] != 0.5 || p.AreaFraction[regimes.Subsidence] != 0.5 || p.AreaFraction[regimes.Transition] != 0 {
		t.Errorf("fractions %v", p.AreaFraction)
	}
	if p.Means[0][regimes.Subsidence] != 7 || p.Means[0][regimes.Convective] != 1 {
		t.Errorf("means %v", p.Means)
	}
}

func TestRegionContains(t *testing.T) {
	r := Region{South: -10, North: 10, West: 170, East: -170}
	for _, c := range []struct {
		lat, lon float64
		in       bool
	}{{0, 175, true}, {0, -175, true}, {0, 185, true}, {0, 0, false}, {20, 175, false}} {
		if r.Contains(c.lat, c.lon) != c.in {
			t.Errorf("%v %v", c, !c.in)
		}
	}
}

func TestEncodeDecodeRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	a, _ := New(layout())
	for i := 0; i < 20; i++ {
		s := randomStep(rng, i)
		a.AddCells(s, 0, 12)
		a.AddStep(s)
	}
	var buf bytes.Buffer
	if err := a.Encode(&buf); err != nil {
		t.Fatal(err)
	}
	enc := buf.Bytes()
	for _, bad := range [][]byte{enc[:len(enc)-5], append(append([]byte{}, enc...), 0)} {
		if _, err := Decode(bytes.NewReader(bad)); err == nil || !strings.Contains(err.Error(), "damaged") {
			t.Errorf("a state of %d bytes (%d written) decoded: %v", len(bad), len(enc), err)
		}
	}
	b, err := Decode(bytes.NewReader(enc))
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(a.Cells.Tracks, b.Cells.Tracks) || len(b.Series) != 20 || !reflect.DeepEqual(a.member, b.member) {
		t.Fatal("state did not round-trip")
	}
	for i := range a.NCells() {
		for q := range a.L.Quantities {
			for r := regimes.Regime(0); r < nreg; r++ {
				if a.Moments(q, r, i) != b.Moments(q, r, i) {
					t.Fatalf("cell %d quantity %d regime %d did not round-trip", i, q, r)
				}
			}
		}
		if a.RelMoments(i) != b.RelMoments(i) {
			t.Fatalf("cell %d: relative SST did not round-trip", i)
		}
	}
	if _, err := Decode(bytes.NewReader([]byte("not a state"))); err == nil {
		t.Error("garbage decoded")
	}
}

// TestDecodeRefusesAnEarlierFormat: a state of the earlier per-grid-cell
// format is refused with ErrFormat and a message to run again.
func TestDecodeRefusesAnEarlierFormat(t *testing.T) {
	type earlier struct { // the gob of lidscope-accumulator/1 and /2
		Format string
		L      Layout
	}
	for _, f := range []string{"lidscope-accumulator/1", "lidscope-accumulator/2"} {
		var buf bytes.Buffer
		if err := gob.NewEncoder(&buf).Encode(earlier{Format: f, L: layout()}); err != nil {
			t.Fatal(err)
		}
		_, err := Decode(&buf)
		if !errors.Is(err, ErrFormat) || !strings.Contains(err.Error(), "run the analysis again") {
			t.Fatalf("%s: got %v, want ErrFormat saying to run again", f, err)
		}
	}
	// every field of a crossing track is in its record
	if n := reflect.TypeFor[regimes.Track]().NumField(); n != 13 {
		t.Errorf("regimes.Track has %d fields; the state's track record has 13: add the new ones to Encode and Decode", n)
	}
}
