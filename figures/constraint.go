package figures

import (
	"errors"
	"fmt"
	"image/color"
	"io/fs"
	"math"
	"os"
	"path/filepath"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Interval is a value with the bounds of its interval (NaN where unknown).
type Interval struct{ Value, Lo, Hi float64 }

// ConstraintDomain is one domain and regime of an observational constraint
// (package constraint), as the figures draw it: per factor the
// contribution with the observed sensitivities and with the model's own,
// with the bounds of their intervals, and the three changes.
type ConstraintDomain struct {
	Label                          string
	Contrib, ModelContrib          []Interval
	Constrained, Predicted, Actual Interval
}

// ConstraintFigures is what DrawConstraint draws: one model's constraint
// by one set of observations, or (Models) several models' constrained and
// actual changes side by side.
type ConstraintFigures struct {
	// Dataset, Period and Regimes fill the header; Version and StudyHash
	// the footer.
	Dataset, Period, Regimes string
	Version, StudyHash       string
	// Response and ResponseUnits name the response (units of the response,
	// not of its change).
	Response, ResponseUnits string
	Level                   float64
	// Warming is ΔT, K, and WarmingNote how it was found.
	Warming float64
	Factors []string
	Domains []ConstraintDomain
	// Headline is the index in Domains of the domain of the contributions
	// figure.
	Headline int
	// Models, when set, makes DrawConstraint draw the comparison figure of
	// several models instead: Domains[i] is model Models[i]'s headline
	// domain, ModelCoef[i] its sensitivities per factor, ObsCoef the
	// observed ones (Observations names them) and FactorUnits the
	// factors' units.
	Models       []string
	Observations string
	ObsCoef      []Interval
	ModelCoef    [][]Interval
	FactorUnits  []string
}

// DrawConstraint draws the figures of a constraint into outDir:
//
//   - constraint_contributions: for the headline domain, each factor's
//     contribution to the change per kelvin of global warming, with the
//     observed sensitivities (the constraint) and with the model's own,
//     with their intervals, and the sums beside them with the model's
//     actual change;
//   - constraint_changes: for every domain and regime, the constrained,
//     the model-predicted and the actual change with their intervals;
//
// or, with Models set, constraint_models: the constrained and the actual
// change of every model. It refuses, before drawing, when a figure file
// exists already unless opt.Force.
func DrawConstraint(outDir string, d ConstraintFigures, opt Options) ([]string, error) {
	if outDir == "" {
		return nil, errors.New("figures: DrawConstraint needs an output folder")
	}
	opt.OutDir = outDir
	o, err := opt.normalise(outDir)
	if err != nil {
		return nil, err
	}
	if len(d.Domains) == 0 {
		return nil, errors.New("figures: the constraint has no domain to draw")
	}
	run := &Run{Dataset: d.Dataset, Period: d.Period, RegimeDefinition: d.Regimes, Version: d.Version, StudyHash: d.StudyHash}
	var figs []figure
	if len(d.Models) > 0 {
		figs = append(figs, figure{name: "constraint_models", build: func(f *fig) (*page, error) { return f.constraintModelsPage(d) }})
	} else {
		figs = append(figs,
			figure{name: "constraint_contributions", build: func(f *fig) (*page, error) { return f.contributionsPage(d) }},
			figure{name: "constraint_changes", build: func(f *fig) (*page, error) { return f.changesPage(d) }})
	}
	if !o.Force {
		for _, f := range figs {
			p := filepath.Join(o.OutDir, f.name+"."+o.Format)
			if _, err := os.Lstat(p); err == nil {
				return nil, fmt.Errorf("figures: %s: %w; nothing was drawn. Allow replacing it (--force) or choose another --out", p, fs.ErrExist)
			}
		}
	}
	if err := os.MkdirAll(o.OutDir, 0o777); err != nil {
		return nil, fmt.Errorf("figures: cannot create the figure directory: %w", err)
	}
	var out []string
	for _, f := range figs {
		p, err := drawOne(run, f, o)
		if err != nil {
			return out, err
		}
		out = append(out, p)
	}
	return out, nil
}

// changeAxis returns the label units and scale of a change per kelvin of a
// response in units u (fractions in per cent).
func changeAxis(u string) (string, float64) {
	du, k := displayUnits(u)
	if du == "%" {
		return "% per K", k
	}
	return du + " per K", k
}

var (
	colourConstrained = lineBlue
	colourModel       = lineOrange
	colourActual      = lineBlack
)

// bars draws grouped bars with interval whiskers: group g, member m at
// x = g + offset(m); values already scaled.
type bars struct {
	groups  int
	members int
	val     func(g, m int) (Interval, bool)
	colour  []color.Color
	hollow  []bool
}

func (b bars) x(g, m int) float64 {
	return float64(g) + (float64(m)-float64(b.members-1)/2)*0.8/float64(b.members)
}

func (b bars) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	half := 0.8 / float64(b.members) / 2 * 0.85
	for g := range b.groups {
		for m := range b.members {
			v, ok := b.val(g, m)
			if !ok || math.IsNaN(v.Value) {
				continue
			}
			x := b.x(g, m)
			col := b.colour[m]
			y0, y1 := trY(math.Max(0, math.Min(v.Value, p.Y.Max))), trY(math.Min(0, math.Max(v.Value, p.Y.Min)))
			if v.Value > 0 {
				y0, y1 = trY(0), trY(math.Min(v.Value, p.Y.Max))
			}
			r := vg.Rectangle{Min: vg.Point{X: trX(x - half), Y: min(y0, y1)}, Max: vg.Point{X: trX(x + half), Y: max(y0, y1)}}
			if b.hollow != nil && b.hollow[m] {
				c.StrokeLines(draw.LineStyle{Color: col, Width: 1.2}, []vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}, r.Min})
			} else {
				c.SetColor(col)
				c.Fill(r.Path())
			}
			if !math.IsNaN(v.Lo) && !math.IsNaN(v.Hi) && v.Hi > v.Lo {
				ls := draw.LineStyle{Color: inkColour, Width: 0.8}
				capped(c, ls, trX(x), trY(v.Lo), trY(v.Hi))
			}
		}
	}
}

