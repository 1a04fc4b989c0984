package relations_test

import (
	"fmt"
	"log"
	"math"
	"os"
	"path/filepath"

	"lidscope/accumulate"
	"lidscope/regimes"
	"lidscope/relations"
)

// A tiny invented world (synthetic, not observations): four ocean cells in
// the subsidence regime whose cloud fraction rises 5 % per K of EIS.
func Example() {
	l := accumulate.Layout{NLat: 1, NLon: 4, Lat: []float64{-15}, Lon: []float64{-120, -110, -100, -90},
		Area: []float64{1e10, 1e10, 1e10, 1e10}, BandWeight: []float64{1e10, 1e10, 1e10, 1e10},
		Quantities: []string{"sst", "lts", "eis", "cloud"}}
	cfg := relations.Defaults()
	cfg.Classifier = regimes.Classifier{Delta: 0.5}
	acc, err := relations.New(cfg, l, nil)
	if err != nil {
		log.Fatal(err)
	}
	for t := 0; t < 24; t++ {
		s := &accumulate.Step{Label: fmt.Sprintf("2001-%02d", t%12+1), Year: 2001 + t/12, Month: t%12 + 1, TropMean: 300,
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
	res, err := acc.Results()
	if err != nil {
		log.Fatal(err)
	}
	for _, r := range res.Regressions {
		if r.Domain == relations.BandDomain && r.Regime == regimes.Subsidence && r.Predictor == "eis" {
			fmt.Printf("%s: %s ~ %s slope %.3f %s (%d cell-steps, mode %v)\n", r.Domain, r.Response, r.Predictor, r.Slope, r.SlopeUnits, r.N, res.Mode)
		}
	}
	// Output: tropical_band: cloud ~ eis slope 0.050 K-1 (96 cell-steps, mode climatological)
}

// The effective sample sizes of Bretherton et al. (1999), eqs. 30 and 31.
func ExampleEffectiveSizeMean() {
	fmt.Println(relations.EffectiveSizeMean(120, 0.5), relations.EffectiveSizeCorr(120, 0.5, 0.5))
	// Output: 40 72
}

// A logistic fit to binned counts: the probability of convection crosses
// 0.5 at 0.5 K of relative SST (invented counts, symmetric about 0.5 K;
// SciPy's Nelder-Mead on the same likelihood gives slope 2.868 per K).
func ExampleFitLogistic() {
	x := []float64{-0.5, 0, 0.5, 1, 1.5}
	n := []float64{100, 100, 100, 100, 100}
	y := []float64{5, 20, 50, 80, 95}
	l, err := relations.FitLogistic(x, y, n)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("threshold %.3f K, slope %.2f per K\n", l.X50, l.B1)
	// Output: threshold 0.500 K, slope 2.87 per K
}

// Writing the results: five files, refused the second time without Force.
func ExampleWrite() {
	l := accumulate.Layout{NLat: 1, NLon: 2, Lat: []float64{0}, Lon: []float64{0, 10},
		Area: []float64{1e10, 1e10}, BandWeight: []float64{1e10, 1e10}, Quantities: []string{"sst", "lts", "eis", "cloud"}}
	acc, err := relations.New(relations.Defaults(), l, nil)
	if err != nil {
		log.Fatal(err)
	}
	for t := 0; t < 6; t++ {
		s := &accumulate.Step{Label: fmt.Sprint(t), Year: 2001, Month: t + 1, TropMean: 300,
			Rel: []float32{-1, 1}, Regime: []regimes.Regime{regimes.Subsidence, regimes.Convective},
			Values: [][]float32{{299, 301}, {20, 12}, {float32(5 + t%3), 1}, {float32(0.5 + 0.01*float64(t)), 0.2}}}
		acc.AddStep(s)
	}
	res, err := acc.Results()
	if err != nil {
		log.Fatal(err)
	}
	dir, _ := os.MkdirTemp("", "relations-example")
	defer os.RemoveAll(dir)
	files, err := relations.Write(dir, res, relations.Meta{Dataset: "invented", Command: []string{"lidscope", "example"}}, relations.WriteOptions{})
	if err != nil {
		log.Fatal(err)
	}
	for _, f := range files {
		fmt.Println(filepath.Base(f))
	}
	_, err = relations.Write(dir, res, relations.Meta{Command: []string{"lidscope", "example"}}, relations.WriteOptions{})
	fmt.Println(err != nil)
	// Output:
	// relationships.nc
	// regressions.csv
	// flips.csv
	// thresholds.csv
	// relationships.json
	// true
}
