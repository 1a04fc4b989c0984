package relations

import (
	"fmt"
	"math"
	"sort"

	"lidscope/accumulate"
	"lidscope/regimes"
	"lidscope/stats"
	"lidscope/vocab"
)

// nreg is the number of regime slots, indexed by regimes.Regime
// (subsidence 0, transition 1, convective 2).
const nreg = 3

// Seasons: index 0 is the whole record.
var seasonNames = []string{"all", "DJF", "MAM", "JJA", "SON"}

func seasonOf(month int) int {
	switch month {
	case 12, 1, 2:
		return 1
	case 3, 4, 5:
		return 2
	case 6, 7, 8:
		return 3
	case 9, 10, 11:
		return 4
	}
	return 0
}

// Omega composite bins: −100…100 hPa d-1 in 10 hPa d-1 bins (Bony et al.
// 2004, Clim. Dyn. 22, 71–86, use 10 hPa/day bins of monthly omega500).
const (
	omegaLo, omegaHi, omegaStep = -100.0, 100.0, 10.0 // hPa d-1
	hPaPerDayToPaPerS           = 100.0 / 86400
)

// unitsOf returns the units of a quantity or predictor name (the table of
// names, package vocab).
func unitsOf(name string) (string, bool) { return vocab.Units(name) }

type domW struct {
	d int32
	w float64
}

type binStat struct {
	m     stats.Moments
	steps int32 // distinct time steps that contributed
	last  int32 // seq of the last contributing step, -1 none
}

// count counts the step seq for the bin (once per step).
func (b *binStat) count(seq int32) {
	if b.last != seq {
		b.steps++
		b.last = seq
	}
}

// stepSums are one time step's weighted sums of the samples that go to one
// running moments accumulator, taken about a shift k (the accumulator's
// mean before the step, or the step's first sample when it is empty):
// W = Σw, S1 = Σw(x−k), S2 = Σw(x−k)². Adding a sample costs no division;
// at the end of the step the sums become the step's moments (mean
// k + S1/W, M2 = S2 − S1²/W, exact algebra; with k near the mean S1 is
// small and the subtraction loses nothing of note) and are merged into the
// running moments with Chan, Golub & LeVeque's (1979) pairwise update. So
// the result differs from one West/Welford update per sample only by
// rounding (the within-step sums of a bin are shorter than the record).
type stepSums struct {
	k, w, s1, s2 float64
	n            int64
}

// stepMoments gathers one step's samples for a set of running moments,
// indexed like them; dst returns the running moments of index i.
type stepMoments struct {
	sums    []stepSums
	touched []int32
	dst     func(i int) *stats.Moments
}

func newStepMoments(n int, dst func(i int) *stats.Moments) stepMoments {
	return stepMoments{sums: make([]stepSums, n), dst: dst}
}

// add adds x with weight w (> 0, x not NaN: the callers check) to index i.
func (s *stepMoments) add(i int, x, w float64) {
	e := &s.sums[i]
	if e.n == 0 {
		e.k = x
		if m := s.dst(i); m.W > 0 {
			e.k = m.Mean
		}
		s.touched = append(s.touched, int32(i))
	}
	d := x - e.k
	wd := w * d
	e.n++
	e.w += w
	e.s1 += wd
	e.s2 += wd * d
}

// flush merges the step's sums into the running moments and clears them.
func (s *stepMoments) flush() {
	for _, i := range s.touched {
		e := &s.sums[i]
		r := e.s1 / e.w
		s.dst(int(i)).Merge(stats.Moments{N: e.n, W: e.w, Mean: e.k + r, M2: math.Max(0, e.s2-e.s1*r)})
		*e = stepSums{}
	}
	s.touched = s.touched[:0]
}

type flipSums struct {
	inArea, inChanged, inToConv, inFromConv, inConvBefore, inConvAfter       float64
	outArea, outChanged, outToConv, outFromConv, outConvBefore, outConvAfter float64
}

type patchAcc struct {
	p      Patch
	inside []bool // per cell
	cells  []int  // cells inside
	sums   []flipSums
	fSum   float64
	fSteps int
	fMin   float64
	fMax   float64
}

// stepRec is what is kept per time step: the co-moments of every
// (domain, regime, response) and the binned threshold counts.
type stepRec struct {
	label       string
	year, month int
	tropMean    float64
	cm          []CoMoments // [(d*nreg+g)*nr + r]
	thr         []float64   // [convective weights (nthr) | all weights (nthr)]
}

