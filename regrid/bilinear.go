package regrid

import (
	"errors"
	"math"
	"sort"
)

// axisPos is a bracketing pair of source indices along one axis and the
// linear weight u of the second one (the first gets 1−u).
type axisPos struct {
	a, b int
	u    float64
	ok   bool
}

// buildBilinear forms bilinear weights in (longitude, latitude) degrees.
func (w *Weights) buildBilinear() error {
	src, dst := w.src, w.dst
	nsLon := src.NLon()
	if src.WrapColumn {
		nsLon--
	}
	if src.NLat() < 2 || nsLon < 2 {
		return errors.New("bilinear interpolation needs a source grid with at least 2 latitudes and 2 distinct longitudes; use regrid.Conservative")
	}

	// Source latitudes in ascending order and their storage indices.
	ns := src.NLat()
	ylat := make([]float64, ns)
	yidx := make([]int, ns)
	for k := range ylat {
		j := k
		if !src.LatAscending() {
			j = ns - 1 - k
		}
		ylat[k], yidx[k] = src.Lat[j], j
	}
	// Source longitudes in ascending order.
	xlon := make([]float64, nsLon)
	xidx := make([]int, nsLon)
	asc := src.Lon[1] > src.Lon[0]
	for k := range xlon {
		i := k
		if !asc {
			i = nsLon - 1 - k
		}
		xlon[k], xidx[k] = src.Lon[i], i
	}
	periodic := src.PeriodicLon
	southPole, northPole := false, false
	if periodic {
		lo, hi := 90.0, -90.0
		for _, b := range src.LatBounds {
			lo, hi = math.Min(lo, b[0]), math.Max(hi, b[1])
		}
		southPole, northPole = lo <= -90, hi >= 90
	}
	latTol := 1e-9 * (ylat[ns-1] - ylat[0])
	lonTol := 1e-9 * 360

	latPos := make([]axisPos, dst.NLat())
	for j, phi := range dst.Lat {
		latPos[j] = bracketLat(ylat, phi, latTol, southPole, northPole)
	}
	lonPos := make([]axisPos, dst.NLon())
	for i, lam := range dst.Lon {
		lonPos[i] = bracketLon(xlon, lam, lonTol, periodic)
	}

	snlon := src.NLon()
	w.rowPtr = make([]int32, 1, dst.Size()+1)
	w.col = make([]int32, 0, 4*dst.Size())
	w.val = make([]float64, 0, 4*dst.Size())
	for _, lp := range latPos {
		for _, op := range lonPos {
			if lp.ok && op.ok {
				rows := [2]int{yidx[lp.a], yidx[lp.b]}
				cols := [2]int{xidx[op.a], xidx[op.b]}
				rw := [2]float64{1 - lp.u, lp.u}
				cw := [2]float64{1 - op.u, op.u}
				for r := 0; r < 2; r++ {
					for c := 0; c < 2; c++ {
						v := rw[r] * cw[c]
						if v == 0 {
							continue
						}
						w.col = append(w.col, int32(rows[r]*snlon+cols[c]))
						w.val = append(w.val, v)
					}
				}
			}
			w.rowPtr = append(w.rowPtr, int32(len(w.col)))
		}
	}
	return nil
}

// bracketLat finds the source latitudes around phi. Beyond the outermost
// centre it uses that row alone when the source reaches that pole.
func bracketLat(y []float64, phi, tol float64, southPole, northPole bool) axisPos {
	n := len(y)
	switch {
	case phi < y[0]-tol:
		if southPole {
			return axisPos{0, 0, 0, true}
		}
		return axisPos{}
	case phi > y[n-1]+tol:
		if northPole {
			return axisPos{n - 1, n - 1, 0, true}
		}
		return axisPos{}
	}
	// Largest k with y[k] <= phi, limited to n-2.
	k := sort.SearchFloat64s(y, phi) // first y[k] >= phi
	if k < n && y[k] == phi {
		if k == n-1 {
			return axisPos{n - 2, n - 1, 1, true}
		}
		return axisPos{k, k + 1, 0, true}
	}
	k--
	if k < 0 {
		return axisPos{0, 1, 0, true} // within tol below y[0]
	}
	if k >= n-1 {
		return axisPos{n - 2, n - 1, 1, true} // within tol above y[n-1]
	}
	u := (phi - y[k]) / (y[k+1] - y[k])
	return axisPos{k, k + 1, clamp01(u), true}
}

// bracketLon finds the source longitudes around lam on the circle.
func bracketLon(x []float64, lam, tol float64, periodic bool) axisPos {
	n := len(x)
	t := x[0] + math.Mod(lam-x[0], 360)
	if t < x[0] {
		t += 360
	}
	if t-x[0] > 360-tol {
		t -= 360 // rounding just below x[0]
	}
	k := sort.SearchFloat64s(x, t)
	if k < n && x[k] == t {
		if k == n-1 && !periodic {
			return axisPos{n - 2, n - 1, 1, true}
		}
		return axisPos{k, (k + 1) % n, 0, true}
	}
	k--
	if k < 0 {
		k = 0
	}
	if k < n-1 {
		return axisPos{k, k + 1, clamp01((t - x[k]) / (x[k+1] - x[k])), true}
	}
	// Beyond the last centre.
	if periodic {
		span := x[0] + 360 - x[n-1]
		return axisPos{n - 1, 0, clamp01((t - x[n-1]) / span), true}
	}
	if t-x[n-1] <= tol {
		return axisPos{n - 2, n - 1, 1, true}
	}
	return axisPos{}
}

func clamp01(u float64) float64 { return math.Max(0, math.Min(1, u)) }
