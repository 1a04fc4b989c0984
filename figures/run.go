package figures

import (
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"lidscope/factors"
	"math"
	"os"
	"path/filepath"
	"strings"

	"lidscope/calendar"
	"lidscope/internal/jsonnum"
	"lidscope/netcdf"
	"lidscope/output"
	"lidscope/relations"
	"lidscope/vocab"
)

// Run is what the figures read from a run directory written by package
// output: the summary's labels, the maps of maps.nc and the band series of
// series.nc. Load reads the labels; maps and series are read on first use.
type Run struct {
	Dir string
	// From summary.json.
	Dataset, Title, Version, StudyHash string
	Period                             string // e.g. "2001-01 … 2002-12"
	RegimeDefinition                   string
	Delta, HalfWidth                   float64 // K
	BandSouth, BandNorth               float64 // degrees_north
	// Quantities are those the run has; Absent says what it lacks for
	// want of an optional input (every figure's footer says so).
	Quantities, Absent []string

	maps      *mapsFile
	factors   *factors.Results // factors.json and factors.nc, read on first use
	series    *seriesFile
	relations *relations.Results
}

// summaryJSON is the part of summary.json the figures use.
type summaryJSON struct {
	Format        string `json:"format"`
	FormatVersion int    `json:"format_version"`
	Dataset       string `json:"dataset"`
	Title         string `json:"title"`
	Version       string `json:"lidscope_version"`
	StudyHash     string `json:"study_hash"`
	Period        struct {
		Label string `json:"label"`
	} `json:"period"`
	Regime struct {
		Text      string                         `json:"text"`
		Delta     jsonNum                        `json:"delta"`
		HalfWidth jsonNum                        `json:"half_width"`
		Band      struct{ South, North jsonNum } `json:"band"`
	} `json:"regime_definition"`
	Quantities []string `json:"quantities"`
	Absent     []string `json:"absent_quantities"`
}

// jsonNum is a {"value", "units"} number of summary.json, read by package
// jsonnum (null reads as NaN).
type jsonNum struct{ jsonnum.Num }

func (n jsonNum) get() float64 { return n.Value }

// Load reads a run directory's summary.json (which every figure's title
// needs) and checks that the directory holds a run.
func Load(dir string) (*Run, error) {
	p := filepath.Join(dir, output.SummaryJSON)
	b, err := os.ReadFile(p)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return nil, fmt.Errorf("figures: %s has no %s: give the directory of a finished run (it holds %s): %w",
				dir, output.SummaryJSON, strings.Join(output.OutputNames(), ", "), err)
		}
		return nil, fmt.Errorf("figures: %w", err)
	}
	var s summaryJSON
	if err := json.Unmarshal(b, &s); err != nil {
		return nil, fmt.Errorf("figures: %s is not valid JSON: %w", p, err)
	}
	if s.Format != output.SummaryFormat {
		return nil, fmt.Errorf("figures: %s has format %q, want %q: it was not written by lidscope", p, s.Format, output.SummaryFormat)
	}
	if s.FormatVersion != output.FormatVersion {
		return nil, fmt.Errorf("figures: %s has format_version %d; this lidscope reads version %d (earlier versions use names since renamed: see the README's changes): re-run the analysis of %s with this version", p, s.FormatVersion, output.FormatVersion, dir)
	}
	return &Run{
		Dir: dir, Dataset: s.Dataset, Title: s.Title, Version: s.Version, StudyHash: s.StudyHash,
		Period: s.Period.Label, RegimeDefinition: s.Regime.Text,
		Delta: s.Regime.Delta.get(), HalfWidth: s.Regime.HalfWidth.get(),
		BandSouth: s.Regime.Band.South.get(), BandNorth: s.Regime.Band.North.get(),
		Quantities: s.Quantities, Absent: s.Absent,
	}, nil
}

// Field is a lat–lon map: Values[j*len(Lon)+i] at Lat[j], Lon[i] (NaN where
// missing), with the cell edges: LatEdges (len(Lat)+1, ascending) and each
// column's west and east edge (ascending, not overlapping; a regional grid
// stored −180…180 across the dateline has a gap between its columns).
type Field struct {
	Name, LongName, Units string
	Lat, Lon              []float64
	LatEdges              []float64
	LonWest, LonEast      []float64
	Values                []float64
}

type mapsFile struct {
	lat, lon         []float64
	latEdges         []float64
	lonWest, lonEast []float64
	vars             map[string]bool
}

