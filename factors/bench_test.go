package factors

import (
	"math"
	"math/rand/v2"
	"testing"
)

// T_adv on a global 1° grid (180 × 360), one time step.
func BenchmarkAdvection(b *testing.B) {
	lat := make([]float64, 180)
	lon := make([]float64, 360)
	for j := range lat {
		lat[j] = -89.5 + float64(j)
	}
	for i := range lon {
		lon[i] = 0.5 + float64(i)
	}
	sst := make([]float64, 0, 180*360)
	for _, la := range lat {
		for _, lo := range lon {
			sst = append(sst, 273+30*math.Cos(la*math.Pi/180)+math.Sin(lo*math.Pi/90))
		}
	}
	u, v := windsOf(lat, lon)
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := Advection(sst, u, v, lat, lon, true); err != nil {
			b.Fatal(err)
		}
	}
}

// Blocked cross-validation of one cell or region: seven factors, 30
// yearly folds, the 26 default penalties.
func BenchmarkCrossValidate(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	fs := foldsOf(planted(rng, 30, 12, 1, []float64{0.5, -0.2, 0.1, 0.3, -0.4, 0.05, 0.2}, 0.5, 0.5, true), 30)
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := CrossValidate(fs, nil); err != nil {
			b.Fatal(err)
		}
	}
}
