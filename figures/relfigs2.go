package figures

import (
	"fmt"
	"image"
	"image/color"
	"math"
	"sort"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// binRaster draws values on a rectangular grid of bins (not geographic:
// no wrapping) as one image: v[i*len(ys)+j] for x bin i and y bin j.
type binRaster struct {
	xEdges, yEdges []float64
	v              []float64
	factor         float64
	scale          colourScale
	dpi            float64
}

func (r *binRaster) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	x0, x1 := trX(p.X.Min), trX(p.X.Max)
	y0, y1 := trY(p.Y.Min), trY(p.Y.Max)
	pw := max(1, int(math.Round((x1 - x0).Dots(r.dpi))))
	ph := max(1, int(math.Round((y1 - y0).Dots(r.dpi))))
	ny := len(r.yEdges) - 1
	nx := len(r.xEdges) - 1
	img := image.NewRGBA(image.Rect(0, 0, pw, ph))
	find := func(e []float64, v float64) int {
		i := sort.SearchFloat64s(e, v) - 1
		if i < 0 || i >= len(e)-1 {
			return -1
		}
		return i
	}
	for py := 0; py < ph; py++ {
		yv := p.Y.Max - (float64(py)+0.5)/float64(ph)*(p.Y.Max-p.Y.Min)
		j := find(r.yEdges, yv)
		for px := 0; px < pw; px++ {
			xv := p.X.Min + (float64(px)+0.5)/float64(pw)*(p.X.Max-p.X.Min)
			i := find(r.xEdges, xv)
			val := math.NaN()
			if i >= 0 && j >= 0 && i < nx && j < ny {
				val = r.v[i*ny+j] * r.factor
			}
			img.SetRGBA(px, py, r.scale.colour(val))
		}
	}
	c.DrawImage(vg.Rectangle{Min: vg.Point{X: x0, Y: y0}, Max: vg.Point{X: x1, Y: y1}}, img)
}

// colourBarV draws a vertical colour bar in r with ticks and labels on its
// right and the label, turned a quarter, beyond them.
func (f *fig) colourBarV(c draw.Canvas, r vg.Rectangle, s colourScale, label string) {
	h := r.Max.Y - r.Min.Y
	n := max(2, int(math.Round(h.Dots(f.rasterDPI()))))
	img := image.NewRGBA(image.Rect(0, 0, 1, n))
	for i := 0; i < n; i++ {
		img.SetRGBA(0, n-1-i, s.colour(s.lo+(float64(i)+0.5)/float64(n)*(s.hi-s.lo)))
	}
	c.DrawImage(r, img)
	frame(c, r)
	ts := style(sizeTick, false)
	ts.XAlign, ts.YAlign = text.XLeft, text.YCenter
	y := func(v float64) vg.Length { return r.Min.Y + vg.Length((v-s.lo)/(s.hi-s.lo))*h }
	tl := draw.LineStyle{Color: inkColour, Width: 0.6}
	widest := vg.Length(0)
	for _, t := range (plot.DefaultTicks{}).Ticks(s.lo, s.hi) {
		if t.Value < s.lo-1e-9*(s.hi-s.lo) || t.Value > s.hi+1e-9*(s.hi-s.lo) {
			continue
		}
		l := vg.Length(1.5)
		if t.Label != "" {
			l = 3
			lab := f.t(minus(t.Label))
			c.FillText(ts, vg.Point{X: r.Max.X + 4, Y: y(t.Value)}, lab)
			widest = max(widest, ts.Width(lab))
		}
		c.StrokeLine2(tl, r.Max.X, y(t.Value), r.Max.X+l, y(t.Value))
	}
	ls := style(sizeLabel, false)
	ls.XAlign, ls.YAlign = text.XCenter, text.YTop
	ls.Rotation = math.Pi / 2 // reads upwards; the glyph tops face the bar
	c.FillText(ls, vg.Point{X: r.Max.X + 4 + widest + 4, Y: r.Min.Y + h/2}, f.t(label))
}

// vline is a vertical reference line across the data area.
type vline struct {
	x     float64
	style draw.LineStyle
}

func (v vline) Plot(c draw.Canvas, p *plot.Plot) {
	trX, _ := p.Transforms(&c)
	if v.x < p.X.Min || v.x > p.X.Max {
		return
	}
	c.StrokeLine2(v.style, trX(v.x), c.Min.Y, trX(v.x), c.Max.Y)
}

