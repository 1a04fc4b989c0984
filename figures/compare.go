package figures

import (
	"errors"
	"fmt"
	"image/color"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"lidscope/compare"
)

// CompareOptions control DrawComparison.
type CompareOptions struct {
	// OutDir is where the figures go (required).
	OutDir string
	// Format is "png" (default), "svg" or "pdf"; DPI the PNG resolution
	// (default 200).
	Format string
	DPI    float64
	// Force allows replacing figures that exist already.
	Force bool
	// Palettes and NoCoastlines are as in Options.
	Palettes     map[string]string
	NoCoastlines bool
	// Only, when set, names the figures to draw (see DrawComparison).
	Only []string
}

// compareMaps are the maps a comparison draws, with the figures' specs.
var compareMaps = []struct{ variable, spec string }{
	{"convective_time_fraction", "map_convective_time_fraction"},
	{"crossing_rate", "map_crossing_rate"},
}

// DrawComparison draws the figures of a comparison (package compare) and
// returns the paths written:
//
//   - compare_<map>_<candidate>: for the convective-fraction and
//     crossings-per-year maps, three panels stacked — the reference, the
//     candidate (one sequential colour scale for both) and the difference
//     candidate − reference (the diverging colour map, limits symmetric
//     about zero) — over the tropical band;
//   - compare_sensitivities, with at most four candidates (one colour
//     each): the subsidence-regime cloud sensitivities (the
//     slopes on EIS and LTS and the partial sensitivities) of every run in
//     one panel, one column per sensitivity, the reference first and the
//     candidates after it, each a point with its 95 % interval, behind them
//     a grey band across the column marking the reference's interval;
//   - compare_ensemble_<sensitivity>, with EnsembleMin or more candidates:
//     per sensitivity, every candidate's value and 95 % interval, one row
//     each, sorted by value, marked by its verdict against the reference;
//     the reference's value and interval as a line and a band; and the
//     ensemble's spread (mean ± 1 sd, min–max).
//
// The maps are read from each run's maps.nc (Dir of compare.Run), the
// sensitivities from the comparison, so a comparison read back from its
// folder (compare.Read) draws the sensitivity and ensemble figures
// without its runs. opt.Only, when set, names the figures to draw.
// Without Force it refuses, before drawing, when a figure file exists
// already (errors.Is(err, fs.ErrExist)).
func DrawComparison(res *compare.Result, opt CompareOptions) ([]string, error) {
	if opt.OutDir == "" {
		return nil, errors.New("figures: DrawComparison needs an output folder (CompareOptions.OutDir)")
	}
	o, err := Options{Format: opt.Format, DPI: opt.DPI, Force: opt.Force, Palettes: opt.Palettes, NoCoastlines: opt.NoCoastlines, OutDir: opt.OutDir}.normalise(opt.OutDir)
	if err != nil {
		return nil, err
	}
	jobs, err := comparisonJobs(res, opt.Only)
	if err != nil {
		return nil, err
	}
	var exist []string
	for _, j := range jobs {
		p := filepath.Join(o.OutDir, j.f.name+"."+o.Format)
		if _, err := os.Lstat(p); err == nil {
			exist = append(exist, p)
		}
	}
	if len(exist) > 0 && !o.Force {
		sort.Strings(exist)
		return nil, fmt.Errorf("figures: %s: %w; nothing was drawn. Allow replacing them (--force) or choose another --out", strings.Join(exist, ", "), fs.ErrExist)
	}
	for _, j := range jobs {
		if j.load == nil {
			continue
		}
		if err := j.load(); err != nil {
			var own []string
			for _, k := range jobs {
				if k.load == nil {
					own = append(own, k.f.name)
				}
			}
			hint := ""
			if len(own) > 0 {
				hint = "; the figures drawn from the comparison alone are " + strings.Join(own, ", ") + " (plot --only NAME,…)"
			}
			return nil, fmt.Errorf("figures: the map figures read the compared runs' folders: %w%s", err, hint)
		}
	}
	if err := os.MkdirAll(o.OutDir, 0o777); err != nil {
		return nil, fmt.Errorf("figures: cannot create the figure directory: %w", err)
	}
	var out []string
	for _, j := range jobs {
		p, err := drawOne(j.run, j.f, o)
		if err != nil {
			return out, err
		}
		out = append(out, p)
	}
	return out, nil
}

