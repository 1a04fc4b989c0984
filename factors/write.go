package factors

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"lidscope/internal/cfwrite"
	"lidscope/internal/jsonnum"
	"lidscope/netcdf"
	"lidscope/vocab"
)

// The files of a factor analysis in a run folder.
const (
	JSONFile = "factors.json" // regional and regime fits (ReadRun reads it)
	CSVFile  = "factors.csv"  // one row per domain × regime × factor
	MapsFile = "factors.nc"   // per-cell maps (with Config.Maps)
)

// FormatVersion is the format_version of factors.json.
const FormatVersion = 1

// OutputNames are the names of the files Stage writes with maps.
func OutputNames() []string { return []string{JSONFile, CSVFile, MapsFile} }

// Meta is the provenance written with the results.
type Meta struct {
	Dataset, Title, Version, StudyHash, Period, Source string
	Command                                            []string
	MetricsConventions                                 string
}

// Stager is where Stage puts its files (a runfolder.Stage).
type Stager interface {
	Path(name string) string
	WriteFile(name string, b []byte) error
}

func slopeUnits(ru, fu string) string { return vocab.SlopeUnits(ru, fu) }

// Names of the per-cell variables of factors.nc and the keys of factors.json.
func CoefName(resp, f string) string { return resp + "_vs_" + f + "_" + vocab.Coefficient }
func CoefSDName(resp, f string) string {
	return resp + "_vs_" + f + "_standardised_" + vocab.Coefficient
}
func SEName(resp, f string) string { return resp + "_vs_" + f + "_" + vocab.StdErr }
func LoName(resp, f string) string { return resp + "_vs_" + f + "_" + vocab.CILower }
func HiName(resp, f string) string { return resp + "_vs_" + f + "_" + vocab.CIUpper }
func VIFName(f string) string      { return f + "_vif" }
func SDName(f string) string       { return f + "_" + vocab.Std }
func CovName(resp, fj, fl string) string {
	return resp + "_" + vocab.Coefficient + "_covariance_" + fj + "_" + fl
}

// cell variables
func cellName(resp, stat string) string { return resp + "_" + stat }

const (
	statCVR2    = "cv_r2"
	statPenalty = "penalty"
)

// ---- JSON ----

type jsonSens struct {
	Factor   string      `json:"factor"`
	Coef     jsonnum.Num `json:"coefficient"`
	CoefSD   jsonnum.Num `json:"standardised_coefficient"`
	SE       jsonnum.Num `json:"stderr"`
	Lo       jsonnum.Num `json:"ci_lower"`
	Hi       jsonnum.Num `json:"ci_upper"`
	VIF      jsonnum.Num `json:"vif"`
	SD       jsonnum.Num `json:"std"`
	Mean     jsonnum.Num `json:"mean"`
	MeanSE   jsonnum.Num `json:"mean_stderr"`
	BootLo   jsonnum.Num `json:"bootstrap_ci_lower"`
	BootHi   jsonnum.Num `json:"bootstrap_ci_upper"`
	Excludes bool        `json:"ci_excludes_zero"`
}

type jsonFit struct {
	Domain  string       `json:"domain"`
	Regime  string       `json:"regime"`
	N       jsonnum.Num  `json:"count"`
	NEff    jsonnum.Num  `json:"n_eff"`
	Penalty jsonnum.Num  `json:"penalty"`
	R2      jsonnum.Num  `json:"r2"`
	CVR2    jsonnum.Num  `json:"cv_r2"`
	R1Resid jsonnum.Num  `json:"residual_lag1_autocorrelation"`
	Sens    []jsonSens   `json:"sensitivities"`
	Cov     [][]*float64 `json:"covariance"`
	RMean   jsonnum.Num  `json:"response_mean"`
	RMeanSE jsonnum.Num  `json:"response_mean_stderr"`
	Note    string       `json:"note"`
}

type jsonFactor struct {
	Name  string `json:"name"`
	Units string `json:"units"`
}

type jsonBoot struct {
	Replicates int    `json:"replicates"`
	BlockYears int    `json:"block_years"`
	Seed       uint64 `json:"seed"`
}

