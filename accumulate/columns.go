package accumulate

import (
	"math"
	"unsafe"

	"lidscope/regimes"
	"lidscope/stats"
)

// Per-column statistics are kept only for the columns that can ever be in
// a regime: the ocean cells (Layout.Columns, from the static ocean mask)
// inside the analysis domain. They are stored by slot, a compact index of
// those columns in grid order (Index), not by grid cell, so land and the
// cells outside the domain cost nothing but one slot number each.

// Index maps the grid cells to the compact slots of the columns that keep
// per-column state, and back. The columns are in grid (row-major) order,
// so the slots of a range of grid cells are a range of slots. Other
// per-column accumulators (e.g. per-cell regressions) can share it.
type Index struct {
	// Cell is the grid cell of each slot, ascending.
	Cell []int32
	// rank[i] is the number of kept columns before grid cell i (len n+1).
	rank []int32
}

// NewIndex returns the index of the columns cells (ascending grid cells of
// a grid of n cells); nil cells means every cell.
func NewIndex(n int, cells []int32) Index {
	x := Index{rank: make([]int32, n+1)}
	if cells == nil {
		x.Cell = make([]int32, n)
		for i := range x.Cell {
			x.Cell[i] = int32(i)
		}
	} else {
		x.Cell = cells
	}
	k := 0
	for i := 0; i <= n; i++ {
		x.rank[i] = int32(k)
		if k < len(x.Cell) && int(x.Cell[k]) == i {
			k++
		}
	}
	return x
}

// Len is the number of slots.
func (x Index) Len() int { return len(x.Cell) }

// Slot returns the slot of grid cell i, or -1 when it keeps no state.
func (x Index) Slot(i int) int {
	k := x.rank[i]
	if int(k) < len(x.Cell) && int(x.Cell[k]) == i {
		return int(k)
	}
	return -1
}

// Slots returns the slots [from, to) of the kept columns among grid cells [lo, hi).
func (x Index) Slots(lo, hi int) (from, to int) { return int(x.rank[lo]), int(x.rank[hi]) }

// Sum holds the moments over time of one quantity at one column in one
// regime, as sums about a shift (the first value, a float32 as the values
// are): N values x with S1 = Σ(x − Shift), S2 = Σ(x − Shift)², in float64.
// Adding a value is two additions and a multiplication, with no division
// (a West/Welford update needs one per value); the mean Shift + S1/N and
// M2 = S2 − S1²/N are formed when asked for (Moments). The shift is one of
// the sample's own values, so S1 stays small against the values and the
// subtraction loses only what the sample's spread about that value costs;
// a constant sample has S1 = S2 = 0 exactly (its mean is the value, its
// variance 0). Results agree with a per-value update to rounding (tested
// against exact rational arithmetic).
type Sum struct {
	Shift  float32 // NaN until the first value
	N      int32
	S1, S2 float64
}

// emptySum is a Sum without values.
func emptySum() Sum { return Sum{Shift: float32(math.NaN())} }

// add adds x (not NaN).
func (s *Sum) add(x float32) {
	c := s.Shift
	if c != c {
		c = x
		s.Shift = x
	}
	d := float64(x) - float64(c)
	s.N++
	s.S1 += d
	s.S2 += d * d
}

// Moments returns the moments (unit weights).
func (s Sum) Moments() stats.Moments {
	if s.N == 0 {
		return stats.Moments{}
	}
	w := float64(s.N)
	d := s.S1 / w
	return stats.Moments{N: int64(s.N), W: w, Mean: float64(s.Shift) + d, M2: math.Max(0, s.S2-s.S1*d)}
}

// merge adds b to s: b's sums are moved to s's shift by exact algebra,
// Σ(x−a) = Σ(x−b) + n(b−a) and Σ(x−a)² = Σ(x−b)² + 2(b−a)Σ(x−b) + n(b−a)²
// (no change when the shifts are equal, as for a constant sample).
func (s *Sum) merge(b Sum) {
	if b.N == 0 {
		return
	}
	if s.N == 0 {
		*s = b
		return
	}
	dl := float64(b.Shift) - float64(s.Shift)
	fn := float64(b.N)
	s.N += b.N
	if dl == 0 {
		s.S1 += b.S1
		s.S2 += b.S2
		return
	}
	s.S1 += b.S1 + fn*dl
	s.S2 += b.S2 + 2*dl*b.S1 + fn*dl*dl
}

// BytesPerColumn is the memory of the per-column statistics of one kept
// column with nq quantities in nr regimes (3, or 2 without a transition
// band, Layout.NoTransition): valid and regime counts, the relative-SST
// sums, nq × nr × (shift, count, S1, S2), the crossing track and the
// column's slot in the index.
func BytesPerColumn(nq, nr int) int {
	const sum = int(unsafe.Sizeof(Sum{}))
	return 4 + nreg*4 + sum + nq*nr*sum + trackBytes + 4
}

// trackBytes is the size of a crossing track.
const trackBytes = int(unsafe.Sizeof(regimes.Track{}))
