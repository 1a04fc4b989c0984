package pipeline

import (
	"fmt"
	"math"
	"sync"

	"lidscope/accumulate"
	"lidscope/factors"
	"lidscope/metrics"
	"lidscope/regimes"
	"lidscope/vocab"
)

// Stage 4, step compute: find the ocean columns, the
// tropical-mean SST, the relative SST and the regimes, and assemble the
// step that the blocks and the sinks consume.
//
// Stage 5, block worker: the column metrics and the per-column
// accumulation, in parallel over fixed blocks of grid rows.

// rowsPerBlock is fixed, so that results do not depend on the worker count.
const rowsPerBlock = 4

// quantity names accumulated per column, in output order
const (
	qSST  = vocab.SST
	qT700 = vocab.T700
)

// stepper holds what the step compute and block stages need for every
// step, and two sets of per-step outputs: the sinks use one step's while
// the next step is computed into the other.
type stepper struct {
	p       *Plan
	in      *inputs
	kern    *metrics.Kernel
	ocean   []bool    // static ocean mask
	bandW   []float64 // area inside the tropical band
	blocks  []block
	workers int

	kq       []vocab.Quantity // the kernel quantities (vocab.Computed)
	fq       []string         // the factor quantities the run adds
	f64      [3][]float64     // scratch: SST, u, v of the advection
	outs     [2]stepOut
	oceanNow []bool
}

// stepOut is one step's computed slabs.
type stepOut struct {
	rel []float32
	reg []regimes.Regime
	// kernel are the slabs of the quantities the metrics kernel computes
	// (vocab.Computed of the conventions, in table order: lts, eis and
	// ectei when on); nil without T700.
	kernel [][]float32
	// factor are the slabs of the factor quantities the run computes
	// (Plan.factorQuantities order; nil for those read as they are).
	factor [][]float32
}

func newStepper(p *Plan, in *inputs, kern *metrics.Kernel, ocean []bool, bandW []float64) *stepper {
	n := in.grid.Size()
	s := &stepper{p: p, in: in, kern: kern, ocean: ocean, bandW: bandW, workers: p.Workers, oceanNow: make([]bool, n)}
	s.kq = s.computed()
	s.fq = p.factorQuantities(nil)
	for o := range s.outs {
		out := &s.outs[o]
		for _, f := range s.fq {
			var x []float32
			if f == vocab.TAdv || f == vocab.WindSpeed || (f == vocab.RH700 && in.fRH == nil) {
				x = make([]float32, n)
			}
			out.factor = append(out.factor, x)
		}
		out.rel, out.reg = make([]float32, n), make([]regimes.Regime, n)
		if in.t700 != nil {
			for range s.computed() {
				out.kernel = append(out.kernel, make([]float32, n))
			}
		}
	}
	if s.workers <= 0 {
		s.workers = defaultWorkers()
	}
	nlat, nlon := in.grid.NLat(), in.grid.NLon()
	for j := 0; j < nlat; j += rowsPerBlock {
		b := block{lo: j * nlon, hi: min(j+rowsPerBlock, nlat) * nlon}
		for i := b.lo; i < b.hi; i++ {
			if ocean[i] {
				b.ocean = append(b.ocean, int32(i))
			}
		}
		s.blocks = append(s.blocks, b)
	}
	// Metrics are computed for ocean columns only; the others stay NaN.
	nan := float32(math.NaN())
	for o := range s.outs {
		for _, x := range s.outs[o].kernel {
			for i := range x {
				if !ocean[i] {
					x[i] = nan
				}
			}
		}
	}
	return s
}

// block is a fixed range of cells, [lo, hi), and its cells that are ocean
// in the static mask (the only ones whose metrics are computed: elsewhere
// the regime is always missing, so no statistic uses them).
type block struct {
	lo, hi int
	ocean  []int32
}

// packed holds a worker's gathered ocean columns of one block.
type packed struct {
	in  [6][]float32 // Ts, T700, Ps, Humidity, T850, Q700
	out [][]float32  // the kernel quantities, as stepOut.kernel
	dst [][]float32  // scratch: the slabs handed to the kernel
}

// computed are the quantities the metrics kernel computes for the plan
// (the table of names, package vocab).
func (s *stepper) computed() []vocab.Quantity { return vocab.Computed(s.p.Metrics) }

// slabOutput points the kernel's outputs at dst (one slab per computed
// quantity, as stepOut.kernel), each through its table row's Slab.
func (s *stepper) slabOutput(dst [][]float32) metrics.SlabOutput {
	var o metrics.SlabOutput
	for k, q := range s.kq {
		q.Slab(&o, dst[k])
	}
	return o
}

