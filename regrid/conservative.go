package regrid

import (
	"math"

	"lidscope/grid"
)

// overlap1 is one entry of a one-dimensional overlap list: source index and
// the overlap as a fraction of the target cell's extent.
type overlap1 struct {
	src  int32
	frac float64
}

const deg = math.Pi / 180

// latOverlaps returns, for every target latitude band, the source bands that
// overlap it and the overlap in sin(latitude) as a fraction of the target
// band's extent in sin(latitude).
func latOverlaps(src, dst *grid.Grid) [][]overlap1 {
	slo, shi := sinBounds(src)
	tlo, thi := sinBounds(dst)
	out := make([][]overlap1, len(tlo))
	for t := range tlo {
		width := thi[t] - tlo[t]
		for s := range slo {
			ov := math.Min(thi[t], shi[s]) - math.Max(tlo[t], slo[s])
			if f := ov / width; f > dropBelow {
				out[t] = append(out[t], overlap1{int32(s), f})
			}
		}
	}
	return out
}

func sinBounds(g *grid.Grid) (lo, hi []float64) {
	lo = make([]float64, g.NLat())
	hi = make([]float64, g.NLat())
	for j, b := range g.LatBounds {
		lo[j], hi[j] = math.Sin(b[0]*deg), math.Sin(b[1]*deg)
	}
	return lo, hi
}

// lonOverlaps returns, for every target longitude cell, the source cells that
// overlap it on the circle and the overlap as a fraction of the target
// cell's width. A duplicated source wrap column is skipped.
func lonOverlaps(src, dst *grid.Grid) [][]overlap1 {
	ns := src.NLon()
	if src.WrapColumn {
		ns--
	}
	out := make([][]overlap1, dst.NLon())
	for t, tb := range dst.LonBounds {
		width := tb[1] - tb[0]
		for s := 0; s < ns; s++ {
			ov := circularOverlap(tb, src.LonBounds[s])
			if f := ov / width; f > dropBelow {
				out[t] = append(out[t], overlap1{int32(s), f})
			}
		}
	}
	return out
}

// circularOverlap returns the length in degrees of the intersection of the
// longitude intervals a and b taken modulo 360°. Each interval is (low,
// high) and at most 360° wide.
func circularOverlap(a, b [2]float64) float64 {
	// Shift b so that its low edge lies in [a0, a0+360); then only b and
	// b−360 can meet a.
	d := math.Mod(b[0]-a[0], 360)
	if d < 0 {
		d += 360
	}
	b0 := a[0] + d
	b1 := b0 + (b[1] - b[0])
	ov := math.Max(0, math.Min(a[1], b1)-math.Max(a[0], b0))
	ov += math.Max(0, math.Min(a[1], b1-360)-math.Max(a[0], b0-360))
	return ov
}

// buildConservative forms the weights as products of the latitude and
// longitude overlap fractions: for target cell (jt, it) and source cell
// (js, is) the weight is overlap area / target area
// = [Δsinφ overlap / Δsinφ target]·[Δλ overlap / Δλ target].
func (w *Weights) buildConservative() error {
	lat := latOverlaps(w.src, w.dst)
	lon := lonOverlaps(w.src, w.dst)
	snlon := int32(w.src.NLon())
	n := 0
	for _, la := range lat {
		for _, lo := range lon {
			n += len(la) * len(lo)
		}
	}
	w.rowPtr = make([]int32, 0, w.dst.Size()+1)
	w.col = make([]int32, 0, n)
	w.val = make([]float64, 0, n)
	w.rowPtr = append(w.rowPtr, 0)
	for _, la := range lat {
		for _, lo := range lon {
			for _, a := range la {
				base := a.src * snlon
				for _, b := range lo {
					w.col = append(w.col, base+b.src)
					w.val = append(w.val, a.frac*b.frac)
				}
			}
			w.rowPtr = append(w.rowPtr, int32(len(w.col)))
		}
	}
	return nil
}
