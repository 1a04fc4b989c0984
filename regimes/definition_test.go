package regimes

import (
	"math"
	"strings"
	"testing"
)

// A synthetic step whose answer is known by construction: ten cells of
// equal weight with relative SST −4.5, −3.5, …, 4.5 K. The 70th weighted
// percentile is the 7th value (cumulative weight 7/10 reaches 70 %), 1.5 K,
// so exactly three cells (30 % of the band area) are convective. Cells
// outside the band (weight 0), land and missing values do not count.
func TestPercentileRuleSyntheticTruth(t *testing.T) {
	rel := make([]float32, 0, 14)
	w := make([]float64, 0, 14)
	ocean := make([]bool, 0, 14)
	for k := 0; k < 10; k++ {
		rel = append(rel, float32(float64(k)-4.5))
		w = append(w, 2)
		ocean = append(ocean, true)
	}
	rel = append(rel, 9, 9, float32(math.NaN()), 9) // outside the band, land, missing, zero weight
	w = append(w, 0, 2, 2, 0)
	ocean = append(ocean, true, false, true, true)
	d := Definition{Band: Band{South: -30, North: 30}, Rule: RuleSSTPercentile, Percentile: 70}
	if err := d.Validate(); err != nil {
		t.Fatal(err)
	}
	c, ok := d.StepClassifier(rel, w, ocean)
	if !ok || c.Delta != 1.5 {
		t.Fatalf("70th percentile δ = %v (ok %v), want 1.5 K", c.Delta, ok)
	}
	reg := make([]Regime, len(rel))
	c.ClassifySlab(rel, reg)
	var conv, all float64
	for i, r := range reg {
		if w[i] > 0 && ocean[i] && r != Missing {
			all += w[i]
			if r == Convective {
				conv += w[i]
			}
		}
	}
	if got := conv / all; got != 0.3 {
		t.Errorf("convective share of the band %v, want 0.3 = 1 − p/100", got)
	}
	// Unequal weights: the percentile follows the area, not the count.
	w2 := []float64{1, 1, 1, 1, 1, 1, 1, 1, 1, 11} // the last cell is half the area
	c2, _ := d.StepClassifier(rel[:10], w2, ocean[:10])
	if c2.Delta != 4.5 {
		t.Errorf("weighted 70th percentile %v, want 4.5 K (the large warm cell holds the top 55 %%)", c2.Delta)
	}
	if _, ok := d.StepClassifier(rel[10:11], w[10:11], ocean[10:11]); ok {
		t.Error("a step without band ocean gave a threshold")
	}
}

func TestDefinitionTextEqualityEncoding(t *testing.T) {
	rel := Definition{Band: Band{South: -30, North: 30}, Delta: 1.5}
	if got, want := rel.String(), "convective where SST − tropical-mean SST > 1.5 K, subsidence otherwise; tropical mean: cell-area-weighted over ocean 30°S–30°N"; got != want {
		t.Errorf("text %q, want %q", got, want)
	}
	pc := Definition{Band: Band{South: -20, North: 20}, Rule: RuleSSTPercentile, Percentile: 80}
	if !strings.Contains(pc.String(), "80th percentile of the band's ocean SST") || !strings.Contains(pc.String(), "20°S–20°N") {
		t.Errorf("percentile text %q", pc.String())
	}
	if !rel.Equal(rel) || rel.Equal(pc) {
		t.Error("Equal")
	}
	d := rel.Differences(pc)
	if len(d) != 2 || !strings.Contains(d[0], "regime rule") || !strings.Contains(d[1], "band") {
		t.Errorf("differences %q", d)
	}
	if d := rel.Differences(Definition{Band: rel.Band, Delta: 1}); len(d) != 1 || !strings.Contains(d[0], "δ") {
		t.Errorf("δ difference %q", d)
	}
	a := pc.Attributes()
	if a["percentile"] != 80.0 || a["regime_rule"] != "sst_percentile" || a["delta"] != nil || a["band_units"] != "degrees_north" {
		t.Errorf("attributes %v", a)
	}
	if s := pc.Summarize(); !math.IsNaN(s.Delta) || s.Percentile != 80 {
		t.Errorf("summary %+v", s)
	}
	for _, bad := range []Definition{
		{Band: rel.Band, Rule: RuleSSTPercentile, Percentile: 100},
		{Band: rel.Band, Rule: RuleSSTPercentile},
		{Band: rel.Band, Rule: "omega"},
		{Band: Band{South: 10, North: -10}, Delta: 1},
	} {
		if bad.Validate() == nil {
			t.Errorf("%+v accepted", bad)
		}
	}
}
