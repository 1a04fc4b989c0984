// Package pipeline runs lidscope's main job for one dataset in a single
// streaming pass over time: read each time step of every field (package cf,
// one reader goroutine, since netCDF-C is serialised anyway), align them on
// one grid (package regrid) and one time axis, compute column metrics
// (package metrics) and regimes (package regimes) in parallel over fixed
// blocks of grid rows, and fold everything into a mergeable accumulator
// (package accumulate). Memory is bounded by a few slabs per field,
// whatever the length of the record; results do not depend on the number
// of workers.
package pipeline

import (
	"context"
	"fmt"
	"log/slog"
	"math"
	"runtime"
	"sort"
	"strings"
	"sync"

	"lidscope/accumulate"
	"lidscope/calendar"
	"lidscope/cf"
	"lidscope/grid"
	"lidscope/metrics"
	"lidscope/regimes"
	"lidscope/regrid"
	"lidscope/units"
)

// Input is one role's files and how to read them.
type Input struct {
	Paths []string
	Spec  cf.Spec
}

// Ocean says which columns are ocean.
type Ocean struct {
	// Kind: "sst" (ocean wherever SST is present), "fraction" (a land or sea
	// area fraction field) or "categorical" (a mask whose listed values mean ocean).
	Kind        string
	Input       *Input  // the mask field, for fraction and categorical
	MinFraction float64 // fraction: ocean where the ocean fraction ≥ this (default 0.5)
	OceanValues []float64
}

// GridPlan chooses the analysis grid when fields come on different grids.
type GridPlan struct {
	// Target: "" (every field must be on SST's grid), a role whose grid is
	// used, or a regular resolution such as "2deg".
	Target        string
	Methods       map[cf.Role]regrid.Method
	MinCoverage   float64 // conservative remapping (default 0.5)
	MaskThreshold float64 // masks are remapped as fractions and thresholded (default 0.5)
}

// Plan is everything a run needs.
type Plan struct {
	Dataset string
	SST     Input
	T700    Input
	Cloud   Input
	// Optional inputs (nil when absent).
	SurfaceAir      *Input // surface air temperature, when the metrics conventions uses it
	SurfacePressure *Input
	Humidity        *Input // RH, dew point or specific humidity, per the metrics conventions
	T850            *Input
	Q700            *Input
	SeaIce          *Input
	MaxSeaIce       float64 // columns with more sea ice are excluded
	Extras          []Input // further fields composited by regime (e.g. toa_sw_up)

	Ocean      Ocean
	Metrics    metrics.Conventions
	Classifier regimes.Classifier
	Band       regimes.Band
	Regions    []accumulate.Region
	Grid       GridPlan
	// Select keeps a time step (nil keeps all).
	Select  func(year, month int) bool
	Workers int // 0: GOMAXPROCS
	Log     *slog.Logger
	// Progress, when set, is called after each time step.
	Progress func(done, total int)
	// Sinks receive every time step, in time order, after the run's own
	// accumulator (e.g. relationship statistics). The step's slices are
	// reused for the next step: a sink must copy what it keeps.
	Sinks []StepSink
	// NewSinks, when set, makes further sinks once the analysis layout is
	// known (grid, areas, band weights, quantities).
	NewSinks func(l accumulate.Layout) ([]StepSink, error)
}

// StepSink consumes the time steps of a run.
type StepSink interface {
	AddStep(s *accumulate.Step)
}

// Result is what a run produces.
type Result struct {
	Acc          *accumulate.Acc
	Grid         *grid.Grid
	Labels       []string        // kept time steps
	Dates        []calendar.Date // their SST time stamps
	Sampling     cf.Step         // monthly, daily, climatology, …
	StepsPerYear float64
	Calendar     string
	Notes        []string // conversions, reorderings, drops, in plain words
	Paths        map[cf.Role][]string
	Rejected     int // columns with physically impossible inputs (metrics NaN)
}

// field is an opened input on its way to the analysis grid.
type field struct {
	role  cf.Role
	f     *cf.Field
	w     *regrid.Weights // nil when already on the analysis grid
	index map[string]int  // time key → step
	buf   []float32       // native grid
	out   []float32       // analysis grid (== buf when w is nil)
	s     cf.Scratch
	// studyUnits is true when the units come from the study, not the file.
	studyUnits bool
}

