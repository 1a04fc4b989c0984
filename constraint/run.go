package constraint

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"

	"lidscope/factors"
	"lidscope/grid"
	"lidscope/internal/cfwrite"
	"lidscope/netcdf"
	"lidscope/runfolder"
)

// Run is what the constraint reads of one run folder: its factor analysis
// (factors.json and factors.nc), the response's domain means, the per-cell
// time means of maps.nc, and the provenance that says how it was made.
type Run struct {
	Dir       string
	Dataset   string
	StudyHash string
	Factors   *factors.Results

	respMeans   map[[2]string]meanSE
	cells       *cellMeans
	study       map[string]string // resolved study block → its JSON text
	conventions string
	regimes     string
}

type meanSE struct{ mean, se float64 }

// cellMeans are the per-cell time means of every quantity of maps.nc
// (over all regimes: the count-weighted mean of the per-regime means).
type cellMeans struct {
	Lat, Lon   []float64
	LatB, LonB [][2]float64
	Area       []float64
	Mean       map[string][]float64
	Units      map[string]string
}

// Files a run folder must have for the constraint.
const (
	provenanceFile = "provenance.json"
	mapsFile       = "maps.nc"
)

// studyBlocks are the resolved study's blocks that a control and a warm run
// must share (everything but the datasets and the output folder).
var studyBlocks = []string{"analysis", "relationships", "factors"}

func (r *Run) info() RunInfo { return RunInfo{Dir: r.Dir, Dataset: r.Dataset, StudyHash: r.StudyHash} }

// resp returns the response's mean and standard error of a domain and
// regime (NaN when the run does not record it).
func (r *Run) resp(domain, regime string) meanSE {
	if m, ok := r.respMeans[[2]string{domain, regime}]; ok {
		return m
	}
	return meanSE{math.NaN(), math.NaN()}
}

// Load reads a committed run folder (runfolder.Open) with a factor
// analysis.
func Load(dir string) (*Run, error) {
	f, err := runfolder.Open(dir, factors.JSONFile, provenanceFile)
	if err != nil {
		return nil, fmt.Errorf("constraint: %w (the constraint needs runs made with a factors block in the study)", err)
	}
	defer f.Close()
	r := &Run{Dir: dir}
	if r.Factors, err = factors.ReadRun(dir); err != nil {
		return nil, fmt.Errorf("constraint: %w", err)
	}
	if err := r.readResponseMeans(filepath.Join(dir, factors.JSONFile)); err != nil {
		return nil, err
	}
	if err := r.readProvenance(filepath.Join(dir, provenanceFile)); err != nil {
		return nil, err
	}
	if f.Has(mapsFile) {
		if r.cells, err = readCellMeans(filepath.Join(dir, mapsFile)); err != nil {
			return nil, err
		}
	}
	return r, nil
}

func (r *Run) readResponseMeans(path string) error {
	b, err := os.ReadFile(path)
	if err != nil {
		return fmt.Errorf("constraint: %w", err)
	}
	var doc struct {
		Fits []struct {
			Domain string          `json:"domain"`
			Regime string          `json:"regime"`
			Mean   json.RawMessage `json:"response_mean"`
			SE     json.RawMessage `json:"response_mean_stderr"`
		} `json:"fits"`
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		return fmt.Errorf("constraint: %s: %w", path, err)
	}
	r.respMeans = map[[2]string]meanSE{}
	for _, f := range doc.Fits {
		m, ok1 := jsonNumber(f.Mean)
		s, ok2 := jsonNumber(f.SE)
		if ok1 && ok2 {
			r.respMeans[[2]string{f.Domain, f.Regime}] = meanSE{m, s}
		}
	}
	return nil
}

// jsonNumber reads a number written plain or as {"value", "units"} (null:
// NaN).
func jsonNumber(raw json.RawMessage) (float64, bool) {
	if len(raw) == 0 {
		return 0, false
	}
	var v *float64
	if err := json.Unmarshal(raw, &v); err == nil {
		if v == nil {
			return math.NaN(), true
		}
		return *v, true
	}
	var n struct {
		Value *float64 `json:"value"`
	}
	if err := json.Unmarshal(raw, &n); err != nil {
		return 0, false
	}
	if n.Value == nil {
		return math.NaN(), true
	}
	return *n.Value, true
}

