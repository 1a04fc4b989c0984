package pipeline

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"lidscope/cf"
	"lidscope/grid"
	"lidscope/regrid"
)

// Stage 1, open and align: open every input, choose the analysis grid,
// attach the regridding weights and match the time steps.

// field is an opened input on its way to the analysis grid.
type field struct {
	role cf.Role
	f    *cf.Field
	w    *regrid.Weights // nil when already on the analysis grid
	// slot is the field's index in inputs.timed (its place in a step's
	// buffers and in stepRef.idx); -1 for the static mask.
	slot  int
	index map[string]int // time key → step
	buf   []float32      // native grid
	s     cf.Scratch
	// studyUnits is true when the units come from the study, not the file.
	studyUnits bool
}

// inputs are the opened fields of a run, by what they are used for.
type inputs struct {
	sst         *field
	t700, cloud *field // nil when the plan has none
	axis        *field // the field whose time axis the run follows (align.go)
	// Optional fields (nil when the plan has none).
	surfaceAir, surfacePressure, humidity, t850, q700, seaIce *field
	extras                                                    []*field
	// factor inputs (nil when not used)
	fRH, fQ, fOmega, fU, fV *field
	mask                    *field // the static ocean mask (fraction or categorical)

	// all is every field in a fixed order: sst, t700, cloud, the extras,
	// the optional fields, the mask. The grid check, the regridding notes
	// and the end-of-run notes follow it.
	all []*field
	// timed is all without the mask: the fields read at every time step.
	timed []*field

	grid  *grid.Grid
	steps []stepRef
	// stepsPerYear, calendar, sampling describe SST's time axis.
	stepsPerYear float64

	// paths are the files the run reads data from, by role, in time
	// order (readPaths): after the time selection and the piece, a file
	// of a multi-file record none of whose steps is kept is not among them.
	paths map[cf.Role][]string
	notes []string
}

// close closes every opened file.
func (in *inputs) close() {
	for _, f := range in.all {
		f.f.Close()
	}
}

// optionalInput names one optional input and where it goes.
type optionalInput struct {
	name string // how messages call it
	in   *Input
	dst  **field
}

