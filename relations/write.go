package relations

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"lidscope/internal/cfwrite"
	"lidscope/internal/jsonnum"
	"lidscope/internal/stage"
	"lidscope/regimes"
	"lidscope/vocab"
)

// Output file names, in the order Write returns them.
const (
	RelationshipsNC   = "relationships.nc"
	RegressionsCSV    = "regressions.csv"
	FlipsCSV          = "flips.csv"
	ThresholdsCSV     = "thresholds.csv"
	RelationshipsJSON = "relationships.json"
)

// OutputNames lists every file Write writes.
func OutputNames() []string {
	return []string{RelationshipsNC, RegressionsCSV, FlipsCSV, ThresholdsCSV, RelationshipsJSON}
}

// Meta is what Write records about the run besides the results.
type Meta struct {
	Dataset, Title string
	Version        string   // lidscope version
	Command        []string // command line for the NetCDF history (nil: os.Args)
	StudyHash      string
	Period         string // e.g. "2001-01 … 2010-12"; empty: first … last step label
	Source         string
	InputHistory   string    // history of the inputs, kept below the new line
	Created        time.Time // timestamp of the history line; zero: now
}

// WriteOptions control Write.
type WriteOptions struct {
	// Force allows replacing the files of an earlier run. Without it Write
	// refuses, before writing anything, when any output file exists.
	Force bool
}

// hookCommit, when set by tests, is called before each file is moved into
// place; an error makes Write fail there.
var hookCommit func(name string) error

// Write writes the results into dir (created if missing): relationships.nc,
// regressions.csv, flips.csv, thresholds.csv and relationships.json (see
// the package documentation). Every file is written into a hidden staging
// directory inside dir and moved into place only when all are complete;
// on any error no file of this call is left under a final name (replaced
// files are put back). Without opt.Force, Write refuses when any of the
// files exists (errors.Is(err, fs.ErrExist)).
func Write(dir string, r *Results, meta Meta, opt WriteOptions) (_ []string, err error) {
	if r == nil {
		return nil, errors.New("relations: Write needs results (call Acc.Results)")
	}
	if dir == "" {
		return nil, errors.New("relations: the output directory is empty; give a directory name")
	}
	if st, err := os.Stat(dir); err == nil && !st.IsDir() {
		return nil, fmt.Errorf("relations: %s is a file, not a directory; give a directory for the outputs", dir)
	}
	exist, err := stage.Existing(dir, OutputNames())
	if err != nil {
		return nil, fmt.Errorf("relations: %w", err)
	}
	if len(exist) > 0 && !opt.Force {
		return nil, fmt.Errorf("relations: %s already holds relationship outputs (%s): %w; nothing was written. Choose another directory, remove them, or allow replacing them (WriteOptions.Force)", dir, strings.Join(exist, ", "), fs.ErrExist)
	}
	if err := os.MkdirAll(dir, 0o777); err != nil {
		return nil, fmt.Errorf("relations: cannot create the output directory: %w", err)
	}
	sd, err := stage.New(dir, ".lidscope-relations-")
	if err != nil {
		return nil, fmt.Errorf("relations: cannot write in %s (the directory must be writable): %w", dir, err)
	}
	defer sd.Remove()
	if err := stageAll(sd, dir, r, meta); err != nil {
		return nil, err
	}
	sd.BeforeMove = hookCommit
	if err := sd.Commit(OutputNames(), opt.Force); err != nil {
		return nil, fmt.Errorf("relations: %w", err)
	}
	var out []string
	for _, n := range OutputNames() {
		out = append(out, filepath.Join(dir, n))
	}
	return out, nil
}

// Stager is where a writer puts its files before they are committed: a
// runfolder.Stage (a whole run folder, committed by its owner) or a
// stage.Dir.
type Stager interface {
	Path(name string) string
	WriteFile(name string, b []byte) error
}

// Stage writes the relationship files (those Write writes) into st and
// does not commit them: the caller commits the whole run folder (package
// runfolder). dir is the final folder, named in messages.
func Stage(st Stager, dir string, r *Results, meta Meta) error {
	if r == nil {
		return errors.New("relations: Stage needs results (call Acc.Results)")
	}
	return stageAll(st, dir, r, meta)
}

