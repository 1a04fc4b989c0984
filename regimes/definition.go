package regimes

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
)

// Rule says how the regime threshold of a time step is found.
type Rule string

// The rules.
const (
	// RuleRelativeSST: a fixed threshold δ (K) on relative SST, the
	// default (Johnson & Xie 2010: the convective threshold follows the
	// tropical mean).
	RuleRelativeSST Rule = "relative_sst"
	// RuleSSTPercentile: convective where SST exceeds the p-th percentile of
	// the band's ocean SST at that step (area-weighted); equivalently the
	// step's δ is the p-th percentile of relative SST. The convective share
	// of the band is then 1 − p/100 by construction (up to ties and the
	// transition band), so the area fraction is no longer a result.
	RuleSSTPercentile Rule = "sst_percentile"
)

// TropicalMeanRule is how the tropical mean is formed (the one rule
// lidscope has).
const TropicalMeanRule = "cell-area-weighted over ocean"

// Definition is the whole regime definition of a run: the latitude band of
// the tropical mean, the classifier rule with δ and the half-width h (or
// the percentile p), the ocean mask rule and the tropical-mean rule. Every
// output records it (String, Attributes, Summary) and runs are compared by
// it (Equal, Differences).
type Definition struct {
	Band       Band
	Rule       Rule    // "" is RuleRelativeSST
	Delta      float64 // δ, K (RuleRelativeSST)
	HalfWidth  float64 // h, K, ≥ 0: transition band δ ± h
	Percentile float64 // p, percent, 0 < p < 100 (RuleSSTPercentile)
	// Mask says which cells are ocean (the study's mask rule, in words).
	Mask string
}

// rule returns the rule, RuleRelativeSST for "".
func (d Definition) rule() Rule {
	if d.Rule == "" {
		return RuleRelativeSST
	}
	return d.Rule
}

// Validate checks the definition.
func (d Definition) Validate() error {
	if err := d.Band.Validate(); err != nil {
		return err
	}
	switch d.rule() {
	case RuleRelativeSST:
		return d.Classifier().Validate()
	case RuleSSTPercentile:
		if !(d.Percentile > 0 && d.Percentile < 100) {
			return fmt.Errorf("regime percentile p = %v must lie strictly between 0 and 100 (percent)", d.Percentile)
		}
		return Classifier{HalfWidth: d.HalfWidth}.Validate()
	}
	return fmt.Errorf("regime rule %q is not known: use %s or %s", d.Rule, RuleRelativeSST, RuleSSTPercentile)
}

// Fixed reports whether δ is the same at every step (RuleRelativeSST).
func (d Definition) Fixed() bool { return d.rule() == RuleRelativeSST }

// Classifier is the fixed classifier of RuleRelativeSST (δ, h). For the
// percentile rule δ is found per step (StepClassifier) and Delta is unused.
func (d Definition) Classifier() Classifier {
	return Classifier{Delta: d.Delta, HalfWidth: d.HalfWidth}
}

// StepClassifier returns the classifier of one time step given its
// relative SST, the band weights and the ocean mask: (δ, h) for
// RuleRelativeSST; for RuleSSTPercentile δ is the p-th area-weighted
// percentile of relative SST over the band's valid ocean cells (the
// smallest value whose cumulative weight reaches p % of the total, the
// inverse of the weighted distribution function). ok is false when no
// cell contributes.
func (d Definition) StepClassifier(rel []float32, bandWeight []float64, ocean []bool) (Classifier, bool) {
	if d.Fixed() {
		return d.Classifier(), true
	}
	type wx struct{ x, w float64 }
	var s []wx
	var tot float64
	for i, x := range rel {
		w := bandWeight[i]
		if w <= 0 || x != x || (ocean != nil && !ocean[i]) {
			continue
		}
		s = append(s, wx{float64(x), w})
		tot += w
	}
	if tot == 0 {
		return Classifier{}, false
	}
	sort.Slice(s, func(i, j int) bool { return s[i].x < s[j].x })
	target := d.Percentile / 100 * tot
	var cum float64
	delta := s[len(s)-1].x
	for _, e := range s {
		cum += e.w
		if cum >= target {
			delta = e.x
			break
		}
	}
	return Classifier{Delta: delta, HalfWidth: d.HalfWidth}, true
}