// metricsOf computes the metrics of the block's ocean columns into res
// (gathering them when the block has land) and returns the kernel's counts.
func (s *stepper) metricsOf(b block, mi metrics.SlabInput, res *stepOut, pk *packed) (metrics.SlabStats, error) {
	if len(b.ocean) == 0 {
		return metrics.SlabStats{}, nil
	}
	if len(b.ocean) == b.hi-b.lo {
		pk.dst = pk.dst[:0]
		for _, x := range res.kernel {
			pk.dst = append(pk.dst, x[b.lo:b.hi])
		}
		return s.kern.Slab(sub(mi, b.lo, b.hi), s.slabOutput(pk.dst))
	}
	n := len(b.ocean)
	src := [6][]float32{mi.Ts, mi.T700, mi.Ps, mi.Humidity, mi.T850, mi.Q700}
	var g [6][]float32
	for k, x := range src {
		if x == nil {
			continue
		}
		if cap(pk.in[k]) < n {
			pk.in[k] = make([]float32, n)
		}
		g[k] = pk.in[k][:n]
		for j, c := range b.ocean {
			g[k][j] = x[c]
		}
	}
	dst := res.kernel
	if len(pk.out) < len(dst) {
		pk.out = make([][]float32, len(dst))
	}
	pk.dst = pk.dst[:0]
	for k := range dst {
		if cap(pk.out[k]) < n {
			pk.out[k] = make([]float32, n)
		}
		pk.dst = append(pk.dst, pk.out[k][:n])
	}
	o := pk.dst
	st, err := s.kern.Slab(metrics.SlabInput{Ts: g[0], T700: g[1], Ps: g[2], Humidity: g[3], T850: g[4], Q700: g[5]},
		s.slabOutput(o))
	if err != nil {
		return st, err
	}
	for k, x := range dst {
		for j, c := range b.ocean {
			x[c] = o[k][j]
		}
	}
	return st, nil
}

// quantities are the names of the per-column quantities, in the order of
// Step.Values (Plan.Quantities: decided by which inputs the plan has), and
// the analysis cloud's name ("" without a cloud input).
func quantities(p *Plan, in *inputs) (names []string, cloud string) {
	return p.Quantities(), p.cloudQuantity()
}

// prepare runs the step compute stage on the slabs v of step st (by field
// slot; the reader has checked them) into output set o, and returns the
// step and the metrics input; the step's LTS, EIS (and ECTEI) slices are
// filled by the blocks.
func (s *stepper) prepare(st stepRef, v [][]float32, o int) (*accumulate.Step, metrics.SlabInput, error) {
	in := s.in
	out := &s.outs[o]
	sstV := v[in.sst.slot]
	var ice []float32
	if in.seaIce != nil {
		ice = v[in.seaIce.slot]
	}
	stepOcean(s.oceanNow, s.ocean, sstV, ice, s.p.MaxSeaIce)
	mean, _, ok := regimes.TropicalMean(sstV, s.bandW, s.oceanNow)
	if !ok {
		return nil, metrics.SlabInput{}, noBandSST(in.sst, sstV, s.bandW, s.ocean, st, s.p.Regimes.Band)
	}
	regimes.Relative(sstV, mean, s.oceanNow, out.rel)
	cls, _ := s.p.Regimes.StepClassifier(out.rel, s.bandW, s.oceanNow) // ok: the band has valid ocean (the mean above)
	cls.ClassifySlab(out.rel, out.reg)
	var stepCls *regimes.Classifier
	if !s.p.Regimes.Fixed() {
		stepCls = &cls
	}

	slot := func(f *field) []float32 {
		if f == nil {
			return nil
		}
		return v[f.slot]
	}
	var mi metrics.SlabInput    // empty without T700: no metrics to compute
	values := [][]float32{sstV} // in the order of Plan.Quantities
	if in.t700 != nil {
		mi = metrics.SlabInput{Ts: sstV, T700: v[in.t700.slot], Ps: slot(in.surfacePressure),
			Humidity: slot(in.humidity), T850: slot(in.t850), Q700: slot(in.q700)}
		if in.surfaceAir != nil {
			mi.Ts = v[in.surfaceAir.slot]
		}
		values = append(values, v[in.t700.slot])
		values = append(values, out.kernel...)
	}
	if in.cloud != nil {
		values = append(values, v[in.cloud.slot])
	}
	for _, e := range in.extras {
		values = append(values, v[e.slot])
	}
	values = append(values, s.factorValues(v, sstV, out)...)
	step := &accumulate.Step{Label: st.label, Year: st.year, Month: st.month, TropMean: mean, Rel: out.rel, Regime: out.reg, Values: values, Classifier: stepCls}
	return step, mi, nil
}

