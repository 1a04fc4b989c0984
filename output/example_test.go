package output_test

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"

	"lidscope/accumulate"
	"lidscope/grid"
	"lidscope/output"
	"lidscope/regimes"
)

// Write the results of a tiny invented run: two ocean columns on the
// equator, three monthly steps.
func ExampleWrite() {
	g, _ := grid.New([]float64{0}, []float64{0, 90}, [][2]float64{{-5, 5}}, nil)
	area := g.CellAreas()
	acc, _ := accumulate.New(accumulate.Layout{
		NLat: 1, NLon: 2, Lat: g.Lat, Lon: g.Lon, Area: area,
		BandWeight: regimes.Band{South: -30, North: 30}.Weights(g.LatBounds, area),
		Quantities: []string{"eis"},
	})
	c := regimes.Classifier{Delta: 0.5}
	rel := [][]float32{{1, -1}, {1, 1}, {-1, 1}} // K, per step and column
	eis := [][]float32{{2, 8}, {3, 4}, {9, 1}}   // K
	for t := range rel {
		s := &accumulate.Step{Label: fmt.Sprintf("2001-%02d", t+1), Year: 2001, Month: t + 1, TropMean: 300,
			Rel: rel[t], Regime: make([]regimes.Regime, 2), Values: [][]float32{eis[t]}}
		c.ClassifySlab(s.Rel, s.Regime)
		acc.AddCells(s, 0, 2)
		acc.AddStep(s)
	}
	dir, _ := os.MkdirTemp("", "lidscope-example-")
	defer os.RemoveAll(dir)
	files, err := output.Write(filepath.Join(dir, "results"), acc, output.Meta{
		Dataset: "example (synthetic)", Version: "dev", Command: "lidscope example",
		Regimes:      regimes.Definition{Band: regimes.Band{South: -30, North: 30}, Delta: c.Delta},
		StepsPerYear: 12, TimeUnits: "days since 2001-01-01", Calendar: "standard",
		TimeValues: []float64{15, 45, 74}, Grid: g,
	}, output.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, f := range files {
		fmt.Println(filepath.Base(f))
	}
	var sum struct {
		Means map[string]map[string]struct {
			Mean struct {
				Value float64
				Units string
			}
		} `json:"band_mean"`
	}
	b, _ := os.ReadFile(files[4])
	json.Unmarshal(b, &sum)
	m := sum.Means["eis"]["convective"].Mean
	fmt.Printf("convective EIS %.1f %s\n", m.Value, m.Units)
	// Output:
	// maps.nc
	// series.nc
	// series.csv
	// regions.csv
	// summary.json
	// provenance.json
	// convective EIS 2.5 K
}
