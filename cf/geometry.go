package cf

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"lidscope/netcdf"
)

// Horizontal layout. Every field is delivered in one canonical layout so
// that downstream code never has to ask: slabs are [lat][lon], row-major,
// latitudes ascending (south to north), longitudes ascending in
// [-180, 180), any duplicated wrap-around column dropped. A file stored
// north-to-south, on 0–360, or as [lon][lat] is reordered when read; the
// reordering is recorded in Layout.Notes and reported by inspect.

// Layout maps a file's stored horizontal order to the canonical one.
type Layout struct {
	Lat, Lon []float64 // canonical centres, degrees
	// LatBounds and LonBounds are the canonical cell bounds, [lower, upper]
	// per centre: read from the file's bounds variables (CF-1.10 §7.1) when
	// it has them, else derived half-way between neighbouring centres. They
	// are nil only for an axis of a single point, which gives no width.
	// Longitude bounds move with their centre, so a cell may reach below
	// −180 or beyond 180.
	LatBounds, LonBounds [][2]float64
	LatFromFile          bool // latitude bounds were read, not derived
	LonFromFile          bool // longitude bounds were read, not derived
	// src[i] is the index in the stored [y][x] (or [x][y]) slab of canonical cell i.
	src       []int
	Notes     []string
	storedLat []float64
	storedLon []float64
}

// NLat and NLon are the canonical grid sizes.
func (l *Layout) NLat() int { return len(l.Lat) }
func (l *Layout) NLon() int { return len(l.Lon) }

// normLon maps a longitude to [-180, 180).
func normLon(x float64) float64 {
	y := math.Mod(x+180, 360)
	if y < 0 {
		y += 360
	}
	if y >= 360 { // a tiny negative y rounds up to 360 when shifted
		y = 0
	}
	return y - 180
}

// readBounds reads the cell bounds named by a coordinate's bounds attribute
// (CF-1.10 §7.1), shape [n][2]; nil when absent.
func readBounds(f *netcdf.File, cv *netcdf.Var) ([][2]float64, error) {
	name := textAttr(cv, "bounds")
	if name == "" {
		return nil, nil
	}
	bv, err := f.Var(name)
	if errors.Is(err, netcdf.ErrNotVar) {
		return nil, errMissingBounds{cv.Name, name}
	}
	if err != nil {
		return nil, fmt.Errorf("%s: %s:bounds names %q: %w", f.Path(), cv.Name, name, err)
	}
	n := cv.Dims[0].Len
	if len(bv.Dims) != 2 || bv.Dims[0].Len != n || bv.Dims[1].Len != 2 {
		return nil, fmt.Errorf("%s: bounds variable %s has shape %v, expected [%d][2] (CF-1.10 §7.1)", f.Path(), name, bv.Shape(), n)
	}
	raw, err := bv.ReadAllFloat64()
	if err != nil {
		return nil, fmt.Errorf("%s: reading bounds %s: %w", f.Path(), name, err)
	}
	out := make([][2]float64, n)
	for i := range out {
		out[i] = [2]float64{raw[2*i], raw[2*i+1]}
	}
	return out, nil
}

func readCoord(f *netcdf.File, cv *netcdf.Var) ([]float64, error) {
	vals, err := cv.ReadAllFloat64()
	if err != nil {
		return nil, fmt.Errorf("%s: reading coordinate %s: %w", f.Path(), cv.Name, err)
	}
	m, err := maskOf(cv)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", f.Path(), err)
	}
	for i, x := range vals {
		y := m.Decode(x)
		if math.IsNaN(y) {
			return nil, fmt.Errorf("%s: coordinate %s has a missing value at index %d: coordinates must be complete (CF-1.10 §5)", f.Path(), cv.Name, i)
		}
		vals[i] = y
	}
	return vals, nil
}

// newLayout builds the canonical layout. latFirst says whether the stored
// slab is [lat][lon] (else [lon][lat]).
func newLayout(path string, latName, lonName string, lat, lon []float64, latB, lonB [][2]float64, latFirst bool) (*Layout, error) {
	if err := checkAxes(path, latName, lonName, lat, lon, latB, lonB); err != nil {
		return nil, err
	}
	l := &Layout{storedLat: lat, storedLon: lon}
	yi := l.latOrder(lat)
	xi, err := l.lonOrder(path, lonName, lon)
	if err != nil {
		return nil, err
	}
	l.Lat = make([]float64, len(lat))
	for k, i := range yi {
		l.Lat[k] = lat[i]
	}
	l.setBounds(latName, lonName, lat, lon, latB, lonB, yi, xi)
	l.setSource(yi, xi, len(lat), len(lon), latFirst)
	return l, nil
}