// hline is a horizontal reference line across the data area.
type hline struct {
	y     float64
	style draw.LineStyle
}

func (h hline) Plot(c draw.Canvas, p *plot.Plot) {
	_, trY := p.Transforms(&c)
	if h.y < p.Y.Min || h.y > p.Y.Max {
		return
	}
	c.StrokeLine2(h.style, c.Min.X, trY(h.y), c.Max.X, trY(h.y))
}

var refStyle = draw.LineStyle{Color: color.Gray{0x50}, Width: 0.7, Dashes: []vg.Length{3, 2}}

func (f *fig) jointPage() (*page, error) {
	res := f.run.relations
	j := pickJoint(res)
	ru, rf := displayUnits(j.Units)
	nx, ny := len(j.RelEdges)-1, len(j.EISEdge)-1
	if nx < 1 || ny < 1 || len(j.Mean) != nx*ny || len(j.Frequency) != nx*ny {
		return nil, fmt.Errorf("joint composite of %s: %d×%d bins but %d means and %d frequencies", j.Response, nx, ny, len(j.Mean), len(j.Frequency))
	}
	mean := make([]float64, len(j.Mean))
	freq := make([]float64, len(j.Frequency))
	for i := range mean {
		mean[i], freq[i] = j.Mean[i], j.Frequency[i]
		if j.Count[i] == 0 {
			mean[i], freq[i] = math.NaN(), math.NaN()
		}
	}
	var shownMean, shownFreq []float64
	for i := range mean {
		shownMean = append(shownMean, mean[i]*rf)
		shownFreq = append(shownFreq, freq[i]*100)
	}
	mlo, mhi := sequentialLimits(shownMean)
	if rf == 100 {
		mlo, mhi = math.Max(0, mlo), math.Min(100, mhi)
	}
	fhi := niceCeil(percentile(shownFreq, 99))
	panels := []struct {
		v      []float64
		factor float64
		sc     colourScale
		label  string
		title  string
	}{
		{mean, rf, f.scale("cloud", mlo, mhi), fmt.Sprintf("Mean %s (%s)", lowerFirst(responseLabel(j.Response)), ru), "Mean " + lowerFirst(responseLabel(j.Response))},
		{freq, 100, f.scale("frequency", 0, fhi), "Share of samples (% per bin)", "Frequency of occurrence"},
	}
	var plots []*plot.Plot
	var titles []string
	for _, pn := range panels {
		p := f.newPlot()
		titles = append(titles, pn.title)
		p.X.Min, p.X.Max = j.RelEdges[0], j.RelEdges[nx]
		p.Y.Min, p.Y.Max = j.EISEdge[0], j.EISEdge[ny]
		p.X.Padding, p.Y.Padding = 0, 0
		p.X.Label.Text = f.t("Relative SST (K)")
		p.Y.Label.Text = f.t("EIS (K)")
		p.Add(&binRaster{xEdges: j.RelEdges, yEdges: j.EISEdge, v: pn.v, factor: pn.factor, scale: pn.sc, dpi: f.rasterDPI()})
		d, h := f.run.Delta, f.run.HalfWidth
		if !math.IsNaN(d) {
			if h > 0 && !math.IsNaN(h) {
				p.Add(vline{d - h, refStyle}, vline{d + h, refStyle})
			} else {
				p.Add(vline{d, refStyle})
			}
		}
		p.Add(hline{0, draw.LineStyle{Color: color.Gray{0x50}, Width: 0.5}})
		plots = append(plots, p)
	}
	bw := bodyWidth()
	head := f.header(fmt.Sprintf("Joint composite over relative SST × EIS (tropical band, %s)", modeText(res)), bw)
	keyText := "Dashed line: the regime threshold of relative SST. Grey: bins without samples."
	if h := f.run.HalfWidth; h > 0 && !math.IsNaN(h) {
		keyText = "Dashed lines: the regime thresholds of relative SST. Grey: bins without samples."
	}
	key := textBlock{wrap(f.t(keyText),
		withColour(style(sizeFooter+0.5, false), subtleColour), bw), withColour(style(sizeFooter+0.5, false), subtleColour)}
	const panelH = 2.9 * vg.Inch
	pg := &page{header: head, footer: f.footer(bw), bodyH: panelH + 6 + key.height()}
	pg.body = func(c draw.Canvas) {
		half := (c.Max.X - c.Min.X) / 2
		var data []vg.Rectangle
		for i, p := range plots {
			pc := c
			pc.Min = vg.Point{X: c.Min.X + vg.Length(i)*half, Y: c.Max.Y - panelH}
			pc.Max = vg.Point{X: c.Min.X + vg.Length(i)*half + half - 0.75*vg.Inch, Y: c.Max.Y - f.panelTitleHeight()}
			p.Draw(pc)
			dc := p.DataCanvas(pc)
			data = append(data, dc.Rectangle)
			frame(c, dc.Rectangle)
			bar := vg.Rectangle{Min: vg.Point{X: dc.Max.X + 8, Y: dc.Min.Y}, Max: vg.Point{X: dc.Max.X + 8 + 0.12*vg.Inch, Y: dc.Max.Y}}
			f.colourBarV(c, bar, panels[i].sc, panels[i].label)
			if i == 0 {
				f.dataArea = dc.Rectangle
			}
		}
		f.drawPanelTitles(c, titles, data)
		key.draw(c, c.Min.X, c.Max.Y-panelH-6)
	}
	return pg, nil
}

