package factors

import (
	"fmt"
	"sort"
	"strconv"

	"lidscope/relations"
)

// Years keeps the co-moments of one regression (the p factors and the
// response, K = p + 1 variables) per calendar year, the folds of blocked
// cross-validation. It is mergeable: the Years of pieces of a record
// (time chunks, or parts of a year) merged together equal one pass.
type Years struct {
	K      int
	byYear map[int]*relations.CoMoments
}

// NewYears returns an empty set of yearly co-moments of k variables.
func NewYears(k int) *Years { return &Years{K: k, byYear: map[int]*relations.CoMoments{}} }

// Add adds the sample x (length K: factors, then the response) of the
// given year with weight w (relations.CoMoments.Add: NaN samples and
// non-positive weights are ignored).
func (y *Years) Add(year int, x []float64, w float64) {
	c := y.byYear[year]
	if c == nil {
		n := relations.NewCoMoments(y.K)
		c = &n
		y.byYear[year] = c
	}
	c.Add(x, w)
}

// Merge adds the yearly co-moments of o (same K) to y.
func (y *Years) Merge(o *Years) error {
	if o.K != y.K {
		return fmt.Errorf("factors: merging yearly co-moments of %d variables into %d", o.K, y.K)
	}
	for yr, c := range o.byYear {
		if d := y.byYear[yr]; d != nil {
			d.Merge(*c)
		} else {
			cl := c.Clone()
			y.byYear[yr] = &cl
		}
	}
	return nil
}

// Folds returns one fold per year, in increasing year order, labelled by
// the year (copies: later Adds do not change them).
func (y *Years) Folds() Folds {
	years := make([]int, 0, len(y.byYear))
	for yr := range y.byYear {
		years = append(years, yr)
	}
	sort.Ints(years)
	fs := Folds{Labels: make([]string, len(years)), Pieces: make([]relations.CoMoments, len(years))}
	for i, yr := range years {
		fs.Labels[i] = strconv.Itoa(yr)
		fs.Pieces[i] = y.byYear[yr].Clone()
	}
	return fs
}

// BytesPerYear is the size in bytes of the moments one year keeps for p
// factors: the count (8), Σw (8), K means and K×K co-moments of 8 bytes
// each (K = p + 1; relations.CoMoments keeps the full square, of which
// the upper triangle is used). A cell's state is this times its years;
// the map and slice headers add a fixed part per year not counted here.
func BytesPerYear(p int) int {
	k := p + 1
	return 16 + 8*(k+k*k)
}