type jsonDoc struct {
	Format        string       `json:"format"`
	FormatVersion int          `json:"format_version"`
	Dataset       string       `json:"dataset,omitempty"`
	StudyHash     string       `json:"study_hash,omitempty"`
	Period        string       `json:"period,omitempty"`
	Response      string       `json:"response"`
	ResponseUnits string       `json:"response_units"`
	Method        string       `json:"method"`
	Level         float64      `json:"level"`
	Mode          string       `json:"relationships_mode"`
	Detrended     bool         `json:"detrended"`
	CellFoldYears int          `json:"cell_fold_years"`
	Steps         int          `json:"time_steps"`
	Bootstrap     jsonBoot     `json:"bootstrap"`
	Factors       []jsonFactor `json:"factors"`
	Fits          []jsonFit    `json:"fits"`
	Notes         []string     `json:"notes"`
}

// num is a JSON number; ±Inf (a singular fit's VIF, say) is written as
// null like NaN.
func num(x float64, u string) jsonnum.Num { return jsonnum.Num{Value: finite(x), Units: u} }

func finite(x float64) float64 {
	if math.IsInf(x, 0) {
		return math.NaN()
	}
	return x
}

func toJSON(r *Results, meta Meta) jsonDoc {
	d := jsonDoc{Format: "lidscope-factors", FormatVersion: FormatVersion, Dataset: meta.Dataset, StudyHash: meta.StudyHash, Period: meta.Period,
		Response: r.Response, ResponseUnits: r.ResponseUnits, Method: r.Method, Level: r.Level, Mode: "anomaly", Detrended: r.Detrend,
		CellFoldYears: r.CellFoldYears, Steps: r.Steps, Bootstrap: jsonBoot(r.Bootstrap), Notes: r.Notes}
	if d.Notes == nil {
		d.Notes = []string{}
	}
	for _, f := range r.Factors {
		d.Factors = append(d.Factors, jsonFactor(f))
	}
	ru := r.ResponseUnits
	for _, f := range r.Fits {
		jf := jsonFit{Domain: f.Domain, Regime: f.Regime, N: jsonnum.Count(f.N), NEff: num(f.NEff, vocab.UnitOne), Penalty: num(f.Penalty, vocab.UnitOne),
			R2: num(f.R2, vocab.UnitOne), CVR2: num(f.CVR2, vocab.UnitOne), R1Resid: num(f.R1Resid, vocab.UnitOne), Note: f.Note,
			RMean: num(f.RespMean, ru), RMeanSE: num(f.RespMeanSE, ru)}
		for _, s := range f.Sens {
			jf.Sens = append(jf.Sens, jsonSens{Factor: s.Factor, Coef: num(s.Coef, s.CoefUnits), CoefSD: num(s.CoefSD, ru), SE: num(s.SE, s.CoefUnits),
				Lo: num(s.Lo, s.CoefUnits), Hi: num(s.Hi, s.CoefUnits), VIF: num(s.VIF, vocab.UnitOne), SD: num(s.SD, s.Units),
				Mean: num(s.Mean, s.Units), MeanSE: num(s.MeanSE, s.Units), BootLo: num(s.BootLo, s.CoefUnits), BootHi: num(s.BootHi, s.CoefUnits),
				Excludes: s.Excludes0()})
		}
		p := len(f.Sens)
		for j := 0; j < p; j++ {
			row := make([]*float64, p)
			for l := 0; l < p; l++ {
				if v := f.Cov[j*p+l]; v == v && !math.IsInf(v, 0) {
					row[l] = &v
				}
			}
			jf.Cov = append(jf.Cov, row)
		}
		d.Fits = append(d.Fits, jf)
	}
	return d
}

// ---- CSV ----