// intervalExtent is the range of the finite values and interval bounds of
// n × m slots, 0 included (the axis of a change or a contribution keeps its
// zero line); (−1, 1) when nothing is finite or all is 0.
func intervalExtent(n, m int, val func(i, j int) (Interval, bool)) (lo, hi float64) {
	for i := range n {
		for j := range m {
			v, ok := val(i, j)
			if !ok {
				continue
			}
			for _, x := range []float64{v.Value, v.Lo, v.Hi} {
				if !math.IsNaN(x) && !math.IsInf(x, 0) {
					lo, hi = math.Min(lo, x), math.Max(hi, x)
				}
			}
		}
	}
	if lo == hi {
		return -1, 1
	}
	return lo, hi
}

func (b bars) DataRange() (xmin, xmax, ymin, ymax float64) {
	ymin, ymax = intervalExtent(b.groups, b.members, b.val)
	pad := 0.08 * (ymax - ymin)
	return -0.5, float64(b.groups) - 0.5, ymin - pad, ymax + 0.35*(ymax-ymin)
}

type boxThumb struct {
	col    color.Color
	hollow bool
}

func (t boxThumb) Thumbnail(c *draw.Canvas) {
	r := c.Rectangle
	r.Min.Y += 1
	r.Max.Y -= 1
	if t.hollow {
		c.StrokeLines(draw.LineStyle{Color: t.col, Width: 1.2}, []vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}, r.Min})
		return
	}
	c.SetColor(t.col)
	c.Fill(r.Path())
}

func scaleIv(v Interval, k float64) Interval { return Interval{v.Value * k, v.Lo * k, v.Hi * k} }

func factorLabel(f string) string {
	switch f {
	case "sst":
		return "SST"
	case "eis":
		return "EIS"
	case "lts":
		return "LTS"
	case "rh700":
		return "RH700"
	case "omega700":
		return "ω700"
	case "t_adv":
		return "T_adv"
	case "wind_speed":
		return "wind speed"
	}
	return f
}

