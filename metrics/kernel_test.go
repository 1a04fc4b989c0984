package metrics

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// allConventions returns every combination of the conventions' discrete choices.
func allConventions() []Conventions {
	var out []Conventions
	for _, svp := range []SVPFormula{SVPMurphyKoop, SVPBolton} {
		for _, lcl := range []LCLMethod{LCLRomps, LCLBolton, LCLLinear} {
			for _, hum := range []HumiditySource{HumidityAssumedRH, HumidityRH, HumidityDewPoint, HumiditySpecific} {
				for _, psf := range []bool{false, true} {
					for _, t850f := range []bool{false, true} {
						for _, lm := range []LapseMoisture{LapseQs, LapseRs} {
							for _, ec := range []int{0, 1, 2} {
								for _, slope := range []float64{0, BoltonLvSlope} {
									r := DefaultConventions()
									r.SVP, r.LCL, r.Humidity, r.PressureField, r.T850Field, r.LapseMoisture = svp, lcl, hum, psf, t850f, lm
									r.Constants.LvSlope = slope
									r.ECTEI = ec > 0
									if ec == 2 {
										r.ECTEISurface = ECTEISaturated
									}
									if !psf {
										r.SurfacePressure = 101000
									}
									r.AssumedRH = 0.75
									out = append(out, r)
								}
							}
						}
					}
				}
			}
		}
	}
	return out
}

// randomColumn is an invented, physically possible column (synthetic test
// data): SST 270–310 K, T700 250–290 K, surface pressure 950–1040 hPa,
// humidity of the conventions' kind for RH 0.05–1.03, T850 between Ts and T700,
// q700 0–10 g/kg.
func randomColumn(rng *rand.Rand, r Conventions) ColumnInput {
	c := ColumnInput{Ts: 270 + 40*rng.Float64(), T700: 250 + 40*rng.Float64(), Ps: 95000 + 9000*rng.Float64()}
	rh := 0.05 + 0.98*rng.Float64()
	switch r.Humidity {
	case HumidityRH:
		c.Humidity = rh
	case HumidityDewPoint:
		c.Humidity = r.SVP.DewPoint(c.Ts, rh)
	case HumiditySpecific:
		ps := r.SurfacePressure
		if r.PressureField {
			ps = c.Ps
		}
		c.Humidity = SpecificHumidity(rh*r.SVP.Pressure(c.Ts), ps, r.Constants)
	}
	c.T850 = c.T700 + (c.Ts-c.T700)*(0.3+0.5*rng.Float64())
	c.Q700 = 0.01 * rng.Float64()
	return c
}

// reference computes a column from the exported physics functions alone:
// the published Romps form through LambertWm1, math.Exp/Log everywhere.
func reference(r Conventions, in ColumnInput) (lts, lcl, z700, gam, eis, ectei float64) {
	c := r.Constants
	ps := r.SurfacePressure
	if r.PressureField {
		ps = in.Ps
	}
	lts = LTS(in.T700, in.Ts, ps, c)
	var rh float64
	switch r.Humidity {
	case HumidityAssumedRH:
		rh = r.AssumedRH
	case HumidityRH:
		rh = in.Humidity
	case HumidityDewPoint:
		rh = r.SVP.RelativeHumidity(in.Ts, in.Humidity)
	case HumiditySpecific:
		rh = VapourPressure(in.Humidity, ps, c) / r.SVP.Pressure(in.Ts)
	}
	if r.LCL == LCLLinear && r.Humidity == HumidityDewPoint && rh < 1 {
		lcl = LinearLCL(in.Ts, in.Humidity)
	} else {
		lcl = r.LCL.Height(in.Ts, ps, rh, r.SVP, c)
	}
	z700 = Height700(in.Ts, in.T700, ps, c)
	t850 := 0.5 * (in.Ts + in.T700)
	if r.T850Field {
		t850 = in.T850
	}
	w := r.SVP.SatSpecificHumidity(t850, r.LapsePressure, c)
	if r.LapseMoisture == LapseRs {
		w = r.SVP.SatMixingRatio(t850, r.LapsePressure, c)
	}
	gam = MoistAdiabatThetaGradient(t850, w, c)
	eis = EIS(lts, gam, z700, lcl)
	ectei = math.NaN()
	if r.ECTEI {
		qs := SpecificHumidity(rh*r.SVP.Pressure(in.Ts), ps, c)
		if r.ECTEISurface == ECTEISaturated {
			qs = r.SVP.SatSpecificHumidity(in.Ts, ps, c)
		}
		ectei = ECTEI(eis, qs, in.Q700, r.ECTEIBeta, c.Lv(in.Ts), c.Cpd)
	}
	return
}

