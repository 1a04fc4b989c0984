// The time axis: declared over the unlimited dimension, appended one step at
// a time.

package cfwrite

import (
	"fmt"
	"strings"

	"lidscope/netcdf"
)

// timeAxis is the state of the time coordinate.
type timeAxis struct {
	spec   TimeAxis
	v, bv  *netcdf.Var
	n      int
	last   float64
	lastLo float64
}

// SetTime declares the time coordinate over the unlimited time dimension
// (CF-1.10 §4.4): double, standard_name time, axis T, the given units and
// calendar, and time_bnds when t.Bounds is set.
func (w *Writer) SetTime(t TimeAxis) error {
	return w.declaring("SetTime", func() error { return w.setTime(t) })
}

func (w *Writer) setTime(t TimeAxis) error {
	if _, err := parseTimeUnits(t.Units, t.Calendar); err != nil {
		return fmt.Errorf("cfwrite: %s: time axis: %w", w.path, err)
	}
	units := strings.TrimSpace(t.Units)
	cal := strings.ToLower(strings.TrimSpace(t.Calendar))
	if err := w.claim(DimTime, "time axis"); err != nil {
		return err
	}
	attrs := []attr{{"standard_name", "time"}, {"long_name", "time"}, {"units", units},
		{"calendar", cal}, {"axis", "T"}}
	if t.Bounds {
		if err := w.claim("time_bnds", "time axis"); err != nil {
			return err
		}
		attrs = append(attrs, attr{"bounds", "time_bnds"})
	}
	if _, err := w.nc.DefDim(DimTime, netcdf.Unlimited); err != nil {
		return fmt.Errorf("cfwrite: %s: dimension %s: %w", w.path, DimTime, err)
	}
	w.dims[DimTime] = &dim{name: DimTime, axis: 'T'}
	if t.Bounds {
		if err := w.needBounds(); err != nil {
			return err
		}
	}
	ta := &timeAxis{spec: t}
	v, err := w.defCoord(DimTime, netcdf.Double, []string{DimTime}, nil, attrs)
	if err != nil {
		return err
	}
	if err := v.SetChunking(defaultChunks([]*dim{w.dims[DimTime]}, 8)); err != nil {
		return fmt.Errorf("cfwrite: %s: variable %s: %w", w.path, DimTime, err)
	}
	ta.v = v
	if t.Bounds {
		bv, err := w.defCoord("time_bnds", netcdf.Double, []string{DimTime, DimBounds}, nil, nil)
		if err != nil {
			return err
		}
		if err := bv.SetChunking(defaultChunks([]*dim{w.dims[DimTime], w.dims[DimBounds]}, 8)); err != nil {
			return fmt.Errorf("cfwrite: %s: variable time_bnds: %w", w.path, err)
		}
		ta.bv = bv
	}
	w.time = ta
	return nil
}

// AppendTime appends one value (in the axis units) to the time axis and
// returns its index, the step to pass to Var.WriteStep. Values must be
// finite and strictly increasing. The first call ends the declarations.
func (w *Writer) AppendTime(value float64) (int, error) {
	return w.appendTime(value, 0, 0, false)
}

// AppendTimeBounded is AppendTime for an axis declared with Bounds: lower
// and upper are the edges of the step's interval (lower < upper), and the
// lower edges must not decrease.
func (w *Writer) AppendTimeBounded(value, lower, upper float64) (int, error) {
	return w.appendTime(value, lower, upper, true)
}

func (w *Writer) appendTime(value, lo, hi float64, bounded bool) (int, error) {
	w.mu.Lock()
	defer w.mu.Unlock()
	if err := w.state(); err != nil {
		return 0, err
	}
	ta := w.time
	switch {
	case ta == nil:
		return 0, w.fail(fmt.Errorf("cfwrite: %s: AppendTime without a time axis; call SetTime first", w.path))
	case ta.spec.Bounds && !bounded:
		return 0, w.fail(fmt.Errorf("cfwrite: %s: the time axis has bounds; append steps with AppendTimeBounded", w.path))
	case !ta.spec.Bounds && bounded:
		return 0, w.fail(fmt.Errorf("cfwrite: %s: the time axis was declared without bounds (TimeAxis.Bounds); use AppendTime", w.path))
	}
	if checkFinite([]float64{value}) != nil {
		return 0, w.fail(fmt.Errorf("cfwrite: %s: time step %d: value %v is not finite", w.path, ta.n, value))
	}
	if ta.n > 0 && !(value > ta.last) {
		return 0, w.fail(fmt.Errorf("cfwrite: %s: time step %d: value %g does not exceed the previous %g; time must increase strictly (CF-1.10 §1.3)", w.path, ta.n, value, ta.last))
	}
	if bounded {
		if checkFinite([]float64{lo, hi}) != nil || !(lo < hi) {
			return 0, w.fail(fmt.Errorf("cfwrite: %s: time step %d: bounds [%v, %v] must be finite with lower < upper", w.path, ta.n, lo, hi))
		}
		if ta.n > 0 && lo < ta.lastLo {
			return 0, w.fail(fmt.Errorf("cfwrite: %s: time step %d: lower bound %g is before the previous step's %g", w.path, ta.n, lo, ta.lastLo))
		}
	}
	if err := w.endDefine(); err != nil {
		return 0, w.fail(err)
	}
	if err := ta.v.WriteFloat64([]int{ta.n}, []int{1}, []float64{value}); err != nil {
		return 0, w.fail(fmt.Errorf("cfwrite: %s: variable time, step %d: %w", w.path, ta.n, err))
	}
	if bounded {
		if err := ta.bv.WriteFloat64([]int{ta.n, 0}, []int{1, 2}, []float64{lo, hi}); err != nil {
			return 0, w.fail(fmt.Errorf("cfwrite: %s: variable time_bnds, step %d: %w", w.path, ta.n, err))
		}
		ta.lastLo = lo
	}
	ta.last = value
	ta.n++
	return ta.n - 1, nil
}

// Times returns the number of time steps appended so far.
func (w *Writer) Times() int {
	w.mu.Lock()
	defer w.mu.Unlock()
	if w.time == nil {
		return 0
	}
	return w.time.n
}
