// Package grid describes rectilinear latitude–longitude grids: cell centres and
// bounds in degrees, the kind of grid (regular, Gaussian, irregular), exact
// spherical cell areas, and the permutation that puts a grid and its data into
// lidscope's canonical layout (latitudes south→north, longitudes ascending).
//
// Coordinates are in degrees (degrees_north, degrees_east) as in CF-compliant
// files; areas are in m² or steradians.
//
// Bounds derived from centres (see New) follow the same rules as CDO 2.1.1
// for the grids lidscope meets (regular and Gaussian global grids, regional
// grids away from the poles): the tests check CDO's cell areas and
// conservative weights against ours. Gaussian grids put their bounds
// half-way between latitudes and on the poles by default (GaussMidpoint),
// which is what CDO does; GaussWeights is the alternative whose cell areas
// equal the quadrature weights.
package grid

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Kind classifies the latitude spacing of a grid.
type Kind int

const (
	// Irregular means neither regular nor Gaussian (or not recognisably so).
	Irregular Kind = iota
	// Regular means equally spaced latitudes and longitudes.
	Regular
	// Gaussian means the latitudes are the Gaussian latitudes for their count
	// (global, either order) and the longitudes are equally spaced.
	Gaussian
)

// String returns "regular", "gaussian" or "irregular".
func (k Kind) String() string {
	switch k {
	case Regular:
		return "regular"
	case Gaussian:
		return "gaussian"
	default:
		return "irregular"
	}
}

// Grid is a rectilinear latitude–longitude grid. Data on a grid are laid out
// [lat][lon] in storage order: value (j, i) is at index j*len(Lon)+i.
//
// Build a Grid with New or one of the constructors and treat it as read-only
// afterwards: the derived fields (Kind, spacings, flags) are not recomputed.
type Grid struct {
	// Lat and Lon are the cell centres in degrees_north and degrees_east, in
	// storage order. Latitudes may be ascending or descending; longitudes may
	// use any convention (0…360, −180…180, values past 360).
	Lat, Lon []float64
	// LatBounds and LonBounds are the cell edges in degrees, one pair per cell,
	// each stored as (low, high): (south, north) and (west, east).
	LatBounds, LonBounds [][2]float64

	// Kind is the detected or constructed kind of grid.
	Kind Kind
	// DLat and DLon are the absolute spacings in degrees when they are
	// uniform (DLat for Regular grids, DLon for Regular and Gaussian), else 0.
	DLat, DLon float64
	// PeriodicLon reports that the longitude cells cover the whole circle.
	PeriodicLon bool
	// WrapColumn reports that the last longitude repeats the first one 360°
	// on (a duplicated wrap-around column). Its cells are copies of column 0:
	// they get zero area, regridding ignores them as a source, and Canonical
	// drops them.
	WrapColumn bool
}

// NLat returns the number of latitudes.
func (g *Grid) NLat() int { return len(g.Lat) }

// NLon returns the number of longitudes (including a duplicated wrap column).
func (g *Grid) NLon() int { return len(g.Lon) }

// Size returns the number of cells, NLat()*NLon().
func (g *Grid) Size() int { return len(g.Lat) * len(g.Lon) }

// LatAscending reports whether latitudes are stored south→north.
func (g *Grid) LatAscending() bool { return len(g.Lat) < 2 || g.Lat[1] > g.Lat[0] }

// nlonUnique is the number of longitudes without the duplicated wrap column.
func (g *Grid) nlonUnique() int {
	if g.WrapColumn {
		return len(g.Lon) - 1
	}
	return len(g.Lon)
}

// ErrInvalid is wrapped by every error New returns for bad coordinates.
var ErrInvalid = errors.New("invalid grid")

func invalid(format string, a ...any) error {
	return fmt.Errorf("%w: "+format, append([]any{ErrInvalid}, a...)...)
}

// tolFor returns the coordinate tolerance in degrees used for comparisons on
// an axis with the given typical spacing: 1e-4° or a thousandth of the
// spacing, whichever is smaller. 1e-4° is well above float32 rounding of
// coordinates (at most about 4e-6° for |value| ≤ 360).
func tolFor(spacing float64) float64 {
	return math.Min(1e-4, 1e-3*math.Abs(spacing))
}

