package figures

import (
	"errors"
	"fmt"
	"image/color"
	"math"
	"os"
	"path/filepath"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"lidscope/factors"
)

// The cloud-controlling factor figures (package factors): maps of the
// per-cell sensitivities per standard deviation of each factor, stippled
// where the interval excludes zero, and the regional sensitivities with
// their intervals.
func init() {
	register(
		figure{name: "map_factor_sensitivities",
			describe: "maps of the cloud response per standard deviation of each factor's anomaly (factors.nc), stippled where the interval excludes 0",
			needs:    func(r *Run) (bool, string, error) { return r.hasFactors(true) },
			build:    func(f *fig) (*page, error) { return f.factorMapsPage() }},
		figure{name: "factor_sensitivities",
			describe: "the cloud response per standard deviation of each factor with its interval, per domain and regime (factors.json)",
			needs:    func(r *Run) (bool, string, error) { return r.hasFactors(false) },
			build:    func(f *fig) (*page, error) { return f.factorBarsPage() }},
	)
}

// hasFactors reports whether the run has factor results (with maps when
// maps is set).
func (r *Run) hasFactors(maps bool) (bool, string, error) {
	if _, err := os.Stat(filepath.Join(r.Dir, factors.JSONFile)); err != nil {
		return false, "the run has no factors.json (no factors section in its study)", nil
	}
	if maps {
		if _, err := os.Stat(filepath.Join(r.Dir, factors.MapsFile)); err != nil {
			return false, "the run has no factors.nc (factors.maps: false)", nil
		}
	}
	return true, "", nil
}

// factorResults reads the run's factor results once.
func (r *Run) factorResults() (*factors.Results, error) {
	if r.factors == nil {
		fr, err := factors.ReadRun(r.Dir)
		if err != nil {
			return nil, err
		}
		r.factors = fr
	}
	return r.factors, nil
}

// methodLabel names the regression method in a title.
func methodLabel(m string) string {
	if m == factors.MethodOLS {
		return "least-squares"
	}
	return "ridge"
}

// factorLabel (figures/constraint.go) names a factor on a figure.

// stipple marks the cells whose interval excludes zero with a small dot
// at the cell centre (every cell on coarse grids; on fine grids every
// second or third cell in each direction, so the dots stay apart).
type stipple struct {
	field *Field
	sig   []bool
}

func (s stipple) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	fl := s.field
	n := len(fl.Lon)
	// keep the dots about 2.5 points apart
	dx := float64(trX(p.X.Min+(fl.LonEast[0]-fl.LonWest[0])) - trX(p.X.Min))
	step := max(1, int(math.Ceil(3.5/math.Max(dx, 1e-6))))
	// a dark dot on a light ring: visible on both ends of the diverging map
	halo := draw.GlyphStyle{Color: color.Gray{0xf4}, Radius: 0.95, Shape: draw.CircleGlyph{}}
	gs := draw.GlyphStyle{Color: color.Gray{0x10}, Radius: 0.6, Shape: draw.CircleGlyph{}}
	for j := 0; j < len(fl.Lat); j += step {
		for i := 0; i < n; i += step {
			if !s.sig[j*n+i] {
				continue
			}
			lon := 0.5 * (fl.LonWest[i] + fl.LonEast[i])
			for lon < p.X.Min {
				lon += 360
			}
			for lon > p.X.Max {
				lon -= 360
			}
			if lon < p.X.Min || fl.Lat[j] < p.Y.Min || fl.Lat[j] > p.Y.Max {
				continue
			}
			pt := vg.Point{X: trX(lon), Y: trY(fl.Lat[j])}
			c.DrawGlyph(halo, pt)
			c.DrawGlyph(gs, pt)
		}
	}
}

