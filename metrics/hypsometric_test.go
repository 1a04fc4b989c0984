package metrics

import (
	"math"
	"testing"
)

// U.S. Standard Atmosphere 1976 (NOAA/NASA/USAF 1976), lowest layer:
// T = Tb + Lb H with Tb = 288.15 K, Lb = −6.5 K/km, Pb = 101325 Pa, and
// its eq. 33a, P = Pb [Tb/(Tb + Lb H)]^(g0 M0/(R* Lb)), with g0 = 9.80665,
// M0 = 28.9644 kg/kmol, R* = 8.31432 J/(mol K) (constants of the standard).
const (
	ussaTb = 288.15
	ussaLb = -6.5e-3
	ussaPb = 101325.0
	ussaRd = 8314.32 / 28.9644 // R*/M0, J kg-1 K-1
)

// ussaHeight inverts eq. 33a: the geopotential height, m, of pressure p.
func ussaHeight(p float64) float64 {
	a := -ussaRd * ussaLb / StandardGravity // R* Lb/(g0 M0) with the sign of T falling
	return ussaTb / -ussaLb * (1 - math.Pow(p/ussaPb, a))
}

func ussaTemperature(p float64) float64 { return ussaTb + ussaLb*ussaHeight(p) }

func TestUSStandardAtmosphere(t *testing.T) {
	// The standard's heights of 700 and 850 hPa: ≈ 3012 m and ≈ 1457 m.
	for _, tc := range []struct{ p, z float64 }{{70000, 3012}, {85000, 1457}} {
		if got := ussaHeight(tc.p); math.Abs(got-tc.z) > 1 {
			t.Fatalf("USSA-1976 reference: z(%g Pa) = %.1f m, want %g ± 1", tc.p, got, tc.z)
		}
	}
	c := DefaultConstants()
	c.Rd = ussaRd
	for _, p := range []float64{70000, 85000} {
		// Thickness with the exact ln-p mean temperature of the layer,
		// T̄ = ∫T d ln p/Δ ln p = (Tb − T(p))/ln(Tb/T(p)) for a constant lapse
		// rate, reproduces the standard exactly.
		tp := ussaTemperature(p)
		tmean := (ussaTb - tp) / math.Log(ussaTb/tp)
		if got, want := Thickness(ussaPb, p, tmean, c), ussaHeight(p); math.Abs(got-want) > 0.01 {
			t.Errorf("Thickness(1013.25 → %g hPa) = %.3f m, USSA-1976 %.3f m", p/100, got, want)
		}
	}
	// Height700 uses the arithmetic mean (Ts + T700)/2, warmer than the ln-p
	// mean, and the default Rd: for the standard atmosphere it lies within
	// 2 m of the standard's 3012 m.
	d := DefaultConstants()
	got := Height700(ussaTb, ussaTemperature(70000), ussaPb, d)
	if math.Abs(got-ussaHeight(70000)) > 2 {
		t.Errorf("Height700 for USSA-1976 = %.2f m, standard %.2f m", got, ussaHeight(70000))
	}
	t.Logf("USSA-1976: z700 = %.2f m (standard), %.2f m (Height700, arithmetic mean)", ussaHeight(70000), got)
}