// compJob is one figure of a comparison.
type compJob struct {
	f   figure
	run *Run
	// load, for the map figures, reads the runs' folders
	load func() error
}

// comparisonJobs lists the figures of a comparison (see DrawComparison),
// those named in only when given.
func comparisonJobs(res *compare.Result, only []string) ([]compJob, error) {
	head := comparisonRun(res)
	var jobs []compJob
	var ref *Run
	loadRef := func() error {
		if ref != nil {
			return nil
		}
		r, err := Load(res.Reference.Dir)
		if err != nil {
			return fmt.Errorf("the comparison's reference %s: %w", res.Reference.Name, err)
		}
		ref = r
		return nil
	}
	for _, c := range res.Candidates {
		c := c
		var cand *Run
		load := func() error {
			if err := loadRef(); err != nil {
				return err
			}
			if cand != nil {
				return nil
			}
			r, err := Load(c.Dir)
			if err != nil {
				return fmt.Errorf("the comparison's candidate %s: %w", c.Name, err)
			}
			cand = r
			return nil
		}
		for _, m := range compareMaps {
			m := m
			hr := *head
			// one wording with the sensitivity page (comparisonSubject)
			hr.Dataset = fmt.Sprintf("%s (reference) vs %s (candidate)", res.Reference.Name, c.Name)
			jobs = append(jobs, compJob{figure{name: "compare_" + m.variable + "_" + safeName(c.Name),
				build: func(f *fig) (*page, error) { return f.comparisonMapPage(m.variable, m.spec, ref, cand) }}, &hr, load})
		}
	}
	if len(res.ReferenceEstimates) > 0 && len(res.Candidates) <= sensitivitiesMax {
		jobs = append(jobs, compJob{figure{name: "compare_sensitivities", build: func(f *fig) (*page, error) { return f.sensitivityPage(res) }}, head, nil})
	}
	if len(res.Candidates) >= EnsembleMin {
		for _, e := range res.ReferenceEstimates {
			if e.Kind != "slope" && e.Kind != "partial" {
				continue
			}
			e := e
			jobs = append(jobs, compJob{figure{name: "compare_ensemble_" + safeName(e.Name), build: func(f *fig) (*page, error) { return f.ensemblePage(res, e) }}, head, nil})
		}
	}
	return onlyJobs(jobs, only)
}

// onlyJobs keeps the jobs of the figures named in only (all without it),
// refusing a name the comparison has no figure of.
func onlyJobs(jobs []compJob, only []string) ([]compJob, error) {
	if len(only) > 0 {
		want := map[string]bool{}
		for _, n := range only {
			want[n] = true
		}
		var kept []compJob
		var names []string
		for _, j := range jobs {
			names = append(names, j.f.name)
			if want[j.f.name] {
				kept = append(kept, j)
				delete(want, j.f.name)
			}
		}
		if len(want) > 0 {
			var miss []string
			for n := range want {
				miss = append(miss, n)
			}
			sort.Strings(miss)
			return nil, fmt.Errorf("figures: this comparison has no figure %s; its figures are %s", strings.Join(miss, ", "), strings.Join(names, ", "))
		}
		jobs = kept
	}
	return jobs, nil
}

// ComparisonFigures describes the figures of a comparison folder, by
// name pattern, for lidscope plot --list.
var ComparisonFigures = [][2]string{
	{"compare_<map>_<candidate>", "reference, candidate and difference maps of the convective time fraction and the crossing rate (needs the compared runs' folders)"},
	{"compare_sensitivities", "the subsidence cloud sensitivities of every run side by side with their 95 % intervals (up to four candidates)"},
	{"compare_ensemble_<sensitivity>", "one sensitivity of every candidate, sorted, with its interval and verdict, the reference's band and the ensemble's spread (three or more candidates)"},
}

// comparisonRun is what the headers and footers of a comparison's figures
// say: the reference's name, period and regime definition, the version
// and study hash.
func comparisonRun(res *compare.Result) *Run {
	m := res.Reference.Meta
	r := &Run{Dir: res.Reference.Dir, Dataset: res.Reference.Name, Version: m.Version, StudyHash: m.StudyHash, Period: m.Period, RegimeDefinition: res.RegimeText}
	if r.RegimeDefinition == "" {
		r.RegimeDefinition = m.Regimes.String()
	}
	if res.Version != "" {
		r.Version = res.Version
	}
	return r
}

