package relations

import (
	"fmt"
	"math"

	"lidscope/accumulate"
	"lidscope/regimes"
)

// trendStat is the mergeable sufficient statistic of a mean and a linear
// trend of x against time t (decimal years): count, means and the
// co-moments Σ(t − t̄)², Σ(t − t̄)(x − x̄) (Welford-style update; Chan et
// al. 1979 merge).
type trendStat struct {
	N        float64
	T, X     float64
	Ctt, Ctx float64
}

func (s *trendStat) add(t, x float64) {
	s.N++
	dt := t - s.T
	dx := x - s.X
	s.T += dt / s.N
	s.X += dx / s.N
	s.Ctt += dt * (t - s.T)
	s.Ctx += dt * (x - s.X)
}

func (s *trendStat) merge(b trendStat) {
	if b.N == 0 {
		return
	}
	if s.N == 0 {
		*s = b
		return
	}
	n := s.N + b.N
	dt, dx := b.T-s.T, b.X-s.X
	f := s.N * b.N / n
	s.Ctt += b.Ctt + f*dt*dt
	s.Ctx += b.Ctx + f*dt*dx
	s.T += dt * b.N / n
	s.X += dx * b.N / n
	s.N = n
}

// value returns the climatological value at time t: the mean, plus the
// least-squares trend when detrend is set and the time values spread.
func (s *trendStat) value(t float64, detrend bool) float64 {
	if s.N == 0 {
		return math.NaN()
	}
	if detrend && s.Ctt > 0 {
		return s.X + s.Ctx/s.Ctt*(t-s.T)
	}
	return s.X
}

// decimalYear is the time coordinate of the climatology's trends.
func decimalYear(year, month int) float64 { return float64(year) + (float64(month)-0.5)/12 }

// Climatology is the first pass of anomaly mode: per cell, per calendar
// month and per variable (every quantity of the layout, and relative SST)
// the count, mean and linear-trend statistics over the valid steps (regime
// not Missing) of the record. It covers the cells inside the tropical band
// (BandWeight > 0) and inside the layout's regions; memory is allocated on
// a cell's first valid step, 40 bytes × 12 months × (quantities + 1) per
// such cell (about 55 MB for the band of a 1° grid with 6 quantities), and
// does not grow with the record length.
type Climatology struct {
	l     accumulate.Layout
	nv    int     // variables: the layout's quantities, then rel_sst
	slot  []int32 // per cell: index into st, -1 = not allocated
	cover []bool  // per cell: covered
	st    [][]trendStat
	steps int
	first string
	last  string
}

// NewClimatology returns an empty climatology for the layout.
func NewClimatology(l accumulate.Layout) *Climatology {
	n := l.NLat * l.NLon
	c := &Climatology{l: l, nv: len(l.Quantities) + 1, slot: make([]int32, n), cover: make([]bool, n)}
	for i := range c.slot {
		c.slot[i] = -1
		if i < len(l.BandWeight) && l.BandWeight[i] > 0 {
			c.cover[i] = true
		}
	}
	for _, r := range l.Regions {
		for j := 0; j < l.NLat && j < len(l.Lat); j++ {
			for i := 0; i < l.NLon && i < len(l.Lon); i++ {
				if r.Contains(l.Lat[j], l.Lon[i]) {
					c.cover[j*l.NLon+i] = true
				}
			}
		}
	}
	return c
}

// Steps is the number of time steps added.
func (c *Climatology) Steps() int { return c.steps }

// Covers reports whether cell i is covered.
func (c *Climatology) Covers(i int) bool { return i >= 0 && i < len(c.cover) && c.cover[i] }

func (c *Climatology) cell(i int) []trendStat {
	if s := c.slot[i]; s >= 0 {
		return c.st[s]
	}
	c.slot[i] = int32(len(c.st))
	c.st = append(c.st, make([]trendStat, 12*c.nv))
	return c.st[len(c.st)-1]
}

// AddStep adds one time step (Step.Month 1–12).
func (c *Climatology) AddStep(s *accumulate.Step) {
	c.steps++
	if c.first == "" {
		c.first = s.Label
	}
	c.last = s.Label
	if s.Month < 1 || s.Month > 12 {
		return
	}
	t := decimalYear(s.Year, s.Month)
	nq := len(c.l.Quantities)
	for i, r := range s.Regime {
		if r == regimes.Missing || !c.cover[i] {
			continue
		}
		st := c.cell(i)[(s.Month-1)*c.nv:]
		for q := 0; q < nq && q < len(s.Values); q++ {
			if x := s.Values[q][i]; x == x {
				st[q].add(t, float64(x))
			}
		}
		if x := s.Rel[i]; x == x {
			st[nq].add(t, float64(x))
		}
	}
}

// Merge adds b (same layout; any time range) to c.
func (c *Climatology) Merge(b *Climatology) error {
	if b == nil {
		return fmt.Errorf("relations: cannot merge a nil climatology")
	}
	if len(c.slot) != len(b.slot) || c.nv != b.nv || fmt.Sprint(c.l.Quantities) != fmt.Sprint(b.l.Quantities) {
		return fmt.Errorf("relations: cannot merge climatologies of different layouts (%d cells, quantities %v vs %d cells, %v)", len(c.slot), c.l.Quantities, len(b.slot), b.l.Quantities)
	}
	for i, s := range b.slot {
		if s < 0 {
			continue
		}
		dst := c.cell(i)
		for k, v := range b.st[s] {
			dst[k].merge(v)
		}
	}
	c.steps += b.steps
	if c.first == "" {
		c.first = b.first
	}
	if b.last != "" {
		c.last = b.last
	}
	return nil
}

// Value returns the climatological value of variable v (index into the
// layout's quantities; len(Quantities) for relative SST) at cell i for
// the given year and month, with the trend when detrend is set; NaN where
// the cell-month had no valid value.
func (c *Climatology) Value(i, v, year, month int, detrend bool) float64 {
	if month < 1 || month > 12 || i < 0 || i >= len(c.slot) || c.slot[i] < 0 {
		return math.NaN()
	}
	st := c.st[c.slot[i]][(month-1)*c.nv+v]
	return st.value(decimalYear(year, month), detrend)
}