func g(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

func lat(x float64) string {
	switch {
	case x < 0:
		return g(-x) + "°S"
	case x > 0:
		return g(x) + "°N"
	}
	return "0°"
}

// String states the definition for titles, metadata and the console, e.g.
// "convective where SST − tropical-mean SST > 1.5 K, subsidence otherwise;
// tropical mean: cell-area-weighted over ocean 30°S–30°N".
func (d Definition) String() string {
	var s string
	switch d.rule() {
	case RuleSSTPercentile:
		p := g(d.Percentile)
		if d.HalfWidth == 0 {
			s = "convective where SST > the " + p + "th percentile of the band's ocean SST at each step, subsidence otherwise"
		} else {
			s = fmt.Sprintf("convective where SST exceeds the %sth percentile of the band's ocean SST at each step by more than %s K, subsidence where it is more than %s K below, transition between", p, g(d.HalfWidth), g(d.HalfWidth))
		}
	default:
		s = d.Classifier().String()
	}
	s += "; tropical mean: " + TropicalMeanRule + " " + lat(d.Band.South) + "–" + lat(d.Band.North)
	if d.Mask != "" {
		s += "; ocean: " + d.Mask
	}
	return s
}

// Equal reports whether two definitions classify alike.
func (d Definition) Equal(o Definition) bool { return len(d.Differences(o)) == 0 }

// Difference is one item in which two definitions differ, with the
// values of each.
type Difference struct {
	What string // e.g. "threshold δ (K)"
	A, B string
}

// Diff lists the items in which o differs from d.
func (d Definition) Diff(o Definition) []Difference {
	var out []Difference
	chk := func(what string, x, y any) {
		if a, b := fmt.Sprint(x), fmt.Sprint(y); a != b {
			out = append(out, Difference{what, a, b})
		}
	}
	chk("regime rule", d.rule(), o.rule())
	if d.rule() == RuleRelativeSST && o.rule() == RuleRelativeSST {
		chk("threshold δ (K)", d.Delta, o.Delta)
	}
	if d.rule() == RuleSSTPercentile && o.rule() == RuleSSTPercentile {
		chk("percentile p (%)", d.Percentile, o.Percentile)
	}
	chk("transition half-width h (K)", d.HalfWidth, o.HalfWidth)
	chk("band (degrees_north)", fmt.Sprintf("%g…%g", d.Band.South, d.Band.North), fmt.Sprintf("%g…%g", o.Band.South, o.Band.North))
	chk("ocean mask", d.Mask, o.Mask)
	return out
}

// Differences says how o differs from d, one line per item, in words (for
// comparisons and merges).
func (d Definition) Differences(o Definition) []string {
	var out []string
	for _, x := range d.Diff(o) {
		out = append(out, fmt.Sprintf("%s: %s vs %s", x.What, x.A, x.B))
	}
	return out
}

// Attributes are the NetCDF global attributes of the definition, numbers
// typed, the units of a number x in x_units: regime_definition (text),
// regime_rule, delta (relative_sst only), half_width, percentile
// (sst_percentile only), band [south, north].
func (d Definition) Attributes() map[string]any {
	a := map[string]any{
		"regime_definition": d.String(),
		"regime_rule":       string(d.rule()),
		"half_width":        d.HalfWidth, "half_width_units": "K",
		"band": []float64{d.Band.South, d.Band.North}, "band_units": "degrees_north",
	}
	if d.Fixed() {
		a["delta"], a["delta_units"] = d.Delta, "K"
	} else {
		a["percentile"], a["percentile_units"] = d.Percentile, "%"
	}
	return a
}

// Summary is the JSON encoding of a definition (summary.json and
// provenance.json; numbers are {value, units} with null for not
// applicable).
type Summary struct {
	Text       string
	Rule       string
	Delta      float64 // NaN for the percentile rule
	HalfWidth  float64
	Percentile float64 // NaN for the relative rule
	Band       Band
}

// Summarize returns the values of the JSON encoding.
func (d Definition) Summarize() Summary {
	s := Summary{Text: d.String(), Rule: string(d.rule()), Delta: math.NaN(), HalfWidth: d.HalfWidth, Percentile: math.NaN(), Band: d.Band}
	if d.Fixed() {
		s.Delta = d.Delta
	} else {
		s.Percentile = d.Percentile
	}
	return s
}

// ParseRule reads a rule name as a study gives it.
func ParseRule(s string) (Rule, error) {
	switch r := Rule(strings.TrimSpace(s)); r {
	case RuleRelativeSST, RuleSSTPercentile:
		return r, nil
	case "":
		return RuleRelativeSST, nil
	}
	return "", fmt.Errorf("regime rule %q is not known: use %s (a threshold δ on relative SST) or %s (the p-th percentile of the band's ocean SST)", s, RuleRelativeSST, RuleSSTPercentile)
}
