package metrics

import (
	"math"
	"testing"
)

// Textbook saturated-adiabatic lapse rates at 1000 hPa (tabulations such as
// those in cloud-physics textbooks; values from memory, as quoted in the
// task brief): ≈ 6.4 K/km at 0 °C and ≈ 4.3 K/km at 20 °C. The tables use
// a temperature-dependent Lv and slightly different constants, hence the
// 0.1 K/km tolerance.
func TestMoistAdiabaticLapseRateTextbook(t *testing.T) {
	c := DefaultConstants()
	for _, tc := range []struct{ Tc, want float64 }{{0, 6.4e-3}, {20, 4.3e-3}} {
		T := ZeroCelsius + tc.Tc
		rs := SVPMurphyKoop.SatMixingRatio(T, 100000, c) // the AMS form uses the mixing ratio
		got := MoistAdiabaticLapseRate(T, rs, c)
		if math.Abs(got-tc.want) > 0.1e-3 {
			t.Errorf("Γ_T at 1000 hPa, %g °C = %.3f K/km, want %.1f ± 0.1", tc.Tc, got*1e3, tc.want*1e3)
		}
		// Bolton's Lv(T) moves the 20 °C value toward the table.
		cb := c
		cb.LvSlope = BoltonLvSlope
		t.Logf("%g °C: Γ_T = %.3f K/km (constant Lv), %.3f K/km (Lv of Bolton 1980 eq. 2)", tc.Tc, got*1e3,
			MoistAdiabaticLapseRate(T, SVPMurphyKoop.SatMixingRatio(T, 100000, cb), cb)*1e3)
	}
}

// The identity Γθ + Γ_T = g/cp. With the same saturation humidity w, the
// same constants and ε = Rd/Rv, the AMS form Γ_T = g(1 + Lv w/(Rd T))/(cp +
// Lv² w ε/(Rd T²)) equals (g/cp)(1 + Lv w/(Rd T))/(1 + Lv² w/(cp Rv T²)),
// which W&B's eq. 5 subtracts from g/cp. The two functions are written
// independently, so this test fails if either formula is altered.
func TestLapseRateIdentity(t *testing.T) {
	def := DefaultConstants()
	withLv := def
	withLv.LvSlope = BoltonLvSlope
	for _, c := range []Constants{def, withLv} {
		gcp := c.G / c.Cpd
		for T := 230.0; T <= 320; T += 5 {
			for _, p := range []float64{50000, 85000, 100000} {
				for _, w := range []float64{SVPMurphyKoop.SatSpecificHumidity(T, p, c), SVPBolton.SatMixingRatio(T, p, c), 0} {
					sum := MoistAdiabatThetaGradient(T, w, c) + MoistAdiabaticLapseRate(T, w, c)
					if relErr(sum, gcp) > 1e-9 {
						t.Errorf("T=%g p=%g w=%g: Γθ + Γ_T = %v, g/cp = %v", T, p, w, sum, gcp)
					}
				}
			}
		}
	}
}

// At 0 °C the two quantities differ by a factor two — the case where
// confusing them (e.g. using Γ_T in EIS) is most visible: Γ_T ≈ 6.4 K/km
// (textbook, above) but Γθ = g/cp − Γ_T ≈ 9.75 − 6.4 ≈ 3.3 K/km. At 20 °C
// they cross over: Γ_T ≈ 4.2–4.3 and Γθ ≈ 5.5 K/km.
func TestLapseRatesDifferAtZeroCelsius(t *testing.T) {
	c := DefaultConstants()
	T := ZeroCelsius
	qs := SVPMurphyKoop.SatSpecificHumidity(T, 100000, c)
	gT, gθ := MoistAdiabaticLapseRate(T, qs, c), MoistAdiabatThetaGradient(T, qs, c)
	if math.Abs(gθ-3.3e-3) > 0.15e-3 || math.Abs(gT-6.45e-3) > 0.1e-3 {
		t.Errorf("0 °C, 1000 hPa: Γθ = %.3f, Γ_T = %.3f K/km; want ≈ 3.3 and ≈ 6.45", gθ*1e3, gT*1e3)
	}
	if gT-gθ < 2.5e-3 {
		t.Errorf("0 °C: Γ_T − Γθ = %.3f K/km, expected > 2.5", (gT-gθ)*1e3)
	}
	T = ZeroCelsius + 20
	qs = SVPMurphyKoop.SatSpecificHumidity(T, 100000, c)
	if gθ := MoistAdiabatThetaGradient(T, qs, c); math.Abs(gθ-5.5e-3) > 0.15e-3 {
		t.Errorf("20 °C: Γθ = %.3f K/km, want ≈ 5.5", gθ*1e3)
	}
	// Dry air: Γθ = 0 (θ is conserved) and Γ_T = g/cp (dry adiabat).
	if MoistAdiabatThetaGradient(T, 0, c) != 0 || relErr(MoistAdiabaticLapseRate(T, 0, c), c.G/c.Cpd) > 1e-15 {
		t.Error("with w = 0 the gradients are not 0 and g/cp")
	}
}
