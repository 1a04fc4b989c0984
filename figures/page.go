package figures

import (
	"bytes"
	"fmt"
	"image/color"
	"io"
	"math"
	"strconv"
	"strings"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgpdf"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Sizes of the figures: the width of a two-column journal figure.
const (
	pageWidth = 7 * vg.Inch
	margin    = 0.12 * vg.Inch
	// vectorRasterDPI is the resolution of heat maps embedded in SVG and
	// PDF figures (print quality).
	vectorRasterDPI = 300
)

// Font sizes in points.
const (
	sizeTitle    = 11
	sizeSubtitle = 8.5
	sizeLabel    = 9
	sizeTick     = 8
	sizeLegend   = 8
	sizeFooter   = 6.5
)

var (
	inkColour    = color.Gray{0x20}
	subtleColour = color.Gray{0x60}
	gridColour   = color.Gray{0xd8}
)

// fig carries what every figure drawing needs: the run, the output format
// and the options.
type fig struct {
	run    *Run
	opt    Options
	name   string
	format string
	dpi    float64 // PNG resolution; rasters in vector formats use vectorRasterDPI
	pdf    bool
	// dataArea is the last map's data area on the page, for the tests.
	dataArea vg.Rectangle
	// panels are the data areas of the panels drawPanelTitles titled,
	// for the tests.
	panels []vg.Rectangle
}

// rasterDPI is the resolution of heat-map images.
func (f *fig) rasterDPI() float64 {
	if f.format == "png" {
		return f.dpi
	}
	return vectorRasterDPI
}

// pdfText replaces what the PDF writer's code page (Windows-1252) cannot
// show.
var pdfText = strings.NewReplacer(
	"⁻¹", "^-1", "⁻²", "^-2", "−", "-", "δ", "delta ", "Δ", "Delta ", "σ", "sigma",
	"≥", ">=", "≤", "<=", "≈", "~", "²", "^2", "₀", "0", "ₑ", "e", "→", "->", "·", "·",
)

// t prepares text for the output format.
func (f *fig) t(s string) string {
	if f.pdf {
		return cp1252(pdfText.Replace(s))
	}
	return s
}

// style returns a plain text style of the figures' font.
func style(size vg.Length, bold bool) text.Style {
	fnt := font.Font{Typeface: "Liberation", Variant: "Sans", Size: size}
	if bold {
		fnt.Weight = xfont.WeightBold
	}
	return text.Style{Color: inkColour, Font: fnt, Handler: plot.DefaultTextHandler}
}

// bold returns the bold style, except in PDF, whose writer (vgpdf of
// gonum plot v0.17.0) registers embedded fonts without their style and
// then cannot find a bold face.
func (f *fig) bold(size vg.Length) text.Style {
	return style(size, !f.pdf)
}

// newPlot returns a plot in the figures' style.
func (f *fig) newPlot() *plot.Plot {
	p := plot.New()
	p.BackgroundColor = color.Transparent
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		// Keep gonum's per-axis alignments; change font and colour.
		a.Label.TextStyle.Font = style(sizeLabel, false).Font
		a.Label.TextStyle.Color = inkColour
		a.Tick.Label.Font = style(sizeTick, false).Font
		a.Tick.Label.Color = inkColour
		a.Color = inkColour
		a.Tick.Color = inkColour
		a.Tick.Length = 3
		a.Width = 0.6
		a.Tick.Width = 0.6
		a.Label.Padding = 2
	}
	p.X.Tick.Marker = f.ticks(roundTicks{})
	p.Y.Tick.Marker = f.ticks(roundTicks{})
	p.Legend.TextStyle = style(sizeLegend, false)
	p.Legend.ThumbnailWidth = 0.3 * vg.Inch
	p.Legend.Padding = 2
	return p
}

// wrap breaks s into lines no wider than w in style st.
func wrap(s string, st text.Style, w vg.Length) []string {
	var lines []string
	for _, para := range strings.Split(s, "\n") {
		words := strings.Fields(para)
		cur := ""
		for _, wd := range words {
			try := wd
			if cur != "" {
				try = cur + " " + wd
			}
			if cur != "" && st.Width(try) > w {
				lines = append(lines, cur)
				cur = wd
				continue
			}
			cur = try
		}
		if cur != "" {
			lines = append(lines, cur)
		}
	}
	return lines
}

