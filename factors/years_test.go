package factors

import (
	"math/rand/v2"
	"testing"
	"unsafe"
)

// Yearly co-moments from two pieces of a record (the pieces share a year)
// merged equal one pass over the record, fold by fold, and the folds come
// out in year order with their labels.
func TestYearsMerge(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	one, a, b := NewYears(3), NewYears(3), NewYears(3)
	for i := 0; i < 300; i++ {
		yr := 1990 + i/50 // six years, the fourth split between the pieces
		x := []float64{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}
		w := 0.5 + rng.Float64()
		one.Add(yr, x, w)
		if i < 170 {
			a.Add(yr, x, w)
		} else {
			b.Add(yr, x, w)
		}
	}
	if err := a.Merge(b); err != nil {
		t.Fatal(err)
	}
	fa, fo := a.Folds(), one.Folds()
	if len(fa.Pieces) != 6 || fa.Labels[0] != "1990" || fa.Labels[5] != "1995" {
		t.Fatalf("folds %v", fa.Labels)
	}
	for i := range fo.Pieces {
		if fa.Pieces[i].N != fo.Pieces[i].N || !near(fa.Pieces[i].W, fo.Pieces[i].W, 1e-13) {
			t.Errorf("year %s: N %d vs %d", fo.Labels[i], fa.Pieces[i].N, fo.Pieces[i].N)
		}
		for k := range fo.Pieces[i].C {
			if !near(fa.Pieces[i].C[k], fo.Pieces[i].C[k], 1e-12) {
				t.Errorf("year %s co-moment %d: %g vs %g", fo.Labels[i], k, fa.Pieces[i].C[k], fo.Pieces[i].C[k])
			}
		}
	}
	if err := a.Merge(NewYears(4)); err == nil {
		t.Error("merged yearly moments of different sizes")
	}
	// the size the doc states: count, weight, K means, K×K co-moments
	c := fo.Pieces[0]
	got := int(unsafe.Sizeof(c.N)+unsafe.Sizeof(c.W)) + 8*(len(c.Mean)+len(c.C))
	if got != BytesPerYear(2) {
		t.Errorf("BytesPerYear(2) = %d, the moments hold %d", BytesPerYear(2), got)
	}
}
