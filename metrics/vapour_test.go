package metrics

import (
	"math"
	"testing"
)

// if97Psat is the saturation pressure of water, Pa, of the IAPWS Industrial
// Formulation 1997 (IAPWS-IF97, region 4, eq. 30 with the coefficients of
// Table 34; coefficients from memory, verified below against the
// standard's own check values of Table 35). It is an independent reference
// for the formulas of this package, valid for 273.15 K ≤ T ≤ 647.096 K.
func if97Psat(T float64) float64 {
	n := [...]float64{
		0.11670521452767e4, -0.72421316703206e6, -0.17073846940092e2,
		0.12020824702470e5, -0.32325550322333e7, 0.14915108613530e2,
		-0.48232657361591e4, 0.40511340542057e6, -0.23855557567849,
		0.65017534844798e3,
	}
	th := T + n[8]/(T-n[9])
	A := th*th + n[0]*th + n[1]
	B := n[2]*th*th + n[3]*th + n[4]
	C := n[5]*th*th + n[6]*th + n[7]
	x := 2 * C / (-B + math.Sqrt(B*B-4*A*C))
	return x * x * x * x * 1e6
}

func relErr(got, want float64) float64 { return math.Abs(got/want - 1) }

// The reference itself reproduces IAPWS-IF97 Table 35 (check values for
// eq. 30): 300 K → 0.353658941e-2 MPa, 500 K → 0.263889776e1 MPa,
// 600 K → 0.123443146e2 MPa.
func TestIF97ReferenceCheckValues(t *testing.T) {
	for _, tc := range []struct{ T, psat float64 }{
		{300, 0.353658941e-2 * 1e6},
		{500, 0.263889776e1 * 1e6},
		{600, 0.123443146e2 * 1e6},
	} {
		if e := relErr(if97Psat(tc.T), tc.psat); e > 1e-8 {
			t.Errorf("IF97 reference at %g K: %v Pa, want %v (rel. error %.2g)", tc.T, if97Psat(tc.T), tc.psat, e)
		}
	}
}

func TestSaturationVapourPressure(t *testing.T) {
	tests := []struct {
		name   string
		f      func(float64) float64
		T      float64
		want   float64 // Pa
		tol    float64 // Pa
		source string
	}{
		{"MK triple point", MurphyKoopSVP, 273.16, 611.657, 0.001, "Murphy & Koop 2005, triple-point pressure 611.657 Pa (also IAPWS, Wagner & Pruss 2002)"},
		{"Bolton 25 °C", BoltonSVP, 298.15, 3167.4, 0.1, "Bolton 1980 eq. 10 at 25 °C = 31.674 hPa"},
		{"Bolton 0 °C", BoltonSVP, 273.15, 611.2, 1e-9, "Bolton 1980 eq. 10: 6.112 hPa at 0 °C by construction"},
	}
	for _, tc := range tests {
		if got := tc.f(tc.T); math.Abs(got-tc.want) > tc.tol {
			t.Errorf("%s: %v Pa, want %v ± %v (%s)", tc.name, got, tc.want, tc.tol, tc.source)
		}
	}
}

// Murphy & Koop eq. 10 against IAPWS-IF97 over 0–30 °C: MK fitted their
// liquid formula to the IAPWS-95 data, so the two agree to about 1e-4.
// Bolton (1980) and Romps' (2017) formula must lie within 0.35 % of MK over
// the same range (the brief's acceptance bound; Bolton claims 0.1 % against
// the tables of his time).
func TestSVPFormsAgree(t *testing.T) {
	maxMK, maxB, maxR := 0.0, 0.0, 0.0
	for tc := 0.0; tc <= 30.0001; tc += 0.25 {
		T := ZeroCelsius + tc
		mk := MurphyKoopSVP(T)
		maxMK = math.Max(maxMK, relErr(mk, if97Psat(T)))
		maxB = math.Max(maxB, relErr(BoltonSVP(T), mk))
		maxR = math.Max(maxR, relErr(rompsPvstarl(T), mk))
	}
	if maxMK > 2e-4 {
		t.Errorf("Murphy & Koop vs IAPWS-IF97 over 0–30 °C: max rel. difference %.3g, want ≤ 2e-4", maxMK)
	}
	if maxB > 0.0035 {
		t.Errorf("Bolton vs Murphy & Koop over 0–30 °C: %.3g, want ≤ 0.35 %%", maxB)
	}
	if maxR > 0.0035 {
		t.Errorf("Romps 2017 pvstarl vs Murphy & Koop over 0–30 °C: %.3g, want ≤ 0.35 %%", maxR)
	}
	t.Logf("max rel. differences 0–30 °C: MK–IF97 %.2g, Bolton–MK %.2g, Romps–MK %.2g", maxMK, maxB, maxR)
}