// safeName keeps letters, digits, '-' and '_' of a run name for a file name.
func safeName(s string) string {
	return strings.Map(func(r rune) rune {
		if r == '-' || r == '_' || r >= '0' && r <= '9' || r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' {
			return r
		}
		return '_'
	}, s)
}

func specOf(name string) mapSpec {
	for _, m := range mapSpecs {
		if m.name == name {
			return m
		}
	}
	panic("figures: no map spec " + name)
}

// comparisonMapPage stacks reference, candidate and difference maps.
func (f *fig) comparisonMapPage(variable, specName string, ref, cand *Run) (*page, error) {
	m := specOf(specName)
	rf, err := ref.Map(variable)
	if err != nil {
		return nil, err
	}
	cf, err := cand.Map(variable)
	if err != nil {
		return nil, err
	}
	if len(rf.Values) != len(cf.Values) || len(rf.Lat) != len(cf.Lat) {
		return nil, fmt.Errorf("%s of %s and %s are on different grids (%d×%d and %d×%d cells)", variable, ref.Dataset, cand.Dataset, len(rf.Lat), len(rf.Lon), len(cf.Lat), len(cf.Lon))
	}
	df := *rf
	df.Values = make([]float64, len(rf.Values))
	var both, diffs []float64
	for i := range rf.Values {
		df.Values[i] = (cf.Values[i] - rf.Values[i]) * m.factor
		if !math.IsNaN(df.Values[i]) {
			diffs = append(diffs, df.Values[i])
		}
		for _, v := range []float64{rf.Values[i], cf.Values[i]} {
			if !math.IsNaN(v) {
				both = append(both, v*m.factor)
			}
		}
	}
	lo, hi := m.limits(both)
	dlo, dhi := divergingLimits(diffs)
	seq := f.scale(m.palette, lo, hi)
	// The diverging map of anomalies (fulcrum unless overridden).
	div := f.scale("relative_sst", dlo, dhi)
	w := chooseWindow(rf)
	// Show the tropical band (with a margin), where regimes are defined.
	if s, n := ref.BandSouth, ref.BandNorth; n > s {
		w.south, w.north = math.Max(w.south, s-5), math.Min(w.north, n+5)
	}
	panels := []struct {
		title string
		fl    *Field
		sc    colourScale
		fac   float64
		label string
		vals  []float64
	}{
		{"Reference: " + ref.Dataset, rf, seq, m.factor, m.label, both},
		{"Candidate: " + cand.Dataset, cf, seq, m.factor, m.label, both},
		{"Difference, candidate − reference", &df, div, 1, differenceLabel(m.label), diffs},
	}
	bw := bodyWidth()
	aspect := (w.north - w.south) / w.span
	const bar = 0.11 * vg.Inch
	barBlock := 0.16*vg.Inch + colourBarHeight(bar) + 0.14*vg.Inch // gap: the bar label must not touch the next panel title
	var plots []*plot.Plot
	var ph, pw vg.Length
	for _, pn := range panels {
		p := f.mapPlot(pn.fl, w, &raster{field: pn.fl, factor: pn.fac, scale: pn.sc, dpi: f.rasterDPI()})
		p.Title.Text = f.t(pn.title)
		setTitleStyle(p, f.bold(sizeLabel))
		pw, ph = fitAspect(p, bw, aspect, 2.2*vg.Inch)
		plots = append(plots, p)
	}
	head := f.header(m.title+": reference, candidate and difference", bw)
	pg := &page{header: head, footer: f.footer(bw), bodyH: 3 * (ph + barBlock)}
	pg.body = func(c draw.Canvas) {
		top := c.Max.Y
		for i, p := range plots {
			left := c.Min.X + (c.Max.X-c.Min.X-pw)/2
			pc := c
			pc.Min = vg.Point{X: left, Y: top - ph}
			pc.Max = vg.Point{X: left + pw, Y: top}
			p.Draw(pc)
			dc := p.DataCanvas(pc)
			frame(c, dc.Rectangle)
			f.dataArea = dc.Rectangle
			dw := dc.Max.X - dc.Min.X
			bwid := 0.5 * dw
			bx := dc.Min.X + (dw-bwid)/2
			by := pc.Min.Y - 0.16*vg.Inch - bar
			r := vg.Rectangle{Min: vg.Point{X: bx, Y: by}, Max: vg.Point{X: bx + bwid, Y: by + bar}}
			sc := panels[i].sc
			mn, mx := math.Inf(1), math.Inf(-1)
			for _, v := range panels[i].vals {
				mn, mx = math.Min(mn, v), math.Max(mx, v)
			}
			f.colourBar(c, r, sc, panels[i].label, mn < sc.lo-1e-9*(sc.hi-sc.lo), mx > sc.hi+1e-9*(sc.hi-sc.lo))
			f.missingKey(c, vg.Point{X: r.Max.X + bar + 14, Y: by}, bar, "no data or land")
			top -= ph + barBlock
		}
	}
	return pg, nil
}

