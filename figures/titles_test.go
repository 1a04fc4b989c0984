package figures

import (
	"math"
	"strings"
	"testing"

	"lidscope/compare"
	"lidscope/relations"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/recorder"
)

// recordPage lays out a figure of the fixture run and draws it into a
// recorder, returning the strings drawn with their positions.
func recordPage(t *testing.T, name string) (*fig, []*recorder.FillString) {
	t.Helper()
	fg, pg := build(t, name, "png", 72)
	rec := &recorder.Canvas{}
	c := draw.NewCanvas(rec, pageWidth, pg.height())
	pg.draw(c)
	var out []*recorder.FillString
	for _, a := range rec.Actions {
		if s, ok := a.(*recorder.FillString); ok {
			out = append(out, s)
		}
	}
	return fg, out
}

// The panel titles of pages with panels side by side sit on one baseline,
// each centred over its panel's data area (gonum centred each over its
// whole tile, axis labels included, and plot.Align moved the tiles: the
// flips page's two titles were at different heights and both off centre).
func TestPanelTitlesAligned(t *testing.T) {
	cases := []struct {
		figure string
		titles []string
	}{
		{"flips", []string{"Patch area × time changing regime", "Change of convective area fraction"}},
		{"relationships_eis", []string{"Convective regime", "Transition regime", "Subsidence regime"}},
		{"joint_composite", []string{"Mean cloud area fraction", "Frequency of occurrence"}},
	}
	for _, tc := range cases {
		t.Run(tc.figure, func(t *testing.T) {
			fg, strs := recordPage(t, tc.figure)
			if len(fg.panels) != len(tc.titles) {
				t.Fatalf("%d panels recorded, want %d", len(fg.panels), len(tc.titles))
			}
			st := fg.panelTitleStyle()
			var ys []vg.Length
			for i, title := range tc.titles {
				var got *recorder.FillString
				for _, s := range strs {
					if s.String == title {
						if got != nil {
							t.Fatalf("title %q drawn twice", title)
						}
						got = s
					}
				}
				if got == nil {
					t.Fatalf("title %q not drawn", title)
				}
				centre := got.Point.X + st.Width(title)/2
				want := (fg.panels[i].Min.X + fg.panels[i].Max.X) / 2
				if math.Abs(float64(centre-want)) > 0.5 {
					t.Errorf("title %q centred at x = %.1f pt, its data area at %.1f pt", title, centre, want)
				}
				if got.Point.Y < fg.panels[i].Max.Y {
					t.Errorf("title %q at y = %.1f pt is inside its data area (top %.1f pt)", title, got.Point.Y, fg.panels[i].Max.Y)
				}
				ys = append(ys, got.Point.Y)
			}
			for _, y := range ys[1:] {
				if math.Abs(float64(y-ys[0])) > 0.01 {
					t.Errorf("panel titles at y = %v pt, want one baseline", ys)
				}
			}
		})
	}
}

// The flips legend names patches in words, never by their study ids.
func TestFlipsLegendReadable(t *testing.T) {
	_, strs := recordPage(t, "flips")
	var legend []string
	for _, s := range strs {
		if strings.Contains(s.String, "west_pacific") {
			t.Errorf("the flips figure shows the raw patch id: %q", s.String)
		}
		if strings.Contains(s.String, "patch") {
			legend = append(legend, s.String)
		}
	}
	for _, want := range []string{"west Pacific patch (f = ", "inside west Pacific patch", "outside west Pacific patch, in the band"} {
		found := false
		for _, l := range legend {
			found = found || strings.HasPrefix(l, want)
		}
		if !found {
			t.Errorf("no legend entry %q in %q", want, legend)
		}
	}
}

// TestPlaceWords: a region's study name in words in panel titles and row
// labels (factor_sensitivities, constraint_changes), capitals for the
// ocean names only.
func TestPlaceWords(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"cold_tongue", "cold tongue"},
		{"upwelling_magna_north", "upwelling magna north"},
		{"south_atlantic-deck", "south Atlantic deck"},
		{"", ""},
	} {
		if got := placeWords(c.in); got != c.want {
			t.Errorf("placeWords(%q) = %q, want %q", c.in, got, c.want)
		}
		if got := ConstraintLabel(c.in, "subsidence"); c.in != "" && got != c.want+", subsidence" {
			t.Errorf("ConstraintLabel(%q) = %q", c.in, got)
		}
	}
}

func TestPatchLabel(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"east_pacific", "east Pacific patch"},
		{"west_pacific_edge", "west Pacific edge patch"},
		{"peru-deck", "Peru deck patch"},
		{"nino34", "nino34 patch"},
		{"box", "box patch"},
		{"", "patch"},
	} {
		if got := patchLabel(c.in); got != c.want {
			t.Errorf("patchLabel(%q) = %q, want %q", c.in, got, c.want)
		}
	}
}

// The comparison's sensitivity page names the reference and every
// candidate in its subtitle (it named only the reference).
func TestSensitivitySubtitleNamesCandidates(t *testing.T) {
	run, err := Load(fixture(t))
	if err != nil {
		t.Fatal(err)
	}
	est := func(v float64) compare.Estimate {
		return compare.Estimate{Name: "low_cloud_on_eis", Kind: "slope", Units: "K-1", Ref: 0.05, Cand: v,
			RefCI: relations.Interval{Lo: 0.04, Hi: 0.06}, CandCI: relations.Interval{Lo: v - 0.01, Hi: v + 0.01}}
	}
	res := &compare.Result{Reference: compare.Run{Name: "obs-a"}, ReferenceEstimates: []compare.Estimate{est(0.05)}}
	for _, c := range []struct {
		names []string
		want  string
	}{
		{[]string{"model-x"}, "obs-a (reference) vs model-x (candidate)"},
		{[]string{"model-x", "model-y"}, "obs-a (reference) vs model-x and model-y (candidates)"},
		{[]string{"m1", "m2", "m3", "m4", "m5", "m6", "m7", "m8"}, "obs-a (reference) vs 8 candidates (m1, m2, … m8)"},
	} {
		res.Candidates = nil
		for _, n := range c.names {
			res.Candidates = append(res.Candidates, compare.Candidate{Name: n, Estimates: []compare.Estimate{est(0.03)}})
		}
		fg := &fig{run: run, name: "compare_sensitivities", format: "png", dpi: 72}
		pg, err := fg.sensitivityPage(res)
		if err != nil {
			t.Fatal(err)
		}
		sub := strings.Join(pg.header[1].lines, " ")
		if !strings.HasPrefix(sub, c.want+" · ") {
			t.Errorf("subtitle %q, want it to start with %q", sub, c.want)
		}
	}
}

// A difference of percentages is labelled in percentage points.
func TestDifferenceLabel(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"Time in the convective regime (%)", "Difference: time in the convective regime (percentage points)"},
		{"Regime crossings (number per year of record)", "Difference: regime crossings (number per year of record)"},
	} {
		if got := differenceLabel(c.in); got != c.want {
			t.Errorf("differenceLabel(%q) = %q, want %q", c.in, got, c.want)
		}
	}
}
