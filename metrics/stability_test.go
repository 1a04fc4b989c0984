package metrics

import (
	"math"
	"testing"
)

// near reports whether got is within tol of want.
func near(got, want, tol float64) bool { return math.Abs(got-want) <= tol }

// A hand-worked EIS (Wood & Bretherton 2006, eq. 4) for an invented
// subtropical column with the default conventions, step by step. The
// intermediate values were worked out independently (Python, with SciPy's
// lambertw for the LCL) from the formulas written in each step.
//
//	Inputs: SST 290 K, T700 282 K, surface pressure 1000 hPa, RH 0.8 (assumed).
//	κ = Rd/cpd = 287.04/1005.7                 = 0.285413145
//	1. θ700 = 282 (1000/700)^κ = 282 × 1.107161704 = 312.219601 K
//	   θs   = 290 (1000/1000)^κ                 = 290 K
//	   LTS  = θ700 − θs                          = 22.219601 K   (Klein & Hartmann 1993)
//	2. z_LCL (Romps 2017, T 290 K, p 1e5 Pa, RH 0.8)   = 440.578190 m
//	3. z700 = (Rd/g)(290 + 282)/2 ln(1000/700)
//	        = (287.04/9.80665) × 286 × 0.356675   = 2985.797710 m
//	4. T850 = (290 + 282)/2 = 286 K; es(286 K) (Murphy & Koop) = 1483.533131 Pa
//	   qs = ε es/(p − (1 − ε) es), p = 85000 Pa, ε = 287.04/461.5 = 0.0109275787
//	   Γθ (W&B eq. 5) = (g/cp)[1 − (1 + Lv qs/(Rd T))/(1 + Lv² qs/(cp Rv T²))]
//	                  = 5.10990322e-3 K/m   (Γ_T = 4.64116569e-3, sum g/cp = 9.75106891e-3)
//	5. EIS = LTS − Γθ (z700 − z_LCL) = 22.219601 − 5.10990322e-3 × 2545.219520
//	       = 9.213775 K
func TestEISWorkedExample(t *testing.T) {
	c := DefaultConstants()
	steps := []struct {
		name      string
		got, want float64
		tol       float64
	}{
		{"κ", c.Kappa(), 0.285413145, 1e-9},
		{"θ700", PotentialTemperature(282, P700, c), 312.219601, 1e-6},
		{"LTS", LTS(282, 290, 100000, c), 22.219601, 1e-6},
		{"z_LCL", RompsLCL(290, 100000, 0.8), 440.578190, 1e-6},
		{"z700", Height700(290, 282, 100000, c), 2985.797710, 1e-6},
		{"es(286 K)", MurphyKoopSVP(286), 1483.533131, 1e-6},
		{"qs850", SVPMurphyKoop.SatSpecificHumidity(286, P850, c), 0.0109275787, 1e-10},
		{"Γθ", MoistAdiabatThetaGradient(286, 0.010927578742754407, c), 5.10990322e-3, 1e-11},
		{"Γ_T", MoistAdiabaticLapseRate(286, 0.010927578742754407, c), 4.64116569e-3, 1e-11},
		{"EIS", EIS(22.219600648368214, 5.10990322126798e-3, 2985.797709690638, 440.5781901641498), 9.213775, 1e-6},
	}
	for _, s := range steps {
		if !near(s.got, s.want, s.tol) {
			t.Errorf("step %s = %.10g, want %.10g ± %g", s.name, s.got, s.want, s.tol)
		}
	}
	// The kernel gives the same from the raw inputs.
	k, err := NewKernel(DefaultConventions())
	if err != nil {
		t.Fatal(err)
	}
	res, err := k.Column(ColumnInput{Ts: 290, T700: 282})
	if err != nil {
		t.Fatal(err)
	}
	if !near(res.EIS, 9.213775, 1e-6) || !near(res.LTS, 22.219601, 1e-6) || !near(res.LCL, 440.578190, 1e-6) {
		t.Errorf("Column: EIS %.7f LTS %.7f LCL %.6f; want 9.213775, 22.219601, 440.578190", res.EIS, res.LTS, res.LCL)
	}
}

