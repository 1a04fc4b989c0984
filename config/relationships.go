package config

import (
	"lidscope/vocab"
	"math"
	"slices"
	"strconv"
	"strings"

	"lidscope/accumulate"
	"lidscope/cf"
	"lidscope/relations"
	"lidscope/units"
)

// AnalysisCloud is the response name that stands for each dataset's
// analysis cloud (Dataset.Cloud: low_cloud or cloud), so that one list of
// responses fits datasets whose cloud comes from different roles.
const AnalysisCloud = "analysis_cloud"

// Limits of the relationships section. They guard against mistakes (a
// width in the wrong units, a seed that a JSON reader would round), not
// against choices.
const (
	MaxBinsPerPredictor = 10000   // bins of one predictor
	MaxDeltaT           = 50.0    // |ΔT|, K (as relations.Config.Validate)
	MaxReplicates       = 100000  // bootstrap replicates (as relations.Config.Validate)
	MaxThresholdBins    = 100000  // relative-SST bins of the threshold fit (as relations.Config.Validate)
	MaxSeed             = 1 << 53 // largest seed every format reads exactly
	// MaxDecorrelationLength is half the Earth's circumference, m.
	MaxDecorrelationLength = 2.0e7
)

// responseRoles are the roles that may be responses: those the pipeline
// reads as further quantities when a dataset gives them, named in the
// run by their role.
var responseRoles = []cf.Role{cf.RoleLowCloud, cf.RoleCloud, cf.RoleSWUp, cf.RoleOLR, cf.RolePrecip, cf.RoleOmega}

// indicatorRoles maps the convection indicators to the roles that give them.
var indicatorRoles = map[string]cf.Role{
	relations.IndicatorOmega:  cf.RoleOmega,
	relations.IndicatorPrecip: cf.RolePrecip,
	relations.IndicatorOLR:    cf.RoleOLR,
}

// Plausible indicator thresholds (SI): outside these a value is a units
// mistake. |omega500| < 1 Pa s-1 (864 hPa d-1); 0 < OLR ≤ 500 W m-2;
// 0 ≤ precipitation ≤ 0.01 kg m-2 s-1 (864 mm d-1).
var indicatorRange = map[string][2]float64{
	relations.IndicatorOmega:  {-1, 1},
	relations.IndicatorPrecip: {0, 0.01},
	relations.IndicatorOLR:    {0, 500},
}

// relKeys names relations.Config fields by their study keys in messages.
var relKeys = strings.NewReplacer(
	"Config.Mode", "mode (Config.Mode)",
	"Config.Detrend", "detrend (Config.Detrend)",
	"Config.Bins", "bins (Config.Bins)",
	"Config.Responses", "responses (Config.Responses)",
	"Config.DeltaT", "delta_t (Config.DeltaT)",
	"Config.Bootstrap.N", "bootstrap.replicates (Config.Bootstrap.N)",
	"Config.Bootstrap.BlockLength", "bootstrap.block_length (Config.Bootstrap.BlockLength)",
	"Config.IndicatorThreshold", "threshold.value (Config.IndicatorThreshold)",
	"Config.Indicator", "threshold.indicator (Config.Indicator)",
	"Config.ThresholdReplicates", "threshold.replicates (Config.ThresholdReplicates)",
	"Config.ThresholdBinWidth", "threshold.bin_width (Config.ThresholdBinWidth)",
	"ThresholdRange", "threshold.range (ThresholdRange)",
	"Config.Partial", "partial (Config.Partial)",
	"Config.DecorrelationLength", "decorrelation_length (Config.DecorrelationLength)",
	"Config.Classifier", "analysis.threshold/transition (Config.Classifier)",
)

