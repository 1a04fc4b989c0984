package output

import (
	"bytes"
	"encoding/csv"
	"math"
	"strconv"

	"lidscope/accumulate"
	"lidscope/regimes"
	"lidscope/vocab"
)

// areaTimeShares returns each regime's share of a region's valid
// area × time (NaN when the region never had a valid cell).
func areaTimeShares(rs *accumulate.RegionStats) [3]float64 {
	var tot float64
	for _, a := range rs.AreaTime {
		tot += a
	}
	var out [3]float64
	for r, a := range rs.AreaTime {
		out[r] = math.NaN()
		if tot > 0 {
			out[r] = a / tot
		}
	}
	return out
}

// regionsCSV returns regions.csv: one row per region × regime.
func (c *checked) regionsCSV() ([]byte, error) {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	head := []string{"region", "regime",
		csvHeader("south", "degrees_north"), csvHeader("north", "degrees_north"),
		csvHeader("west", "degrees_east"), csvHeader("east", "degrees_east"),
		csvHeader("area_time_fraction", vocab.UnitOne),
		csvHeader(vocab.RelSST+"_"+vocab.Mean, vocab.UnitKelvin), csvHeader(vocab.RelSST+"_"+vocab.Std, vocab.UnitKelvin)}
	for qi, name := range c.acc.L.Quantities {
		u := c.qs[qi].Units
		head = append(head, csvHeader(name+"_"+vocab.Mean, u), csvHeader(name+"_"+vocab.Std, u), csvHeader(name+"_"+vocab.Count, vocab.UnitOne))
	}
	if err := w.Write(head); err != nil {
		return nil, err
	}
	for k := range c.acc.Regions {
		rs := &c.acc.Regions[k]
		sh := areaTimeShares(rs)
		g := rs.Region
		for _, r := range regimes.All {
			row := []string{g.Name, r.String(), formatFloat(g.South), formatFloat(g.North), formatFloat(g.West), formatFloat(g.East),
				formatFloat(sh[r]), formatFloat(rs.Rel.MeanOrNaN()), formatFloat(rs.Rel.Std())}
			for qi := range c.qs {
				m := rs.Values[qi][r]
				row = append(row, formatFloat(m.MeanOrNaN()), formatFloat(m.Std()), strconv.FormatInt(m.N, 10))
			}
			if err := w.Write(row); err != nil {
				return nil, err
			}
		}
	}
	w.Flush()
	return b.Bytes(), w.Error()
}