func ff(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

func csvBytes(r *Results) ([]byte, error) {
	rows := [][]string{{"domain", "regime", "response", "factor", "method", "penalty [1]",
		"coefficient", "coefficient_stderr", "coefficient_ci_lower", "coefficient_ci_upper", "coefficient_units",
		"standardised_coefficient", "standardised_coefficient_units", "factor_std", "factor_units",
		"bootstrap_ci_lower", "bootstrap_ci_upper",
		"vif [1]", "count [1]", "n_eff [1]", "r2 [1]", "cv_r2 [1]", "note"}}
	for _, f := range r.Fits {
		for _, s := range f.Sens {
			rows = append(rows, []string{f.Domain, f.Regime, r.Response, s.Factor, r.Method, ff(f.Penalty),
				ff(s.Coef), ff(s.SE), ff(s.Lo), ff(s.Hi), s.CoefUnits, ff(s.CoefSD), r.ResponseUnits, ff(s.SD), s.Units,
				ff(s.BootLo), ff(s.BootHi),
				ff(s.VIF), strconv.FormatInt(f.N, 10), ff(f.NEff), ff(f.R2), ff(f.CVR2), f.Note})
		}
	}
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	if err := w.WriteAll(rows); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// ---- NetCDF ----

func writeNC(path string, r *Results, meta Meta) error {
	m := r.Maps
	attrs := map[string]any{
		"response": r.Response, "method": r.Method, "level": r.Level, "factors": factorList(r),
		vocab.RelationshipsMode: "anomaly", "detrended": r.Detrend, "cell_fold_years": r.CellFoldYears,
		vocab.TimeSteps: r.Steps, "cells_without_fit": m.Failed,
		"n_eff_method": "per cell: n(1 − ρ)/(1 + ρ), ρ the largest product of a factor's and the response's lag-1 autocorrelations (Bretherton et al. 1999, J. Climate 12, eq. 31)",
		"cv_method":    fmt.Sprintf("leave one block of %d calendar years out (block ⌊year/%d⌋)", r.CellFoldYears, r.CellFoldYears),
	}
	for k, v := range map[string]string{"dataset": meta.Dataset, "lidscope_version": meta.Version, vocab.StudyHash: meta.StudyHash, "period": meta.Period, vocab.Conventions: meta.MetricsConventions} {
		if v != "" {
			attrs[k] = v
		}
	}
	title := meta.Title
	if title == "" {
		title = "lidscope cloud-controlling factor sensitivities"
	}
	w, err := cfwrite.Create(path, cfwrite.Options{Title: title, Source: meta.Source, Command: meta.Command, Attributes: attrs, Overwrite: true})
	if err != nil {
		return err
	}
	defer w.Abort()
	if err := w.SetGrid(cfwrite.Grid{Lat: m.Lat, Lon: m.Lon}); err != nil {
		return err
	}
	dims := []string{cfwrite.DimLat, cfwrite.DimLon}
	var vs []cfwrite.Field
	add := func(name, units, long string, data []float64) {
		fin := make([]float64, len(data))
		for i, x := range data {
			fin[i] = finite(x)
		}
		data = fin
		vs = append(vs, cfwrite.Field{Spec: cfwrite.VarSpec{Name: name, Dims: dims, Units: units, LongName: long, Type: cfwrite.Float64}, Data: data})
	}
	resp, ru := r.Response, r.ResponseUnits
	p := len(r.Factors)
	for k, f := range r.Factors {
		cu := slopeUnits(ru, f.Units)
		what := fmt.Sprintf("of %s anomalies on %s anomalies (%s regression on %d factors)", resp, f.Name, r.Method, p)
		add(CoefName(resp, f.Name), cu, "sensitivity "+what, m.Coef[k])
		add(CoefSDName(resp, f.Name), ru, "sensitivity per standard deviation of the factor "+what, m.CoefSD[k])
		add(SEName(resp, f.Name), cu, "standard error of the sensitivity "+what, m.SE[k])
		add(LoName(resp, f.Name), cu, fmt.Sprintf("lower bound of the %g %% interval of the sensitivity %s", 100*r.Level, what), m.Lo[k])
		add(HiName(resp, f.Name), cu, fmt.Sprintf("upper bound of the %g %% interval of the sensitivity %s", 100*r.Level, what), m.Hi[k])
		add(VIFName(f.Name), vocab.UnitOne, "variance inflation factor of "+f.Name, m.VIF[k])
		add(SDName(f.Name), f.Units, "standard deviation of the "+f.Name+" anomalies", m.SD[k])
	}
	for j, fj := range r.Factors {
		for l := j; l < p; l++ {
			fl := r.Factors[l]
			u := slopeUnits(slopeUnits(ru+" "+ru, fj.Units), fl.Units)
			if ru == vocab.UnitOne || ru == "" {
				u = slopeUnits(slopeUnits(vocab.UnitOne, fj.Units), fl.Units)
			}
			add(CovName(resp, fj.Name, fl.Name), tidyUnits(u), "covariance of the sensitivities to "+fj.Name+" and "+fl.Name, m.Cov[j*p+l])
		}
	}
	add(cellName(resp, vocab.R2), vocab.UnitOne, "coefficient of determination of the factor regression (in sample)", m.R2)
	add(cellName(resp, statCVR2), vocab.UnitOne, "cross-validated coefficient of determination of the factor regression", m.CVR2)
	add(cellName(resp, vocab.NEff), vocab.UnitOne, "effective sample size of the factor regression", m.NEff)
	add(cellName(resp, vocab.Count), vocab.UnitOne, "monthly samples of the factor regression", m.N)
	add(cellName(resp, statPenalty), vocab.UnitOne, "ridge penalty chosen by cross-validation (correlation-matrix scale; 0 is OLS)", m.Pen)
	if err := w.WriteFields(vs); err != nil {
		return err
	}
	return w.Close()
}

// tidyUnits joins repeated bases of a product of powers ("K-1 K-1" →
// "K-2").
func tidyUnits(u string) string {
	exp := map[string]int{}
	var order []string
	for _, f := range strings.Fields(u) {
		base, e := f, 1
		if i := strings.IndexAny(f, "-0123456789"); i > 0 {
			base = f[:i]
			fmt.Sscanf(f[i:], "%d", &e)
		}
		if _, ok := exp[base]; !ok {
			order = append(order, base)
		}
		exp[base] += e
	}
	var out []string
	for _, b := range order {
		switch e := exp[b]; e {
		case 0:
		case 1:
			out = append(out, b)
		default:
			out = append(out, b+strconv.Itoa(e))
		}
	}
	if len(out) == 0 {
		return vocab.UnitOne
	}
	return strings.Join(out, " ")
}

func factorList(r *Results) string {
	var s []string
	for _, f := range r.Factors {
		s = append(s, f.Name)
	}
	return strings.Join(s, " ")
}

// Stage writes factors.json, factors.csv and (with maps) factors.nc into
// st; the caller commits the run folder. dir is the final folder, named
// in messages.
func Stage(st Stager, dir string, r *Results, meta Meta) error {
	if r == nil {
		return errors.New("factors: Stage needs results (Acc.Results)")
	}
	b, err := jsonnum.Marshal(toJSON(r, meta))
	if err == nil {
		err = st.WriteFile(JSONFile, b)
	}
	if err != nil {
		return fmt.Errorf("factors: writing %s in %s: %w", JSONFile, dir, err)
	}
	if b, err = csvBytes(r); err == nil {
		err = st.WriteFile(CSVFile, b)
	}
	if err != nil {
		return fmt.Errorf("factors: writing %s in %s: %w", CSVFile, dir, err)
	}
	if r.Maps != nil {
		if err := writeNC(st.Path(MapsFile), r, meta); err != nil {
			return fmt.Errorf("factors: writing %s in %s: %w", MapsFile, dir, err)
		}
	}
	return nil
}

// ---- reading ----

// ReadRun reads the factor results of a run folder: factors.json and,
// when present, the maps of factors.nc. The error says so when the folder
// has no factor analysis.
func ReadRun(dir string) (*Results, error) {
	b, err := os.ReadFile(filepath.Join(dir, JSONFile))
	if err != nil {
		if errors.Is(err, os.ErrNotExist) {
			return nil, fmt.Errorf("factors: %s has no %s: the run had no factors block in its study (add one, see the README, and run it again): %w", dir, JSONFile, err)
		}
		return nil, fmt.Errorf("factors: %w", err)
	}
	var d jsonDoc
	if err := json.Unmarshal(b, &d); err != nil {
		return nil, fmt.Errorf("factors: %s: %w", filepath.Join(dir, JSONFile), err)
	}
	if d.Format != "lidscope-factors" || d.FormatVersion != FormatVersion {
		return nil, fmt.Errorf("factors: %s has format %q version %d; this lidscope reads lidscope-factors version %d", filepath.Join(dir, JSONFile), d.Format, d.FormatVersion, FormatVersion)
	}
	r := &Results{Response: d.Response, ResponseUnits: d.ResponseUnits, Method: d.Method, Level: d.Level, Detrend: d.Detrended,
		CellFoldYears: d.CellFoldYears, Bootstrap: Bootstrap(d.Bootstrap), Steps: d.Steps, Notes: d.Notes}
	for _, f := range d.Factors {
		r.Factors = append(r.Factors, FactorInfo(f))
	}
	p := len(r.Factors)
	for _, jf := range d.Fits {
		f := RegionFit{Domain: jf.Domain, Regime: jf.Regime, N: int64(jf.N.Value), NEff: jf.NEff.Value, Penalty: jf.Penalty.Value,
			R2: jf.R2.Value, CVR2: jf.CVR2.Value, R1Resid: jf.R1Resid.Value, Note: jf.Note,
			RespMean: jf.RMean.Value, RespMeanSE: jf.RMeanSE.Value}
		if len(jf.Sens) != p || len(jf.Cov) != p {
			return nil, fmt.Errorf("factors: %s: the fit of %s %s has %d sensitivities and a %d-row covariance for %d factors", filepath.Join(dir, JSONFile), f.Domain, f.Regime, len(jf.Sens), len(jf.Cov), p)
		}
		for k, s := range jf.Sens {
			f.Sens = append(f.Sens, Sensitivity{Factor: s.Factor, Units: r.Factors[k].Units, CoefUnits: s.Coef.Units, Coef: s.Coef.Value, CoefSD: s.CoefSD.Value,
				SE: s.SE.Value, Lo: s.Lo.Value, Hi: s.Hi.Value, VIF: s.VIF.Value, SD: s.SD.Value, Mean: s.Mean.Value, MeanSE: s.MeanSE.Value,
				BootLo: s.BootLo.Value, BootHi: s.BootHi.Value})
		}
		for _, row := range jf.Cov {
			if len(row) != p {
				return nil, fmt.Errorf("factors: %s: a covariance row of %s %s has %d entries for %d factors", filepath.Join(dir, JSONFile), f.Domain, f.Regime, len(row), p)
			}
			for _, v := range row {
				if v == nil {
					f.Cov = append(f.Cov, math.NaN())
				} else {
					f.Cov = append(f.Cov, *v)
				}
			}
		}
		r.Fits = append(r.Fits, f)
	}
	mp := filepath.Join(dir, MapsFile)
	if _, err := os.Stat(mp); err == nil {
		if r.Maps, err = readMaps(mp, r); err != nil {
			return nil, err
		}
	}
	return r, nil
}

func readMaps(path string, r *Results) (*Maps, error) {
	f, err := netcdf.Open(path)
	if err != nil {
		return nil, fmt.Errorf("factors: %w", err)
	}
	defer f.Close()
	get := func(name string) ([]float64, error) {
		v, err := f.Var(name)
		if err != nil {
			return nil, fmt.Errorf("factors: %s: variable %s: %w", path, name, err)
		}
		x, err := v.ReadAllFloat64()
		if err != nil {
			return nil, fmt.Errorf("factors: %s: variable %s: %w", path, name, err)
		}
		fill := math.NaN()
		if a, err := v.Attr("_FillValue"); err == nil {
			if fv, ok := a.Float64s(); ok && len(fv) == 1 {
				fill = fv[0]
			}
		}
		for i, y := range x {
			if y == fill {
				x[i] = math.NaN()
			}
		}
		return x, nil
	}
	m := &Maps{}
	if m.Lat, err = get(cfwrite.DimLat); err != nil {
		return nil, err
	}
	if m.Lon, err = get(cfwrite.DimLon); err != nil {
		return nil, err
	}
	m.NLat, m.NLon = len(m.Lat), len(m.Lon)
	resp := r.Response
	p := len(r.Factors)
	for _, fi := range r.Factors {
		for _, x := range []struct {
			dst  *[][]float64
			name string
		}{{&m.Coef, CoefName(resp, fi.Name)}, {&m.CoefSD, CoefSDName(resp, fi.Name)}, {&m.SE, SEName(resp, fi.Name)},
			{&m.Lo, LoName(resp, fi.Name)}, {&m.Hi, HiName(resp, fi.Name)}, {&m.VIF, VIFName(fi.Name)}, {&m.SD, SDName(fi.Name)}} {
			v, err := get(x.name)
			if err != nil {
				return nil, err
			}
			*x.dst = append(*x.dst, v)
		}
	}
	m.Cov = make([][]float64, p*p)
	for j := 0; j < p; j++ {
		for l := j; l < p; l++ {
			v, err := get(CovName(resp, r.Factors[j].Name, r.Factors[l].Name))
			if err != nil {
				return nil, err
			}
			m.Cov[j*p+l], m.Cov[l*p+j] = v, v
		}
	}
	for _, x := range []struct {
		dst  *[]float64
		name string
	}{{&m.R2, cellName(resp, vocab.R2)}, {&m.CVR2, cellName(resp, statCVR2)}, {&m.NEff, cellName(resp, vocab.NEff)},
		{&m.N, cellName(resp, vocab.Count)}, {&m.Pen, cellName(resp, statPenalty)}} {
		if *x.dst, err = get(x.name); err != nil {
			return nil, err
		}
	}
	return m, nil
}
