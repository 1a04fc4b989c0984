package figures

import (
	"fmt"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/compare"
	"lidscope/relations"
	"lidscope/vocab"
)

// ensembleResult is a comparison of n invented candidates (a synthetic
// ensemble for the figure's layout): slopes on EIS and LTS spread around
// the reference's, every third one outside the combined uncertainty.
func ensembleResult(n int) *compare.Result {
	ref := []compare.Estimate{
		{Name: "low_cloud_on_eis", Kind: "slope", Units: "K-1", Ref: 0.05, RefCI: relations.Interval{Lo: 0.046, Hi: 0.054}},
		{Name: "low_cloud_on_lts", Kind: "slope", Units: "K-1", Ref: 0.035, RefCI: relations.Interval{Lo: 0.031, Hi: 0.039}},
		{Name: "threshold_relative_sst", Kind: "threshold", Units: "K", Ref: 0.8, RefCI: relations.Interval{Lo: 0.6, Hi: 1}},
	}
	res := &compare.Result{ReferenceEstimates: ref, RegimeText: "convective where SST* > δ + h (δ = 0.5 K, h = 0 K)", Version: "test"}
	res.Reference.Name = "synthetic-obs"
	res.Reference.Dir = filepath.Join(os.TempDir(), "no-such-run-folder")
	res.Reference.Meta.Period = "2001-01 … 2040-12"
	for i := 0; i < n; i++ {
		c := compare.Candidate{Name: fmt.Sprintf("model-%02d-r%di1p1f1", i, i%3+1)}
		for _, e := range ref {
			v := e.Ref + 0.02*math.Sin(float64(7*i+1))
			x := compare.Estimate{Name: e.Name, Kind: e.Kind, Units: e.Units, Ref: e.Ref, RefCI: e.RefCI, Cand: v,
				CandCI: relations.Interval{Lo: v - 0.004, Hi: v + 0.004}, Tested: true, Within: i%3 != 0}
			c.Estimates = append(c.Estimates, x)
		}
		res.Candidates = append(res.Candidates, c)
	}
	return res
}

// The rows are the candidates sorted by value in display units (a
// fraction per kelvin in per cent per kelvin), a candidate without the
// estimate listed apart; the spread of 3, 4 and 5 % per K is mean 4,
// sample standard deviation 1 (hand-worked), min 3, max 5.
func TestEnsembleRowsAndSpread(t *testing.T) {
	est := func(name string, v float64, verdict string) compare.Candidate {
		e := compare.Estimate{Name: "low_cloud_on_eis", Kind: "slope", Units: "K-1", Cand: v, CandCI: relations.Interval{Lo: v - 0.01, Hi: v + 0.01}}
		e.Tested, e.Within = verdict != vocab.Untested, verdict == vocab.Within
		return compare.Candidate{Name: name, Estimates: []compare.Estimate{e}}
	}
	res := &compare.Result{Candidates: []compare.Candidate{est("a", 0.03, vocab.Within), est("b", 0.05, vocab.Outside), est("c", 0.04, vocab.Untested),
		{Name: "none"}, est("nan", math.NaN(), vocab.Untested)}}
	u, f := sensitivityUnits("K-1")
	if u != "% per K" || f != 100 {
		t.Errorf("units %q × %g, want %% per K × 100", u, f)
	}
	rows, missing := ensembleRows(res, "low_cloud_on_eis", f)
	var names []string
	for _, r := range rows {
		names = append(names, r.name+":"+r.verdict)
	}
	if got := strings.Join(names, " "); got != "a:within c:untested b:outside" {
		t.Errorf("rows %s, want a c b by value with their verdicts", got)
	}
	if strings.Join(missing, " ") != "none nan" {
		t.Errorf("without the estimate: %v, want none and nan", missing)
	}
	if r := rows[2]; math.Abs(r.v-5) > 1e-12 || math.Abs(r.lo-4) > 1e-12 || math.Abs(r.hi-6) > 1e-12 {
		t.Errorf("b in display units: %g (%g … %g), want 5 (4 … 6)", r.v, r.lo, r.hi)
	}
	s := spreadOf(rows)
	for _, c := range []struct {
		what      string
		got, want float64
	}{{"mean", s.mean, 4}, {"sd", s.sd, 1}, {"min", s.min, 3}, {"max", s.max, 5}} {
		if math.Abs(c.got-c.want) > 1e-12 {
			t.Errorf("%s %g, want %g", c.what, c.got, c.want)
		}
	}
	if one := spreadOf(rows[:1]); !math.IsNaN(one.sd) || one.mean != 3 {
		t.Errorf("one candidate: %+v, want mean 3 and no sd", one)
	}
}

// With 40 candidates the comparison draws one ensemble figure per
// sensitivity (not per threshold) and no compare_sensitivities (whose
// colours would repeat); rows are far enough apart for their labels; the
// ensemble figures need only the comparison (the reference's folder does
// not exist); a figure the comparison has not is refused naming those it
// has.
func TestEnsembleFigures(t *testing.T) {
	for _, n := range []int{3, 12, 40, 80} {
		if rh, lh := ensembleRowHeight(n), lineHeight(style(ensembleLabelSize(n), false)); rh < lh {
			t.Errorf("%d candidates: rows %.1f pt apart, labels %.1f pt high", n, rh.Points(), lh.Points())
		}
	}
	res := ensembleResult(40)
	dir := t.TempDir()
	_, err := DrawComparison(res, CompareOptions{OutDir: dir, Only: []string{"compare_sensitivities"}})
	if err == nil || !strings.Contains(err.Error(), "compare_ensemble_low_cloud_on_eis, compare_ensemble_low_cloud_on_lts") || strings.Contains(err.Error(), "threshold") {
		t.Errorf("compare_sensitivities with 40 candidates: %v, want a refusal naming the two ensemble figures", err)
	}
	paths, err := DrawComparison(res, CompareOptions{OutDir: dir, DPI: 100, Only: []string{"compare_ensemble_low_cloud_on_eis", "compare_ensemble_low_cloud_on_lts"}})
	if err != nil || len(paths) != 2 {
		t.Fatalf("%v %v", paths, err)
	}
	for _, p := range paths {
		f, err := os.Open(p)
		if err != nil {
			t.Fatal(err)
		}
		img, err := png.Decode(f)
		f.Close()
		if err != nil {
			t.Fatal(err)
		}
		if w, h := img.Bounds().Dx(), img.Bounds().Dy(); w != 700 || h < 40*135/10 {
			t.Errorf("%s: %d × %d px, want 700 wide and room for 40 rows", p, w, h)
		}
	}
	// every figure at once needs the runs' folders for the maps
	if _, err := DrawComparison(res, CompareOptions{OutDir: t.TempDir()}); err == nil || !strings.Contains(err.Error(), "compare_ensemble_low_cloud_on_eis") {
		t.Errorf("without the runs' folders: %v, want an error naming the figures drawn from the comparison alone", err)
	}
}