// relationships decodes the relationships section into r.Relations and
// each dataset's RelationResponses. It runs after the datasets, whose
// inputs decide which responses, indicators and predictors are available.
func (d *decoder) relationships(m map[string]any, r *Study) {
	const P = "relationships"
	r.RelationsOff = !d.boolean(m, P, "enabled", true)
	c := relations.Defaults()
	c.Classifier = r.Analysis.Classifier()
	c.Regimes = r.Analysis.Regimes()
	for _, rg := range r.Analysis.Regions {
		c.Regions = append(c.Regions, accumulate.Region{Name: rg.Name, South: rg.South, North: rg.North, West: rg.West, East: rg.East})
	}
	if s, set := d.choice(m, P, "mode", c.Mode.String(), relations.Climatological.String(), relations.Anomaly.String()); set {
		if mode, err := relations.ParseMode(s); err == nil {
			c.Mode = mode
		}
	}
	c.Detrend = d.boolean(m, P, "detrend", false)
	if c.Detrend && c.Mode != relations.Anomaly {
		d.fail(join(P, "detrend"), "detrend removes a linear trend from the anomalies, so it needs mode: anomaly (mode is %s); set mode: anomaly or remove detrend", c.Mode)
	}
	c.Bins = d.bins(m, P, r)
	d.responses(m, P, r, &c)
	c.Seasons = d.boolean(m, P, "seasons", false)
	for _, b := range d.boxes(m, P, "patches", "patch") {
		c.Patches = append(c.Patches, relations.Patch(b))
	}
	if dt, set := d.numList(m, P, "delta_t"); set {
		seen := map[float64]bool{}
		c.DeltaT = nil
		for i, x := range dt {
			p := join(P, "delta_t") + "." + strconv.Itoa(i)
			switch {
			case x == 0:
				d.fail(p, "ΔT = 0 K perturbs nothing; give non-zero SST changes, K (default ±1, ±2, ±3, ±4)")
			case math.Abs(x) > MaxDeltaT:
				d.fail(p, "ΔT = %v K is beyond ±%v K; give SST changes in K", x, MaxDeltaT)
			case seen[x]:
				d.fail(p, "ΔT = %v K is listed twice", x)
			default:
				seen[x] = true
				c.DeltaT = append(c.DeltaT, x)
			}
		}
	}

	bp := join(P, "bootstrap")
	bs := sub(m, "bootstrap")
	c.Bootstrap.N = d.integer(bs, bp, "replicates", c.Bootstrap.N, 0, MaxReplicates, "0 = no bootstrap")
	c.Bootstrap.BlockLength = d.integer(bs, bp, "block_length", c.Bootstrap.BlockLength, 1, math.MaxInt32, "time steps")
	c.Bootstrap.Seed = uint64(d.integer(bs, bp, "seed", int(c.Bootstrap.Seed), 0, MaxSeed, "any whole number; recorded"))

	d.threshold(sub(m, "threshold"), join(P, "threshold"), r, &c)

	c.OmegaBins = d.boolean(m, P, "omega_regimes", false)
	if c.OmegaBins {
		d.needRole(r, join(P, "omega_regimes"), cf.RoleOmega, "the omega500 regimes composite by omega")
	}
	if v, ok := present(m, "decorrelation_length"); ok {
		p := join(P, "decorrelation_length")
		L, err := quantity(units.Length, v)
		switch {
		case err != nil:
			d.fail(p, "give a length with units (e.g. 1000km; a bare number is m): %v", err)
		case L < 0 || L > MaxDecorrelationLength:
			d.fail(p, "%v m is not a decorrelation length: give 0 (every cell independent) to %v km, with units (e.g. 1000km; a bare number is m)", L, MaxDecorrelationLength/1000)
		default:
			c.DecorrelationLength = L
		}
	}
	if ws, set := d.words(m, P, "partial"); set {
		p := join(P, "partial")
		ok := len(ws) == 2
		if !ok {
			d.fail(p, "give the two predictors of the partial regression, e.g. [eis, sst], not %d", len(ws))
		}
		for i, w := range ws {
			if !d.predictor(r, p+"."+strconv.Itoa(i), w) {
				ok = false
			}
		}
		if ok && ws[0] == ws[1] {
			d.fail(p, "the two predictors must differ (both are %s)", ws[0])
			ok = false
		}
		if ok {
			c.Partial = [2]string{ws[0], ws[1]}
		}
	}
	r.Relations = c

	// relations.Config.Validate is the final word; it is asked only when
	// nothing else is wrong, so it never repeats a problem named above.
	if len(d.probs) > 0 {
		return
	}
	for i := range r.Datasets {
		if err := r.RelationsFor(&r.Datasets[i]).Validate(); err != nil {
			d.fail(P, "%s", relKeys.Replace(err.Error()))
			return
		}
	}
}

// integer reads a whole number in [lo, hi] (a string holding one is
// accepted); unit is said in messages.
func (d *decoder) integer(m map[string]any, path, k string, def, lo, hi int, unit string) int {
	v, ok := present(m, k)
	if !ok {
		return def
	}
	var n int64
	good := false
	switch t := v.(type) {
	case int:
		n, good = int64(t), true
	case int64:
		n, good = t, true
	case uint64:
		n, good = int64(t), t <= math.MaxInt64
	case string:
		var err error
		n, err = strconv.ParseInt(strings.TrimSpace(t), 10, 64)
		good = err == nil
	default:
		if f, isNum := toFloat(v); isNum && f == math.Trunc(f) && math.Abs(f) <= MaxSeed {
			n, good = int64(f), true
		}
	}
	if !good {
		d.fail(join(path, k), "must be a whole number (%s), not %s", unit, describe(v))
		return def
	}
	if n < int64(lo) || n > int64(hi) {
		d.fail(join(path, k), "%d is out of range: give %d to %d (%s)", n, lo, hi, unit)
		return def
	}
	return int(n)
}

