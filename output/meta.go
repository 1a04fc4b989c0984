package output

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"time"

	"lidscope/accumulate"
	"lidscope/calendar"
	"lidscope/grid"
	"lidscope/regimes"
)

// Meta is what Write records about the run besides its statistics.
type Meta struct {
	Dataset, Title     string
	Version            string // lidscope version
	Command            string // command line, for history
	Study              string // the fully resolved study text
	StudyHash          string
	MetricsConventions string // metrics.Conventions.Text()
	// Regimes is the regime definition (band, rule, δ/h or percentile):
	// every file records it through its own encodings.
	Regimes regimes.Definition
	// Inputs are the files the run read data from (with their SHA-256);
	// of a multi-file record only those holding a kept step.
	Inputs []InputFile
	// Listed are every input file of the dataset as the study listed them
	// when the run started, with their size and modification time (no
	// checksum): what a piece's skip compares against (the run state
	// keeps them; the provenance lists Inputs).
	Listed       []InputFile
	Start, End   time.Time // wall-clock of the run
	Period       string    // first … last time step label
	StepsPerYear float64   // 12 for monthly
	// TimeUnits and Calendar describe the series time axis, e.g.
	// "days since 1970-01-01" and "standard" (CF-1.10 §4.4, §4.4.1).
	TimeUnits, Calendar string
	TimeValues          []float64 // one per Series point, in TimeUnits
	// TimeBounds, optional, are the edges of each step's interval in
	// TimeUnits, one pair per Series point. With them series.nc has
	// time_bnds and the averaging period of maps.nc is exact; without them
	// the period is inferred from TimeValues (see the package
	// documentation).
	TimeBounds [][2]float64
	Notes      []string // what the run converted/dropped, in plain words
	// Absent says which quantities the run does not have because an
	// optional input was not given, in plain words (e.g. "no
	// air_temperature input: no 700 hPa temperature, LTS or EIS"). The
	// outputs list the quantities they have (those of the layout) and
	// these; absent quantities have no variables or columns at all.
	Absent []string
	// Climatology is true when the record is a 12-month climatology: the
	// time stamps stand for calendar months, not dates. The NetCDF files
	// say so (global attribute time_axis), and figures label the axis Jan
	// … Dec.
	Climatology bool
	Grid        *grid.Grid // analysis grid (bounds for the NetCDF)
	// Piece is "K/N" for a run over the K-th of N pieces of the record
	// ("" for a whole record or a merge).
	Piece string
	// AnomalyBase is the fingerprint (relations.Climatology.Fingerprint)
	// of the climatology a piece in anomaly mode took its anomalies
	// against ("" otherwise): a piece already done is skipped only when
	// it was made against the same climatology.
	AnomalyBase string
	// Batch describes the batch job that ran it (e.g. "slurm job 123,
	// array task 4"), one line each; empty outside a batch scheduler.
	Batch []string
}

// InputFile identifies one file the run read.
type InputFile struct {
	Role, Path string
	Size       int64
	ModTime    time.Time
	SHA256     string
}

// Options control Write.
type Options struct {
	// Force allows Write to replace outputs of an earlier run in dir. Without
	// it Write refuses, before writing anything, when any of its output
	// files exists.
	Force bool
}

// Files are the paths Write wrote, in the order of OutputNames.
type Files []string

// Output file names, written in this order.
const (
	MapsNC         = "maps.nc"
	SeriesNC       = "series.nc"
	SeriesCSV      = "series.csv"
	RegionsCSV     = "regions.csv"
	SummaryJSON    = "summary.json"
	ProvenanceJSON = "provenance.json"
)

// OutputNames lists every file Write writes in the output directory.
func OutputNames() []string {
	return []string{MapsNC, SeriesNC, SeriesCSV, RegionsCSV, SummaryJSON, ProvenanceJSON}
}

// ErrInvalid is wrapped by every error Write returns because its arguments
// (accumulator or Meta) are unusable; nothing has been written then.
var ErrInvalid = errors.New("invalid output request")

func invalid(format string, a ...any) error {
	return fmt.Errorf("output: %w: %s", ErrInvalid, fmt.Sprintf(format, a...))
}

// checked is the validated request with what is derived from it.
type checked struct {
	acc   *accumulate.Acc
	meta  Meta
	qs    []quantity
	dates []calendar.Date // decoded TimeValues
	notes []string        // Meta.Notes plus Write's own
}

