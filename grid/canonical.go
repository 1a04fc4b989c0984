package grid

import (
	"fmt"
	"math"
)

// Perm maps a grid in storage order to its canonical layout (see
// Canonical). Canonical cell (j, i) holds storage cell (LatIndex[j],
// LonIndex[i]).
type Perm struct {
	LatIndex, LonIndex []int
	// NLatIn and NLonIn are the storage dimensions the permutation reads.
	NLatIn, NLonIn int
}

// Identity reports whether the permutation leaves the data unchanged.
func (p *Perm) Identity() bool {
	if len(p.LatIndex) != p.NLatIn || len(p.LonIndex) != p.NLonIn {
		return false
	}
	for j, k := range p.LatIndex {
		if j != k {
			return false
		}
	}
	for i, k := range p.LonIndex {
		if i != k {
			return false
		}
	}
	return true
}

// Canonical returns g in lidscope's canonical layout and the permutation
// from g's storage order to it:
//   - latitudes ascending (south→north);
//   - a duplicated wrap column dropped;
//   - longitudes ascending; for a periodic grid all centres in [−180, 180);
//     for a regional grid the westernmost centre in [−180, 180) and the rest
//     following contiguously eastward, so a region crossing the antimeridian
//     keeps its cells together (its eastern centres then exceed 180).
//
// Bounds move with their centres (shifted by the same multiple of 360°).
func Canonical(g *Grid) (*Grid, *Perm, error) {
	nlat, nlon := len(g.Lat), len(g.Lon)
	p := &Perm{NLatIn: nlat, NLonIn: nlon, LatIndex: make([]int, nlat)}
	for j := range p.LatIndex {
		if g.LatAscending() {
			p.LatIndex[j] = j
		} else {
			p.LatIndex[j] = nlat - 1 - j
		}
	}
	m := g.nlonUnique()
	order := make([]int, m) // storage indices in ascending longitude
	for i := range order {
		if m < 2 || g.Lon[1] > g.Lon[0] {
			order[i] = i
		} else {
			order[i] = m - 1 - i
		}
	}
	shift := make([]float64, m) // per canonical position, the 360° multiple subtracted
	if g.PeriodicLon {
		start := 0
		best := math.Inf(1)
		for pos, k := range order {
			s := 360 * math.Floor((g.Lon[k]+180)/360)
			shift[pos] = s
			if v := g.Lon[k] - s; v < best {
				best, start = v, pos
			}
		}
		rot := make([]int, m)
		rs := make([]float64, m)
		for i := range rot {
			rot[i] = order[(start+i)%m]
			rs[i] = shift[(start+i)%m]
		}
		order, shift = rot, rs
	} else {
		s := 360 * math.Floor((g.Lon[order[0]]+180)/360)
		for i := range shift {
			shift[i] = s
		}
	}
	p.LonIndex = order

	lat := make([]float64, nlat)
	latB := make([][2]float64, nlat)
	for j, k := range p.LatIndex {
		lat[j], latB[j] = g.Lat[k], g.LatBounds[k]
	}
	lon := make([]float64, m)
	lonB := make([][2]float64, m)
	for i, k := range order {
		lon[i] = g.Lon[k] - shift[i]
		lonB[i] = [2]float64{g.LonBounds[k][0] - shift[i], g.LonBounds[k][1] - shift[i]}
	}
	c, err := New(lat, lon, latB, lonB)
	if err != nil {
		return nil, nil, fmt.Errorf("canonical layout of %v: %w", g, err)
	}
	return c, p, nil
}

// Apply writes src, laid out [lat][lon] in the storage order the permutation
// was made for, into dst in canonical order. dst must have
// len(LatIndex)*len(LonIndex) elements and must not overlap src. It does not
// allocate.
func (p *Perm) Apply(dst, src []float32) error {
	return permute(p, dst, src)
}

// Apply64 is Apply for float64 data.
func (p *Perm) Apply64(dst, src []float64) error {
	return permute(p, dst, src)
}

func permute[T float32 | float64](p *Perm, dst, src []T) error {
	if len(src) != p.NLatIn*p.NLonIn {
		return fmt.Errorf("grid permutation: source has %d values, want %d×%d = %d", len(src), p.NLatIn, p.NLonIn, p.NLatIn*p.NLonIn)
	}
	nlon := len(p.LonIndex)
	if len(dst) != len(p.LatIndex)*nlon {
		return fmt.Errorf("grid permutation: destination has %d values, want %d×%d = %d", len(dst), len(p.LatIndex), nlon, len(p.LatIndex)*nlon)
	}
	for j, js := range p.LatIndex {
		row := src[js*p.NLonIn : (js+1)*p.NLonIn]
		out := dst[j*nlon : (j+1)*nlon]
		for i, is := range p.LonIndex {
			out[i] = row[is]
		}
	}
	return nil
}