// New validates latitude and longitude cell centres (degrees) and optional
// cell bounds and returns the Grid.
//
// Coordinates must be finite and strictly monotonic; latitudes may run either
// way and must lie in [−90, 90]; longitudes may increase or decrease and use
// any convention. A last longitude that repeats the first one 360° on is
// detected and reported as WrapColumn. The longitudes without it must span
// less than 360°.
//
// When latBounds or lonBounds is nil the bounds are derived at the half-way
// points between centres. The outer latitude edges are extrapolated by half
// the adjacent spacing and clamped to ±90°; an outer edge within half a
// spacing of a pole is put on the pole (the grid is taken to reach it, as for
// Gaussian grids). Outer longitude edges wrap (each at half the gap across the
// seam) when that gap is at most 1.5 times the adjacent spacing, so the grid is
// periodic; otherwise they are extrapolated by half the adjacent spacing.
//
// Supplied bounds must contain their centre, be contiguous (each cell's edge
// is the next cell's edge), lie within ±90° for latitude and span at most
// 360° for longitude. Pairs may be given in either order; they are stored as
// (low, high). Errors wrap ErrInvalid.
func New(lat, lon []float64, latBounds, lonBounds [][2]float64) (*Grid, error) {
	g := &Grid{
		Lat: append([]float64(nil), lat...),
		Lon: append([]float64(nil), lon...),
	}
	if err := checkAxis("latitude", g.Lat); err != nil {
		return nil, err
	}
	if err := checkAxis("longitude", g.Lon); err != nil {
		return nil, err
	}
	latTol := tolFor(typicalSpacing(g.Lat))
	for j, v := range g.Lat {
		if math.Abs(v) > 90+latTol {
			return nil, invalid("latitude[%d] = %g is outside [-90, 90]; check the units (degrees_north expected)", j, v)
		}
		g.Lat[j] = math.Max(-90, math.Min(90, v))
	}
	if err := g.checkLonSpan(); err != nil {
		return nil, err
	}

	var err error
	if latBounds == nil {
		g.LatBounds, err = deriveLatBounds(g.Lat)
	} else {
		g.LatBounds, err = checkLatBounds(g.Lat, latBounds)
	}
	if err != nil {
		return nil, err
	}
	if lonBounds == nil {
		g.LonBounds, err = g.deriveLonBounds()
	} else {
		g.LonBounds, err = g.checkLonBounds(lonBounds)
	}
	if err != nil {
		return nil, err
	}
	g.classify()
	return g, nil
}

func checkAxis(name string, v []float64) error {
	if len(v) == 0 {
		return invalid("no %s values", name)
	}
	for i, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return invalid("%s[%d] = %g is not finite; the coordinate variable must not contain missing values", name, i, x)
		}
	}
	if len(v) < 2 {
		return nil
	}
	up := v[1] > v[0]
	for i := 1; i < len(v); i++ {
		if (up && !(v[i] > v[i-1])) || (!up && !(v[i] < v[i-1])) {
			return invalid("%s is not strictly monotonic at index %d (%g after %g); CF coordinate variables must be strictly increasing or decreasing", name, i, v[i], v[i-1])
		}
	}
	return nil
}

func typicalSpacing(v []float64) float64 {
	if len(v) < 2 {
		return 1
	}
	return math.Abs(v[len(v)-1]-v[0]) / float64(len(v)-1)
}

// checkLonSpan detects a duplicated wrap column and rejects longitudes that
// cover 360° or more.
func (g *Grid) checkLonSpan() error {
	n := len(g.Lon)
	if n < 2 {
		return nil
	}
	span := math.Abs(g.Lon[n-1] - g.Lon[0])
	d := span / float64(n-1)
	if n >= 3 && math.Abs(span-360) <= tolFor(d) {
		g.WrapColumn = true
		span = math.Abs(g.Lon[n-2] - g.Lon[0])
	}
	if span >= 360 {
		return invalid("longitudes span %g° (%g to %g), 360° or more, and the last one is not a duplicate of the first; a grid may cover the circle only once", span, g.Lon[0], g.Lon[n-1])
	}
	return nil
}