func (f *fig) contributionsPage(d ConstraintFigures) (*page, error) {
	if d.Headline < 0 || d.Headline >= len(d.Domains) {
		return nil, fmt.Errorf("headline domain %d of %d", d.Headline, len(d.Domains))
	}
	dom := d.Domains[d.Headline]
	u, k := changeAxis(d.ResponseUnits)
	p := len(d.Factors)
	b := bars{groups: p + 1, members: 3, colour: []color.Color{colourConstrained, colourModel, colourActual}, hollow: []bool{false, true, false},
		val: func(g, m int) (Interval, bool) {
			if g < p {
				switch m {
				case 0:
					return scaleIv(dom.Contrib[g], k), true
				case 1:
					return scaleIv(dom.ModelContrib[g], k), true
				}
				return Interval{}, false
			}
			switch m {
			case 0:
				return scaleIv(dom.Constrained, k), true
			case 1:
				return scaleIv(dom.Predicted, k), true
			}
			return scaleIv(dom.Actual, k), true
		}}
	pl := f.newPlot()
	pl.Add(lightGrid(), b)
	pl.Add(hline{0, draw.LineStyle{Color: color.Gray{0x50}, Width: 0.5}})
	var ticks []plot.Tick
	for i, fa := range d.Factors {
		ticks = append(ticks, plot.Tick{Value: float64(i), Label: factorLabel(fa)})
	}
	ticks = append(ticks, plot.Tick{Value: float64(p), Label: "sum (total change)"})
	pl.X.Tick.Marker = plot.ConstantTicks(ticks)
	pl.X.Label.Text = f.t("Cloud-controlling factor (" + dom.Label + ")")
	pl.Y.Label.Text = f.t(fmt.Sprintf("Contribution to the change of %s (%s)", lowerFirst(responseLabel(d.Response)), u))
	pl.Legend.Top, pl.Legend.Left = true, false
	lv := fmt.Sprintf("%g %%", 100*d.Level)
	pl.Legend.Add(f.t("observed sensitivity × model's factor change (constraint), "+lv+" interval"), boxThumb{colourConstrained, false})
	pl.Legend.Add(f.t("model's own sensitivity × model's factor change"), boxThumb{colourModel, true})
	pl.Legend.Add(f.t("model's actual change (sum only)"), boxThumb{colourActual, false})
	bw := bodyWidth()
	head := f.header(fmt.Sprintf("Observational constraint on the change of %s per K of global warming (ΔT = %.3g K), by factor", lowerFirst(responseLabel(d.Response)), d.Warming), bw)
	const h = 3.6 * vg.Inch
	pg := &page{header: head, footer: f.footer(bw), bodyH: h}
	pg.body = func(c draw.Canvas) {
		pl.Draw(c)
		dc := pl.DataCanvas(c)
		frame(c, dc.Rectangle)
		f.dataArea = dc.Rectangle
	}
	return pg, nil
}

// hPoints draws, per row, up to three points with horizontal intervals.
type hPoints struct {
	rows   int
	series int
	val    func(row, s int) (Interval, bool)
	colour []color.Color
	shape  []draw.GlyphDrawer
}

func (h hPoints) y(row, s int) float64 {
	return float64(h.rows-1-row) + (float64(s)-float64(h.series-1)/2)*0.22
}

func (h hPoints) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	for r := range h.rows {
		for s := range h.series {
			v, ok := h.val(r, s)
			if !ok || math.IsNaN(v.Value) {
				continue
			}
			y := trY(h.y(r, s))
			ls := draw.LineStyle{Color: h.colour[s], Width: 1}
			if !math.IsNaN(v.Lo) && !math.IsNaN(v.Hi) && v.Hi > v.Lo {
				c.StrokeLine2(ls, trX(v.Lo), y, trX(v.Hi), y)
				c.StrokeLine2(ls, trX(v.Lo), y-2, trX(v.Lo), y+2)
				c.StrokeLine2(ls, trX(v.Hi), y-2, trX(v.Hi), y+2)
			}
			c.DrawGlyph(draw.GlyphStyle{Color: h.colour[s], Radius: 2.4, Shape: h.shape[s]}, vg.Point{X: trX(v.Value), Y: y})
		}
	}
}

func (h hPoints) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, xmax = intervalExtent(h.rows, h.series, h.val)
	pad := 0.06 * (xmax - xmin)
	return xmin - pad, xmax + pad, -0.6, float64(h.rows) - 0.4 + 0.9
}

type glyphShapeThumb struct {
	col   color.Color
	shape draw.GlyphDrawer
}

func (g glyphShapeThumb) Thumbnail(c *draw.Canvas) {
	ctr := vg.Point{X: (c.Min.X + c.Max.X) / 2, Y: (c.Min.Y + c.Max.Y) / 2}
	c.StrokeLine2(draw.LineStyle{Color: g.col, Width: 1}, c.Min.X, ctr.Y, c.Max.X, ctr.Y)
	c.DrawGlyph(draw.GlyphStyle{Color: g.col, Radius: 2.4, Shape: g.shape}, ctr)
}

// vline0 is the vertical zero line.
type vline0 struct{}

func (vline0) Plot(c draw.Canvas, p *plot.Plot) {
	trX, _ := p.Transforms(&c)
	if p.X.Min < 0 && p.X.Max > 0 {
		c.StrokeLine2(draw.LineStyle{Color: color.Gray{0x50}, Width: 0.5}, trX(0), c.Min.Y, trX(0), c.Max.Y)
	}
}

