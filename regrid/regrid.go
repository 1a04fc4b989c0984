// Package regrid remaps fields between rectilinear latitude–longitude grids
// (see package lidscope/grid): first-order conservative remapping with exact
// spherical overlaps, or bilinear interpolation.
//
// Weights are computed once per pair of grids with NewWeights and stored as a
// sparse matrix in compressed-row form. Applying them to a slab (one 2-D
// field laid out [lat][lon] in the grid's storage order) reads the source,
// writes a caller-owned destination, does not allocate and does not modify
// the Weights, so one Weights value may be used by many goroutines at once.
//
// Missing source values are NaN. They are dropped and each target value is
// renormalised by the weight of the valid sources that contribute to it; a
// target whose valid weight is below the minimum coverage is NaN.
//
// Both grids may use any longitude convention (0…360, −180…180, values past
// 360) and either latitude order, and may carry a duplicated wrap-around
// column (see grid.Grid.WrapColumn): as a source such a column is ignored, as
// a target it receives the same value as the column it duplicates.
//
// # Agreement with CDO
//
// The tests compare with CDO 2.1.1 (remapcon, remapbil, gencon) on the same
// inputs. Conservative results agree to about 1e-14 relative, weights link
// by link to 1e-12, cell areas to rounding; this includes missing cells,
// because CDO's remapcon also divides by the valid overlap area (its default
// "fracarea" normalisation) and its REMAP_AREA_MIN setting acts like
// MinCoverage. Bilinear results agree to about 1e-15 with two documented
// exceptions: target rows poleward of the outermost source latitude (CDO
// fills them by its own rule; ours is described at Bilinear), and targets
// lying exactly on a source meridian or parallel next to a missing source
// cell that has zero weight (CDO makes them missing; ours keeps the value
// interpolated along the line).
package regrid

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"lidscope/grid"
)

// Method selects the remapping scheme.
type Method int

const (
	// Conservative is first-order conservative remapping: each target value
	// is the area-weighted mean of the source cells it overlaps, divided by
	// the valid overlapping area (the first-order scheme of Jones 1999, Mon.
	// Wea. Rev. 127, 2204–2210, with its "fraction of area" normalisation;
	// from memory).
	//
	// For cells bounded by parallels and meridians the overlap of a target
	// and a source cell is itself such a cell, so its exact spherical area is
	// R²·(longitude overlap in radians, modulo 360°)·(overlap in sin
	// latitude): the weights are separable into a latitude factor and a
	// longitude factor (common practice). No polygon clipping is needed and
	// the overlaps are exact up to rounding.
	Conservative Method = iota
	// Bilinear interpolates linearly in longitude and latitude (degrees)
	// between the four source cell centres around each target centre.
	// Across the longitude seam of a periodic source it wraps. Target centres
	// between the outermost source latitude and a pole that the source grid
	// reaches (its outer bound is ±90° and it is periodic in longitude) take
	// the outermost source row, interpolated in longitude only. Other targets
	// outside the source centres get no weights and are NaN.
	Bilinear
)

// String returns "conservative" or "bilinear".
func (m Method) String() string {
	switch m {
	case Conservative:
		return "conservative"
	case Bilinear:
		return "bilinear"
	default:
		return fmt.Sprintf("Method(%d)", int(m))
	}
}

// ParseMethod returns the Method named by s: "conservative" or "bilinear"
// (case-insensitive).
func ParseMethod(s string) (Method, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "conservative":
		return Conservative, nil
	case "bilinear":
		return Bilinear, nil
	}
	return 0, fmt.Errorf("regrid: unknown method %q; use \"conservative\" or \"bilinear\"", s)
}

// Options configure NewWeights.
type Options struct {
	// Method is the remapping scheme (default Conservative).
	Method Method
	// MinCoverage is the smallest valid weight a target may have, in [0, 1]:
	// for Conservative the fraction of the target cell's area covered by
	// valid (non-NaN) source cells, for Bilinear the sum of the weights of the
	// valid corners. Targets below it are NaN; a target with no valid source
	// at all is always NaN. Zero selects the method's default: 0 (any valid
	// overlap) for Conservative, 1 (every corner that has weight is valid)
	// for Bilinear. Comparisons allow 1e-9 for rounding.
	MinCoverage float64
}

// coverageSlack absorbs rounding in sums of weights compared with MinCoverage.
const coverageSlack = 1e-9

// dropBelow is the relative size below which a one-dimensional overlap
// fraction is treated as rounding noise and dropped.
const dropBelow = 1e-12

// Weights is a sparse remapping matrix from one grid to another. It is
// immutable and safe for concurrent use.
type Weights struct {
	src, dst *grid.Grid
	method   Method
	minCov   float64
	rowPtr   []int32   // len dst.Size()+1
	col      []int32   // source cell index (storage order)
	val      []float64 // weight; a row sums to the covered fraction
}

// ErrSize is wrapped by Apply and similar functions when a slice has the
// wrong length.
var ErrSize = errors.New("slab size does not match grid")