// openInputs opens the plan's inputs, chooses the analysis grid and aligns
// the time steps. On error the files opened so far are closed.
func openInputs(p *Plan) (in *inputs, err error) {
	in = &inputs{}
	var opened []*field
	defer func() {
		if err != nil {
			for _, f := range opened {
				f.f.Close()
			}
		}
	}()
	open := func(x Input) (*field, error) {
		x.Spec.MemoryBudget = p.MemoryBudget
		f, err := cf.Open(x.Paths, x.Spec)
		if err != nil {
			return nil, err
		}
		fd := &field{role: x.Spec.Role, f: f, slot: -1, studyUnits: x.Spec.Units != ""}
		opened = append(opened, fd)
		for _, n := range f.Notes {
			in.notes = append(in.notes, fmt.Sprintf("%s (%s): %s", x.Spec.Role, f.Var, n))
		}
		if f.Time != nil && f.Time.Declared && x.Spec.TimeUnits != "" && !x.Spec.Climatology {
			// the study's time declaration of this role (config: time.ROLE,
			// else the dataset's), recorded with the run
			in.notes = append(in.notes, fmt.Sprintf("%s (%s): time axis read with the study's time units %q, %s calendar", x.Spec.Role, f.Var, x.Spec.TimeUnits, f.Time.Calendar))
		}
		return fd, nil
	}
	if in.sst, err = open(p.SST); err != nil {
		return nil, err
	}
	if in.sst.f.Time == nil {
		return nil, fmt.Errorf("role sst: %s has no time axis; lidscope needs a record of time steps (a climatology must be declared with 12 steps)", strings.Join(in.sst.f.Paths(), ", "))
	}
	if p.T700 != nil {
		if in.t700, err = open(*p.T700); err != nil {
			return nil, err
		}
	}
	if p.Cloud != nil {
		if in.cloud, err = open(*p.Cloud); err != nil {
			return nil, err
		}
	}
	// Optional inputs, opened and listed in this order (by name).
	optional := []optionalInput{
		{"T850", p.T850, &in.t850},
		{"humidity", p.Humidity, &in.humidity},
		{"q700", p.Q700, &in.q700},
		{"sea ice", p.SeaIce, &in.seaIce},
		{"surface air temperature", p.SurfaceAir, &in.surfaceAir},
		{"surface pressure", p.SurfacePressure, &in.surfacePressure},
	}
	for _, o := range optional {
		if o.in == nil {
			continue
		}
		if p.T700 == nil && o.name != "sea ice" {
			// The surface and humidity fields serve LTS/EIS only.
			in.notes = append(in.notes, fmt.Sprintf("the %s input is not read: without 700 hPa temperature there is no LTS or EIS to use it for", o.name))
			continue
		}
		if *o.dst, err = open(*o.in); err != nil {
			return nil, err
		}
	}
	for _, x := range p.Extras {
		fd, err := open(x)
		if err != nil {
			return nil, err
		}
		in.extras = append(in.extras, fd)
	}
	var factorFields []*field
	if fi := p.Factors; fi != nil {
		for _, x := range []struct {
			in  *Input
			dst **field
		}{{fi.RH, &in.fRH}, {fi.Q, &in.fQ}, {fi.Omega, &in.fOmega}, {fi.U, &in.fU}, {fi.V, &in.fV}} {
			if x.in == nil {
				continue
			}
			if *x.dst, err = open(*x.in); err != nil {
				return nil, err
			}
			factorFields = append(factorFields, *x.dst)
		}
	}
	switch p.Ocean.Kind {
	case OceanFraction, OceanCategorical:
		if p.Ocean.Input == nil {
			return nil, fmt.Errorf("ocean mask %q needs a mask input", p.Ocean.Kind)
		}
		if in.mask, err = open(*p.Ocean.Input); err != nil {
			return nil, err
		}
	case "", OceanWhereSST:
	default:
		return nil, fmt.Errorf("unknown ocean mask kind %q (sst, fraction or categorical)", p.Ocean.Kind)
	}

	in.all = []*field{in.sst}
	for _, f := range []*field{in.t700, in.cloud} {
		if f != nil {
			in.all = append(in.all, f)
		}
	}
	in.all = append(in.all, in.extras...)
	in.all = append(in.all, factorFields...)
	for _, o := range optional {
		if *o.dst != nil {
			in.all = append(in.all, *o.dst)
		}
	}
	for _, f := range in.all {
		f.slot = len(in.timed)
		in.timed = append(in.timed, f)
	}
	if in.mask != nil {
		in.all = append(in.all, in.mask)
	}

	// The checks of lidscope inspect, before anything is computed.
	for _, f := range in.all {
		if err := checkUsable(p, f, f == in.mask, &in.notes); err != nil {
			return nil, err
		}
	}

	// Analysis grid.
	if in.grid, err = analysisGrid(p.Grid, in.all); err != nil {
		return nil, err
	}
	// every timed input, LTS, EIS and ECTEI are accumulated per column
	if err := checkRunBudget(p, in.all, in.grid.NLat(), in.grid.NLon(), len(in.timed)+3); err != nil {
		return nil, err
	}
	if err := attachWeights(p.Grid, in.grid, in.all, &in.notes); err != nil {
		return nil, err
	}
	for _, f := range in.all {
		f.buf = make([]float32, f.f.Len())
	}

	// Time alignment on SST's axis (or the dated record a climatological
	// SST is aligned with).
	spy, steps, dropped, err := align(in, p.Select)
	if err != nil {
		return nil, err
	}
	in.stepsPerYear, in.steps = spy, steps
	in.notes = append(in.notes, dropped...)
	if len(steps) == 0 {
		return nil, fmt.Errorf("no time step is common to every input after the time selection (%s); the inputs cover: %s; give files of one period for every role, or a time range (time.start, time.end) that they share", strings.Join(dropped, "; "), coverage(in.timed))
	}
	if err := pieceOf(in, p); err != nil {
		return nil, err
	}
	in.paths = readPaths(in)
	return in, nil
}

// readPaths lists, by role and in time order, the files the kept steps are
// read from: for a field with a time axis the files holding one of the
// steps' indices, for a field without one (and for the static mask) its
// files. Only these files' data is read; the other files of a record were
// opened for their time axes only.
func readPaths(in *inputs) map[cf.Role][]string {
	out := map[cf.Role][]string{}
	for _, f := range in.all {
		if f.slot < 0 || f.f.Time == nil {
			out[f.role] = append(out[f.role], f.f.Paths()...)
			continue
		}
		seen := map[string]bool{}
		var ps []string
		for _, st := range in.steps {
			if p := f.f.PathAt(st.idx[f.slot]); p != "" && !seen[p] {
				seen[p] = true
				ps = append(ps, p)
			}
		}
		// in time order (a selection can keep steps of one file in two runs)
		order := map[string]int{}
		for i, p := range f.f.Paths() {
			order[p] = i
		}
		sort.SliceStable(ps, func(i, j int) bool { return order[ps[i]] < order[ps[j]] })
		out[f.role] = append(out[f.role], ps...)
	}
	return out
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
