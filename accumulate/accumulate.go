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

// Cells are per-column statistics over time.
type Cells struct {
	Steps  int                     // time steps added
	Valid  []int32                 // steps with a regime (ocean, data present)
	Count  [nreg][]int32           // steps per regime
	Rel    []stats.Moments         // relative SST over valid steps
	Values [][nreg][]stats.Moments // [quantity][regime][cell], over time
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
	member  [][]int // cells of each region
}

// New returns an empty accumulator.
func New(l Layout) (*Acc, error) {
	n := l.NLat * l.NLon
	if len(l.Lat) != l.NLat || len(l.Lon) != l.NLon || len(l.Area) != n || len(l.BandWeight) != n {
		return nil, fmt.Errorf("accumulate: layout sizes disagree (%d×%d grid, %d lat, %d lon, %d areas, %d band weights)", l.NLat, l.NLon, len(l.Lat), len(l.Lon), len(l.Area), len(l.BandWeight))
	}
	a := &Acc{L: l}
	c := &a.Cells
	c.Valid = make([]int32, n)
	for r := 0; r < nreg; r++ {
		c.Count[r] = make([]int32, n)
	}
	c.Rel = make([]stats.Moments, n)
	c.Values = make([][nreg][]stats.Moments, len(l.Quantities))
	for q := range c.Values {
		for r := 0; r < nreg; r++ {
			c.Values[q][r] = make([]stats.Moments, n)
		}
	}
	c.Tracks = make([]regimes.Track, n)
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
func (a *Acc) AddCells(s *Step, lo, hi int) {
	c := &a.Cells
	for i := lo; i < hi; i++ {
		r := s.Regime[i]
		c.Tracks[i].Add(r)
		if r == regimes.Missing {
			continue
		}
		c.Valid[i]++
		c.Count[r][i]++
		c.Rel[i].Add(float64(s.Rel[i]), 1)
		for q, v := range s.Values {
			c.Values[q][r][i].Add(float64(v[i]), 1)
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
		c.Rel[i].Merge(d.Rel[i])
		for q := range c.Values {
			for r := 0; r < nreg; r++ {
				c.Values[q][r][i].Merge(d.Values[q][r][i])
			}
		}
		c.Tracks[i].Merge(d.Tracks[i])
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
	out := make([]float64, len(a.Cells.Valid))
	for i, v := range a.Cells.Valid {
		out[i] = math.NaN()
		if v > 0 {
			out[i] = float64(a.Cells.Count[regimes.Convective][i]) / float64(v)
		}
	}
	return out
}

// CrossingsPerYear returns convective↔subsidence crossings per year of
// record at each cell, for a record of stepsPerYear steps a year (12 for
// monthly data). NaN where the cell was never valid.
func (a *Acc) CrossingsPerYear(stepsPerYear float64) []float64 {
	out := make([]float64, len(a.Cells.Valid))
	years := float64(a.Cells.Steps) / stepsPerYear
	for i, t := range a.Cells.Tracks {
		out[i] = math.NaN()
		if a.Cells.Valid[i] > 0 && years > 0 {
			out[i] = float64(t.Crossings) / years
		}
	}
	return out
}