func stageAll(sd Stager, dir string, r *Results, meta Meta) error {
	if meta.Period == "" {
		meta.Period = r.First + " … " + r.Last
	}
	if err := writeNC(sd.Path(RelationshipsNC), r, meta); err != nil {
		return fmt.Errorf("relations: writing %s in %s: %w", RelationshipsNC, dir, err)
	}
	files := []struct {
		name string
		get  func() ([]byte, error)
	}{
		{RegressionsCSV, func() ([]byte, error) { return regressionsCSV(r) }},
		{FlipsCSV, func() ([]byte, error) { return flipsCSV(r) }},
		{ThresholdsCSV, func() ([]byte, error) { return thresholdsCSV(r) }},
		{RelationshipsJSON, func() ([]byte, error) { return jsonnum.Marshal(jsonDoc(r, meta)) }},
	}
	for _, f := range files {
		b, err := f.get()
		if err == nil {
			err = sd.WriteFile(f.name, b)
		}
		if err != nil {
			return fmt.Errorf("relations: writing %s in %s: %w", f.name, dir, err)
		}
	}
	return nil
}

// ---- NetCDF ----

const (
	dimDomain = "domain"
	dimSeason = "season"
	dimRegime = "regime"
	dimOmega  = "omega_bin"
)

func regimeIndex(g regimes.Regime) int {
	for k, r := range regimes.All {
		if r == g {
			return k
		}
	}
	return -1
}

func nanSlice(n int) []float64 {
	s := make([]float64, n)
	for i := range s {
		s[i] = math.NaN()
	}
	return s
}

func globalAttrs(r *Results, meta Meta) map[string]any {
	m := map[string]any{
		vocab.RelationshipsMode:                  r.Mode.String(),
		vocab.RelationshipsMode + "_description": r.ModeNote,
		"detrended":                              r.Detrended,
		vocab.RegimeDefinition:                   r.RegimeDefinition,
		"uncertainty_method":                     r.Uncertainty,
		vocab.Relationships + "_config":          strings.TrimRight(r.Config, "\n"),
		"period":                                 meta.Period,
		vocab.TimeSteps:                          r.Steps,
		vocab.RegimeIndex:                        regimeOrder(),
	}
	for k, v := range map[string]string{"dataset": meta.Dataset, "lidscope_version": meta.Version, vocab.StudyHash: meta.StudyHash} {
		if v != "" {
			m[k] = v
		}
	}
	if len(r.Notes) > 0 {
		m["processing_notes"] = strings.Join(r.Notes, "; ")
	}
	return m
}

func regimeOrder() string {
	s := make([]string, len(regimes.All))
	for k, g := range regimes.All {
		s[k] = strconv.Itoa(k) + " = " + g.String()
	}
	return strings.Join(s, ", ")
}

func writeNC(path string, r *Results, meta Meta) error {
	title := meta.Title
	if title == "" {
		title = "Regime-conditioned cloud–inversion relationships"
		if meta.Dataset != "" {
			title += ", " + meta.Dataset
		}
	}
	w, err := cfwrite.Create(path, cfwrite.Options{Title: title, Source: meta.Source, Command: meta.Command,
		InputHistory: meta.InputHistory, Created: meta.Created, Attributes: globalAttrs(r, meta)})
	if err != nil {
		return err
	}
	defer w.Abort()
	nw := newNCWriter(w, r)
	for _, step := range []func() error{nw.axes, nw.binned, nw.joint, nw.omega, nw.write} {
		if err := step(); err != nil {
			return err
		}
	}
	return w.Close()
}

// ncWriter writes relationships.nc in steps: the axes, then the
// variables of the binned relationships, the joint composites and the
// omega composites (declared first, written at the end, as NetCDF-4
// wants).
type ncWriter struct {
	w          *cfwrite.Writer
	r          *Results
	dIdx, sIdx map[string]int // domain and season name → index
	nd, ns, ng int            // numbers of domains, seasons, regimes
	todo       []pendingVar
}

// pendingVar is a declared variable and the values it gets.
type pendingVar struct {
	v    *cfwrite.Var
	data []float64
}