// Acc accumulates the relationships of a run, one time step at a time.
type Acc struct {
	cfg  Config
	l    Layout
	clim *Climatology
	// climID identifies the climatology of a decoded anomaly-mode
	// accumulator, which keeps no climatology (state.go).
	climID *climIdentity

	preds   []string    // binned predictors, sorted
	edges   [][]float64 // per predictor
	boff    []int       // bin offset per predictor
	nbTot   int
	xs      []string // regression predictors: preds then the partial ones not among them
	xq      []int    // layout index of each x (-1 relative SST)
	predX   []int    // index in xs of each predictor
	partial [2]int   // indices in xs
	resp    []string
	rq      []int
	K       int
	ns      int
	doms    []accumulate.Region // doms[0] is the band
	cellDom [][]domW
	cells   []int // cells in any domain

	binned []binStat
	// one step's sums of binned, jointM and omegaM (AddStep)
	stepBinned, stepJoint, stepOmega stepMoments
	outCnt                           []int64 // [(d*ns+s)*nreg+g)*np+p] samples outside the bins

	jointOn                bool
	jRel, jEIS             int // predictor indices
	nJ                     int
	jointM                 []stats.Moments // [((d*ns+s)*nr + r)*nJ + j]
	jointArea              []float64       // [(d*ns+s)*nJ + j]
	jointCount             []int64
	jointTotal             []float64 // [d*ns+s]
	omegaOn                bool
	omegaQ                 int
	nO                     int
	omegaM                 []stats.Moments // [((d*ns+s)*nr + r)*nO + b]
	omegaArea, omegaTotal  []float64
	omegaCount, omegaOut   []int64
	patches                []patchAcc
	indQ                   int // layout index of the indicator, -1 none
	indThr                 float64
	nthr                   int
	thrN                   int64
	thrW                   float64
	thrOut                 int64
	steps                  []stepRec
	scratchX, scratchRaw   []float64
	scratchBin             []int // per predictor (AddStep)
	scratchR, scratchRawR  []float64
	scratchVec             []float64
	scratchShiftIn         []float64 // per ΔT
	scratchShiftOut        []float64
	bandCells              []int // cells with band weight > 0, in grid order
	layoutQuantitiesString string
}

// Layout is the accumulate layout (grid, areas, band weights, quantities).
type Layout = accumulate.Layout

// New returns an accumulator for the configuration and layout. clim is the
// first-pass climatology in anomaly mode (nil in climatological mode).
func New(cfg Config, l accumulate.Layout, clim *Climatology) (*Acc, error) {
	return build(cfg, l, clim, false)
}

// build is New; decoded (DecodeAcc) allows an anomaly-mode accumulator
// without its climatology. It runs in named steps: checkBuild (the
// configuration, layout and climatology agree), setPredictors (bins and
// regression predictors), setResponses, setDomains (band and regions per
// cell), allocBinned (the binned, joint and omega composites), setPatches,
// setIndicator, allocScratch.
func build(cfg Config, l accumulate.Layout, clim *Climatology, decoded bool) (*Acc, error) {
	if err := checkBuild(cfg, l, clim, decoded); err != nil {
		return nil, err
	}
	a := &Acc{cfg: cfg, l: l, clim: clim, indQ: -1}
	qi := quantityIndex{l: l, k: map[string]int{}}
	for k, q := range l.Quantities {
		qi.k[q] = k
	}
	for _, step := range []func(quantityIndex) error{a.setPredictors, a.setResponses, a.setDomains, a.allocBinned, a.setPatches, a.setIndicator} {
		if err := step(qi); err != nil {
			return nil, err
		}
	}
	a.allocScratch()
	return a, nil
}

// checkBuild checks that the configuration is valid, the layout's sizes
// agree, and the climatology fits the mode and the layout.
func checkBuild(cfg Config, l accumulate.Layout, clim *Climatology, decoded bool) error {
	if err := cfg.Validate(); err != nil {
		return err
	}
	n := l.NLat * l.NLon
	if n == 0 || len(l.Lat) != l.NLat || len(l.Lon) != l.NLon || len(l.Area) != n || len(l.BandWeight) != n {
		return fmt.Errorf("relations: layout sizes disagree (%d×%d grid, %d lat, %d lon, %d areas, %d band weights); build it as for accumulate.New", l.NLat, l.NLon, len(l.Lat), len(l.Lon), len(l.Area), len(l.BandWeight))
	}
	switch {
	case cfg.Mode == Anomaly && clim == nil && !decoded:
		return fmt.Errorf("relations: anomaly mode needs the climatology of a first pass (NewClimatology, AddStep over the record); got nil")
	case cfg.Mode == Climatological && clim != nil:
		return fmt.Errorf("relations: climatological mode takes no climatology (pass nil), or set Config.Mode = Anomaly")
	}
	if clim != nil && (len(clim.slot) != n || fmt.Sprint(clim.l.Quantities) != fmt.Sprint(l.Quantities)) {
		return fmt.Errorf("relations: the climatology was built for another layout (%d cells, quantities %v); build it with NewClimatology on this layout", len(clim.slot), clim.l.Quantities)
	}
	if clim != nil && clim.steps == 0 {
		return fmt.Errorf("relations: the climatology is empty; run its pass over the record (Climatology.AddStep) first")
	}
	return nil
}