// NewWeights computes the weights that remap fields on src to dst.
func NewWeights(src, dst *grid.Grid, opt Options) (*Weights, error) {
	if src == nil || dst == nil {
		return nil, errors.New("regrid: source or target grid is nil")
	}
	for _, g := range []*grid.Grid{src, dst} {
		if g.Size() == 0 || len(g.LatBounds) != g.NLat() || len(g.LonBounds) != g.NLon() {
			return nil, fmt.Errorf("regrid: grid with %d×%d centres and %d×%d bounds is incomplete; build grids with grid.New or a grid constructor", g.NLat(), g.NLon(), len(g.LatBounds), len(g.LonBounds))
		}
	}
	if opt.MinCoverage < 0 || opt.MinCoverage > 1 || math.IsNaN(opt.MinCoverage) {
		return nil, fmt.Errorf("regrid: MinCoverage %g is outside [0, 1]", opt.MinCoverage)
	}
	if int64(src.Size()) >= math.MaxInt32 || int64(dst.Size()) >= math.MaxInt32 {
		return nil, fmt.Errorf("regrid: grids %v → %v are too large (more than 2^31 cells)", src, dst)
	}
	w := &Weights{src: src, dst: dst, method: opt.Method, minCov: opt.MinCoverage}
	var err error
	switch opt.Method {
	case Conservative:
		err = w.buildConservative()
	case Bilinear:
		if w.minCov == 0 {
			w.minCov = 1
		}
		err = w.buildBilinear()
	default:
		return nil, fmt.Errorf("regrid: unknown method %d; use regrid.Conservative or regrid.Bilinear", opt.Method)
	}
	if err != nil {
		return nil, fmt.Errorf("regrid %s %v → %v: %w", opt.Method, src, dst, err)
	}
	if int64(len(w.col)) >= math.MaxInt32 {
		return nil, fmt.Errorf("regrid %s %v → %v: more than 2^31 weights", opt.Method, src, dst)
	}
	return w, nil
}

// Src returns the source grid.
func (w *Weights) Src() *grid.Grid { return w.src }

// Dst returns the target grid.
func (w *Weights) Dst() *grid.Grid { return w.dst }

// Method returns the remapping scheme.
func (w *Weights) Method() Method { return w.method }

// MinCoverage returns the minimum valid weight in effect (see Options).
func (w *Weights) MinCoverage() float64 { return w.minCov }

// NumLinks returns the number of stored (target, source, weight) entries.
func (w *Weights) NumLinks() int { return len(w.col) }

// WithMinCoverage returns a copy of w that uses another minimum coverage (in
// [0, 1]; 0 selects the method's default as in Options). The copy shares the
// weight arrays, so it is cheap.
func (w *Weights) WithMinCoverage(c float64) (*Weights, error) {
	if c < 0 || c > 1 || math.IsNaN(c) {
		return nil, fmt.Errorf("regrid: MinCoverage %g is outside [0, 1]", c)
	}
	cp := *w
	cp.minCov = c
	if c == 0 && w.method == Bilinear {
		cp.minCov = 1
	}
	return &cp, nil
}

// Row returns the source indices and weights of target cell t (storage
// order index j*NLon+i). The slices alias the Weights and must not be
// modified.
func (w *Weights) Row(t int) (src []int32, weight []float64) {
	a, b := w.rowPtr[t], w.rowPtr[t+1]
	return w.col[a:b:b], w.val[a:b:b]
}

// Coverage writes into dst, for every target cell, the sum of its weights
// with every source valid: the fraction of the cell covered by the source
// grid (Conservative) or 1 where interpolation is possible (Bilinear), 0
// where the target lies outside the source grid.
func (w *Weights) Coverage(dst []float64) error {
	if len(dst) != w.dst.Size() {
		return sizeErr("coverage destination", len(dst), w.dst)
	}
	for t := range dst {
		var s float64
		for k := w.rowPtr[t]; k < w.rowPtr[t+1]; k++ {
			s += w.val[k]
		}
		dst[t] = s
	}
	return nil
}

func sizeErr(what string, n int, g *grid.Grid) error {
	return fmt.Errorf("regrid: %s has %d values but grid %v has %d×%d = %d cells: %w", what, n, g, g.NLat(), g.NLon(), g.Size(), ErrSize)
}

// Apply remaps one slab src (on the source grid, [lat][lon] storage order,
// NaN = missing) into dst (on the target grid). dst must not overlap src.
// Sums are accumulated in float64. It does not allocate.
func (w *Weights) Apply(dst, src []float32) error {
	return apply(w, dst, src)
}

// Apply64 is Apply for float64 slabs.
func (w *Weights) Apply64(dst, src []float64) error {
	return apply(w, dst, src)
}

func apply[T float32 | float64](w *Weights, dst, src []T) error {
	if len(src) != w.src.Size() {
		return sizeErr("source slab", len(src), w.src)
	}
	if len(dst) != w.dst.Size() {
		return sizeErr("destination slab", len(dst), w.dst)
	}
	nan := T(math.NaN())
	minCov := w.minCov - coverageSlack
	rowPtr, col, val := w.rowPtr, w.col, w.val
	for t := range dst {
		var num, den float64
		for k := rowPtr[t]; k < rowPtr[t+1]; k++ {
			v := src[col[k]]
			if v != v { // NaN: missing
				continue
			}
			num += val[k] * float64(v)
			den += val[k]
		}
		if den <= 0 || den < minCov {
			dst[t] = nan
		} else {
			dst[t] = T(num / den)
		}
	}
	return nil
}
