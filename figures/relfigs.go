package figures

import (
	"fmt"
	"image/color"
	"lidscope/vocab"
	"math"
	"strings"

	"gonum.org/v1/gonum/stat/distuv"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"lidscope/regimes"
	"lidscope/relations"
)

// The relationship figures need the results of package relations; they are
// drawn when Options.Relations holds them.

func init() {
	for _, p := range []struct{ pred, label string }{{"eis", "EIS"}, {"lts", "LTS"}, {relations.RelSST, "relative SST"}} {
		p := p
		register(figure{name: vocab.Relationships + "_" + p.pred,
			describe: "cloud against " + p.label + " per regime: bin means with 95 % intervals, counts, the weighted OLS line with its 95 % band",
			needs: func(r *Run) (bool, string, error) {
				if r.relations == nil {
					return false, "no relationship results (relations)", nil
				}
				if _, ok := pickBinned(r.relations, p.pred); !ok {
					return false, "the relationship results have no binned cloud relation against " + p.pred, nil
				}
				return true, "", nil
			},
			build: func(f *fig) (*page, error) { return f.relationPage(p.pred) }})
	}
	register(
		figure{name: "joint_composite", describe: "mean cloud and frequency over relative SST × EIS bins (heat maps)",
			needs: func(r *Run) (bool, string, error) {
				if r.relations == nil {
					return false, "no relationship results (relations)", nil
				}
				if pickJoint(r.relations) == nil {
					return false, "the relationship results have no joint composite", nil
				}
				return true, "", nil
			},
			build: func(f *fig) (*page, error) { return f.jointPage() }},
		figure{name: "flips", describe: "perturbation flips: fraction of patch area × time changing regime against ΔT, warming and cooling on one axis",
			needs: func(r *Run) (bool, string, error) {
				if r.relations == nil || len(r.relations.Flips) == 0 {
					return false, "no perturbation-flip results", nil
				}
				return true, "", nil
			},
			build: func(f *fig) (*page, error) { return f.flipsPage() }},
		figure{name: "threshold", describe: "probability of convection against relative SST with the logistic fit and the threshold's 95 % interval",
			needs: func(r *Run) (bool, string, error) {
				if r.relations == nil || r.relations.Threshold == nil {
					return false, "no threshold estimate (set a convection indicator)", nil
				}
				return true, "", nil
			},
			build: func(f *fig) (*page, error) { return f.thresholdPage() }},
	)
}

// cloudResponse is the response the relationship figures show: cloud, else
// low_cloud, else the first response.
func cloudResponse(res *relations.Results) string {
	for _, want := range []string{"cloud", "low_cloud"} {
		for _, v := range res.Responses {
			if v.Name == want {
				return want
			}
		}
	}
	if len(res.Responses) > 0 {
		return res.Responses[0].Name
	}
	return ""
}

// pickBinned returns the band, whole-record binned relations of the cloud
// response against pred, one per regime in the order of regimes.All.
func pickBinned(res *relations.Results, pred string) ([]*relations.Binned, bool) {
	resp := cloudResponse(res)
	var out []*relations.Binned
	for _, reg := range []regimes.Regime{regimes.Convective, regimes.Transition, regimes.Subsidence} {
		for i := range res.Binned {
			b := &res.Binned[i]
			if b.Domain == relations.BandDomain && b.Season == "all" && b.Regime == reg && b.Predictor == pred && b.Response == resp {
				if reg == regimes.Transition && binnedSamples(b) == 0 {
					continue // no transition band defined (or none sampled): no empty panel
				}
				out = append(out, b)
			}
		}
	}
	return out, len(out) > 0
}

func pickRegression(res *relations.Results, b *relations.Binned) *relations.Regression {
	for i := range res.Regressions {
		g := &res.Regressions[i]
		if g.Domain == b.Domain && g.Season == b.Season && g.Regime == b.Regime && g.Predictor == b.Predictor && g.Response == b.Response {
			return g
		}
	}
	return nil
}

func pickJoint(res *relations.Results) *relations.Joint {
	resp := cloudResponse(res)
	for i := range res.Joint {
		j := &res.Joint[i]
		if j.Domain == relations.BandDomain && j.Season == "all" && j.Response == resp {
			return j
		}
	}
	return nil
}