// quantityIndex is the layout index of each quantity of the run.
type quantityIndex struct {
	l accumulate.Layout
	k map[string]int
}

// lookup returns the layout index of quantity name (-1 for relative SST,
// which the step carries apart); what ("predictor", "response") is for
// the message.
func (qi quantityIndex) lookup(name, what string) (int, error) {
	if name == RelSST {
		return -1, nil
	}
	k, ok := qi.k[name]
	if !ok {
		return 0, fmt.Errorf("relations: %s %q is not a quantity of the run (layout has %v); add it to the run's inputs or remove it from the relations study", what, name, qi.l.Quantities)
	}
	return k, nil
}

// setPredictors sets the binned predictors (sorted) with their edges and
// bin offsets, and the regression predictors: the binned ones, then the
// partial-regression ones not among them.
func (a *Acc) setPredictors(qi quantityIndex) error {
	bins := a.cfg.bins()
	a.preds = sortedKeys(bins)
	if len(a.preds) == 0 {
		return fmt.Errorf("relations: Config.Bins names no predictor; give at least one (e.g. eis)")
	}
	for _, p := range a.preds {
		a.edges = append(a.edges, append([]float64(nil), bins[p]...))
		a.boff = append(a.boff, a.nbTot)
		a.nbTot += len(bins[p]) - 1
	}
	a.xs = append([]string(nil), a.preds...)
	for k, p := range a.cfg.Partial {
		idx := -1
		for j, x := range a.xs {
			if x == p {
				idx = j
			}
		}
		if idx < 0 {
			idx = len(a.xs)
			a.xs = append(a.xs, p)
		}
		a.partial[k] = idx
	}
	for _, x := range a.xs {
		k, err := qi.lookup(x, "predictor")
		if err != nil {
			return err
		}
		a.xq = append(a.xq, k)
	}
	a.predX = make([]int, len(a.preds))
	for p := range a.preds {
		a.predX[p] = p
	}
	a.K = len(a.xs) + 1
	return nil
}

// setResponses sets the responses: those of the configuration, else the
// run's cloud quantities and toa_sw_up that the layout has.
func (a *Acc) setResponses(qi quantityIndex) error {
	a.resp = a.cfg.Responses
	if a.resp == nil {
		seen := map[string]bool{}
		for _, q := range []string{qi.l.Cloud, "cloud", "low_cloud", "toa_sw_up"} {
			if _, ok := qi.k[q]; ok && !seen[q] {
				a.resp = append(a.resp, q)
				seen[q] = true
			}
		}
		if len(a.resp) == 0 {
			return fmt.Errorf("relations: the run has no cloud quantity (layout %v); name the responses in Config.Responses", qi.l.Quantities)
		}
	}
	for _, r := range a.resp {
		k, err := qi.lookup(r, "response")
		if err != nil {
			return err
		}
		if k < 0 {
			return fmt.Errorf("relations: %s cannot be a response", RelSST)
		}
		for _, x := range a.xs {
			if x == r {
				return fmt.Errorf("relations: %q is both a predictor and a response", r)
			}
		}
		if _, ok := unitsOf(r); !ok {
			return fmt.Errorf("relations: response %q has no known units; known: %v", r, vocab.ColumnQuantities())
		}
		a.rq = append(a.rq, k)
	}
	return nil
}

// setDomains sets the seasons and the domains (the band, then the
// configured regions) with each cell's domains and weights: band weight
// in the band, area in a region.
func (a *Acc) setDomains(quantityIndex) error {
	l, clim := a.l, a.clim
	a.ns = 1
	if a.cfg.Seasons {
		a.ns = len(seasonNames)
	}
	a.doms = append([]accumulate.Region{{Name: BandDomain}}, a.cfg.Regions...)
	n := l.NLat * l.NLon
	a.cellDom = make([][]domW, n)
	for i := 0; i < n; i++ {
		if w := l.BandWeight[i]; w > 0 {
			a.cellDom[i] = append(a.cellDom[i], domW{0, w})
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
					if clim != nil && !clim.cover[c] {
						return fmt.Errorf("relations: region %q reaches cells outside the climatology (outside the band and the layout's regions); add it to the layout's Regions before building the climatology", r.Name)
					}
				}
			}
		}
		if !found {
			return fmt.Errorf("relations: region %q (%g…%g N, %g…%g E) contains no grid cell centre", r.Name, r.South, r.North, r.West, r.East)
		}
	}
	for i, dl := range a.cellDom {
		if len(dl) > 0 {
			a.cells = append(a.cells, i)
		}
	}
	return nil
}