// The kernel (fast exp/log, log-space Romps LCL, fused divisions) against
// the composition of the exported reference functions, for every conventions.
func TestColumnMatchesReference(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	worst := 0.0
	for _, r := range allConventions() {
		k, err := NewKernel(r)
		if err != nil {
			t.Fatalf("%s: %v", r.Text(), err)
		}
		for range 12 {
			in := randomColumn(rng, r)
			res, err := k.Column(in)
			if err != nil {
				t.Fatalf("%s: %+v: %v", r.Text(), in, err)
			}
			lts, lcl, z700, gam, eis, ectei := reference(r, in)
			for _, q := range []struct {
				name      string
				got, want float64
			}{
				{"LTS", res.LTS, lts}, {"LCL", res.LCL, lcl}, {"z700", res.Z700, z700},
				{"Γθ×1e3", res.ThetaGradient * 1e3, gam * 1e3}, {"EIS", res.EIS, eis},
			} {
				d := math.Abs(q.got-q.want) / math.Max(1, math.Abs(q.want))
				worst = math.Max(worst, d)
				if d > 1e-10 {
					t.Errorf("%s\n%+v: %s = %.15g, reference %.15g", r.Text(), in, q.name, q.got, q.want)
				}
			}
			if r.ECTEI && !near(res.ECTEI, ectei, 1e-9) {
				t.Errorf("%s\n%+v: ECTEI = %.15g, reference %.15g", r.Text(), in, res.ECTEI, ectei)
			}
			if !r.ECTEI && !math.IsNaN(res.ECTEI) {
				t.Errorf("ECTEI is %v with ECTEI off", res.ECTEI)
			}
			if !near(res.ThetaGradient+res.LapseRate850, r.Constants.G/r.Constants.Cpd, 1e-12) {
				t.Errorf("Γθ + Γ_T = %v, g/cp = %v", res.ThetaGradient+res.LapseRate850, r.Constants.G/r.Constants.Cpd)
			}
		}
	}
	t.Logf("kernel vs reference: worst difference %.3g (absolute, relative above 1)", worst)
}

// slabFixture is an invented slab of n columns for conventions r, with
// missing values and impossible values at known places.
func slabFixture(rng *rand.Rand, r Conventions, n int) (SlabInput, []ColumnInput) {
	in := SlabInput{Ts: make([]float32, n), T700: make([]float32, n)}
	if r.PressureField {
		in.Ps = make([]float32, n)
	}
	if r.Humidity != HumidityAssumedRH {
		in.Humidity = make([]float32, n)
	}
	if r.T850Field {
		in.T850 = make([]float32, n)
	}
	if r.ECTEI {
		in.Q700 = make([]float32, n)
	}
	cols := make([]ColumnInput, n)
	set := func(s []float32, i int, v float64) float64 {
		if s == nil {
			return 0
		}
		s[i] = float32(v)
		return float64(s[i])
	}
	for i := range n {
		c := randomColumn(rng, r)
		switch i % 17 {
		case 3:
			c.Ts = math.NaN()
		case 5:
			c.T700 = -10 // impossible
		case 7:
			c.Humidity = math.NaN()
		case 11:
			c.Ps = 60000 // surface above 700 hPa
		case 13:
			c.Q700 = math.NaN()
		}
		cols[i] = ColumnInput{
			Ts: set(in.Ts, i, c.Ts), T700: set(in.T700, i, c.T700), Ps: set(in.Ps, i, c.Ps),
			Humidity: set(in.Humidity, i, c.Humidity), T850: set(in.T850, i, c.T850), Q700: set(in.Q700, i, c.Q700),
		}
	}
	return in, cols
}

