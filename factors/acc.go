package factors

import (
	"bytes"
	"encoding/gob"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"

	"lidscope/accumulate"
	"lidscope/regimes"
	"lidscope/relations"
)

// Method names of a factor regression.
const (
	MethodOLS   = "ols"
	MethodRidge = "ridge"
)

// Regime slots of the factor fits: the subsidence and convective regimes
// and all valid columns together (every regime, the transition included).
const (
	SlotSubsidence = 0
	SlotConvective = 1
	SlotAll        = 2
	nslot          = 3
)

// SlotNames are the regime names of the slots, as written in every output.
var SlotNames = [nslot]string{regimes.Subsidence.String(), regimes.Convective.String(), "all"}

// Bootstrap asks for a block bootstrap over whole years of the regional fits.
type Bootstrap struct {
	Replicates int    // 0: none
	BlockYears int    // years per block (circular blocks of consecutive years)
	Seed       uint64 // recorded in the outputs
}

// Config is what a factor analysis does.
type Config struct {
	Factors   []string  // factor quantity names (quantities of the layout), in output order
	Response  string    // the response quantity
	Method    string    // MethodOLS or MethodRidge
	Penalties []float64 // ridge penalties tried (nil: DefaultPenalties)
	Level     float64   // interval level, e.g. 0.95
	// CellFoldYears is the length of the per-cell folds of blocked
	// cross-validation: a sample of year y is in block ⌊y/CellFoldYears⌋.
	CellFoldYears int
	Maps          bool // per-cell fits of the band's ocean cells
	Detrend       bool // anomalies against the climatology's linear trend too
	Bootstrap     Bootstrap
	Regions       []accumulate.Region // further domains beside the tropical band
}

// Validate checks the configuration.
func (c Config) Validate() error {
	switch {
	case len(c.Factors) == 0:
		return errors.New("factors: Config.Factors names no factor; list at least one (e.g. sst, eis)")
	case c.Response == "":
		return errors.New("factors: Config.Response is empty; name the response quantity (e.g. low_cloud)")
	case c.Method != MethodOLS && c.Method != MethodRidge:
		return fmt.Errorf("factors: Config.Method %q is not %s or %s", c.Method, MethodOLS, MethodRidge)
	case !(c.Level > 0 && c.Level < 1):
		return fmt.Errorf("factors: Config.Level %v is not in (0, 1); give e.g. 0.95", c.Level)
	case c.CellFoldYears < 1:
		return fmt.Errorf("factors: Config.CellFoldYears %d is not a positive number of years", c.CellFoldYears)
	case c.Bootstrap.Replicates < 0 || (c.Bootstrap.Replicates > 0 && c.Bootstrap.BlockYears < 1):
		return fmt.Errorf("factors: Config.Bootstrap: %d replicates in blocks of %d years; give replicates ≥ 0 and block years ≥ 1", c.Bootstrap.Replicates, c.Bootstrap.BlockYears)
	}
	seen := map[string]bool{c.Response: true}
	for _, f := range c.Factors {
		if seen[f] {
			return fmt.Errorf("factors: %q is listed twice among the factors and the response", f)
		}
		seen[f] = true
	}
	for _, p := range c.Penalties {
		if !(p >= 0) || math.IsInf(p, 0) {
			return fmt.Errorf("factors: penalty %v is not a finite number ≥ 0", p)
		}
	}
	return nil
}

// penalties are the penalties cross-validation tries.
func (c Config) penalties() []float64 {
	if c.Method == MethodOLS {
		return []float64{0}
	}
	if c.Penalties == nil {
		return DefaultPenalties()
	}
	return c.Penalties
}

// monthIndex numbers the months of the calendar consecutively.
func monthIndex(year, month int) int64 { return int64(year)*12 + int64(month) - 1 }

// StepMeans are one time step's area-weighted domain means of the factor
// and response anomalies per domain and regime slot (the samples of the
// regional fits), and of the factors themselves (their raw values).
type StepMeans struct {
	Year, Month int
	W           []float64 // [d*nslot+g] Σ area of the complete cells
	Anom        []float64 // [(d*nslot+g)*K + k] mean anomaly
	Raw         []float64 // [(d*nslot+g)*K + k] mean raw factor (and response) value
}

// lagStat is the mergeable part of a lag-1 autocorrelation of one cell's
// K series: sums over pairs of consecutive months (both complete), and the
// first and last complete samples to pair across a merge.
type lagStat struct {
	First, Last int64 // month index of the first and last complete sample; -1 none
	Pairs       int64
	SXY         []float64 // [k] Σ z_t z_{t+1}
	SX, SY      []float64 // [k] Σ z_t, Σ z_{t+1} over the pairs
	FirstV      []float64 // [k]
	LastV       []float64 // [k]
}