func (r *Run) readProvenance(path string) error {
	b, err := os.ReadFile(path)
	if err != nil {
		return fmt.Errorf("constraint: %w", err)
	}
	// The resolved study is a string (format 4) or {text, hash} (format
	// 3); the conventions are "conventions" or "metrics_conventions".
	var p struct {
		Dataset      string          `json:"dataset"`
		Study        json.RawMessage `json:"study"`
		StudyHash    string          `json:"study_hash"`
		Conventions  json.RawMessage `json:"conventions"`
		Conventions3 json.RawMessage `json:"metrics_conventions"`
		Regimes      json.RawMessage `json:"regime_definition"`
	}
	if err := json.Unmarshal(b, &p); err != nil {
		return fmt.Errorf("constraint: %s: %w", path, err)
	}
	var text string
	if err := json.Unmarshal(p.Study, &text); err != nil {
		var old struct {
			Text string `json:"text"`
			Hash string `json:"hash"`
		}
		if err := json.Unmarshal(p.Study, &old); err != nil {
			return fmt.Errorf("constraint: %s: the resolved study: %w", path, err)
		}
		text, p.StudyHash = old.Text, old.Hash
	}
	conv := p.Conventions
	if len(conv) == 0 {
		conv = p.Conventions3
	}
	r.Dataset, r.StudyHash, r.conventions, r.regimes = p.Dataset, p.StudyHash, string(conv), string(p.Regimes)
	var blocks map[string]json.RawMessage
	if err := json.Unmarshal([]byte(text), &blocks); err != nil {
		return fmt.Errorf("constraint: %s: the resolved study: %w", path, err)
	}
	r.study = map[string]string{}
	for _, k := range studyBlocks {
		if v, ok := blocks[k]; ok {
			var x any
			if err := json.Unmarshal(v, &x); err != nil {
				return fmt.Errorf("constraint: %s: study block %s: %w", path, k, err)
			}
			c, _ := json.Marshal(x) // canonical: keys sorted
			r.study[k] = string(c)
		}
	}
	return nil
}

// readCellMeans reads the per-cell, all-regime time means of maps.nc.
func readCellMeans(path string) (*cellMeans, error) {
	f, err := netcdf.Open(path)
	if err != nil {
		return nil, fmt.Errorf("constraint: %w", err)
	}
	defer f.Close()
	read := func(name string) ([]float64, []int, error) {
		v, err := f.Var(name)
		if err != nil {
			return nil, nil, fmt.Errorf("constraint: %s: variable %s: %w", path, name, err)
		}
		x, err := v.ReadAllFloat64()
		if err != nil {
			return nil, nil, fmt.Errorf("constraint: %s: variable %s: %w", path, name, err)
		}
		if a, err := v.Attr("_FillValue"); err == nil {
			if fv, ok := a.Float64s(); ok && len(fv) == 1 {
				for i, y := range x {
					if y == fv[0] {
						x[i] = math.NaN()
					}
				}
			}
		}
		return x, v.Shape(), nil
	}
	c := &cellMeans{Mean: map[string][]float64{}, Units: map[string]string{}}
	if c.Lat, _, err = read(cfwrite.DimLat); err != nil {
		return nil, err
	}
	if c.Lon, _, err = read(cfwrite.DimLon); err != nil {
		return nil, err
	}
	pairs := func(name string) [][2]float64 {
		x, _, err := read(name)
		if err != nil || len(x)%2 != 0 {
			return nil
		}
		out := make([][2]float64, len(x)/2)
		for i := range out {
			out[i] = [2]float64{x[2*i], x[2*i+1]}
		}
		return out
	}
	c.LatB, c.LonB = pairs("lat_bnds"), pairs("lon_bnds")
	g, err := grid.New(c.Lat, c.Lon, c.LatB, c.LonB)
	if err != nil {
		return nil, fmt.Errorf("constraint: %s: grid: %w", path, err)
	}
	c.Area = g.CellAreas()
	vars, err := f.Vars()
	if err != nil {
		return nil, fmt.Errorf("constraint: %s: %w", path, err)
	}
	n := len(c.Lat) * len(c.Lon)
	for _, v := range vars {
		q, ok := strings.CutSuffix(v.Name, "_mean")
		if !ok || len(v.Dims) != 4 {
			continue
		}
		m, shape, err := read(v.Name)
		if err != nil {
			return nil, err
		}
		cnt, _, err := read(q + "_count")
		if err != nil || len(cnt) != len(m) {
			continue
		}
		if shape[0] != 1 || shape[2]*shape[3] != n {
			continue
		}
		c.Mean[q] = allRegimes(m, cnt, shape[1], n)
		if a, err := v.Attr("units"); err == nil {
			if s, ok := a.Text(); ok {
				c.Units[q] = s
			}
		}
	}
	return c, nil
}