// changesPlot is the rows-of-intervals plot of the changes and its height.
func (f *fig) changesPlot(d ConstraintFigures, labels []string, series []string, val func(row, s int) (Interval, bool)) (*plot.Plot, vg.Length) {
	u, _ := changeAxis(d.ResponseUnits)
	colours := []color.Color{colourConstrained, colourModel, colourActual}
	shapes := []draw.GlyphDrawer{draw.CircleGlyph{}, draw.SquareGlyph{}, draw.TriangleGlyph{}}
	if len(series) == 2 {
		colours = []color.Color{colourConstrained, colourActual}
		shapes = []draw.GlyphDrawer{draw.CircleGlyph{}, draw.TriangleGlyph{}}
	}
	hp := hPoints{rows: len(labels), series: len(series), val: val, colour: colours, shape: shapes}
	pl := f.newPlot()
	pl.Add(lightGrid(), vline0{}, hp)
	var ticks []plot.Tick
	for i, l := range labels {
		ticks = append(ticks, plot.Tick{Value: float64(len(labels) - 1 - i), Label: f.t(l)})
	}
	pl.Y.Tick.Marker = plot.ConstantTicks(ticks)
	pl.X.Label.Text = f.t(fmt.Sprintf("Change of %s per K of global warming (%s), %g %% intervals", lowerFirst(responseLabel(d.Response)), u, 100*d.Level))
	pl.Legend.Top, pl.Legend.Left = true, false
	for i, s := range series {
		pl.Legend.Add(f.t(s), glyphShapeThumb{colours[i], shapes[i]})
	}
	return pl, vg.Length(1.2+0.32*float64(len(labels))) * vg.Inch
}

func (f *fig) changesRows(d ConstraintFigures, labels []string, series []string, val func(row, s int) (Interval, bool), title string) (*page, error) {
	pl, h := f.changesPlot(d, labels, series, val)
	bw := bodyWidth()
	head := f.header(title, bw)
	pg := &page{header: head, footer: f.footer(bw), bodyH: h}
	pg.body = func(c draw.Canvas) {
		pl.Draw(c)
		dc := pl.DataCanvas(c)
		frame(c, dc.Rectangle)
		f.dataArea = dc.Rectangle
	}
	return pg, nil
}

func (f *fig) changesPage(d ConstraintFigures) (*page, error) {
	_, k := changeAxis(d.ResponseUnits)
	var labels []string
	for _, dom := range d.Domains {
		labels = append(labels, dom.Label)
	}
	val := func(r, s int) (Interval, bool) {
		dom := d.Domains[r]
		return scaleIv([]Interval{dom.Constrained, dom.Predicted, dom.Actual}[s], k), true
	}
	return f.changesRows(d, labels, []string{"constrained (observed sensitivities)", "predicted (model's own sensitivities)", "model's actual change"}, val,
		fmt.Sprintf("Constrained, predicted and actual change of %s per K of global warming (ΔT = %.3g K)", lowerFirst(responseLabel(d.Response)), d.Warming))
}

// ConstraintLabel is the figures' label of a domain and regime.
func ConstraintLabel(domain, regime string) string {
	d := placeWords(domain)
	if domain == "tropical_band" {
		d = "tropical band"
	}
	return d + ", " + regime
}

// coefPoints draws one factor's sensitivity of the observations and of
// every model, each a point with its interval, one column per run.
type coefPoints struct {
	vals    []Interval
	colours []color.Color
}

func (cp coefPoints) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	for i, v := range cp.vals {
		if math.IsNaN(v.Value) {
			continue
		}
		col := cp.colours[i%len(cp.colours)]
		x := trX(float64(i))
		ls := draw.LineStyle{Color: col, Width: 1}
		if !math.IsNaN(v.Lo) && !math.IsNaN(v.Hi) && v.Hi > v.Lo {
			capped(c, ls, x, trY(v.Lo), trY(v.Hi))
		}
		c.DrawGlyph(draw.GlyphStyle{Color: col, Radius: 2.2, Shape: draw.CircleGlyph{}}, vg.Point{X: x, Y: trY(v.Value)})
	}
}