func TestSVPFormulaMethods(t *testing.T) {
	c := DefaultConstants()
	for _, f := range []SVPFormula{SVPMurphyKoop, SVPBolton} {
		g, err := ParseSVPFormula(f.String())
		if err != nil || g != f {
			t.Errorf("ParseSVPFormula(%q) = %v, %v", f.String(), g, err)
		}
		for _, T := range []float64{240, 273.15, 288, 300, 320} {
			// d ln es/dT against a centred difference
			h := 1e-4
			num := (math.Log(f.Pressure(T+h)) - math.Log(f.Pressure(T-h))) / (2 * h)
			if relErr(f.dlnes(T), num) > 1e-7 {
				t.Errorf("%v: dlnes(%g) = %v, numerical %v", f, T, f.dlnes(T), num)
			}
			for _, rh := range []float64{0.05, 0.5, 0.8, 1} {
				td := f.DewPoint(T, rh)
				if relErr(f.Pressure(td), rh*f.Pressure(T)) > 1e-12 {
					t.Errorf("%v: es(DewPoint(%g, %g)) = %v, want %v", f, T, rh, f.Pressure(td), rh*f.Pressure(T))
				}
				if got := f.RelativeHumidity(T, td); relErr(got, rh) > 1e-12 {
					t.Errorf("%v: RelativeHumidity(%g, %g) = %v, want %v", f, T, td, got, rh)
				}
			}
			// q = r/(1 + r) (common practice) and e from q inverts q from e
			p := 90000.0
			r, q := f.SatMixingRatio(T, p, c), f.SatSpecificHumidity(T, p, c)
			if relErr(q, r/(1+r)) > 1e-14 {
				t.Errorf("%v at %g K: q = %v, r/(1+r) = %v", f, T, q, r/(1+r))
			}
			if relErr(VapourPressure(q, p, c), f.Pressure(T)) > 1e-14 {
				t.Errorf("%v: VapourPressure(SatSpecificHumidity) = %v, want %v", f, VapourPressure(q, p, c), f.Pressure(T))
			}
		}
	}
	if _, err := ParseSVPFormula("goff-gratch"); err == nil {
		t.Error("ParseSVPFormula accepted an unknown name")
	}
	if !math.IsNaN(SVPMurphyKoop.DewPoint(290, 0)) || !math.IsNaN(SVPFormula(0).Pressure(290)) {
		t.Error("DewPoint(rh=0) or an unset formula did not give NaN")
	}
}

// A dew point worked by hand from Bolton's inverse (Bolton 1980 eq. 10
// solved for T): at 20 °C and RH 0.5, x = ln(e/611.2) = 17.67·20/263.5
// + ln 0.5 = 1.341176 − 0.693147 = 0.648029, and Td = 243.5 x/(17.67 − x)
// = 157.795/17.02197 = 9.2701 °C.
func TestDewPointWorked(t *testing.T) {
	td := SVPBolton.DewPoint(293.15, 0.5) - ZeroCelsius
	if math.Abs(td-9.2701) > 5e-4 {
		t.Errorf("Bolton dew point at 20 °C, RH 0.5: %.5f °C, want 9.2701", td)
	}
	// Murphy & Koop differs from Bolton by < 0.1 % in es here: < 0.02 K in Td.
	if d := SVPMurphyKoop.DewPoint(293.15, 0.5) - ZeroCelsius - td; math.Abs(d) > 0.02 {
		t.Errorf("MK and Bolton dew points differ by %.4f K", d)
	}
}

func TestPotentialTemperature(t *testing.T) {
	c := DefaultConstants()
	// θ = T at p0, and by hand: 280 K at 700 hPa with κ = 287.04/1005.7:
	// (1000/700)^0.285413 = exp(0.285413 × 0.356675) = 1.107162 → 310.0053 K.
	if got := PotentialTemperature(288, 100000, c); got != 288 {
		t.Errorf("θ at p0 = %v, want 288", got)
	}
	if got := PotentialTemperature(280, 70000, c); math.Abs(got-310.0053) > 1e-3 {
		t.Errorf("θ(280 K, 700 hPa) = %v, want 310.0053", got)
	}
	if k := c.Kappa(); math.Abs(k-0.2854) > 5e-5 {
		t.Errorf("κ = %v, want 0.2854 (Bolton 1980)", k)
	}
}
