package output

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"lidscope/internal/cfwrite"
	"lidscope/regimes"
	"lidscope/stats"
	"lidscope/vocab"
)

// regimeDim is the name of the categorical regime axis in maps.nc and
// series.nc. Its index k is regimes.All[k]: 0 convective, 1 transition,
// 2 subsidence.
const regimeDim = "regime"

func regimeCategories() cfwrite.Categories {
	m := make([]string, len(regimes.All))
	for k, r := range regimes.All {
		m[k] = r.String()
	}
	return cfwrite.Categories{
		Name:     regimeDim,
		LongName: "SST regime (relative sea surface temperature above or below the threshold)",
		Meanings: m,
	}
}

// timeComment returns the parenthesised part of a time cell method: the
// interval of the original steps when it is monthly (CF-1.10 §7.3.2
// "interval: value unit"), then the non-standard comment.
func (c *checked) timeComment(comment string) string {
	if c.meta.StepsPerYear == 12 {
		return "(interval: 1 month comment: " + comment + ")"
	}
	return "(comment: " + comment + ")"
}

// mapVar is one variable of maps.nc and fill, which makes its values for
// the single time step (the whole record) when it is written: one map at
// a time in memory, not all of them (a fine grid's end-of-run peak).
type mapVar struct {
	spec cfwrite.VarSpec
	fill func() []float64
}

// values returns the variable's values.
func (v mapVar) values() []float64 { return v.fill() }

// mapVars builds every variable of maps.nc. Regime variables are laid out
// [regime][lat][lon] in the order of regimes.All.
func (c *checked) mapVars() []mapVar {
	acc := c.acc
	n := acc.NCells()
	ryx := []string{cfwrite.DimTime, regimeDim, cfwrite.DimLat, cfwrite.DimLon}
	out := c.columnVars()
	add := func(s cfwrite.VarSpec, fill func() []float64) { out = append(out, mapVar{spec: s, fill: fill}) }

	for qi, name := range acc.L.Quantities {
		q := c.qs[qi]
		regimeMaps := func(of func(m stats.Moments) float64) func() []float64 {
			return func() []float64 {
				d := make([]float64, len(regimes.All)*n)
				for k, r := range regimes.All {
					for i := 0; i < n; i++ {
						d[k*n+i] = of(acc.Moments(qi, r, i))
					}
				}
				return d
			}
		}
		mean := regimeMaps(func(m stats.Moments) float64 { return m.MeanOrNaN() })
		cnt := regimeMaps(func(m stats.Moments) float64 { return float64(m.N) })
		coord := ""
		if q.PressurePa > 0 {
			coord = pressureCoordName(q.PressurePa)
		}
		add(cfwrite.VarSpec{
			Name: name + "_" + vocab.Mean, Dims: ryx, Units: q.Units,
			LongName: q.LongName, StandardName: q.StandardName,
			CellMethods: "time: mean " + c.timeComment("over the time steps in which the column was in the regime given by the regime coordinate"),
			Coordinates: coord,
		}, mean)
		add(cfwrite.VarSpec{
			Name: name + "_" + vocab.Count, Dims: ryx, Type: cfwrite.Int32, Units: vocab.UnitOne,
			LongName:    "number of time steps averaged in " + name + "_mean",
			CellMethods: "time: sum " + c.timeComment("of the indicator of a step in the regime of the regime coordinate with a value of "+name),
		}, cnt)
	}
	return out
}