// ncVar reads a whole numeric variable, turning _FillValue and
// missing_value (NUG Appendix A) and non-finite values into NaN, and
// returns it with its units and long_name.
func ncVar(f *netcdf.File, name string) (vals []float64, units, long string, shape []int, err error) {
	v, err := f.Var(name)
	if err != nil {
		return nil, "", "", nil, fmt.Errorf("figures: %s: variable %s: %w", f.Path(), name, err)
	}
	vals, err = v.ReadAllFloat64()
	if err != nil {
		return nil, "", "", nil, fmt.Errorf("figures: %s: reading %s: %w", f.Path(), name, err)
	}
	var fills []float64
	for _, a := range []string{"_FillValue", "missing_value"} {
		if at, err := v.Attr(a); err == nil {
			if fs, ok := at.Float64s(); ok {
				fills = append(fills, fs...)
			}
		}
	}
	for i, x := range vals {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			vals[i] = math.NaN()
			continue
		}
		for _, fv := range fills {
			if x == fv || (v.Type == netcdf.Float && float32(x) == float32(fv)) {
				vals[i] = math.NaN()
			}
		}
	}
	if at, err := v.Attr("units"); err == nil {
		units, _ = at.Text()
	}
	if at, err := v.Attr("long_name"); err == nil {
		long, _ = at.Text()
	}
	return vals, units, long, v.Shape(), nil
}

// edges returns the ascending cell edges from a (n, 2) bounds variable.
func edges(b []float64, n int, what, path string) ([]float64, error) {
	if len(b) != 2*n {
		return nil, fmt.Errorf("figures: %s: %s bounds have %d values for %d cells", path, what, len(b), n)
	}
	e := make([]float64, n+1)
	for i := 0; i < n; i++ {
		e[i] = math.Min(b[2*i], b[2*i+1])
	}
	e[n] = math.Max(b[2*n-2], b[2*n-1])
	for i := 1; i <= n; i++ {
		if !(e[i] > e[i-1]) {
			return nil, fmt.Errorf("figures: %s: %s cells are not ascending at index %d (lidscope writes canonical south→north, west→east grids)", path, what, i)
		}
	}
	return e, nil
}

// cellBounds returns each longitude cell's west and east edge from a (n, 2)
// bounds variable, checking that the cells ascend without overlapping.
func cellBounds(b []float64, n int, path string) (west, east []float64, err error) {
	if len(b) != 2*n || n == 0 {
		return nil, nil, fmt.Errorf("figures: %s: longitude bounds have %d values for %d cells", path, len(b), n)
	}
	for i := 0; i < n; i++ {
		w, e := math.Min(b[2*i], b[2*i+1]), math.Max(b[2*i], b[2*i+1])
		if i > 0 && w < east[i-1]-1e-9 {
			return nil, nil, fmt.Errorf("figures: %s: longitude cell %d (%g…%g) overlaps the one before it (lidscope writes longitudes ascending)", path, i, w, e)
		}
		west, east = append(west, w), append(east, e)
	}
	if east[n-1]-west[0] > 360+1e-9 {
		return nil, nil, fmt.Errorf("figures: %s: longitude cells span %g° (more than 360°)", path, east[n-1]-west[0])
	}
	return west, east, nil
}

// openMapsGrid reads maps.nc's grid (r.maps) and closes the file.
func (r *Run) openMapsGrid() (*mapsFile, error) {
	f, err := r.openMaps()
	if err != nil {
		return nil, err
	}
	f.Close()
	return r.maps, nil
}

func (r *Run) openMaps() (*netcdf.File, error) {
	p := filepath.Join(r.Dir, output.MapsNC)
	f, err := netcdf.Open(p)
	if err != nil {
		return nil, fmt.Errorf("figures: cannot open the run's maps (%s): %w", p, err)
	}
	if r.maps != nil {
		return f, nil
	}
	m := &mapsFile{vars: map[string]bool{}}
	lat, _, _, _, err := ncVar(f, "lat")
	if err == nil {
		m.lat = lat
		m.lon, _, _, _, err = ncVar(f, "lon")
	}
	var lb, xb []float64
	if err == nil {
		lb, _, _, _, err = ncVar(f, "lat_bnds")
	}
	if err == nil {
		xb, _, _, _, err = ncVar(f, "lon_bnds")
	}
	if err == nil {
		m.latEdges, err = edges(lb, len(m.lat), "latitude", p)
	}
	if err == nil {
		m.lonWest, m.lonEast, err = cellBounds(xb, len(m.lon), p)
	}
	if err != nil {
		f.Close()
		return nil, err
	}
	vs, err := f.Vars()
	if err != nil {
		f.Close()
		return nil, fmt.Errorf("figures: %s: %w", p, err)
	}
	for _, v := range vs {
		m.vars[v.Name] = true
	}
	r.maps = m
	return f, nil
}

// HasMap reports whether maps.nc has the variable.
func (r *Run) HasMap(name string) (bool, error) {
	f, err := r.openMaps()
	if err != nil {
		return false, err
	}
	f.Close()
	return r.maps.vars[name], nil
}

// Map reads a (time, lat, lon) variable of maps.nc (time has length one).
func (r *Run) Map(name string) (*Field, error) {
	f, err := r.openMaps()
	if err != nil {
		return nil, err
	}
	defer f.Close()
	vals, units, long, shape, err := ncVar(f, name)
	if err != nil {
		return nil, err
	}
	nlat, nlon := len(r.maps.lat), len(r.maps.lon)
	if len(shape) != 3 || shape[1] != nlat || shape[2] != nlon || len(vals) < nlat*nlon {
		return nil, fmt.Errorf("figures: %s: %s has shape %v, want (time, lat, lon) = (1, %d, %d)", f.Path(), name, shape, nlat, nlon)
	}
	return r.field(name, long, units, vals[:nlat*nlon]), nil
}