// check validates the accumulator and Meta against each other.
func check(acc *accumulate.Acc, m Meta) (*checked, error) {
	if acc == nil {
		return nil, invalid("the accumulator is nil")
	}
	l := acc.L
	n := l.NLat * l.NLon
	if n == 0 {
		return nil, invalid("the accumulator's grid is empty (%d×%d)", l.NLat, l.NLon)
	}
	if acc.Cells.Steps == 0 || len(acc.Series) == 0 {
		return nil, invalid("the accumulator holds no time steps; nothing to write (was AddStep called?)")
	}
	if len(acc.Series) != acc.Cells.Steps {
		return nil, invalid("the accumulator has %d series points but counted %d steps; call AddStep once per step", len(acc.Series), acc.Cells.Steps)
	}
	if m := acc.Index.Len(); len(acc.Cells.Valid) != m || len(acc.Cells.Tracks) != m || len(acc.Cells.Values) != len(l.Quantities) {
		return nil, invalid("the accumulator's cell arrays do not match its %d×%d layout; build it with accumulate.New", l.NLat, l.NLon)
	}
	c := &checked{acc: acc, meta: m}
	seen := map[string]bool{}
	for _, name := range l.Quantities {
		if seen[name] {
			return nil, invalid("quantity %q appears twice in the layout", name)
		}
		seen[name] = true
		q, err := lookupQuantity(name)
		if err != nil {
			return nil, fmt.Errorf("%w: %w", ErrInvalid, err)
		}
		c.qs = append(c.qs, q)
	}
	if m.Grid == nil {
		return nil, invalid("Meta.Grid is nil; pass the analysis grid, whose cell bounds maps.nc records")
	}
	if len(m.Grid.Lat) != l.NLat || len(m.Grid.Lon) != l.NLon {
		return nil, invalid("Meta.Grid is %d×%d but the accumulator's layout is %d×%d; pass the grid the run accumulated on", len(m.Grid.Lat), len(m.Grid.Lon), l.NLat, l.NLon)
	}
	for j, v := range l.Lat {
		if math.Abs(v-m.Grid.Lat[j]) > 1e-6 {
			return nil, invalid("Meta.Grid latitude %d is %g but the layout's is %g; pass the grid the run accumulated on", j, m.Grid.Lat[j], v)
		}
	}
	for i, v := range l.Lon {
		if math.Abs(v-m.Grid.Lon[i]) > 1e-6 {
			return nil, invalid("Meta.Grid longitude %d is %g but the layout's is %g; pass the grid the run accumulated on", i, m.Grid.Lon[i], v)
		}
	}
	if len(m.Grid.LatBounds) != l.NLat || len(m.Grid.LonBounds) != l.NLon {
		return nil, invalid("Meta.Grid has no cell bounds; build it with grid.New, which derives them")
	}
	if !(m.StepsPerYear > 0) || math.IsInf(m.StepsPerYear, 0) {
		return nil, invalid("Meta.StepsPerYear = %v must be a positive number of time steps per year (12 for monthly data)", m.StepsPerYear)
	}
	if err := m.Regimes.Validate(); err != nil {
		return nil, invalid("Meta.Regimes: %v", err)
	}
	if len(m.TimeValues) != len(acc.Series) {
		return nil, invalid("Meta.TimeValues has %d values for %d time steps; give one time value per step", len(m.TimeValues), len(acc.Series))
	}
	if m.TimeBounds != nil && len(m.TimeBounds) != len(acc.Series) {
		return nil, invalid("Meta.TimeBounds has %d pairs for %d time steps; give one pair per step or none", len(m.TimeBounds), len(acc.Series))
	}
	if strings.TrimSpace(m.TimeUnits) == "" || strings.TrimSpace(m.Calendar) == "" {
		return nil, invalid("Meta.TimeUnits (%q) and Meta.Calendar (%q) are both required, e.g. \"days since 1970-01-01\" and \"standard\"", m.TimeUnits, m.Calendar)
	}
	dates, err := calendar.DecodeAxis(m.TimeValues, m.TimeUnits, m.Calendar, calendar.Options{})
	if err != nil {
		return nil, fmt.Errorf("output: %w: Meta.TimeValues with units %q, calendar %q: %w", ErrInvalid, m.TimeUnits, m.Calendar, err)
	}
	c.dates = dates
	c.notes = append([]string(nil), m.Notes...)
	return c, nil
}

// periodAxis returns the time value of the whole record and, when known,
// its bounds, for the one-step time axis of maps.nc. With Meta.TimeBounds
// the period runs from the first lower to the last upper bound. Without
// them, and with at least two steps, each end is put half a step beyond
// the first and last time stamps (half the neighbouring spacing; the rule
// grid.New uses for latitude edges); a note says so. A single step without
// bounds has no period bounds.
func (c *checked) periodAxis() (value, lo, hi float64, bounded bool, note string) {
	t := c.meta.TimeValues
	n := len(t)
	switch {
	case c.meta.TimeBounds != nil:
		lo, hi = c.meta.TimeBounds[0][0], c.meta.TimeBounds[n-1][1]
		return (lo + hi) / 2, lo, hi, true, ""
	case n >= 2:
		lo = t[0] - (t[1]-t[0])/2
		hi = t[n-1] + (t[n-1]-t[n-2])/2
		return (lo + hi) / 2, lo, hi, true, fmt.Sprintf("maps.nc: the run gave no time bounds, so the averaging period's bounds (%s %g to %g) were put half a step beyond the first and last time stamps", c.meta.TimeUnits, lo, hi)
	}
	return t[0], 0, 0, false, ""
}
