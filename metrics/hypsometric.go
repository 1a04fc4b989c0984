package metrics

import "math"

// Thickness returns the hypsometric thickness, m, of the layer between
// pressures p1 > p2, Pa, whose layer-mean temperature is tmean, K:
//
//	Δz = (Rd tmean / g) ln(p1/p2)
//
// (hypsometric equation, e.g. Wallace & Hobbs 2006, eq. 3.24 — equation
// number from memory). The layer mean is the mean over ln p; pass a
// virtual temperature to include moisture. Heights are geopotential heights
// when g is standard gravity.
func Thickness(p1, p2, tmean float64, c Constants) float64 {
	return c.Rd * tmean / c.G * math.Log(p1/p2)
}

// Height700 returns z700, the height, m, of the 700-hPa surface above a
// surface at pressure ps, Pa, with surface temperature ts and 700-hPa
// temperature t700, K: the hypsometric thickness with the layer-mean
// temperature taken as (ts + t700)/2 and no virtual-temperature correction,
// as in common EIS practice (Wood & Bretherton 2006 compute z700 from the
// hypsometric equation). The arithmetic mean is slightly warmer than the
// exact ln-p mean of a constant-lapse-rate layer: for the U.S. Standard
// Atmosphere 1976 this z700 is 3013.3 m against the standard's 3012.2 m
// (see the tests).
func Height700(ts, t700, ps float64, c Constants) float64 {
	return Thickness(ps, P700, 0.5*(ts+t700), c)
}