func deriveLatBounds(lat []float64) ([][2]float64, error) {
	n := len(lat)
	if n < 2 {
		return nil, invalid("cannot derive latitude bounds from a single latitude (%g); supply the bounds (CF bounds attribute)", lat[0])
	}
	edges := make([]float64, n+1)
	for j := 1; j < n; j++ {
		edges[j] = 0.5 * (lat[j-1] + lat[j])
	}
	d0 := lat[1] - lat[0]
	dn := lat[n-1] - lat[n-2]
	edges[0] = outerLatEdge(lat[0], -d0)
	edges[n] = outerLatEdge(lat[n-1], dn)
	b := make([][2]float64, n)
	for j := range b {
		b[j] = [2]float64{math.Min(edges[j], edges[j+1]), math.Max(edges[j], edges[j+1])}
	}
	return b, nil
}

// outerLatEdge extrapolates half a spacing step from the outermost centre c,
// clamps to ±90 and snaps to the pole when the edge lies within half a
// spacing of it.
func outerLatEdge(c, step float64) float64 {
	e := c + 0.5*step
	pole := math.Copysign(90, step)
	if math.Abs(pole-e) <= 0.5*math.Abs(step)+1e-12 {
		return pole
	}
	return math.Max(-90, math.Min(90, e))
}

func checkLatBounds(lat []float64, b [][2]float64) ([][2]float64, error) {
	n := len(lat)
	if len(b) != n {
		return nil, invalid("%d latitude bounds for %d latitudes", len(b), n)
	}
	tol := tolFor(typicalSpacing(lat))
	if n == 1 {
		tol = 1e-4
	}
	out := make([][2]float64, n)
	for j, p := range b {
		lo, hi := math.Min(p[0], p[1]), math.Max(p[0], p[1])
		if math.IsNaN(lo) || math.IsNaN(hi) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
			return nil, invalid("latitude bounds[%d] = %v are not finite", j, p)
		}
		if lo < -90-tol || hi > 90+tol {
			return nil, invalid("latitude bounds[%d] = %v reach outside [-90, 90]", j, p)
		}
		lo, hi = math.Max(lo, -90), math.Min(hi, 90)
		if !(hi > lo) {
			return nil, invalid("latitude bounds[%d] = %v have zero width", j, p)
		}
		if lat[j] < lo-tol || lat[j] > hi+tol {
			return nil, invalid("latitude bounds[%d] = %v do not contain the centre %g", j, p, lat[j])
		}
		out[j] = [2]float64{lo, hi}
	}
	if err := checkContiguous("latitude", lat, out, tol); err != nil {
		return nil, err
	}
	return out, nil
}

// checkContiguous checks that neighbouring cells share an edge.
func checkContiguous(name string, c []float64, b [][2]float64, tol float64) error {
	for i := 1; i < len(c); i++ {
		var gap float64
		if c[i] > c[i-1] {
			gap = b[i][0] - b[i-1][1]
		} else {
			gap = b[i-1][0] - b[i][1]
		}
		if math.Abs(gap) > tol {
			return invalid("%s bounds are not contiguous between cells %d and %d (%v, %v): edges differ by %g°", name, i-1, i, b[i-1], b[i], gap)
		}
	}
	return nil
}

func (g *Grid) deriveLonBounds() ([][2]float64, error) {
	n := len(g.Lon)
	m := g.nlonUnique()
	if m < 2 {
		return nil, invalid("cannot derive longitude bounds from a single longitude (%g); supply the bounds (CF bounds attribute)", g.Lon[0])
	}
	lon := g.Lon[:m]
	edges := make([]float64, m+1)
	for i := 1; i < m; i++ {
		edges[i] = 0.5 * (lon[i-1] + lon[i])
	}
	dir := 1.0
	if lon[1] < lon[0] {
		dir = -1
	}
	d0 := math.Abs(lon[1] - lon[0])
	dn := math.Abs(lon[m-1] - lon[m-2])
	gap := 360 - math.Abs(lon[m-1]-lon[0])
	if gap <= 1.5*math.Max(d0, dn) {
		edges[0] = lon[0] - dir*0.5*gap
		edges[m] = lon[m-1] + dir*0.5*gap
	} else {
		edges[0] = lon[0] - dir*0.5*d0
		edges[m] = lon[m-1] + dir*0.5*dn
	}
	b := make([][2]float64, n)
	for i := 0; i < m; i++ {
		b[i] = [2]float64{math.Min(edges[i], edges[i+1]), math.Max(edges[i], edges[i+1])}
	}
	if g.WrapColumn {
		shift := g.Lon[n-1] - g.Lon[0]
		b[n-1] = [2]float64{b[0][0] + shift, b[0][1] + shift}
	}
	return b, nil
}