// lowerFirst lower-cases the first letter of a label for use inside a
// sentence; a label that starts with an acronym (EIS, LTS, TOA) is kept.
func lowerFirst(s string) string {
	if s == "" || (len(s) > 1 && s[1] >= 'A' && s[1] <= 'Z') {
		return s
	}
	return strings.ToLower(s[:1]) + s[1:]
}

// upperFirst capitalises the first letter of a panel title.
func upperFirst(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}

func (f *fig) flipsPage() (*page, error) {
	res := f.run.relations
	colours := []color.Color{lineOrange, lineBlue, lineGreen, linePurple, lineBlack}
	shapes := []draw.GlyphDrawer{draw.CircleGlyph{}, draw.SquareGlyph{}, draw.TriangleGlyph{}, draw.PyramidGlyph{}, draw.CrossGlyph{}}
	flipped := f.newPlot()
	change := f.newPlot()
	for _, p := range []*plot.Plot{flipped, change} {
		p.Add(lightGrid())
		p.X.Label.Text = f.t("SST perturbation ΔT (K)")
		p.Add(vline{0, refStyle})
	}
	titles := []string{"Patch area × time changing regime", "Change of convective area fraction"}
	flipped.Y.Label.Text = f.t("Flipped (% of patch ocean area × time)")
	change.Y.Label.Text = f.t("Change (percentage points)")
	change.Add(hline{0, draw.LineStyle{Color: color.Gray{0x50}, Width: 0.5}})
	flipped.Y.Min = 0
	// Legends go under the panels, where they cannot hide data.
	legs := [2]plot.Legend{plot.NewLegend(), plot.NewLegend()}
	for i := range legs {
		legs[i].TextStyle = style(sizeLegend, false)
		legs[i].ThumbnailWidth = 0.3 * vg.Inch
		legs[i].Top, legs[i].Left = true, true
		legs[i].Padding = 2
	}
	for k, pf := range res.Flips {
		col, shp := colours[k%len(colours)], shapes[k%len(shapes)]
		// ΔT = 0 changes nothing, by definition: the curves pass through 0.
		fl, in, out := plotter.XYs{{X: 0, Y: 0}}, plotter.XYs{{X: 0, Y: 0}}, plotter.XYs{{X: 0, Y: 0}}
		for _, r := range pf.Rows {
			if r.DeltaT == 0 {
				continue
			}
			fl = append(fl, plotter.XY{X: r.DeltaT, Y: 100 * r.Changed})
			in = append(in, plotter.XY{X: r.DeltaT, Y: 100 * (r.ConvectiveAfter - r.ConvectiveBefore)})
			out = append(out, plotter.XY{X: r.DeltaT, Y: 100 * (r.OutConvectiveAfter - r.OutConvectiveBefore)})
		}
		sort.Slice(fl, func(a, b int) bool { return fl[a].X < fl[b].X })
		sort.Slice(in, func(a, b int) bool { return in[a].X < in[b].X })
		sort.Slice(out, func(a, b int) bool { return out[a].X < out[b].X })
		patch := patchLabel(pf.Patch.Name)
		name := fmt.Sprintf("%s (f = %.1f %%)", patch, 100*pf.FMean)
		add := func(p *plot.Plot, leg *plot.Legend, pts plotter.XYs, dash []vg.Length, legend string) error {
			l, s, err := plotter.NewLinePoints(pts)
			if err != nil {
				return err
			}
			l.Color, l.Width, l.Dashes = col, 1, dash
			s.GlyphStyle = draw.GlyphStyle{Color: col, Radius: 2.2, Shape: shp}
			p.Add(l, s)
			if legend != "" {
				leg.Add(f.t(legend), l, s)
			}
			return nil
		}
		if err := add(flipped, &legs[0], fl, nil, name); err != nil {
			return nil, err
		}
		if err := add(change, &legs[1], in, nil, "inside "+patch); err != nil {
			return nil, err
		}
		if err := add(change, &legs[1], out, []vg.Length{4, 2}, "outside "+patch+", in the band"); err != nil {
			return nil, err
		}
	}
	legH := vg.Length(2*len(res.Flips))*lineHeight(style(sizeLegend, false)) + 4
	bw := bodyWidth()
	head := f.header("Perturbation flips: regime changes when the patch SST is shifted by ΔT", bw)
	key := textBlock{wrap(f.t("Warming (ΔT > 0) and cooling (ΔT < 0) on one axis: an asymmetric response shows as a curve that is not mirror-symmetric about ΔT = 0. The tropical mean is recomputed with the patch perturbed (f: the patch's share of the band ocean area)."),
		withColour(style(sizeFooter+0.5, false), subtleColour), bw), withColour(style(sizeFooter+0.5, false), subtleColour)}
	const panelH = 2.7 * vg.Inch
	pg := &page{header: head, footer: f.footer(bw), bodyH: panelH + legH + 6 + key.height()}
	pg.body = func(c draw.Canvas) {
		pc := c
		pc.Min.Y = c.Max.Y - panelH
		pc.Max.Y -= f.panelTitleHeight()
		cs := plot.Align([][]*plot.Plot{{flipped, change}}, draw.Tiles{Rows: 1, Cols: 2, PadX: 0.3 * vg.Inch}, pc)
		var data []vg.Rectangle
		for i, p := range []*plot.Plot{flipped, change} {
			p.Draw(cs[0][i])
			dc := p.DataCanvas(cs[0][i])
			data = append(data, dc.Rectangle)
			lc := c
			lc.Min = vg.Point{X: dc.Min.X, Y: pc.Min.Y - legH}
			lc.Max = vg.Point{X: dc.Max.X, Y: pc.Min.Y - 2}
			legs[i].Draw(lc)
		}
		f.drawPanelTitles(c, titles, data)
		key.draw(c, c.Min.X, pc.Min.Y-legH-6)
	}
	return pg, nil
}