func same(a, b float64) bool { return a == b || (math.IsNaN(a) && math.IsNaN(b)) }

// Slab and Slab64 give exactly Column's numbers (one implementation), NaN
// exactly where Column reports an error, and count them.
func TestSlabMatchesColumn(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 14))
	for ri, r := range allConventions() {
		if ri%7 != 0 { // a spread of convention sets is enough here
			continue
		}
		k, err := NewKernel(r)
		if err != nil {
			t.Fatal(err)
		}
		const n = 101 // several blocks and a partial one
		in, cols := slabFixture(rng, r, n)
		o64 := SlabOutput64{LTS: make([]float64, n), EIS: make([]float64, n), LCL: make([]float64, n), Z700: make([]float64, n)}
		o32 := SlabOutput{LTS: make([]float32, n), EIS: make([]float32, n), LCL: make([]float32, n), Z700: make([]float32, n)}
		if r.ECTEI {
			o64.ECTEI, o32.ECTEI = make([]float64, n), make([]float32, n)
		}
		st, err := k.Slab64(in, o64)
		if err != nil {
			t.Fatal(err)
		}
		st32, err := k.Slab(in, o32)
		if err != nil {
			t.Fatal(err)
		}
		if st != st32 {
			t.Errorf("stats differ: %+v vs %+v", st, st32)
		}
		var want SlabStats
		want.Columns = n
		for i, c := range cols {
			res, err := k.Column(c)
			switch {
			case errors.Is(err, ErrMissingInput):
				want.Missing++
			case errors.Is(err, ErrImpossibleInput):
				want.Rejected++
			case err != nil:
				t.Fatal(err)
			}
			if err != nil {
				res = ColumnResult{LTS: math.NaN(), EIS: math.NaN(), LCL: math.NaN(), Z700: math.NaN(), ECTEI: math.NaN()}
			}
			checks := [][3]float64{{o64.LTS[i], res.LTS, float64(o32.LTS[i])}, {o64.EIS[i], res.EIS, float64(o32.EIS[i])}, {o64.LCL[i], res.LCL, float64(o32.LCL[i])}, {o64.Z700[i], res.Z700, float64(o32.Z700[i])}}
			if r.ECTEI {
				checks = append(checks, [3]float64{o64.ECTEI[i], res.ECTEI, float64(o32.ECTEI[i])})
			}
			for j, q := range checks {
				if !same(q[0], q[1]) {
					t.Fatalf("%s\ncolumn %d output %d: Slab64 %v, Column %v (err %v)", r.Text(), i, j, q[0], q[1], err)
				}
				if !same(q[2], float64(float32(q[1]))) {
					t.Fatalf("column %d output %d: Slab %v, float32(Column) %v", i, j, q[2], float32(q[1]))
				}
			}
		}
		if st != want {
			t.Errorf("%s: stats %+v, want %+v", r.Text(), st, want)
		}
	}
}