func (f *fig) factorMapsPage() (*page, error) {
	fr, err := f.run.factorResults()
	if err != nil {
		return nil, err
	}
	m := fr.Maps
	if m == nil || len(fr.Factors) == 0 {
		return nil, errors.New("the run's factor results have no maps")
	}
	if _, err := f.run.openMapsGrid(); err != nil {
		return nil, err
	}
	g := f.run.maps
	if len(g.lat) != m.NLat || len(g.lon) != m.NLon {
		return nil, fmt.Errorf("factors.nc (%d×%d) and maps.nc (%d×%d) are on different grids", m.NLat, m.NLon, len(g.lat), len(g.lon))
	}
	ru, fac := displayUnits(fr.ResponseUnits)
	var all []float64
	fields := make([]*Field, len(fr.Factors))
	sigs := make([][]bool, len(fr.Factors))
	for k, fi := range fr.Factors {
		fl := &Field{Name: factors.CoefSDName(fr.Response, fi.Name), Units: fr.ResponseUnits, Lat: g.lat, Lon: g.lon, LatEdges: g.latEdges,
			LonWest: g.lonWest, LonEast: g.lonEast, Values: m.CoefSD[k]}
		fields[k] = fl
		sigs[k] = make([]bool, len(fl.Values))
		for i, v := range fl.Values {
			if !math.IsNaN(v) {
				all = append(all, v*fac)
				sigs[k][i] = m.Lo[k][i] > 0 || m.Hi[k][i] < 0
			}
		}
	}
	if len(all) == 0 {
		return nil, errors.New("the factor maps have no cell with a fit")
	}
	lo, hi := divergingLimits(all)
	sc := f.scale("relative_sst", lo, hi) // the diverging map (fulcrum unless overridden)
	w := chooseWindow(fields[0])
	if s, n := f.run.BandSouth, f.run.BandNorth; n > s {
		w.south, w.north = math.Max(w.south, s-2), math.Min(w.north, n+2)
	}
	bw := bodyWidth()
	aspect := (w.north - w.south) / w.span
	var plots []*plot.Plot
	var pw, ph vg.Length
	for k, fl := range fields {
		p := f.mapPlot(fl, w, &raster{field: fl, factor: fac, scale: sc, dpi: f.rasterDPI()})
		p.Add(stipple{field: fl, sig: sigs[k]})
		p.Title.Text = f.t(fmt.Sprintf("(%c) %s", 'a'+k, factorLabel(fr.Factors[k].Name)))
		setTitleStyle(p, f.bold(sizeLabel))
		if k < len(fields)-1 {
			p.X.Label.Text = "" // one longitude label, under the last panel
		}
		pw, ph = fitAspect(p, bw, aspect, 1.9*vg.Inch)
		plots = append(plots, p)
	}
	const bar = 0.12 * vg.Inch
	barBlock := 0.2*vg.Inch + colourBarHeight(bar)
	pct := 100 * fr.Level
	title := fmt.Sprintf("%s per standard deviation of each factor's monthly anomaly (%s regression), stippled where the %g %% interval excludes 0",
		responseLabel(fr.Response), methodLabel(fr.Method), pct)
	head := f.header(title, bw)
	const gap = 0.06 * vg.Inch // between a panel's tick labels and the next title
	pg := &page{header: head, footer: f.footer(bw), bodyH: vg.Length(len(plots))*(ph+gap) + barBlock}
	pg.body = func(c draw.Canvas) {
		top := c.Max.Y
		var last draw.Canvas
		for _, p := range plots {
			left := c.Min.X + (c.Max.X-c.Min.X-pw)/2
			pc := c
			pc.Min = vg.Point{X: left, Y: top - ph}
			pc.Max = vg.Point{X: left + pw, Y: top}
			p.Draw(pc)
			dc := p.DataCanvas(pc)
			frame(c, dc.Rectangle)
			f.dataArea = dc.Rectangle
			last = dc
			top -= ph + gap
		}
		dw := last.Max.X - last.Min.X
		bwid := 0.6 * dw
		bx := last.Min.X + (dw-bwid)/2
		by := top - 0.2*vg.Inch - bar
		r := vg.Rectangle{Min: vg.Point{X: bx, Y: by}, Max: vg.Point{X: bx + bwid, Y: by + bar}}
		mn, mx := math.Inf(1), math.Inf(-1)
		for _, v := range all {
			mn, mx = math.Min(mn, v), math.Max(mx, v)
		}
		label := fmt.Sprintf("%s per standard deviation of the factor (%s)", responseLabel(fr.Response), ru)
		f.colourBar(c, r, sc, label, mn < lo-1e-9*(hi-lo), mx > hi+1e-9*(hi-lo))
		f.missingKey(c, vg.Point{X: r.Max.X + bar + 14, Y: by}, bar, "no fit or land")
	}
	return pg, nil
}

// factorPoints draws, per factor, one point with its interval per regime.
type factorPoints struct {
	fits []*factors.RegionFit // one per regime, nil where absent
	p    int
	fac  float64
}

var regimeColours = []color.Color{lineBlue, lineOrange, lineBlack}

func (fp factorPoints) x(i, k int) float64 {
	n := len(fp.fits)
	return float64(i) + (float64(k)-float64(n-1)/2)*0.7/float64(n)
}

func (fp factorPoints) at(i, k int) (v, lo, hi float64) {
	ft := fp.fits[k]
	if ft == nil {
		return math.NaN(), math.NaN(), math.NaN()
	}
	s := ft.Sens[i]
	return s.CoefSD * fp.fac, s.Lo * s.SD * fp.fac, s.Hi * s.SD * fp.fac
}

func (fp factorPoints) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	for i := 0; i < fp.p; i++ {
		for k := range fp.fits {
			v, lo, hi := fp.at(i, k)
			if math.IsNaN(v) {
				continue
			}
			col := regimeColours[k%len(regimeColours)]
			x := trX(fp.x(i, k))
			ls := draw.LineStyle{Color: col, Width: 1}
			if !math.IsNaN(lo) && !math.IsNaN(hi) {
				capped(c, ls, x, trY(lo), trY(hi))
			}
			c.DrawGlyph(draw.GlyphStyle{Color: col, Radius: 2.2, Shape: draw.CircleGlyph{}}, vg.Point{X: x, Y: trY(v)})
		}
	}
}