// sub returns the cells [lo, hi) of a slab input.
func sub(in metrics.SlabInput, lo, hi int) metrics.SlabInput {
	cut := func(x []float32) []float32 {
		if x == nil {
			return nil
		}
		return x[lo:hi]
	}
	return metrics.SlabInput{Ts: cut(in.Ts), T700: cut(in.T700), Ps: cut(in.Ps), Humidity: cut(in.Humidity), T850: cut(in.T850), Q700: cut(in.Q700)}
}

// runBlocks runs the block workers over the step (computed into output set
// o): metrics into the step's LTS/EIS/ECTEI slices, then the per-column
// accumulation of acc. It returns the number of columns with impossible
// inputs.
func (s *stepper) runBlocks(step *accumulate.Step, mi metrics.SlabInput, o int, acc *accumulate.Acc) (int, error) {
	res := &s.outs[o]
	var wg sync.WaitGroup
	var mu sync.Mutex
	var firstErr error
	rejected := 0
	next := make(chan block, len(s.blocks))
	for _, bl := range s.blocks {
		next <- bl
	}
	close(next)
	for w := 0; w < s.workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var pk packed
			for bl := range next {
				if res.kernel == nil {
					// no T700: no column metrics, only the accumulation
					acc.AddCells(step, bl.lo, bl.hi)
					continue
				}
				st, err := s.metricsOf(bl, mi, res, &pk)
				mu.Lock()
				if err != nil && firstErr == nil {
					firstErr = err
				}
				// Impossible inputs over ocean are counted; land is not computed.
				rejected += st.Rejected
				mu.Unlock()
				acc.AddCells(step, bl.lo, bl.hi)
			}
		}()
	}
	wg.Wait()
	if firstErr != nil {
		return rejected, fmt.Errorf("time step %s: %w", step.Label, firstErr)
	}
	return rejected, nil
}

// factorValues returns the slabs of the factor quantities (Plan.Factors):
// rh700 as read, or from specific humidity and T700 at 700 hPa
// (metrics.SVPFormula.RelativeHumidityQ with the conventions' formula);
// omega700 as read; t_adv by factors.Advection of the SST of the ocean
// columns (NaN elsewhere, so coasts take one-sided differences) by the
// near-surface winds, periodic across the dateline on a global grid;
// wind_speed √(u² + v²).
func (s *stepper) factorValues(v [][]float32, sstV []float32, out *stepOut) [][]float32 {
	if len(s.fq) == 0 {
		return nil
	}
	in := s.in
	nan := float32(math.NaN())
	var vals [][]float32
	for k, f := range s.fq {
		dst := out.factor[k]
		switch f {
		case vocab.RH700:
			if in.fRH != nil {
				dst = v[in.fRH.slot]
				break
			}
			q, t := v[in.fQ.slot], v[in.t700.slot]
			c := s.p.Metrics
			for i := range dst {
				dst[i] = float32(c.SVP.RelativeHumidityQ(float64(q[i]), float64(t[i]), metrics.P700, c.Constants))
			}
		case vocab.Omega700:
			dst = v[in.fOmega.slot]
		case vocab.WindSpeed:
			u, w := v[in.fU.slot], v[in.fV.slot]
			for i := range dst {
				dst[i] = float32(math.Hypot(float64(u[i]), float64(w[i])))
			}
		case vocab.TAdv:
			n := len(sstV)
			for j := range s.f64 {
				if len(s.f64[j]) != n {
					s.f64[j] = make([]float64, n)
				}
			}
			u, w := v[in.fU.slot], v[in.fV.slot]
			for i := 0; i < n; i++ {
				x := math.NaN()
				if s.oceanNow[i] {
					x = float64(sstV[i])
				}
				s.f64[0][i], s.f64[1][i], s.f64[2][i] = x, float64(u[i]), float64(w[i])
			}
			g := in.grid
			adv, err := factors.Advection(s.f64[0], s.f64[1], s.f64[2], g.Lat, g.Lon, factors.PeriodicLongitudes(g.Lon))
			for i := range dst {
				dst[i] = nan
				if err == nil {
					dst[i] = float32(adv[i])
				}
			}
		}
		vals = append(vals, dst)
	}
	return vals
}
