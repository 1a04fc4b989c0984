package metrics

// LTS returns the lower-tropospheric stability, K, of Klein & Hartmann
// (1993, J. Climate 6, p. 1588):
//
//	LTS = θ700 − θ_surface
//
// for 700-hPa temperature t700, K, and surface temperature ts, K, at surface
// pressure ps, Pa (θ by [PotentialTemperature]). Klein & Hartmann used the
// surface air temperature at 1000 hPa; SST is a common substitute.
func LTS(t700, ts, ps float64, c Constants) float64 {
	return PotentialTemperature(t700, P700, c) - PotentialTemperature(ts, ps, c)
}

// EIS returns the estimated inversion strength, K, of Wood & Bretherton
// (2006, J. Climate 19, eq. 4):
//
//	EIS = LTS − Γθ,850 (z700 − z_LCL)
//
// from lts, K, the moist-adiabat θ gradient gamma850, K m-1
// ([MoistAdiabatThetaGradient] at 850 hPa), and the heights z700 and zLCL,
// m above the surface.
func EIS(lts, gamma850, z700, zLCL float64) float64 {
	return lts - gamma850*(z700-zLCL)
}

// ECTEI returns the estimated cloud-top entrainment index, K, of Kawai,
// Koshiro & Webb (2017, J. Climate 30, definition of ECTEI):
//
//	ECTEI = EIS − β (Lv/cp)(q_surface − q700)
//
// from eis, K, the specific humidities qSurface and q700, kg/kg, the
// coefficient beta (0.23 in the paper, [KawaiBeta]), the latent heat lv,
// J kg-1, and cp, J kg-1 K-1. What q_surface stands for is a conventions choice
// (see [ECTEISurface]).
func ECTEI(eis, qSurface, q700, beta, lv, cp float64) float64 {
	return eis - beta*lv/cp*(qSurface-q700)
}
