package relations

import (
	"math"
	"testing"
)

// The bin-edge rule (acc.go): values as the run holds them (float32,
// widened exactly) against float64 edges, lower edge inclusive, the last
// bin also its upper edge. Values exactly on edges, and the float32
// neighbours of edges that float32 cannot represent (worked by hand:
// float32(0.1) = 0.100000001490116…, float32(0.7) = 0.699999988079071…).
func TestBinEdgesExactly(t *testing.T) {
	e := edges(0, 1, 0.1) // 0, 0.1, …, 1 as k·0.1
	f32 := func(x float64) float64 { return float64(float32(x)) }
	cases := []struct {
		x    float64
		want int
	}{
		{0, 0}, {e[1], 1}, {e[7], 7}, {1, 9}, // on the edges
		{math.Nextafter(e[1], -1), 0}, {math.Nextafter(1, 2), -1}, {math.Nextafter(0, -1), -1},
		{f32(0.1), 1}, // 0.100000001 ≥ 0.1
		{f32(0.7), 6}, // 0.699999988 < 0.7 (e[7] = 7·0.1 = 0.7000000000000001)
		{f32(0.3), 3}, // 0.300000012 ≥ 3·0.1 = 0.30000000000000004
	}
	for _, c := range cases {
		if got := binOf(e, c.x); got != c.want {
			t.Errorf("binOf(%.17g) = %d, want %d", c.x, got, c.want)
		}
		if got := uniformBin(c.x, 0, 0.1, 10); got != c.want {
			t.Errorf("uniformBin(%.17g) = %d, want %d", c.x, got, c.want)
		}
	}
}

// TestUniformBinEveryEdge: for the default threshold bins (−12…8 K by
// 0.05 K) and the omega bins (−100…100 hPa d-1 by 10), a value exactly on
// edge k is in bin k (the top edge in the last bin) and the float64 just
// below it in bin k−1 — where ⌊(x − lo)/w⌋ alone puts 53 of the 401
// threshold edges in the bin below. uniformBin must also agree with binOf
// over the same edges.
func TestUniformBinEveryEdge(t *testing.T) {
	for _, c := range []struct{ lo, w float64 }{{-12, 0.05}, {omegaLo, omegaStep}, {-3, 0.25}} {
		d := Defaults()
		hi := d.ThresholdRange[1]
		if c.lo != -12 {
			hi = -c.lo
		}
		n := int(math.Round((hi - c.lo) / c.w))
		e := edges(c.lo, hi, c.w)
		for k := 0; k <= n; k++ {
			x := c.lo + float64(k)*c.w
			want := min(k, n-1)
			if got := uniformBin(x, c.lo, c.w, n); got != want {
				t.Errorf("lo %g w %g: edge %d (%.17g) in bin %d, want %d", c.lo, c.w, k, x, got, want)
			}
			below := math.Nextafter(x, math.Inf(-1))
			if got, want := uniformBin(below, c.lo, c.w, n), k-1; got != want {
				t.Errorf("lo %g w %g: just below edge %d (%.17g) in bin %d, want %d", c.lo, c.w, k, below, got, want)
			}
			for _, v := range []float64{x, below, math.Nextafter(x, math.Inf(1))} {
				if a, b := uniformBin(v, c.lo, c.w, n), binOf(e, v); a != b {
					t.Errorf("lo %g w %g: %.17g: uniformBin %d, binOf %d", c.lo, c.w, v, a, b)
				}
			}
		}
	}
	if got := uniformBin(math.NaN(), 0, 1, 3); got != -1 {
		t.Errorf("NaN in bin %d", got)
	}
}
