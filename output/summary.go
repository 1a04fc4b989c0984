package output

import (
	"math"

	"lidscope/accumulate"
	"lidscope/internal/jsonnum"
	"lidscope/regimes"
	"lidscope/stats"
)

// Format names and versions of the JSON files, so that readers can check
// what they parse. Version 2 names the configuration a study (study_hash,
// study, metrics_conventions), where version 1 used an earlier word;
// version 3 uses the one table of names (package vocab); version 4 names
// what a run was made from as the study does and in one way in every file
// (provenance.json: conventions, files, study and study_hash, time for the
// time coordinate; the NetCDF files: conventions and files), where version
// 3 had metrics_conventions, inputs (input_files), study {text, hash} and
// time_axis.
const (
	SummaryFormat    = "lidscope-summary"
	ProvenanceFormat = "lidscope-provenance"
	FormatVersion    = 4
)

type summary struct {
	Format          string                        `json:"format"`
	FormatVersion   int                           `json:"format_version"`
	Dataset         string                        `json:"dataset"`
	Title           string                        `json:"title"`
	LidscopeVersion string                        `json:"lidscope_version"`
	StudyHash       string                        `json:"study_hash"`
	Period          sumPeriod                     `json:"period"`
	Regime          sumRegime                     `json:"regime_definition"`
	AreaFraction    map[string]meanStd            `json:"area_fraction"`
	TropicalMeanSST meanStd                       `json:"tropical_mean_sst"`
	RegimeMeans     map[string]map[string]meanStd `json:"band_mean"`
	Crossings       sumCrossings                  `json:"crossing_rate"`
	Regions         []sumRegion                   `json:"regions"`
	Notes           []string                      `json:"notes"`
	// Quantities are those the run has (every per-quantity table uses
	// them); Absent says what it lacks for want of an optional input.
	Quantities []string `json:"quantities"`
	Absent     []string `json:"absent_quantities"`
}

type sumStep struct {
	Label string `json:"label"`
	Date  string `json:"date"`
	Time  num    `json:"time"`
}

type sumPeriod struct {
	Label        string  `json:"label"`
	First        sumStep `json:"first"`
	Last         sumStep `json:"last"`
	Steps        num     `json:"time_steps"`
	StepsPerYear num     `json:"sampling_frequency"`
	Calendar     string  `json:"calendar"`
}

type sumBand struct {
	South num `json:"south"`
	North num `json:"north"`
}

type sumRegime struct {
	Text       string  `json:"text"`
	Rule       string  `json:"rule"`
	Delta      num     `json:"delta"`
	Percentile num     `json:"percentile"`
	HalfWidth  num     `json:"half_width"`
	Band       sumBand `json:"band"`
	Index      string  `json:"regime_index"`
}

type sumCrossings struct {
	Mean  num `json:"mean"`
	Cells num `json:"cells"`
}

type sumBox struct {
	South num `json:"south"`
	North num `json:"north"`
	West  num `json:"west"`
	East  num `json:"east"`
}

type sumRegionRegime struct {
	AreaTimeShare num                `json:"area_time_fraction"`
	Quantities    map[string]meanStd `json:"quantities"`
}

type sumRegion struct {
	Name    string                     `json:"name"`
	Box     sumBox                     `json:"box"`
	RelSST  meanStd                    `json:"rel_sst"`
	Regimes map[string]sumRegionRegime `json:"regimes"`
}

// momentsOf returns the mean, population standard deviation and size of m.
func momentsOf(m stats.Moments, units string) meanStd {
	return meanStd{Mean: num{Value: m.MeanOrNaN(), Units: units}, Std: num{Value: m.Std(), Units: units}, N: jsonnum.Count(m.N)}
}

// seriesStats is the mean and population standard deviation over the time
// steps with a value (NaN steps, where the band had no valid ocean, left out).
func seriesStats(x []float64, units string) meanStd {
	var m stats.Moments
	for _, v := range x {
		m.Add(v, 1)
	}
	return momentsOf(m, units)
}

