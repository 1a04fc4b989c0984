// Package figurestest writes a small invented run directory (synthetic data,
// clearly labelled as such), committed as a run folder (package runfolder),
// for the figures' tests and examples. Nothing in it is real: the fields are smooth functions of
// position and time chosen so that every figure has structure to show.
package figurestest

import (
	"context"
	"fmt"
	"math"
	"path/filepath"

	"lidscope/accumulate"
	"lidscope/calendar"
	"lidscope/grid"
	"lidscope/output"
	"lidscope/regimes"
	"lidscope/relations"
	"lidscope/runfolder"
)

// Spec chooses the invented run.
type Spec struct {
	// DLat, DLon are the grid spacing in degrees (default 5).
	DLat, DLon float64
	// South, North are the grid's latitude extent (default −40…40).
	South, North float64
	// West is the first cell's western edge (default 0: a 0…360 grid).
	West float64
	// Span is the longitude extent in degrees (default 360).
	Span float64
	// Steps is the number of monthly steps from 2001-01 (default 24).
	Steps int
	// Climatology makes the run a 12-month climatology (12 steps stamped
	// in year 1, labelled Jan … Dec, Meta.Climatology set); Steps is
	// ignored.
	Climatology bool
}

// MissingBox is the box (degrees) whose cells are land in every run: every
// map must show the missing-data colour there.
var MissingBox = struct{ South, North, West, East float64 }{10, 30, 20, 50}

func (s *Spec) defaults() {
	if s.DLat == 0 {
		s.DLat = 5
	}
	if s.DLon == 0 {
		s.DLon = 5
	}
	if s.South == 0 && s.North == 0 {
		s.South, s.North = -40, 40
	}
	if s.Span == 0 {
		s.Span = 360
	}
	if s.Steps == 0 {
		s.Steps = 24
	}
	if s.Climatology {
		s.Steps = 12
	}
}

// Land reports whether the cell centred at lat, lon (degrees) is in the
// missing box.
func Land(lat, lon float64) bool {
	lon = math.Mod(math.Mod(lon, 360)+360, 360)
	b := MissingBox
	return lat > b.South && lat < b.North && lon > b.West && lon < b.East
}

// Write writes the invented run into dir and returns the files.
func Write(dir string, spec Spec) (output.Files, error) {
	w, err := build(spec)
	if err != nil {
		return nil, err
	}
	acc, err := accumulate.New(w.layout)
	if err != nil {
		return nil, err
	}
	for _, s := range w.steps {
		acc.AddCells(s, 0, len(s.Rel))
		acc.AddStep(s)
	}
	st, err := runfolder.Create(dir, runfolder.Options{Replace: true, Known: output.OutputNames()})
	if err != nil {
		return nil, err
	}
	defer st.Close()
	if err := output.Stage(st, dir, acc, w.meta); err != nil {
		return nil, err
	}
	if _, err := st.Commit(context.Background()); err != nil {
		return nil, err
	}
	var files output.Files
	for _, n := range output.OutputNames() {
		files = append(files, filepath.Join(dir, n))
	}
	return files, nil
}

// Relations runs the relationship analysis (package relations, default
// configuration with the run's regime definition, one flip patch and the
// omega indicator for the threshold) over the invented run.
func Relations(spec Spec) (*relations.Results, error) {
	w, err := build(spec)
	if err != nil {
		return nil, err
	}
	cfg := relations.Defaults()
	cfg.Classifier = w.cls
	cfg.Patches = []relations.Patch{{Name: "west_pacific", South: -10, North: 10, West: 140, East: 170}}
	cfg.Indicator = relations.IndicatorOmega
	cfg.ThresholdReplicates = 200
	a, err := relations.New(cfg, w.layout, nil)
	if err != nil {
		return nil, err
	}
	for _, s := range w.steps {
		a.AddStep(s)
	}
	return a.Results()
}

type world struct {
	layout accumulate.Layout
	steps  []*accumulate.Step
	meta   output.Meta
	cls    regimes.Classifier
}