// quantity names accumulated per column, in output order
const (
	qSST   = "sst"
	qT700  = "t700"
	qLTS   = "lts"
	qEIS   = "eis"
	qECTEI = "ectei"
)

// Run executes the plan.
func Run(ctx context.Context, p Plan) (*Result, error) {
	log := p.Log
	if log == nil {
		log = slog.New(slog.DiscardHandler)
	}
	if err := p.Classifier.Validate(); err != nil {
		return nil, err
	}
	if err := p.Band.Validate(); err != nil {
		return nil, err
	}
	kern, err := metrics.NewKernel(p.Metrics)
	if err != nil {
		return nil, fmt.Errorf("metrics conventions: %w", err)
	}
	res := &Result{Paths: map[cf.Role][]string{}}
	var opened []*field
	defer func() {
		for _, f := range opened {
			f.f.Close()
		}
	}()
	open := func(in Input) (*field, error) {
		f, err := cf.Open(in.Paths, in.Spec)
		if err != nil {
			return nil, err
		}
		fd := &field{role: in.Spec.Role, f: f, studyUnits: in.Spec.Units != ""}
		opened = append(opened, fd)
		res.Paths[in.Spec.Role] = append(res.Paths[in.Spec.Role], f.Paths()...)
		for _, n := range f.Notes {
			res.Notes = append(res.Notes, fmt.Sprintf("%s (%s): %s", in.Spec.Role, f.Var, n))
		}
		return fd, nil
	}
	sst, err := open(p.SST)
	if err != nil {
		return nil, err
	}
	if sst.f.Time == nil {
		return nil, fmt.Errorf("role sst: %s has no time axis; lidscope needs a record of time steps (a climatology must be declared with 12 steps)", strings.Join(sst.f.Paths(), ", "))
	}
	t700, err := open(p.T700)
	if err != nil {
		return nil, err
	}
	cloud, err := open(p.Cloud)
	if err != nil {
		return nil, err
	}
	required := []*field{sst, t700, cloud}
	optional := map[string]*Input{"surface air temperature": p.SurfaceAir, "surface pressure": p.SurfacePressure,
		"humidity": p.Humidity, "T850": p.T850, "q700": p.Q700, "sea ice": p.SeaIce}
	opt := map[string]*field{}
	for _, name := range sortedKeys(optional) {
		in := optional[name]
		if in == nil {
			continue
		}
		fd, err := open(*in)
		if err != nil {
			return nil, err
		}
		opt[name] = fd
	}
	var extras []*field
	for _, in := range p.Extras {
		fd, err := open(in)
		if err != nil {
			return nil, err
		}
		extras = append(extras, fd)
	}
	var maskF *field
	if p.Ocean.Kind == "fraction" || p.Ocean.Kind == "categorical" {
		if p.Ocean.Input == nil {
			return nil, fmt.Errorf("ocean mask %q needs a mask input", p.Ocean.Kind)
		}
		if maskF, err = open(*p.Ocean.Input); err != nil {
			return nil, err
		}
	} else if p.Ocean.Kind != "" && p.Ocean.Kind != "sst" {
		return nil, fmt.Errorf("unknown ocean mask kind %q (sst, fraction or categorical)", p.Ocean.Kind)
	}

	// Analysis grid.
	all := append(append([]*field{}, required...), extras...)
	for _, name := range sortedKeys(opt) {
		all = append(all, opt[name])
	}
	if maskF != nil {
		all = append(all, maskF)
	}
	target, err := analysisGrid(p.Grid, all)
	if err != nil {
		return nil, err
	}
	res.Grid = target
	if err := attachWeights(p.Grid, target, all, &res.Notes); err != nil {
		return nil, err
	}
	n := target.Size()
	for _, f := range all {
		f.buf = make([]float32, f.f.Len())
		if f.w == nil {
			f.out = f.buf
		} else {
			f.out = make([]float32, n)
		}
	}

	// Time alignment on SST's axis.
	stepsPerYear, steps, dropped, err := align(sst, all, maskF, p.Select)
	if err != nil {
		return nil, err
	}
	res.StepsPerYear = stepsPerYear
	res.Calendar = sst.f.Time.Calendar
	res.Sampling = sst.f.Time.Step
	res.Notes = append(res.Notes, dropped...)
	if len(steps) == 0 {
		return nil, fmt.Errorf("no time step is common to every input after the time selection (%s); the inputs cover: %s; give files of one period for every role, or a time range (time.start, time.end) that they share", strings.Join(dropped, "; "), coverage(all, maskF))
	}
	log.Info("aligned", "dataset", p.Dataset, "steps", len(steps), "grid", target.String())

	// Static ocean mask.
	ocean := make([]bool, n)
	for i := range ocean {
		ocean[i] = true
	}
	if maskF != nil {
		if err := readMask(maskF, p.Ocean, p.Grid, ocean); err != nil {
			return nil, err
		}
	}

	area := target.CellAreas()
	lb := make([][2]float64, target.NLat())
	copy(lb, target.LatBounds)
	bandW := p.Band.Weights(lb, area)
	// The analysis cloud is named by its role (low_cloud or cloud), so
	// that outputs describe it correctly; Layout.Cloud says which it is.
	cloudQ := string(p.Cloud.Spec.Role)
	quantities := []string{qSST, qT700, qLTS, qEIS, cloudQ}
	if p.Metrics.ECTEI {
		quantities = append(quantities, qECTEI)
	}
	for _, e := range extras {
		quantities = append(quantities, string(e.role))
	}
	acc, err := accumulate.New(accumulate.Layout{NLat: target.NLat(), NLon: target.NLon(), Lat: target.Lat, Lon: target.Lon,
		Area: area, BandWeight: bandW, Quantities: quantities, Cloud: cloudQ, Regions: p.Regions})
	if err != nil {
		return nil, err
	}
	res.Acc = acc
	sinks := append([]StepSink{}, p.Sinks...)
	if p.NewSinks != nil {
		more, err := p.NewSinks(acc.L)
		if err != nil {
			return nil, err
		}
		sinks = append(sinks, more...)
	}

	workers := p.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	type slabs struct {
		k   int
		err error
	}
	// Two step buffers: the reader fills one while the workers use the other.
	type stepBuf struct {
		vals map[*field][]float32
	}
	bufs := [2]stepBuf{{map[*field][]float32{}}, {map[*field][]float32{}}}
	for b := range bufs {
		for _, f := range all {
			if f == maskF {
				continue
			}
			bufs[b].vals[f] = make([]float32, n)
		}
	}
	ready := make(chan slabs, 1)
	free := make(chan int, 2)
	free <- 0
	free <- 1
	ctx, cancel := context.WithCancel(ctx)
	readerDone := make(chan struct{})
	// Stop the reader and wait for it before the deferred Close of the
	// fields runs, so no read can touch a closed file.
	defer func() { cancel(); <-readerDone }()
	go func() {
		defer close(readerDone)
		defer close(ready)
		for k, st := range steps {
			var b int
			select {
			case b = <-free:
			case <-ctx.Done():
				return
			}
			var err error
			for f, dst := range bufs[b].vals {
				if err = readAligned(f, st.idx[f], dst); err != nil {
					break
				}
			}
			select {
			case ready <- slabs{k: k*2 + b, err: err}:
			case <-ctx.Done():
				return
			}
			if err != nil {
				return
			}
		}
	}()

	rel := make([]float32, n)
	reg := make([]regimes.Regime, n)
	lts := make([]float32, n)
	eis := make([]float32, n)
	var ectei []float32
	if p.Metrics.ECTEI {
		ectei = make([]float32, n)
	}
	oceanNow := make([]bool, n)
	const rowsPerBlock = 4 // fixed, so results do not depend on the worker count
	nlon := target.NLon()
	var blocks [][2]int
	for j := 0; j < target.NLat(); j += rowsPerBlock {
		blocks = append(blocks, [2]int{j * nlon, min(j+rowsPerBlock, target.NLat()) * nlon})
	}
	rejected := 0
	for msg := range ready {
		if msg.err != nil {
			return nil, msg.err
		}
		k, b := msg.k/2, msg.k%2
		st := steps[k]
		v := bufs[b].vals
		for _, f := range all {
			if f == maskF {
				continue
			}
			if err := plausible(f, v[f], st); err != nil {
				return nil, err
			}
		}
		sstV := v[sst]
		for i := range oceanNow {
			oceanNow[i] = ocean[i] && sstV[i] == sstV[i]
		}
		if si := opt["sea ice"]; si != nil {
			for i, x := range v[si] {
				if x == x && float64(x) > p.MaxSeaIce {
					oceanNow[i] = false
				}
			}
		}
		mean, _, ok := regimes.TropicalMean(sstV, bandW, oceanNow)
		if !ok {
			return nil, noBandSST(sst, sstV, bandW, ocean, st, p.Band)
		}
		regimes.Relative(sstV, mean, oceanNow, rel)
		p.Classifier.ClassifySlab(rel, reg)
		ts := sstV
		if sa := opt["surface air temperature"]; sa != nil {
			ts = v[sa]
		}
		in := metrics.SlabInput{Ts: ts, T700: v[t700]}
		if f := opt["surface pressure"]; f != nil {
			in.Ps = v[f]
		}
		if f := opt["humidity"]; f != nil {
			in.Humidity = v[f]
		}
		if f := opt["T850"]; f != nil {
			in.T850 = v[f]
		}
		if f := opt["q700"]; f != nil {
			in.Q700 = v[f]
		}
		values := [][]float32{sstV, v[t700], lts, eis, v[cloud]}
		if ectei != nil {
			values = append(values, ectei)
		}
		for _, e := range extras {
			values = append(values, v[e])
		}
		step := &accumulate.Step{Label: st.label, Year: st.year, Month: st.month, TropMean: mean, Rel: rel, Regime: reg, Values: values}
		var wg sync.WaitGroup
		var mu sync.Mutex
		var firstErr error
		next := make(chan [2]int, len(blocks))
		for _, bl := range blocks {
			next <- bl
		}
		close(next)
		for w := 0; w < workers; w++ {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for bl := range next {
					lo, hi := bl[0], bl[1]
					sub := metrics.SlabInput{Ts: in.Ts[lo:hi], T700: in.T700[lo:hi]}
					if in.Ps != nil {
						sub.Ps = in.Ps[lo:hi]
					}
					if in.Humidity != nil {
						sub.Humidity = in.Humidity[lo:hi]
					}
					if in.T850 != nil {
						sub.T850 = in.T850[lo:hi]
					}
					if in.Q700 != nil {
						sub.Q700 = in.Q700[lo:hi]
					}
					out := metrics.SlabOutput{LTS: lts[lo:hi], EIS: eis[lo:hi]}
					if ectei != nil {
						out.ECTEI = ectei[lo:hi]
					}
					stt, err := kern.Slab(sub, out)
					mu.Lock()
					if err != nil && firstErr == nil {
						firstErr = err
					}
					// Impossible inputs over ocean are counted; land/missing are not.
					rejected += stt.Rejected
					mu.Unlock()
					acc.AddCells(step, lo, hi)
				}
			}()
		}
		wg.Wait()
		if firstErr != nil {
			return nil, fmt.Errorf("time step %s: %w", st.label, firstErr)
		}
		acc.AddStep(step)
		for _, sk := range sinks {
			sk.AddStep(step)
		}
		res.Labels = append(res.Labels, st.label)
		res.Dates = append(res.Dates, st.date)
		free <- b
		if p.Progress != nil {
			p.Progress(k+1, len(steps))
		}
		if err := ctx.Err(); err != nil {
			return nil, err
		}
	}
	if len(res.Labels) != len(steps) {
		return nil, fmt.Errorf("run stopped after %d of %d time steps", len(res.Labels), len(steps))
	}
	res.Rejected = rejected
	if rejected > 0 {
		res.Notes = append(res.Notes, fmt.Sprintf("%d column-steps had physically impossible inputs (temperatures outside 123–332 K, …) and were left out of LTS/EIS", rejected))
	}
	for _, f := range all {
		if c := f.f.NaNCount(); c > 0 {
			res.Notes = append(res.Notes, fmt.Sprintf("%s (%s): %d NaN values (not the declared fill value) treated as missing", f.role, f.f.Var, c))
		}
		if c := f.f.InfCount(); c > 0 {
			res.Notes = append(res.Notes, fmt.Sprintf("%s (%s): %d infinite values treated as missing", f.role, f.f.Var, c))
		}
	}
	return res, nil
}