// globalMeans returns the cell-area-weighted means of quantity q's per-cell
// time means of two runs over the cells valid in both, and their number.
func globalMeans(a, b *Run, q string) (ma, mb float64, cells int, err error) {
	for _, r := range []*Run{a, b} {
		if r.cells == nil {
			return 0, 0, 0, fmt.Errorf("constraint: %s has no maps.nc to compute the warming from; give the warming itself (e.g. 4K)", r.Dir)
		}
		if r.cells.Mean[q] == nil {
			return 0, 0, 0, fmt.Errorf("constraint: %s: maps.nc has no %s_mean to compute the warming from; give a temperature quantity the runs have (e.g. sst) or the warming itself (e.g. 4K)", r.Dir, q)
		}
		if u := r.cells.Units[q]; u != "K" {
			return 0, 0, 0, fmt.Errorf("constraint: %s: %s has units %q, not K: the warming needs a temperature (e.g. sst)", r.Dir, q, u)
		}
	}
	if !sameGrid(a.cells.Lat, a.cells.Lon, b.cells.Lat, b.cells.Lon) {
		return 0, 0, 0, fmt.Errorf("constraint: %s and %s are on different grids: %w", a.Dir, b.Dir, ErrMismatch)
	}
	xa, xb := a.cells.Mean[q], b.cells.Mean[q]
	var w, sa, sb float64
	for k, ar := range a.cells.Area {
		if math.IsNaN(xa[k]) || math.IsNaN(xb[k]) {
			continue
		}
		w += ar
		sa += ar * xa[k]
		sb += ar * xb[k]
		cells++
	}
	if w == 0 {
		return 0, 0, 0, errors.New("constraint: no cell has " + q + " in both runs")
	}
	return sa / w, sb / w, cells, nil
}

// NewRun makes a Run from factor results held in memory (for library use
// and tests; Load reads a run folder): dataset names it, and the study
// blocks, conventions and maps are absent (so two such runs are taken as
// made with one study).
func NewRun(dataset string, f *factors.Results) *Run {
	return &Run{Dir: dataset, Dataset: dataset, Factors: f, respMeans: map[[2]string]meanSE{}, study: map[string]string{}}
}

// SetResponseMean records the time mean of the response's domain-mean
// series of a domain and regime, with its standard error (Load reads them
// from factors.json).
func (r *Run) SetResponseMean(domain, regime string, mean, se float64) {
	if r.respMeans == nil {
		r.respMeans = map[[2]string]meanSE{}
	}
	r.respMeans[[2]string{domain, regime}] = meanSE{mean, se}
}

// allRegimes combines per-regime means [regime][cell] into the
// count-weighted mean over every regime (NaN where no regime has a count).
func allRegimes(m, cnt []float64, nreg, n int) []float64 {
	out := make([]float64, n)
	for k := range n {
		var w, s float64
		for g := range nreg {
			x, c := m[g*n+k], cnt[g*n+k]
			if c > 0 && !math.IsNaN(x) {
				w += c
				s += c * x
			}
		}
		out[k] = math.NaN()
		if w > 0 {
			out[k] = s / w
		}
	}
	return out
}
