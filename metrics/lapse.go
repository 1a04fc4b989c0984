package metrics

// The two moist-adiabatic gradients below are different quantities and must
// not be confused:
//
//   - MoistAdiabaticLapseRate is Γ_T = −dT/dz of a saturated parcel rising
//     pseudo-adiabatically, ≈ 4–7 K km-1 near the surface.
//   - MoistAdiabatThetaGradient is the Γ of Wood & Bretherton (2006, eq. 5),
//     the rate at which potential temperature rises with height along the
//     moist adiabat in the linearised form W&B use: g/cp − Γ_T,
//     ≈ 3–6 K km-1. (The exact dθ/dz along the adiabat is (θ/T)(g/cp − Γ_T);
//     W&B, and hence EIS, omit the factor θ/T ≈ 1.05 at 850 hPa.)
//
// Both take the saturation humidity w of the parcel as an argument, so the
// caller decides whether it is the saturation mixing ratio (AMS Glossary) or
// the saturation specific humidity (as printed in W&B eq. 5). With the same
// w, the same constants and ε = Rd/Rv, the two formulas satisfy
// Γ_θ + Γ_T = g/cp exactly (up to rounding).

// MoistAdiabaticLapseRate returns the moist-adiabatic (pseudo-adiabatic)
// temperature lapse rate Γ_T = −dT/dz, K m-1, at temperature T, K, for
// saturation humidity w, kg/kg, in the form of the AMS Glossary of
// Meteorology ("moist-adiabatic lapse rate"):
//
//	Γ_T = g (1 + Lv w/(Rd T)) / (cpd + Lv² w ε/(Rd T²))
//
// with Lv = c.Lv(T). The Glossary writes w as the saturation mixing ratio.
func MoistAdiabaticLapseRate(T, w float64, c Constants) float64 {
	lv := c.Lv(T)
	return c.G * (1 + lv*w/(c.Rd*T)) / (c.Cpd + lv*lv*w*c.Epsilon()/(c.Rd*T*T))
}

// MoistAdiabatThetaGradient returns the potential-temperature gradient
// along the moist adiabat as defined by Wood & Bretherton (2006, J. Climate
// 19, eq. 5), K m-1, at temperature T, K, for saturation humidity w, kg/kg:
//
//	Γ_θ = (g/cp) [1 − (1 + Lv w/(Ra T)) / (1 + Lv² w/(cp Rv T²))]
//
// with Lv = c.Lv(T). W&B write w as the saturation specific humidity qs and
// evaluate Γ_θ at 850 hPa for EIS. Γ_θ = g/cp − Γ_T: it is not the
// temperature lapse rate (see [MoistAdiabaticLapseRate]).
func MoistAdiabatThetaGradient(T, w float64, c Constants) float64 {
	lv := c.Lv(T)
	return c.G / c.Cpd * (1 - (1+lv*w/(c.Rd*T))/(1+lv*lv*w/(c.Cpd*c.Rv*T*T)))
}
