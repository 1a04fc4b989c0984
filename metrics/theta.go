package metrics

import "math"

// PotentialTemperature returns θ = T (p0/p)^κ, K, for temperature T, K, at
// pressure p, Pa, with p0 = c.P0 and κ = Rd/cpd (Poisson's equation; e.g.
// Bolton 1980, eq. 7 with the moisture term dropped — common practice for
// LTS, Klein & Hartmann 1993).
func PotentialTemperature(T, p float64, c Constants) float64 {
	return T * math.Pow(c.P0/p, c.Kappa())
}