// bandRegimeMean merges per-column moments over time into the area-time
// weighted moments over the band: column i's sample gets weight
// bandWeight[i] per step, so the mean is Σ_i Σ_t w_i x_it / Σ_i Σ_t w_i over
// the steps in the regime with a value, the same weighting as the
// per-step band means of series.nc.
func bandRegimeMean(acc *accumulate.Acc, q int, r regimes.Regime) stats.Moments {
	var out stats.Moments
	for i, w := range acc.L.BandWeight {
		if w <= 0 {
			continue
		}
		m := acc.Moments(q, r, i)
		if m.W == 0 {
			continue
		}
		out.Merge(stats.Moments{N: m.N, W: m.W * w, Mean: m.Mean, M2: m.M2 * w})
	}
	return out
}

// crossingsMean is the band-area-weighted mean of crossings per year over
// the columns inside the band that were ever valid ocean, and their number.
func (c *checked) crossingsMean() (float64, int) {
	cpy := c.acc.CrossingsPerYear(c.meta.StepsPerYear)
	var sw, swx float64
	n := 0
	for i, w := range c.acc.L.BandWeight {
		if w <= 0 || math.IsNaN(cpy[i]) {
			continue
		}
		sw += w
		swx += w * cpy[i]
		n++
	}
	if sw == 0 {
		return math.NaN(), 0
	}
	return swx / sw, n
}

func (c *checked) step(t int) sumStep {
	return sumStep{Label: c.acc.Series[t].Label, Date: c.dates[t].String(), Time: num{Value: c.meta.TimeValues[t], Units: c.meta.TimeUnits}}
}

// summary builds summary.json.
func (c *checked) summary(notes []string) summary {
	m := c.meta
	acc := c.acc
	nt := len(acc.Series)
	s := summary{
		Format: SummaryFormat, FormatVersion: FormatVersion,
		Dataset: m.Dataset, Title: m.Title, LidscopeVersion: m.Version, StudyHash: m.StudyHash,
		Period: sumPeriod{
			Label: c.period(), First: c.step(0), Last: c.step(nt - 1),
			Steps: jsonnum.Count(nt), StepsPerYear: num{Value: m.StepsPerYear, Units: "yr-1"}, Calendar: m.Calendar,
		},
		Regime:       c.summaryRegime(),
		AreaFraction: map[string]meanStd{},
		RegimeMeans:  map[string]map[string]meanStd{},
		Notes:        append([]string{}, notes...),
		Regions:      []sumRegion{},
		Quantities:   append([]string{}, acc.L.Quantities...),
		Absent:       append([]string{}, m.Absent...),
	}
	sst := make([]float64, nt)
	for t, p := range acc.Series {
		sst[t] = p.TropMean
	}
	s.TropicalMeanSST = seriesStats(sst, "K")
	for _, r := range regimes.All {
		f := make([]float64, nt)
		for t, p := range acc.Series {
			f[t] = p.AreaFraction[r]
		}
		s.AreaFraction[r.String()] = seriesStats(f, "1")
	}
	for qi, name := range acc.L.Quantities {
		mr := map[string]meanStd{}
		for _, r := range regimes.All {
			mr[r.String()] = momentsOf(bandRegimeMean(acc, qi, r), c.qs[qi].Units)
		}
		s.RegimeMeans[name] = mr
	}
	cm, cn := c.crossingsMean()
	s.Crossings = sumCrossings{Mean: num{Value: cm, Units: "yr-1"}, Cells: jsonnum.Count(cn)}
	for k := range acc.Regions {
		rs := &acc.Regions[k]
		g := rs.Region
		sh := areaTimeShares(rs)
		sr := sumRegion{
			Name:    g.Name,
			Box:     sumBox{South: num{Value: g.South, Units: "degrees_north"}, North: num{Value: g.North, Units: "degrees_north"}, West: num{Value: g.West, Units: "degrees_east"}, East: num{Value: g.East, Units: "degrees_east"}},
			RelSST:  momentsOf(rs.Rel, "K"),
			Regimes: map[string]sumRegionRegime{},
		}
		for _, r := range regimes.All {
			rr := sumRegionRegime{AreaTimeShare: num{Value: sh[r], Units: "1"}, Quantities: map[string]meanStd{}}
			for qi, name := range acc.L.Quantities {
				rr.Quantities[name] = momentsOf(rs.Values[qi][r], c.qs[qi].Units)
			}
			sr.Regimes[r.String()] = rr
		}
		s.Regions = append(s.Regions, sr)
	}
	return s
}
