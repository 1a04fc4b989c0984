package constraint

import (
	"bytes"
	"crypto/sha256"
	"encoding/csv"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"lidscope/factors"
	"lidscope/internal/cfwrite"
	"lidscope/internal/jsonnum"
	"lidscope/vocab"
)

// Files of a constraint run folder.
const (
	JSONFile       = "constraint.json"        // everything but the maps (Read reads it)
	CSVFile        = "constraint.csv"         // one row per domain × regime × factor
	ChangesCSVFile = "constraint_changes.csv" // one row per domain × regime: constrained, predicted, actual
	MapsFile       = "constraint.nc"          // per-cell maps
	ProvenanceFile = "provenance.json"        // command, version, inputs
	Format         = "lidscope-constraint/1"  // format of constraint.json
	provFormat     = "lidscope-constraint-provenance/1"
	changeName     = "change" // the suffix of a change per kelvin
	constrainedKey = "constrained_" + changeName
	predictedKey   = "predicted_" + changeName
	actualKey      = "actual_" + changeName
)

// OutputNames are the files Stage writes (figures aside).
func OutputNames() []string {
	return []string{JSONFile, CSVFile, ChangesCSVFile, MapsFile, ProvenanceFile}
}

// Stager is where Stage writes: a run folder being written
// (*runfolder.Stage).
type Stager interface {
	Path(name string) string
	WriteFile(name string, b []byte) error
}

// Meta is the provenance of a constraint run.
type Meta struct {
	Version string
	Command []string
	Created time.Time
}

func num(x float64, u string) jsonnum.Num { return jsonnum.Num{Value: x, Units: u} }

type jsonEstimate struct {
	Value   jsonnum.Num `json:"value"`
	StdErr  jsonnum.Num `json:"stderr"`
	CILower jsonnum.Num `json:"ci_lower"`
	CIUpper jsonnum.Num `json:"ci_upper"`
}

func estimateJSON(e Estimate, u string) jsonEstimate {
	return jsonEstimate{num(e.Value, u), num(e.SE, u), num(e.Lo, u), num(e.Hi, u)}
}

func (j jsonEstimate) estimate() Estimate {
	return Estimate{j.Value.Value, j.StdErr.Value, j.CILower.Value, j.CIUpper.Value}
}

type jsonFactorChange struct {
	Factor         string      `json:"factor"`
	Change         jsonnum.Num `json:"factor_change"`
	ChangeSE       jsonnum.Num `json:"factor_change_stderr"`
	ObsCoef        jsonnum.Num `json:"observed_coefficient"`
	ObsCoefSE      jsonnum.Num `json:"observed_coefficient_stderr"`
	ModelCoef      jsonnum.Num `json:"model_coefficient"`
	ModelCoefSE    jsonnum.Num `json:"model_coefficient_stderr"`
	Contribution   jsonnum.Num `json:"contribution"`
	ContributionSE jsonnum.Num `json:"contribution_stderr"`
	ModelContrib   jsonnum.Num `json:"model_contribution"`
	ModelContribSE jsonnum.Num `json:"model_contribution_stderr"`
	FactorUnits    string      `json:"units"`
}

type jsonDomain struct {
	Domain       string             `json:"domain"`
	Regime       string             `json:"regime"`
	Constrained  jsonEstimate       `json:"constrained_change"`
	Predicted    jsonEstimate       `json:"predicted_change"`
	Actual       jsonEstimate       `json:"actual_change"`
	ObsSteps     int64              `json:"observations_count"`
	ControlSteps int64              `json:"control_count"`
	WarmSteps    int64              `json:"warm_count"`
	Factors      []jsonFactorChange `json:"factors"`
	Note         string             `json:"note"`
}

type jsonRun struct {
	Dir       string `json:"dir"`
	Dataset   string `json:"dataset"`
	StudyHash string `json:"study_sha256"`
}

type jsonFactor struct {
	Name  string `json:"name"`
	Units string `json:"units"`
}