// allocBinned allocates the binned composites, and the joint (relative
// SST × EIS) and omega500 composites when they are on.
func (a *Acc) allocBinned(qi quantityIndex) error {
	nd, nr := len(a.doms), len(a.resp)
	a.binned = make([]binStat, nd*a.ns*nreg*nr*a.nbTot)
	for i := range a.binned {
		a.binned[i].last = -1
	}
	a.stepBinned = newStepMoments(len(a.binned), func(i int) *stats.Moments { return &a.binned[i].m })
	a.outCnt = make([]int64, nd*a.ns*nreg*len(a.preds))
	a.jRel, a.jEIS = -1, -1
	for p, name := range a.preds {
		switch name {
		case RelSST:
			a.jRel = p
		case "eis":
			a.jEIS = p
		}
	}
	if a.jRel >= 0 && a.jEIS >= 0 {
		a.jointOn = true
		a.nJ = (len(a.edges[a.jRel]) - 1) * (len(a.edges[a.jEIS]) - 1)
		a.jointM = make([]stats.Moments, nd*a.ns*nr*a.nJ)
		a.jointArea = make([]float64, nd*a.ns*a.nJ)
		a.jointCount = make([]int64, nd*a.ns*a.nJ)
		a.jointTotal = make([]float64, nd*a.ns)
		a.stepJoint = newStepMoments(len(a.jointM), func(i int) *stats.Moments { return &a.jointM[i] })
	}
	if k, ok := qi.k["omega"]; ok && a.cfg.OmegaBins {
		a.omegaOn, a.omegaQ = true, k
		a.nO = int(math.Round((omegaHi - omegaLo) / omegaStep))
		a.omegaM = make([]stats.Moments, nd*a.ns*nr*a.nO)
		a.omegaArea = make([]float64, nd*a.ns*a.nO)
		a.omegaCount = make([]int64, nd*a.ns*a.nO)
		a.omegaTotal = make([]float64, nd*a.ns)
		a.omegaOut = make([]int64, nd*a.ns)
		a.stepOmega = newStepMoments(len(a.omegaM), func(i int) *stats.Moments { return &a.omegaM[i] })
	}
	return nil
}

// setPatches sets the warming patches: each patch's cells (by cell
// centre) and its per-ΔT sums.
func (a *Acc) setPatches(quantityIndex) error {
	l := a.l
	for _, p := range a.cfg.Patches {
		pa := patchAcc{p: p, inside: make([]bool, l.NLat*l.NLon), sums: make([]flipSums, len(a.cfg.DeltaT)), fMin: math.Inf(1), fMax: math.Inf(-1)}
		r := p.region()
		for j := 0; j < l.NLat; j++ {
			for i := 0; i < l.NLon; i++ {
				if r.Contains(l.Lat[j], l.Lon[i]) {
					c := j*l.NLon + i
					pa.inside[c] = true
					pa.cells = append(pa.cells, c)
				}
			}
		}
		if len(pa.cells) == 0 {
			return fmt.Errorf("relations: patch %q (%g…%g N, %g…%g E) contains no grid cell centre", p.Name, p.South, p.North, p.West, p.East)
		}
		a.patches = append(a.patches, pa)
	}
	return nil
}

// setIndicator sets the convection indicator of the threshold-crossing
// frequencies, when configured.
func (a *Acc) setIndicator(qi quantityIndex) error {
	cfg := a.cfg
	if cfg.Indicator == "" {
		return nil
	}
	k, ok := qi.k[cfg.Indicator]
	if !ok {
		return fmt.Errorf("relations: the convection indicator %q is not a quantity of the run (layout has %v); add it to the run's inputs or set Config.Indicator = \"\"", cfg.Indicator, qi.l.Quantities)
	}
	a.indQ = k
	a.indThr = cfg.indicatorThreshold()
	a.nthr = int(math.Round((cfg.ThresholdRange[1] - cfg.ThresholdRange[0]) / cfg.ThresholdBinWidth))
	return nil
}

