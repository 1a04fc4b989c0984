// Package accumulate gathers a run's regime statistics, one time step at a
// time, into mergeable accumulators: per-column maps, per-time-step series
// over the tropical band, and per-region tables. Two accumulators for
// consecutive pieces of a record merge (Merge) into exactly what one pass
// over the whole record gives, up to floating-point rounding.
//
// Quantities are identified by name (e.g. "eis", "lts", "low_cloud"); their
// values arrive in SI units.
package accumulate

import (
	"fmt"
	"math"

	"lidscope/regimes"
	"lidscope/stats"
)

// nreg is the number of regime slots (subsidence, transition, convective),
// indexed by regimes.Regime.
const nreg = 3

// Region is a named lat–lon box; cells whose centres lie inside belong to it.
type Region struct {
	Name                     string
	South, North, West, East float64 // degrees; West > East wraps across the dateline
}

// Contains reports whether (lat, lon) lies in the box, in either longitude convention.
func (r Region) Contains(lat, lon float64) bool {
	if lat < r.South || lat > r.North {
		return false
	}
	n := func(x float64) float64 { return math.Mod(math.Mod(x, 360)+360, 360) }
	w, e, x := n(r.West), n(r.East), n(lon)
	if r.East-r.West >= 360 {
		return true
	}
	if w <= e {
		return x >= w && x <= e
	}
	return x >= w || x <= e
}

// Layout describes what is accumulated.
type Layout struct {
	NLat, NLon int
	Lat, Lon   []float64 // cell centres
	Area       []float64 // cell areas, m², row-major [lat][lon]
	BandWeight []float64 // area inside the tropical band (0 outside)
	Quantities []string  // names of the per-column quantities, e.g. eis, lts, low_cloud
	// Cloud names the quantity that is the analysis's cloud field (the
	// study's cloud role: low_cloud or cloud).
	Cloud   string
	Regions []Region
	// Columns are the grid cells (row-major, ascending) that keep
	// per-column statistics: the ocean cells of the static mask inside the
	// analysis domain (a cell outside them is never in a regime there, or
	// is not analysed). Nil keeps every cell. The step slabs still cover
	// the whole grid: the band series, regions and relationship statistics
	// do not depend on Columns.
	Columns []int32
	// NoTransition says the regime rule has no transition band (h = 0):
	// no column is ever in the transition regime, so no per-column sums
	// are kept for it (its moments are empty).
	NoTransition bool
}

// Step is one time step's input to Add. All slices have NLat*NLon cells.
type Step struct {
	Label    string // the date, e.g. 2001-01
	Year     int
	Month    int
	TropMean float64 // tropical-mean SST, K
	Rel      []float32
	Regime   []regimes.Regime
	Values   [][]float32 // per quantity, aligned with Layout.Quantities
	// Classifier, when not nil, is the step's classifier: for some regime
	// rules (regimes.RuleSSTPercentile) δ is found at each step. Nil means
	// the run's fixed classifier.
	Classifier *regimes.Classifier
}

// Cells are per-column statistics over time, by slot of the kept columns
// (Layout.Columns; Acc.Index maps grid cells to slots). Read them by grid
// cell with the Acc methods ValidSteps, RegimeSteps, Moments, RelMoments
// and Track.
type Cells struct {
	Steps  int           // time steps added
	Valid  []int32       // steps with a regime (ocean, data present)
	Count  [nreg][]int32 // steps per regime
	Rel    []Sum         // relative SST over valid steps
	Values [][nreg][]Sum // [quantity][regime][slot]
	Tracks []regimes.Track
}

// SeriesPoint is one time step over the tropical band.
type SeriesPoint struct {
	Label        string
	Year, Month  int
	TropMean     float64         // K
	AreaFraction [nreg]float64   // share of the band's valid ocean area in each regime
	Means        [][nreg]float64 // [quantity][regime], area-weighted over the band (NaN if none)
}

