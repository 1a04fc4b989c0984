package relations_test

import (
	"bytes"
	"fmt"
	"log"
	"math"

	"lidscope/accumulate"
	"lidscope/regimes"
	"lidscope/relations"
)

// Two pieces of a record run separately, their accumulators saved
// (Encode) and read back (DecodeAcc), then merged: the same slope as one
// pass over the whole record. Invented data: four subsidence cells whose
// cloud fraction rises 5 % per K of EIS.
func ExampleDecodeAcc() {
	l := accumulate.Layout{NLat: 1, NLon: 4, Lat: []float64{-15}, Lon: []float64{-120, -110, -100, -90},
		Area: []float64{1e10, 1e10, 1e10, 1e10}, BandWeight: []float64{1e10, 1e10, 1e10, 1e10},
		Quantities: []string{"sst", "lts", "eis", "cloud"}}
	cfg := relations.Defaults()
	cfg.Classifier = regimes.Classifier{Delta: 0.5}
	piece := func(t0, t1 int) []byte {
		acc, err := relations.New(cfg, l, nil)
		if err != nil {
			log.Fatal(err)
		}
		for t := t0; t < t1; t++ {
			s := &accumulate.Step{Label: fmt.Sprintf("%d-%02d", 2001+t/12, t%12+1), Year: 2001 + t/12, Month: t%12 + 1, TropMean: 300,
				Rel: make([]float32, 4), Regime: make([]regimes.Regime, 4), Values: make([][]float32, 4)}
			for q := range s.Values {
				s.Values[q] = make([]float32, 4)
			}
			for i := 0; i < 4; i++ {
				eis := 2 + float64(i) + math.Sin(float64(t+3*i))
				s.Rel[i] = -1
				s.Regime[i] = cfg.Classifier.Classify(-1)
				s.Values[0][i], s.Values[1][i], s.Values[2][i] = 299, float32(eis+11), float32(eis)
				s.Values[3][i] = float32(0.2 + 0.05*eis)
			}
			acc.AddStep(s)
		}
		var buf bytes.Buffer
		if err := acc.Encode(&buf); err != nil {
			log.Fatal(err)
		}
		return buf.Bytes()
	}
	first, second := piece(0, 12), piece(12, 24)
	acc, err := relations.DecodeAcc(bytes.NewReader(first))
	if err != nil {
		log.Fatal(err)
	}
	rest, err := relations.DecodeAcc(bytes.NewReader(second))
	if err != nil {
		log.Fatal(err)
	}
	if err := acc.Merge(rest); err != nil {
		log.Fatal(err)
	}
	res, err := acc.Results()
	if err != nil {
		log.Fatal(err)
	}
	for _, r := range res.Regressions {
		if r.Regime == regimes.Subsidence && r.Predictor == "eis" {
			fmt.Printf("%s … %s: %s ~ %s slope %.3f %s (%d cell-steps)\n", res.First, res.Last, r.Response, r.Predictor, r.Slope, r.SlopeUnits, r.N)
		}
	}
	// Output: 2001-01 … 2002-12: cloud ~ eis slope 0.050 K-1 (96 cell-steps)
}