// allocScratch allocates AddStep's per-step scratch and lists the band
// cells.
func (a *Acc) allocScratch() {
	nr, nk := len(a.resp), len(a.cfg.DeltaT)
	a.scratchX = make([]float64, len(a.xs))
	a.scratchBin = make([]int, len(a.preds))
	a.scratchRaw = make([]float64, len(a.xs))
	a.scratchR = make([]float64, nr)
	a.scratchRawR = make([]float64, nr)
	a.scratchVec = make([]float64, a.K)
	a.scratchShiftIn = make([]float64, nk)
	a.scratchShiftOut = make([]float64, nk)
	for i, w := range a.l.BandWeight {
		if w > 0 {
			a.bandCells = append(a.bandCells, i)
		}
	}
	a.layoutQuantitiesString = fmt.Sprint(a.l.Quantities)
}

// The bin-edge rule, for every binning of the package: a sample is binned
// by its value as the run holds it — per-column quantities and relative
// SST are float32 slabs, widened exactly to float64 — compared exactly with
// the float64 edges (given edges as written; uniform edges as lo + k·w, one
// rounding each, as edges() makes them). Each bin includes its lower edge,
// the last bin also its upper edge; anything else is out of range. So a
// value is never moved across an edge by the arithmetic of finding its bin,
// and a reference that computes in float64 reproduces the counts once it
// rounds its values to float32 (e.g. float32(0.7) = 0.699999988 lies below
// an edge at 0.7, float32(0.1) = 0.100000001 above one at 0.1).

// binOf returns the bin of x among edges (lower edge inclusive, the last
// bin also includes its upper edge), -1 outside.
func binOf(e []float64, x float64) int {
	n := len(e) - 1
	if !(x >= e[0]) || !(x <= e[n]) {
		return -1
	}
	b := sort.SearchFloat64s(e, x) // first edge >= x
	if b < len(e) && e[b] == x {
		if b == n {
			return n - 1
		}
		return b
	}
	return b - 1
}

// uniformBin returns the bin of x among the n+1 edges lo + k·w, k = 0…n
// (the bin-edge rule above: lower edge inclusive, the last bin also its
// upper edge), -1 outside or NaN. The division only guesses the bin; the
// comparisons with the edges decide it.
func uniformBin(x, lo, w float64, n int) int {
	if !(x >= lo) || !(x <= lo+float64(n)*w) {
		return -1
	}
	b := min(max(int(math.Floor((x-lo)/w)), 0), n-1)
	for b > 0 && x < lo+float64(b)*w {
		b--
	}
	for b < n-1 && x >= lo+float64(b+1)*w {
		b++
	}
	return b
}

// convective reports whether the indicator marks convection.
func (a *Acc) convective(v float64) bool {
	if a.cfg.Indicator == IndicatorPrecip {
		return v > a.indThr
	}
	return v < a.indThr
}

