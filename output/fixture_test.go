package output

import (
	"math"
	"os"
	"path/filepath"
	"sort"
	"testing"
	"time"

	"lidscope/accumulate"
	"lidscope/grid"
	"lidscope/regimes"
)

// The test record is invented (synthetic truth, not data): a 4×4 grid
// between 20°S and 20°N, six monthly steps of 2001, three quantities, and a
// regime sequence written by hand for each column:
//
//	C convective, T transition, S subsidence, L land or missing.
var fixSeq = []string{
	"LLLLLL", // 0: land
	"CCCCCC", // 1
	"SSSSSS", // 2
	"CSCSCS", // 3: five crossings
	"TTTTTT", // 4: valid but never definite
	"CCSTSC", // 5: the hand-worked column
	"SSCCSS", // 6: eis missing at step 1
	"LCCSLS", // 7: missing in the middle
}

const fixSteps = 6

var fixQuantities = []string{"eis", "t700", "cloud"}

func fixRegime(i, t int) regimes.Regime {
	var ch byte
	if i < len(fixSeq) {
		ch = fixSeq[i][t]
	} else {
		ch = "CTS"[(i+t)%3]
	}
	switch ch {
	case 'C':
		return regimes.Convective
	case 'T':
		return regimes.Transition
	case 'S':
		return regimes.Subsidence
	}
	return regimes.Missing
}

// fixRel is the relative SST (K) consistent with the regime for δ = 0.5 K,
// h = 0.25 K.
func fixRel(r regimes.Regime) float32 {
	switch r {
	case regimes.Convective:
		return 1
	case regimes.Transition:
		return 0.5
	case regimes.Subsidence:
		return -1
	}
	return float32(math.NaN())
}

// fixValue is quantity q at column i and step t, in SI units.
func fixValue(q, i, t int) float32 {
	switch fixQuantities[q] {
	case "eis":
		if i == 6 && t == 1 {
			return float32(math.NaN())
		}
		return float32(i + t) // K
	case "t700":
		return float32(270 + 0.5*float64(i)) // K
	}
	return float32(0.1 + 0.125*float64(t)) // cloud fraction
}

// fixTimes are the 15th of each month 2001-01 … 2001-06 at 00:00 in days
// since 1970-01-01 (standard calendar): 2001-01-01 is day 11323 = 31 × 365
// + 8 leap days (1972 … 2000) (calendar arithmetic, common practice), and
// the months have 31, 28, 31, 30, 31 days.
var fixTimes = []float64{11337, 11368, 11396, 11427, 11457, 11488}

// fixBounds are the month edges 2001-01-01 … 2001-07-01.
var fixBounds = [][2]float64{{11323, 11354}, {11354, 11382}, {11382, 11413}, {11413, 11443}, {11443, 11474}, {11474, 11504}}

type fixture struct {
	acc   *accumulate.Acc
	meta  Meta
	steps []*accumulate.Step
}

