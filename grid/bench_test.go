package grid_test

import (
	"testing"

	"lidscope/grid"
)

// BenchmarkPermApply: canonicalising one 0.25° float32 slab stored 0…360
// north→south (1440×720).
func BenchmarkPermApply(b *testing.B) {
	g := must(b)(grid.New(steps(89.875, -0.25, 720), steps(0.125, 0.25, 1440), nil, nil))
	_, p, err := grid.Canonical(g)
	if err != nil {
		b.Fatal(err)
	}
	src := make([]float32, g.Size())
	dst := make([]float32, g.Size())
	b.SetBytes(int64(4 * len(src)))
	b.ReportAllocs()
	for b.Loop() {
		if err := p.Apply(dst, src); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkNewDetect: New on a 0.25° grid from centres only (bounds
// derived, kind detected).
func BenchmarkNewDetect(b *testing.B) {
	lat, lon := steps(-89.875, 0.25, 720), steps(0.125, 0.25, 1440)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := grid.New(lat, lon, nil, nil); err != nil {
			b.Fatal(err)
		}
	}
}