func build(spec Spec) (*world, error) {
	spec.defaults()
	var lat, lon []float64
	for y := spec.South + spec.DLat/2; y < spec.North; y += spec.DLat {
		lat = append(lat, y)
	}
	for x := spec.West + spec.DLon/2; x < spec.West+spec.Span; x += spec.DLon {
		lon = append(lon, x)
	}
	g, err := grid.New(lat, lon, nil, nil)
	if err != nil {
		return nil, err
	}
	area := g.CellAreas()
	band := regimes.Band{South: -30, North: 30}
	quantities := []string{"eis", "lts", "cloud", "omega", "sst"}
	l := accumulate.Layout{
		NLat: len(lat), NLon: len(lon), Lat: g.Lat, Lon: g.Lon, Area: area,
		BandWeight: band.Weights(g.LatBounds, area),
		Quantities: quantities,
		Regions:    []accumulate.Region{{Name: "east pacific (synthetic)", South: -30, North: 0, West: -130, East: -80}},
	}
	cls := regimes.Classifier{Delta: 0.5, HalfWidth: 0.25}
	n := len(lat) * len(lon)
	w := &world{layout: l, cls: cls}
	var times [][2]float64
	var mid []float64
	day := 0.0
	for t := 0; t < spec.Steps; t++ {
		year, month := 2001+t/12, t%12+1
		label := fmt.Sprintf("%d-%02d", year, month)
		if spec.Climatology {
			year, label = 1, calendar.MonthAbbrev(month)
		}
		days := float64(daysIn(year, month))
		times = append(times, [2]float64{day, day + days})
		mid = append(mid, day+days/2)
		day += days
		season := math.Sin(2 * math.Pi * (float64(month) - 1) / 12)
		s := &accumulate.Step{Label: label, Year: year, Month: month,
			TropMean: 300 + 0.3*season + 0.01*float64(t),
			Rel:      make([]float32, n), Regime: make([]regimes.Regime, n)}
		for range quantities {
			s.Values = append(s.Values, make([]float32, n))
		}
		for j, y := range lat {
			for i, x := range lon {
				k := j*len(lon) + i
				if Land(y, x) {
					s.Rel[k] = float32(math.NaN())
					for q := range quantities {
						s.Values[q][k] = float32(math.NaN())
					}
					continue
				}
				// A warm pool in the west, cold tongue and subsidence in the
				// east of each ocean, shifting with the season.
				rel := 1.6*math.Cos((x-150)*math.Pi/180) - 0.035*y*y/10 + 0.5*season*math.Sin(y*math.Pi/40) +
					0.3*math.Sin(float64(k)*0.7+float64(t)*1.3)
				s.Rel[k] = float32(rel)
				eis := 2 - 2.2*rel + 0.04*math.Abs(y)
				s.Values[0][k] = float32(eis)                      // K
				s.Values[1][k] = float32(16 + 0.8*eis + 0.05*x/10) // K
				s.Values[2][k] = float32(math.Min(0.95, math.Max(0.02, 0.25+0.045*eis+0.05*math.Sin(float64(k*7+t*3)))))
				// Ascent (negative omega, Pa s-1) more likely the warmer
				// the column is relative to the tropics.
				s.Values[3][k] = float32(0.04*(0.6-rel) + 0.03*math.Sin(float64(k*13+t*5)))
				s.Values[4][k] = float32(s.TropMean + rel) // K
			}
		}
		cls.ClassifySlab(s.Rel, s.Regime)
		w.steps = append(w.steps, s)
	}
	w.meta = output.Meta{
		Dataset: "lidscope synthetic test world (invented data)", Title: "figures test run",
		Version: "0.0.0-test", Command: "lidscope test", Study: "[regimes]\ndelta = 0.5\n",
		StudyHash: "sha256:5e1f0c0ffee2b3a4", MetricsConventions: "svp = murphy-koop\n",
		Regimes:      regimes.Definition{Band: regimes.Band{South: -30, North: 30}, Delta: cls.Delta, HalfWidth: cls.HalfWidth},
		Period:       fmt.Sprintf("2001-01 … %d-%02d", 2001+(spec.Steps-1)/12, (spec.Steps-1)%12+1),
		StepsPerYear: 12, TimeUnits: "days since 2001-01-01", Calendar: "standard",
		TimeValues: mid, TimeBounds: times, Grid: g,
	}
	if spec.Climatology {
		w.meta.TimeUnits, w.meta.Period, w.meta.Climatology = "days since 0001-01-01", "Jan … Dec", true
	}
	return w, nil
}

func daysIn(year, month int) int {
	switch month {
	case 2:
		if year%4 == 0 && (year%100 != 0 || year%400 == 0) {
			return 29
		}
		return 28
	case 4, 6, 9, 11:
		return 30
	}
	return 31
}
