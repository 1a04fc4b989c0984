package figures

import (
	"errors"
	"fmt"
	"image/color"
	"math"
	"sort"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"lidscope/compare"
	"lidscope/figures/internal/ramp"
	"lidscope/vocab"
)

// EnsembleMin is the number of candidates from which a comparison draws
// the ensemble figures (compare_ensemble_<sensitivity>): with fewer, the
// sensitivities figure shows every run already.
const EnsembleMin = 3

// sensitivitiesMax is the number of candidates up to which a comparison
// draws compare_sensitivities (every run side by side, one colour each):
// beyond it the colours would repeat, and the ensemble figures show them.
const sensitivitiesMax = 4

// ensembleRow is one candidate's estimate on the ensemble figure.
type ensembleRow struct {
	name      string
	v, lo, hi float64 // display units
	verdict   string  // vocab.Within, vocab.Outside or vocab.Untested
}

// ensembleSpread is the spread of the candidates' values (display
// units): unweighted, each candidate one value.
type ensembleSpread struct {
	n        int
	mean, sd float64 // sample standard deviation (n − 1)
	min, max float64
}

// ensembleRows are the candidates' values of estimate name in display
// units (× factor), sorted by value (ascending; ties by name), and the
// names of the candidates without one.
func ensembleRows(res *compare.Result, name string, factor float64) (rows []ensembleRow, missing []string) {
	for _, c := range res.Candidates {
		found := false
		for _, e := range c.Estimates {
			if e.Name != name {
				continue
			}
			if math.IsNaN(e.Cand) || math.IsInf(e.Cand, 0) {
				break
			}
			rows = append(rows, ensembleRow{c.Name, e.Cand * factor, e.CandCI.Lo * factor, e.CandCI.Hi * factor, compare.Verdict(e)})
			found = true
			break
		}
		if !found {
			missing = append(missing, c.Name)
		}
	}
	sort.SliceStable(rows, func(i, j int) bool {
		if rows[i].v != rows[j].v {
			return rows[i].v < rows[j].v
		}
		return rows[i].name < rows[j].name
	})
	return rows, missing
}

// spreadOf is the unweighted mean, sample standard deviation, minimum and
// maximum of the rows' values (common practice; sd NaN for one value).
func spreadOf(rows []ensembleRow) ensembleSpread {
	s := ensembleSpread{n: len(rows), min: math.Inf(1), max: math.Inf(-1), sd: math.NaN(), mean: math.NaN()}
	if len(rows) == 0 {
		return s
	}
	sum := 0.0
	for _, r := range rows {
		sum += r.v
		s.min, s.max = math.Min(s.min, r.v), math.Max(s.max, r.v)
	}
	s.mean = sum / float64(len(rows))
	if len(rows) > 1 {
		ss := 0.0
		for _, r := range rows {
			ss += (r.v - s.mean) * (r.v - s.mean)
		}
		s.sd = math.Sqrt(ss / float64(len(rows)-1))
	}
	return s
}

// sensitivityUnits turns a sensitivity's units into the text shown and the
// factor applied: a fraction per kelvin ("K-1", the cloud responses) in
// per cent per kelvin; anything else as displayUnits.
func sensitivityUnits(u string) (string, float64) {
	if strings.TrimSpace(u) == "K-1" {
		return "% per K", 100
	}
	return displayUnits(u)
}

// Verdict colours and shapes: from the ends of the diverging map fulcrum
// (within: its blue-green end; outside: its rust end) and a mid grey of
// pumice for untested; shapes differ too, for grey print.
var (
	withinColour   = mustMap("fulcrum").At(0.08).RGBA()
	outsideColour  = mustMap("fulcrum").At(0.92).RGBA()
	untestedColour = mustMap("pumice").At(0.45).RGBA()
	refBandColour  = mustMap("pumice").At(0.9).RGBA()
	spreadColour   = mustMap("pumice").At(0.0).RGBA()
)

func mustMap(name string) ramp.Map {
	m, err := ramp.ByName(name)
	if err != nil {
		panic(err)
	}
	return m
}

func verdictGlyph(v string) draw.GlyphStyle {
	switch v {
	case vocab.Within:
		return draw.GlyphStyle{Color: withinColour, Radius: 2.1, Shape: draw.CircleGlyph{}}
	case vocab.Outside:
		return draw.GlyphStyle{Color: outsideColour, Radius: 2.3, Shape: draw.BoxGlyph{}}
	}
	return draw.GlyphStyle{Color: untestedColour, Radius: 2.3, Shape: draw.TriangleGlyph{}}
}

