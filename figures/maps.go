package figures

import (
	"fmt"
	"image"
	"image/color"
	"math"
	"sort"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"lidscope/figures/internal/coast"
)

// mapSpec is one map figure.
type mapSpec struct {
	name, title string
	// read returns the field to draw.
	read func(r *Run) (*Field, error)
	// has reports whether the run has the variable(s).
	vars []string
	// scale multiplies the values for display (100 for fractions shown in
	// per cent).
	factor  float64
	label   string // colour bar label with units
	palette string // palette key
	limits  func(vals []float64) (lo, hi float64)
	// inBand takes the limits from the columns inside the regime band
	// only: relative SST is measured against the tropical mean and is
	// tens of kelvin negative towards the poles, which would otherwise
	// stretch the colour range over values the regimes never see (they
	// are drawn in the end colour and marked by the colour bar's
	// triangle).
	inBand   bool
	describe string
}

func fixedLimits(lo, hi float64) func([]float64) (float64, float64) {
	return func([]float64) (float64, float64) { return lo, hi }
}

func mapVar(name string) func(r *Run) (*Field, error) {
	return func(r *Run) (*Field, error) { return r.Map(name) }
}

func meanOf(q string) func(r *Run) (*Field, error) {
	return func(r *Run) (*Field, error) { return r.QuantityMean(q) }
}

var mapSpecs = []mapSpec{
	{name: "map_convective_time_fraction", title: "Fraction of time in the convective regime",
		read: mapVar("convective_time_fraction"), vars: []string{"convective_time_fraction"}, factor: 100,
		label: "Time in the convective regime (%)", palette: "fraction", limits: fixedLimits(0, 100),
		describe: "map of the fraction of each column's valid time steps in the convective regime"},
	{name: "map_crossing_rate", title: "Crossings between the convective and subsidence regimes",
		read: mapVar("crossing_rate"), vars: []string{"crossing_rate"}, factor: 1,
		label: "Regime crossings (number per year of record)", palette: "frequency",
		limits: func(v []float64) (float64, float64) {
			return 0, niceCeil(percentile(v, 98))
		},
		describe: "map of convective↔subsidence crossings per year of record"},
	{name: "map_eis", title: "Mean estimated inversion strength (EIS), all regimes",
		read: meanOf("eis"), vars: []string{"eis_mean", "eis_count"}, factor: 1,
		label: "EIS (K)", palette: "eis", limits: divergingLimits,
		describe: "map of the time-mean EIS over each column's valid steps"},
	{name: "map_lts", title: "Mean lower-tropospheric stability (LTS), all regimes",
		read: meanOf("lts"), vars: []string{"lts_mean", "lts_count"}, factor: 1,
		label: "LTS (K)", palette: "lts", limits: sequentialLimits,
		describe: "map of the time-mean LTS over each column's valid steps"},
	{name: "map_cloud", title: "Mean cloud area fraction, all regimes",
		read: meanOf("cloud"), vars: []string{"cloud_mean", "cloud_count"}, factor: 100,
		label: "Cloud area fraction (%)", palette: "cloud", limits: fixedLimits(0, 100),
		describe: "map of the time-mean cloud fraction over each column's valid steps"},
	{name: "map_low_cloud", title: "Mean low-cloud area fraction, all regimes",
		read: meanOf("low_cloud"), vars: []string{"low_cloud_mean", "low_cloud_count"}, factor: 100,
		label: "Low-cloud area fraction (%)", palette: "cloud", limits: fixedLimits(0, 100),
		describe: "map of the time-mean low-cloud fraction over each column's valid steps"},
	{name: "map_relative_sst", title: "Mean relative SST (SST − tropical-mean SST)",
		read: mapVar("rel_sst_mean"), vars: []string{"rel_sst_mean"}, factor: 1,
		label: "Relative SST (K)", palette: "relative_sst", limits: divergingLimits, inBand: true,
		describe: "map of the time-mean SST relative to the tropical mean"},
}

