package output

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"strconv"

	"lidscope/internal/cfwrite"
	"lidscope/regimes"
	"lidscope/vocab"
)

// bandComment describes the averaging area of the band series.
func (c *checked) bandComment(what string) string {
	return fmt.Sprintf("area: mean where sea (comment: %s over the valid ocean cells between %s and %s degrees_north, weighted by their area inside the band)",
		what, formatFloat(c.meta.Regimes.Band.South), formatFloat(c.meta.Regimes.Band.North))
}

// writeSeriesNC writes series.nc at path.
func (c *checked) writeSeriesNC(path string, notes []string) error {
	m := c.meta
	w, err := cfwrite.Create(path, c.fileOptions("time series over the tropical band", notes))
	if err != nil {
		return err
	}
	defer w.Abort()
	bounded := m.TimeBounds != nil
	if err := w.SetTime(cfwrite.TimeAxis{Units: m.TimeUnits, Calendar: m.Calendar, Bounds: bounded}); err != nil {
		return err
	}
	if err := w.AddCategories(regimeCategories()); err != nil {
		return err
	}
	tr := []string{cfwrite.DimTime, regimeDim}
	sst, err := w.AddVar(cfwrite.VarSpec{
		Name: vocab.TropicalMeanSST, Dims: []string{cfwrite.DimTime}, Type: cfwrite.Float64, Units: "K",
		StandardName: "sea_surface_temperature", LongName: "tropical-mean sea surface temperature",
		CellMethods: c.bandComment("SST"),
	})
	if err != nil {
		return err
	}
	af, err := w.AddVar(cfwrite.VarSpec{
		Name: vocab.AreaFraction, Dims: tr, Units: "1",
		LongName:    "fraction of the band's valid ocean area in each regime",
		CellMethods: c.bandComment("regime indicator"),
	})
	if err != nil {
		return err
	}
	bm := make([]*cfwrite.Var, len(c.qs))
	for qi, name := range c.acc.L.Quantities {
		q := c.qs[qi]
		coord := ""
		if q.PressurePa > 0 {
			coord = pressureCoordName(q.PressurePa)
			if qi == firstWithPressure(c.qs, q.PressurePa) {
				if err := w.AddScalarCoord(cfwrite.PressureCoord(coord, q.PressurePa)); err != nil {
					return err
				}
			}
		}
		bm[qi], err = w.AddVar(cfwrite.VarSpec{
			Name: name + "_" + vocab.BandMean, Dims: tr, Units: q.Units,
			LongName: q.LongName, StandardName: q.StandardName,
			CellMethods: c.bandComment(name + " in the regime given by the regime coordinate"),
			Coordinates: coord,
		})
		if err != nil {
			return err
		}
	}
	for t := range c.acc.Series {
		if bounded {
			_, err = w.AppendTimeBounded(m.TimeValues[t], m.TimeBounds[t][0], m.TimeBounds[t][1])
		} else {
			_, err = w.AppendTime(m.TimeValues[t])
		}
		if err != nil {
			return err
		}
	}
	nt, nr := len(c.acc.Series), len(regimes.All)
	ts := make([]float64, nt)
	fr := make([]float64, nt*nr)
	for t, p := range c.acc.Series {
		ts[t] = p.TropMean
		for k, r := range regimes.All {
			fr[t*nr+k] = p.AreaFraction[r]
		}
	}
	if err := sst.Write(ts); err != nil {
		return err
	}
	if err := af.Write(fr); err != nil {
		return err
	}
	for qi := range c.qs {
		d := make([]float64, nt*nr)
		for t, p := range c.acc.Series {
			for k, r := range regimes.All {
				d[t*nr+k] = p.Means[qi][r]
			}
		}
		if err := bm[qi].Write(d); err != nil {
			return err
		}
	}
	return w.Close()
}

func firstWithPressure(qs []quantity, pa float64) int {
	for i, q := range qs {
		if q.PressurePa == pa {
			return i
		}
	}
	return -1
}

// csvHeader is "name [units]".
func csvHeader(name, units string) string { return name + " [" + units + "]" }

// seriesCSV returns series.csv: one row per time step.
func (c *checked) seriesCSV() ([]byte, error) {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	head := []string{"label", "year", "month", csvHeader("time", c.meta.TimeUnits), "date", csvHeader(vocab.TropicalMeanSST, vocab.UnitKelvin)}
	for _, r := range regimes.All {
		head = append(head, csvHeader(r.String()+"_"+vocab.AreaFraction, vocab.UnitOne))
	}
	for qi, name := range c.acc.L.Quantities {
		for _, r := range regimes.All {
			head = append(head, csvHeader(r.String()+"_"+name+"_"+vocab.BandMean, c.qs[qi].Units))
		}
	}
	if err := w.Write(head); err != nil {
		return nil, err
	}
	for t, p := range c.acc.Series {
		row := []string{p.Label, strconv.Itoa(p.Year), strconv.Itoa(p.Month), formatFloat(c.meta.TimeValues[t]), c.dates[t].String(), formatFloat(p.TropMean)}
		for _, r := range regimes.All {
			row = append(row, formatFloat(p.AreaFraction[r]))
		}
		for qi := range c.qs {
			for _, r := range regimes.All {
				row = append(row, formatFloat(p.Means[qi][r]))
			}
		}
		if err := w.Write(row); err != nil {
			return nil, err
		}
	}
	w.Flush()
	return b.Bytes(), w.Error()
}