// Asking for fewer outputs changes none of them.
func TestSlabPartialOutputs(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 16))
	r := DefaultConventions()
	k, _ := NewKernel(r)
	in, _ := slabFixture(rng, r, 70)
	full := SlabOutput{LTS: make([]float32, 70), EIS: make([]float32, 70), LCL: make([]float32, 70), Z700: make([]float32, 70)}
	if _, err := k.Slab(in, full); err != nil {
		t.Fatal(err)
	}
	for _, o := range []SlabOutput{{LTS: make([]float32, 70)}, {Z700: make([]float32, 70)}, {LCL: make([]float32, 70)}, {EIS: make([]float32, 70)}} {
		if _, err := k.Slab(in, o); err != nil {
			t.Fatal(err)
		}
		for i := range 70 {
			for _, p := range [][2][]float32{{o.LTS, full.LTS}, {o.Z700, full.Z700}, {o.LCL, full.LCL}, {o.EIS, full.EIS}} {
				if p[0] != nil && !same(float64(p[0][i]), float64(p[1][i])) {
					t.Fatalf("column %d: partial %v, full %v", i, p[0][i], p[1][i])
				}
			}
		}
	}
}

func TestSlabNaNPropagation(t *testing.T) {
	r := DefaultConventions()
	r.PressureField, r.Humidity, r.T850Field, r.ECTEI = true, HumiditySpecific, true, true
	k, err := NewKernel(r)
	if err != nil {
		t.Fatal(err)
	}
	const n = 40
	mk := func() SlabInput {
		in := SlabInput{Ts: make([]float32, n), T700: make([]float32, n), Ps: make([]float32, n), Humidity: make([]float32, n), T850: make([]float32, n), Q700: make([]float32, n)}
		for i := range n {
			in.Ts[i], in.T700[i], in.Ps[i], in.Humidity[i], in.T850[i], in.Q700[i] = 295, 282, 101000, 0.012, 288, 0.004
		}
		return in
	}
	nan := float32(math.NaN())
	for name, field := range map[string]func(*SlabInput) []float32{
		"Ts": func(s *SlabInput) []float32 { return s.Ts }, "T700": func(s *SlabInput) []float32 { return s.T700 },
		"Ps": func(s *SlabInput) []float32 { return s.Ps }, "Humidity": func(s *SlabInput) []float32 { return s.Humidity },
		"T850": func(s *SlabInput) []float32 { return s.T850 }, "Q700": func(s *SlabInput) []float32 { return s.Q700 },
	} {
		in := mk()
		field(&in)[17] = nan
		out := SlabOutput{LTS: make([]float32, n), EIS: make([]float32, n), ECTEI: make([]float32, n), LCL: make([]float32, n), Z700: make([]float32, n)}
		st, err := k.Slab(in, out)
		if err != nil {
			t.Fatal(err)
		}
		if st.Missing != 1 || st.Rejected != 0 {
			t.Errorf("NaN in %s: stats %+v", name, st)
		}
		for oi, o := range [][]float32{out.LTS, out.EIS, out.ECTEI, out.LCL, out.Z700} {
			for i, v := range o {
				if isNaN := v != v; isNaN != (i == 17) {
					t.Errorf("NaN in %s[17]: output %d[%d] = %v", name, oi, i, v)
				}
			}
		}
	}
}