func init() {
	for _, m := range mapSpecs {
		m := m
		register(figure{name: m.name, describe: m.describe,
			needs: func(r *Run) (bool, string, error) {
				for _, v := range m.vars {
					ok, err := r.HasMap(v)
					if err != nil {
						return false, "", err
					}
					if !ok {
						return false, fmt.Sprintf("maps.nc has no variable %s", v), nil
					}
				}
				return true, "", nil
			},
			build: func(f *fig) (*page, error) { return f.mapPage(m) }})
	}
}

// window is the longitude range a map shows, West…West+Span, and its
// latitude range.
type window struct{ west, span, south, north float64 }

// chooseWindow picks the map's longitude window. A grid that does not go
// round the globe is shown over its own extent (the cells after the
// largest gap between cells, so a Pacific box in −180…180 storage is not
// split). A global grid is shown −180…180 unless more of its valid cells
// lie near 180° than near 0°, when it is shown 0…360 so that the seam
// runs where there is less data.
func chooseWindow(fl *Field) window {
	n := len(fl.Lon)
	w := window{south: fl.LatEdges[0], north: fl.LatEdges[len(fl.LatEdges)-1]}
	west, east := fl.LonWest, fl.LonEast
	gap, after := west[0]+360-east[n-1], n-1
	for i := 0; i+1 < n; i++ {
		if g := west[i+1] - east[i]; g > gap {
			gap, after = g, i
		}
	}
	if gap > 1e-6 {
		start := west[(after+1)%n]
		w.west = start
		w.span = 360 - gap
		return w
	}
	near := func(centre float64) int {
		c := 0
		for j := range fl.Lat {
			for i, x := range fl.Lon {
				d := math.Abs(math.Mod(x-centre+540, 360) - 180)
				if d <= 15 && !math.IsNaN(fl.Values[j*n+i]) {
					c++
				}
			}
		}
		return c
	}
	w.west, w.span = -180, 360
	if near(180) > near(0) {
		w.west = 0
	}
	return w
}

// cellIndex returns, for a longitude in the window, the grid column whose
// cell holds it, or −1.
func cellIndex(fl *Field, lon float64) int {
	n := len(fl.Lon)
	west, east := fl.LonWest, fl.LonEast
	l := west[0] + math.Mod(math.Mod(lon-west[0], 360)+360, 360)
	i := sort.SearchFloat64s(east, l) // first east edge ≥ l
	if i < n && l >= west[i] && l <= east[i] {
		return i
	}
	return -1
}

// raster draws a field as one image over the plot's data area: one pixel
// per device pixel (PNG) or per 1/300 inch (SVG, PDF), each the colour of
// the grid cell under its centre.
type raster struct {
	field  *Field
	factor float64
	scale  colourScale
	dpi    float64
}

func (r *raster) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	x0, x1 := trX(p.X.Min), trX(p.X.Max)
	y0, y1 := trY(p.Y.Min), trY(p.Y.Max)
	img := r.image(p.X.Min, p.X.Max, p.Y.Min, p.Y.Max, (x1 - x0).Dots(r.dpi), (y1 - y0).Dots(r.dpi))
	c.DrawImage(vg.Rectangle{Min: vg.Point{X: x0, Y: y0}, Max: vg.Point{X: x1, Y: y1}}, img)
}

// image renders the field over lon0…lon1, lat0…lat1 into about w×h pixels.
func (r *raster) image(lon0, lon1, lat0, lat1, w, h float64) *image.RGBA {
	fl := r.field
	pw, ph := max(1, int(math.Round(w))), max(1, int(math.Round(h)))
	cols := make([]int, pw)
	for px := range cols {
		cols[px] = cellIndex(fl, lon0+(float64(px)+0.5)/float64(pw)*(lon1-lon0))
	}
	img := image.NewRGBA(image.Rect(0, 0, pw, ph))
	n := len(fl.Lon)
	row := make([]color.RGBA, pw)
	prevJ := -2
	for py := 0; py < ph; py++ {
		lat := lat1 - (float64(py)+0.5)/float64(ph)*(lat1-lat0)
		j := sort.SearchFloat64s(fl.LatEdges, lat) - 1
		if j < 0 || j >= len(fl.Lat) {
			j = -1
		}
		if j != prevJ {
			for px, i := range cols {
				v := math.NaN()
				if i >= 0 && j >= 0 {
					v = fl.Values[j*n+i] * r.factor
				}
				row[px] = r.scale.colour(v)
			}
			prevJ = j
		}
		off := py * img.Stride
		for px, c := range row {
			img.Pix[off+4*px], img.Pix[off+4*px+1], img.Pix[off+4*px+2], img.Pix[off+4*px+3] = c.R, c.G, c.B, 255
		}
	}
	return img
}

