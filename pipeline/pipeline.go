// Package pipeline runs lidscope's main job for one dataset in a single
// streaming pass over time: read each time step of every field (package cf,
// one reader goroutine, since netCDF-C is serialised anyway), align them on
// one grid (package regrid) and one time axis, compute column metrics
// (package metrics) and regimes (package regimes) in parallel over fixed
// blocks of grid rows, and fold everything into a mergeable accumulator
// (package accumulate). Memory is bounded by a few slabs per field,
// whatever the length of the record; results do not depend on the number
// of workers.
//
// Run is a sequence of named stages, each in its own file:
//
//	open and align  open.go, align.go  open the inputs, analysis grid, regridding weights, common time steps
//	masks           masks.go           static ocean mask; per step, the columns that are ocean now
//	reader          reader.go          one goroutine filling three step buffers in time order; plausibility
//	step compute    compute.go         ocean now, tropical mean, relative SST, regimes
//	block worker    compute.go         metrics and per-column accumulation over fixed row blocks
//	sinks           sinks.go           the run's accumulator and the plan's sinks, in time order, one step behind
package pipeline

import (
	"context"
	"fmt"
	"log/slog"
	"runtime"

	"lidscope/accumulate"
	"lidscope/calendar"
	"lidscope/cf"
	"lidscope/grid"
	"lidscope/metrics"
	"lidscope/regimes"
	"lidscope/regrid"
	"lidscope/vocab"
)

// Input is one role's files and how to read them.
type Input struct {
	Paths []string
	Spec  cf.Spec
}