// displayUnits turns a CF/UDUNITS unit string into the text shown on a
// figure and the factor applied to values: fractions ("1") are shown in per
// cent (the axis says so); every other unit is shown as the files spell it
// (UDUNITS-2: K, K-1, W m-2, yr-1), with factor 1.
func displayUnits(u string) (string, float64) {
	switch strings.TrimSpace(u) {
	case "1", "":
		return "%", 100
	}
	return u, 1
}

func predictorLabel(pred string) string {
	switch pred {
	case "eis":
		return "EIS"
	case "lts":
		return "LTS"
	case relations.RelSST:
		return "Relative SST"
	}
	return strings.ToUpper(pred)
}

func responseLabel(resp string) string {
	switch resp {
	case "cloud":
		return "Cloud area fraction"
	case "low_cloud":
		return "Low-cloud area fraction"
	case "toa_sw_up":
		return "Reflected shortwave at TOA"
	}
	return resp
}

// t975 is the 97.5 % quantile of Student's t with dof degrees of freedom
// (the half-width factor of a two-sided 95 % interval); NaN below 1 dof.
func t975(dof float64) float64 {
	if !(dof >= 1) {
		return math.NaN()
	}
	return distuv.StudentsT{Mu: 0, Sigma: 1, Nu: dof}.Quantile(0.975)
}

func modeText(res *relations.Results) string {
	if res.Mode == relations.Anomaly {
		if res.Detrended {
			return "deseasonalised, detrended anomalies"
		}
		return "deseasonalised anomalies"
	}
	return "climatological composites"
}

// regimeColour is the line colour of a regime.
func regimeColour(r regimes.Regime) color.Color {
	switch r {
	case regimes.Convective:
		return lineOrange
	case regimes.Subsidence:
		return lineBlue
	}
	return lineGreen
}

// bandLine is a regression line with its 95 % confidence band over x0…x1:
// ŷ = a + b x, SE(ŷ)² = SE(ȳ)² + (x − x̄)² SE(b)², SE(ȳ)² = SE(a)² −
// x̄² SE(b)² (weighted least squares, e.g. Draper & Smith 1998 §1.4 with
// weights; cov(a, b) = −x̄ SE(b)²), half-width t(0.975, N_eff − 2)·SE(ŷ).
type bandLine struct {
	a, b, seA, seB, xbar, t float64
	x0, x1, factor          float64
	colour                  color.Color
}

func (l bandLine) at(x float64) (y, half float64) {
	y = l.a + l.b*x
	v := math.Max(0, l.seA*l.seA-l.xbar*l.xbar*l.seB*l.seB) + (x-l.xbar)*(x-l.xbar)*l.seB*l.seB
	return y * l.factor, l.t * math.Sqrt(v) * l.factor
}

func (l bandLine) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	const n = 60
	var up, dn, mid []vg.Point
	for i := 0; i <= n; i++ {
		x := l.x0 + (l.x1-l.x0)*float64(i)/n
		y, h := l.at(x)
		mid = append(mid, vg.Point{X: trX(x), Y: trY(y)})
		if !math.IsNaN(h) {
			up = append(up, vg.Point{X: trX(x), Y: trY(y + h)})
			dn = append(dn, vg.Point{X: trX(x), Y: trY(y - h)})
		}
	}
	if len(up) > 1 {
		poly := append([]vg.Point{}, up...)
		for i := len(dn) - 1; i >= 0; i-- {
			poly = append(poly, dn[i])
		}
		r, g, b, _ := l.colour.RGBA()
		c.FillPolygon(color.NRGBA{uint8(r >> 8), uint8(g >> 8), uint8(b >> 8), 60}, c.ClipPolygonXY(poly))
	}
	c.StrokeLines(draw.LineStyle{Color: l.colour, Width: 1.2}, c.ClipLinesXY(mid)...)
}

func (l bandLine) Thumbnail(c *draw.Canvas) {
	y := (c.Min.Y + c.Max.Y) / 2
	c.StrokeLine2(draw.LineStyle{Color: l.colour, Width: 1.2}, c.Min.X, y, c.Max.X, y)
}

// countBars draws sample counts as thin grey bars rising from the bottom of
// the data area, the tallest 18 % of its height.
type countBars struct {
	lo, hi []float64
	n      []float64
	nmax   float64
}

