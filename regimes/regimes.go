// Package regimes splits ocean columns into convective and subsidence
// regimes by a threshold on relative SST, and tracks, column by column, how
// often they cross between the two.
//
// Relative SST is SST minus the tropical-mean SST of the same time step:
// SST* = SST − ⟨SST⟩, where ⟨·⟩ is the cell-area-weighted mean over ocean
// cells inside a latitude band (default 30°S–30°N). A column is convective
// when SST* > δ + h, subsidence when SST* < δ − h, and in transition between
// (h = 0 by default: no transition band). Using relative rather than absolute
// SST follows the observation that the SST threshold for deep convection
// rises with the tropical mean (Johnson & Xie 2010, Nature Geoscience 3,
// 842–845); δ itself is a choice that every output records.
//
// All temperatures are in K (relative SST and δ are temperature differences).
package regimes

import (
	"fmt"
	"math"
)

// Regime of one column at one time step.
type Regime int8

// Regimes. Missing marks land, sea ice, missing data or cells outside the
// analysis.
const (
	Missing    Regime = -1
	Subsidence Regime = 0
	Transition Regime = 1
	Convective Regime = 2
)

// String names the regime.
func (r Regime) String() string {
	switch r {
	case Subsidence:
		return "subsidence"
	case Transition:
		return "transition"
	case Convective:
		return "convective"
	}
	return "missing"
}

// All lists the three regimes of valid columns, in output order.
var All = []Regime{Convective, Transition, Subsidence}

// Classifier is the regime definition: threshold δ (K) on relative SST and
// the half-width h (K, ≥ 0) of an optional transition band.
type Classifier struct {
	Delta     float64
	HalfWidth float64
}

// Validate checks the definition.
func (c Classifier) Validate() error {
	if math.IsNaN(c.Delta) || math.IsInf(c.Delta, 0) {
		return fmt.Errorf("regime threshold δ = %v K must be finite", c.Delta)
	}
	if !(c.HalfWidth >= 0) || math.IsInf(c.HalfWidth, 0) {
		return fmt.Errorf("transition half-width %v K must be finite and ≥ 0", c.HalfWidth)
	}
	return nil
}

// Classify returns the regime for relative SST x (K); NaN gives Missing.
// Boundaries: x > δ+h is convective, x < δ−h subsidence; with h = 0 the value
// x = δ exactly is subsidence (convection needs SST* strictly above δ).
func (c Classifier) Classify(x float64) Regime {
	switch {
	case x != x:
		return Missing
	case x > c.Delta+c.HalfWidth:
		return Convective
	case c.HalfWidth == 0 || x < c.Delta-c.HalfWidth:
		return Subsidence
	}
	return Transition
}

// String describes the definition for titles and metadata.
func (c Classifier) String() string {
	if c.HalfWidth == 0 {
		return fmt.Sprintf("convective where SST − tropical-mean SST > %g K, subsidence otherwise", c.Delta)
	}
	return fmt.Sprintf("convective where SST − tropical-mean SST > %g K, subsidence where < %g K, transition between", c.Delta+c.HalfWidth, c.Delta-c.HalfWidth)
}

// Band is a latitude band, degrees north, South < North.
type Band struct{ South, North float64 }

// Validate checks the band.
func (b Band) Validate() error {
	if !(b.South >= -90 && b.North <= 90 && b.South < b.North) {
		return fmt.Errorf("latitude band %g…%g must lie within −90…90 with south < north", b.South, b.North)
	}
	return nil
}

// Weights returns, for each cell of a [lat][lon] grid, the part of its area
// (m² or any unit) inside the band: the cell area times the fraction of its
// sin-latitude extent inside the band (exact for cells bounded by parallels).
// latBounds are per latitude row; area per cell, row-major.
func (b Band) Weights(latBounds [][2]float64, area []float64) []float64 {
	nlat := len(latBounds)
	nlon := len(area) / nlat
	w := make([]float64, len(area))
	s1, s2 := math.Sin(b.South*math.Pi/180), math.Sin(b.North*math.Pi/180)
	for j, lb := range latBounds {
		lo, hi := math.Min(lb[0], lb[1]), math.Max(lb[0], lb[1])
		a, c := math.Sin(lo*math.Pi/180), math.Sin(hi*math.Pi/180)
		ov := math.Min(c, s2) - math.Max(a, s1)
		if ov <= 0 || c <= a {
			continue
		}
		f := ov / (c - a)
		for i := 0; i < nlon; i++ {
			w[j*nlon+i] = area[j*nlon+i] * f
		}
	}
	return w
}

// TropicalMean returns the weighted mean of sst (K) over cells with weight
// > 0 and a valid (non-NaN) value, and the weight that contributed. ocean[i]
// false excludes cell i. ok is false when no cell contributed.
func TropicalMean(sst []float32, bandWeight []float64, ocean []bool) (mean, weight float64, ok bool) {
	var sw, swx float64
	for i, x := range sst {
		w := bandWeight[i]
		if w <= 0 || x != x || (ocean != nil && !ocean[i]) {
			continue
		}
		sw += w
		swx += w * float64(x)
	}
	if sw == 0 {
		return math.NaN(), 0, false
	}
	return swx / sw, sw, true
}

// Relative writes SST − mean into rel (NaN where SST is missing or the cell
// is not ocean).
func Relative(sst []float32, mean float64, ocean []bool, rel []float32) {
	for i, x := range sst {
		if x != x || (ocean != nil && !ocean[i]) {
			rel[i] = float32(math.NaN())
			continue
		}
		rel[i] = float32(float64(x) - mean)
	}
}

// ClassifySlab writes the regime of every cell.
func (c Classifier) ClassifySlab(rel []float32, out []Regime) {
	for i, x := range rel {
		out[i] = c.Classify(float64(x))
	}
}