// words reads a name or a list of names (a comma-separated text too, as
// flags and environment variables give lists).
func (d *decoder) words(m map[string]any, path, k string) ([]string, bool) {
	v, ok := present(m, k)
	if !ok {
		return nil, false
	}
	p := join(path, k)
	var items []any
	switch t := v.(type) {
	case []any:
		items = t
	case string:
		for _, s := range strings.Split(t, ",") {
			items = append(items, s)
		}
	default:
		d.fail(p, "must be a name or a list of names, not %s", describe(v))
		return nil, true
	}
	if len(items) == 0 {
		d.fail(p, "is an empty list: give at least one name, or remove the key for the default")
		return nil, true
	}
	var out []string
	for i, x := range items {
		s, isStr := x.(string)
		s = strings.TrimSpace(s)
		if !isStr || s == "" {
			d.fail(join(p, strconv.Itoa(i)), "must be a name, not %s", describe(x))
			continue
		}
		out = append(out, s)
	}
	return out, true
}

// predictor checks a predictor name and that every dataset has it.
func (d *decoder) predictor(r *Study, path, name string) bool {
	if !slices.Contains(predictorNames, name) {
		d.fail(path, "%q is not a predictor; %s", name, suggest(name, predictorNames))
		return false
	}
	if q, ok := vocab.Lookup(name); ok && q.Enabled != nil {
		for _, ds := range r.Datasets {
			if !q.IsEnabled(ds.Metrics) {
				d.fail(path, "%s is computed only with %s: true, and dataset %q does not compute it; set it in every dataset or choose another predictor", name, q.Switch, ds.Name)
				return false
			}
		}
	}
	return true
}

// bins reads the bins table: predictor → a list of edges or {min, max,
// width}. Nil when the study has none (relations.DefaultBins of the mode).
func (d *decoder) bins(m map[string]any, path string, r *Study) map[string][]float64 {
	t, ok := m["bins"].(map[string]any)
	if !ok {
		return nil // absent, or the wrong shape (checkKeys reported it)
	}
	out := map[string][]float64{}
	bad := false
	for _, name := range sortedKeys(t) {
		if t[name] == nil || !slices.Contains(predictorNames, name) {
			continue // "eis:" alone is no key; unknown names were reported
		}
		pp := join(path, "bins."+name)
		if !d.predictor(r, pp, name) {
			bad = true
			continue
		}
		var e []float64
		switch v := t[name].(type) {
		case []any, string, float64, int, int64:
			before := len(d.probs)
			if e, _ = d.numList(t, join(path, "bins"), name); len(d.probs) > before || e == nil {
				bad = true
				continue
			}
			if len(e) < 2 {
				d.fail(pp, "has %d edge(s); give at least 2 increasing edges, K, or {min, max, width}", len(e))
				bad = true
				continue
			}
			for i := 1; i < len(e); i++ {
				if !(e[i] > e[i-1]) {
					d.fail(pp+"."+strconv.Itoa(i), "edges must increase: %v K after %v K", e[i], e[i-1])
					bad = true
					e = nil
					break
				}
			}
			if e == nil {
				continue
			}
		case map[string]any:
			lo, loSet := d.num(v, pp, "min", 0)
			hi, hiSet := d.num(v, pp, "max", 0)
			w, wSet := d.num(v, pp, "width", 0)
			if !loSet || !hiSet || !wSet {
				d.fail(pp, "give all of min, max and width (K), or a list of edges")
				bad = true
				continue
			}
			n := (hi - lo) / w
			switch {
			case !(w > 0):
				d.fail(join(pp, "width"), "the bin width must be > 0 K, not %v", w)
			case !(hi > lo):
				d.fail(pp, "max (%v K) must be greater than min (%v K)", hi, lo)
			case n > MaxBinsPerPredictor:
				d.fail(join(pp, "width"), "%v K makes %.0f bins over %v…%v K, more than %d; use a wider bin", w, n, lo, hi, MaxBinsPerPredictor)
			case math.Abs(n-math.Round(n)) > 1e-9*math.Max(1, n):
				d.fail(join(pp, "width"), "%v K does not divide max − min = %v K into whole bins; adjust min, max or width, or list the edges", w, hi-lo)
			default:
				k := int(math.Round(n))
				e = make([]float64, k+1)
				for i := range e {
					e[i] = lo + float64(i)*w // no accumulation, as relations.DefaultBins
				}
				e[k] = hi
			}
			if e == nil {
				bad = true
				continue
			}
		default:
			d.fail(pp, "must be a list of bin edges (K) or a table {min, max, width}, not %s", describe(v))
			bad = true
			continue
		}
		if len(e)-1 > MaxBinsPerPredictor {
			d.fail(pp, "has %d bins, more than %d", len(e)-1, MaxBinsPerPredictor)
			bad = true
			continue
		}
		out[name] = e
	}
	if len(out) == 0 && !bad {
		return nil // an empty table is no table (as a file reader gives it): the defaults
	}
	return out
}