func verdictColour(v string) color.Color { return verdictGlyph(v).Color }

// ensembleRowHeight is the height of one candidate's row: room for a tick
// label (8 pt) with a little space, at most 0.22 in for few candidates.
func ensembleRowHeight(n int) vg.Length {
	h := 5.6 * vg.Inch / vg.Length(max(n, 1))
	return vg.Length(math.Min(math.Max(float64(h), float64(0.135*vg.Inch)), float64(0.22*vg.Inch)))
}

// ensembleLabelSize is the size of the candidates' names: the tick size,
// 7 pt beyond 30 candidates (rows of ensembleRowHeight stay apart).
func ensembleLabelSize(n int) vg.Length {
	if n > 30 {
		return 7
	}
	return sizeTick
}

// ensemblePlot draws the rows (y = 0 … n−1 from the bottom), the
// reference's value and interval, and the spread row at y = −1.5.
type ensemblePlot struct {
	rows          []ensembleRow
	ref, rlo, rhi float64
	spread        ensembleSpread
}

const spreadY = -1.5

func (ep ensemblePlot) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	if !math.IsNaN(ep.rlo) && !math.IsNaN(ep.rhi) {
		r := vg.Rectangle{Min: vg.Point{X: trX(math.Max(ep.rlo, p.X.Min)), Y: c.Min.Y}, Max: vg.Point{X: trX(math.Min(ep.rhi, p.X.Max)), Y: c.Max.Y}}
		c.SetColor(refBandColour)
		c.Fill(r.Path())
	}
	if !math.IsNaN(ep.ref) {
		c.StrokeLine2(draw.LineStyle{Color: lineBlack, Width: 0.9}, trX(ep.ref), c.Min.Y, trX(ep.ref), c.Max.Y)
	}
	// a rule between the candidates and the spread row
	c.StrokeLine2(draw.LineStyle{Color: gridColour, Width: 0.6}, c.Min.X, trY(-0.75), c.Max.X, trY(-0.75))
	for i, r := range ep.rows {
		y := trY(float64(i))
		ls := draw.LineStyle{Color: verdictColour(r.verdict), Width: 0.9}
		if !math.IsNaN(r.lo) && !math.IsNaN(r.hi) {
			c.StrokeLine2(ls, trX(r.lo), y, trX(r.hi), y)
			c.StrokeLine2(ls, trX(r.lo), y-1.8, trX(r.lo), y+1.8)
			c.StrokeLine2(ls, trX(r.hi), y-1.8, trX(r.hi), y+1.8)
		}
		c.DrawGlyph(verdictGlyph(r.verdict), vg.Point{X: trX(r.v), Y: y})
	}
	s := ep.spread
	if s.n > 0 {
		y := trY(spreadY)
		thin := draw.LineStyle{Color: spreadColour, Width: 0.8}
		c.StrokeLine2(thin, trX(s.min), y, trX(s.max), y)
		c.StrokeLine2(thin, trX(s.min), y-2.5, trX(s.min), y+2.5)
		c.StrokeLine2(thin, trX(s.max), y-2.5, trX(s.max), y+2.5)
		if !math.IsNaN(s.sd) {
			c.StrokeLine2(draw.LineStyle{Color: spreadColour, Width: 4}, trX(s.mean-s.sd), y, trX(s.mean+s.sd), y)
		}
		c.DrawGlyph(draw.GlyphStyle{Color: color.White, Radius: 4, Shape: draw.PyramidGlyph{}}, vg.Point{X: trX(s.mean), Y: y})
		c.DrawGlyph(draw.GlyphStyle{Color: spreadColour, Radius: 3, Shape: draw.PyramidGlyph{}}, vg.Point{X: trX(s.mean), Y: y})
	}
}

func (ep ensemblePlot) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, xmax = math.Inf(1), math.Inf(-1)
	for _, r := range ep.rows {
		for _, x := range []float64{r.v, r.lo, r.hi} {
			if !math.IsNaN(x) && !math.IsInf(x, 0) {
				xmin, xmax = math.Min(xmin, x), math.Max(xmax, x)
			}
		}
	}
	for _, x := range []float64{ep.ref, ep.rlo, ep.rhi} {
		if !math.IsNaN(x) && !math.IsInf(x, 0) {
			xmin, xmax = math.Min(xmin, x), math.Max(xmax, x)
		}
	}
	if xmin > xmax {
		xmin, xmax = -1, 1
	}
	pad := 0.04 * (xmax - xmin)
	if pad == 0 {
		pad = 0.5
	}
	return xmin - pad, xmax + pad, spreadY - 0.8, float64(len(ep.rows)) - 0.4
}