// coastLayer strokes the coastline over the map.
type coastLayer struct {
	box coast.Box
}

// The coast is a dark line on a light halo, visible on the dark and the
// light ends of every colour map.
var (
	coastStyle = draw.LineStyle{Color: color.Gray{0x20}, Width: 0.5}
	coastHalo  = draw.LineStyle{Color: color.NRGBA{255, 255, 255, 170}, Width: 1.3}
)

func (cl coastLayer) Plot(c draw.Canvas, p *plot.Plot) {
	ls, err := coast.Lines()
	if err != nil {
		panic(err) // the embedded file is checked by the tests
	}
	trX, trY := p.Transforms(&c)
	for _, l := range coast.Project(ls, cl.box) {
		pts := make([]vg.Point, len(l))
		for i, q := range l {
			pts[i] = vg.Point{X: trX(q.Lon), Y: trY(q.Lat)}
		}
		c.StrokeLines(coastHalo, pts)
	}
	for _, l := range coast.Project(ls, cl.box) {
		pts := make([]vg.Point, len(l))
		for i, q := range l {
			pts[i] = vg.Point{X: trX(q.Lon), Y: trY(q.Lat)}
		}
		c.StrokeLines(coastStyle, pts)
	}
}

// degreeTicks labels longitudes or latitudes in degrees with hemisphere
// letters.
type degreeTicks struct {
	lat bool
}

func (d degreeTicks) Ticks(lo, hi float64) []plot.Tick {
	span := hi - lo
	step := 5.0
	for _, s := range []float64{10, 20, 30, 60} {
		if span/step > 7 {
			step = s
		}
	}
	if span/step > 7 {
		step = 90
	}
	minor := step / 2
	if step == 30 || step == 60 || step == 90 {
		minor = step / 3
	}
	var ts []plot.Tick
	for v := math.Ceil(lo/minor-1e-9) * minor; v <= hi+1e-9; v += minor {
		t := plot.Tick{Value: v}
		if math.Abs(math.Remainder(v, step)) < 1e-9 {
			t.Label = degreeLabel(v, d.lat)
		}
		ts = append(ts, t)
	}
	return ts
}

// degreeLabel writes 30°S, 0°, 60°E, 120°W, 180°.
func degreeLabel(v float64, lat bool) string {
	if !lat {
		v = math.Mod(math.Mod(v+180, 360)+360, 360) - 180 // −180…180
		if math.Abs(v+180) < 1e-9 {
			v = 180
		}
	}
	a := strconv.FormatFloat(math.Abs(v), 'f', -1, 64)
	switch {
	case math.Abs(v) < 1e-9 || (!lat && math.Abs(math.Abs(v)-180) < 1e-9):
		return a + "°"
	case lat && v > 0:
		return a + "°N"
	case lat:
		return a + "°S"
	case v > 0:
		return a + "°E"
	}
	return a + "°W"
}

// mapPlot builds the lat–lon plot of a field with coastlines.
func (f *fig) mapPlot(fl *Field, w window, rs *raster) *plot.Plot {
	p := f.newPlot()
	p.X.Min, p.X.Max = w.west, w.west+w.span
	p.Y.Min, p.Y.Max = w.south, w.north
	p.X.Padding, p.Y.Padding = 0, 0
	p.X.Tick.Marker = f.ticks(degreeTicks{})
	p.Y.Tick.Marker = f.ticks(degreeTicks{lat: true})
	p.X.Label.Text = f.t("Longitude")
	p.Y.Label.Text = f.t("Latitude")
	p.Add(rs)
	if !f.opt.NoCoastlines {
		p.Add(coastLayer{box: coast.Box{West: w.west, East: w.west + w.span, South: w.south, North: w.north}})
	}
	return p
}

// frame strokes a rectangle.
func frame(c draw.Canvas, r vg.Rectangle) {
	c.StrokeLines(draw.LineStyle{Color: inkColour, Width: 0.6}, []vg.Point{
		r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}, r.Min})
}