// checkAxes checks the centres and the number of bounds of a grid.
func checkAxes(path string, latName, lonName string, lat, lon []float64, latB, lonB [][2]float64) error {
	ny, nx := len(lat), len(lon)
	if ny == 0 || nx == 0 {
		return fmt.Errorf("%s: the grid has %d latitudes (%s) and %d longitudes (%s); both must have at least one value", path, ny, latName, nx, lonName)
	}
	if latB != nil && len(latB) != ny || lonB != nil && len(lonB) != nx {
		return fmt.Errorf("%s: %d latitude and %d longitude bounds for a %d×%d grid (CF-1.10 §7.1); fix the bounds variables", path, len(latB), len(lonB), ny, nx)
	}
	for i, x := range lon {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return fmt.Errorf("%s: longitude %s[%d] = %g is not a finite number; fix the coordinate", path, lonName, i, x)
		}
	}
	for i, y := range lat {
		if math.IsNaN(y) || y < -90.0001 || y > 90.0001 {
			return fmt.Errorf("%s: latitude %s[%d] = %g is outside −90…90; check the coordinate (is it in radians?)", path, latName, i, y)
		}
	}
	if !strictlyMonotonic(lat) {
		return fmt.Errorf("%s: latitude %s is not strictly monotonic; lidscope needs a rectilinear grid", path, latName)
	}
	if !strictlyMonotonic(lon) {
		return fmt.Errorf("%s: longitude %s is not strictly monotonic; lidscope needs a rectilinear grid", path, lonName)
	}
	return nil
}

// latOrder is the stored index of each latitude from south to north.
func (l *Layout) latOrder(lat []float64) []int {
	ny := len(lat)
	yi := make([]int, ny)
	for i := range yi {
		yi[i] = i
	}
	if ny > 1 && lat[0] > lat[ny-1] {
		for i := range yi {
			yi[i] = ny - 1 - i
		}
		l.Notes = append(l.Notes, "latitude stored north to south: reordered south to north")
	}
	return yi
}

// lonOrder normalises the longitudes to −180…180, drops a duplicated
// wrap-around column and sorts them; it sets l.Lon and returns the stored
// index of each.
func (l *Layout) lonOrder(path, lonName string, lon []float64) ([]int, error) {
	nx := len(lon)
	type lc struct {
		v float64
		i int
	}
	cols := make([]lc, 0, nx)
	span := math.Abs(lon[nx-1] - lon[0])
	for i, x := range lon {
		cols = append(cols, lc{normLon(x), i})
	}
	sort.SliceStable(cols, func(a, b int) bool { return cols[a].v < cols[b].v })
	kept := cols[:0]
	dropped := 0
	for _, c := range cols {
		if len(kept) > 0 && math.Abs(c.v-kept[len(kept)-1].v) < 1e-6 {
			dropped++
			continue
		}
		kept = append(kept, c)
	}
	if dropped > 0 {
		// Only the last column may repeat the first, one full turn later.
		wrap := math.Abs(span-360) < 1e-3 && math.Abs(normLon(lon[0])-normLon(lon[nx-1])) < 1e-6
		if dropped > 1 || !wrap {
			return nil, fmt.Errorf("%s: longitude %s has %d values that coincide modulo 360; only a last column that repeats the first, 360° on, is allowed (a duplicated wrap-around column)", path, lonName, dropped)
		}
		l.Notes = append(l.Notes, "duplicated wrap-around longitude column dropped")
	}
	if lon[0] >= 180 || lon[nx-1] > 180 || lon[0] < -180 {
		l.Notes = append(l.Notes, fmt.Sprintf("longitudes %g…%g normalised to −180…180", lon[0], lon[nx-1]))
	} else if kept[0].i != 0 || !sort.SliceIsSorted(lon, func(a, b int) bool { return lon[a] < lon[b] }) {
		l.Notes = append(l.Notes, "longitudes reordered to ascend from −180")
	}
	xi := make([]int, len(kept))
	l.Lon = make([]float64, len(kept))
	for k, c := range kept {
		xi[k] = c.i
		l.Lon[k] = c.v
	}
	return xi, nil
}

