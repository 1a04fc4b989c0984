package regrid_test

import (
	"math"
	"testing"

	"lidscope/grid"
	"lidscope/regrid"
)

// quarterToOne returns the global 0.25° and 1° grids of the benchmark (cell
// edges on multiples of the spacing).
func quarterToOne(b *testing.B) (src, dst *grid.Grid) {
	m := must(b)
	return m(grid.GlobalRegular(0.25, 0.25, 0.125)), m(grid.GlobalRegular(1, 1, 0.5))
}

var methods = []regrid.Method{regrid.Conservative, regrid.Bilinear}

// BenchmarkNewWeights: weight computation for 0.25° (1440×720) → 1°
// (360×180) global grids.
func BenchmarkNewWeights(b *testing.B) {
	src, dst := quarterToOne(b)
	for _, m := range methods {
		b.Run(m.String(), func(b *testing.B) {
			b.ReportAllocs()
			var w *regrid.Weights
			for b.Loop() {
				var err error
				w, err = regrid.NewWeights(src, dst, regrid.Options{Method: m})
				if err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(w.NumLinks()), "links")
		})
	}
}

// BenchmarkApply: remapping one float32 slab 0.25° → 1° with 1% missing
// values, single goroutine.
func BenchmarkApply(b *testing.B) {
	src, dst := quarterToOne(b)
	in := make([]float32, src.Size())
	for k := range in {
		in[k] = float32(280 + 20*math.Sin(float64(k)*1e-3))
		if k%101 == 0 {
			in[k] = float32(math.NaN())
		}
	}
	out := make([]float32, dst.Size())
	for _, m := range methods {
		w, err := regrid.NewWeights(src, dst, regrid.Options{Method: m})
		if err != nil {
			b.Fatal(err)
		}
		b.Run(m.String(), func(b *testing.B) {
			b.ReportAllocs()
			b.SetBytes(int64(4 * len(in)))
			for b.Loop() {
				if err := w.Apply(out, in); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkApplyParallel: the same slab remapped from all available
// goroutines sharing one Weights.
func BenchmarkApplyParallel(b *testing.B) {
	src, dst := quarterToOne(b)
	in := make([]float32, src.Size())
	for k := range in {
		in[k] = float32(280 + 20*math.Sin(float64(k)*1e-3))
	}
	w, err := regrid.NewWeights(src, dst, regrid.Options{})
	if err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(4 * len(in)))
	b.RunParallel(func(pb *testing.PB) {
		out := make([]float32, dst.Size())
		for pb.Next() {
			if err := w.Apply(out, in); err != nil {
				b.Error(err)
			}
		}
	})
}