// CellState is one cell's per-fold co-moments and lag statistics.
type CellState struct {
	Cell  int32
	Block []int32 // fold block numbers, increasing
	Folds []relations.CoMoments
	Lag   lagStat
}

// Acc accumulates a factor analysis over the time steps of a run. It is a
// pipeline step sink: the pipeline gives it every step in time order.
// Accumulators of consecutive pieces of a record merge into exactly the
// accumulator of the whole record.
type Acc struct {
	cfg  Config
	l    accumulate.Layout
	clim *relations.Climatology
	fq   []int // factor quantity indices
	rq   int
	K    int
	doms []accumulate.Region
	// cellDom per cell: the domains it is in, with its weight there
	cellDom [][]domW
	cells   []int32 // cells in any domain or mapped
	mapped  []bool
	slot    []int32 // per cell: index into state, -1 none
	state   []*CellState
	steps   []StepMeans
	// scratch
	vec, raw []float64
}

type domW struct {
	D int32
	W float64
}

// New returns an empty factor accumulator for the layout. clim is the
// climatology of the first pass (anomaly mode: factors always use
// anomalies); it must cover the band and the regions (relations.NewClimatology
// of the same layout).
func New(cfg Config, l accumulate.Layout, clim *relations.Climatology) (*Acc, error) {
	return build(cfg, l, clim, false)
}

func build(cfg Config, l accumulate.Layout, clim *relations.Climatology, decoded bool) (*Acc, error) {
	if err := cfg.Validate(); err != nil {
		return nil, err
	}
	n := l.NLat * l.NLon
	if n == 0 || len(l.Lat) != l.NLat || len(l.Lon) != l.NLon || len(l.Area) != n || len(l.BandWeight) != n {
		return nil, fmt.Errorf("factors: layout sizes disagree (%d×%d grid, %d lat, %d lon, %d areas, %d band weights)", l.NLat, l.NLon, len(l.Lat), len(l.Lon), len(l.Area), len(l.BandWeight))
	}
	if clim == nil && !decoded {
		return nil, errors.New("factors: the factor regressions use monthly anomalies and need the climatology of a first pass (relations.NewClimatology); got nil")
	}
	a := &Acc{cfg: cfg, l: l, clim: clim}
	qi := map[string]int{}
	for k, q := range l.Quantities {
		qi[q] = k
	}
	for _, f := range cfg.Factors {
		k, ok := qi[f]
		if !ok {
			return nil, fmt.Errorf("factors: factor %q is not a quantity of the run (it has %v); give the inputs it needs or remove it from factors.use", f, l.Quantities)
		}
		a.fq = append(a.fq, k)
	}
	k, ok := qi[cfg.Response]
	if !ok {
		return nil, fmt.Errorf("factors: response %q is not a quantity of the run (it has %v)", cfg.Response, l.Quantities)
	}
	a.rq = k
	a.K = len(a.fq) + 1
	a.doms = append([]accumulate.Region{{Name: relations.BandDomain}}, cfg.Regions...)
	a.cellDom = make([][]domW, n)
	a.mapped = make([]bool, n)
	a.slot = make([]int32, n)
	for i := range a.slot {
		a.slot[i] = -1
		if w := l.BandWeight[i]; w > 0 {
			a.cellDom[i] = append(a.cellDom[i], domW{0, w})
			a.mapped[i] = cfg.Maps
		}
	}
	for d := 1; d < len(a.doms); d++ {
		r := a.doms[d]
		found := false
		for j := 0; j < l.NLat; j++ {
			for i := 0; i < l.NLon; i++ {
				if c := j*l.NLon + i; r.Contains(l.Lat[j], l.Lon[i]) && l.Area[c] > 0 {
					a.cellDom[c] = append(a.cellDom[c], domW{int32(d), l.Area[c]})
					found = true
					if clim != nil && !clim.Covers(c) {
						return nil, fmt.Errorf("factors: region %q reaches cells outside the climatology; build the climatology with the regions in its layout", r.Name)
					}
				}
			}
		}
		if !found {
			return nil, fmt.Errorf("factors: region %q (%g…%g N, %g…%g E) contains no grid cell centre", r.Name, r.South, r.North, r.West, r.East)
		}
	}
	for i := range a.cellDom {
		if len(a.cellDom[i]) > 0 || a.mapped[i] {
			a.cells = append(a.cells, int32(i))
		}
	}
	a.vec, a.raw = make([]float64, a.K), make([]float64, a.K)
	return a, nil
}

// Config returns the accumulator's configuration.
func (a *Acc) Config() Config { return a.cfg }

// Steps is the number of time steps added.
func (a *Acc) Steps() int { return len(a.steps) }