// RegionStats are area- and time-weighted statistics of one region.
type RegionStats struct {
	Region Region
	// AreaTime per regime: Σ cell area over valid steps (m² × steps).
	AreaTime [nreg]float64
	Values   [][nreg]stats.Moments // [quantity][regime], weights = cell area
	Rel      stats.Moments
}

// Acc is a run's accumulator.
type Acc struct {
	L       Layout
	Cells   Cells
	Series  []SeriesPoint
	Regions []RegionStats
	// Index maps grid cells to the slots of Cells.
	Index  Index
	member [][]int // cells of each region
}

// New returns an empty accumulator.
func New(l Layout) (*Acc, error) {
	n := l.NLat * l.NLon
	if len(l.Lat) != l.NLat || len(l.Lon) != l.NLon || len(l.Area) != n || len(l.BandWeight) != n {
		return nil, fmt.Errorf("accumulate: layout sizes disagree (%d×%d grid, %d lat, %d lon, %d areas, %d band weights)", l.NLat, l.NLon, len(l.Lat), len(l.Lon), len(l.Area), len(l.BandWeight))
	}
	for k, c := range l.Columns {
		if c < 0 || int(c) >= n || (k > 0 && c <= l.Columns[k-1]) {
			return nil, fmt.Errorf("accumulate: layout columns must be ascending grid cells below %d (column %d is %d)", n, k, c)
		}
	}
	a := &Acc{L: l, Index: NewIndex(n, l.Columns)}
	m := a.Index.Len()
	c := &a.Cells
	c.Valid = make([]int32, m)
	for r := 0; r < nreg; r++ {
		c.Count[r] = make([]int32, m)
	}
	c.Rel = make([]Sum, m)
	for k := range c.Rel {
		c.Rel[k] = emptySum()
	}
	c.Values = make([][nreg][]Sum, len(l.Quantities))
	for q := range c.Values {
		for r := 0; r < nreg; r++ {
			if l.NoTransition && regimes.Regime(r) == regimes.Transition {
				continue
			}
			v := make([]Sum, m)
			for k := range v {
				v[k] = emptySum()
			}
			c.Values[q][r] = v
		}
	}
	c.Tracks = make([]regimes.Track, m)
	for i := range c.Tracks {
		c.Tracks[i] = regimes.NewTrack()
	}
	for _, rg := range l.Regions {
		rs := RegionStats{Region: rg, Values: make([][nreg]stats.Moments, len(l.Quantities))}
		a.Regions = append(a.Regions, rs)
		var m []int
		for j := 0; j < l.NLat; j++ {
			for i := 0; i < l.NLon; i++ {
				if rg.Contains(l.Lat[j], l.Lon[i]) {
					m = append(m, j*l.NLon+i)
				}
			}
		}
		if len(m) == 0 {
			return nil, fmt.Errorf("region %q (%g…%g N, %g…%g E) contains no grid cell centre", rg.Name, rg.South, rg.North, rg.West, rg.East)
		}
		a.member = append(a.member, m)
	}
	return a, nil
}

// AddCells updates the per-column statistics of cells [lo, hi) for one step.
// Different goroutines may call it for disjoint ranges of the same step;
// AddStep must then be called once for the step's series and regions.
//
// Only the kept columns (Layout.Columns) among them are added.
func (a *Acc) AddCells(s *Step, lo, hi int) {
	c := &a.Cells
	from, to := a.Index.Slots(lo, hi)
	for k := from; k < to; k++ {
		i := a.Index.Cell[k]
		r := s.Regime[i]
		c.Tracks[k].Add(r)
		if r == regimes.Missing {
			continue
		}
		if r == regimes.Transition && a.L.NoTransition {
			panic("accumulate: a transition-regime step for a layout without a transition band (Layout.NoTransition)")
		}
		c.Valid[k]++
		c.Count[r][k]++
		if x := s.Rel[i]; x == x {
			c.Rel[k].add(x)
		}
		for q, v := range s.Values {
			if x := v[i]; x == x {
				c.Values[q][r][k].add(x)
			}
		}
	}
}