type thumbGlyph struct{ g draw.GlyphStyle }

func (t thumbGlyph) Thumbnail(c *draw.Canvas) {
	ctr := vg.Point{X: (c.Min.X + c.Max.X) / 2, Y: (c.Min.Y + c.Max.Y) / 2}
	c.StrokeLine2(draw.LineStyle{Color: t.g.Color, Width: 0.9}, c.Min.X+2, ctr.Y, c.Max.X-2, ctr.Y)
	c.DrawGlyph(t.g, ctr)
}

type thumbFill struct{ col color.Color }

func (t thumbFill) Thumbnail(c *draw.Canvas) {
	c.SetColor(t.col)
	c.Fill(c.Rectangle.Path())
}

type thumbSpread struct{}

func (thumbSpread) Thumbnail(c *draw.Canvas) {
	ctr := vg.Point{X: (c.Min.X + c.Max.X) / 2, Y: (c.Min.Y + c.Max.Y) / 2}
	c.StrokeLine2(draw.LineStyle{Color: spreadColour, Width: 0.8}, c.Min.X+1, ctr.Y, c.Max.X-1, ctr.Y)
	c.StrokeLine2(draw.LineStyle{Color: spreadColour, Width: 4}, ctr.X-5, ctr.Y, ctr.X+5, ctr.Y)
	c.DrawGlyph(draw.GlyphStyle{Color: color.White, Radius: 4, Shape: draw.PyramidGlyph{}}, ctr)
	c.DrawGlyph(draw.GlyphStyle{Color: spreadColour, Radius: 3, Shape: draw.PyramidGlyph{}}, ctr)
}

// estimateLabel is how a figure names a sensitivity: "slope on EIS",
// "partial on EIS, LTS fixed".
func estimateLabel(e compare.Estimate) string {
	if i := strings.Index(e.Name, "_on_"); i >= 0 && e.Kind == "slope" {
		return "slope on " + lowerFirst(predictorLabel(e.Name[i+4:]))
	}
	if i := strings.Index(e.Name, "_partial_"); i >= 0 {
		on, given, ok := strings.Cut(e.Name[i+9:], "_given_")
		if ok {
			return "partial on " + lowerFirst(predictorLabel(on)) + ", " + lowerFirst(predictorLabel(given)) + " fixed"
		}
		return "partial on " + lowerFirst(predictorLabel(on))
	}
	return e.Name
}

