package calendar

import (
	"fmt"
	"math"
)

// maxSpanSeconds bounds how far from the reference a value may reach; it is
// more than the whole MinYear..MaxYear range, and small enough that the
// integer arithmetic below cannot overflow.
const maxSpanSeconds = 1 << 46 // about 2.2 million years

// Decode turns one stored time value into a Date in UTC. Integral values are
// decoded exactly; the fractional part is rounded to the nearest nanosecond
// (for AbsoluteDay, millisecond). NaN, infinite and out-of-range values are
// errors wrapping ErrRange; values that fall on a day the calendar lacks
// (possible only with calendar months or AbsoluteDay) wrap ErrDate.
func (u Units) Decode(v float64) (Date, error) {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return Date{}, fmt.Errorf("%w: time value %v is not a number; mask fill values before decoding", ErrRange, v)
	}
	switch {
	case u.unit.seconds() != 0:
		return u.decodeFixed(v)
	case u.unit.monthStep() != 0:
		return u.decodeMonths(v)
	case u.unit == AbsoluteDay:
		return u.decodeAbsolute(v)
	}
	return Date{}, fmt.Errorf("%w: the zero Units cannot decode; use ParseUnits", ErrUnits)
}

func (u Units) decodeFixed(v float64) (Date, error) {
	unit := u.unit.seconds()
	whole, frac := math.Modf(v)
	if math.Abs(whole) > float64(maxSpanSeconds/unit) {
		return Date{}, fmt.Errorf("%w: time value %v %v is further from the reference than lidscope handles", ErrRange, v, u.unit)
	}
	ns := int64(math.Round(frac * float64(unit) * nanosPerSec))
	d, err := u.origin.add(int64(whole)*unit, ns).date(u.cal)
	if err != nil {
		return Date{}, fmt.Errorf("time value %v %v since %v: %w", v, u.unit, u.Reference(), err)
	}
	return d, nil
}

// anchor returns the instant k steps of calendar months after the reference:
// the reference's day and time of day in the month reached.
func (u Units) anchor(k int64) (instant, error) {
	ym := YearMonthOf(u.written.MonthIndex() + int(k)*u.unit.monthStep())
	d := u.written
	d.Year, d.Month = ym.Year, ym.Month
	if err := d.Validate(); err != nil {
		return instant{}, err
	}
	return d.instant().add(-int64(u.offset)*60, 0), nil
}

// maxMonthSteps keeps month arithmetic inside MinYear..MaxYear with room.
const maxMonthSteps = 2 * 12 * MaxYear

func (u Units) decodeMonths(v float64) (Date, error) {
	k := math.Floor(v)
	if math.Abs(k) > float64(maxMonthSteps/u.unit.monthStep()) {
		return Date{}, fmt.Errorf("%w: time value %v %v is further from the reference than lidscope handles", ErrRange, v, u.unit)
	}
	a0, err := u.anchor(int64(k))
	if err != nil {
		return Date{}, fmt.Errorf("time value %v %v since %v: %w", v, u.unit, u.written, err)
	}
	t := a0
	if f := v - k; f != 0 {
		a1, err := u.anchor(int64(k) + 1)
		if err != nil {
			return Date{}, fmt.Errorf("time value %v %v since %v: %w", v, u.unit, u.written, err)
		}
		sec, ns := a1.sub(a0)
		length := float64(sec) + float64(ns)/nanosPerSec
		t = a0.add(0, int64(math.Round(f*length*nanosPerSec)))
	}
	d, err := t.date(u.cal)
	if err != nil {
		return Date{}, fmt.Errorf("time value %v %v since %v: %w", v, u.unit, u.written, err)
	}
	return d, nil
}

func (u Units) decodeAbsolute(v float64) (Date, error) {
	if v < 0 || v >= float64(MaxYear+1)*10000 {
		return Date{}, fmt.Errorf("%w: time value %v is not a date YYYYMMDD.fraction with a year 0–%d", ErrRange, v, MaxYear)
	}
	whole := math.Floor(v)
	ymd := int(whole)
	d := Date{Year: ymd / 10000, Month: ymd / 100 % 100, Day: ymd % 100, Calendar: u.cal}
	if err := d.Validate(); err != nil {
		return Date{}, fmt.Errorf("time value %v read as YYYYMMDD.fraction: %w", v, err)
	}
	ms := int64(math.Round((v - whole) * secondsPerDay * 1000))
	t, err := d.instant().add(0, ms*1_000_000).date(u.cal)
	if err != nil {
		return Date{}, fmt.Errorf("time value %v read as YYYYMMDD.fraction: %w", v, err)
	}
	return t, nil
}