// lineHeight is the distance between baselines of text in st.
func lineHeight(st text.Style) vg.Length {
	e := st.FontExtents()
	return e.Height * 1.12
}

// textBlock is wrapped text drawn from the top of its area.
type textBlock struct {
	lines []string
	style text.Style
}

func (b textBlock) height() vg.Length { return vg.Length(len(b.lines)) * lineHeight(b.style) }

// draw draws the block with its top at y, aligned left at x.
func (b textBlock) draw(c draw.Canvas, x, y vg.Length) {
	st := b.style
	st.XAlign, st.YAlign = text.XLeft, text.YTop
	for i, l := range b.lines {
		c.FillText(st, vg.Point{X: x, Y: y - vg.Length(i)*lineHeight(b.style)}, l)
	}
}

// header is a figure's title block: what is shown, then the dataset and
// period, then the regime definition.
func (f *fig) header(what string, width vg.Length) []textBlock {
	return f.headerOf(what, f.run.Dataset, width)
}

// headerOf is header with the subtitle naming ds (a dataset, or the runs
// a comparison sets side by side) instead of the run's dataset.
func (f *fig) headerOf(what, ds string, width vg.Length) []textBlock {
	r := f.run
	if ds == "" {
		ds = "unnamed dataset"
	}
	period := r.Period
	if period == "" {
		period = "period not recorded"
	}
	sub := fmt.Sprintf("%s · %s", ds, period)
	reg := "Regimes: " + r.RegimeDefinition
	if r.RegimeDefinition == "" {
		reg = "Regimes: definition not recorded"
	}
	return []textBlock{
		{wrap(f.t(what), f.bold(sizeTitle), width), f.bold(sizeTitle)},
		{wrap(f.t(sub), style(sizeSubtitle, false), width), style(sizeSubtitle, false)},
		{wrap(f.t(reg), style(sizeSubtitle, false), width), withColour(style(sizeSubtitle, false), subtleColour)},
	}
}

func withColour(s text.Style, c color.Color) text.Style { s.Color = c; return s }

// footer is the small print under every figure.
func (f *fig) footer(width vg.Length) textBlock {
	r := f.run
	v := r.Version
	if v == "" {
		v = "version not recorded"
	}
	h := r.StudyHash
	if h == "" {
		h = "not recorded"
	}
	s := fmt.Sprintf("lidscope %s · study %s · figure %s", v, h, f.name)
	if len(r.Absent) > 0 {
		// a run without an optional input says what it lacks
		s += " · quantities: " + strings.Join(r.Quantities, ", ") + " · " + strings.Join(r.Absent, "; ")
	}
	st := withColour(style(sizeFooter, false), subtleColour)
	return textBlock{wrap(f.t(s), st, width), st}
}

// page is a figure laid out top to bottom: header blocks, a body of fixed
// height drawn by a function, and the footer.
type page struct {
	header []textBlock
	bodyH  vg.Length
	body   func(c draw.Canvas)
	footer textBlock
}

const blockGap = 3

func (p *page) height() vg.Length {
	h := 2 * margin
	for _, b := range p.header {
		h += b.height() + blockGap
	}
	return h + 6 + p.bodyH + 6 + p.footer.height()
}

func (p *page) draw(c draw.Canvas) {
	c.SetColor(color.White)
	c.Fill(c.Rectangle.Path())
	y := c.Max.Y - margin
	x := c.Min.X + margin
	for _, b := range p.header {
		b.draw(c, x, y)
		y -= b.height() + blockGap
	}
	y -= 6
	body := c
	body.Min = vg.Point{X: c.Min.X + margin, Y: y - p.bodyH}
	body.Max = vg.Point{X: c.Max.X - margin, Y: y}
	p.body(body)
	p.footer.draw(c, x, c.Min.Y+margin+p.footer.height())
}