// columnVars builds the variables of maps.nc that are one map per column
// statistic: regime fractions, crossings, dwell times, valid steps and
// relative SST.
func (c *checked) columnVars() []mapVar {
	acc := c.acc
	cells := &acc.Cells
	n := acc.NCells()
	yx := []string{cfwrite.DimTime, cfwrite.DimLat, cfwrite.DimLon}
	steps := strconv.FormatFloat(c.meta.StepsPerYear, 'g', -1, 64)
	var out []mapVar
	add := func(s cfwrite.VarSpec, fill func() []float64) { out = append(out, mapVar{spec: s, fill: fill}) }

	for _, r := range regimes.All {
		frac := func() []float64 {
			d := make([]float64, n)
			for i := range d {
				d[i] = math.NaN()
				if v := acc.ValidSteps(i); v > 0 {
					d[i] = float64(acc.RegimeSteps(r, i)) / float64(v)
				}
			}
			return d
		}
		add(cfwrite.VarSpec{
			Name: r.String() + "_" + vocab.TimeFraction, Dims: yx, Units: vocab.UnitOne,
			LongName:    "fraction of valid time steps in the " + r.String() + " regime",
			CellMethods: "time: mean " + c.timeComment("of the "+r.String()+"-regime indicator over the time steps in which the column was valid ocean with data"),
		}, frac)
	}
	add(cfwrite.VarSpec{
		Name: vocab.CrossingRate, Dims: yx, Units: vocab.UnitPerYear,
		LongName:    "crossings between the convective and subsidence regimes per year of record",
		CellMethods: "time: mean " + c.timeComment("crossings counted with hysteresis across transition and missing steps, divided by the record length in years"),
		Attributes:  map[string]any{vocab.SamplingFrequency: c.meta.StepsPerYear, vocab.SamplingFrequency + "_units": vocab.UnitPerYear},
	}, func() []float64 { return acc.CrossingsPerYear(c.meta.StepsPerYear) })
	for _, r := range []regimes.Regime{regimes.Convective, regimes.Subsidence} {
		dwell := func() []float64 {
			d := make([]float64, n)
			for i := range d {
				d[i] = math.NaN()
				if acc.ValidSteps(i) > 0 {
					t := acc.Track(i)
					d[i] = t.MeanDwell(r)
				}
			}
			return d
		}
		// One variable per regime: in months (UDUNITS-2: a twelfth of a
		// year) for monthly steps, otherwise in time steps, the units
		// attribute saying which.
		units, long := vocab.UnitOne, "mean dwell time in the "+r.String()+" regime, in time steps"
		attrs := map[string]any{
			vocab.SamplingFrequency:            c.meta.StepsPerYear,
			vocab.SamplingFrequency + "_units": vocab.UnitPerYear,
			"comment":                          "a number of time steps; one step is 1/" + steps + " year",
		}
		if c.meta.StepsPerYear == 12 {
			units, long = vocab.UnitMonth, "mean dwell time in the "+r.String()+" regime"
			attrs["comment"] = "mean run length of monthly steps, in months; the UDUNITS month is a twelfth of a year"
		}
		add(cfwrite.VarSpec{
			Name: r.String() + "_" + vocab.Dwell, Dims: yx, Units: units,
			LongName:    long,
			CellMethods: "time: mean " + c.timeComment("mean length of the runs of steps in the regime, runs cut off by the ends of the record included"),
			Attributes:  attrs,
		}, dwell)
	}
	valid := func() []float64 {
		d := make([]float64, n)
		for i := range d {
			d[i] = float64(acc.ValidSteps(i))
		}
		return d
	}
	add(cfwrite.VarSpec{
		Name: "valid_steps", Dims: yx, Type: cfwrite.Int32, Units: "1",
		LongName:    "number of time steps in which the column was valid ocean with data",
		CellMethods: "time: sum " + c.timeComment("of the indicator of a valid step"),
		Attributes:  map[string]any{vocab.TimeSteps: cells.Steps},
	}, valid)
	relMap := func(of func(m stats.Moments) float64) func() []float64 {
		return func() []float64 {
			d := make([]float64, n)
			for i := range d {
				d[i] = of(acc.RelMoments(i))
			}
			return d
		}
	}
	add(cfwrite.VarSpec{
		Name: "rel_sst_mean", Dims: yx, Units: "K",
		LongName:    "relative sea surface temperature (SST minus tropical-mean SST)",
		CellMethods: "time: mean " + c.timeComment("over the valid time steps of the column"),
	}, relMap(func(m stats.Moments) float64 { return m.MeanOrNaN() }))
	add(cfwrite.VarSpec{
		Name: "rel_sst_std", Dims: yx, Units: "K",
		LongName:    "relative sea surface temperature (SST minus tropical-mean SST)",
		CellMethods: "time: standard_deviation " + c.timeComment("population standard deviation over the valid time steps of the column"),
	}, relMap(func(m stats.Moments) float64 { return m.Std() }))

	return out
}

// pressureCoordName names the scalar pressure coordinate of a single-level
// quantity, e.g. p700 for 70000 Pa.
func pressureCoordName(pa float64) string {
	return "p" + strconv.FormatFloat(pa/100, 'g', -1, 64)
}

// cfGrid converts the analysis grid for cfwrite, whose bounds run in the
// direction of the centres.
func (c *checked) cfGrid() cfwrite.Grid {
	g := c.meta.Grid
	dir := func(centres []float64, b [][2]float64) [][2]float64 {
		out := make([][2]float64, len(b))
		desc := len(centres) > 1 && centres[1] < centres[0]
		for i, p := range b {
			lo, hi := math.Min(p[0], p[1]), math.Max(p[0], p[1])
			if desc {
				lo, hi = hi, lo
			}
			out[i] = [2]float64{lo, hi}
		}
		return out
	}
	return cfwrite.Grid{
		Lat: append([]float64(nil), g.Lat...), Lon: append([]float64(nil), g.Lon...),
		LatBounds: dir(g.Lat, g.LatBounds), LonBounds: dir(g.Lon, g.LonBounds),
	}
}

