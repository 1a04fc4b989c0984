package figures

import (
	"math"
	"reflect"
	"testing"
)

// Tick labels at multiples of a round step (1, 2, 2.5 or 5 × 10^k; common
// practice in plotting, e.g. Heckbert 1990, "Nice numbers for graph
// labels", Graphics Gems, from memory).
func TestRoundTicks(t *testing.T) {
	cases := []struct {
		lo, hi float64
		want   []string
	}{
		// The tropical-mean SST of the demo: gonum's fallback labelled
		// 298.07, 298.18, 298.27.
		{298.06, 298.28, []string{"298.10", "298.15", "298.20", "298.25"}},
		{0, 100, []string{"0", "50", "100"}},
		{-4, 4, []string{"-4", "0", "4"}},
		{297.6, 298.2, []string{"297.6", "297.8", "298.0", "298.2"}},
	}
	for _, c := range cases {
		var got []string
		for _, tk := range (roundTicks{}).Ticks(c.lo, c.hi) {
			if tk.Label != "" {
				got = append(got, tk.Label)
			}
			if tk.Value < c.lo-1e-9 || tk.Value > c.hi+1e-9 {
				t.Errorf("%g…%g: tick %g outside the range", c.lo, c.hi, tk.Value)
			}
		}
		if !reflect.DeepEqual(got, c.want) {
			t.Errorf("%g…%g: labels %q, want %q", c.lo, c.hi, got, c.want)
		}
	}
}

// The relative-SST map takes its colour limits from the regime band only.
func TestLimitValuesInBand(t *testing.T) {
	fl := &Field{Lat: []float64{-60, -10, 10, 60}, Lon: []float64{0, 180}}
	shown := []float64{-30, -31, 1, -2, 3, 0.5, -28, -29}
	got := limitValues(fl, shown, true, -30, 30)
	if want := []float64{1, -2, 3, 0.5}; !reflect.DeepEqual(got, want) {
		t.Errorf("in band: %v, want %v", got, want)
	}
	if lo, hi := divergingLimits(got); lo != -5 || hi != 5 {
		t.Errorf("diverging limits of the band values: %g…%g, want −5…5", lo, hi)
	}
	if got := limitValues(fl, shown, false, -30, 30); len(got) != len(shown) {
		t.Errorf("without inBand: %d values, want all %d", len(got), len(shown))
	}
	if got := limitValues(fl, shown, true, math.NaN(), math.NaN()); len(got) != len(shown) {
		t.Errorf("unknown band: %d values, want all %d", len(got), len(shown))
	}
}
