package relations

import (
	"math"
	"testing"

	"lidscope/stats"
)

// TestCoMomentsMergeIsMomentsMerge checks that the scalar merge is the
// K = 1 case of the matrix one, bit for bit: both go through
// stats.ChanMerge (Chan, Golub & LeVeque 1979), so merging the same
// pieces in the same order gives the same float64 mean and co-moment.
func TestCoMomentsMergeIsMomentsMerge(t *testing.T) {
	// Pieces (N, W, mean, M2) of uneven weight, one empty, means far from
	// zero (as SST in K) so that the δ² term matters.
	pieces := []stats.Moments{
		{N: 3, W: 3.8, Mean: 300.93421052631579, M2: 3.1234567},
		{N: 1, W: 4, Mean: 288.4},
		{},
		{N: 4, W: 10.01, Mean: 297.6132867132867, M2: 211.98765},
		{N: 2, W: 1e-3, Mean: 310.25, M2: 1e-4},
	}
	var m stats.Moments
	c := NewCoMoments(1)
	for i, p := range pieces {
		pc := NewCoMoments(1)
		pc.N, pc.W, pc.Mean[0], pc.C[0] = p.N, p.W, p.Mean, p.M2
		m.Merge(p)
		c.Merge(pc)
		if m.N != c.N || math.Float64bits(m.W) != math.Float64bits(c.W) ||
			math.Float64bits(m.Mean) != math.Float64bits(c.Mean[0]) ||
			math.Float64bits(m.M2) != math.Float64bits(c.C[0]) {
			t.Fatalf("after piece %d: Moments {N %d W %v mean %v M2 %v}, CoMoments(1) {N %d W %v mean %v C %v}",
				i, m.N, m.W, m.Mean, m.M2, c.N, c.W, c.Mean[0], c.C[0])
		}
	}
	if m.N != 10 {
		t.Fatalf("merged %d values, want 10", m.N)
	}
}
