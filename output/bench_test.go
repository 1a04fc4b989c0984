package output

import (
	"math"
	"path/filepath"
	"strconv"
	"testing"

	"lidscope/accumulate"
	"lidscope/grid"
	"lidscope/regimes"
)

// benchFixture is an invented record on a 1° grid over 30°S–30°N (60 × 360
// columns), 120 monthly steps and three quantities.
func benchFixture(b *testing.B) *fixture {
	b.Helper()
	g, err := grid.GlobalRegular(1, 1, 0.5)
	if err != nil {
		b.Fatal(err)
	}
	g, err = grid.New(g.Lat[60:120], g.Lon, g.LatBounds[60:120], g.LonBounds)
	if err != nil {
		b.Fatal(err)
	}
	area := g.CellAreas()
	n := len(area)
	acc, err := accumulate.New(accumulate.Layout{
		NLat: len(g.Lat), NLon: len(g.Lon), Lat: g.Lat, Lon: g.Lon, Area: area,
		BandWeight: regimes.Band{South: -30, North: 30}.Weights(g.LatBounds, area),
		Quantities: []string{"eis", "lts", "low_cloud"},
		Regions:    []accumulate.Region{{Name: "box", South: -20, North: 0, West: -110, East: -70}},
	})
	if err != nil {
		b.Fatal(err)
	}
	c := regimes.Classifier{Delta: 0.5, HalfWidth: 0.2}
	s := &accumulate.Step{Rel: make([]float32, n), Regime: make([]regimes.Regime, n),
		Values: [][]float32{make([]float32, n), make([]float32, n), make([]float32, n)}}
	var times []float64
	for t := 0; t < 120; t++ {
		s.Label, s.Year, s.Month, s.TropMean = strconv.Itoa(t), 2001+t/12, t%12+1, 300
		for i := 0; i < n; i++ {
			x := math.Sin(float64(i)*0.01 + float64(t)*0.3)
			s.Rel[i] = float32(x)
			s.Values[0][i] = float32(5 - 3*x)
			s.Values[1][i] = float32(18 - 3*x)
			s.Values[2][i] = float32(0.3 - 0.1*x)
		}
		c.ClassifySlab(s.Rel, s.Regime)
		acc.AddCells(s, 0, n)
		acc.AddStep(s)
		times = append(times, 15+30*float64(t))
	}
	return &fixture{acc: acc, meta: Meta{Dataset: "bench", StepsPerYear: 12, Regimes: regimes.Definition{Band: regimes.Band{South: -30, North: 30}, Delta: c.Delta, HalfWidth: c.HalfWidth},
		TimeUnits: "days since 2001-01-01", Calendar: "360_day", TimeValues: times, Grid: g}}
}

// BenchmarkWrite measures writing all six files of a 1° tropical run.
func BenchmarkWrite(b *testing.B) {
	f := benchFixture(b)
	root := b.TempDir()
	b.ReportAllocs()
	for i := 0; b.Loop(); i++ {
		if _, err := Write(filepath.Join(root, strconv.Itoa(i)), f.acc, f.meta, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
