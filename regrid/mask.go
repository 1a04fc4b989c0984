package regrid

import (
	"fmt"
	"math"
)

// DefaultMaskThreshold is the customary fraction at or above which a remapped
// mask cell counts as inside the mask (common practice).
const DefaultMaskThreshold = 0.5

// maskSlack absorbs rounding when a mask fraction equals the threshold.
const maskSlack = 1e-12

// MaskFraction remaps a mask on the source grid (true = inside, [lat][lon]
// storage order) to the fraction of each target cell that is inside it,
// written into dst. With Conservative weights this is the area fraction of
// the part of the target cell covered by the source grid; with Bilinear
// weights it is the interpolated indicator. Targets whose coverage is below
// the weights' minimum coverage (see Options) are NaN. It does not
// allocate.
func MaskFraction(w *Weights, dst []float64, mask []bool) error {
	if len(mask) != w.src.Size() {
		return sizeErr("source mask", len(mask), w.src)
	}
	if len(dst) != w.dst.Size() {
		return sizeErr("mask fraction destination", len(dst), w.dst)
	}
	for t := range dst {
		dst[t] = maskFrac(w, t, mask)
	}
	return nil
}

func maskFrac(w *Weights, t int, mask []bool) float64 {
	var in, all float64
	for k := w.rowPtr[t]; k < w.rowPtr[t+1]; k++ {
		all += w.val[k]
		if mask[w.col[k]] {
			in += w.val[k]
		}
	}
	if all <= 0 || all < w.minCov-coverageSlack {
		return math.NaN()
	}
	return in / all
}

// RemapMask remaps a mask on the source grid to the target grid: a target
// cell is inside (true) when its mask fraction (see MaskFraction) is at
// least threshold (less 1e-12, so that exact ties made inexact by rounding
// count as inside), which must be in (0, 1]; DefaultMaskThreshold is the
// usual choice. Targets without a fraction (NaN) are outside. It does not
// allocate.
func RemapMask(w *Weights, dst []bool, mask []bool, threshold float64) error {
	if !(threshold > 0 && threshold <= 1) {
		return fmt.Errorf("regrid: mask threshold %g is outside (0, 1]; use regrid.DefaultMaskThreshold (0.5) for a majority rule", threshold)
	}
	if len(mask) != w.src.Size() {
		return sizeErr("source mask", len(mask), w.src)
	}
	if len(dst) != w.dst.Size() {
		return sizeErr("mask destination", len(dst), w.dst)
	}
	for t := range dst {
		dst[t] = maskFrac(w, t, mask) >= threshold-maskSlack // NaN compares false
	}
	return nil
}

// MaskOut sets data to NaN wherever keep is false. data and keep are on the
// same grid in the same layout.
func MaskOut(data []float32, keep []bool) error {
	if len(data) != len(keep) {
		return fmt.Errorf("regrid: data has %d values but the mask has %d: %w", len(data), len(keep), ErrSize)
	}
	nan := float32(math.NaN())
	for k, ok := range keep {
		if !ok {
			data[k] = nan
		}
	}
	return nil
}