func (r *Run) field(name, long, units string, vals []float64) *Field {
	m := r.maps
	return &Field{Name: name, LongName: long, Units: units, Lat: m.lat, Lon: m.lon,
		LatEdges: m.latEdges, LonWest: m.lonWest, LonEast: m.lonEast, Values: vals}
}

// QuantityMean is the mean of quantity q over all of a column's valid time
// steps, combined from the per-regime means q_mean and their counts
// q_count of maps.nc: Σ_r mean_r n_r / Σ_r n_r.
func (r *Run) QuantityMean(q string) (*Field, error) {
	f, err := r.openMaps()
	if err != nil {
		return nil, err
	}
	defer f.Close()
	mean, units, long, shape, err := ncVar(f, q+"_mean")
	if err != nil {
		return nil, err
	}
	count, _, _, cshape, err := ncVar(f, q+"_count")
	if err != nil {
		return nil, err
	}
	nlat, nlon := len(r.maps.lat), len(r.maps.lon)
	if len(shape) != 4 || shape[2] != nlat || shape[3] != nlon || fmt.Sprint(shape) != fmt.Sprint(cshape) {
		return nil, fmt.Errorf("figures: %s: %s_mean %v and %s_count %v must both be (time, regime, lat, lon) with lat %d, lon %d",
			f.Path(), q, shape, q, cshape, nlat, nlon)
	}
	n := nlat * nlon
	out := make([]float64, n)
	for k := 0; k < n; k++ {
		var s, w float64
		for reg := 0; reg < shape[1]; reg++ {
			m, c := mean[reg*n+k], count[reg*n+k]
			if math.IsNaN(m) || math.IsNaN(c) || c <= 0 {
				continue
			}
			s += m * c
			w += c
		}
		out[k] = math.NaN()
		if w > 0 {
			out[k] = s / w
		}
	}
	return r.field(q+"_mean", long, units, out), nil
}

// Series is the band series of series.nc.
type Series struct {
	Years       []float64 // decimal years of the time stamps
	TropMeanSST []float64 // K
	Convective  []float64 // area fraction (1)
	Subsidence  []float64 // area fraction (1)
	Calendar    string
	// Climatology is true for a run over a 12-month climatology (series.nc
	// global attribute time_axis): the axis is calendar months.
	Climatology bool
}

type seriesFile = Series

// Series reads series.nc: the time axis decoded in its calendar, the
// tropical-mean SST and the regimes' area fractions.
func (r *Run) Series() (*Series, error) {
	if r.series != nil {
		return r.series, nil
	}
	p := filepath.Join(r.Dir, output.SeriesNC)
	f, err := netcdf.Open(p)
	if err != nil {
		return nil, fmt.Errorf("figures: cannot open the run's series (%s): %w", p, err)
	}
	defer f.Close()
	tv, err := f.Var("time")
	if err != nil {
		return nil, fmt.Errorf("figures: %s: time: %w", p, err)
	}
	times, _, _, _, err := ncVar(f, "time")
	if err != nil {
		return nil, err
	}
	var units, cal string
	if a, err := tv.Attr("units"); err == nil {
		units, _ = a.Text()
	}
	if a, err := tv.Attr("calendar"); err == nil {
		cal, _ = a.Text()
	}
	dates, err := calendar.DecodeAxis(times, units, cal, calendar.Options{})
	if err != nil {
		return nil, fmt.Errorf("figures: %s: time (units %q, calendar %q): %w", p, units, cal, err)
	}
	s := &Series{Calendar: cal}
	if a, err := f.Attr(vocab.TimeAxisNote); err == nil {
		txt, _ := a.Text()
		s.Climatology = txt == output.TimeAxisClimatology
	}
	for _, d := range dates {
		frac := (float64(d.DayOfYear()-1) + (float64(d.Hour)*3600+float64(d.Minute)*60+d.Seconds())/86400) /
			float64(d.Calendar.DaysInYear(d.Year))
		s.Years = append(s.Years, float64(d.Year)+frac)
	}
	if s.TropMeanSST, _, _, _, err = ncVar(f, "tropical_mean_sst"); err != nil {
		return nil, err
	}
	af, _, _, shape, err := ncVar(f, "area_fraction")
	if err != nil {
		return nil, err
	}
	nt := len(times)
	if len(shape) != 2 || shape[0] != nt || shape[1] != 3 || len(s.TropMeanSST) != nt {
		return nil, fmt.Errorf("figures: %s: area_fraction has shape %v, want (time, regime) = (%d, 3)", p, shape, nt)
	}
	for t := 0; t < nt; t++ {
		s.Convective = append(s.Convective, af[3*t])
		s.Subsidence = append(s.Subsidence, af[3*t+2])
	}
	r.series = s
	return s, nil
}