// logistic is the fitted curve p(x) = 1/(1 + exp(−(b0 + b1 x))).
type logistic struct {
	b0, b1 float64
	colour color.Color
}

func (l logistic) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	var pts []vg.Point
	const n = 200
	for i := 0; i <= n; i++ {
		x := p.X.Min + (p.X.Max-p.X.Min)*float64(i)/n
		y := 100 / (1 + math.Exp(-(l.b0 + l.b1*x)))
		pts = append(pts, vg.Point{X: trX(x), Y: trY(y)})
	}
	c.StrokeLines(draw.LineStyle{Color: l.colour, Width: 1.4}, pts)
}

func (l logistic) Thumbnail(c *draw.Canvas) {
	y := (c.Min.Y + c.Max.Y) / 2
	c.StrokeLine2(draw.LineStyle{Color: l.colour, Width: 1.4}, c.Min.X, y, c.Max.X, y)
}

// vlineThumb is the legend thumbnail of a vertical line.
type vlineThumb struct{ style draw.LineStyle }

func (v vlineThumb) Thumbnail(c *draw.Canvas) {
	x := (c.Min.X + c.Max.X) / 2
	c.StrokeLine2(v.style, x, c.Min.Y, x, c.Max.Y)
}

// xband shades x0…x1 across the data area.
type xband struct {
	x0, x1 float64
	colour color.Color
}

