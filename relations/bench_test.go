package relations

import (
	"math"
	"math/rand/v2"
	"testing"

	"lidscope/accumulate"
	"lidscope/regimes"
)

// oneDegree is a 1° global grid (180×360) with the band 30°S–30°N and six
// quantities, and a few random steps on it (invented data).
func oneDegree(nsteps int) (accumulate.Layout, []*accumulate.Step) {
	l := accumulate.Layout{NLat: 180, NLon: 360, Quantities: []string{"sst", "lts", "eis", "cloud", "toa_sw_up", "omega"}}
	for j := 0; j < 180; j++ {
		l.Lat = append(l.Lat, -89.5+float64(j))
	}
	for i := 0; i < 360; i++ {
		l.Lon = append(l.Lon, -179.5+float64(i))
	}
	for j := 0; j < 180; j++ {
		a := 111.195e3 * 111.195e3 * math.Cos(l.Lat[j]*math.Pi/180)
		for i := 0; i < 360; i++ {
			l.Area = append(l.Area, a)
			w := 0.0
			if math.Abs(l.Lat[j]) < 30 {
				w = a
			}
			l.BandWeight = append(l.BandWeight, w)
		}
	}
	rng := rand.New(rand.NewPCG(1, 1))
	cl := regimes.Classifier{Delta: 0.5}
	n := 180 * 360
	var steps []*accumulate.Step
	for k := 0; k < nsteps; k++ {
		s := newStep(n, 6, k)
		for i := 0; i < n; i++ {
			if i%4 == 0 {
				continue // land
			}
			rel := rng.NormFloat64() * 1.5
			s.Rel[i] = float32(rel)
			s.Regime[i] = cl.Classify(rel)
			eis := 3 - rel + rng.NormFloat64()
			s.Values[0][i] = float32(300 + rel)
			s.Values[1][i] = float32(eis + 11)
			s.Values[2][i] = float32(eis)
			s.Values[3][i] = float32(0.3 + 0.04*eis)
			s.Values[4][i] = float32(100 + 100*float64(s.Values[3][i]))
			s.Values[5][i] = float32(-0.02*rel + 0.02*rng.NormFloat64())
		}
		steps = append(steps, s)
	}
	return l, steps
}

func benchSteps(b *testing.B, cfg Config) {
	l, steps := oneDegree(4)
	acc, err := New(cfg, l, nil)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for k := 0; k < b.N; k++ {
		s := steps[k%len(steps)]
		s.Month = k%12 + 1
		acc.AddStep(s)
	}
	b.ReportMetric(float64(64800*b.N)/b.Elapsed().Seconds(), "cells/s")
}

// Per-step cost with the defaults (band only, cloud and toa_sw_up against
// EIS, LTS and relative SST, joint composite).
func BenchmarkAddStep1DegDefault(b *testing.B) {
	cfg := Defaults()
	cfg.Classifier = regimes.Classifier{Delta: 0.5}
	benchSteps(b, cfg)
}

// Per-step cost with everything on: seasons, two regions, one patch × 8
// ΔT, omega composites and the omega threshold indicator.
func BenchmarkAddStep1DegFull(b *testing.B) {
	cfg := Defaults()
	cfg.Classifier = regimes.Classifier{Delta: 0.5}
	cfg.Seasons = true
	cfg.Regions = []accumulate.Region{{Name: "east_pacific", South: -30, North: 0, West: -150, East: -70}, {Name: "atlantic", South: -30, North: 30, West: -60, East: 20}}
	cfg.Patches = []Patch{{Name: "patch", South: -10, North: 10, West: 140, East: 170}}
	cfg.OmegaBins = true
	cfg.Indicator = IndicatorOmega
	benchSteps(b, cfg)
}

// Results for a 10-year monthly record on the 1° grid with the regression
// bootstrap (200 replicates) and the threshold bootstrap (1000).
func BenchmarkResults1Deg120Steps(b *testing.B) {
	l, steps := oneDegree(4)
	cfg := Defaults()
	cfg.Classifier = regimes.Classifier{Delta: 0.5}
	cfg.Seasons = true
	cfg.Indicator = IndicatorOmega
	cfg.Bootstrap.N = 200
	acc, _ := New(cfg, l, nil)
	for k := 0; k < 120; k++ {
		s := steps[k%4]
		s.Year, s.Month = 2001+k/12, k%12+1
		acc.AddStep(s)
	}
	if res, err := acc.Results(); err != nil || res.Threshold.Note != "" || res.Threshold.Failed > 0 {
		b.Fatalf("threshold not estimated: %v %+v", err, res.Threshold)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for k := 0; k < b.N; k++ {
		if _, err := acc.Results(); err != nil {
			b.Fatal(err)
		}
	}
}
