package compare

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/regimes"
	"lidscope/relations"
)

// rel builds relationship results (invented numbers) with a band,
// whole-record, subsidence-regime slope of low_cloud on EIS of eis ± h
// (symmetric 95 % interval), on LTS of 0.056 ± 0.001, a partial
// regression on (eis, sst), one patch's flips and a threshold.
func rel(eis, h float64, config string) *relations.Results {
	g := func(pred string, s, hw float64) relations.Regression {
		return relations.Regression{Domain: relations.BandDomain, Season: "all", Regime: regimes.Subsidence, Response: "low_cloud",
			Predictor: pred, SlopeUnits: "K-1", Slope: s, SlopeCI: relations.Interval{Lo: s - hw, Hi: s + hw}}
	}
	return &relations.Results{
		Mode:      relations.Climatological,
		Config:    config,
		Responses: []relations.Variable{{Name: "low_cloud", Units: "1"}},
		Regressions: []relations.Regression{
			g("eis", eis, h), g("lts", 0.056, 0.001),
			// other pools are not compared
			{Domain: "cold_tongue", Season: "all", Regime: regimes.Subsidence, Response: "low_cloud", Predictor: "eis", Slope: 9},
			{Domain: relations.BandDomain, Season: "DJF", Regime: regimes.Subsidence, Response: "low_cloud", Predictor: "eis", Slope: 9},
			{Domain: relations.BandDomain, Season: "all", Regime: regimes.Convective, Response: "low_cloud", Predictor: "eis", Slope: 9},
		},
		Partials: []relations.Partial{{Domain: relations.BandDomain, Season: "all", Regime: regimes.Subsidence, Response: "low_cloud",
			Predictors: [2]string{"eis", "sst"}, CoefUnits: "K-1", Coef: [2]float64{eis, 0.001},
			CI: [2]relations.Interval{{Lo: eis - 0.02, Hi: eis + 0.02}, {Lo: -0.02, Hi: 0.022}}}},
		Flips: []relations.PatchFlips{{Patch: relations.Patch{Name: "east_pacific"}, Rows: []relations.FlipRow{
			{DeltaT: 0.5, Changed: 0.1, ConvectiveBefore: 0.2, ConvectiveAfter: 0.3}, {DeltaT: 1, Changed: 0.2, ConvectiveBefore: 0.2, ConvectiveAfter: 0.4}}}},
		Threshold: &relations.Threshold{Indicator: "omega500", Condition: "omega500 < 0", Rel: 0.8, RelCI: relations.Interval{Lo: 0.6, Hi: 1.2}, Abs: 299, AbsCI: relations.Interval{Lo: 298.8, Hi: 299.4}},
	}
}

const cfgText = "mode: climatological\ndetrend: false\nbins.eis (K): [-2 0 2]\npatch.east_pacific: -10…10 N, -150…-90 E\n"

func withRel(r Run, rr *relations.Results) Run { r.Relations = rr; return r }