// BytesPerCell is the size of one mapped cell's state for p factors and
// the given number of fold blocks: the co-moments of each block
// (BytesPerYear(p)), the block numbers (4 each) and the lag statistics
// (5 sums of K = p+1 values and three counters); slice headers add about
// 200 bytes.
func BytesPerCell(p, blocks int) int {
	k := p + 1
	return blocks*(BytesPerYear(p)+4) + 8*5*k + 24
}

func (a *Acc) cellState(i int) *CellState {
	if s := a.slot[i]; s >= 0 {
		return a.state[s]
	}
	a.slot[i] = int32(len(a.state))
	cs := &CellState{Cell: int32(i), Lag: newLag(a.K)}
	a.state = append(a.state, cs)
	return cs
}

func newLag(k int) lagStat {
	buf := make([]float64, 5*k)
	return lagStat{First: -1, Last: -1, SXY: buf[:k:k], SX: buf[k : 2*k : 2*k], SY: buf[2*k : 3*k : 3*k], FirstV: buf[3*k : 4*k : 4*k], LastV: buf[4*k:]}
}

func (cs *CellState) fold(block int32, k int) *relations.CoMoments {
	j, found := slices.BinarySearch(cs.Block, block)
	if !found {
		cs.Block = slices.Insert(cs.Block, j, block)
		cs.Folds = slices.Insert(cs.Folds, j, relations.NewCoMoments(k))
	}
	return &cs.Folds[j]
}

// add records a complete sample of month index t in the lag statistics.
func (l *lagStat) add(t int64, x []float64) {
	if l.Last >= 0 && t == l.Last+1 {
		l.Pairs++
		for k, v := range x {
			l.SXY[k] += l.LastV[k] * v
			l.SX[k] += l.LastV[k]
			l.SY[k] += v
		}
	}
	if l.First < 0 {
		l.First = t
		copy(l.FirstV, x)
	}
	l.Last = t
	copy(l.LastV, x)
}

// merge adds b, whose samples all come after l's.
func (l *lagStat) merge(b lagStat) {
	if b.First < 0 {
		return
	}
	if l.First < 0 {
		l.First, l.Last, l.Pairs = b.First, b.Last, b.Pairs
		copy(l.SXY, b.SXY)
		copy(l.SX, b.SX)
		copy(l.SY, b.SY)
		copy(l.FirstV, b.FirstV)
		copy(l.LastV, b.LastV)
		return
	}
	if b.First == l.Last+1 {
		l.Pairs++
		for k := range l.SXY {
			l.SXY[k] += l.LastV[k] * b.FirstV[k]
			l.SX[k] += l.LastV[k]
			l.SY[k] += b.FirstV[k]
		}
	}
	l.Pairs += b.Pairs
	for k := range l.SXY {
		l.SXY[k] += b.SXY[k]
		l.SX[k] += b.SX[k]
		l.SY[k] += b.SY[k]
	}
	l.Last = b.Last
	copy(l.LastV, b.LastV)
}

// r1 is the lag-1 autocorrelation of variable k given the pooled mean m
// and Σ (z − m)² c over n samples, in the estimator of relations.Lag1
// (Σ over consecutive pairs of (z_t − m)(z_{t+1} − m) / Σ (z − m)², times
// n/pairs).
func (l *lagStat) r1(k int, m, c float64, n int64) float64 {
	if n < 3 || l.Pairs == 0 || !(c > 0) {
		return math.NaN()
	}
	p := float64(l.Pairs)
	num := l.SXY[k] - m*(l.SX[k]+l.SY[k]) + p*m*m
	return num / c * float64(n) / p
}

