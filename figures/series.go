package figures

import (
	"fmt"
	"image/color"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"lidscope/calendar"
)

// Line colours for categorical series: the first colours of Wong's
// colour-blind-safe set (Wong 2011, Nature Methods 8:441; from memory):
// blue, vermillion, bluish green, reddish purple, black.
var (
	lineBlue   = color.RGBA{0, 114, 178, 255}
	lineOrange = color.RGBA{213, 94, 0, 255}
	lineGreen  = color.RGBA{0, 158, 115, 255}
	linePurple = color.RGBA{204, 121, 167, 255}
	lineBlack  = color.RGBA{0, 0, 0, 255}
)

func init() {
	register(figure{name: "series", describe: "time series of the tropical-mean SST and of the convective (and subsidence) area fraction of the band",
		needs: func(r *Run) (bool, string, error) { return true, "", nil },
		build: func(f *fig) (*page, error) { return f.seriesPage() }})
}

// yearTicks marks years on a decimal-year axis. Records longer than three
// years get labels at whole years (every 1, 2, 5, 10, … years so that at
// most eight are labelled); shorter ones at January and July, written
// YYYY-MM. Minor ticks fall at months (short records), quarters or
// fractions of the labelled step.
type yearTicks struct{}

func (yearTicks) Ticks(lo, hi float64) []plot.Tick {
	span := hi - lo
	if span <= 3 {
		var ts []plot.Tick
		for m := int(math.Floor(lo * 12)); float64(m) <= hi*12+1e-9; m++ {
			v := float64(m) / 12
			if v < lo-1e-9 {
				continue
			}
			t := plot.Tick{Value: v}
			y, mo := m/12, m%12
			if mo%6 == 0 {
				t.Label = fmt.Sprintf("%d-%02d", y, mo+1)
			}
			ts = append(ts, t)
		}
		return ts
	}
	step := 1.0
	for _, s := range []float64{2, 5, 10, 20, 50, 100} {
		if span/step > 8 {
			step = s
		}
	}
	minor := step / 5
	switch step {
	case 1:
		minor = 0.25
	case 2:
		minor = 0.5
	}
	var ts []plot.Tick
	for v := math.Ceil(lo/minor-1e-9) * minor; v <= hi+1e-9; v += minor {
		t := plot.Tick{Value: v}
		if math.Abs(math.Remainder(v, step)) < 1e-6 {
			t.Label = strconv.Itoa(int(math.Round(v)))
		}
		ts = append(ts, t)
	}
	return ts
}

// monthTicks label a climatological axis (decimal years within the year
// of the stamps) with the calendar months, Jan … Dec, at their middles,
// and put minor ticks at the month boundaries.
type monthTicks struct{ year int }

func (m monthTicks) Ticks(lo, hi float64) []plot.Tick {
	var ts []plot.Tick
	y := float64(m.year)
	for k := 0; k <= 12; k++ {
		if v := y + float64(k)/12; v >= lo-1e-9 && v <= hi+1e-9 {
			ts = append(ts, plot.Tick{Value: v})
		}
		if k < 12 {
			if v := y + (float64(k)+0.5)/12; v >= lo-1e-9 && v <= hi+1e-9 {
				ts = append(ts, plot.Tick{Value: v, Label: calendar.MonthAbbrev(k + 1)})
			}
		}
	}
	return ts
}

func xys(x, y []float64, factor float64) plotter.XYs {
	var out plotter.XYs
	for i := range x {
		if math.IsNaN(y[i]) {
			continue
		}
		out = append(out, plotter.XY{X: x[i], Y: y[i] * factor})
	}
	return out
}