// render writes the page in the figure's format.
func (f *fig) render(p *page, w io.Writer) error {
	width, height := pageWidth, p.height()
	var cw vg.CanvasWriterTo
	switch f.format {
	case "png":
		c := vgimg.NewWith(vgimg.UseWH(width, height), vgimg.UseDPI(int(f.dpi)))
		cw = vgimg.PngCanvas{Canvas: c}
	case "svg":
		cw = vgsvg.NewWith(vgsvg.UseWH(width, height), vgsvg.EmbedFonts(true))
	case "pdf":
		c := vgpdf.New(width, height)
		c.EmbedFonts(true)
		cw = c
	default:
		return fmt.Errorf("figures: unknown format %q: use png, svg or pdf", f.format)
	}
	var err error
	func() {
		defer func() {
			if e := recover(); e != nil {
				err = fmt.Errorf("figures: drawing %s failed: %v", f.name, e)
			}
		}()
		p.draw(draw.New(cw))
	}()
	if err != nil {
		return err
	}
	var buf bytes.Buffer
	if _, err := cw.WriteTo(&buf); err != nil {
		return fmt.Errorf("figures: encoding %s as %s: %w", f.name, f.format, err)
	}
	_, err = w.Write(buf.Bytes())
	return err
}

// bodyWidth is the width available inside the page margins.
func bodyWidth() vg.Length { return pageWidth - 2*margin }

// niceCeil rounds x up to 1, 2, 2.5 or 5 times a power of ten.
func niceCeil(x float64) float64 {
	if x <= 0 || math.IsNaN(x) || math.IsInf(x, 0) {
		return 1
	}
	e := math.Pow(10, math.Floor(math.Log10(x)))
	for _, m := range []float64{1, 2, 2.5, 5, 10} {
		if m*e >= x*(1-1e-12) {
			return m * e
		}
	}
	return 10 * e
}

// minus writes a leading hyphen-minus as the minus sign U+2212.
func minus(s string) string {
	if strings.HasPrefix(s, "-") {
		return "−" + s[1:]
	}
	return s
}

// fmtTicks writes a ticker's labels with true minus signs, prepared for
// the output format.
type fmtTicks struct {
	plot.Ticker
	f *fig
}

func (s fmtTicks) Ticks(lo, hi float64) []plot.Tick {
	ts := distinctLabels(s.Ticker.Ticks(lo, hi))
	for i := range ts {
		ts[i].Label = s.f.t(minus(ts[i].Label))
	}
	return ts
}

// distinctLabels rewrites numeric major-tick labels with as many decimals
// as their spacing needs when two of them read the same (a narrow range
// such as 297.6…298.2 K would otherwise be labelled "298" three times).
func distinctLabels(ts []plot.Tick) []plot.Tick {
	seen := map[string]bool{}
	var major []int
	dup := false
	for i, t := range ts {
		if t.Label == "" {
			continue
		}
		if _, err := strconv.ParseFloat(t.Label, 64); err != nil {
			return ts // not plain numbers (dates, degrees): leave them
		}
		dup = dup || seen[t.Label]
		seen[t.Label] = true
		major = append(major, i)
	}
	if !dup || len(major) < 2 {
		return ts
	}
	step := math.Abs(ts[major[1]].Value - ts[major[0]].Value)
	if !(step > 0) {
		return ts
	}
	dec := int(math.Max(0, math.Ceil(-math.Log10(step)+1e-9)))
	for _, i := range major {
		ts[i].Label = strconv.FormatFloat(ts[i].Value, 'f', dec, 64)
	}
	return ts
}

// ticks wraps a ticker for the figure's format.
func (f *fig) ticks(t plot.Ticker) plot.Ticker { return fmtTicks{t, f} }

// cp1252 encodes text for the PDF writer, which reads strings as Windows-1252
// bytes: ASCII and Latin-1 as themselves, the typographic punctuation of
// 0x80–0x9F at its code points (Windows-1252 table, from memory), anything
// else as "?".
func cp1252(s string) string {
	special := map[rune]byte{'€': 0x80, '‚': 0x82, '„': 0x84, '…': 0x85, '‘': 0x91, '’': 0x92, '“': 0x93, '”': 0x94,
		'•': 0x95, '–': 0x96, '—': 0x97, '™': 0x99}
	b := make([]byte, 0, len(s))
	for _, r := range s {
		switch {
		case r < 0x80 || (r >= 0xA0 && r <= 0xFF):
			b = append(b, byte(r))
		case special[r] != 0:
			b = append(b, special[r])
		default:
			b = append(b, '?')
		}
	}
	return string(b)
}
