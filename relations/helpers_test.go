package relations

import (
	"math"
	"math/rand/v2"

	"lidscope/accumulate"
	"lidscope/regimes"
)

// rowLayout is a one-row grid of n equal cells on the equator, all in the
// band (band weight = area), with the given quantities.
func rowLayout(n int, quantities ...string) accumulate.Layout {
	l := accumulate.Layout{NLat: 1, NLon: n, Lat: []float64{0}, Quantities: quantities}
	for i := 0; i < n; i++ {
		l.Lon = append(l.Lon, -170+float64(i)*340/float64(max(1, n-1)))
		l.Area = append(l.Area, 1e10)
		l.BandWeight = append(l.BandWeight, 1e10)
	}
	return l
}

// newStep returns an empty step of n cells and nq quantities (all NaN,
// regime Missing).
func newStep(n, nq, t int) *accumulate.Step {
	s := &accumulate.Step{Label: "step", Year: 2001 + t/12, Month: t%12 + 1, TropMean: 300,
		Rel: make([]float32, n), Regime: make([]regimes.Regime, n), Values: make([][]float32, nq)}
	for q := range s.Values {
		s.Values[q] = make([]float32, n)
		for i := range s.Values[q] {
			s.Values[q][i] = float32(math.NaN())
		}
	}
	for i := range s.Rel {
		s.Rel[i] = float32(math.NaN())
		s.Regime[i] = regimes.Missing
	}
	return s
}

// ar1 advances a stationary AR(1) value with unit variance and lag-1
// correlation phi.
func ar1(rng *rand.Rand, prev, phi float64) float64 {
	return phi*prev + math.Sqrt(1-phi*phi)*rng.NormFloat64()
}

// synthWorld generates a record of a one-row world where every cell is
// in the subsidence regime (relative SST −1 K), EIS x is AR(1) in time
// (phiX) and independent between cells, and cloud y = a + b x + σ e with
// e AR(1) (phiE): the synthetic truth of the regression tests (invented
// data).
type synthWorld struct {
	cells, steps     int
	a, b, sigma      float64
	phiX, phiE, sdX  float64
	meanX            float64
	quantities       []string // eis, lts, sst, cloud
	regime           regimes.Regime
	perCellIntercept []float64 // optional per-cell offset of cloud (climatology)
}

func (w synthWorld) layout() accumulate.Layout {
	return rowLayout(w.cells, "sst", "lts", "eis", "cloud")
}

// generate calls f for every step of one realisation.
func (w synthWorld) generate(rng *rand.Rand, f func(*accumulate.Step)) {
	x := make([]float64, w.cells)
	e := make([]float64, w.cells)
	for i := range x {
		x[i] = rng.NormFloat64()
		e[i] = rng.NormFloat64()
	}
	for t := 0; t < w.steps; t++ {
		s := newStep(w.cells, 4, t)
		for i := 0; i < w.cells; i++ {
			x[i] = ar1(rng, x[i], w.phiX)
			e[i] = ar1(rng, e[i], w.phiE)
			eis := w.meanX + w.sdX*x[i]
			y := w.a + w.b*eis + w.sigma*e[i]
			if w.perCellIntercept != nil {
				y += w.perCellIntercept[i]
			}
			s.Rel[i] = -1
			s.Regime[i] = w.regime
			s.Values[0][i] = float32(300 + 0.3*rng.NormFloat64()) // sst
			s.Values[1][i] = float32(eis + 10 + 0.5*rng.NormFloat64())
			s.Values[2][i] = float32(eis)
			s.Values[3][i] = float32(y)
		}
		f(s)
	}
}