// setBounds sets the cell bounds: from the file when given (CF-1.10 §7.1),
// else derived from midpoints between stored centres (common practice), in
// stored order so that a grid crossing the date line keeps contiguous
// cells.
func (l *Layout) setBounds(latName, lonName string, lat, lon []float64, latB, lonB [][2]float64, yi, xi []int) {
	ny := len(lat)
	if latB != nil {
		l.LatFromFile = true
		if bad := outsideBounds(lat, latB); bad >= 0 {
			l.Notes = append(l.Notes, fmt.Sprintf("latitude %s[%d] = %g lies outside its cell bounds %v (CF-1.10 §7.1 says it should lie within them); check the bounds variable", latName, bad, lat[bad], latB[bad]))
		}
	} else if latB = deriveBounds(lat); latB != nil {
		for i := range latB {
			latB[i][0] = math.Max(-90, math.Min(90, latB[i][0]))
			latB[i][1] = math.Max(-90, math.Min(90, latB[i][1]))
		}
	}
	if lonB != nil {
		l.LonFromFile = true
		if bad := outsideBounds(lon, lonB); bad >= 0 {
			l.Notes = append(l.Notes, fmt.Sprintf("longitude %s[%d] = %g lies outside its cell bounds %v (CF-1.10 §7.1 says it should lie within them); check the bounds variable", lonName, bad, lon[bad], lonB[bad]))
		}
	} else {
		lonB = deriveBounds(lon)
	}
	if latB != nil {
		l.LatBounds = make([][2]float64, ny)
		for k, i := range yi {
			b := latB[i]
			if b[0] > b[1] {
				b[0], b[1] = b[1], b[0]
			}
			l.LatBounds[k] = b
		}
	}
	if lonB != nil {
		l.LonBounds = make([][2]float64, len(xi))
		for k, i := range xi {
			b := lonB[i]
			if b[0] > b[1] {
				b[0], b[1] = b[1], b[0]
			}
			shift := l.Lon[k] - lon[i] // the same shift as the centre
			l.LonBounds[k] = [2]float64{b[0] + shift, b[1] + shift}
		}
	}
}

// setSource maps each canonical [lat][lon] cell to its stored index.
func (l *Layout) setSource(yi, xi []int, ny, nx int, latFirst bool) {
	l.src = make([]int, ny*len(xi))
	for k, i := range yi {
		for m, j := range xi {
			if latFirst {
				l.src[k*len(xi)+m] = i*nx + j
			} else {
				l.src[k*len(xi)+m] = j*ny + i
			}
		}
	}
	if !latFirst {
		l.Notes = append(l.Notes, "stored as [lon][lat]: transposed to [lat][lon]")
	}
}

// deriveBounds returns cell bounds half-way between neighbouring centres,
// the outer edges half a step beyond the outer centres; nil for fewer than
// two centres (nothing to derive a width from).
func deriveBounds(c []float64) [][2]float64 {
	n := len(c)
	if n < 2 {
		return nil
	}
	edges := make([]float64, n+1)
	for i := 1; i < n; i++ {
		edges[i] = 0.5 * (c[i-1] + c[i])
	}
	edges[0] = c[0] - 0.5*(c[1]-c[0])
	edges[n] = c[n-1] + 0.5*(c[n-1]-c[n-2])
	out := make([][2]float64, n)
	for i := range out {
		out[i] = [2]float64{edges[i], edges[i+1]}
	}
	return out
}

// outsideBounds returns the first index whose centre lies outside its
// bounds (beyond a small tolerance), or -1.
func outsideBounds(c []float64, b [][2]float64) int {
	for i, x := range c {
		lo, hi := math.Min(b[i][0], b[i][1]), math.Max(b[i][0], b[i][1])
		tol := 1e-6 * math.Max(1, math.Abs(x))
		if !(x >= lo-tol && x <= hi+tol) {
			return i
		}
	}
	return -1
}

func strictlyMonotonic(x []float64) bool {
	if len(x) < 2 {
		return true
	}
	up := x[1] > x[0]
	for i := 1; i < len(x); i++ {
		if (up && !(x[i] > x[i-1])) || (!up && !(x[i] < x[i-1])) {
			return false
		}
	}
	return true
}

// SameGrid reports whether two layouts describe the same canonical grid
// (centres within tol degrees), and if not, how they differ.
func SameGrid(a, b *Layout, tol float64) (bool, string) {
	if len(a.Lat) != len(b.Lat) || len(a.Lon) != len(b.Lon) {
		return false, fmt.Sprintf("%d×%d (lat×lon) vs %d×%d", len(a.Lat), len(a.Lon), len(b.Lat), len(b.Lon))
	}
	for i := range a.Lat {
		if math.Abs(a.Lat[i]-b.Lat[i]) > tol {
			return false, fmt.Sprintf("latitude %d is %g vs %g", i, a.Lat[i], b.Lat[i])
		}
	}
	for i := range a.Lon {
		if math.Abs(a.Lon[i]-b.Lon[i]) > tol {
			return false, fmt.Sprintf("longitude %d is %g vs %g", i, a.Lon[i], b.Lon[i])
		}
	}
	return true, ""
}

// errMissingBounds: the bounds attribute names a variable the file lacks.
// Callers fall back to bounds derived from midpoints and note it.
type errMissingBounds struct{ coord, bounds string }

func (e errMissingBounds) Error() string {
	return fmt.Sprintf("%s:bounds names %q, which is not in the file (CF-1.10 §7.1)", e.coord, e.bounds)
}