// responses reads the responses and resolves them for every dataset
// (Dataset.RelationResponses): the default is the dataset's analysis cloud
// plus toa_sw_up when the dataset names a toa_sw_up input.
func (d *decoder) responses(m map[string]any, path string, r *Study, c *relations.Config) {
	p := join(path, "responses")
	ws, set := d.words(m, path, "responses")
	valid := []string{AnalysisCloud}
	for _, x := range responseRoles {
		valid = append(valid, string(x))
	}
	var names []string
	seen := map[string]bool{}
	for i, w := range ws {
		pi := p + "." + strconv.Itoa(i)
		switch {
		case slices.Contains(predictorNames, w):
			d.fail(pi, "%s is a predictor (binned, in K); responses are %s", w, strings.Join(valid, ", "))
		case !slices.Contains(valid, w):
			d.fail(pi, "%q is not a response; %s", w, suggest(w, valid))
		case seen[w]:
			d.fail(pi, "%s is listed twice", w)
		default:
			seen[w] = true
			names = append(names, w)
		}
	}
	if set && len(names) > 0 {
		c.Responses = names
	}
	for i := range r.Datasets {
		ds := &r.Datasets[i]
		if ds.Cloud == "" {
			continue // the dataset's cloud problem is reported already
		}
		ds.RelationResponses = nil
		if !set {
			ds.RelationResponses = []string{string(ds.Cloud)}
			if ds.hasPattern(cf.RoleSWUp) {
				ds.RelationResponses = append(ds.RelationResponses, string(cf.RoleSWUp))
			}
			continue
		}
		for j, w := range ws {
			if !slices.Contains(names, w) {
				continue
			}
			role := cf.Role(w)
			if w == AnalysisCloud {
				role = ds.Cloud
			}
			if role != ds.Cloud && !ds.hasPattern(role) && !ds.hasPattern(allKey) {
				pj := p + "." + strconv.Itoa(j)
				switch {
				case role == cf.RoleCloud && ds.Cloud == cf.RoleLowCloud, role == cf.RoleLowCloud && ds.Cloud == cf.RoleCloud:
					d.fail(pj, "%s is the %s, but dataset %q has no %s input: its analysis cloud is %s. Write %s, or %s for each dataset's analysis cloud", role, cloudWords[role], ds.Name, role, ds.Cloud, ds.Cloud, AnalysisCloud)
				default:
					d.fail(pj, "dataset %q has no %s input (files.%s); a response must be read in every dataset: give one, or remove %s", ds.Name, role, role, w)
				}
				continue
			}
			if !slices.Contains(ds.RelationResponses, string(role)) {
				ds.RelationResponses = append(ds.RelationResponses, string(role))
			}
		}
	}
}

var cloudWords = map[cf.Role]string{cf.RoleCloud: "total cloud cover (role cloud)", cf.RoleLowCloud: "low cloud cover (role low_cloud)"}

// needRole checks that every dataset reads role (an input of that role,
// or files.any, from which it is then read).
func (d *decoder) needRole(r *Study, path string, role cf.Role, why string) {
	for _, ds := range r.Datasets {
		if !ds.hasPattern(role) && !ds.hasPattern(allKey) {
			d.fail(path, "%s, so every dataset needs an %s input; dataset %q has none (files.%s)", why, role, ds.Name, role)
		}
	}
}