// fitAspect returns the plot's canvas height and data width so that the
// data area has height/width = aspect within a canvas of width w, with the
// data area at most maxH high.
func fitAspect(p *plot.Plot, w vg.Length, aspect float64, maxH vg.Length) (canvasW, canvasH vg.Length) {
	trial := draw.NewCanvas(nullCanvas{}, w, 4*vg.Inch)
	dc := p.DataCanvas(trial)
	padX := w - (dc.Max.X - dc.Min.X)
	padY := 4*vg.Inch - (dc.Max.Y - dc.Min.Y)
	dw := w - padX
	dh := vg.Length(float64(dw) * aspect)
	if dh > maxH {
		dh = maxH
		dw = vg.Length(float64(dh) / aspect)
	}
	return dw + padX, dh + padY
}

// colourBar draws a horizontal colour bar in r (the bar itself), with
// ticks and labels below it and the label under those; extendLow/High
// draw triangles for values beyond the limits.
func (f *fig) colourBar(c draw.Canvas, r vg.Rectangle, s colourScale, label string, extendLow, extendHigh bool) {
	w := r.Max.X - r.Min.X
	n := max(2, int(math.Round(w.Dots(f.rasterDPI()))))
	img := image.NewRGBA(image.Rect(0, 0, n, 1))
	for i := 0; i < n; i++ {
		col := s.colour(s.lo + (float64(i)+0.5)/float64(n)*(s.hi-s.lo))
		img.SetRGBA(i, 0, col)
	}
	c.DrawImage(r, img)
	h := r.Max.Y - r.Min.Y
	if extendLow {
		pts := []vg.Point{{X: r.Min.X, Y: r.Min.Y}, {X: r.Min.X - h, Y: r.Min.Y + h/2}, {X: r.Min.X, Y: r.Max.Y}}
		c.FillPolygon(s.colour(s.lo), pts)
		c.StrokeLines(draw.LineStyle{Color: inkColour, Width: 0.6}, append(pts, pts[0]))
	}
	if extendHigh {
		pts := []vg.Point{{X: r.Max.X, Y: r.Min.Y}, {X: r.Max.X + h, Y: r.Min.Y + h/2}, {X: r.Max.X, Y: r.Max.Y}}
		c.FillPolygon(s.colour(s.hi), pts)
		c.StrokeLines(draw.LineStyle{Color: inkColour, Width: 0.6}, append(pts, pts[0]))
	}
	frame(c, r)
	ts := style(sizeTick, false)
	ts.XAlign, ts.YAlign = text.XCenter, text.YTop
	x := func(v float64) vg.Length { return r.Min.X + vg.Length((v-s.lo)/(s.hi-s.lo))*w }
	tl := draw.LineStyle{Color: inkColour, Width: 0.6}
	for _, t := range (plot.DefaultTicks{}).Ticks(s.lo, s.hi) {
		if t.Value < s.lo-1e-9*(s.hi-s.lo) || t.Value > s.hi+1e-9*(s.hi-s.lo) {
			continue
		}
		l := vg.Length(1.5)
		if t.Label != "" {
			l = 3
			c.FillText(ts, vg.Point{X: x(t.Value), Y: r.Min.Y - 4}, f.t(minus(t.Label)))
		}
		c.StrokeLine2(tl, x(t.Value), r.Min.Y, x(t.Value), r.Min.Y-l)
	}
	ls := style(sizeLabel, false)
	ls.XAlign, ls.YAlign = text.XCenter, text.YTop
	c.FillText(ls, vg.Point{X: r.Min.X + w/2, Y: r.Min.Y - 4 - lineHeight(ts) - 2}, f.t(label))
}

// colourBarHeight is the height a horizontal colour bar takes with its
// labels.
func colourBarHeight(bar vg.Length) vg.Length {
	return bar + 4 + lineHeight(style(sizeTick, false)) + 2 + lineHeight(style(sizeLabel, false))
}