func (cb countBars) Plot(c draw.Canvas, p *plot.Plot) {
	trX, _ := p.Transforms(&c)
	h := (c.Max.Y - c.Min.Y) * 0.18
	for i := range cb.n {
		if cb.n[i] <= 0 {
			continue
		}
		x0, x1 := trX(cb.lo[i]), trX(cb.hi[i])
		top := c.Min.Y + vg.Length(cb.n[i]/cb.nmax)*h
		pts := []vg.Point{{X: x0, Y: c.Min.Y}, {X: x1, Y: c.Min.Y}, {X: x1, Y: top}, {X: x0, Y: top}}
		c.FillPolygon(color.Gray{0xc8}, c.ClipPolygonX(pts))
	}
}

// note writes lines of text in a corner of the data area.
type note struct {
	lines []string
	right bool
}

func (n note) Plot(c draw.Canvas, p *plot.Plot) {
	st := style(sizeLegend, false)
	st.YAlign = text.YTop
	x := c.Min.X + 5
	if n.right {
		st.XAlign = text.XRight
		x = c.Max.X - 5
	}
	for i, l := range n.lines {
		c.FillText(st, vg.Point{X: x, Y: c.Max.Y - 4 - vg.Length(i)*lineHeight(st)}, l)
	}
}

// slopeUnitsNote explains, when the response axis is drawn in % but the
// printed slope keeps the units of the output files (a fraction 0–1 per
// predictor unit), how the two relate, so a reader does not take the slope
// as % per K.
func slopeUnitsNote(rf float64, pu string) string {
	if rf != 100 {
		return ""
	}
	return fmt.Sprintf(", in the units of the output files (fraction 0–1 per %s; ×100 gives %% per %s as on the axis)", pu, pu)
}