// TestEstimatesByHand: reference slope 0.05 ± 0.001, candidates 0.051 and
// 0.0515 ± 0.001. The combined half-width is √(0.001² + 0.001²) =
// 0.0014142 (CombinedMethod), so a difference of 0.001 lies within it and
// one of 0.0015 does not.
func TestEstimatesByHand(t *testing.T) {
	conv := []float64{0, 0.25, 0.5, 1}
	ref := withRel(run(t, "obs", conv), rel(0.05, 0.001, cfgText))
	near := withRel(run(t, "near", conv), rel(0.051, 0.001, cfgText))
	far := withRel(run(t, "far", conv), rel(0.0515, 0.001, cfgText))
	res, err := Compare(ref, []Run{near, far}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	wantNames := []string{"low_cloud_on_eis", "low_cloud_on_lts", "low_cloud_partial_eis_given_sst", "low_cloud_partial_sst_given_eis", "threshold_relative_sst", "threshold_absolute_sst"}
	for k, c := range res.Candidates {
		if len(c.Estimates) != len(wantNames) {
			t.Fatalf("%s: %d estimates, want %d (%v)", c.Name, len(c.Estimates), len(wantNames), c.Estimates)
		}
		for i, e := range c.Estimates {
			if e.Name != wantNames[i] {
				t.Errorf("estimate %d is %s, want %s", i, e.Name, wantNames[i])
			}
		}
		e := c.Estimates[0]
		wantDiff := []float64{0.001, 0.0015}[k]
		if math.Abs(e.Diff-wantDiff) > 1e-12 || math.Abs(e.Combined-0.0014142135623730952) > 1e-12 {
			t.Errorf("%s: difference %v ± %v, want %v ± 0.0014142", c.Name, e.Diff, e.Combined, wantDiff)
		}
		if want := k == 0; e.Within != want || !e.Tested {
			t.Errorf("%s: within %v (tested %v), want %v", c.Name, e.Within, e.Tested, want)
		}
		// LTS slope and thresholds are identical: within, zero difference.
		for _, e := range c.Estimates[1:] {
			if e.Name == "low_cloud_partial_eis_given_sst" {
				continue
			}
			if e.Diff != 0 || !e.Within {
				t.Errorf("%s %s: difference %v within %v, want 0 and within", c.Name, e.Name, e.Diff, e.Within)
			}
		}
		// Threshold half-widths: relative (1.2−0.6)/2 = 0.3 in both, combined 0.3·√2.
		if th := c.Estimates[4]; math.Abs(th.Combined-0.3*math.Sqrt2) > 1e-12 {
			t.Errorf("threshold combined half-width %v, want %v", th.Combined, 0.3*math.Sqrt2)
		}
		if len(c.Flips) != 2 || c.Flips[1].DeltaT != 1 || c.Flips[1].DiffChanged != 0 || math.Abs(c.Flips[1].RefConvChange-0.2) > 1e-15 {
			t.Errorf("%s flips: %+v", c.Name, c.Flips)
		}
	}
	// A missing interval makes the test impossible, not "within".
	nan := rel(0.05, math.NaN(), cfgText)
	res, err = Compare(ref, []Run{withRel(run(t, "noci", conv), nan)}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if e := res.Candidates[0].Estimates[0]; e.Tested || e.Within {
		t.Errorf("no interval: tested %v within %v, want false, false", e.Tested, e.Within)
	}
	// Written and printed.
	dir := t.TempDir()
	res, _ = Compare(ref, []Run{near, far}, Options{})
	if _, err := Write(dir, res, WriteOptions{Version: "test"}); err != nil {
		t.Fatal(err)
	}
	b, _ := os.ReadFile(filepath.Join(dir, JSONFile))
	var doc struct {
		Candidates []struct {
			Sensitivities map[string]struct {
				Difference struct {
					Value *float64
					Units string
				}
				Verdict string
			}
			Thresholds map[string]any
			Flips      []any
		}
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	s := doc.Candidates[1].Sensitivities["low_cloud_on_eis"]
	if s.Difference.Value == nil || math.Abs(*s.Difference.Value-0.0015) > 1e-12 || s.Difference.Units != "K-1" || s.Verdict != "outside" {
		t.Errorf("comparison.json: far's EIS slope difference %+v verdict %q, want outside", s.Difference, s.Verdict)
	}
	if len(doc.Candidates[1].Thresholds) != 2 || len(doc.Candidates[1].Flips) != 2 {
		t.Errorf("comparison.json: %d thresholds, %d flips; want 2, 2", len(doc.Candidates[1].Thresholds), len(doc.Candidates[1].Flips))
	}
	csvb, _ := os.ReadFile(filepath.Join(dir, CSVFile))
	lines := strings.Split(strings.TrimSpace(string(csvb)), "\n")
	if len(lines) != 4 || !strings.Contains(lines[0], "low_cloud_on_eis_verdict") || strings.Contains(lines[0], "flip") ||
		!strings.HasSuffix(strings.Split(lines[3], ",")[0], "far") || !strings.Contains(lines[3], ",outside,") {
		t.Errorf("comparison.csv:\n%s", csvb)
	}
	fb, _ := os.ReadFile(filepath.Join(dir, FlipsCSVFile))
	fl := strings.Split(strings.TrimSpace(string(fb)), "\n")
	if len(fl) != 7 || fl[0] != "run,role,patch,sst_perturbation [K],changed [1],changed_difference [1]" || !strings.HasPrefix(fl[6], "far,candidate,east_pacific,1,") {
		t.Errorf("comparison_flips.csv:\n%s", fb)
	}
	var out bytes.Buffer
	WriteEstimates(&out, res, "  ")
	if !strings.Contains(out.String(), "outside") || strings.Count(out.String(), "within") < 6 {
		t.Errorf("printed estimates:\n%s", out.String())
	}
}

// Runs whose relationship analyses differ (mode, bins) are refused, and
// the refusal lists each difference.
func TestRelationConfigMismatchRefused(t *testing.T) {
	conv := []float64{0, 0.25, 0.5, 1}
	ref := withRel(run(t, "obs", conv), rel(0.05, 0.001, cfgText))
	other := rel(0.05, 0.001, strings.Replace(strings.Replace(cfgText, "[-2 0 2]", "[-2 0 1 2]", 1), "climatological", "anomaly", 1)+"seasons: true\n")
	other.Mode = relations.Anomaly
	_, err := Compare(ref, []Run{withRel(run(t, "model", conv), other)}, Options{})
	var me *MismatchError
	if !errors.As(err, &me) {
		t.Fatalf("different relationship configs compared: %v", err)
	}
	msg := err.Error()
	for _, want := range []string{"relationship mode differs: obs has climatological, model has anomaly", "bins.eis (K) is [-2 0 2] in obs, [-2 0 1 2] in model", "obs has no seasons, model has true"} {
		if !strings.Contains(msg, want) {
			t.Errorf("the refusal does not say %q:\n%s", want, msg)
		}
	}
	if len(me.List) != 3 {
		t.Errorf("%d mismatches listed, want 3: %v", len(me.List), me.List)
	}
	res, err := Compare(ref, []Run{withRel(run(t, "model", conv), other)}, Options{AllowMismatch: true})
	if err != nil || len(res.Mismatches) != 3 {
		t.Errorf("with AllowMismatch: %v, %v", res, err)
	}
}

// A run compared with itself, relationships included: every difference
// is zero and every sensitivity within.
func TestSelfComparisonWithRelations(t *testing.T) {
	a := withRel(run(t, "obs", []float64{0, 0.25, 0.5, 1}), rel(0.05, 0.001, cfgText))
	res, err := Compare(a, []Run{a}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	c := res.Candidates[0]
	if len(c.Estimates) == 0 || len(c.Notes) != 0 {
		t.Fatalf("estimates %v notes %v", c.Estimates, c.Notes)
	}
	for _, e := range c.Estimates {
		if e.Diff != 0 || !e.Within || !e.Tested {
			t.Errorf("%s: difference %v within %v", e.Name, e.Diff, e.Within)
		}
	}
	// Without relationships on one side: a note, no estimates.
	b := a
	b.Relations = nil
	res, err = Compare(a, []Run{b}, Options{})
	if err != nil || len(res.Candidates[0].Estimates) != 0 || len(res.Candidates[0].Notes) != 1 {
		t.Errorf("candidate without relationships: %v %+v", err, res.Candidates[0])
	}
}
