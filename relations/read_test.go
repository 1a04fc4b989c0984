package relations

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// same reports whether two numbers agree, NaN matching NaN (JSON null).
func same(a, b float64) bool {
	return a == b || (math.IsNaN(a) && math.IsNaN(b)) || math.Abs(a-b) <= 1e-12*math.Max(math.Abs(a), math.Abs(b))
}

// TestReadResultsRoundTrip: what Write puts into relationships.json,
// ReadResults gives back — the configuration text and mode that compare
// checks, the regressions with their intervals and the partial
// regressions (synthetic data from richResults).
func TestReadResultsRoundTrip(t *testing.T) {
	t.Parallel()
	res := richResults(t)
	dir := t.TempDir()
	if _, err := Write(dir, res, testMeta, WriteOptions{}); err != nil {
		t.Fatal(err)
	}
	got, err := ReadResults(dir)
	if err != nil {
		t.Fatal(err)
	}
	if got.Mode != res.Mode || got.Config != res.Config || got.Uncertainty != res.Uncertainty || got.RegimeDefinition != res.RegimeDefinition {
		t.Errorf("mode/config/uncertainty/regime definition changed in the round trip:\n%v %q\nvs\n%v %q", got.Mode, got.Config, res.Mode, res.Config)
	}
	if len(got.Regressions) != len(res.Regressions) || len(got.Partials) != len(res.Partials) {
		t.Fatalf("%d regressions and %d partials read, %d and %d written", len(got.Regressions), len(got.Partials), len(res.Regressions), len(res.Partials))
	}
	if len(res.Partials) == 0 {
		t.Fatal("the test results have no partial regressions")
	}
	for i, w := range res.Regressions {
		g := got.Regressions[i]
		if g.Predictor != w.Predictor || g.Response != w.Response || !same(g.Slope, w.Slope) || !same(g.SlopeCI.Lo, w.SlopeCI.Lo) || !same(g.SlopeCI.Hi, w.SlopeCI.Hi) || !same(g.RCI.Lo, w.RCI.Lo) {
			t.Errorf("regression %d: read %+v, wrote %+v", i, g, w)
		}
	}
	for i, w := range res.Partials {
		g := got.Partials[i]
		if g.Predictors != w.Predictors || g.Regime != w.Regime || g.Domain != w.Domain || g.CoefUnits != w.CoefUnits {
			t.Errorf("partial %d: read %v %v %s, wrote %v %v %s", i, g.Predictors, g.Regime, g.Domain, w.Predictors, w.Regime, w.Domain)
		}
		for k := 0; k < 2; k++ {
			if !same(g.Coef[k], w.Coef[k]) || !same(g.SE[k], w.SE[k]) || !same(g.CI[k].Lo, w.CI[k].Lo) || !same(g.CI[k].Hi, w.CI[k].Hi) {
				t.Errorf("partial %d coefficient %d: read %v ± %v %v, wrote %v ± %v %v", i, k, g.Coef[k], g.SE[k], g.CI[k], w.Coef[k], w.SE[k], w.CI[k])
			}
		}
	}
	// No file: (nil, nil).
	if r, err := ReadResults(t.TempDir()); r != nil || err != nil {
		t.Errorf("folder without relationships.json: %v, %v; want nil, nil", r, err)
	}
	// A partial regression with one coefficient is refused, naming it.
	bad := filepath.Join(t.TempDir(), RelationshipsJSON)
	os.WriteFile(bad, []byte(`{"format":"lidscope-relationships","format_version":3,"relationships_mode":"climatological","partial_regressions":[{"regime":"subsidence","coefficients":[{}]}]}`), 0o644)
	if _, err := ReadResults(filepath.Dir(bad)); err == nil {
		t.Error("a one-coefficient partial regression was accepted")
	}
	// Version 1 (the study under an earlier name) asks for a re-run.
	old := filepath.Join(t.TempDir(), RelationshipsJSON)
	os.WriteFile(old, []byte(`{"format":"lidscope-relationships","format_version":1,"mode":"climatological"}`), 0o644)
	if _, err := ReadResults(filepath.Dir(old)); err == nil || !strings.Contains(err.Error(), "re-run") || !strings.Contains(err.Error(), "version 1") {
		t.Errorf("version 1: %v", err)
	}
}