// Ocean says which columns are ocean.
type Ocean struct {
	// Kind: OceanWhereSST (the default), OceanFraction or OceanCategorical.
	Kind        OceanKind
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

// Plan is everything a run needs: the options of Run.
type Plan struct {
	Dataset string
	SST     Input
	// T700 (nil when absent) adds LTS, EIS (and ECTEI) to the run; Cloud
	// (nil when absent) adds the cloud statistics. SST is the minimum: a
	// run without them has the regimes, crossings and series only, and
	// its outputs leave the absent quantities out (Plan.Quantities).
	T700  *Input
	Cloud *Input
	// Notes are what planning decided, in plain words (e.g. an optional
	// role absent from files.any); Run puts them first in Result.Notes.
	Notes []string
	// Optional inputs (nil when absent).
	SurfaceAir      *Input // surface air temperature, when the metrics conventions uses it
	SurfacePressure *Input
	Humidity        *Input // RH, dew point or specific humidity, per the metrics conventions
	T850            *Input
	Q700            *Input
	SeaIce          *Input
	MaxSeaIce       float64 // columns with more sea ice are excluded
	Extras          []Input // further fields composited by regime (e.g. toa_sw_up)
	// Factors are the inputs of the cloud-controlling factors (nil
	// without a factors section); their quantities follow the extras.
	Factors *FactorInputs

	Ocean   Ocean
	Metrics metrics.Conventions
	// Regimes is the regime definition (band, rule, δ/h or percentile).
	Regimes regimes.Definition
	Regions []accumulate.Region
	// Domain, when not nil, is the analysis domain: per-column statistics
	// are kept only for the ocean columns whose centres lie inside it.
	Domain *accumulate.Region
	Grid   GridPlan
	// Select keeps a time step (nil keeps all).
	Select func(year, month int) bool
	// Piece, unless whole, keeps only that contiguous piece of the
	// selected steps (see Piece.Bounds); merging the results of every
	// piece gives the result of the whole record.
	Piece   Piece
	Workers int // 0: GOMAXPROCS
	Log     *slog.Logger
	// Progress, when set, is called after each time step.
	Progress func(done, total int)
	// Accept names the usability checks (cf.CheckNames) whose verdict the
	// study overrides for this dataset; any other failed check stops the
	// run as `lidscope inspect` calls the input NOT USABLE.
	Accept map[string]bool
	// MemoryBudget bounds the bytes of one field's slab and of the run's
	// per-column arrays (0: cf.DefaultMemoryBudget).
	MemoryBudget int64
	// Sinks receive every time step, in time order, after the run's own
	// accumulator (e.g. relationship statistics). The step's slices are
	// reused for the next step: a sink must copy what it keeps.
	Sinks []StepSink
	// NewSinks, when set, makes further sinks once the analysis layout is
	// known (grid, areas, band weights, quantities).
	NewSinks func(l accumulate.Layout) ([]StepSink, error)
	// BeforeRead, when set, is called once the inputs are open and the
	// steps chosen, before any data is read, with the files the run will
	// read data from (Result.Paths); an error stops the run.
	BeforeRead func(paths map[cf.Role][]string) error
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
	Dates        []calendar.Date // their time stamps (SST's, or those of the dated record a climatological SST is aligned with)
	Sampling     cf.Step         // monthly, daily, climatology, …
	StepsPerYear float64
	Calendar     string
	Notes        []string // conversions, reorderings, drops, in plain words
	// Paths are the files data was read from, by role, in time order:
	// of a multi-file record only those holding a kept step (so a piece
	// lists the files of its piece).
	Paths    map[cf.Role][]string
	Rejected int // columns with physically impossible inputs (metrics NaN)
}

// Quantities lists the per-column quantities a run of p accumulates, in
// the order of accumulate.Step.Values: sst always; t700, lts and eis when
// p has a T700 input; the analysis cloud (named by its role, low_cloud or
// cloud, so that outputs describe it correctly) when p has a cloud input;
// then the extra fields. The computed ones are the table's (vocab.Computed:
// lts, eis, and ectei when the conventions compute it). Absent inputs give absent quantities, never
// NaN-filled ones.
func (p *Plan) Quantities() []string {
	q := []string{qSST}
	if p.T700 != nil {
		q = append(q, qT700)
		for _, k := range vocab.Computed(p.Metrics) { // lts, eis (and ectei when on)
			q = append(q, k.Name)
		}
	}
	if c := p.cloudQuantity(); c != "" {
		q = append(q, c)
	}
	for _, e := range p.Extras {
		q = append(q, string(e.Spec.Role))
	}
	return append(q, p.factorQuantities(q)...)
}

// FactorInputs are the inputs of the cloud-controlling factors.
type FactorInputs struct {
	// Use are the factors of the study (sst, eis and lts are quantities
	// of the run already; rh700, omega700, t_adv and wind_speed are added).
	Use []string
	// RH is relative humidity read at 700 hPa; Q specific humidity at
	// 700 hPa (rh700 from it and T700) when RH is nil.
	RH, Q *Input
	Omega *Input // omega read at 700 hPa
	U, V  *Input // near-surface wind components
}

// factorQuantities are the factor quantities the run adds to have (those
// of Use not in have), in the order of Use.
func (p *Plan) factorQuantities(have []string) []string {
	if p.Factors == nil {
		return nil
	}
	var out []string
	for _, f := range p.Factors.Use {
		switch f {
		case vocab.RH700, vocab.Omega700, vocab.TAdv, vocab.WindSpeed:
			out = append(out, f)
		}
	}
	return out
}

// cloudQuantity is the analysis cloud's quantity name ("" without one).
func (p *Plan) cloudQuantity() string {
	if p.Cloud == nil {
		return ""
	}
	return string(p.Cloud.Spec.Role)
}

// Lacks says, in plain words, what a run of p will not have because an
// optional input is absent (empty when it has everything).
func (p *Plan) Lacks() []string {
	var out []string
	if p.T700 == nil {
		out = append(out, "no air_temperature input: no 700 hPa temperature, LTS or EIS")
	}
	if p.Cloud == nil {
		out = append(out, "no low_cloud or cloud input: no cloud statistics")
	}
	return out
}

// beforeRead logs the aligned inputs and calls the plan's BeforeRead
// with the files the run will read.
func beforeRead(p *Plan, in *inputs, log *slog.Logger) error {
	log.Info("aligned", "dataset", p.Dataset, "steps", len(in.steps), "grid", in.grid.String())
	if p.BeforeRead == nil {
		return nil
	}
	return p.BeforeRead(in.paths)
}

// Run executes the plan.
func Run(ctx context.Context, p Plan) (*Result, error) {
	log := p.Log
	if log == nil {
		log = slog.New(slog.DiscardHandler)
	}
	if err := p.Regimes.Validate(); err != nil {
		return nil, err
	}
	kern, err := metrics.NewKernel(p.Metrics)
	if err != nil {
		return nil, fmt.Errorf("metrics conventions: %w", err)
	}

	// open and align
	in, err := openInputs(&p)
	if err != nil {
		return nil, err
	}
	defer in.close()
	res := &Result{Grid: in.grid, Paths: in.paths, Notes: append(append([]string{}, p.Notes...), in.notes...), StepsPerYear: in.stepsPerYear,
		Calendar: in.axis.f.Time.Calendar, Sampling: in.axis.f.Time.Step}
	if err := beforeRead(&p, in, log); err != nil {
		return nil, err
	}

	// masks
	ocean, err := staticOcean(in, &p)
	if err != nil {
		return nil, err
	}
	area := in.grid.CellAreas()
	lb := make([][2]float64, in.grid.NLat())
	copy(lb, in.grid.LatBounds)
	bandW := p.Regimes.Band.Weights(lb, area)

	// sinks
	out, err := newSinks(&p, in, area, bandW, ocean)
	if err != nil {
		return nil, err
	}
	res.Acc = out.acc

	// reader; stop it and wait for it before the deferred close of the
	// inputs runs, so no read can touch a closed file.
	ctx, cancel := context.WithCancel(ctx)
	rd := startReader(ctx, in)
	defer func() { cancel(); <-rd.done }()

	// step compute and block worker, one step at a time in time order; the
	// sinks one step behind on their own goroutine.
	st := newStepper(&p, in, kern, ocean, bandW)
	line := out.start()
	stopped := false
	stopLine := func() {
		if !stopped {
			line.stop()
			stopped = true
		}
	}
	defer stopLine()
	free := make(chan int, len(st.outs)) // output sets the sinks are done with
	for o := range st.outs {
		free <- o
	}
	rejected := 0
	for msg := range rd.ready {
		if msg.err != nil {
			return nil, msg.err
		}
		ref := in.steps[msg.step]
		o := <-free
		step, mi, err := st.prepare(ref, rd.bufs[msg.buf], o)
		if err != nil {
			return nil, err
		}
		rej, err := st.runBlocks(step, mi, o, out.acc)
		rejected += rej
		if err != nil {
			return nil, err
		}
		k, b := msg.step, msg.buf
		line.add(step, func() {
			rd.release(b)
			free <- o
			if p.Progress != nil {
				p.Progress(k+1, len(in.steps))
			}
		})
		res.Labels = append(res.Labels, ref.label)
		res.Dates = append(res.Dates, ref.date)
		if err := ctx.Err(); err != nil {
			return nil, err
		}
	}
	stopLine()
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if len(res.Labels) != len(in.steps) {
		return nil, fmt.Errorf("run stopped after %d of %d time steps", len(res.Labels), len(in.steps))
	}
	res.Rejected = rejected
	if rejected > 0 {
		res.Notes = append(res.Notes, fmt.Sprintf("%d column-steps had physically impossible inputs (temperatures outside 123–332 K, …) and were left out of LTS/EIS", rejected))
	}
	if err := checkOceanValues(&p, out.acc, bandW, len(res.Labels), &res.Notes); err != nil {
		return nil, err
	}
	for _, f := range in.all {
		if c := f.f.NaNCount(); c > 0 {
			res.Notes = append(res.Notes, fmt.Sprintf("%s (%s): %d NaN values (not the declared fill value) treated as missing", f.role, f.f.Var, c))
		}
		if c := f.f.InfCount(); c > 0 {
			res.Notes = append(res.Notes, fmt.Sprintf("%s (%s): %d infinite values treated as missing", f.role, f.f.Var, c))
		}
	}
	return res, nil
}

func defaultWorkers() int { return runtime.GOMAXPROCS(0) }