// runColours: the reference in black, candidates in Wong's colours.
var runColours = []color.Color{lineBlack, lineOrange, lineBlue, lineGreen, linePurple}

// ciPoints draws the sensitivities of every run with their intervals, and
// the reference's interval as a band across each column.
type ciPoints struct {
	res  *compare.Result
	spec []compare.Estimate
	// factor turns the estimates' units into the display units
	// (sensitivityUnits: a fraction per kelvin in per cent per kelvin)
	factor float64
}

func (cp ciPoints) runs() int { return 1 + len(cp.res.Candidates) }

// at returns run k's value and interval of estimate i (k 0: the reference).
func (cp ciPoints) at(i, k int) (v, lo, hi float64, ok bool) {
	e := cp.spec[i]
	f := cp.factor
	if k == 0 {
		return e.Ref * f, e.RefCI.Lo * f, e.RefCI.Hi * f, true
	}
	for _, x := range cp.res.Candidates[k-1].Estimates {
		if x.Name == e.Name {
			return x.Cand * f, x.CandCI.Lo * f, x.CandCI.Hi * f, true
		}
	}
	return 0, 0, 0, false
}

func (cp ciPoints) x(i, k int) float64 {
	n := cp.runs()
	return float64(i) + (float64(k)-float64(n-1)/2)*0.7/float64(n)
}

func (cp ciPoints) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	for i, e := range cp.spec {
		if lo, hi := e.RefCI.Lo*cp.factor, e.RefCI.Hi*cp.factor; !math.IsNaN(lo) && !math.IsNaN(hi) {
			r := vg.Rectangle{Min: vg.Point{X: trX(float64(i) - 0.45), Y: trY(lo)}, Max: vg.Point{X: trX(float64(i) + 0.45), Y: trY(hi)}}
			c.SetColor(color.Gray{0xdc})
			c.Fill(r.Path())
		}
		for k := 0; k < cp.runs(); k++ {
			v, lo, hi, ok := cp.at(i, k)
			if !ok || math.IsNaN(v) {
				continue
			}
			col := runColours[k%len(runColours)]
			x := trX(cp.x(i, k))
			ls := draw.LineStyle{Color: col, Width: 1}
			if !math.IsNaN(lo) && !math.IsNaN(hi) {
				capped(c, ls, x, trY(lo), trY(hi))
			}
			c.DrawGlyph(draw.GlyphStyle{Color: col, Radius: 2.2, Shape: draw.CircleGlyph{}}, vg.Point{X: x, Y: trY(v)})
		}
	}
}