// AddStep adds one time step. The pipeline calls it serially, in time order.
func (a *Acc) AddStep(s *accumulate.Step) {
	if a.cfg.Mode == Anomaly && a.clim == nil {
		panic("relations: AddStep on a decoded anomaly-mode accumulator, which keeps only a fingerprint of its climatology (DecodeAcc): it can Merge and give Results; for more steps build an accumulator with New and the climatology")
	}
	seq := int32(len(a.steps))
	nd, nr := len(a.doms), len(a.resp)
	rec := stepRec{label: s.Label, year: s.Year, month: s.Month, tropMean: s.TropMean}
	buf := make([]float64, nd*nreg*nr*(a.K+a.K*a.K))
	rec.cm = make([]CoMoments, nd*nreg*nr)
	for k := range rec.cm {
		o := k * (a.K + a.K*a.K)
		rec.cm[k] = CoMoments{K: a.K, Mean: buf[o : o+a.K : o+a.K], C: buf[o+a.K : o+a.K+a.K*a.K : o+a.K+a.K*a.K]}
	}
	season := seasonOf(s.Month)
	sl := [2]int{0, season}
	nsl := 1
	if a.ns > 1 && season > 0 {
		nsl = 2
	}
	anom := a.cfg.Mode == Anomaly
	nq := len(a.l.Quantities)
	xv, xraw, rv, rraw, vec := a.scratchX, a.scratchRaw, a.scratchR, a.scratchRawR, a.scratchVec
	np := len(a.preds)
	for _, i := range a.cells {
		g := s.Regime[i]
		if g == regimes.Missing {
			continue
		}
		complete := true
		for k, q := range a.xq {
			var x float64
			if q < 0 {
				x = float64(s.Rel[i])
			} else {
				x = float64(s.Values[q][i])
			}
			xraw[k] = x
			if anom {
				v := q
				if q < 0 {
					v = nq
				}
				x -= a.clim.Value(i, v, s.Year, s.Month, a.cfg.Detrend)
			}
			xv[k] = x
			if x != x {
				complete = false
			}
		}
		for k, q := range a.rq {
			x := float64(s.Values[q][i])
			rraw[k] = x
			if anom {
				x -= a.clim.Value(i, q, s.Year, s.Month, a.cfg.Detrend)
			}
			rv[k] = x
		}
		copy(vec, xv)
		// each predictor's bin, once for all domains and seasons
		bins := a.scratchBin
		for p := 0; p < np; p++ {
			bins[p] = -2 // NaN
			if x := xv[a.predX[p]]; x == x {
				bins[p] = binOf(a.edges[p], x)
			}
		}
		for _, dw := range a.cellDom[i] {
			d, w := int(dw.d), dw.w
			if complete {
				for r := 0; r < nr; r++ {
					if y := rv[r]; y == y {
						vec[a.K-1] = y
						rec.cm[(d*nreg+int(g))*nr+r].add(vec, w)
					}
				}
			}
			for si := 0; si < nsl; si++ {
				ds := d*a.ns + sl[si]
				for p := 0; p < np; p++ {
					b := bins[p]
					if b == -2 {
						continue
					}
					if b < 0 {
						a.outCnt[(ds*nreg+int(g))*np+p]++
						continue
					}
					base := (ds*nreg+int(g))*nr*a.nbTot + a.boff[p] + b
					for r := 0; r < nr; r++ {
						if y := rv[r]; y == y {
							a.binned[base+r*a.nbTot].count(seq)
							a.stepBinned.add(base+r*a.nbTot, y, w)
						}
					}
				}
				if a.jointOn {
					xr, xe := xv[a.predX[a.jRel]], xv[a.predX[a.jEIS]]
					if xr == xr && xe == xe {
						a.jointTotal[ds] += w
						br, be := bins[a.jRel], bins[a.jEIS]
						if br >= 0 && be >= 0 {
							j := br*(len(a.edges[a.jEIS])-1) + be
							a.jointArea[ds*a.nJ+j] += w
							a.jointCount[ds*a.nJ+j]++
							for r := 0; r < nr; r++ {
								if y := rv[r]; y == y {
									a.stepJoint.add((ds*nr+r)*a.nJ+j, y, w)
								}
							}
						}
					}
				}
				if a.omegaOn {
					if om := float64(s.Values[a.omegaQ][i]); om == om {
						a.omegaTotal[ds] += w
						b := uniformBin(om/hPaPerDayToPaPerS, omegaLo, omegaStep, a.nO)
						if b < 0 {
							a.omegaOut[ds]++
						} else {
							a.omegaArea[ds*a.nO+b] += w
							a.omegaCount[ds*a.nO+b]++
							for r := 0; r < nr; r++ {
								if y := rraw[r]; y == y {
									a.stepOmega.add((ds*nr+r)*a.nO+b, y, w)
								}
							}
						}
					}
				}
			}
		}
	}
	a.stepBinned.flush()
	a.stepJoint.flush()
	a.stepOmega.flush()
	a.addFlips(s)
	if a.indQ >= 0 {
		rec.thr = make([]float64, 2*a.nthr)
		lo, wd := a.cfg.ThresholdRange[0], a.cfg.ThresholdBinWidth
		ind := s.Values[a.indQ]
		for i, w := range a.l.BandWeight {
			if w <= 0 || s.Regime[i] == regimes.Missing {
				continue
			}
			x, v := float64(s.Rel[i]), float64(ind[i])
			if x != x || v != v {
				continue
			}
			b := uniformBin(x, lo, wd, a.nthr)
			if b < 0 {
				a.thrOut++
				continue
			}
			a.thrN++
			a.thrW += w
			rec.thr[a.nthr+b] += w
			if a.convective(v) {
				rec.thr[b] += w
			}
		}
	}
	a.steps = append(a.steps, rec)
}