type jsonDoc struct {
	Format        string       `json:"format"`
	Response      string       `json:"response"`
	ResponseUnits string       `json:"response_units"`
	Level         float64      `json:"level"`
	Warming       jsonnum.Num  `json:"warming"`
	WarmingSource string       `json:"warming_source"`
	Observations  jsonRun      `json:"observations"`
	Control       jsonRun      `json:"control"`
	Warm          jsonRun      `json:"warm"`
	Factors       []jsonFactor `json:"factors"`
	Domains       []jsonDomain `json:"domains"`
	Notes         []string     `json:"notes"`
}

// changeUnits are the units of a change of u per kelvin.
func changeUnits(u string) string { return vocab.SlopeUnits(u, "K") }

func toJSON(r *Result) jsonDoc {
	cu := changeUnits(r.ResponseUnits)
	doc := jsonDoc{Format: Format, Response: r.Response, ResponseUnits: r.ResponseUnits, Level: r.Level,
		Warming: num(r.Warming, "K"), WarmingSource: r.WarmingSource,
		Observations: jsonRun(r.Observations), Control: jsonRun(r.Control), Warm: jsonRun(r.Warm), Notes: r.Notes}
	if doc.Notes == nil {
		doc.Notes = []string{}
	}
	for _, f := range r.Factors {
		doc.Factors = append(doc.Factors, jsonFactor{f.Name, f.Units})
	}
	for _, d := range r.Domains {
		jd := jsonDomain{Domain: d.Domain, Regime: d.Regime, Constrained: estimateJSON(d.Constrained, cu),
			Predicted: estimateJSON(d.Predicted, cu), Actual: estimateJSON(d.Actual, cu),
			ObsSteps: d.ObsSteps, ControlSteps: d.ControlSteps, WarmSteps: d.WarmSteps, Note: d.Note}
		for _, f := range d.Factors {
			fu, ku := changeUnits(f.Units), vocab.SlopeUnits(r.ResponseUnits, f.Units)
			jd.Factors = append(jd.Factors, jsonFactorChange{Factor: f.Factor, FactorUnits: f.Units,
				Change: num(f.PerKelvin, fu), ChangeSE: num(f.PerKelvinSE, fu),
				ObsCoef: num(f.ObsCoef, ku), ObsCoefSE: num(f.ObsCoefSE, ku),
				ModelCoef: num(f.ModelCoef, ku), ModelCoefSE: num(f.ModelCoefSE, ku),
				Contribution: num(f.Contribution, cu), ContributionSE: num(f.ContributionSE, cu),
				ModelContrib: num(f.ModelContribution, cu), ModelContribSE: num(f.ModelContributionSE, cu)})
		}
		doc.Domains = append(doc.Domains, jd)
	}
	return doc
}

