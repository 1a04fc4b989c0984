package analysis

import (
	"bytes"
	"context"
	"image"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/compare"
	"lidscope/config"
	"lidscope/fixtures"
)

// runWorld generates a synthetic world (invented data) and analyses it
// into dir/results/<name>, returning the run folder.
func runWorld(t *testing.T, dir string, o fixtures.Options) string {
	t.Helper()
	data := filepath.Join(dir, "data-"+o.Name)
	if _, err := fixtures.Generate(data, o); err != nil {
		t.Fatal(err)
	}
	r, err := config.Load(filepath.Join(data, fixtures.StudyFile), config.LoadOptions{LookupEnv: config.NoEnvironment,
		Flags: map[string]string{"output.dir": filepath.Join(dir, "results")}})
	if err != nil {
		t.Fatal(err)
	}
	reps, err := Run(context.Background(), r, nil, Options{NoPlots: true})
	if err != nil {
		t.Fatal(err)
	}
	return reps[0].OutDir
}

func estimate(t *testing.T, c compare.Candidate, name string) compare.Estimate {
	t.Helper()
	for _, e := range c.Estimates {
		if e.Name == name {
			return e
		}
	}
	t.Fatalf("%s: no estimate %s among %v (notes %v)", c.Name, name, c.Estimates, c.Notes)
	return compare.Estimate{}
}

// The synthetic-truth tests of the comparison (fixtures' planted physics):
// a run compared with itself differs in nothing; the demo's synthetic
// model (cloud–EIS slope 0.03 against 0.05) is flagged outside the
// combined interval for the slopes on EIS and LTS; a world with the same
// seed and a slope of 0.0501 (a change far below the noise) is not
// flagged anywhere. The figures render and are not blank.
func TestCompareSyntheticWorlds(t *testing.T) {
	if testing.Short() {
		t.Skip("three synthetic runs skipped in -short mode")
	}
	t.Parallel()
	dir := t.TempDir()
	obs := *smallWorld()
	// The reference (obs) and the synthetic model (ModelScenario(obs)) are
	// the runs of the shared demo.
	_, d := sharedDemo(t)
	refDir, modelDir := d.Reports[0].OutDir, d.Reports[1].OutDir
	near := obs
	near.Name = "synthetic-near"
	near.Physics.CloudSlope = 0.0501
	nearDir := runWorld(t, dir, near)

	// Self-comparison.
	self, _, err := CompareDirs(refDir, []string{refDir}, filepath.Join(dir, "self"), CompareOptions{Options: Options{NoPlots: true}})
	if err != nil {
		t.Fatal(err)
	}
	sc := self.Candidates[0]
	if len(sc.Estimates) < 4 {
		t.Fatalf("self-comparison has %d estimates (%v), want the EIS and LTS slopes and two partials", len(sc.Estimates), sc.Notes)
	}
	for _, e := range sc.Estimates {
		if e.Diff != 0 || !e.Within || !e.Tested {
			t.Errorf("self: %s differs by %v (within %v)", e.Name, e.Diff, e.Within)
		}
	}
	for _, m := range sc.Maps {
		if m.Corr != 1 || m.CRMS != 0 || m.Bias != 0 {
			t.Errorf("self: %s correlation %v, centred RMS %v, bias %v", m.Name, m.Corr, m.CRMS, m.Bias)
		}
	}

	out := filepath.Join(dir, "cmp")
	res, files, err := CompareDirs(refDir, []string{modelDir, nearDir}, out, CompareOptions{})
	if err != nil {
		t.Fatal(err)
	}
	cloud := res.Reference.Acc.L.Cloud
	m, n := res.Candidates[0], res.Candidates[1]
	for _, pred := range []string{"eis", "lts"} {
		e := estimate(t, m, cloud+"_on_"+pred)
		if e.Within || !e.Tested || e.Diff > 0 {
			t.Errorf("model: %s difference %+.4g ± %.4g not flagged (reference %.4g, model %.4g)", e.Name, e.Diff, e.Combined, e.Ref, e.Cand)
		}
	}
	if e := estimate(t, m, cloud+"_on_eis"); e.Diff > -0.015 || e.Diff < -0.025 {
		t.Errorf("model: EIS slope difference %v, planted −0.02", e.Diff)
	}
	for _, e := range n.Estimates {
		if !e.Within || !e.Tested {
			t.Errorf("near (slope 0.0501): %s difference %+.4g ± %.4g flagged", e.Name, e.Diff, e.Combined)
		}
	}
	if e := estimate(t, n, cloud+"_on_eis"); e.Diff == 0 {
		t.Error("near: the EIS slope did not change at all; the planted 0.0001 change is missing")
	}
	// Figures: two map comparisons per candidate and the sensitivity panel.
	var pngs []string
	for _, f := range files {
		if strings.HasSuffix(f, ".png") {
			pngs = append(pngs, f)
		}
	}
	if len(pngs) != 5 {
		t.Fatalf("%d figures written (%v), want 5", len(pngs), files)
	}
	for _, p := range pngs {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		img, err := png.Decode(bytes.NewReader(b))
		if err != nil {
			t.Fatalf("%s: %v", p, err)
		}
		if c := colours(img); c < 20 {
			t.Errorf("%s has %d distinct colours: blank?", p, c)
		}
	}
	// Printed: the summary names the verdicts.
	var buf bytes.Buffer
	compare.WriteEstimates(&buf, res, "")
	if !strings.Contains(buf.String(), "outside") || !strings.Contains(buf.String(), "within") {
		t.Errorf("printed comparison:\n%s", buf.String())
	}
}

// colours counts the distinct colours of an image (up to 1000).
func colours(img image.Image) int {
	seen := map[[4]uint32]bool{}
	b := img.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y += 3 {
		for x := b.Min.X; x < b.Max.X; x += 3 {
			r, g, bb, a := img.At(x, y).RGBA()
			seen[[4]uint32{r, g, bb, a}] = true
			if len(seen) >= 1000 {
				return len(seen)
			}
		}
	}
	return len(seen)
}