// addFlips adds the step's perturbation flips for every patch and ΔT: one
// pass over the patch's cells and one over the band cells outside it,
// testing every ΔT at each cell. Each ΔT's sums receive the same values in
// the same cell order as a pass per ΔT would give, so the results are the
// same bits.
func (a *Acc) addFlips(s *accumulate.Step) {
	if len(a.patches) == 0 {
		return
	}
	band := a.bandArea(s)
	if band == 0 {
		return
	}
	// The run's classifier, or the step's when the regime rule finds δ at
	// each step (held at its unperturbed value: see the README cautions).
	cl := a.cfg.Classifier
	if s.Classifier != nil {
		cl = *s.Classifier
	}
	nk := len(a.cfg.DeltaT)
	shiftIn, shiftOut := a.scratchShiftIn[:nk], a.scratchShiftOut[:nk]
	for pi := range a.patches {
		pa := &a.patches[pi]
		f := a.patchFraction(pa, s, band)
		for k, dt := range a.cfg.DeltaT {
			shiftIn[k], shiftOut[k] = dt*(1-f), -dt*f
		}
		a.flipsInside(pa, s, cl, shiftIn)
		a.flipsOutside(pa, s, cl, shiftOut)
	}
}

// bandArea is the band weight of the step's classified cells.
func (a *Acc) bandArea(s *accumulate.Step) float64 {
	var band float64
	for _, i := range a.bandCells {
		if s.Regime[i] != regimes.Missing {
			band += a.l.BandWeight[i]
		}
	}
	return band
}

// patchFraction returns f, the patch's share of the classified band
// weight (band) at step s, and adds it to the patch's mean, min and max.
func (a *Acc) patchFraction(pa *patchAcc, s *accumulate.Step, band float64) float64 {
	var in float64
	for _, i := range pa.cells {
		if w := a.l.BandWeight[i]; w > 0 && s.Regime[i] != regimes.Missing {
			in += w
		}
	}
	f := in / band
	pa.fSum += f
	pa.fSteps++
	pa.fMin = math.Min(pa.fMin, f)
	pa.fMax = math.Max(pa.fMax, f)
	return f
}

// flipsInside adds the patch's cells, relative SST shifted by shiftIn[k]
// for each ΔT k, to the inside sums (area-weighted).
func (a *Acc) flipsInside(pa *patchAcc, s *accumulate.Step, cl regimes.Classifier, shiftIn []float64) {
	nk := len(shiftIn)
	for _, i := range pa.cells {
		g := s.Regime[i]
		if g == regimes.Missing {
			continue
		}
		w := a.l.Area[i]
		x := float64(s.Rel[i])
		c0 := g == regimes.Convective
		for k := range nk {
			fs := &pa.sums[k]
			g2 := cl.Classify(x + shiftIn[k])
			fs.inArea += w
			c1 := g2 == regimes.Convective
			if g2 != g {
				fs.inChanged += w
			}
			if c0 {
				fs.inConvBefore += w
			}
			if c1 {
				fs.inConvAfter += w
			}
			if c1 && !c0 {
				fs.inToConv += w
			}
			if c0 && !c1 {
				fs.inFromConv += w
			}
		}
	}
}

// flipsOutside adds the band cells outside the patch, relative SST
// shifted by shiftOut[k] for each ΔT k, to the outside sums (band
// weight).
func (a *Acc) flipsOutside(pa *patchAcc, s *accumulate.Step, cl regimes.Classifier, shiftOut []float64) {
	nk := len(shiftOut)
	// A cell outside the patch whose relative SST is farther from the
	// regime thresholds than twice the largest shift keeps its regime
	// for every ΔT: its sums get, in the same order, exactly the
	// additions the general loop below would make (area, convective
	// before and after), so the results are the same bits.
	maxShift := 0.0
	for _, sh := range shiftOut {
		maxShift = math.Max(maxShift, math.Abs(sh))
	}
	stableAbove, stableBelow := cl.Delta+cl.HalfWidth+2*maxShift, cl.Delta-cl.HalfWidth-2*maxShift
	for _, i := range a.bandCells {
		g := s.Regime[i]
		if g == regimes.Missing || pa.inside[i] {
			continue
		}
		w := a.l.BandWeight[i]
		x := float64(s.Rel[i])
		c0 := g == regimes.Convective
		if (c0 && x > stableAbove) || (g == regimes.Subsidence && x < stableBelow) {
			for k := range nk {
				fs := &pa.sums[k]
				fs.outArea += w
				if c0 {
					fs.outConvBefore += w
					fs.outConvAfter += w
				}
			}
			continue
		}
		a.flipOutsideCell(pa, cl, shiftOut, g, x, w)
	}
}