// ensemblePage draws one sensitivity of every candidate of a comparison:
// one row per candidate, sorted by value, each a point with its 95 %
// interval coloured and shaped by its verdict against the reference; the
// reference's value (a line) and 95 % interval (a band) behind them; and,
// under a rule, the ensemble's spread: the unweighted mean ± one standard
// deviation (thick bar, triangle) and the minimum–maximum range (thin
// line).
func (f *fig) ensemblePage(res *compare.Result, est compare.Estimate) (*page, error) {
	u, factor := sensitivityUnits(est.Units)
	rows, missing := ensembleRows(res, est.Name, factor)
	if len(rows) == 0 {
		return nil, errors.New("no candidate has the sensitivity " + est.Name)
	}
	ep := ensemblePlot{rows: rows, ref: est.Ref * factor, rlo: est.RefCI.Lo * factor, rhi: est.RefCI.Hi * factor, spread: spreadOf(rows)}
	p := f.newPlot()
	g := lightGrid()
	g.Horizontal.Color = color.Transparent
	p.Add(g, ep)
	var ticks []plot.Tick
	for i, r := range rows {
		ticks = append(ticks, plot.Tick{Value: float64(i), Label: f.t(r.name)})
	}
	s := ep.spread
	ticks = append(ticks, plot.Tick{Value: spreadY, Label: f.t(fmt.Sprintf("ensemble (%d)", s.n))})
	p.Y.Tick.Marker = plot.ConstantTicks(ticks)
	p.Y.Tick.Label.Font.Size = ensembleLabelSize(len(rows))
	p.Y.Tick.Length = 2
	p.X.Padding, p.Y.Padding = 0, 0 // the axes on the frame
	resp := lowerFirst(responseLabel(cloudResponseOf(res)))
	p.X.Label.Text = f.t(fmt.Sprintf("Sensitivity of the %s, %s (%s)", resp, estimateLabel(est), u))
	rh := ensembleRowHeight(len(rows))
	plotH := vg.Length(len(rows)+2)*rh + 0.55*vg.Inch

	leg := plot.NewLegend()
	leg.TextStyle = style(sizeLegend, false)
	leg.ThumbnailWidth = 0.3 * vg.Inch
	leg.Padding = 2
	leg.Left, leg.Top = true, true
	leg1Texts := []string{f.t("candidate ± 95 % interval, within the combined uncertainty"), f.t("candidate ± 95 % interval, outside it")}
	leg.Add(leg1Texts[0], thumbGlyph{verdictGlyph(vocab.Within)})
	leg.Add(leg1Texts[1], thumbGlyph{verdictGlyph(vocab.Outside)})
	if hasVerdict(rows, vocab.Untested) {
		leg1Texts = append(leg1Texts, f.t("candidate, untested (no interval)"))
		leg.Add(leg1Texts[2], thumbGlyph{verdictGlyph(vocab.Untested)})
	}
	leg2 := plot.NewLegend()
	leg2.TextStyle, leg2.ThumbnailWidth, leg2.Padding, leg2.Left, leg2.Top = leg.TextStyle, leg.ThumbnailWidth, leg.Padding, true, true
	leg2.Add(f.t(fmt.Sprintf("reference (%s)", res.Reference.Name)), vlineThumb{draw.LineStyle{Color: lineBlack, Width: 0.9}})
	leg2.Add(f.t("reference 95 % interval"), thumbFill{refBandColour})
	leg2.Add(f.t("ensemble mean ± 1 sd; min–max"), thumbSpread{})
	legH := vg.Length(3) * lineHeight(leg.TextStyle) * 1.25

	facts := fmt.Sprintf("Ensemble of %d candidates, unweighted (each candidate one value): mean %s, sd %s, min %s, max %s %s; reference %s (95 %% interval %s … %s). %d within, %d outside the combined uncertainty (%s).",
		s.n, fmtNum(s.mean), fmtNum(s.sd), fmtNum(s.min), fmtNum(s.max), u, fmtNum(ep.ref), fmtNum(ep.rlo), fmtNum(ep.rhi),
		countVerdict(rows, vocab.Within), countVerdict(rows, vocab.Outside), "√(h_ref² + h_cand²) of the two 95 % half-widths")
	if len(missing) > 0 {
		facts += fmt.Sprintf(" Without this sensitivity (not drawn): %s.", strings.Join(missing, ", "))
	}
	bw := bodyWidth()
	factStyle := withColour(style(sizeSubtitle, false), subtleColour)
	factBlock := textBlock{wrap(f.t(facts), factStyle, bw), factStyle}

	title := fmt.Sprintf("Ensemble: %s of the %s in the subsidence regime, %d candidates sorted by value, with 95 %% intervals",
		estimateLabel(est), resp, len(rows))
	head := f.header(title, bw)
	pg := &page{header: head, footer: f.footer(bw), bodyH: plotH + 6 + legH + 4 + factBlock.height()}
	pg.body = func(c draw.Canvas) {
		pc := c
		pc.Min.Y = c.Max.Y - plotH
		p.Draw(pc)
		dc := p.DataCanvas(pc)
		frame(c, dc.Rectangle)
		f.dataArea = dc.Rectangle
		lc := c
		lc.Max.Y = pc.Min.Y - 6
		lc.Min.Y = lc.Max.Y - legH
		left, right := lc, lc
		left.Min.X = c.Min.X
		left.Max.X = c.Min.X + legendWidth(leg, leg1Texts)
		right.Min.X = left.Max.X + 0.2*vg.Inch
		leg.Draw(left)
		leg2.Draw(right)
		factBlock.draw(c, c.Min.X, lc.Min.Y-4)
	}
	return pg, nil
}

func hasVerdict(rows []ensembleRow, v string) bool { return countVerdict(rows, v) > 0 }

func countVerdict(rows []ensembleRow, v string) int {
	n := 0
	for _, r := range rows {
		if r.verdict == v {
			n++
		}
	}
	return n
}

// fmtNum writes a figure's number with three significant digits.
func fmtNum(x float64) string {
	if math.IsNaN(x) {
		return "—"
	}
	return minus(fmt.Sprintf("%.3g", x))
}

// legendWidth is the width a legend of these entries takes: thumbnail,
// padding and the widest text.
func legendWidth(l plot.Legend, texts []string) vg.Length {
	w := vg.Length(0)
	for _, t := range texts {
		w = max(w, l.TextStyle.Width(t))
	}
	return l.ThumbnailWidth + 2*l.Padding + w
}