// AddStep adds one time step (in time order). Cells without a regime
// (land, missing data) and samples with any factor or the response missing
// are left out.
func (a *Acc) AddStep(s *accumulate.Step) {
	if a.clim == nil {
		panic("factors: AddStep on a decoded accumulator (DecodeAcc), which has no climatology: it can Merge and give Results")
	}
	nd := len(a.doms)
	p := len(a.fq)
	sm := StepMeans{Year: s.Year, Month: s.Month, W: make([]float64, nd*nslot), Anom: make([]float64, nd*nslot*a.K), Raw: make([]float64, nd*nslot*a.K)}
	t := monthIndex(s.Year, s.Month)
	block := int32(math.Floor(float64(s.Year) / float64(a.cfg.CellFoldYears)))
	vec, raw := a.vec, a.raw
	for _, ci := range a.cells {
		i := int(ci)
		g := s.Regime[i]
		if g == regimes.Missing || s.Month < 1 || s.Month > 12 {
			continue
		}
		complete := true
		for k := 0; k < a.K; k++ {
			q := a.rq
			if k < p {
				q = a.fq[k]
			}
			x := float64(s.Values[q][i])
			raw[k] = x
			x -= a.clim.Value(i, q, s.Year, s.Month, a.cfg.Detrend)
			vec[k] = x
			if x != x {
				complete = false
				break
			}
		}
		if !complete {
			continue
		}
		if a.mapped[i] {
			cs := a.cellState(i)
			cs.fold(block, a.K).Add(vec, 1)
			cs.Lag.add(t, vec)
		}
		slot := -1
		switch g {
		case regimes.Subsidence:
			slot = SlotSubsidence
		case regimes.Convective:
			slot = SlotConvective
		}
		for _, dw := range a.cellDom[i] {
			for _, sl := range [2]int{slot, SlotAll} {
				if sl < 0 {
					continue
				}
				j := int(dw.D)*nslot + sl
				w0 := sm.W[j]
				sm.W[j] += dw.W
				f := dw.W / sm.W[j]
				an := sm.Anom[j*a.K : (j+1)*a.K]
				for k := range an {
					an[k] += (vec[k] - an[k]) * f
				}
				rw := sm.Raw[j*a.K : (j+1)*a.K]
				for k := range rw {
					rw[k] += (raw[k] - rw[k]) * f
				}
				_ = w0
			}
		}
	}
	a.steps = append(a.steps, sm)
}

// Merge adds b, the accumulator of the piece of the record right after
// a's, to a.
func (a *Acc) Merge(b *Acc) error {
	if b == nil {
		return errors.New("factors: cannot merge a nil accumulator")
	}
	if fmt.Sprint(a.cfg) != fmt.Sprint(b.cfg) || len(a.slot) != len(b.slot) || fmt.Sprint(a.l.Quantities) != fmt.Sprint(b.l.Quantities) {
		return fmt.Errorf("factors: cannot merge factor analyses of different studies or grids (%+v on %d cells vs %+v on %d cells)", a.cfg, len(a.slot), b.cfg, len(b.slot))
	}
	if len(a.steps) > 0 && len(b.steps) > 0 {
		la, fb := a.steps[len(a.steps)-1], b.steps[0]
		if monthIndex(fb.Year, fb.Month) <= monthIndex(la.Year, la.Month) {
			return fmt.Errorf("factors: the piece to merge starts at %04d-%02d, not after %04d-%02d; merge pieces in time order", fb.Year, fb.Month, la.Year, la.Month)
		}
	}
	for _, bs := range b.state {
		cs := a.cellState(int(bs.Cell))
		for j, blk := range bs.Block {
			cs.fold(blk, a.K).Merge(bs.Folds[j])
		}
		cs.Lag.merge(bs.Lag)
	}
	a.steps = append(a.steps, b.steps...)
	return nil
}

// encoded is the gob form of an accumulator.
type encoded struct {
	Cfg    Config
	Layout accumulate.Layout
	State  []CellState
	Steps  []StepMeans
}

// Encode writes the accumulator (without its climatology).
func (a *Acc) Encode(w io.Writer) error {
	e := encoded{Cfg: a.cfg, Layout: a.l, Steps: a.steps}
	for _, s := range a.state {
		e.State = append(e.State, *s)
	}
	return gob.NewEncoder(w).Encode(e)
}

// DecodeAcc reads an accumulator written by Encode. It can Merge and give
// Results; it cannot take further steps.
func DecodeAcc(r io.Reader) (*Acc, error) {
	var e encoded
	if err := gob.NewDecoder(r).Decode(&e); err != nil {
		return nil, fmt.Errorf("factors: decoding the accumulator: %w", err)
	}
	a, err := build(e.Cfg, e.Layout, nil, true)
	if err != nil {
		return nil, err
	}
	for i := range e.State {
		s := &e.State[i]
		c := int(s.Cell)
		if c < 0 || c >= len(a.slot) || a.slot[c] >= 0 || len(s.Block) != len(s.Folds) {
			return nil, fmt.Errorf("factors: decoding the accumulator: cell state %d is damaged", i)
		}
		lag := newLag(a.K)
		lag.merge(s.Lag)
		s.Lag = lag
		for _, f := range s.Folds {
			if f.K != a.K || len(f.Mean) != a.K || len(f.C) != a.K*a.K {
				return nil, fmt.Errorf("factors: decoding the accumulator: cell %d has co-moments of the wrong size", c)
			}
		}
		a.slot[c] = int32(len(a.state))
		a.state = append(a.state, s)
	}
	a.steps = e.Steps
	return a, nil
}

// EncodeBytes is Encode into a byte slice.
func (a *Acc) EncodeBytes() ([]byte, error) {
	var b bytes.Buffer
	err := a.Encode(&b)
	return b.Bytes(), err
}