// flipOutsideCell adds one outside cell (regime g, relative SST x, band
// weight w) that may change regime to the outside sums of every ΔT.
func (a *Acc) flipOutsideCell(pa *patchAcc, cl regimes.Classifier, shiftOut []float64, g regimes.Regime, x, w float64) {
	c0 := g == regimes.Convective
	for k := range shiftOut {
		fs := &pa.sums[k]
		fs.outArea += w
		if c0 {
			fs.outConvBefore += w
		}
		if shiftOut[k] == 0 {
			if c0 {
				fs.outConvAfter += w
			}
			continue
		}
		g2 := cl.Classify(x + shiftOut[k])
		c1 := g2 == regimes.Convective
		if g2 != g {
			fs.outChanged += w
		}
		if c1 {
			fs.outConvAfter += w
		}
		if c1 && !c0 {
			fs.outToConv += w
		}
		if c0 && !c1 {
			fs.outFromConv += w
		}
	}
}

// Steps is the number of time steps added (merged ones included).
func (a *Acc) Steps() int { return len(a.steps) }

// Merge appends b, which must have the same configuration and layout and
// cover the time steps right after a's. In anomaly mode both must have
// taken their anomalies against the same climatology (the same pointer, or
// identical contents: see DecodeAcc); Merge refuses pieces whose
// climatologies differ, since their merged anomalies would not be those of
// one pass over the record.
func (a *Acc) Merge(b *Acc) error {
	if b == nil {
		return fmt.Errorf("relations: cannot merge a nil accumulator")
	}
	if a.cfg.Text() != b.cfg.Text() {
		return fmt.Errorf("relations: cannot merge accumulators with different configurations:\n%s\nvs\n%s", a.cfg.Text(), b.cfg.Text())
	}
	if len(a.cellDom) != len(b.cellDom) || a.layoutQuantitiesString != b.layoutQuantitiesString || fmt.Sprint(a.resp) != fmt.Sprint(b.resp) {
		return fmt.Errorf("relations: cannot merge accumulators of different layouts (%d vs %d cells, quantities %s vs %s)", len(a.cellDom), len(b.cellDom), a.layoutQuantitiesString, b.layoutQuantitiesString)
	}
	for k := range a.l.Lat {
		if a.l.Lat[k] != b.l.Lat[k] {
			return fmt.Errorf("relations: cannot merge: latitude %d differs (%g vs %g)", k, a.l.Lat[k], b.l.Lat[k])
		}
	}
	for k := range a.l.Lon {
		if a.l.Lon[k] != b.l.Lon[k] {
			return fmt.Errorf("relations: cannot merge: longitude %d differs (%g vs %g)", k, a.l.Lon[k], b.l.Lon[k])
		}
	}
	if err := a.sameClimatology(b); err != nil {
		return err
	}
	off := int32(len(a.steps))
	for i := range a.binned {
		x, y := &a.binned[i], &b.binned[i]
		x.m.Merge(y.m)
		x.steps += y.steps
		if y.last >= 0 {
			x.last = y.last + off
		}
	}
	for i := range a.outCnt {
		a.outCnt[i] += b.outCnt[i]
	}
	for i := range a.jointM {
		a.jointM[i].Merge(b.jointM[i])
	}
	for i := range a.jointArea {
		a.jointArea[i] += b.jointArea[i]
		a.jointCount[i] += b.jointCount[i]
	}
	for i := range a.jointTotal {
		a.jointTotal[i] += b.jointTotal[i]
	}
	for i := range a.omegaM {
		a.omegaM[i].Merge(b.omegaM[i])
	}
	for i := range a.omegaArea {
		a.omegaArea[i] += b.omegaArea[i]
		a.omegaCount[i] += b.omegaCount[i]
	}
	for i := range a.omegaTotal {
		a.omegaTotal[i] += b.omegaTotal[i]
		a.omegaOut[i] += b.omegaOut[i]
	}
	for p := range a.patches {
		x, y := &a.patches[p], &b.patches[p]
		for k := range x.sums {
			u, v := &x.sums[k], y.sums[k]
			u.inArea += v.inArea
			u.inChanged += v.inChanged
			u.inToConv += v.inToConv
			u.inFromConv += v.inFromConv
			u.inConvBefore += v.inConvBefore
			u.inConvAfter += v.inConvAfter
			u.outArea += v.outArea
			u.outChanged += v.outChanged
			u.outToConv += v.outToConv
			u.outFromConv += v.outFromConv
			u.outConvBefore += v.outConvBefore
			u.outConvAfter += v.outConvAfter
		}
		x.fSum += y.fSum
		x.fSteps += y.fSteps
		x.fMin = math.Min(x.fMin, y.fMin)
		x.fMax = math.Max(x.fMax, y.fMax)
	}
	a.thrN += b.thrN
	a.thrW += b.thrW
	a.thrOut += b.thrOut
	a.steps = append(a.steps, b.steps...)
	return nil
}