func (f *fig) relationPage(pred string) (*page, error) {
	res := f.run.relations
	bs, _ := pickBinned(res, pred)
	resp := bs[0].Response
	ru, rf := displayUnits(bs[0].RespUnits)
	pu, pf := displayUnits(bs[0].PredUnits)
	if pf != 1 {
		pu, pf = bs[0].PredUnits, 1
	}
	// One y range for all panels, with room at the bottom for the counts.
	ylo, yhi := math.Inf(1), math.Inf(-1)
	nmax := 0.0
	for _, b := range bs {
		for _, s := range b.Bins {
			if s.N == 0 || math.IsNaN(s.Mean) {
				continue
			}
			e := t975(s.NEff-1) * s.StdErr
			if math.IsNaN(e) {
				e = 0
			}
			ylo, yhi = math.Min(ylo, (s.Mean-e)*rf), math.Max(yhi, (s.Mean+e)*rf)
			nmax = math.Max(nmax, float64(s.N))
		}
	}
	if math.IsInf(ylo, 0) {
		return nil, fmt.Errorf("the binned relations against %s have no populated bin", pred)
	}
	span := math.Max(yhi-ylo, 1e-9)
	ylo, yhi = ylo-0.3*span, yhi+0.25*span
	var plots []*plot.Plot
	var titles []string
	for k, b := range bs {
		p := f.newPlot()
		p.Add(lightGrid())
		titles = append(titles, upperFirst(b.Regime.String())+" regime")
		p.X.Label.Text = f.t(fmt.Sprintf("%s (%s)", predictorLabel(pred), pu))
		if k == 0 {
			p.Y.Label.Text = f.t(fmt.Sprintf("%s (%s)", responseLabel(resp), ru))
		}
		p.Y.Min, p.Y.Max = ylo, yhi
		var lo, hi, ns []float64
		var pts plotter.XYs
		var errs plotter.YErrors
		xlo, xhi := math.Inf(1), math.Inf(-1)
		var sw, swx float64
		for _, s := range b.Bins {
			lo, hi = append(lo, s.Lower*pf), append(hi, s.Upper*pf)
			ns = append(ns, float64(s.N))
			if s.N == 0 || math.IsNaN(s.Mean) {
				continue
			}
			mid := (s.Lower + s.Upper) / 2
			e := t975(s.NEff-1) * s.StdErr * rf
			if math.IsNaN(e) {
				e = 0
			}
			pts = append(pts, plotter.XY{X: mid * pf, Y: s.Mean * rf})
			errs = append(errs, struct{ Low, High float64 }{e, e})
			xlo, xhi = math.Min(xlo, s.Lower), math.Max(xhi, s.Upper)
			sw += s.Area
			swx += s.Area * mid
		}
		p.X.Min, p.X.Max = b.Bins[0].Lower*pf, b.Bins[len(b.Bins)-1].Upper*pf
		p.Add(countBars{lo: lo, hi: hi, n: ns, nmax: nmax})
		colour := regimeColour(b.Regime)
		var lines []string
		if g := pickRegression(res, b); g != nil && !math.IsNaN(g.Slope) && len(pts) > 1 {
			bl := bandLine{a: g.Intercept, b: g.Slope, seA: g.InterceptSE, seB: g.SlopeSE, xbar: swx / sw,
				t: t975(g.NEffSlope - 2), x0: xlo, x1: xhi, factor: rf, colour: colour}
			p.Add(bl)
			// The slope in the units of the files (regressions.csv,
			// relationships.json): one spelling of a slope everywhere.
			half := (g.SlopeCI.Hi - g.SlopeCI.Lo) / 2
			lines = append(lines, f.t(fmt.Sprintf("slope %s %s", numPM(g.Slope, half), g.SlopeUnits)),
				f.t(fmt.Sprintf("N_eff = %.0f (N = %d)", g.NEffSlope, g.N)))
		} else {
			lines = append(lines, f.t("no regression (too few samples)"))
		}
		if len(pts) > 0 {
			eb := &plotter.YErrorBars{XYs: pts, YErrors: errs, LineStyle: draw.LineStyle{Color: inkColour, Width: 0.8}, CapWidth: 3}
			sc, err := plotter.NewScatter(pts)
			if err != nil {
				return nil, err
			}
			sc.GlyphStyle = draw.GlyphStyle{Color: colour, Radius: 2.2, Shape: draw.CircleGlyph{}}
			p.Add(eb, sc)
		}
		p.Add(note{lines: lines})
		plots = append(plots, p)
	}
	bw := bodyWidth()
	title := fmt.Sprintf("%s against %s per regime (tropical band, %s)", responseLabel(resp), lowerFirst(predictorLabel(pred)), modeText(res))
	head := f.header(title, bw)
	key := textBlock{wrap(f.t("Points: bin means with 95 % intervals (Student t, N_eff − 1 dof). Line and band: area-weighted least squares with its 95 % confidence band; slope ± 95 % interval"+slopeUnitsNote(rf, pu)+". Grey bars: samples per bin (tallest "+
		fmt.Sprintf("%d", int64(nmax))+" cell-steps)."), withColour(style(sizeFooter+0.5, false), subtleColour), bw), withColour(style(sizeFooter+0.5, false), subtleColour)}
	const panelH = 2.6 * vg.Inch
	pg := &page{header: head, footer: f.footer(bw), bodyH: panelH + 6 + key.height()}
	pg.body = func(c draw.Canvas) {
		pc := c
		pc.Min.Y = c.Max.Y - panelH
		pc.Max.Y -= f.panelTitleHeight()
		tiles := draw.Tiles{Rows: 1, Cols: len(plots), PadX: 0.15 * vg.Inch}
		cs := plot.Align([][]*plot.Plot{plots}, tiles, pc)
		var data []vg.Rectangle
		for i, p := range plots {
			p.Draw(cs[0][i])
			data = append(data, p.DataCanvas(cs[0][i]).Rectangle)
		}
		f.drawPanelTitles(c, titles, data)
		key.draw(c, c.Min.X, pc.Min.Y-6)
	}
	return pg, nil
}

// num writes a number with three significant digits.
func num(x float64) string {
	if math.IsNaN(x) {
		return "n/a"
	}
	s := fmt.Sprintf("%.3g", x)
	if strings.ContainsAny(s, "e") {
		s = fmt.Sprintf("%.2e", x)
	}
	return minus(s)
}

// numPM writes v ± e with e rounded to two significant digits and v to the
// same decimal place.
func numPM(v, e float64) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	if math.IsNaN(e) || e <= 0 {
		return num(v)
	}
	d := max(0, 1-int(math.Floor(math.Log10(e))))
	return minus(fmt.Sprintf("%.*f", d, v)) + " ± " + fmt.Sprintf("%.*f", d, e)
}

// setTitleStyle sets a plot title's font, keeping it centred above the
// plot.
func setTitleStyle(p *plot.Plot, st text.Style) {
	st.XAlign, st.YAlign = text.XCenter, text.YTop
	p.Title.TextStyle = st
	p.Title.Padding = 4
}

// binnedSamples counts the samples of a binned relationship.
func binnedSamples(b *relations.Binned) int64 {
	n := b.OutOfRange
	for _, x := range b.Bins {
		n += x.N
	}
	return n
}