func (cp ciPoints) DataRange() (xmin, xmax, ymin, ymax float64) {
	ymin, ymax = math.Inf(1), math.Inf(-1)
	for i := range cp.spec {
		for k := 0; k < cp.runs(); k++ {
			v, lo, hi, ok := cp.at(i, k)
			if !ok {
				continue
			}
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
	// A margin below the data, and room above it for the legend.
	span := ymax - ymin
	ymin -= 0.05 * span
	ymax += 0.3 * span
	return -0.5, float64(len(cp.spec)) - 0.5, ymin, ymax
}

// glyphThumb is a legend entry: a dot of a run's colour.
type glyphThumb struct{ col color.Color }

func (g glyphThumb) Thumbnail(c *draw.Canvas) {
	ctr := vg.Point{X: (c.Min.X + c.Max.X) / 2, Y: (c.Min.Y + c.Max.Y) / 2}
	c.StrokeLine2(draw.LineStyle{Color: g.col, Width: 1}, ctr.X, c.Min.Y, ctr.X, c.Max.Y)
	c.DrawGlyph(draw.GlyphStyle{Color: g.col, Radius: 2.2, Shape: draw.CircleGlyph{}}, ctr)
}

type bandThumb struct{}

func (bandThumb) Thumbnail(c *draw.Canvas) {
	c.SetColor(color.Gray{0xdc})
	c.Fill(c.Rectangle.Path())
}

// sensitivityPage is the slopes-with-intervals panel.
func (f *fig) sensitivityPage(res *compare.Result) (*page, error) {
	var spec []compare.Estimate
	for _, e := range res.ReferenceEstimates {
		if e.Kind == "slope" || e.Kind == "partial" {
			spec = append(spec, e)
		}
	}
	if len(spec) == 0 {
		return nil, errors.New("the reference has no sensitivities")
	}
	u, factor := sensitivityUnits(spec[0].Units)
	cp := ciPoints{res: res, spec: spec, factor: factor}
	p := f.newPlot()
	p.Add(lightGrid(), cp)
	p.Add(hline{0, draw.LineStyle{Color: color.Gray{0x50}, Width: 0.5}})
	var ticks []plot.Tick
	for i, e := range spec {
		ticks = append(ticks, plot.Tick{Value: float64(i), Label: estimateLabel(e)})
	}
	p.X.Tick.Marker = plot.ConstantTicks(ticks)
	p.X.Label.Text = f.t("Sensitivity of the " + lowerFirst(responseLabel(cloudResponseOf(res))) + " (subsidence regime, tropical band, whole record)")
	p.Y.Label.Text = f.t("Sensitivity (" + u + "), 95 % interval")
	p.Legend.Top, p.Legend.Left = true, false
	p.Legend.Add(f.t(res.Reference.Name+" (reference)"), glyphThumb{runColours[0]})
	for k, c := range res.Candidates {
		p.Legend.Add(f.t(c.Name), glyphThumb{runColours[(k+1)%len(runColours)]})
	}
	p.Legend.Add(f.t("reference 95 % interval"), bandThumb{})
	bw := bodyWidth()
	head := f.headerOf("Cloud sensitivities of the reference and the candidates, with 95 % intervals", comparisonSubject(res), bw)
	const h = 3.6 * vg.Inch
	pg := &page{header: head, footer: f.footer(bw), bodyH: h}
	pg.body = func(c draw.Canvas) {
		p.Draw(c)
		dc := p.DataCanvas(c)
		frame(c, dc.Rectangle)
		f.dataArea = dc.Rectangle
	}
	return pg, nil
}

// comparisonSubject names the runs of a comparison for a subtitle: the
// reference and every candidate ("obs (reference) vs model-a and model-b
// (candidates)"); past maxNamedCandidates it gives their number and the
// first and last names.
func comparisonSubject(res *compare.Result) string {
	var names []string
	for _, c := range res.Candidates {
		names = append(names, c.Name)
	}
	ref := res.Reference.Name + " (reference)"
	switch n := len(names); {
	case n == 0:
		return ref
	case n == 1:
		return ref + " vs " + names[0] + " (candidate)"
	case n <= maxNamedCandidates:
		return ref + " vs " + strings.Join(names[:n-1], ", ") + " and " + names[n-1] + " (candidates)"
	default:
		return fmt.Sprintf("%s vs %d candidates (%s, %s, … %s)", ref, n, names[0], names[1], names[n-1])
	}
}

// differenceLabel is the colour-bar label of a difference map: a
// difference of percentages is in percentage points.
func differenceLabel(label string) string {
	l := "Difference: " + lowerFirst(label)
	if strings.HasSuffix(l, " (%)") {
		l = strings.TrimSuffix(l, " (%)") + " (percentage points)"
	}
	return l
}

// maxNamedCandidates is the most candidates a subtitle names one by one.
const maxNamedCandidates = 6

func cloudResponseOf(res *compare.Result) string {
	if len(res.ReferenceEstimates) > 0 {
		n := res.ReferenceEstimates[0].Name
		if i := strings.Index(n, "_on_"); i > 0 {
			return n[:i]
		}
		if i := strings.Index(n, "_partial_"); i > 0 {
			return n[:i]
		}
	}
	return "cloud"
}
