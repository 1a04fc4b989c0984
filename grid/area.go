package grid

import "math"

// EarthRadius is the radius in metres of the sphere used for cell areas:
// 6371000 m, the customary mean Earth radius (common practice; it is also
// the default of widely used climate-data tools, from memory). The IUGG mean
// radius of the GRS80 ellipsoid, 6371008.8 m (from memory), differs by
// 1.4e-6 relative, 2.8e-6 in area.
const EarthRadius = 6371000.0

const deg = math.Pi / 180

// BandSolidAngle returns the solid angle in steradians of the spherical cell
// bounded by the parallels lat1, lat2 and by meridians dlon apart (all in
// degrees): Ω = Δλ·(sin φ2 − sin φ1), with Δλ in radians. This is exact for
// cells bounded by parallels and meridians (common practice; it follows from
// integrating cos φ dφ dλ over the cell). The result is non-negative
// whatever the order of lat1 and lat2.
func BandSolidAngle(lat1, lat2, dlon float64) float64 {
	return math.Abs(dlon) * deg * math.Abs(math.Sin(lat2*deg)-math.Sin(lat1*deg))
}

// SolidAngle returns the solid angle in steradians of cell (j, i) (latitude
// index j, longitude index i, storage order) from its bounds. The duplicated
// wrap column, if any, has zero solid angle so that sums over all cells count
// each place once.
func (g *Grid) SolidAngle(j, i int) float64 {
	if g.WrapColumn && i == len(g.Lon)-1 {
		return 0
	}
	lb, ob := g.LatBounds[j], g.LonBounds[i]
	return BandSolidAngle(lb[0], lb[1], ob[1]-ob[0])
}

// SolidAngles returns the solid angle in steradians of every cell, laid out
// [lat][lon] in storage order (see SolidAngle). Over a global grid they sum
// to 4π.
func (g *Grid) SolidAngles() []float64 {
	nlon := len(g.Lon)
	out := make([]float64, len(g.Lat)*nlon)
	for j := range g.Lat {
		for i := range g.Lon {
			out[j*nlon+i] = g.SolidAngle(j, i)
		}
	}
	return out
}

// CellAreas returns the area in m² of every cell on a sphere of radius
// EarthRadius, laid out [lat][lon] in storage order: A = R²·Δλ·(sin φ2 − sin φ1)
// (common practice, exact for latitude–longitude cells). The duplicated wrap
// column has zero area.
func (g *Grid) CellAreas() []float64 {
	out := g.SolidAngles()
	for k := range out {
		out[k] *= EarthRadius * EarthRadius
	}
	return out
}