func (cp coefPoints) DataRange() (xmin, xmax, ymin, ymax float64) {
	ymin, ymax = 0, 0
	for _, v := range cp.vals {
		for _, y := range []float64{v.Value, v.Lo, v.Hi} {
			if !math.IsNaN(y) && !math.IsInf(y, 0) {
				ymin, ymax = math.Min(ymin, y), math.Max(ymax, y)
			}
		}
	}
	if ymin == ymax {
		ymin, ymax = -1, 1
	}
	pad := 0.08 * (ymax - ymin)
	return -0.6, float64(len(cp.vals)) - 0.4, ymin - pad, ymax + pad
}

func (f *fig) constraintModelsPage(d ConstraintFigures) (*page, error) {
	_, k := changeAxis(d.ResponseUnits)
	if len(d.Models) != len(d.Domains) || len(d.ModelCoef) != len(d.Models) {
		return nil, fmt.Errorf("%d models, %d domains and %d sets of sensitivities", len(d.Models), len(d.Domains), len(d.ModelCoef))
	}
	colours := append([]color.Color{lineBlack}, runColours[1:]...)
	p := len(d.Factors)
	var coefPlots []*plot.Plot
	for j, fa := range d.Factors {
		vals := []Interval{d.ObsCoef[j]}
		for m := range d.Models {
			vals = append(vals, d.ModelCoef[m][j])
		}
		ru, scale := displayUnits(d.ResponseUnits)
		for i := range vals {
			vals[i] = scaleIv(vals[i], scale)
		}
		pl := f.newPlot()
		pl.Add(lightGrid(), hline{0, draw.LineStyle{Color: color.Gray{0x50}, Width: 0.5}}, coefPoints{vals, colours})
		pl.X.Tick.Marker = plot.ConstantTicks(nil)
		pl.X.Label.Text = f.t(factorLabel(fa))
		fu := d.FactorUnits[j]
		if fu == "1" || fu == "" {
			fu = "unit"
		}
		pl.Y.Label.Text = f.t(ru + " per " + fu)
		coefPlots = append(coefPlots, pl)
	}
	labels := make([]string, len(d.Models))
	for i, m := range d.Models {
		labels[i] = m
	}
	val := func(r, s int) (Interval, bool) {
		dom := d.Domains[r]
		return scaleIv([]Interval{dom.Constrained, dom.Actual}[s], k), true
	}
	chg, chgH := f.changesPlot(d, labels, []string{"constrained by the observed sensitivities", "model's actual change"}, val)
	// One legend for the sensitivity panels, above them: a dot of each
	// run's colour and its name, one line each.
	type entry struct {
		label string
		col   color.Color
	}
	entries := []entry{{d.Observations + " (observations)", colours[0]}}
	for i, m := range d.Models {
		entries = append(entries, entry{m, colours[(i+1)%len(colours)]})
	}
	legStyle := style(sizeLegend, false)
	lh := lineHeight(legStyle) * 1.25
	bw := bodyWidth()
	head := f.header(fmt.Sprintf("Observed and modelled sensitivities of %s (%s), and constrained vs actual change per K of global warming, %g %% intervals",
		lowerFirst(responseLabel(d.Response)), d.Domains[0].Label, 100*d.Level), bw)
	legH := vg.Length(len(entries))*lh + 4
	const panelH = 1.9 * vg.Inch
	pg := &page{header: head, footer: f.footer(bw), bodyH: legH + panelH + 0.15*vg.Inch + chgH}
	pg.body = func(c draw.Canvas) {
		top := c.Max.Y
		for i, e := range entries {
			y := top - (vg.Length(i)+0.5)*lh
			c.DrawGlyph(draw.GlyphStyle{Color: e.col, Radius: 2.4, Shape: draw.CircleGlyph{}}, vg.Point{X: c.Min.X + 6, Y: y})
			st := legStyle
			st.YAlign = -0.5
			c.FillText(st, vg.Point{X: c.Min.X + 14, Y: y}, f.t(e.label))
		}
		top -= legH
		w := (c.Max.X - c.Min.X) / vg.Length(p)
		for j, pl := range coefPlots {
			sc := c
			sc.Min.X, sc.Max.X = c.Min.X+vg.Length(j)*w, c.Min.X+vg.Length(j+1)*w-0.05*vg.Inch
			sc.Min.Y, sc.Max.Y = top-panelH, top
			pl.Draw(sc)
			frame(sc, pl.DataCanvas(sc).Rectangle)
		}
		bc := c
		bc.Max.Y = top - panelH - 0.15*vg.Inch
		bc.Min.Y = bc.Max.Y - chgH
		chg.Draw(bc)
		dc := chg.DataCanvas(bc)
		frame(bc, dc.Rectangle)
		f.dataArea = dc.Rectangle
	}
	return pg, nil
}
