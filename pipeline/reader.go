package pipeline

import (
	"context"
	"fmt"
	"math"
	"strings"

	"lidscope/cf"
	"lidscope/units"
)

// Stage 3, reader: one goroutine reads the time steps in order (netCDF-C
// is serialised anyway) into three step buffers, so that it fills one while
// the step compute and blocks use the second and the sinks the third, and
// checks that the values are plausible while it reads them.

// nbufs is the number of step buffers.
const nbufs = 3

// slabs says that a step buffer holds a time step (or that reading failed).
type slabs struct {
	step int // index into inputs.steps
	buf  int // which step buffer
	err  error
}

// reader owns the step buffers while it fills them.
type reader struct {
	bufs  [nbufs][][]float32 // [buffer][field slot] slabs on the analysis grid
	ready chan slabs         // closed when the reader stops
	free  chan int
	done  chan struct{}
}

// startReader starts reading every step of in. Stop it by cancelling ctx,
// then wait on done before closing the files.
func startReader(ctx context.Context, in *inputs) *reader {
	n := in.grid.Size()
	r := &reader{ready: make(chan slabs, 1), free: make(chan int, nbufs), done: make(chan struct{})}
	for b := range r.bufs {
		r.bufs[b] = make([][]float32, len(in.timed))
		for _, f := range in.timed {
			r.bufs[b][f.slot] = make([]float32, n)
		}
		r.free <- b
	}
	go func() {
		ranges := make([]cf.SlabRange, len(in.timed))
		defer close(r.done)
		defer close(r.ready)
		for k, st := range in.steps {
			var b int
			select {
			case b = <-r.free:
			case <-ctx.Done():
				return
			}
			err := readStep(in, st, r.bufs[b], ranges)
			select {
			case r.ready <- slabs{step: k, buf: b, err: err}:
			case <-ctx.Done():
				return
			}
			if err != nil {
				return
			}
		}
	}()
	return r
}

// release gives step buffer b back to the reader.
func (r *reader) release(b int) { r.free <- b }

// readStep reads step st of every timed field into bufs (by slot) and
// checks that the values are plausible (see plausible); ranges is scratch.
// Reading and checking are one pass over the values where no regridding is
// needed (cf.Field.ReadSlabRange).
func readStep(in *inputs, st stepRef, bufs [][]float32, ranges []cf.SlabRange) error {
	for _, f := range in.timed {
		r, err := readAligned(f, st.idx[f.slot], bufs[f.slot])
		if err != nil {
			return err
		}
		ranges[f.slot] = r
	}
	for _, f := range in.timed {
		if err := plausible(f, ranges[f.slot], len(bufs[f.slot]), st); err != nil {
			return err
		}
	}
	return nil
}

// readAligned reads step t of f and puts it on the analysis grid in dst;
// it returns the range of the values in dst.
func readAligned(f *field, t int, dst []float32) (cf.SlabRange, error) {
	if f.w == nil {
		return f.f.ReadSlabRange(t, dst, &f.s)
	}
	if err := f.f.ReadSlab(t, f.buf, &f.s); err != nil {
		return cf.SlabRange{}, err
	}
	if err := f.w.Apply(dst, f.buf); err != nil {
		return cf.SlabRange{}, fmt.Errorf("regridding %s: %w", f.role, err)
	}
	return rangeOf(dst), nil
}

// rangeOf returns the number of valid values of x and their range.
func rangeOf(x []float32) cf.SlabRange {
	lo, hi := float32(math.Inf(1)), float32(math.Inf(-1))
	valid := 0
	for _, v := range x {
		if v == v {
			valid++
			lo, hi = min(lo, v), max(hi, v)
		}
	}
	return cf.SlabRange{Valid: valid, Min: float64(lo), Max: float64(hi)}
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
func plausible(f *field, r cf.SlabRange, n int, st stepRef) error {
	kind := f.f.Kind
	cloud := f.role == cf.RoleCloud || f.role == cf.RoleLowCloud
	if kind != units.Temperature && !cloud {
		return nil
	}
	lo, hi, valid := r.Min, r.Max, r.Valid
	if valid == 0 {
		return nil
	}
	if kind == units.Temperature && lo >= 150 && hi <= 350 || cloud && lo >= -0.05 && hi <= 1.05 {
		return nil
	}
	why := strings.Join(cf.CheckValues(f.role, f.f.Conv, lo, hi, valid, n), "; ")
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
		f.role, f.f.Var, f.f.PathAt(st.idx[f.slot]), src, st.label, why)
}