func (g *Grid) checkLonBounds(b [][2]float64) ([][2]float64, error) {
	n := len(g.Lon)
	if len(b) != n {
		return nil, invalid("%d longitude bounds for %d longitudes", len(b), n)
	}
	tol := tolFor(typicalSpacing(g.Lon))
	if n == 1 {
		tol = 1e-4
	}
	out := make([][2]float64, n)
	for i, p := range b {
		lo, hi := math.Min(p[0], p[1]), math.Max(p[0], p[1])
		if math.IsNaN(lo) || math.IsNaN(hi) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
			return nil, invalid("longitude bounds[%d] = %v are not finite", i, p)
		}
		if !(hi > lo) {
			return nil, invalid("longitude bounds[%d] = %v have zero width", i, p)
		}
		if hi-lo > 360+tol {
			return nil, invalid("longitude bounds[%d] = %v are wider than 360°", i, p)
		}
		if g.Lon[i] < lo-tol || g.Lon[i] > hi+tol {
			return nil, invalid("longitude bounds[%d] = %v do not contain the centre %g", i, p, g.Lon[i])
		}
		out[i] = [2]float64{lo, hi}
	}
	if err := checkContiguous("longitude", g.Lon, out, tol); err != nil {
		return nil, err
	}
	m := g.nlonUnique()
	ext := extent(out[:m])
	if ext > 360+tol {
		return nil, invalid("longitude bounds cover %g°, more than 360° (cells overlap)", ext)
	}
	return out, nil
}

// extent returns the width covered by contiguous bounds.
func extent(b [][2]float64) float64 {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, p := range b {
		lo = math.Min(lo, p[0])
		hi = math.Max(hi, p[1])
	}
	return hi - lo
}

// classify sets Kind, DLat, DLon and PeriodicLon.
func (g *Grid) classify() {
	m := g.nlonUnique()
	ext := extent(g.LonBounds[:m])
	g.PeriodicLon = math.Abs(ext-360) <= tolFor(ext/float64(m))
	lonRegular, dlon := uniform(g.Lon[:m])
	latRegular, dlat := uniform(g.Lat)
	g.Kind = Irregular
	switch {
	case latRegular && lonRegular:
		g.Kind, g.DLat, g.DLon = Regular, dlat, dlon
	case lonRegular && len(g.Lat) >= 2 && isGaussian(g.Lat):
		g.Kind, g.DLon = Gaussian, dlon
	}
}

// uniform reports whether v is equally spaced within tolerance and returns
// the absolute spacing. A single value is uniform with spacing 0.
func uniform(v []float64) (bool, float64) {
	n := len(v)
	if n < 2 {
		return true, 0
	}
	d := (v[n-1] - v[0]) / float64(n-1)
	tol := tolFor(d)
	for i, x := range v {
		if math.Abs(x-(v[0]+float64(i)*d)) > tol {
			return false, 0
		}
	}
	return true, math.Abs(d)
}

// isGaussian reports whether lat (either order) are the Gaussian latitudes
// for len(lat) points, to within tolerance.
func isGaussian(lat []float64) bool {
	n := len(lat)
	if math.Abs(lat[0]+lat[n-1]) > 1e-3 || math.Abs(lat[0]) < 45 {
		return false
	}
	tol := tolFor(180 / float64(n))
	// Cheap test of the outermost latitude first: computing all roots costs
	// O(n²).
	if z, _ := gaussRoot(n, 0); math.Abs(math.Abs(lat[0])-math.Asin(z)/deg) > tol {
		return false
	}
	gl, _ := GaussianLatitudes(n)
	asc := lat[1] > lat[0]
	for j := range lat {
		k := j
		if !asc {
			k = n - 1 - j
		}
		if math.Abs(lat[j]-gl[k]) > tol {
			return false
		}
	}
	return true
}

// fmtDeg formats a value in degrees with at most six decimals.
func fmtDeg(v float64) string {
	v = math.Round(v*1e6) / 1e6
	if v == 0 {
		v = 0 // no "-0"
	}
	return strconv.FormatFloat(v, 'f', -1, 64)
}