// threshold reads the convection-threshold estimation.
func (d *decoder) threshold(m map[string]any, path string, r *Study, c *relations.Config) {
	ind := d.str(m, path, "indicator", "")
	if ind == "none" {
		ind = ""
	}
	choices := []string{relations.IndicatorOmega, relations.IndicatorPrecip, relations.IndicatorOLR}
	if ind != "" && !slices.Contains(choices, ind) {
		d.fail(join(path, "indicator"), "%q is not a convection indicator: use omega, precipitation, olr, or \"\" (none); %s", ind, suggest(ind, choices))
		ind = ""
	}
	c.Indicator = ind
	if ind != "" {
		d.needRole(r, join(path, "indicator"), indicatorRoles[ind], "the threshold is estimated from "+ind)
	}
	for _, k := range []string{"value", "bin_width", "replicates", "range"} {
		if _, set := present(m, k); set && ind == "" {
			d.fail(join(path, k), "is used only with threshold.indicator (omega, precipitation or olr), which is not set; set it or remove %s", k)
		}
	}
	if ind == "" {
		return
	}
	if v, ok := present(m, "value"); ok {
		p := join(path, "value")
		kind, _ := cf.KindOf(indicatorRoles[ind])
		x, err := quantity(kind, v)
		lim := indicatorRange[ind]
		switch {
		case err != nil:
			d.fail(p, "give the %s threshold with units (e.g. %q; a bare number is %s), or remove it for the default: %v", ind, example(ind), kind.SI(), err)
		case x < lim[0] || x > lim[1] || ind == relations.IndicatorOLR && x == 0:
			d.fail(p, "%v %s is not a plausible %s threshold (%v…%v %s); is it in other units? write them, e.g. %q", x, kind.SI(), ind, lim[0], lim[1], kind.SI(), example(ind))
		default:
			c.IndicatorThreshold = x
		}
	}
	if w, set := d.num(m, path, "bin_width", c.ThresholdBinWidth); set {
		if !(w > 0) || w > 1 {
			d.fail(join(path, "bin_width"), "the relative-SST bin of the logistic fit must be > 0 and at most 1 K, not %v K (default %v K)", w, relations.Defaults().ThresholdBinWidth)
		} else {
			c.ThresholdBinWidth = w
		}
	}
	c.ThresholdReplicates = d.integer(m, path, "replicates", c.ThresholdReplicates, 0, MaxReplicates, "0 = no interval")
	if rg, set := d.numList(m, path, "range"); set && rg != nil {
		p := join(path, "range")
		switch {
		case len(rg) != 2:
			d.fail(p, "give [lowest, highest] relative SST, K (default [%v, %v])", relations.Defaults().ThresholdRange[0], relations.Defaults().ThresholdRange[1])
		case !(rg[1] > rg[0]):
			d.fail(p, "the highest relative SST (%v K) must exceed the lowest (%v K)", rg[1], rg[0])
		case math.Abs(rg[0]) > MaxDeltaT || math.Abs(rg[1]) > MaxDeltaT:
			d.fail(p, "relative SST of %v…%v K: give K within ±%v", rg[0], rg[1], MaxDeltaT)
		default:
			c.ThresholdRange = [2]float64{rg[0], rg[1]}
		}
	}
	if n := (c.ThresholdRange[1] - c.ThresholdRange[0]) / c.ThresholdBinWidth; n > MaxThresholdBins {
		d.fail(join(path, "bin_width"), "%v K bins over %v…%v K are %.0f bins, more than %d; use a wider bin or a narrower range", c.ThresholdBinWidth, c.ThresholdRange[0], c.ThresholdRange[1], n, MaxThresholdBins)
	}
}

func example(ind string) string {
	switch ind {
	case relations.IndicatorOmega:
		return "-10 hPa day-1"
	case relations.IndicatorPrecip:
		return "5 mm day-1"
	}
	return "240 W m-2"
}

// RelationsFor returns the relationship analysis of dataset d: the
// shared Relations with the responses resolved for d (RelationResponses:
// analysis_cloud replaced by d.Cloud; by default d.Cloud plus toa_sw_up
// when d names a toa_sw_up input). The slices and map are copies.
func (r *Study) RelationsFor(d *Dataset) relations.Config {
	c := r.Relations
	if c.Bins != nil {
		c.Bins = make(map[string][]float64, len(r.Relations.Bins))
		for k, e := range r.Relations.Bins {
			c.Bins[k] = append([]float64(nil), e...)
		}
	}
	c.Regions = append([]accumulate.Region(nil), c.Regions...)
	c.Patches = append([]relations.Patch(nil), c.Patches...)
	c.DeltaT = append([]float64(nil), c.DeltaT...)
	c.Responses = nil
	if len(d.RelationResponses) > 0 {
		c.Responses = append([]string(nil), d.RelationResponses...)
	}
	return c
}
