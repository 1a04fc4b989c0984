package metrics

import (
	"fmt"
	"math"
)

// SlabInput holds one 2-D slab of columns, flattened in any order, all
// slices of the same length, SI units. Optional slices must be non-nil
// exactly when the conventions says the input is a field:
//
//	Ps        Conventions.PressureField                (nil → Conventions.SurfacePressure)
//	Humidity  Conventions.Humidity != HumidityAssumedRH (nil → Conventions.AssumedRH)
//	T850      Conventions.T850Field                    (nil → (Ts + T700)/2)
//	Q700      Conventions.ECTEI
//
// A mismatch is an error rather than a silent choice, so that
// [Conventions.Text] always describes what was computed.
type SlabInput struct {
	Ts       []float32 // surface temperature, K (SST or air, per Conventions.Surface)
	T700     []float32 // 700-hPa temperature, K
	Ps       []float32 // surface pressure, Pa
	Humidity []float32 // RH (fraction), dew point (K) or specific humidity (kg/kg), per Conventions.Humidity
	T850     []float32 // temperature at Conventions.LapsePressure, K
	Q700     []float32 // 700-hPa specific humidity, kg/kg
}

// SlabOutput receives float32 results. Each slice is either nil (not
// computed) or as long as the input; at least one must be non-nil. ECTEI
// needs Conventions.ECTEI. Only what is asked for is computed: LTS and Z700 alone
// skip the LCL and the lapse rate.
type SlabOutput struct {
	LTS   []float32 // K
	EIS   []float32 // K
	ECTEI []float32 // K
	LCL   []float32 // m above the surface
	Z700  []float32 // m above the surface
}

// SlabOutput64 is SlabOutput with float64 results.
type SlabOutput64 struct {
	LTS, EIS, ECTEI, LCL, Z700 []float64
}

// SlabStats counts the columns of a slab.
type SlabStats struct {
	Columns  int // columns processed
	Missing  int // columns with a NaN input: every output NaN
	Rejected int // columns with a physically impossible input: every output NaN
}

// Slab computes the conventions' metrics for every column of in into out,
// without allocating. A column with a NaN input, or with an input outside
// physical limits (temperatures outside 123–332 K, surface pressure at or
// below 700 hPa or above 1200 hPa, RH outside 0–1.05, specific humidity
// outside 0–0.1 kg/kg), gets NaN in every output; use [Kernel.Column] to
// learn why. The error reports mismatched slice lengths or slices that do
// not match the conventions; nothing is written then.
func (k *Kernel) Slab(in SlabInput, out SlabOutput) (SlabStats, error) {
	return slab(k, in, out.LTS, out.EIS, out.ECTEI, out.LCL, out.Z700)
}

// Slab64 is [Kernel.Slab] with float64 outputs.
func (k *Kernel) Slab64(in SlabInput, out SlabOutput64) (SlabStats, error) {
	return slab(k, in, out.LTS, out.EIS, out.ECTEI, out.LCL, out.Z700)
}

func (k *Kernel) checkSlab(in *SlabInput, outs [5]int, anyOut bool) error {
	n := len(in.Ts)
	r := &k.r
	if len(in.T700) != n {
		return fmt.Errorf("metrics: slab: T700 has %d values, Ts has %d", len(in.T700), n)
	}
	opt := func(name string, s []float32, want bool, why string) error {
		switch {
		case want && s == nil:
			return fmt.Errorf("metrics: slab: %s is nil but the conventions have %s", name, why)
		case !want && s != nil:
			return fmt.Errorf("metrics: slab: %s is given but the conventions do not use it (set %s)", name, why)
		case s != nil && len(s) != n:
			return fmt.Errorf("metrics: slab: %s has %d values, Ts has %d", name, len(s), n)
		}
		return nil
	}
	for _, e := range []error{
		opt("Ps", in.Ps, r.PressureField, "PressureField"),
		opt("Humidity", in.Humidity, r.Humidity != HumidityAssumedRH, "Humidity != HumidityAssumedRH"),
		opt("T850", in.T850, r.T850Field, "T850Field"),
		opt("Q700", in.Q700, r.ECTEI, "ECTEI"),
	} {
		if e != nil {
			return e
		}
	}
	if !anyOut {
		return fmt.Errorf("metrics: slab: no output slice given")
	}
	names := [5]string{"LTS", "EIS", "ECTEI", "LCL", "Z700"}
	for i, l := range outs {
		if l >= 0 && l != n {
			return fmt.Errorf("metrics: slab: output %s has %d values, the input %d", names[i], l, n)
		}
	}
	if outs[2] >= 0 && !r.ECTEI {
		return fmt.Errorf("metrics: slab: output ECTEI asked for but Conventions.ECTEI is false")
	}
	return nil
}

func olen[F float32 | float64](s []F) int {
	if s == nil {
		return -1
	}
	return len(s)
}

func slab[F float32 | float64](k *Kernel, in SlabInput, lts, eis, ectei, lcl, z700 []F) (SlabStats, error) {
	outs := [5]int{olen(lts), olen(eis), olen(ectei), olen(lcl), olen(z700)}
	if err := k.checkSlab(&in, outs, lts != nil || eis != nil || ectei != nil || lcl != nil || z700 != nil); err != nil {
		return SlabStats{}, err
	}
	n := len(in.Ts)
	st := SlabStats{Columns: n}
	w := want{lcl: lcl != nil, eis: eis != nil, ectei: ectei != nil}
	r := &k.r
	var b block
	for start := 0; start < n; start += blockSize {
		m := min(blockSize, n-start)
		b.n = m
		copyIn(b.ts[:m], in.Ts[start:start+m])
		copyIn(b.t700[:m], in.T700[start:start+m])
		if r.PressureField {
			copyIn(b.ps[:m], in.Ps[start:start+m])
		} else {
			for i := range m {
				b.ps[i] = k.psConst
			}
		}
		if in.Humidity != nil {
			copyIn(b.hum[:m], in.Humidity[start:start+m])
		}
		if in.T850 != nil {
			copyIn(b.t850[:m], in.T850[start:start+m])
		}
		if in.Q700 != nil {
			copyIn(b.q700[:m], in.Q700[start:start+m])
		}
		k.computeBlock(&b, w)
		nan := math.NaN()
		for i := range m {
			switch b.fault[i] {
			case faultNone:
				continue
			case faultMissing:
				st.Missing++
			default:
				st.Rejected++
			}
			b.lts[i], b.eis[i], b.ectei[i], b.lcl[i], b.z700[i] = nan, nan, nan, nan, nan
		}
		copyOut(lts, start, b.lts[:m])
		copyOut(eis, start, b.eis[:m])
		copyOut(ectei, start, b.ectei[:m])
		copyOut(lcl, start, b.lcl[:m])
		copyOut(z700, start, b.z700[:m])
	}
	return st, nil
}

func copyIn(dst []float64, src []float32) {
	for i, v := range src[:len(dst)] {
		dst[i] = float64(v)
	}
}

func copyOut[F float32 | float64](dst []F, start int, src []float64) {
	if dst == nil {
		return
	}
	d := dst[start : start+len(src)]
	for i, v := range src {
		d[i] = F(v)
	}
}