// plausible fails when the values of a slab are impossible for the field's
// quantity: temperatures outside 150–350 K, cloud fractions outside 0–1
// (with the 0.05 tolerance of cf.CheckValues). Such values mean that the
// units attribute (or the study's units) does not describe the data — SST
// labelled K that holds degrees Celsius is the common case — or that a
// fill value is not declared; computing on would give wrong numbers
// without a word (an SST in °C read as K leaves the regimes unchanged, as
// they depend on SST differences only, but makes every LTS and EIS
// impossible).
func plausible(f *field, vals []float32, st stepRef) error {
	kind := f.f.Kind
	cloud := f.role == cf.RoleCloud || f.role == cf.RoleLowCloud
	if kind != units.Temperature && !cloud {
		return nil
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	valid := 0
	for _, x := range vals {
		if x == x {
			valid++
			lo, hi = math.Min(lo, float64(x)), math.Max(hi, float64(x))
		}
	}
	if valid == 0 {
		return nil
	}
	if kind == units.Temperature && lo >= 150 && hi <= 350 || cloud && lo >= -0.05 && hi <= 1.05 {
		return nil
	}
	why := strings.Join(cf.CheckValues(f.role, f.f.Conv, lo, hi, valid, len(vals)), "; ")
	if why == "" {
		why = fmt.Sprintf("values %.4g…%.4g %s are impossible for %s", lo, hi, kind.SI(), f.role)
	}
	src := fmt.Sprintf("units attribute %q", f.f.Conv.From)
	if f.studyUnits {
		src = fmt.Sprintf("units %q from the study, units.%s", f.f.Conv.From, f.role)
	}
	if !strings.Contains(why, "units.") {
		why += fmt.Sprintf("; check the units, and if the file marks missing data with a value it does not declare, add a _FillValue or missing_value attribute (e.g. ncatted -a _FillValue,%s,o,f,VALUE)", f.f.Var)
	}
	return fmt.Errorf("role %s, variable %s in %s (%s), time step %s: %s; lidscope stops rather than compute with impossible values",
		f.role, f.f.Var, f.f.PathAt(st.idx[f]), src, st.label, why)
}

// noBandSST explains a time step without any valid ocean SST in the band.
func noBandSST(sst *field, vals []float32, bandW []float64, ocean []bool, st stepRef, band regimes.Band) error {
	where := fmt.Sprintf("variable %s in %s, time step %s", sst.f.Var, sst.f.PathAt(st.idx[sst]), st.label)
	present := 0
	for i, x := range vals {
		if x == x && bandW[i] > 0 {
			present++
		}
	}
	if present == 0 {
		return fmt.Errorf("role sst, %s: every SST value in the band %g…%g°N is missing (an all-missing slab); fix or replace the file, or leave that step out with the study's time range (time.start, time.end)", where, band.South, band.North)
	}
	oc := 0
	for i := range ocean {
		if ocean[i] && bandW[i] > 0 {
			oc++
		}
	}
	return fmt.Errorf("role sst, %s: no SST value in the band %g…%g°N is over ocean (%d SST values present, %d ocean cells in the band per the ocean mask, none both, or all excluded as sea ice); check the ocean mask (ocean.mask, ocean.min_ocean_fraction) and the sea-ice limit", where, band.South, band.North, present, oc)
}

// coverage lists the period each time-dependent input covers.
func coverage(all []*field, maskF *field) string {
	var parts []string
	for _, f := range all {
		if f == maskF || f.f.Time == nil {
			continue
		}
		parts = append(parts, fmt.Sprintf("%s %s (%s)", f.role, f.f.Time.Span(), strings.Join(f.f.Paths(), ", ")))
	}
	return strings.Join(parts, "; ")
}

func sortedKeys[V any](m map[string]V) []string {
	var k []string
	for s := range m {
		k = append(k, s)
	}
	sort.Strings(k)
	return k
}

// gridOf turns a field's canonical layout into a grid description.
func gridOf(f *cf.Field) (*grid.Grid, error) {
	l := f.Layout
	g, err := grid.New(l.Lat, l.Lon, l.LatBounds, l.LonBounds)
	if err != nil {
		return nil, fmt.Errorf("role %s (%s): %w", f.Role, strings.Join(f.Paths(), ", "), err)
	}
	return g, nil
}

func analysisGrid(gp GridPlan, all []*field) (*grid.Grid, error) {
	sstG, err := gridOf(all[0].f)
	if err != nil {
		return nil, err
	}
	switch t := strings.TrimSpace(gp.Target); {
	case t == "":
		for _, f := range all[1:] {
			g, err := gridOf(f.f)
			if err != nil {
				return nil, err
			}
			if !sameCentres(sstG, g, 1e-4) {
				return nil, fmt.Errorf("role %s (%s) is on grid %s but sst (%s) is on grid %s (%s); set an analysis grid in the study (analysis.grid.target: sst, or a resolution such as 2deg) to regrid",
					f.role, strings.Join(f.f.Paths(), ", "), g, strings.Join(all[0].f.Paths(), ", "), sstG, grid.Difference(g, sstG, 1e-4))
			}
		}
		return sstG, nil
	case strings.HasSuffix(t, "deg"):
		var d float64
		if _, err := fmt.Sscanf(strings.TrimSuffix(t, "deg"), "%g", &d); err != nil || !(d > 0 && d <= 30) || math.Abs(180/d-math.Round(180/d)) > 1e-9 {
			return nil, fmt.Errorf("analysis grid %q: give a resolution that divides 180°, e.g. 1deg, 2deg, 2.5deg", t)
		}
		return grid.GlobalRegular(d, d, -180+d/2) // cell centres half a cell in from −180
	default:
		for _, f := range all {
			if string(f.role) == t {
				return gridOf(f.f)
			}
		}
		return nil, fmt.Errorf("analysis grid target %q is neither a resolution (e.g. 2deg) nor a role with an input", t)
	}
}

func attachWeights(gp GridPlan, target *grid.Grid, all []*field, notes *[]string) error {
	cache := map[string]*regrid.Weights{}
	for _, f := range all {
		g, err := gridOf(f.f)
		if err != nil {
			return err
		}
		if sameCentres(g, target, 1e-4) {
			continue
		}
		m := gp.Methods[f.role]
		cov := gp.MinCoverage
		if cov == 0 && m == regrid.Conservative {
			cov = 0.5
		}
		k := fmt.Sprint(g.Lat, g.Lon, g.LatBounds, g.LonBounds, m, cov)
		w, ok := cache[k]
		if !ok {
			w, err = regrid.NewWeights(g, target, regrid.Options{Method: m, MinCoverage: cov})
			if err != nil {
				return fmt.Errorf("regridding %s from %s to %s: %w", f.role, g, target, err)
			}
			cache[k] = w
		}
		f.w = w
		*notes = append(*notes, fmt.Sprintf("%s regridded from %s to %s (%v, min coverage %g)", f.role, g, target, m, cov))
	}
	return nil
}

// stepRef is one analysis time step and the matching index of each field.
type stepRef struct {
	label       string
	date        calendar.Date
	year, month int
	idx         map[*field]int
}

// timeKey is how steps are matched: year-month for monthly data, the date
// for daily data, the month for a climatology.
func timeKey(ta *cf.TimeAxis, t int) string {
	d := ta.Dates[t]
	switch ta.Step {
	case cf.StepClimatology:
		return fmt.Sprintf("M%02d", d.Month)
	case cf.StepMonthly, cf.StepAnnual, cf.StepUnknown:
		return d.YearMonth().String()
	}
	return d.String()[:10]
}

func align(sst *field, all []*field, maskF *field, sel func(y, m int) bool) (float64, []stepRef, []string, error) {
	ta := sst.f.Time
	spy := 12.0
	switch ta.Step {
	case cf.StepDaily:
		spy = 365.25
	case cf.StepAnnual:
		spy = 1
	case cf.StepIrregular:
		return 0, nil, nil, fmt.Errorf("role sst: the time axis is irregular (%s); lidscope needs monthly or daily steps", ta.Why)
	}
	for _, f := range all {
		if f == maskF {
			continue
		}
		if f.f.Time == nil {
			if f.f.NT() != 1 {
				return 0, nil, nil, fmt.Errorf("role %s has no time axis", f.role)
			}
			continue
		}
		f.index = map[string]int{}
		for t := range f.f.Time.Dates {
			f.index[timeKey(f.f.Time, t)] = t
		}
		if f != sst && f.f.Time.Calendar != ta.Calendar && f.f.Time.Step != cf.StepClimatology {
			return 0, nil, nil, fmt.Errorf("role %s (%s) uses the %s calendar but sst (%s) uses %s; lidscope matches time steps by date and will not mix calendars — convert one (e.g. cdo setcalendar), or, if a file's calendar attribute is wrong, declare the calendar in the study (time.calendar)",
				f.role, strings.Join(f.f.Paths(), ", "), f.f.Time.Calendar, strings.Join(sst.f.Paths(), ", "), ta.Calendar)
		}
	}
	var steps []stepRef
	missing := map[cf.Role][]string{}
	unselected := 0
	for t, d := range ta.Dates {
		if sel != nil && !sel(d.Year, d.Month) {
			unselected++
			continue
		}
		st := stepRef{label: d.YearMonth().String(), date: d, year: d.Year, month: d.Month, idx: map[*field]int{}}
		if ta.Step == cf.StepDaily {
			st.label = d.String()[:10]
		}
		if ta.Step == cf.StepClimatology {
			st.label = fmt.Sprintf("month %02d", d.Month)
		}
		ok := true
		for _, f := range all {
			if f == maskF {
				continue
			}
			if f.f.Time == nil {
				st.idx[f] = 0
				continue
			}
			key := timeKey(ta, t)
			if f.f.Time.Step == cf.StepClimatology {
				key = fmt.Sprintf("M%02d", d.Month)
			}
			i, found := f.index[key]
			if !found {
				missing[f.role] = append(missing[f.role], st.label)
				ok = false
				continue
			}
			st.idx[f] = i
		}
		if ok {
			steps = append(steps, st)
		}
	}
	var notes []string
	if unselected > 0 {
		notes = append(notes, fmt.Sprintf("%d sst time steps outside the study's time selection skipped", unselected))
	}
	for _, r := range cf.Roles() {
		if m := missing[r]; len(m) > 0 {
			ex := m
			if len(ex) > 4 {
				ex = append(append([]string{}, m[:2]...), "…", m[len(m)-1])
			}
			notes = append(notes, fmt.Sprintf("%d sst time steps dropped because %s has no matching step (%s)", len(m), r, strings.Join(ex, ", ")))
		}
	}
	return spy, steps, notes, nil
}

// readAligned reads step t of f and puts it on the analysis grid in dst.
func readAligned(f *field, t int, dst []float32) error {
	if f.w == nil {
		return f.f.ReadSlab(t, dst, &f.s)
	}
	if err := f.f.ReadSlab(t, f.buf, &f.s); err != nil {
		return err
	}
	if err := f.w.Apply(dst, f.buf); err != nil {
		return fmt.Errorf("regridding %s: %w", f.role, err)
	}
	return nil
}

// readMask fills ocean from the mask field.
func readMask(f *field, o Ocean, gp GridPlan, ocean []bool) error {
	if f.f.NT() != 1 {
		return fmt.Errorf("the ocean mask (%s) has %d time steps; give a file with one", strings.Join(f.f.Paths(), ", "), f.f.NT())
	}
	if err := f.f.ReadSlab(0, f.buf, &f.s); err != nil {
		return err
	}
	// ocean fraction on the native grid
	frac := make([]float64, len(f.buf))
	isLand := f.role == cf.RoleLandFraction
	minFrac := o.MinFraction
	if minFrac == 0 {
		minFrac = 0.5
	}
	for i, x := range f.buf {
		switch {
		case x != x:
			frac[i] = math.NaN()
		case o.Kind == "categorical":
			frac[i] = 0
			for _, v := range o.OceanValues {
				if float64(x) == v {
					frac[i] = 1
				}
			}
		case isLand:
			frac[i] = 1 - float64(x)
		default:
			frac[i] = float64(x)
		}
	}
	if f.w == nil {
		for i, x := range frac {
			ocean[i] = x == x && x >= minFrac-1e-9
		}
		return nil
	}
	// Remap the ocean fraction conservatively, then threshold (masks are
	// remapped as fractions).
	dst := make([]float64, len(ocean))
	if err := f.w.Apply64(dst, frac); err != nil {
		return fmt.Errorf("regridding the ocean mask: %w", err)
	}
	th := gp.MaskThreshold
	if th == 0 {
		th = minFrac
	}
	for i, x := range dst {
		ocean[i] = x == x && x >= th-1e-9
	}
	return nil
}