// globalAttrs are the provenance attributes of both NetCDF files. Numbers
// are typed; the units of a number attribute x are in x_units.
func (c *checked) globalAttrs(notes []string) map[string]any {
	m := c.meta
	a := map[string]any{
		"dataset":                          m.Dataset,
		"lidscope_version":                 m.Version,
		vocab.StudyHash:                    m.StudyHash,
		vocab.Conventions:                  m.MetricsConventions,
		"period":                           c.period(),
		vocab.TimeSteps:                    len(c.acc.Series),
		vocab.SamplingFrequency:            m.StepsPerYear,
		vocab.SamplingFrequency + "_units": vocab.UnitPerYear,
		vocab.RegimeIndex:                  regimeIndexText(),
	}
	for k, v := range m.Regimes.Attributes() {
		a[k] = v
	}
	if len(m.Inputs) > 0 {
		var b strings.Builder
		for i, f := range m.Inputs {
			if i > 0 {
				b.WriteByte('\n')
			}
			fmt.Fprintf(&b, "%s: %s (%d bytes, sha256 %s)", f.Role, f.Path, f.Size, f.SHA256)
		}
		a[vocab.Files] = b.String()
	}
	if len(notes) > 0 {
		a["processing_notes"] = strings.Join(notes, "\n")
	}
	a["quantities"] = strings.Join(c.acc.L.Quantities, " ")
	if m.Climatology {
		a[vocab.TimeAxisNote] = TimeAxisClimatology
	}
	if len(m.Absent) > 0 {
		a["absent_quantities"] = strings.Join(m.Absent, "\n")
	}
	for k, v := range a {
		if v == "" {
			delete(a, k)
		}
	}
	return a
}

func regimeIndexText() string {
	var parts []string
	for k, r := range regimes.All {
		parts = append(parts, fmt.Sprintf("%d = %s", k, r))
	}
	return strings.Join(parts, ", ")
}

// period is Meta.Period, or the first and last step labels.
func (c *checked) period() string {
	if c.meta.Period != "" {
		return c.meta.Period
	}
	s := c.acc.Series
	return s[0].Label + " … " + s[len(s)-1].Label
}

func (c *checked) fileOptions(what string, notes []string) cfwrite.Options {
	m := c.meta
	title := m.Title
	if title == "" {
		title = "lidscope regime statistics"
		if m.Dataset != "" {
			title += ": " + m.Dataset
		}
	}
	src := "lidscope"
	if m.Version != "" {
		src += " " + m.Version
	}
	return cfwrite.Options{
		Title:      title + " (" + what + ")",
		Source:     src,
		Command:    commandArgs(m.Command),
		Created:    m.End,
		Attributes: c.globalAttrs(notes),
	}
}

// writeMaps writes maps.nc at path.
func (c *checked) writeMaps(path string, notes []string) error {
	w, err := cfwrite.Create(path, c.fileOptions("per-column maps over the record", notes))
	if err != nil {
		return err
	}
	defer w.Abort()
	if err := w.SetGrid(c.cfGrid()); err != nil {
		return err
	}
	value, lo, hi, bounded, _ := c.periodAxis()
	if err := w.SetTime(cfwrite.TimeAxis{Units: c.meta.TimeUnits, Calendar: c.meta.Calendar, Bounds: bounded}); err != nil {
		return err
	}
	if err := w.AddCategories(regimeCategories()); err != nil {
		return err
	}
	var levels []float64
	for _, q := range c.qs {
		if q.PressurePa > 0 {
			levels = append(levels, q.PressurePa)
		}
	}
	sort.Float64s(levels)
	for i, pa := range levels {
		if i > 0 && pa == levels[i-1] {
			continue
		}
		if err := w.AddScalarCoord(cfwrite.PressureCoord(pressureCoordName(pa), pa)); err != nil {
			return err
		}
	}
	vars := c.mapVars()
	handles := make([]*cfwrite.Var, len(vars))
	for k, v := range vars {
		if handles[k], err = w.AddVar(v.spec); err != nil {
			return err
		}
	}
	var step int
	if bounded {
		step, err = w.AppendTimeBounded(value, lo, hi)
	} else {
		step, err = w.AppendTime(value)
	}
	if err != nil {
		return err
	}
	for k, v := range vars {
		if err := handles[k].WriteStep(step, v.values()); err != nil {
			return err
		}
	}
	return w.Close()
}