// A second hand-worked column with every optional input, and ECTEI
// (Kawai, Koshiro & Webb 2017; β = 0.23, q_surface of the surface air),
// worked as above:
//
//	Inputs: SST 300 K, T700 284 K, ps 1015 hPa, dew point 295 K, T850 290 K, q700 4 g/kg.
//	1. θ700 = 284 × 1.107161704 = 314.433924 K; θs = 300 (1000/1015)^κ
//	   = 300 × 0.995759610 = 298.727883 K; LTS = 15.706041 K
//	2. RH = es(295 K)/es(300 K) (Murphy & Koop) = 0.741157348;
//	   z_LCL (Romps, 300 K, 101500 Pa, RH 0.741157348) = 644.149426 m
//	3. z700 = (Rd/g) × 292 × ln(1015/700) = 3175.687125 m
//	4. Γθ at T850 = 290 K (given): 5.50057423e-3 K/m
//	5. EIS = 15.706041 − 5.50057423e-3 × (3175.687125 − 644.149426) = 1.781130 K
//	6. q_surface = ε e/(ps − (1 − ε) e), e = RH × es(300 K) = es(295 K):
//	   0.0162211631 kg/kg
//	   ECTEI = EIS − 0.23 (Lv/cp)(q_surface − q700)
//	         = 1.781130 − 0.23 × (2.501e6/1005.7) × 0.0122211631 = −5.209006 K
func TestECTEIWorkedExample(t *testing.T) {
	r := DefaultConventions()
	r.PressureField = true
	r.Humidity = HumidityDewPoint
	r.T850Field = true
	r.ECTEI = true
	k, err := NewKernel(r)
	if err != nil {
		t.Fatal(err)
	}
	res, err := k.Column(ColumnInput{Ts: 300, T700: 284, Ps: 101500, Humidity: 295, T850: 290, Q700: 0.004})
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range []struct {
		name      string
		got, want float64
		tol       float64
	}{
		{"θ700", res.Theta700, 314.433924, 1e-6},
		{"θs", res.ThetaSurface, 298.727883, 1e-6},
		{"LTS", res.LTS, 15.706041, 1e-6},
		{"RH", res.RH, 0.741157348, 1e-9},
		{"z_LCL", res.LCL, 644.149426, 1e-6},
		{"z700", res.Z700, 3175.687125, 1e-6},
		{"Γθ", res.ThetaGradient, 5.50057423e-3, 1e-11},
		{"EIS", res.EIS, 1.781130, 1e-6},
		{"q_surface", res.QSurface, 0.0162211631, 1e-10},
		{"ECTEI", res.ECTEI, -5.209006, 1e-6},
		{"ECTEI formula", ECTEI(1.781129950195636, 0.016221163052242797, 0.004, KawaiBeta, 2.501e6, 1005.7), -5.209006, 1e-6},
	} {
		if !near(s.got, s.want, s.tol) {
			t.Errorf("%s = %.10g, want %.10g ± %g", s.name, s.got, s.want, s.tol)
		}
	}
}

// Klein & Hartmann / Wood & Bretherton consistency over a grid of surface
// and 700-hPa temperatures: EIS < LTS whenever z700 > z_LCL (Γθ > 0), and
// EIS falls as the surface warms at fixed T700 (θs rises and so does the
// moist-adiabatic correction).
func TestEISProperties(t *testing.T) {
	for _, rh := range []float64{0.5, 0.8, 0.95} {
		r := DefaultConventions()
		r.AssumedRH = rh
		k, err := NewKernel(r)
		if err != nil {
			t.Fatal(err)
		}
		for t700 := 265.0; t700 <= 290; t700 += 5 {
			prev := math.Inf(1)
			for ts := 280.0; ts <= 306; ts += 1 {
				res, err := k.Column(ColumnInput{Ts: ts, T700: t700})
				if err != nil {
					t.Fatal(err)
				}
				if res.Z700 > res.LCL && !(res.EIS < res.LTS) {
					t.Errorf("RH %g, Ts %g, T700 %g: EIS %.3f ≥ LTS %.3f with z700 %.0f > z_LCL %.0f", rh, ts, t700, res.EIS, res.LTS, res.Z700, res.LCL)
				}
				if !(res.EIS < prev) {
					t.Errorf("RH %g, T700 %g: EIS did not fall from Ts %g to %g (%.4f → %.4f)", rh, t700, ts-1, ts, prev, res.EIS)
				}
				prev = res.EIS
			}
		}
	}
}
