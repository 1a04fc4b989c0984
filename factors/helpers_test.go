package factors

import (
	"math"
	"math/rand/v2"
	"testing"

	"lidscope/internal/testutil"
	"lidscope/relations"
)

func TestMain(m *testing.M) { testutil.Main(m) }

// sample is one synthetic sample: factors, response, weight and fold.
type sample struct {
	x    []float64
	y, w float64
	fold int
}

// planted draws n samples per fold of y = a + Σ beta_j x_j + σ ε from
// correlated factors (x_j = mean_j + sd_j (ρ z_0 + √(1−ρ²) z_j)), with
// positive weights when weighted, else weight 1 (synthetic truth).
func planted(rng *rand.Rand, folds, n int, a float64, beta []float64, sigma, rho float64, weighted bool) []sample {
	p := len(beta)
	var out []sample
	for f := 0; f < folds; f++ {
		for i := 0; i < n; i++ {
			z0 := rng.NormFloat64()
			s := sample{x: make([]float64, p), w: 1, fold: f}
			s.y = a
			for j := 0; j < p; j++ {
				s.x[j] = float64(3*j+1) + float64(j+1)*(rho*z0+math.Sqrt(1-rho*rho)*rng.NormFloat64())
				s.y += beta[j] * s.x[j]
			}
			s.y += sigma * rng.NormFloat64()
			if weighted {
				s.w = 0.2 + rng.Float64()
			}
			out = append(out, s)
		}
	}
	return out
}

// foldsOf accumulates the samples into one CoMoments per fold (factors
// first, response last).
func foldsOf(ss []sample, nfold int) Folds {
	p := len(ss[0].x)
	fs := Folds{Pieces: make([]relations.CoMoments, nfold)}
	for i := range fs.Pieces {
		fs.Pieces[i] = relations.NewCoMoments(p + 1)
	}
	row := make([]float64, p+1)
	for _, s := range ss {
		copy(row, s.x)
		row[p] = s.y
		fs.Pieces[s.fold].Add(row, s.w)
	}
	return fs
}

// near reports |got − want| ≤ tol·max(1, |want|).
func near(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol*math.Max(1, math.Abs(want))
}