func newFixture(t testing.TB) *fixture {
	t.Helper()
	g, err := grid.New([]float64{-15, -5, 5, 15}, []float64{0, 90, 180, 270}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	area := g.CellAreas()
	band := regimes.Band{South: -30, North: 30}
	l := accumulate.Layout{
		NLat: 4, NLon: 4, Lat: g.Lat, Lon: g.Lon, Area: area,
		BandWeight: band.Weights(g.LatBounds, area),
		Quantities: fixQuantities,
		Regions: []accumulate.Region{
			{Name: "west", South: -20, North: 20, West: -45, East: 135},
			{Name: "dateline", South: -20, North: 20, West: 135, East: -45},
		},
	}
	acc, err := accumulate.New(l)
	if err != nil {
		t.Fatal(err)
	}
	f := &fixture{acc: acc}
	n := 16
	for ts := 0; ts < fixSteps; ts++ {
		s := &accumulate.Step{Label: "2001-0" + string(rune('1'+ts)), Year: 2001, Month: ts + 1, TropMean: 300 + 0.1*float64(ts),
			Rel: make([]float32, n), Regime: make([]regimes.Regime, n), Values: make([][]float32, len(fixQuantities))}
		for q := range s.Values {
			s.Values[q] = make([]float32, n)
		}
		for i := 0; i < n; i++ {
			r := fixRegime(i, ts)
			s.Regime[i] = r
			s.Rel[i] = fixRel(r)
			for q := range s.Values {
				s.Values[q][i] = fixValue(q, i, ts)
			}
		}
		acc.AddCells(s, 0, 8)
		acc.AddCells(s, 8, n)
		acc.AddStep(s)
		f.steps = append(f.steps, s)
	}
	t0 := time.Date(2024, 3, 1, 12, 0, 0, 0, time.UTC)
	f.meta = Meta{
		Dataset: "synthetic test record", Title: "lidscope output test",
		Version: "0.0.0-test", Command: "lidscope run --study 'my study.toml' --out res",
		Study: "[regimes]\ndelta = 0.5\n", StudyHash: "sha256:0123abcd",
		MetricsConventions: "svp = murphy-koop\nlcl = romps\n",
		Regimes:            regimes.Definition{Band: regimes.Band{South: -30, North: 30}, Delta: 0.5, HalfWidth: 0.25},
		Inputs:             []InputFile{{Role: "sst", Path: "/data/sst.nc", Size: 1234, ModTime: t0.Add(-time.Hour), SHA256: "ab12"}},
		Start:              t0, End: t0.Add(90 * time.Second),
		Period: "2001-01 … 2001-06", StepsPerYear: 12,
		TimeUnits: "days since 1970-01-01", Calendar: "standard",
		TimeValues: append([]float64(nil), fixTimes...),
		Notes:      []string{"t700 interpolated in ln p from 600 and 850 hPa"},
		Grid:       g,
	}
	return f
}

// write runs Write into a fresh directory.
func (f *fixture) write(t testing.TB) (string, Files) {
	t.Helper()
	dir := filepath.Join(t.TempDir(), "out")
	files, err := Write(dir, f.acc, f.meta, Options{})
	if err != nil {
		t.Fatal(err)
	}
	return dir, files
}

// dirNames lists a directory, hidden entries included.
func dirNames(t testing.TB, dir string) []string {
	t.Helper()
	es, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, e := range es {
		out = append(out, e.Name())
	}
	sort.Strings(out)
	return out
}

// newFineFixture is a second invented record for the checks against CDO:
// a 2° grid over 10°S–10N with 24 monthly steps from 2001-01, regimes and
// values from a fixed pseudo-random sequence, some land columns and some
// missing values. Cells this small make CDO's cell areas (computed from the
// bounds) agree with the exact spherical areas to about 1e-6.
func newFineFixture(t testing.TB) *fixture {
	t.Helper()
	var lat, lon []float64
	for y := -9.0; y < 10; y += 2 {
		lat = append(lat, y)
	}
	for x := 1.0; x < 360; x += 2 {
		lon = append(lon, x)
	}
	g, err := grid.New(lat, lon, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	area := g.CellAreas()
	n := len(area)
	l := accumulate.Layout{
		NLat: len(lat), NLon: len(lon), Lat: g.Lat, Lon: g.Lon, Area: area,
		BandWeight: regimes.Band{South: -30, North: 30}.Weights(g.LatBounds, area),
		Quantities: []string{"eis", "cloud"},
		Regions:    []accumulate.Region{{Name: "east pacific", South: -10, North: 10, West: -150, East: -80}},
	}
	acc, err := accumulate.New(l)
	if err != nil {
		t.Fatal(err)
	}
	state := uint64(12345)
	rnd := func() float64 { // a fixed linear congruential sequence (Knuth's MMIX constants)
		state = state*6364136223846793005 + 1442695040888963407
		return float64(state>>11) / (1 << 53)
	}
	f := &fixture{acc: acc}
	c := regimes.Classifier{Delta: 0.3, HalfWidth: 0.1}
	var times []float64
	for ts := 0; ts < 24; ts++ {
		s := &accumulate.Step{Label: "step", Year: 2001 + ts/12, Month: ts%12 + 1, TropMean: 300 + rnd(),
			Rel: make([]float32, n), Regime: make([]regimes.Regime, n), Values: [][]float32{make([]float32, n), make([]float32, n)}}
		for i := 0; i < n; i++ {
			s.Rel[i] = float32(2*rnd() - 1 + 0.8*math.Sin(float64(i%len(lon))/9))
			if i%len(lon) >= 100 && i%len(lon) < 110 { // a strip of land
				s.Rel[i] = float32(math.NaN())
			}
			s.Regime[i] = c.Classify(float64(s.Rel[i]))
			s.Values[0][i] = float32(6 - 4*float64(s.Rel[i]) + rnd())
			if rnd() < 0.05 {
				s.Values[0][i] = float32(math.NaN())
			}
			s.Values[1][i] = float32(rnd())
		}
		acc.AddCells(s, 0, n)
		acc.AddStep(s)
		times = append(times, 11337+30.4375*float64(ts))
	}
	f.meta = Meta{Dataset: "synthetic fine record", Version: "test", Command: "lidscope test",
		Regimes:      regimes.Definition{Band: regimes.Band{South: -30, North: 30}, Delta: c.Delta, HalfWidth: c.HalfWidth},
		StepsPerYear: 12, TimeUnits: "days since 1970-01-01", Calendar: "standard", TimeValues: times, Grid: g}
	return f
}