func (f *fig) seriesPage() (*page, error) {
	s, err := f.run.Series()
	if err != nil {
		return nil, err
	}
	if len(s.Years) == 0 {
		return nil, fmt.Errorf("series.nc has no time steps")
	}
	lo, hi := s.Years[0], s.Years[len(s.Years)-1]
	if hi <= lo {
		lo, hi = lo-0.5, hi+0.5
	}
	pad := (hi - lo) * 0.02
	var ticks plot.Ticker = yearTicks{}
	xLabel := "Time"
	if s.Climatology {
		// calendar months, not dates: the whole year, labelled Jan … Dec
		y := math.Floor(s.Years[0])
		ticks, xLabel = monthTicks{year: int(y)}, "Calendar month (12-month climatology)"
		lo, hi, pad = y, y+1, 0
	}
	mk := func() *plot.Plot {
		p := f.newPlot()
		p.X.Min, p.X.Max = lo-pad, hi+pad
		p.X.Tick.Marker = f.ticks(ticks)
		p.Add(lightGrid())
		return p
	}
	top := mk()
	top.Y.Label.Text = f.t("Tropical-mean SST (K)")
	top.Y.Tick.Marker = f.ticks(roundTicks{})
	if l, err := plotter.NewLine(xys(s.Years, s.TropMeanSST, 1)); err == nil && len(xys(s.Years, s.TropMeanSST, 1)) > 0 {
		l.Color, l.Width = lineBlack, 1
		top.Add(l)
	}
	// The upper panel shares the lower one's time axis: ticks without
	// labels.
	top.X.Tick.Marker = unlabelled{ticks}
	bot := mk()
	bot.Y.Label.Text = f.t("Band area fraction (%)")
	bot.X.Label.Text = f.t(xLabel)
	bot.Y.Min, bot.Y.Max = 0, 0
	for _, c := range []struct {
		name   string
		v      []float64
		colour color.Color
		dash   []vg.Length
	}{
		{"convective", s.Convective, lineOrange, nil},
		{"subsidence", s.Subsidence, lineBlue, []vg.Length{4, 2}},
	} {
		pts := xys(s.Years, c.v, 100)
		if len(pts) == 0 {
			continue
		}
		l, err := plotter.NewLine(pts)
		if err != nil {
			return nil, err
		}
		l.Color, l.Width, l.Dashes = c.colour, 1, c.dash
		bot.Add(l)
		bot.Legend.Add(f.t(c.name+" regime"), l)
	}
	bot.Legend.Top = true
	bot.Legend.Left = true
	bot.Legend.XOffs, bot.Legend.YOffs = 8, -8
	// Fractions keep their full 0–100 % scale visible in context.
	bot.Y.Min, bot.Y.Max = 0, 100
	bw := bodyWidth()
	const panelH = 1.7 * vg.Inch
	pg := &page{header: f.header("Tropical-band time series: tropical-mean SST and regime area fractions", bw),
		footer: f.footer(bw), bodyH: 2*panelH + 0.1*vg.Inch}
	pg.body = func(c draw.Canvas) {
		tiles := draw.Tiles{Rows: 2, Cols: 1, PadY: 0.1 * vg.Inch}
		cs := plot.Align([][]*plot.Plot{{top}, {bot}}, tiles, c)
		top.Draw(cs[0][0])
		bot.Draw(cs[1][0])
	}
	return pg, nil
}

// lightGrid returns grid lines in a light grey.
func lightGrid() *plotter.Grid {
	g := plotter.NewGrid()
	g.Vertical.Color, g.Horizontal.Color = gridColour, gridColour
	g.Vertical.Width, g.Horizontal.Width = 0.4, 0.4
	g.Vertical.Dashes, g.Horizontal.Dashes = nil, nil
	return g
}

// unlabelled keeps a ticker's marks and blanks their labels; major ticks
// keep a blank label so that they stay major (long marks, grid lines).
type unlabelled struct{ plot.Ticker }

func (u unlabelled) Ticks(lo, hi float64) []plot.Tick {
	ts := u.Ticker.Ticks(lo, hi)
	for i := range ts {
		if ts[i].Label != "" {
			ts[i].Label = " "
		}
	}
	return ts
}
