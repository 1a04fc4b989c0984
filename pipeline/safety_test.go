package pipeline

import (
	"math"
	"strings"
	"testing"

	"lidscope/accumulate"
	"lidscope/cf"
	"lidscope/regimes"
)

// TestNoOceanValuesRefused: a quantity without a single value over the
// band's ocean columns (here cloud present only outside the band) stops
// the run instead of leaving every regime mean null in summary.json; the
// study may accept it, and the run then says so in its notes.
func TestNoOceanValuesRefused(t *testing.T) {
	nan := float32(math.NaN())
	l := accumulate.Layout{NLat: 2, NLon: 2, Lat: []float64{-10, 40}, Lon: []float64{0, 180},
		Area: []float64{1, 1, 1, 1}, BandWeight: []float64{1, 1, 0, 0}, Quantities: []string{"sst", "low_cloud"}, Cloud: "low_cloud"}
	acc, err := accumulate.New(l)
	if err != nil {
		t.Fatal(err)
	}
	reg := []regimes.Regime{regimes.Convective, regimes.Subsidence, regimes.Subsidence, regimes.Subsidence}
	for k := 0; k < 3; k++ {
		s := &accumulate.Step{Label: "x", Year: 2001, Month: k + 1, TropMean: 300, Rel: []float32{1, -1, -1, -1}, Regime: reg,
			Values: [][]float32{{301, 299, 290, 290}, {nan, nan, 0.5, 0.5}}}
		acc.AddCells(s, 0, 4)
		acc.AddStep(s)
	}
	p := &Plan{Regimes: regimes.Definition{Band: regimes.Band{South: -30, North: 30}}}
	var notes []string
	err = checkOceanValues(p, acc, l.BandWeight, 3, &notes)
	if err == nil {
		t.Fatal("a cloud field without values over the band's ocean was accepted")
	}
	for _, w := range []string{"no low_cloud value over any ocean column of the band -30…30°N in any of the 3 time steps", "null in summary.json", "accept: [no_ocean_values]"} {
		if !strings.Contains(err.Error(), w) {
			t.Errorf("the error lacks %q: %v", w, err)
		}
	}
	p.Accept = map[string]bool{cf.CheckNoOceanValues: true}
	if err := checkOceanValues(p, acc, l.BandWeight, 3, &notes); err != nil || len(notes) != 1 || !strings.Contains(notes[0], "check no_ocean_values accepted") {
		t.Errorf("accepted: %v, notes %q", err, notes)
	}
}