// capped draws a vertical interval from lo to hi at x with caps 2 points
// wide either side, the interval mark of every points figure.
func capped(c draw.Canvas, ls draw.LineStyle, x, lo, hi vg.Length) {
	c.StrokeLine2(ls, x, lo, x, hi)
	c.StrokeLine2(ls, x-2, lo, x+2, lo)
	c.StrokeLine2(ls, x-2, hi, x+2, hi)
}

func (fp factorPoints) DataRange() (xmin, xmax, ymin, ymax float64) {
	ymin, ymax = math.Inf(1), math.Inf(-1)
	for i := 0; i < fp.p; i++ {
		for k := range fp.fits {
			v, lo, hi := fp.at(i, k)
			for _, y := range []float64{v, lo, hi} {
				if !math.IsNaN(y) && !math.IsInf(y, 0) {
					ymin, ymax = math.Min(ymin, y), math.Max(ymax, y)
				}
			}
		}
	}
	if ymin > ymax {
		ymin, ymax = -1, 1
	}
	ymin, ymax = math.Min(ymin, 0), math.Max(ymax, 0)
	ymax += 0.35 * (ymax - ymin) // room for the legend
	return -0.5, float64(fp.p) - 0.5, ymin, ymax
}

// factorBarsPage shows, per domain (the tropical band and each region), the
// response per standard deviation of each factor with its interval, for
// the subsidence and convective regimes and all columns.
func (f *fig) factorBarsPage() (*page, error) {
	fr, err := f.run.factorResults()
	if err != nil {
		return nil, err
	}
	var domains []string
	seen := map[string]bool{}
	for _, ft := range fr.Fits {
		if !seen[ft.Domain] {
			seen[ft.Domain] = true
			domains = append(domains, ft.Domain)
		}
	}
	if len(domains) == 0 {
		return nil, errors.New("the run's factor results have no fits")
	}
	ru, fac := displayUnits(fr.ResponseUnits)
	var plots []*plot.Plot
	for d, dom := range domains {
		fp := factorPoints{p: len(fr.Factors), fac: fac}
		for _, reg := range factors.SlotNames {
			ft, _ := fr.Fit(dom, reg)
			fp.fits = append(fp.fits, ft)
		}
		p := f.newPlot()
		p.Add(lightGrid(), fp)
		p.Add(hline{0, draw.LineStyle{Color: color.Gray{0x50}, Width: 0.5}})
		var ticks []plot.Tick
		for i, fi := range fr.Factors {
			ticks = append(ticks, plot.Tick{Value: float64(i), Label: factorLabel(fi.Name)})
		}
		p.X.Tick.Marker = plot.ConstantTicks(ticks)
		name := placeWords(dom)
		if dom == "tropical_band" {
			name = "tropical band " + degreeLabel(f.run.BandSouth, true) + "–" + degreeLabel(f.run.BandNorth, true)
		}
		p.Title.Text = f.t(fmt.Sprintf("(%c) %s", 'a'+d, name))
		setTitleStyle(p, f.bold(sizeLabel))
		p.Y.Label.Text = f.t(fmt.Sprintf("%s per std. dev. (%s)", responseLabel(fr.Response), ru))
		p.Legend.Top, p.Legend.Left = true, false
		for k, reg := range factors.SlotNames {
			lbl := reg + " regime"
			if reg == "all" {
				lbl = "all columns"
			}
			if ft := fp.fits[k]; ft != nil && !math.IsNaN(ft.CVR2) {
				lbl += fmt.Sprintf(" (CV R² %.2f)", ft.CVR2)
			}
			p.Legend.Add(f.t(lbl), glyphThumb{regimeColours[k%len(regimeColours)]})
		}
		plots = append(plots, p)
	}
	bw := bodyWidth()
	const h = 2.6 * vg.Inch
	head := f.header(fmt.Sprintf("%s per standard deviation of each factor's monthly anomaly, %g %% intervals (%s regression on domain means)",
		responseLabel(fr.Response), 100*fr.Level, methodLabel(fr.Method)), bw)
	pg := &page{header: head, footer: f.footer(bw), bodyH: vg.Length(len(plots)) * h}
	pg.body = func(c draw.Canvas) {
		top := c.Max.Y
		for _, p := range plots {
			pc := c
			pc.Min.Y, pc.Max.Y = top-h+0.1*vg.Inch, top
			p.Draw(pc)
			dc := p.DataCanvas(pc)
			frame(c, dc.Rectangle)
			f.dataArea = dc.Rectangle
			top -= h
		}
	}
	return pg, nil
}
