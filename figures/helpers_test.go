package figures

import (
	"gonum.org/v1/plot"
	"math"
	"os"
	"testing"
)

func TestDegreeLabel(t *testing.T) {
	cases := []struct {
		v    float64
		lat  bool
		want string
	}{
		{0, false, "0°"}, {60, false, "60°E"}, {-60, false, "60°W"}, {300, false, "60°W"},
		{180, false, "180°"}, {-180, false, "180°"}, {360, false, "0°"}, {120.5, false, "120.5°E"},
		{0, true, "0°"}, {30, true, "30°N"}, {-30, true, "30°S"},
	}
	for _, c := range cases {
		if got := degreeLabel(c.v, c.lat); got != c.want {
			t.Errorf("degreeLabel(%g, lat %v) = %q, want %q", c.v, c.lat, got, c.want)
		}
	}
}

// Percentiles by linear interpolation between order statistics (Hyndman &
// Fan 1996, Am. Stat. 50, definition 7; numpy's default), hand-worked.
func TestPercentile(t *testing.T) {
	v := []float64{4, math.NaN(), 1, 3, 2, math.Inf(1)}
	cases := []struct{ p, want float64 }{{0, 1}, {100, 4}, {50, 2.5}, {25, 1.75}, {98, 3.94}}
	for _, c := range cases {
		if got := percentile(v, c.p); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("percentile(%g) = %g, want %g", c.p, got, c.want)
		}
	}
	if !math.IsNaN(percentile([]float64{math.NaN()}, 50)) {
		t.Error("percentile of no finite value is not NaN")
	}
	if lo, hi := divergingLimits([]float64{-3, 1, 7.2}); lo != -10 || hi != 10 {
		t.Errorf("divergingLimits = %g…%g, want ±10", lo, hi)
	}
	if lo, hi := sequentialLimits([]float64{12.3, 15, 27.9}); lo != 10 || hi != 30 {
		t.Errorf("sequentialLimits = %g…%g, want 10…30", lo, hi)
	}
}

func TestNumPM(t *testing.T) {
	cases := []struct {
		v, e float64
		want string
	}{
		{4.4987, 0.0381, "4.499 ± 0.038"}, {4.54, 0.31, "4.54 ± 0.31"}, {-1.234, 2.5, "−1.2 ± 2.5"},
		{123.4, 17, "123 ± 17"}, {1, math.NaN(), "1"},
	}
	for _, c := range cases {
		if got := numPM(c.v, c.e); got != c.want {
			t.Errorf("numPM(%g, %g) = %q, want %q", c.v, c.e, got, c.want)
		}
	}
}

// The confidence band of a least-squares line, hand-worked: for
// y = 1 + 2x with SE(a) = 0.5, SE(b) = 0.1 and x̄ = 3, SE(ȳ)² = 0.25 − 9 ×
// 0.01 = 0.16; at x = 5, SE(ŷ)² = 0.16 + 4 × 0.01 = 0.2.
func TestBandLine(t *testing.T) {
	l := bandLine{a: 1, b: 2, seA: 0.5, seB: 0.1, xbar: 3, t: 2, factor: 1}
	y, h := l.at(5)
	if y != 11 || math.Abs(h-2*math.Sqrt(0.2)) > 1e-12 {
		t.Errorf("at(5) = %g ± %g, want 11 ± %g", y, h, 2*math.Sqrt(0.2))
	}
	if _, h := l.at(3); math.Abs(h-2*0.4) > 1e-12 {
		t.Errorf("at(x̄) half-width %g, want 0.8 (narrowest at the mean)", h)
	}
	// Student t 97.5 % quantiles (Fisher & Yates tables; from memory:
	// 12.706 for 1 dof, 2.228 for 10, 1.984 for 100).
	for _, c := range []struct{ dof, want float64 }{{1, 12.706}, {10, 2.228}, {100, 1.984}} {
		if got := t975(c.dof); math.Abs(got-c.want) > 5e-4 {
			t.Errorf("t975(%g) = %.4f, want %.3f", c.dof, got, c.want)
		}
	}
}

func field(lon []float64, dlon float64, vals func(lon float64) float64) *Field {
	f := &Field{Lat: []float64{0}, LatEdges: []float64{-5, 5}, Lon: lon}
	for _, x := range lon {
		f.LonWest, f.LonEast = append(f.LonWest, x-dlon/2), append(f.LonEast, x+dlon/2)
		f.Values = append(f.Values, vals(x))
	}
	return f
}

