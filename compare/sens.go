package compare

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"lidscope/regimes"
	"lidscope/relations"
)

// CombinedMethod says how the uncertainty of a difference is made.
//
// The reference and a candidate are independent runs (different data), so
// the variance of the difference of two estimates is the sum of their
// variances, and its standard error is √(s_ref² + s_cand²) (common
// practice: the standard error of a difference of independent estimates).
// Each run gives a 95 % interval of half-width h = q·s (q the Student-t or
// normal quantile it used); the half-width of the difference's interval is
// then √(h_ref² + h_cand²), exact when both runs used the same quantile and
// close to it otherwise (the quantiles differ little at the effective
// sample sizes of a climate record). A difference lies "within" when
// |candidate − reference| ≤ that half-width. Asymmetric intervals (a
// threshold's percentile bootstrap) use half their width.
const CombinedMethod = "difference candidate − reference; combined 95 % half-width √(h_ref² + h_cand²) from each run's 95 % interval half-width h (independent runs: standard errors add in quadrature); within when |difference| ≤ combined half-width"

// Estimate is one estimated quantity (a sensitivity or a threshold) of the
// reference and of a candidate, each with its 95 % interval.
type Estimate struct {
	Name        string // e.g. low_cloud_on_eis
	Kind        string // "slope", "partial" or "threshold"
	Description string
	Units       string
	Ref, Cand   float64
	RefCI       relations.Interval
	CandCI      relations.Interval
	Diff        float64 // Cand − Ref
	// Combined is the half-width of the 95 % interval of Diff (see
	// CombinedMethod); NaN when either run has no interval.
	Combined float64
	// Within reports |Diff| ≤ Combined (false when Combined is NaN:
	// Tested says whether the test could be made).
	Within bool
	Tested bool
}

// FlipDiff compares the flip fraction of one patch and ΔT.
type FlipDiff struct {
	Patch  string
	DeltaT float64 // K
	// Changed is the fraction of the patch's ocean area × time whose
	// regime changes under the perturbation; ConvChange the change of its
	// convective fraction (after − before).
	RefChanged, CandChanged, DiffChanged float64
	RefConvChange, CandConvChange        float64
	DiffConvChange                       float64
}

// halfWidth is half the width of an interval (NaN when either end is).
func halfWidth(iv relations.Interval) float64 { return (iv.Hi - iv.Lo) / 2 }

// combine fills Diff, Combined, Within and Tested.
func (e *Estimate) combine() {
	e.Diff = e.Cand - e.Ref
	hr, hc := halfWidth(e.RefCI), halfWidth(e.CandCI)
	e.Combined = math.Hypot(hr, hc)
	if math.IsNaN(e.Combined) || math.IsNaN(e.Diff) {
		e.Combined = math.NaN()
		return
	}
	e.Tested = true
	e.Within = math.Abs(e.Diff) <= e.Combined
}

// cloudName is the cloud response of a run: the layout's cloud quantity
// when the relationships have it as a response, else cloud, else low_cloud,
// else the first response.
func cloudName(r Run) string {
	rel := r.Relations
	if rel == nil {
		return ""
	}
	want := []string{}
	if r.Acc != nil && r.Acc.L.Cloud != "" {
		want = append(want, r.Acc.L.Cloud)
	}
	want = append(want, "cloud", "low_cloud")
	for _, w := range want {
		for _, v := range rel.Responses {
			if v.Name == w {
				return w
			}
		}
	}
	if len(rel.Responses) > 0 {
		return rel.Responses[0].Name
	}
	return ""
}

// ownEstimates are a run's sensitivities and thresholds (in Ref, RefCI):
// over the tropical band, the whole record (season "all") and the
// subsidence regime, the slopes of the cloud response on EIS and on LTS,
// each coefficient of the two-predictor partial regressions of the cloud
// response, and the estimated convection threshold (relative and
// absolute SST) when the run has one.
func ownEstimates(r Run) []Estimate {
	rel := r.Relations
	if rel == nil {
		return nil
	}
	cloud := cloudName(r)
	var out []Estimate
	pick := func(g relations.Regression) bool {
		return g.Domain == relations.BandDomain && g.Season == "all" && g.Regime == regimes.Subsidence && g.Response == cloud
	}
	for _, pred := range []string{"eis", "lts"} {
		for _, g := range rel.Regressions {
			if pick(g) && g.Predictor == pred {
				out = append(out, Estimate{Name: cloud + "_on_" + pred, Kind: "slope", Units: g.SlopeUnits,
					Description: fmt.Sprintf("slope of %s on %s, subsidence regime, tropical band, whole record (%s)", cloud, strings.ToUpper(pred), rel.Mode),
					Ref:         g.Slope, RefCI: g.SlopeCI})
			}
		}
	}
	for _, p := range rel.Partials {
		if p.Domain != relations.BandDomain || p.Season != "all" || p.Regime != regimes.Subsidence || p.Response != cloud {
			continue
		}
		for k := 0; k < 2; k++ {
			out = append(out, Estimate{Name: fmt.Sprintf("%s_partial_%s_given_%s", cloud, p.Predictors[k], p.Predictors[1-k]), Kind: "partial", Units: p.CoefUnits,
				Description: fmt.Sprintf("partial sensitivity of %s to %s holding %s fixed (two-predictor fit), subsidence regime, tropical band, whole record (%s)", cloud, p.Predictors[k], p.Predictors[1-k], rel.Mode),
				Ref:         p.Coef[k], RefCI: p.CI[k]})
		}
	}
	if t := rel.Threshold; t != nil {
		out = append(out,
			Estimate{Name: "threshold_relative_sst", Kind: "threshold", Units: "K", Ref: t.Rel, RefCI: t.RelCI,
				Description: fmt.Sprintf("relative SST at which %s (%s) becomes more likely than not (logistic fit)", t.Indicator, t.Condition)},
			Estimate{Name: "threshold_absolute_sst", Kind: "threshold", Units: "K", Ref: t.Abs, RefCI: t.AbsCI,
				Description: "the threshold as absolute SST (relative threshold + the record's tropical-mean SST)"})
	}
	return out
}