func newNCWriter(w *cfwrite.Writer, r *Results) *ncWriter {
	nw := &ncWriter{w: w, r: r, dIdx: map[string]int{}, sIdx: map[string]int{},
		nd: len(r.Domains), ns: len(r.Seasons), ng: len(regimes.All)}
	for k, d := range r.Domains {
		nw.dIdx[d.Name] = k
	}
	for k, s := range r.Seasons {
		nw.sIdx[s] = k
	}
	return nw
}

// add declares a variable (with the relationships mode attribute) whose
// values are written by write.
func (nw *ncWriter) add(s cfwrite.VarSpec, data []float64) error {
	if s.Attributes == nil {
		s.Attributes = map[string]any{}
	}
	s.Attributes[vocab.RelationshipsMode] = nw.r.Mode.String()
	v, err := nw.w.AddVar(s)
	if err != nil {
		return err
	}
	nw.todo = append(nw.todo, pendingVar{v, data})
	return nil
}

// write writes the values of every declared variable.
func (nw *ncWriter) write() error {
	for _, p := range nw.todo {
		if err := p.v.Write(p.data); err != nil {
			return err
		}
	}
	return nil
}

// axes declares the domain, season and regime categories, a bin axis per
// predictor and the omega500 bins.
func (nw *ncWriter) axes() error {
	w, r := nw.w, nw.r
	dn := make([]string, len(r.Domains))
	for k, d := range r.Domains {
		dn[k] = d.Name
	}
	if err := w.AddCategories(cfwrite.Categories{Name: dimDomain, LongName: "domain over which cell-steps are pooled (tropical band or named region)", Meanings: dn}); err != nil {
		return err
	}
	if err := w.AddCategories(cfwrite.Categories{Name: dimSeason, LongName: "season (all: the whole record)", Meanings: r.Seasons}); err != nil {
		return err
	}
	rm := make([]string, len(regimes.All))
	for k, g := range regimes.All {
		rm[k] = g.String()
	}
	if err := w.AddCategories(cfwrite.Categories{Name: dimRegime, LongName: "SST regime (relative sea surface temperature above or below the threshold)", Meanings: rm}); err != nil {
		return err
	}
	for _, p := range r.Predictors {
		c, b, err := cfwrite.BinsFromEdges(p.Edges)
		if err != nil {
			return err
		}
		if err := w.AddAxis(cfwrite.Axis{Name: p.Name + "_bin", Values: c, Bounds: b, Units: p.Units, LongName: predictorLongName(p.Name, r.Mode) + " bin"}); err != nil {
			return err
		}
	}
	if len(r.Omega) > 0 {
		var e []float64
		for _, b := range r.Omega[0].Bins {
			e = append(e, b.Lower)
		}
		e = append(e, r.Omega[0].Bins[len(r.Omega[0].Bins)-1].Upper)
		c, b, _ := cfwrite.BinsFromEdges(e)
		if err := w.AddAxis(cfwrite.Axis{Name: dimOmega, Values: c, Bounds: b, Units: "hPa d-1",
			LongName: "omega500 bin (vertical pressure velocity at 500 hPa; positive = subsidence)"}); err != nil {
			return err
		}
	}
	return nil
}

