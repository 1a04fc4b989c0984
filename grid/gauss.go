package grid

import (
	"fmt"
	"math"
)

// GaussianLatitudes returns the n Gaussian latitudes in degrees, ascending
// (south→north), and their Gaussian quadrature weights (summing to 2).
//
// The latitudes are φ_k = asin(x_k) for the roots x_k of the Legendre
// polynomial P_n, found by Newton iteration from the initial guess
// cos(π(k − 1/4)/(n + 1/2)) (common practice). P_n is evaluated with the
// three-term recurrence (k+1)P_{k+1} = (2k+1)x P_k − k P_{k−1} and its
// derivative from P'_n = n(x P_n − P_{n−1})/(x² − 1) (Abramowitz & Stegun
// 1964, Handbook of Mathematical Functions, eqs. 8.5.3 and 8.5.4, from
// memory). The weights are w_k = 2/((1 − x_k²) P'_n(x_k)²) (Abramowitz &
// Stegun 1964, eq. 25.4.29, from memory). It panics if n < 1.
func GaussianLatitudes(n int) (lat, weights []float64) {
	if n < 1 {
		panic(fmt.Sprintf("grid.GaussianLatitudes: n = %d, need n ≥ 1", n))
	}
	x := make([]float64, n)
	w := make([]float64, n)
	for k := 0; k < (n+1)/2; k++ {
		z, wk := gaussRoot(n, k)
		// z is the k-th largest root; mirror it.
		x[n-1-k], w[n-1-k] = z, wk
		x[k], w[k] = -z, wk
	}
	if n%2 == 1 {
		x[n/2] = 0
	}
	lat = make([]float64, n)
	for k := range x {
		lat[k] = math.Asin(x[k]) / deg
	}
	return lat, w
}

// gaussRoot returns the k-th largest root of P_n (k = 0 is the one nearest
// 1) and its quadrature weight.
func gaussRoot(n, k int) (z, weight float64) {
	z = math.Cos(math.Pi * (float64(k) + 0.75) / (float64(n) + 0.5))
	// Newton converges quadratically; once the step is below 1e-14 one
	// more step reaches rounding level.
	for iter := 0; iter < 50; iter++ {
		p, pm1 := legendre(n, z)
		dz := p / (float64(n) * (z*p - pm1) / (z*z - 1))
		z -= dz
		if math.Abs(dz) < 1e-14 {
			p, pm1 = legendre(n, z)
			z -= p / (float64(n) * (z*p - pm1) / (z*z - 1))
			break
		}
	}
	p, pm1 := legendre(n, z)
	dp := float64(n) * (z*p - pm1) / (z*z - 1)
	return z, 2 / ((1 - z*z) * dp * dp)
}

// legendre returns P_n(x) and P_{n−1}(x).
func legendre(n int, x float64) (pn, pnm1 float64) {
	p0, p1 := 1.0, x
	if n == 0 {
		return 1, 0
	}
	for k := 1; k < n; k++ {
		p0, p1 = p1, (float64(2*k+1)*x*p1-float64(k)*p0)/float64(k+1)
	}
	return p1, p0
}

// GaussBounds selects how the latitude bounds of a Gaussian grid are placed.
type GaussBounds int

const (
	// GaussMidpoint puts the bounds half-way between neighbouring Gaussian
	// latitudes and at ±90° at the poles. Conservative weights then agree
	// with CDO 2.1.1 remapcon, which uses these bounds (checked in this
	// package's tests: CDO's cell areas for its Gaussian grids equal the
	// midpoint-bound band areas to rounding).
	GaussMidpoint GaussBounds = iota
	// GaussWeights puts the bounds where the cumulative quadrature weight
	// reaches them, sin φ_{k+½} = −1 + Σ_{i≤k} w_i, so each band's solid angle
	// is exactly 2π·w_k/nlon per cell (common practice).
	GaussWeights
)