func TestImpossibleInputs(t *testing.T) {
	k, _ := NewKernel(DefaultConventions())
	rRH := DefaultConventions()
	rRH.Humidity = HumidityRH
	kRH, _ := NewKernel(rRH)
	rTd := DefaultConventions()
	rTd.Humidity = HumidityDewPoint
	kTd, _ := NewKernel(rTd)
	rPs := DefaultConventions()
	rPs.PressureField = true
	kPs, _ := NewKernel(rPs)
	for _, tc := range []struct {
		k    *Kernel
		in   ColumnInput
		want string
	}{
		{k, ColumnInput{Ts: -5, T700: 280}, "below absolute zero"},
		{k, ColumnInput{Ts: 17, T700: 280}, "given in °C"},
		{k, ColumnInput{Ts: 290, T700: -1}, "700-hPa temperature"},
		{k, ColumnInput{Ts: 400, T700: 280}, "surface temperature"},
		{kRH, ColumnInput{Ts: 290, T700: 280, Humidity: 1.2}, "relative humidity 1.2"},
		{kRH, ColumnInput{Ts: 290, T700: 280, Humidity: 80}, "80 % is 0.8"},
		{kRH, ColumnInput{Ts: 290, T700: 280, Humidity: -0.1}, "relative humidity"},
		{kTd, ColumnInput{Ts: 290, T700: 280, Humidity: 295}, "dew point 295 K is above"},
		{kPs, ColumnInput{Ts: 290, T700: 280, Ps: 1013}, "surface pressure 1013 Pa"},
		{kPs, ColumnInput{Ts: 290, T700: 280, Ps: 65000}, "700-hPa level must be above the surface"},
		{k, ColumnInput{Ts: math.NaN(), T700: 280}, "surface temperature"},
	} {
		_, err := tc.k.Column(tc.in)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%+v: error %v, want it to mention %q", tc.in, err, tc.want)
		}
		if err != nil && !errors.Is(err, ErrImpossibleInput) && !errors.Is(err, ErrMissingInput) {
			t.Errorf("%v does not wrap ErrImpossibleInput or ErrMissingInput", err)
		}
	}
	// RH 1.05 is accepted (LCL 0); the limit is inclusive.
	if res, err := kRH.Column(ColumnInput{Ts: 290, T700: 280, Humidity: 1.05}); err != nil || res.LCL != 0 {
		t.Errorf("RH 1.05: %v, LCL %v", err, res.LCL)
	}
}

func TestSlabErrors(t *testing.T) {
	k, _ := NewKernel(DefaultConventions())
	ts := []float32{290, 291}
	good := SlabOutput{EIS: make([]float32, 2)}
	for _, tc := range []struct {
		in   SlabInput
		out  SlabOutput
		want string
	}{
		{SlabInput{Ts: ts, T700: ts[:1]}, good, "T700 has 1"},
		{SlabInput{Ts: ts, T700: ts, Ps: ts}, good, "Ps is given but the conventions do not use it"},
		{SlabInput{Ts: ts, T700: ts, Humidity: ts}, good, "Humidity is given"},
		{SlabInput{Ts: ts, T700: ts}, SlabOutput{}, "no output"},
		{SlabInput{Ts: ts, T700: ts}, SlabOutput{LTS: make([]float32, 3)}, "output LTS has 3"},
		{SlabInput{Ts: ts, T700: ts}, SlabOutput{ECTEI: make([]float32, 2)}, "Conventions.ECTEI is false"},
	} {
		if _, err := k.Slab(tc.in, tc.out); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("error %v, want %q", err, tc.want)
		}
	}
	r := DefaultConventions()
	r.PressureField = true
	kp, _ := NewKernel(r)
	if _, err := kp.Slab(SlabInput{Ts: ts, T700: ts}, good); err == nil || !strings.Contains(err.Error(), "Ps is nil") {
		t.Errorf("missing Ps: %v", err)
	}
}

func TestSlabAllocatesNothing(t *testing.T) {
	rng := rand.New(rand.NewPCG(17, 18))
	r := DefaultConventions()
	r.ECTEI = true
	k, _ := NewKernel(r)
	in, _ := slabFixture(rng, r, 1000)
	out := SlabOutput{LTS: make([]float32, 1000), EIS: make([]float32, 1000), ECTEI: make([]float32, 1000), LCL: make([]float32, 1000), Z700: make([]float32, 1000)}
	out64 := SlabOutput64{LTS: make([]float64, 1000), EIS: make([]float64, 1000)}
	if a := testing.AllocsPerRun(20, func() { _, _ = k.Slab(in, out) }); a != 0 {
		t.Errorf("Slab allocates %v times per call", a)
	}
	if a := testing.AllocsPerRun(20, func() { _, _ = k.Slab64(in, out64) }); a != 0 {
		t.Errorf("Slab64 allocates %v times per call", a)
	}
}