// binned declares the binned relationships: for each predictor and
// response, the mean, standard deviation, standard error, effective sample
// size, count and area of each (domain, season, regime, bin).
func (nw *ncWriter) binned() error {
	r, nd, ns, ng := nw.r, nw.nd, nw.ns, nw.ng
	for _, p := range r.Predictors {
		nb := len(p.Edges) - 1
		for _, resp := range r.Responses {
			size := nd * ns * ng * nb
			mean, std, se, neff, area := nanSlice(size), nanSlice(size), nanSlice(size), nanSlice(size), make([]float64, size)
			cnt := make([]float64, size)
			for _, bt := range r.Binned {
				if bt.Predictor != p.Name || bt.Response != resp.Name {
					continue
				}
				base := ((nw.dIdx[bt.Domain]*ns+nw.sIdx[bt.Season])*ng + regimeIndex(bt.Regime)) * nb
				for b, st := range bt.Bins {
					mean[base+b], std[base+b], se[base+b], neff[base+b] = st.Mean, st.Std, st.StdErr, st.NEff
					area[base+b], cnt[base+b] = st.Area, float64(st.N)
				}
			}
			dims := []string{dimDomain, dimSeason, dimRegime, p.Name + "_bin"}
			stem := resp.Name + "_vs_" + p.Name
			what := fmt.Sprintf("%s in bins of %s", resp.Name, predictorLongName(p.Name, r.Mode))
			cm := "area-weighted over the domain's cells and the time steps in which they were in the regime"
			for _, v := range []struct {
				suffix, units, long string
				data                []float64
				typ                 cfwrite.DataType
			}{
				{"_" + vocab.Mean, resp.Units, "mean of " + what, mean, cfwrite.Float32},
				{"_" + vocab.Std, resp.Units, "standard deviation (population, area-weighted) of " + what, std, cfwrite.Float32},
				{"_" + vocab.StdErr, resp.Units, "standard error of the mean of " + what + " (std/sqrt(n_eff - 1))", se, cfwrite.Float32},
				{"_" + vocab.NEff, vocab.UnitOne, "effective sample size of " + what, neff, cfwrite.Float32},
				{"_" + vocab.Count, vocab.UnitOne, "number of cell-steps of " + what, cnt, cfwrite.Int32},
				{"_area", vocab.UnitSquareMetre, "area times time steps of " + what, area, cfwrite.Float64},
			} {
				if err := nw.add(cfwrite.VarSpec{Name: stem + v.suffix, Dims: dims, Type: v.typ, Units: v.units, LongName: v.long,
					Attributes: map[string]any{"comment": cm}}, v.data); err != nil {
					return err
				}
			}
		}
	}
	return nil
}

// joint declares the joint composites in bins of relative SST and EIS:
// frequency, count and the mean of each response.
func (nw *ncWriter) joint() error {
	r, ns := nw.r, nw.ns
	if len(r.Joint) == 0 {
		return nil
	}
	j0 := r.Joint[0]
	nr, ne := len(j0.RelEdges)-1, len(j0.EISEdge)-1
	size := nw.nd * ns * nr * ne
	dims := []string{dimDomain, dimSeason, RelSST + "_bin", "eis_bin"}
	freq, cnt := nanSlice(size), make([]float64, size)
	means := map[string][]float64{}
	for _, j := range r.Joint {
		base := (nw.dIdx[j.Domain]*ns + nw.sIdx[j.Season]) * nr * ne
		if means[j.Response] == nil {
			means[j.Response] = nanSlice(size)
		}
		copy(means[j.Response][base:], j.Mean)
		copy(freq[base:], j.Frequency)
		for k, c := range j.Count {
			cnt[base+k] = float64(c)
		}
	}
	if err := nw.add(cfwrite.VarSpec{Name: "rel_sst_eis_frequency", Dims: dims, Units: "1",
		LongName: "frequency of occurrence (share of area x time) in joint bins of relative SST and EIS"}, freq); err != nil {
		return err
	}
	if err := nw.add(cfwrite.VarSpec{Name: "rel_sst_eis_count", Dims: dims, Type: cfwrite.Int32, Units: "1",
		LongName: "number of cell-steps in joint bins of relative SST and EIS"}, cnt); err != nil {
		return err
	}
	for _, resp := range r.Responses {
		if err := nw.add(cfwrite.VarSpec{Name: resp.Name + "_vs_rel_sst_eis_mean", Dims: dims, Units: resp.Units,
			LongName: "mean of " + resp.Name + " in joint bins of relative SST and EIS (area-weighted)"}, means[resp.Name]); err != nil {
			return err
		}
	}
	return nil
}

