package metrics

import (
	"math"
	"testing"
)

// FuzzSlab feeds arbitrary float32 inputs to the kernel under a spread of
// convention sets. It checks: no panic; a NaN in any input the conventions use gives
// NaN in every output of that column; every output of a column is either
// NaN or finite, and all of a column's outputs are NaN together; the
// neighbouring columns are not disturbed; and the slab agrees with Column.
func FuzzSlab(f *testing.F) {
	nan := float32(math.NaN())
	f.Add(uint8(0), float32(290), float32(282), float32(100000), float32(0.8), float32(286), float32(0.004))
	f.Add(uint8(1), nan, float32(282), float32(100000), float32(0.8), float32(286), float32(0.004))
	f.Add(uint8(2), float32(300), float32(284), float32(101500), float32(295), float32(290), float32(0.004))
	f.Add(uint8(3), float32(-5), float32(1e30), float32(0), float32(-1), float32(nan), float32(2))
	f.Add(uint8(7), float32(123), float32(332), float32(70000.01), float32(0), float32(123), float32(0))
	f.Add(uint8(255), float32(math.Inf(1)), float32(math.Inf(-1)), float32(1e-40), float32(1.05), float32(0), float32(0.0999))
	sets := allConventions()
	f.Fuzz(func(t *testing.T, sel uint8, ts, t700, ps, hum, t850, q700 float32) {
		r := sets[int(sel)*37%len(sets)]
		k, err := NewKernel(r)
		if err != nil {
			t.Fatal(err)
		}
		good := randomColumnFixed(r)
		in := SlabInput{Ts: []float32{good[0], ts, good[0]}, T700: []float32{good[1], t700, good[1]}}
		used := []float32{ts, t700}
		if r.PressureField {
			in.Ps = []float32{good[2], ps, good[2]}
			used = append(used, ps)
		}
		if r.Humidity != HumidityAssumedRH {
			in.Humidity = []float32{good[3], hum, good[3]}
			used = append(used, hum)
		}
		if r.T850Field {
			in.T850 = []float32{good[4], t850, good[4]}
			used = append(used, t850)
		}
		if r.ECTEI {
			in.Q700 = []float32{good[5], q700, good[5]}
			used = append(used, q700)
		}
		out := SlabOutput64{LTS: make([]float64, 3), EIS: make([]float64, 3), LCL: make([]float64, 3), Z700: make([]float64, 3)}
		if r.ECTEI {
			out.ECTEI = make([]float64, 3)
		}
		st, err := k.Slab64(in, out)
		if err != nil {
			t.Fatal(err)
		}
		outs := [][]float64{out.LTS, out.EIS, out.LCL, out.Z700}
		if r.ECTEI {
			outs = append(outs, out.ECTEI)
		}
		anyNaNIn := false
		for _, v := range used {
			anyNaNIn = anyNaNIn || v != v
		}
		nNaN := 0
		for _, o := range outs {
			v := o[1]
			if math.IsInf(v, 0) {
				t.Fatalf("infinite output %v for %v", v, in)
			}
			if v != v {
				nNaN++
			}
			if o[0] != o[2] || o[0] != o[0] {
				t.Fatalf("neighbouring columns disturbed: %v", o)
			}
		}
		if anyNaNIn && nNaN != len(outs) {
			t.Fatalf("NaN input but outputs %v", outs)
		}
		if nNaN != 0 && nNaN != len(outs) {
			t.Fatalf("some but not all outputs NaN: %v", outs)
		}
		if st.Missing+st.Rejected > 1 || (nNaN > 0) != (st.Missing+st.Rejected == 1) {
			t.Fatalf("stats %+v with %d NaN outputs", st, nNaN)
		}
		res, cerr := k.Column(ColumnInput{Ts: float64(ts), T700: float64(t700), Ps: float64(ps), Humidity: float64(hum), T850: float64(t850), Q700: float64(q700)})
		if (cerr != nil) != (nNaN > 0) {
			t.Fatalf("Column error %v but slab NaN count %d", cerr, nNaN)
		}
		if cerr == nil && (res.EIS != out.EIS[1] || res.LTS != out.LTS[1] || res.LCL != out.LCL[1]) {
			t.Fatalf("Column %+v differs from slab %v", res, outs)
		}
	})
}

// randomColumnFixed is one fixed valid column for conventions r, as float32:
// Ts, T700, Ps, humidity of the conventions' kind, T850, q700.
func randomColumnFixed(r Conventions) [6]float32 {
	hum := float32(0.8)
	switch r.Humidity {
	case HumidityDewPoint:
		hum = 287
	case HumiditySpecific:
		hum = 0.011
	}
	return [6]float32{292, 281, 101000, hum, 286, 0.005}
}