// AddStep adds the step's band series point and region statistics, and
// counts the step. Call it once per step, after (or instead of, for a
// serial run) AddCells over all cells.
func (a *Acc) AddStep(s *Step) {
	a.Cells.Steps++
	nq := len(a.L.Quantities)
	p := SeriesPoint{Label: s.Label, Year: s.Year, Month: s.Month, TropMean: s.TropMean, Means: make([][nreg]float64, nq)}
	var area [nreg]float64
	sums := make([][nreg]float64, nq)
	wts := make([][nreg]float64, nq)
	for i, w := range a.L.BandWeight {
		r := s.Regime[i]
		if w <= 0 || r == regimes.Missing {
			continue
		}
		area[r] += w
		for q, v := range s.Values {
			if x := v[i]; x == x {
				sums[q][r] += w * float64(x)
				wts[q][r] += w
			}
		}
	}
	tot := area[0] + area[1] + area[2]
	for r := 0; r < nreg; r++ {
		p.AreaFraction[r] = math.NaN()
		if tot > 0 {
			p.AreaFraction[r] = area[r] / tot
		}
		for q := 0; q < nq; q++ {
			p.Means[q][r] = math.NaN()
			if wts[q][r] > 0 {
				p.Means[q][r] = sums[q][r] / wts[q][r]
			}
		}
	}
	a.Series = append(a.Series, p)
	for k := range a.Regions {
		rs := &a.Regions[k]
		for _, i := range a.member[k] {
			r := s.Regime[i]
			if r == regimes.Missing {
				continue
			}
			w := a.L.Area[i]
			rs.AreaTime[r] += w
			rs.Rel.Add(float64(s.Rel[i]), w)
			for q, v := range s.Values {
				rs.Values[q][r].Add(float64(v[i]), w)
			}
		}
	}
}

// Merge appends b, which must have the same layout and cover the time
// steps immediately after a's.
func (a *Acc) Merge(b *Acc) error {
	if err := sameLayout(a.L, b.L); err != nil {
		return err
	}
	c, d := &a.Cells, &b.Cells
	for i := range c.Valid {
		c.Valid[i] += d.Valid[i]
		for r := 0; r < nreg; r++ {
			c.Count[r][i] += d.Count[r][i]
		}
		c.Tracks[i].Merge(d.Tracks[i])
		c.Rel[i].merge(d.Rel[i])
	}
	for q := range c.Values {
		for r := 0; r < nreg; r++ {
			x, y := c.Values[q][r], d.Values[q][r]
			for k := range x {
				x[k].merge(y[k])
			}
		}
	}
	c.Steps += d.Steps
	a.Series = append(a.Series, b.Series...)
	for k := range a.Regions {
		x, y := &a.Regions[k], &b.Regions[k]
		for r := 0; r < nreg; r++ {
			x.AreaTime[r] += y.AreaTime[r]
			for q := range x.Values {
				x.Values[q][r].Merge(y.Values[q][r])
			}
		}
		x.Rel.Merge(y.Rel)
	}
	return nil
}