// omega declares the omega500 composites: frequency, density, count and
// the mean and standard deviation of each response per omega500 bin.
func (nw *ncWriter) omega() error {
	r, ns := nw.r, nw.ns
	if len(r.Omega) == 0 {
		return nil
	}
	no := len(r.Omega[0].Bins)
	size := nw.nd * ns * no
	dims := []string{dimDomain, dimSeason, dimOmega}
	freq, pdf, cnt := nanSlice(size), nanSlice(size), make([]float64, size)
	means, stds := map[string][]float64{}, map[string][]float64{}
	for _, o := range r.Omega {
		base := (nw.dIdx[o.Domain]*ns + nw.sIdx[o.Season]) * no
		for b, ob := range o.Bins {
			freq[base+b], pdf[base+b], cnt[base+b] = ob.Frequency, ob.PDF, float64(ob.N)
		}
		for _, or := range o.Responses {
			if means[or.Response] == nil {
				means[or.Response], stds[or.Response] = nanSlice(size), nanSlice(size)
			}
			copy(means[or.Response][base:], or.Mean)
			copy(stds[or.Response][base:], or.Std)
		}
	}
	const comment = "omega500 regimes after Bony et al. 2004 (Clim. Dyn. 22, 71-86): composites of the actual values (not anomalies) in 10 hPa/day bins"
	oc := func() map[string]any { return map[string]any{"comment": comment} }
	if err := nw.add(cfwrite.VarSpec{Name: "omega_frequency", Dims: dims, Units: "1", LongName: "share of area x time of valid omega500 samples in the bin", Attributes: oc()}, freq); err != nil {
		return err
	}
	if err := nw.add(cfwrite.VarSpec{Name: "omega_pdf", Dims: dims, Units: "d hPa-1", LongName: "probability density of omega500", Attributes: oc()}, pdf); err != nil {
		return err
	}
	if err := nw.add(cfwrite.VarSpec{Name: "omega_count", Dims: dims, Type: cfwrite.Int32, Units: "1", LongName: "number of cell-steps in the omega500 bin"}, cnt); err != nil {
		return err
	}
	for _, resp := range r.Responses {
		if err := nw.add(cfwrite.VarSpec{Name: resp.Name + "_vs_omega_mean", Dims: dims, Units: resp.Units, LongName: "mean of " + resp.Name + " in omega500 bins (area-weighted)", Attributes: oc()}, means[resp.Name]); err != nil {
			return err
		}
		if err := nw.add(cfwrite.VarSpec{Name: resp.Name + "_vs_omega_std", Dims: dims, Units: resp.Units, LongName: "standard deviation of " + resp.Name + " in omega500 bins", Attributes: oc()}, stds[resp.Name]); err != nil {
			return err
		}
	}
	return nil
}

func predictorLongName(p string, m Mode) string {
	n := p
	if q, ok := vocab.Lookup(p); ok {
		n = q.LongName
	}
	if m == Anomaly {
		n += " anomaly"
	}
	return n
}

// ---- CSV ----

func ff(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "NaN"
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}