func (b xband) Plot(c draw.Canvas, p *plot.Plot) {
	trX, _ := p.Transforms(&c)
	x0, x1 := math.Max(b.x0, p.X.Min), math.Min(b.x1, p.X.Max)
	if !(x1 > x0) {
		return
	}
	c.FillPolygon(b.colour, []vg.Point{{X: trX(x0), Y: c.Min.Y}, {X: trX(x1), Y: c.Min.Y}, {X: trX(x1), Y: c.Max.Y}, {X: trX(x0), Y: c.Max.Y}})
}

func (b xband) Thumbnail(c *draw.Canvas) {
	c.FillPolygon(b.colour, []vg.Point{c.Min, {X: c.Max.X, Y: c.Min.Y}, c.Max, {X: c.Min.X, Y: c.Max.Y}})
}

func (f *fig) thresholdPage() (*page, error) {
	res := f.run.relations
	th := res.Threshold
	if math.IsNaN(th.B1) || th.B1 == 0 {
		return nil, fmt.Errorf("the logistic fit has no slope (%s)", th.Note)
	}
	p := f.newPlot()
	p.Add(lightGrid())
	// Show the curve from 2 % to 98 % probability, and the CI.
	x02 := (math.Log(0.02/0.98) - th.B0) / th.B1
	x98 := (math.Log(0.98/0.02) - th.B0) / th.B1
	lo, hi := math.Min(x02, x98), math.Max(x02, x98)
	for _, v := range []float64{th.RelCI.Lo, th.RelCI.Hi} {
		if !math.IsNaN(v) {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
	}
	pad := 0.1 * (hi - lo)
	p.X.Min, p.X.Max = lo-pad, hi+pad
	p.Y.Min, p.Y.Max = 0, 100
	band := xband{th.RelCI.Lo, th.RelCI.Hi, color.NRGBA{0, 114, 178, 50}}
	curve := logistic{th.B0, th.B1, lineBlack}
	p.Add(band, hline{50, refStyle}, curve, vline{th.Rel, draw.LineStyle{Color: lineBlue, Width: 1}})
	p.X.Label.Text = f.t("Relative SST (K)")
	cond := strings.NewReplacer(" Pa s-1", " Pa/s", " W m-2", " W/m²", " kg m-2 s-1", " kg/(m² s)").Replace(th.Condition)
	p.Y.Label.Text = f.t("Probability of convection (%)")
	leg := plot.NewLegend()
	leg.TextStyle = style(sizeLegend, false)
	leg.ThumbnailWidth = 0.3 * vg.Inch
	leg.Top, leg.Left = true, true
	leg.Padding = 2
	leg.Add(f.t("logistic fit"), curve)
	leg.Add(f.t("threshold (p = 50 %)"), vlineThumb{draw.LineStyle{Color: lineBlue, Width: 1}})
	leg.Add(f.t("its 95 % interval"), band)
	facts := []string{
		f.t("convection: " + cond),
		f.t(fmt.Sprintf("threshold %.2f K relative", th.Rel)),
		f.t(fmt.Sprintf("95 %% interval %.2f … %.2f K", th.RelCI.Lo, th.RelCI.Hi)),
		f.t(fmt.Sprintf("(block bootstrap, %d replicates)", th.Replicates)),
		f.t(fmt.Sprintf("absolute %.2f K", th.Abs)),
		f.t(fmt.Sprintf("(tropical mean %.2f K)", th.TropicalMean)),
		f.t(fmt.Sprintf("N = %d cell-steps", th.N)),
	}
	bw := bodyWidth()
	head := f.header("Threshold of convection in relative SST (logistic regression)", bw)
	pg := &page{header: head, footer: f.footer(bw), bodyH: 3 * vg.Inch}
	pg.body = func(c draw.Canvas) {
		pc := c
		pc.Max.X = c.Min.X + 0.68*(c.Max.X-c.Min.X)
		p.Draw(pc)
		dc := p.DataCanvas(pc)
		lc := c
		lc.Min.X = pc.Max.X + 0.15*vg.Inch
		lc.Max.Y = dc.Max.Y
		leg.Draw(lc)
		st := style(sizeLegend, false)
		tb := textBlock{facts, st}
		tb.draw(c, lc.Min.X, dc.Max.Y-3*lineHeight(st)-10)
	}
	return pg, nil
}