// estimates pairs the candidate's estimates with the reference's by name,
// in the reference's order; names only one run has are noted.
func estimates(ref, cand []Estimate, refName, candName string) ([]Estimate, []string) {
	byName := map[string]Estimate{}
	for _, e := range cand {
		byName[e.Name] = e
	}
	var out []Estimate
	var notes []string
	seen := map[string]bool{}
	for _, r := range ref {
		seen[r.Name] = true
		c, ok := byName[r.Name]
		if !ok {
			notes = append(notes, fmt.Sprintf("%s has no %s (%s has)", candName, r.Name, refName))
			continue
		}
		e := r
		e.Cand, e.CandCI = c.Ref, c.RefCI
		if c.Units != r.Units {
			notes = append(notes, fmt.Sprintf("%s is in %s in %s but %s in %s: not compared", r.Name, r.Units, refName, c.Units, candName))
			continue
		}
		e.combine()
		out = append(out, e)
	}
	for _, c := range cand {
		if !seen[c.Name] {
			notes = append(notes, fmt.Sprintf("%s has no %s (%s has)", refName, c.Name, candName))
		}
	}
	return out, notes
}

// flipDiffs compares flip fractions patch by patch and ΔT by ΔT.
func flipDiffs(ref, cand *relations.Results) []FlipDiff {
	var out []FlipDiff
	for _, rp := range ref.Flips {
		for _, cp := range cand.Flips {
			if cp.Patch.Name != rp.Patch.Name {
				continue
			}
			for _, rr := range rp.Rows {
				for _, cr := range cp.Rows {
					if cr.DeltaT != rr.DeltaT {
						continue
					}
					out = append(out, FlipDiff{Patch: rp.Patch.Name, DeltaT: rr.DeltaT,
						RefChanged: rr.Changed, CandChanged: cr.Changed, DiffChanged: cr.Changed - rr.Changed,
						RefConvChange: rr.ConvectiveChange(), CandConvChange: cr.ConvectiveChange(), DiffConvChange: cr.ConvectiveChange() - rr.ConvectiveChange()})
				}
			}
		}
	}
	return out
}

// relationMismatches lists how two runs' relationship analyses differ:
// the mode (anomaly and climatological slopes are not comparable) and
// every line of the configuration text (relations.Config.Text) that
// differs, by key.
func relationMismatches(a, b Run) []string {
	ra, rb := a.Relations, b.Relations
	if ra == nil || rb == nil {
		return nil
	}
	var out []string
	if ra.Mode != rb.Mode {
		out = append(out, fmt.Sprintf("relationship mode differs: %s has %s, %s has %s (anomaly and climatological slopes are not comparable)", a.Label(), ra.Mode, b.Label(), rb.Mode))
	}
	ka, kb := configLines(ra.Config), configLines(rb.Config)
	keys := map[string]bool{}
	for k := range ka {
		keys[k] = true
	}
	for k := range kb {
		keys[k] = true
	}
	var sorted []string
	for k := range keys {
		if k != "mode" {
			sorted = append(sorted, k)
		}
	}
	sort.Strings(sorted)
	for _, k := range sorted {
		va, oka := ka[k]
		vb, okb := kb[k]
		switch {
		case !oka:
			out = append(out, fmt.Sprintf("relationship config differs: %s has no %s, %s has %s", a.Label(), k, b.Label(), vb))
		case !okb:
			out = append(out, fmt.Sprintf("relationship config differs: %s has %s %s, %s has none", a.Label(), k, va, b.Label()))
		case va != vb:
			out = append(out, fmt.Sprintf("relationship config differs: %s is %s in %s, %s in %s", k, va, a.Label(), vb, b.Label()))
		}
	}
	return out
}

// configLines splits "key: value" lines; a line without ": " is its own key.
func configLines(s string) map[string]string {
	m := map[string]string{}
	for _, l := range strings.Split(s, "\n") {
		l = strings.TrimSpace(l)
		if l == "" {
			continue
		}
		k, v, ok := strings.Cut(l, ": ")
		if !ok {
			k, v = l, ""
		}
		m[k] = v
	}
	return m
}
