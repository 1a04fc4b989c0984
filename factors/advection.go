package factors

import (
	"fmt"
	"math"
)

// EarthRadius is the Earth's mean radius in metres used for distances on
// the sphere (6.371e6 m; common practice).
const EarthRadius = 6.371e6

// PeriodicLongitudes reports whether the longitudes (degrees) are evenly
// spaced and go once around the globe (n·Δλ = 360° to 1e-6 relative), so
// that the first and the last column are neighbours.
func PeriodicLongitudes(lon []float64) bool {
	n := len(lon)
	if n < 3 {
		return false
	}
	d := wrapDeg(lon[1] - lon[0])
	if !(d > 0) {
		return false
	}
	for i := 1; i < n; i++ {
		if math.Abs(wrapDeg(lon[i]-lon[i-1])-d) > 1e-6*d {
			return false
		}
	}
	return math.Abs(float64(n)*d-360) <= 1e-6*360
}

// wrapDeg maps a longitude difference into (−180, 180].
func wrapDeg(d float64) float64 {
	d = math.Mod(d, 360)
	if d > 180 {
		d -= 360
	} else if d <= -180 {
		d += 360
	}
	return d
}

// Advection returns the near-surface temperature advection
// T_adv = −(u ∂T/∂x + v ∂T/∂y) in K s-1 on a latitude–longitude grid,
// with ∂/∂x = (a cos φ)⁻¹ ∂/∂λ and ∂/∂y = a⁻¹ ∂/∂φ on a sphere of radius
// a = EarthRadius (spherical coordinates; common practice), as used for
// cloud-controlling factors from SST and 10-m winds (Qu et al. 2015;
// Myers & Norris 2016). It is a pure function: sst in K, u (eastward) and
// v (northward) in m s-1, all [lat][lon] row-major of len(lat)·len(lon);
// lat and lon are cell centres in degrees, in any monotonic order.
//
// Derivatives are centred differences (T_{i+1} − T_{i−1})/(x_{i+1} −
// x_{i−1}). Where one neighbour is missing (NaN: land, sea ice, outside
// the grid) the one-sided difference with the other is used; where both
// are missing the cell's advection is NaN. With periodic set (a global
// grid, see PeriodicLongitudes) the first and last longitudes are
// neighbours across the dateline; otherwise the edge columns use
// one-sided differences, as do the first and last latitude rows. A cell
// whose own SST or wind is missing, or at a pole (cos φ < 1e-10), is NaN.
func Advection(sst, u, v, lat, lon []float64, periodic bool) ([]float64, error) {
	ny, nx := len(lat), len(lon)
	n := ny * nx
	if len(sst) != n || len(u) != n || len(v) != n {
		return nil, fmt.Errorf("factors: advection needs fields of %d×%d = %d cells; sst has %d, u %d, v %d", ny, nx, n, len(sst), len(u), len(v))
	}
	if periodic && nx < 3 {
		return nil, fmt.Errorf("factors: a periodic grid needs at least 3 longitudes, have %d", nx)
	}
	rad := math.Pi / 180
	out := make([]float64, n)
	for j := 0; j < ny; j++ {
		cosphi := math.Cos(lat[j] * rad)
		for i := 0; i < nx; i++ {
			c := j*nx + i
			t0 := sst[c]
			if math.IsNaN(t0) || math.IsNaN(u[c]) || math.IsNaN(v[c]) || cosphi < 1e-10 {
				out[c] = math.NaN()
				continue
			}
			// zonal neighbours
			im, ip := i-1, i+1
			if periodic {
				im, ip = (i+nx-1)%nx, (i+1)%nx
			}
			var tm, tp, dm, dp float64 = math.NaN(), math.NaN(), 0, 0
			if im >= 0 {
				tm, dm = sst[j*nx+im], wrapDeg(lon[i]-lon[im])*rad
			}
			if ip < nx {
				tp, dp = sst[j*nx+ip], wrapDeg(lon[ip]-lon[i])*rad
			}
			dTdl := difference(tm, t0, tp, dm, dp)
			// meridional neighbours
			tm, tp, dm, dp = math.NaN(), math.NaN(), 0, 0
			if j > 0 {
				tm, dm = sst[c-nx], (lat[j]-lat[j-1])*rad
			}
			if j+1 < ny {
				tp, dp = sst[c+nx], (lat[j+1]-lat[j])*rad
			}
			dTdp := difference(tm, t0, tp, dm, dp)
			out[c] = -(u[c]*dTdl/(EarthRadius*cosphi) + v[c]*dTdp/EarthRadius)
		}
	}
	return out, nil
}

// difference is dT/dx at a point of value t0 between neighbours tm and tp
// at distances dm (behind) and dp (ahead): centred when both exist,
// one-sided when one does, NaN when neither.
func difference(tm, t0, tp, dm, dp float64) float64 {
	okm, okp := !math.IsNaN(tm) && dm != 0, !math.IsNaN(tp) && dp != 0
	switch {
	case okm && okp:
		return (tp - tm) / (dm + dp)
	case okp:
		return (tp - t0) / dp
	case okm:
		return (t0 - tm) / dm
	}
	return math.NaN()
}
