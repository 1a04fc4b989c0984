package main

import (
	"bytes"
	"context"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/analysis"
	"lidscope/compare"
	"lidscope/fixtures"
	"lidscope/internal/figurestest"
)

func TestPlotCommand(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "run")
	if _, err := figurestest.Write(dir, figurestest.Spec{}); err != nil {
		t.Fatal(err)
	}
	var out, errb bytes.Buffer
	// Options after the run directory, --only repeated and comma-separated.
	code := run([]string{"plot", dir, "--only", "series", "--only", "map_eis,map_cloud", "--dpi", "90"}, &out, &errb)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	lines := strings.Fields(out.String())
	if len(lines) != 3 {
		t.Fatalf("printed %q, want three paths", out.String())
	}
	for _, p := range lines {
		if filepath.Dir(p) != filepath.Join(dir, "figures") {
			t.Errorf("%s is not in RUN_DIR/figures", p)
		}
		f, err := os.Open(p)
		if err != nil {
			t.Fatal(err)
		}
		img, err := png.Decode(f)
		f.Close()
		if err != nil {
			t.Fatalf("%s: %v", p, err)
		}
		if w := img.Bounds().Dx(); w != 630 { // 7 in at 90 dpi
			t.Errorf("%s is %d px wide, want 630", p, w)
		}
	}
	// Again without --force: refused, exit 1, nothing printed.
	out.Reset()
	errb.Reset()
	if code := run([]string{"plot", "--only", "series", dir}, &out, &errb); code != 1 || !strings.Contains(errb.String(), "--force") {
		t.Errorf("second plot: exit %d, stderr %q; want 1 and advice to use --force", code, errb.String())
	}
	// SVG into another directory with a palette override.
	out.Reset()
	other := filepath.Join(t.TempDir(), "figs")
	if code := run([]string{"plot", "--format", "svg", "--out", other, "--palette", "eis=fathom", "--only", "map_eis", dir}, &out, &errb); code != 0 {
		t.Fatalf("svg: exit %d: %s", code, errb.String())
	}
	if _, err := os.Stat(filepath.Join(other, "map_eis.svg")); err != nil {
		t.Error(err)
	}
}

func TestPlotUsage(t *testing.T) {
	cases := []struct {
		args []string
		code int
		want string
	}{
		{[]string{"plot"}, 2, "exactly one run directory"},
		{[]string{"plot", "a", "b"}, 2, "exactly one run directory"},
		{[]string{"plot", "--format", "gif", "d"}, 2, "--format must be one of png, svg, pdf"},
		{[]string{"plot", "--only", "map_rain", "d"}, 2, `no figure "map_rain"`},
		{[]string{"plot", "--palette", "eis", "d"}, 2, "KIND=MAP"},
		{[]string{"plot", filepath.Join(os.TempDir(), "lidscope-no-such-run")}, 1, "summary.json"},
	}
	for _, c := range cases {
		var out, errb bytes.Buffer
		if code := run(c.args, &out, &errb); code != c.code || !strings.Contains(errb.String(), c.want) {
			t.Errorf("%v: exit %d, stderr %q; want %d and %q", c.args, code, errb.String(), c.code, c.want)
		}
	}
	var out, errb bytes.Buffer
	if code := run([]string{"plot", "--list"}, &out, &errb); code != 0 || !strings.Contains(out.String(), "map_convective_time_fraction") || !strings.Contains(out.String(), "compare_ensemble_<sensitivity>") {
		t.Errorf("--list: exit %d, %q", code, out.String())
	}
}

// plot COMPARISON_DIR draws the comparison's figures again from its
// comparison.json and the compared runs: byte for byte those compare drew
// (the demo's comparison, on a coarse two-year world). A
// figure name it has not is refused naming those it has.
func TestPlotRedrawsAComparison(t *testing.T) {
	sc := fixtures.DefaultOptions()
	sc.Resolution, sc.Years, sc.YearsPerFile = 5, 2, 2
	sc.Command = []string{"lidscope-test", "plot"}
	demo := filepath.Join(t.TempDir(), "demo-out")
	d, err := analysis.Demo(context.Background(), demo, analysis.DemoOptions{Options: analysis.Options{Version: version, Command: sc.Command, NoPlots: true}, Scenario: &sc})
	if err != nil {
		t.Fatal(err)
	}
	// the comparison again, with its figures (the runs' are not needed)
	if _, _, err := analysis.CompareDirs(d.Reports[0].OutDir, []string{d.Reports[1].OutDir}, d.CompareDir,
		analysis.CompareOptions{Options: analysis.Options{Version: version, Force: true, NoCoastlines: true}}); err != nil {
		t.Fatal(err)
	}
	drawn, _ := filepath.Glob(filepath.Join(d.CompareDir, compare.FiguresDir, "*.png"))
	if len(drawn) < 3 {
		t.Fatalf("compare drew %v", drawn)
	}
	out := filepath.Join(t.TempDir(), "again")
	var stdout, stderr bytes.Buffer
	if code := run([]string{"plot", d.CompareDir, "--no-coastlines", "--out", out}, &stdout, &stderr); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	if n := len(strings.Fields(stdout.String())); n != len(drawn) {
		t.Errorf("plot drew %d figures, compare %d", n, len(drawn))
	}
	for _, p := range drawn {
		a, _ := os.ReadFile(p)
		b, err := os.ReadFile(filepath.Join(out, filepath.Base(p)))
		if err != nil || !bytes.Equal(a, b) {
			t.Errorf("%s: redrawn differs from compare's (%v)", filepath.Base(p), err)
		}
	}
	stderr.Reset()
	if code := run([]string{"plot", d.CompareDir, "--only", "map_eis", "--out", t.TempDir()}, &stdout, &stderr); code != 1 || !strings.Contains(stderr.String(), "compare_sensitivities") {
		t.Errorf("--only map_eis on a comparison: exit %d, %q; want 1 naming its figures", code, stderr.String())
	}
}
