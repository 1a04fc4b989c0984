package analysis

import (
	"bytes"
	"strings"
	"testing"

	"lidscope/constraint"
	"lidscope/fixtures"
)

// TestDemoSummaryConstraintUnits: the demo console writes a factor change
// of a dimensionless factor (rh700, units "1") without a dangling "1"
// ("-0.005 per K", not "-0.005 1 per K"), and one with units with them.
func TestDemoSummaryConstraintUnits(t *testing.T) {
	d := &DemoReport{Truth: &fixtures.Truth{}, ModelTruth: &fixtures.Truth{}, Constraint: &constraint.Result{Domains: []constraint.Domain{{
		Domain: "tropical_band", Regime: "subsidence",
		Constrained: constraint.Estimate{Value: 0.001, Lo: -0.001, Hi: 0.003},
		Factors: []constraint.FactorChange{
			{Factor: "rh700", Units: "1", PerKelvin: -0.005},
			{Factor: "omega700", Units: "Pa s-1", PerKelvin: -0.001},
		},
	}}}}
	var b bytes.Buffer
	d.WriteSummary(&b)
	out := b.String()
	for _, want := range []string{"model change -0.005 per K", "model change -0.001 Pa s-1 per K"} {
		if !strings.Contains(out, want) {
			t.Errorf("summary lacks %q:\n%s", want, out)
		}
	}
	if strings.Contains(out, " 1 per K") {
		t.Errorf("summary has a dangling unit \"1\":\n%s", out)
	}
}