// Encode returns the stored value that stands for d: the inverse of Decode.
// d must be a valid date of the units' calendar (errors wrap ErrCalendar or
// ErrDate). Whole multiples of the unit encode exactly.
func (u Units) Encode(d Date) (float64, error) {
	if d.Calendar != u.cal {
		return 0, fmt.Errorf("%w: date %v is in the %v calendar but the time units are for %v", ErrCalendar, d, d.Calendar, u.cal)
	}
	if err := d.Validate(); err != nil {
		return 0, fmt.Errorf("date %v: %w", d, err)
	}
	t := d.instant()
	switch {
	case u.unit.seconds() != 0:
		unit := u.unit.seconds()
		sec, ns := t.sub(u.origin)
		q := floorDiv64(sec, unit) // whole units, exact
		r := float64(sec-q*unit) + float64(ns)/nanosPerSec
		return float64(q) + r/float64(unit), nil
	case u.unit.monthStep() != 0:
		return u.encodeMonths(d, t)
	case u.unit == AbsoluteDay:
		if d.Year < 0 {
			return 0, fmt.Errorf("%w: date %v has a negative year, which YYYYMMDD.fraction cannot write", ErrRange, d)
		}
		ymd := d.Year*10000 + d.Month*100 + d.Day
		return float64(ymd) + float64(d.nanoOfDay())/(secondsPerDay*nanosPerSec), nil
	}
	return 0, fmt.Errorf("%w: the zero Units cannot encode; use ParseUnits", ErrUnits)
}

func (u Units) encodeMonths(d Date, t instant) (float64, error) {
	step := u.unit.monthStep()
	k := int64(floorDiv(d.MonthIndex()-u.written.MonthIndex(), step))
	fail := func(err error) (float64, error) {
		return 0, fmt.Errorf("date %v in %v since %v: %w", d, u.unit, u.written, err)
	}
	a0, err := u.anchor(k)
	if err != nil {
		return fail(err)
	}
	for t.less(a0) {
		k--
		if a0, err = u.anchor(k); err != nil {
			return fail(err)
		}
	}
	a1, err := u.anchor(k + 1)
	if err != nil {
		return fail(err)
	}
	for !t.less(a1) {
		k++
		a0 = a1
		if a1, err = u.anchor(k + 1); err != nil {
			return fail(err)
		}
	}
	sec, ns := t.sub(a0)
	lsec, lns := a1.sub(a0)
	return float64(k) + (float64(sec)+float64(ns)/nanosPerSec)/(float64(lsec)+float64(lns)/nanosPerSec), nil
}

// DecodeAll decodes every value of a time coordinate. The error names the
// index of the first value that fails.
func (u Units) DecodeAll(values []float64) ([]Date, error) {
	out := make([]Date, len(values))
	for i, v := range values {
		d, err := u.Decode(v)
		if err != nil {
			return nil, fmt.Errorf("time[%d]: %w", i, err)
		}
		out[i] = d
	}
	return out, nil
}

// Interval is one time cell, from a CF bounds variable (CF-1.10 §7.1).
type Interval struct {
	Start, End Date
}

// Contains reports whether d lies in the interval, ends included, whichever
// order Start and End are in.
func (iv Interval) Contains(d Date) bool {
	lo, hi := iv.Start, iv.End
	if hi.Before(lo) {
		lo, hi = hi, lo
	}
	return !d.Before(lo) && !d.After(hi)
}

// String formats the interval as "start/end" (ISO 8601 interval form).
func (iv Interval) String() string { return iv.Start.String() + "/" + iv.End.String() }

// DecodeIntervals decodes a bounds variable of shape (n, 2), given flat in
// row-major order (start0, end0, start1, end1, …). The error names the cell
// whose value fails.
func (u Units) DecodeIntervals(bounds []float64) ([]Interval, error) {
	if len(bounds)%2 != 0 {
		return nil, fmt.Errorf("%w: a time bounds variable has 2 values per cell, but %d values were given", ErrUnits, len(bounds))
	}
	out := make([]Interval, len(bounds)/2)
	for i := range out {
		for j, p := range [2]*Date{&out[i].Start, &out[i].End} {
			d, err := u.Decode(bounds[2*i+j])
			if err != nil {
				return nil, fmt.Errorf("time bounds[%d][%d]: %w", i, j, err)
			}
			*p = d
		}
	}
	return out, nil
}

// DecodeAxis parses the units and calendar attributes of a time coordinate
// and decodes its values (see Parse and Units.DecodeAll).
func DecodeAxis(values []float64, units, calendar string, opt Options) ([]Date, error) {
	u, err := Parse(units, calendar, opt)
	if err != nil {
		return nil, err
	}
	return u.DecodeAll(values)
}

// DecodeBounds parses the units and calendar attributes of a time coordinate
// and decodes its bounds variable, flat (n, 2) (see Units.DecodeIntervals).
// CF-1.10 §7.1 says bounds take the units and calendar of their coordinate.
func DecodeBounds(bounds []float64, units, calendar string, opt Options) ([]Interval, error) {
	u, err := Parse(units, calendar, opt)
	if err != nil {
		return nil, err
	}
	return u.DecodeIntervals(bounds)
}