func ff(x float64) string {
	if math.IsNaN(x) {
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

func factorRows(r *Result) [][]string {
	cu := changeUnits(r.ResponseUnits)
	rows := [][]string{{"domain", "regime", "factor", "factor_change", "factor_change_stderr", "factor_change_units",
		"observed_coefficient", "observed_coefficient_stderr", "model_coefficient", "model_coefficient_stderr", "coefficient_units",
		"contribution [" + cu + "]", "contribution_stderr [" + cu + "]", "model_contribution [" + cu + "]", "model_contribution_stderr [" + cu + "]"}}
	for _, d := range r.Domains {
		for _, f := range d.Factors {
			rows = append(rows, []string{d.Domain, d.Regime, f.Factor, ff(f.PerKelvin), ff(f.PerKelvinSE), changeUnits(f.Units),
				ff(f.ObsCoef), ff(f.ObsCoefSE), ff(f.ModelCoef), ff(f.ModelCoefSE), vocab.SlopeUnits(r.ResponseUnits, f.Units),
				ff(f.Contribution), ff(f.ContributionSE), ff(f.ModelContribution), ff(f.ModelContributionSE)})
		}
	}
	return rows
}

func changeRows(r *Result) [][]string {
	cu := changeUnits(r.ResponseUnits)
	head := []string{"domain", "regime"}
	for _, k := range []string{constrainedKey, predictedKey, actualKey} {
		for _, s := range []string{"", "_" + vocab.StdErr, "_" + vocab.CILower, "_" + vocab.CIUpper} {
			head = append(head, k+s+" ["+cu+"]")
		}
	}
	rows := [][]string{append(head, "observations_count [1]", "control_count [1]", "warm_count [1]", "note")}
	for _, d := range r.Domains {
		row := []string{d.Domain, d.Regime}
		for _, e := range []Estimate{d.Constrained, d.Predicted, d.Actual} {
			row = append(row, ff(e.Value), ff(e.SE), ff(e.Lo), ff(e.Hi))
		}
		rows = append(rows, append(row, strconv.FormatInt(d.ObsSteps, 10), strconv.FormatInt(d.ControlSteps, 10),
			strconv.FormatInt(d.WarmSteps, 10), d.Note))
	}
	return rows
}

// Stage writes the constraint's files into st (see OutputNames).
func Stage(st Stager, r *Result, meta Meta) error {
	if r == nil {
		return errors.New("constraint: Stage needs a result (Compute)")
	}
	write := func(name string, b []byte, err error) error {
		if err == nil {
			err = st.WriteFile(name, b)
		}
		if err != nil {
			return fmt.Errorf("constraint: writing %s: %w", name, err)
		}
		return nil
	}
	b, err := jsonnum.Marshal(toJSON(r))
	if err := write(JSONFile, b, err); err != nil {
		return err
	}
	b, err = csvBytes(factorRows(r))
	if err := write(CSVFile, b, err); err != nil {
		return err
	}
	b, err = csvBytes(changeRows(r))
	if err := write(ChangesCSVFile, b, err); err != nil {
		return err
	}
	b, err = provenance(r, meta)
	if err := write(ProvenanceFile, b, err); err != nil {
		return err
	}
	if r.Cells != nil {
		if err := writeNC(st.Path(MapsFile), r, meta); err != nil {
			return fmt.Errorf("constraint: writing %s: %w", MapsFile, err)
		}
	}
	return nil
}

func provenance(r *Result, meta Meta) ([]byte, error) {
	created := meta.Created
	if created.IsZero() {
		created = time.Now().UTC()
	}
	type input struct {
		Role      string `json:"role"`
		Dir       string `json:"dir"`
		Dataset   string `json:"dataset"`
		StudyHash string `json:"study_sha256"`
		Manifest  string `json:"manifest_sha256"`
	}
	var ins []input
	for _, x := range []struct {
		role string
		ri   RunInfo
	}{{"observations", r.Observations}, {"control", r.Control}, {"warm", r.Warm}} {
		ins = append(ins, input{x.role, x.ri.Dir, x.ri.Dataset, x.ri.StudyHash, manifestHash(x.ri.Dir)})
	}
	p := struct {
		Format  string  `json:"format"`
		Version string  `json:"lidscope_version"`
		Command string  `json:"command"`
		Created string  `json:"created"`
		Inputs  []input `json:"inputs"`
		Method  string  `json:"method"`
	}{provFormat, meta.Version, strings.Join(meta.Command, " "), created.Format(time.RFC3339), ins,
		"ΔC/ΔT ≈ Σ_i (∂C/∂x_i)_obs (Δx_i/ΔT)_model (Qu et al. 2015; Myers & Norris 2016; Klein et al. 2017); " +
			"variance βᵀΣ_dβ + dᵀΣ_βd + tr(Σ_βΣ_d) with independent sensitivities and changes, normal interval (factors.Constrain); " +
			"Δx from the difference of the runs' time means, its variance the sum of the two runs' squared standard errors of the mean, factors taken as independent"}
	return json.MarshalIndent(p, "", "  ")
}

// manifestHash is the SHA-256 of a run folder's manifest as a hex string
// ("" when it cannot be read).
func manifestHash(dir string) string {
	b, err := os.ReadFile(filepath.Join(dir, "run-manifest.json"))
	if err != nil {
		return ""
	}
	return sha256Hex(b)
}

func writeNC(path string, r *Result, meta Meta) error {
	c := r.Cells
	attrs := map[string]any{"response": r.Response, "level": r.Level, "warming_source": r.WarmingSource,
		"observations": r.Observations.Dir, "control": r.Control.Dir, "warm": r.Warm.Dir}
	if meta.Version != "" {
		attrs["lidscope_version"] = meta.Version
	}
	w, err := cfwrite.Create(path, cfwrite.Options{Title: "lidscope observational constraint on a model's change per kelvin of global warming",
		Source:  "lidscope constraint of " + r.Control.Dataset + " and " + r.Warm.Dataset + " by " + r.Observations.Dataset,
		Command: meta.Command, Attributes: attrs, Overwrite: true})
	if err != nil {
		return err
	}
	defer w.Abort()
	if err := w.SetGrid(cfwrite.Grid{Lat: c.Lat, Lon: c.Lon, LatBounds: c.LatB, LonBounds: c.LonB}); err != nil {
		return err
	}
	dims := []string{cfwrite.DimLat, cfwrite.DimLon}
	cu := changeUnits(r.ResponseUnits)
	var vs []cfwrite.Field
	add := func(name, units, long string, data []float64) {
		vs = append(vs, cfwrite.Field{Spec: cfwrite.VarSpec{Name: name, Dims: dims, Units: units, LongName: long, Type: cfwrite.Float64}, Data: data})
	}
	resp := r.Response
	add(constrainedKey, cu, fmt.Sprintf("change of %s per K of global warming constrained by the observed sensitivities", resp), c.Constrained)
	add(constrainedKey+"_"+vocab.StdErr, cu, "standard error of the constrained change", c.SE)
	add(predictedKey, cu, fmt.Sprintf("change of %s per K predicted by the model's own sensitivities and factor changes", resp), c.Predicted)
	add(actualKey, cu, fmt.Sprintf("the model's own change of the time mean of %s per K of global warming", resp), c.Actual)
	for i, f := range r.Factors {
		add(f.Name+"_contribution", cu, "contribution of "+f.Name+" to the constrained change (observed sensitivity times the model's change)", c.Contribution[i])
		add(f.Name+"_"+changeName, changeUnits(f.Units), "the model's change of the time mean of "+f.Name+" per K of global warming", c.PerKelvin[i])
	}
	if err := w.WriteFields(vs); err != nil {
		return err
	}
	return w.Close()
}

// Read reads constraint.json of a constraint run folder (the maps are not
// read).
func Read(dir string) (*Result, error) {
	path := filepath.Join(dir, JSONFile)
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("constraint: %w (not a constraint folder? lidscope constrain writes it)", err)
	}
	var doc jsonDoc
	if err := json.Unmarshal(b, &doc); err != nil {
		return nil, fmt.Errorf("constraint: %s: %w", path, err)
	}
	if doc.Format != Format {
		return nil, fmt.Errorf("constraint: %s has format %q, want %q (written by another version of lidscope?)", path, doc.Format, Format)
	}
	r := &Result{Response: doc.Response, ResponseUnits: doc.ResponseUnits, Level: doc.Level, Warming: doc.Warming.Value,
		WarmingSource: doc.WarmingSource, Observations: RunInfo(doc.Observations), Control: RunInfo(doc.Control), Warm: RunInfo(doc.Warm), Notes: doc.Notes}
	for _, f := range doc.Factors {
		r.Factors = append(r.Factors, factors.FactorInfo{Name: f.Name, Units: f.Units})
	}
	for _, jd := range doc.Domains {
		d := Domain{Domain: jd.Domain, Regime: jd.Regime, Constrained: jd.Constrained.estimate(), Predicted: jd.Predicted.estimate(),
			Actual: jd.Actual.estimate(), ObsSteps: jd.ObsSteps, ControlSteps: jd.ControlSteps, WarmSteps: jd.WarmSteps, Note: jd.Note}
		for _, f := range jd.Factors {
			d.Factors = append(d.Factors, FactorChange{Factor: f.Factor, Units: f.FactorUnits, PerKelvin: f.Change.Value, PerKelvinSE: f.ChangeSE.Value,
				ObsCoef: f.ObsCoef.Value, ObsCoefSE: f.ObsCoefSE.Value, ModelCoef: f.ModelCoef.Value, ModelCoefSE: f.ModelCoefSE.Value,
				Contribution: f.Contribution.Value, ContributionSE: f.ContributionSE.Value,
				ModelContribution: f.ModelContrib.Value, ModelContributionSE: f.ModelContribSE.Value})
		}
		r.Domains = append(r.Domains, d)
	}
	return r, nil
}

func sha256Hex(b []byte) string {
	s := sha256.Sum256(b)
	return hex.EncodeToString(s[:])
}