// String returns a short human description, for example
// "180×360 regular 1°×1°, lat -89.5…89.5, lon 0…359" or
// "64×128 gaussian, lat 87.8638…-87.8638, lon 0…357.1875, wrap column".
func (g *Grid) String() string {
	if g == nil {
		return "<nil grid>"
	}
	var sb strings.Builder
	fmt.Fprintf(&sb, "%d×%d %s", len(g.Lat), len(g.Lon), g.Kind)
	if g.Kind == Regular {
		fmt.Fprintf(&sb, " %s°×%s°", fmtDeg(g.DLat), fmtDeg(g.DLon))
	}
	fmt.Fprintf(&sb, ", lat %s…%s, lon %s…%s", fmtDeg(round4(g.Lat[0])), fmtDeg(round4(g.Lat[len(g.Lat)-1])),
		fmtDeg(g.Lon[0]), fmtDeg(g.Lon[len(g.Lon)-1]))
	if g.WrapColumn {
		sb.WriteString(", wrap column")
	}
	if !g.PeriodicLon {
		sb.WriteString(", regional")
	}
	return sb.String()
}

func round4(v float64) float64 { return math.Round(v*1e4) / 1e4 }

// Equal reports whether a and b have the same layout: the same number of
// latitudes and longitudes, and centres and bounds in the same storage order
// agreeing within tol degrees. Grids holding the same cells in a different
// order or longitude convention are not Equal (their data differ in layout).
func Equal(a, b *Grid, tol float64) bool {
	return Difference(a, b, tol) == ""
}

// Difference describes how a and b differ, naming both grids, for use in
// error messages. It returns "" when Equal(a, b, tol).
func Difference(a, b *Grid, tol float64) string {
	if a == nil || b == nil {
		if a == b {
			return ""
		}
		return fmt.Sprintf("grid %v vs grid %v: one grid is missing", a, b)
	}
	what := diff(a, b, tol)
	if what == "" {
		return ""
	}
	return fmt.Sprintf("grid %v vs grid %v: %s", a, b, what)
}

func diff(a, b *Grid, tol float64) string {
	var parts []string
	if len(a.Lat) != len(b.Lat) {
		parts = append(parts, fmt.Sprintf("%d vs %d latitudes", len(a.Lat), len(b.Lat)))
	}
	if len(a.Lon) != len(b.Lon) {
		parts = append(parts, fmt.Sprintf("%d vs %d longitudes", len(a.Lon), len(b.Lon)))
	}
	if len(parts) == 0 {
		if a.LatAscending() != b.LatAscending() {
			parts = append(parts, "latitude order differs (one runs south→north, the other north→south)")
		} else if j := firstDiff(a.Lat, b.Lat, tol); j >= 0 {
			parts = append(parts, fmt.Sprintf("latitude[%d] differs: %g vs %g", j, a.Lat[j], b.Lat[j]))
		} else if j := firstDiffBounds(a.LatBounds, b.LatBounds, tol); j >= 0 {
			parts = append(parts, fmt.Sprintf("latitude bounds[%d] differ: %v vs %v", j, a.LatBounds[j], b.LatBounds[j]))
		}
		if i := firstDiff(a.Lon, b.Lon, tol); i >= 0 {
			s := fmt.Sprintf("longitude[%d] differs: %g vs %g", i, a.Lon[i], b.Lon[i])
			if !(math.Abs(a.Lon[0]-b.Lon[0]) <= tol) {
				s += " (the grids start at different meridians or use different longitude conventions; grid.Canonical puts both into one layout)"
			}
			parts = append(parts, s)
		} else if i := firstDiffBounds(a.LonBounds, b.LonBounds, tol); i >= 0 {
			parts = append(parts, fmt.Sprintf("longitude bounds[%d] differ: %v vs %v", i, a.LonBounds[i], b.LonBounds[i]))
		}
	}
	return strings.Join(parts, "; ")
}

func firstDiff(a, b []float64, tol float64) int {
	for i := range a {
		if !(math.Abs(a[i]-b[i]) <= tol) {
			return i
		}
	}
	return -1
}

func firstDiffBounds(a, b [][2]float64, tol float64) int {
	for i := range a {
		if !(math.Abs(a[i][0]-b[i][0]) <= tol && math.Abs(a[i][1]-b[i][1]) <= tol) {
			return i
		}
	}
	return -1
}