func csvBytes(rows [][]string) ([]byte, error) {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	if err := w.WriteAll(rows); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

func regressionsCSV(r *Results) ([]byte, error) {
	// The slope and intercept columns hold numbers in the units of the
	// row's slope_units and intercept_units columns (rows mix responses).
	rows := [][]string{{"relationships_mode", "kind", "domain", "season", "regime", "response", "predictor", "controls",
		"count [1]", "time_steps [1]", "area [m2]", "slope", "slope_stderr", "slope_ci_lower", "slope_ci_upper", "slope_units",
		"intercept", "intercept_stderr", "intercept_units", "r [1]", "r_ci_lower [1]", "r_ci_upper [1]", "r2 [1]",
		"slope_n_eff [1]", "r_n_eff [1]", "predictor_lag1_autocorrelation [1]", "response_lag1_autocorrelation [1]", "residual_lag1_autocorrelation [1]", "independent_areas [1]",
		"bootstrap_replicates [1]", "bootstrap_slope_ci_lower", "bootstrap_slope_ci_upper", "note"}}
	mode := r.Mode.String()
	for _, g := range r.Regressions {
		bn, blo, bhi := "0", "NaN", "NaN"
		if g.Boot != nil {
			bn, blo, bhi = strconv.Itoa(g.Boot.Replicates), ff(g.Boot.Slope.Lo), ff(g.Boot.Slope.Hi)
		}
		rows = append(rows, []string{mode, "simple", g.Domain, g.Season, g.Regime.String(), g.Response, g.Predictor, "",
			strconv.FormatInt(g.N, 10), strconv.Itoa(g.Steps), ff(g.Area), ff(g.Slope), ff(g.SlopeSE), ff(g.SlopeCI.Lo), ff(g.SlopeCI.Hi), g.SlopeUnits,
			ff(g.Intercept), ff(g.InterceptSE), g.Units, ff(g.R), ff(g.RCI.Lo), ff(g.RCI.Hi), ff(g.R * g.R),
			ff(g.NEffSlope), ff(g.NEffCorr), ff(g.R1X), ff(g.R1Y), ff(g.R1Resid), ff(g.IndependentAreas), bn, blo, bhi, g.Note})
	}
	for _, p := range r.Partials {
		for k := 0; k < 2; k++ {
			bn, blo, bhi := "0", "NaN", "NaN"
			if p.Boot != nil {
				bn, blo, bhi = strconv.Itoa(p.BootReplicates), ff(p.Boot[k].Lo), ff(p.Boot[k].Hi)
			}
			rows = append(rows, []string{mode, "partial", p.Domain, p.Season, p.Regime.String(), p.Response, p.Predictors[k], p.Predictors[1-k],
				strconv.FormatInt(p.N, 10), strconv.Itoa(p.Steps), ff(p.Area), ff(p.Coef[k]), ff(p.SE[k]), ff(p.CI[k].Lo), ff(p.CI[k].Hi), p.CoefUnits,
				ff(p.Intercept), "NaN", p.Units, "NaN", "NaN", "NaN", ff(p.R2),
				ff(p.NEff), "NaN", ff(p.R1X[k]), "NaN", ff(p.R1Resid), ff(p.IndependentAreas), bn, blo, bhi, p.Note})
		}
	}
	return csvBytes(rows)
}

func flipsCSV(r *Results) ([]byte, error) {
	rows := [][]string{{"patch", "south [degrees_north]", "north [degrees_north]", "west [degrees_east]", "east [degrees_east]",
		"sst_perturbation [K]", "patch_area_fraction_mean [1]", "patch_area_fraction_min [1]", "patch_area_fraction_max [1]", "area_time_inside [m2]", "area_time_outside [m2]",
		"changed_inside [1]", "to_convective_inside [1]", "from_convective_inside [1]",
		"convective_before_inside [1]", "convective_after_inside [1]", "convective_change_inside [1]",
		"changed_outside [1]", "to_convective_outside [1]", "from_convective_outside [1]",
		"convective_before_outside [1]", "convective_after_outside [1]", "convective_change_outside [1]"}}
	for _, pf := range r.Flips {
		p := pf.Patch
		for _, x := range pf.Rows {
			rows = append(rows, []string{p.Name, ff(p.South), ff(p.North), ff(p.West), ff(p.East), ff(x.DeltaT),
				ff(pf.FMean), ff(pf.FMin), ff(pf.FMax), ff(pf.AreaTime), ff(pf.OutAreaTime),
				ff(x.Changed), ff(x.ToConvective), ff(x.FromConvective), ff(x.ConvectiveBefore), ff(x.ConvectiveAfter), ff(x.ConvectiveChange()),
				ff(x.OutChanged), ff(x.OutToConvective), ff(x.OutFromConvective), ff(x.OutConvectiveBefore), ff(x.OutConvectiveAfter), ff(x.OutConvectiveChange())})
		}
	}
	return csvBytes(rows)
}

func thresholdsCSV(r *Results) ([]byte, error) {
	rows := [][]string{{"scope", "year", "indicator_condition", "count [1]", "time_steps [1]", "relative_threshold [K]", "relative_threshold_ci_lower [K]", "relative_threshold_ci_upper [K]",
		"absolute_threshold [K]", "absolute_threshold_ci_lower [K]", "absolute_threshold_ci_upper [K]", "tropical_mean_sst [K]", "logistic_slope [K-1]", "bootstrap_replicates [1]", "note"}}
	if t := r.Threshold; t != nil {
		rows = append(rows, []string{"record", "", t.Condition, strconv.FormatInt(t.N, 10), strconv.Itoa(r.Steps), ff(t.Rel), ff(t.RelCI.Lo), ff(t.RelCI.Hi),
			ff(t.Abs), ff(t.AbsCI.Lo), ff(t.AbsCI.Hi), ff(t.TropicalMean), ff(t.B1), strconv.Itoa(t.Replicates), t.Note})
		for _, y := range t.Years {
			rows = append(rows, []string{"year", strconv.Itoa(y.Year), t.Condition, strconv.FormatInt(y.N, 10), strconv.Itoa(y.Steps), ff(y.Rel), "NaN", "NaN",
				ff(y.Abs), "NaN", "NaN", ff(y.TropicalMean), ff(y.LogisticSlope), "0", y.Note})
		}
	}
	return csvBytes(rows)
}