func TestChooseWindow(t *testing.T) {
	var global []float64
	for x := -175.0; x < 180; x += 10 {
		global = append(global, x)
	}
	pacific := field(global, 10, func(x float64) float64 {
		if math.Abs(x) < 60 {
			return math.NaN() // data only away from Greenwich
		}
		return 1
	})
	if w := chooseWindow(pacific); w.west != 0 || w.span != 360 {
		t.Errorf("Pacific data: window %+v, want 0…360", w)
	}
	atlantic := field(global, 10, func(x float64) float64 {
		if math.Abs(x) > 120 {
			return math.NaN()
		}
		return 1
	})
	if w := chooseWindow(atlantic); w.west != -180 || w.span != 360 {
		t.Errorf("Atlantic data: window %+v, want −180…180", w)
	}
	// A regional grid stored −180…180 across the dateline: 150°E…150°W.
	regional := field([]float64{-175, -165, -155, 155, 165, 175}, 10, func(float64) float64 { return 1 })
	if w := chooseWindow(regional); w.west != 150 || math.Abs(w.span-60) > 1e-9 {
		t.Errorf("regional grid across the dateline: window %+v, want 150…210", w)
	}
	for _, c := range []struct {
		lon  float64
		want int
	}{{152, 3}, {179, 5}, {181, 0}, {-178, 0}, {209, 2}, {0, -1}, {215, -1}} {
		if got := cellIndex(regional, c.lon); got != c.want {
			t.Errorf("cellIndex(%g) = %d, want %d", c.lon, got, c.want)
		}
	}
}

func TestYearTicks(t *testing.T) {
	labels := func(lo, hi float64) []string {
		var out []string
		for _, tk := range (yearTicks{}).Ticks(lo, hi) {
			if tk.Label != "" {
				out = append(out, tk.Label)
			}
		}
		return out
	}
	if got := labels(2001, 2002.99); len(got) != 4 || got[0] != "2001-01" || got[1] != "2001-07" {
		t.Errorf("2-year record: %v, want 2001-01, 2001-07, 2002-01, 2002-07", got)
	}
	if got := labels(1979, 2020); len(got) > 8 || got[0] != "1980" {
		t.Errorf("41-year record: %v, want at most eight labels from 1980", got)
	}
}

// ReadRelations never panics on arbitrary files, and what it accepts has
// joint composites of consistent size.
func FuzzReadRelations(f *testing.F) {
	f.Add([]byte(`{"format":"lidscope-relationships","format_version":3,"relationships_mode":"climatological"}`))
	f.Add([]byte(`{"format":"lidscope-relationships","format_version":3,"relationships_mode":"anomaly","joint_composites":[{"rel_sst_edges":[0,1],"eis_edges":[0,1],"mean":[{"value":null,"units":"1"}],"frequency":[{"value":0.5}],"count":[{"value":3}]}],"binned":[{"regime":"convective","bins":[{"lower":{"value":1}}]}]}`))
	f.Add([]byte(`{"format":"lidscope-relationships","format_version":3,"relationships_mode":"climatological","threshold":{"logistic":{"slope":{"value":2}}},"flips":[{"rows":[{"sst_perturbation":{"value":1}}]}]}`))
	f.Fuzz(func(t *testing.T, b []byte) {
		dir := t.TempDir()
		if err := os.WriteFile(dir+"/relationships.json", b, 0o644); err != nil {
			t.Fatal(err)
		}
		r, err := ReadRelations(dir)
		if err != nil || r == nil {
			return
		}
		for _, j := range r.Joint {
			if len(j.Mean) != (len(j.RelEdges)-1)*(len(j.EISEdge)-1) {
				t.Fatalf("accepted a joint composite of %d values for %d×%d bins", len(j.Mean), len(j.RelEdges)-1, len(j.EISEdge)-1)
			}
		}
	})
}

// PDF text is Windows-1252 bytes: ° is 0xB0, … 0x85, – 0x96; the minus sign
// and Greek letters are written in ASCII first (pdfText).
func TestPDFText(t *testing.T) {
	f := &fig{pdf: true}
	cases := []struct{ in, want string }{
		{"30°N", "30\xb0N"}, {"2001-01 … 2002-12", "2001-01 \x85 2002-12"}, {"30°S–30°N", "30\xb0S\x9630\xb0N"},
		{"SST − tropical-mean SST > δ", "SST - tropical-mean SST > delta "}, {"−20", "-20"}, {"ΔT (K)", "Delta T (K)"}, {"日本", "??"},
	}
	for _, c := range cases {
		if got := f.t(c.in); got != c.want {
			t.Errorf("PDF text of %q = %q, want %q", c.in, got, c.want)
		}
	}
	if got := (&fig{}).t("−20 °C"); got != "−20 °C" {
		t.Errorf("PNG/SVG text changed: %q", got)
	}
}

func TestDistinctLabels(t *testing.T) {
	ts := []plot.Tick{{Value: 297.8, Label: "298"}, {Value: 297.9}, {Value: 298.0, Label: "298"}, {Value: 298.2, Label: "298"}}
	got := distinctLabels(ts)
	if got[0].Label != "297.8" || got[2].Label != "298.0" || got[3].Label != "298.2" || got[1].Label != "" {
		t.Errorf("labels %q %q %q %q", got[0].Label, got[1].Label, got[2].Label, got[3].Label)
	}
	ok := []plot.Tick{{Value: 0, Label: "0"}, {Value: 50, Label: "50"}}
	if g := distinctLabels(ok); g[0].Label != "0" || g[1].Label != "50" {
		t.Error("distinct labels were rewritten")
	}
}