// missingKey draws the swatch that explains the missing-data colour.
func (f *fig) missingKey(c draw.Canvas, at vg.Point, size vg.Length, what string) {
	r := vg.Rectangle{Min: at, Max: vg.Point{X: at.X + size, Y: at.Y + size}}
	c.SetColor(missingColour)
	c.Fill(r.Path())
	frame(c, r)
	st := style(sizeTick, false)
	st.XAlign, st.YAlign = text.XLeft, text.YCenter
	c.FillText(st, vg.Point{X: r.Max.X + 4, Y: at.Y + size/2}, f.t(what))
}

func (f *fig) mapPage(m mapSpec) (*page, error) {
	fl, err := m.read(f.run)
	if err != nil {
		return nil, err
	}
	w := chooseWindow(fl)
	shown := make([]float64, len(fl.Values))
	minV, maxV := math.Inf(1), math.Inf(-1)
	for i, v := range fl.Values {
		shown[i] = v * m.factor
		if !math.IsNaN(v) {
			minV, maxV = math.Min(minV, shown[i]), math.Max(maxV, shown[i])
		}
	}
	lo, hi := m.limits(limitValues(fl, shown, m.inBand, f.run.BandSouth, f.run.BandNorth))
	sc := f.scale(m.palette, lo, hi)
	rs := &raster{field: fl, factor: m.factor, scale: sc, dpi: f.rasterDPI()}
	p := f.mapPlot(fl, w, rs)
	bw := bodyWidth()
	aspect := (w.north - w.south) / w.span
	pw, ph := fitAspect(p, bw, aspect, 4.2*vg.Inch)
	const bar = 0.13 * vg.Inch
	barBlock := 0.2*vg.Inch + colourBarHeight(bar)
	head := f.header(m.title, bw)
	pg := &page{header: head, footer: f.footer(bw), bodyH: ph + barBlock}
	pg.body = func(c draw.Canvas) {
		left := c.Min.X + (c.Max.X-c.Min.X-pw)/2
		pc := c
		pc.Min = vg.Point{X: left, Y: c.Max.Y - ph}
		pc.Max = vg.Point{X: left + pw, Y: c.Max.Y}
		p.Draw(pc)
		dc := p.DataCanvas(pc)
		frame(c, dc.Rectangle)
		f.dataArea = dc.Rectangle
		dw := dc.Max.X - dc.Min.X
		bwid := 0.6 * dw
		bx := dc.Min.X + (dw-bwid)/2
		by := pc.Min.Y - 0.2*vg.Inch - bar
		r := vg.Rectangle{Min: vg.Point{X: bx, Y: by}, Max: vg.Point{X: bx + bwid, Y: by + bar}}
		f.colourBar(c, r, sc, m.label, minV < lo-1e-9*(hi-lo), maxV > hi+1e-9*(hi-lo))
		f.missingKey(c, vg.Point{X: r.Max.X + bar + 14, Y: by}, bar, "no data or land")
	}
	return pg, nil
}

// limitValues returns the values that set a map's colour limits: all of
// them, or with inBand those of the rows whose latitude lies in [south,
// north] (all of them when the band is unknown or holds no row).
func limitValues(fl *Field, shown []float64, inBand bool, south, north float64) []float64 {
	if !inBand || !(north > south) {
		return shown
	}
	nlon := len(fl.Lon)
	var out []float64
	for j, lat := range fl.Lat {
		if lat >= south && lat <= north {
			out = append(out, shown[j*nlon:(j+1)*nlon]...)
		}
	}
	if len(out) == 0 {
		return shown
	}
	return out
}

// nullCanvas measures layouts without drawing.
type nullCanvas struct{}

func (nullCanvas) SetLineWidth(vg.Length)                 {}
func (nullCanvas) SetLineDash([]vg.Length, vg.Length)     {}
func (nullCanvas) SetColor(color.Color)                   {}
func (nullCanvas) Rotate(float64)                         {}
func (nullCanvas) Translate(vg.Point)                     {}
func (nullCanvas) Scale(float64, float64)                 {}
func (nullCanvas) Push()                                  {}
func (nullCanvas) Pop()                                   {}
func (nullCanvas) Stroke(vg.Path)                         {}
func (nullCanvas) Fill(vg.Path)                           {}
func (nullCanvas) FillString(font.Face, vg.Point, string) {}
func (nullCanvas) DrawImage(vg.Rectangle, image.Image)    {}