func sameLayout(a, b Layout) error {
	if a.NLat != b.NLat || a.NLon != b.NLon {
		return fmt.Errorf("accumulate: cannot merge a %d×%d grid with a %d×%d grid", a.NLat, a.NLon, b.NLat, b.NLon)
	}
	if fmt.Sprint(a.Quantities) != fmt.Sprint(b.Quantities) {
		return fmt.Errorf("accumulate: cannot merge quantities %v with %v", a.Quantities, b.Quantities)
	}
	if fmt.Sprint(a.Regions) != fmt.Sprint(b.Regions) {
		return fmt.Errorf("accumulate: cannot merge runs with different regions")
	}
	if a.NoTransition != b.NoTransition {
		return fmt.Errorf("accumulate: cannot merge a run with a transition band and one without")
	}
	if len(a.Columns) != len(b.Columns) || (a.Columns == nil) != (b.Columns == nil) {
		return fmt.Errorf("accumulate: cannot merge runs that keep different columns (%d vs %d; a different ocean mask or analysis domain)", len(a.Columns), len(b.Columns))
	}
	for k := range a.Columns {
		if a.Columns[k] != b.Columns[k] {
			return fmt.Errorf("accumulate: cannot merge runs that keep different columns (a different ocean mask or analysis domain: column %d is cell %d vs %d)", k, a.Columns[k], b.Columns[k])
		}
	}
	for i := range a.Lat {
		if a.Lat[i] != b.Lat[i] {
			return fmt.Errorf("accumulate: grids differ at latitude %d (%g vs %g)", i, a.Lat[i], b.Lat[i])
		}
	}
	for i := range a.Lon {
		if a.Lon[i] != b.Lon[i] {
			return fmt.Errorf("accumulate: grids differ at longitude %d (%g vs %g)", i, a.Lon[i], b.Lon[i])
		}
	}
	return nil
}

// ConvectiveFraction returns, per cell, the fraction of valid steps that
// were convective (NaN where never valid).
func (a *Acc) ConvectiveFraction() []float64 {
	out := a.nanGrid()
	for k, v := range a.Cells.Valid {
		if v > 0 {
			out[a.Index.Cell[k]] = float64(a.Cells.Count[regimes.Convective][k]) / float64(v)
		}
	}
	return out
}

// nanGrid returns a grid of NaN.
func (a *Acc) nanGrid() []float64 {
	out := make([]float64, a.L.NLat*a.L.NLon)
	for i := range out {
		out[i] = math.NaN()
	}
	return out
}

// NCells is the number of grid cells.
func (a *Acc) NCells() int { return a.L.NLat * a.L.NLon }

// ValidSteps returns the number of steps grid cell i was in a regime.
func (a *Acc) ValidSteps(i int) int32 {
	if k := a.Index.Slot(i); k >= 0 {
		return a.Cells.Valid[k]
	}
	return 0
}

// RegimeSteps returns the number of steps grid cell i was in regime r.
func (a *Acc) RegimeSteps(r regimes.Regime, i int) int32 {
	if k := a.Index.Slot(i); k >= 0 {
		return a.Cells.Count[r][k]
	}
	return 0
}

// Moments returns the moments over time of quantity q (index in
// Layout.Quantities) at grid cell i in the steps it was in regime r
// (unit weights; empty where never).
func (a *Acc) Moments(q int, r regimes.Regime, i int) stats.Moments {
	if k := a.Index.Slot(i); k >= 0 && a.Cells.Values[q][r] != nil {
		return a.Cells.Values[q][r][k].Moments()
	}
	return stats.Moments{}
}

// RelMoments returns the moments of relative SST over the valid steps of
// grid cell i.
func (a *Acc) RelMoments(i int) stats.Moments {
	if k := a.Index.Slot(i); k >= 0 {
		return a.Cells.Rel[k].Moments()
	}
	return stats.Moments{}
}

// Track returns the crossing track of grid cell i (an empty one where no
// state is kept).
func (a *Acc) Track(i int) regimes.Track {
	if k := a.Index.Slot(i); k >= 0 {
		return a.Cells.Tracks[k]
	}
	return regimes.NewTrack()
}

// CrossingsPerYear returns convective↔subsidence crossings per year of
// record at each cell, for a record of stepsPerYear steps a year (12 for
// monthly data). NaN where the cell was never valid.
func (a *Acc) CrossingsPerYear(stepsPerYear float64) []float64 {
	out := a.nanGrid()
	years := float64(a.Cells.Steps) / stepsPerYear
	for k, t := range a.Cells.Tracks {
		if a.Cells.Valid[k] > 0 && years > 0 {
			out[a.Index.Cell[k]] = float64(t.Crossings) / years
		}
	}
	return out
}