// GlobalGaussian returns the global Gaussian grid with nlat latitudes,
// ascending (south→north), and nlon equally spaced longitudes starting at
// lon0 (degrees_east), with latitude bounds placed as b says. A T42
// spectral truncation uses GlobalGaussian(64, 128, 0, GaussMidpoint).
func GlobalGaussian(nlat, nlon int, lon0 float64, b GaussBounds) (*Grid, error) {
	if nlat < 2 || nlon < 2 || nlat > maxGaussian || nlon > maxAxis {
		return nil, invalid("gaussian grid %d×%d: need 2 to %d latitudes and 2 to %d longitudes", nlat, nlon, maxGaussian, maxAxis)
	}
	lat, w := GaussianLatitudes(nlat)
	lon := make([]float64, nlon)
	d := 360 / float64(nlon)
	for i := range lon {
		lon[i] = lon0 + float64(i)*d
	}
	var latB [][2]float64
	switch b {
	case GaussMidpoint:
		// New derives midpoint bounds and puts the outer edges on the poles.
	case GaussWeights:
		// Accumulate from the south pole over the southern half and mirror,
		// so each edge carries the rounding of the shorter sum and the grid
		// stays symmetric.
		latB = make([][2]float64, nlat)
		s := -1.0
		for k := 0; k < nlat/2; k++ {
			lo := s
			s += w[k]
			latB[k] = [2]float64{asinDeg(lo), asinDeg(s)}
			latB[nlat-1-k] = [2]float64{-latB[k][1], -latB[k][0]}
		}
		if nlat%2 == 1 {
			latB[nlat/2] = [2]float64{asinDeg(s), -asinDeg(s)}
		}
	default:
		return nil, invalid("unknown Gaussian bounds placement %d", b)
	}
	g, err := New(lat, lon, latB, nil)
	if err != nil {
		return nil, fmt.Errorf("gaussian grid %d×%d: %w", nlat, nlon, err)
	}
	return g, nil
}

func asinDeg(s float64) float64 {
	return math.Asin(math.Max(-1, math.Min(1, s))) / deg
}

// GlobalRegular returns the global regular grid with spacings dlat and dlon
// in degrees: latitudes ascending (south→north) from −90+dlat/2 to 90−dlat/2,
// so cell edges fall on multiples of dlat from the pole, and longitudes
// lon0, lon0+dlon, … covering 360°. 180/dlat and 360/dlon must be whole
// numbers (within 1e-9). For example GlobalRegular(1, 1, 0) has 180×360
// cells centred on whole-degree longitudes and GlobalRegular(1, 1, 0.5) has
// its centres on half degrees.
func GlobalRegular(dlat, dlon, lon0 float64) (*Grid, error) {
	nlat, ok1 := wholeCount(180, dlat)
	nlon, ok2 := wholeCount(360, dlon)
	if !ok1 || !ok2 {
		return nil, invalid("regular grid %g°×%g°: 180/dlat and 360/dlon must be whole positive numbers", dlat, dlon)
	}
	lat := make([]float64, nlat)
	for j := range lat {
		lat[j] = -90 + (float64(j)+0.5)*dlat
	}
	lon := make([]float64, nlon)
	for i := range lon {
		lon[i] = lon0 + float64(i)*dlon
	}
	latB := make([][2]float64, nlat)
	for j := range latB {
		latB[j] = [2]float64{-90 + float64(j)*dlat, -90 + float64(j+1)*dlat}
	}
	latB[nlat-1][1] = 90
	lonB := make([][2]float64, nlon)
	for i := range lonB {
		lonB[i] = [2]float64{lon[i] - 0.5*dlon, lon[i] + 0.5*dlon}
	}
	g, err := New(lat, lon, latB, lonB)
	if err != nil {
		return nil, fmt.Errorf("regular grid %g°×%g°: %w", dlat, dlon, err)
	}
	return g, nil
}

// maxAxis bounds the number of points per axis the constructors make
// (0.00275° spacing), keeping memory use sane for mistyped spacings.
const maxAxis = 1 << 17

// maxGaussian bounds the Gaussian latitude count (the roots cost O(n²)).
const maxGaussian = 1 << 14

func wholeCount(total, step float64) (int, bool) {
	if !(step > 0) || math.IsInf(step, 0) {
		return 0, false
	}
	q := total / step
	n := math.Round(q)
	if n < 1 || math.Abs(q-n) > 1e-9*n || n > maxAxis {
		return 0, false
	}
	return int(n), true
}
