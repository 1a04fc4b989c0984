package compare

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strconv"

	"lidscope/internal/cfwrite"
	"lidscope/internal/jsonnum"
	"lidscope/internal/stage"
	"lidscope/relations"
	"lidscope/vocab"
)

// Output files of a comparison.
const (
	CSVFile      = "comparison.csv"
	FlipsCSVFile = "comparison_flips.csv"
	JSONFile     = "comparison.json"
	MapsFile     = "comparison_maps.nc"
)

// WriteOptions control Write.
type WriteOptions struct {
	Force   bool
	Version string
	Command []string
	// Figures, when set, draws the comparison's figures into the (staged)
	// folder it is given and returns their paths there; they are moved
	// into place with the files, as the subfolder FiguresDir.
	Figures func(dir string) ([]string, error)
}

// FiguresDir is the subfolder of the comparison's figures.
const FiguresDir = "figures"

// Write writes comparison.csv, comparison.json and comparison_maps.nc
// into dir, as one unit (package stage): every file is written into a
// hidden staging folder first and moved into place only when all are
// complete, so a failure leaves no file of this call under a final name;
// the figures (opt.Figures) are staged with them.
func Write(dir string, res *Result, opt WriteOptions) (_ []string, err error) {
	names := []string{CSVFile, FlipsCSVFile, JSONFile}
	if len(res.Candidates) > 0 {
		names = append(names, MapsFile)
	}
	if !opt.Force {
		have, err := stage.Existing(dir, []string{CSVFile, FlipsCSVFile, JSONFile, MapsFile})
		if err != nil {
			return nil, err
		}
		if opt.Figures != nil {
			if _, err := os.Lstat(filepath.Join(dir, FiguresDir)); err == nil {
				have = append(have, FiguresDir)
			}
		}
		if len(have) > 0 {
			return nil, fmt.Errorf("%s already exists: use --force to replace it or choose another --out: %w", filepath.Join(dir, have[0]), fs.ErrExist)
		}
	}
	_, statErr := os.Stat(dir)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, err
	}
	if statErr != nil {
		defer func() {
			if err != nil {
				os.Remove(dir) // created here: removed again (only if empty)
			}
		}()
	}
	st, err := stage.New(dir, ".lidscope-compare-*")
	if err != nil {
		return nil, err
	}
	defer st.Remove()
	csvb, err := csvBytes(res)
	if err != nil {
		return nil, err
	}
	if err := st.WriteFile(CSVFile, csvb); err != nil {
		return nil, err
	}
	fb, err := flipsCSVBytes(res)
	if err != nil {
		return nil, err
	}
	if err := st.WriteFile(FlipsCSVFile, fb); err != nil {
		return nil, err
	}
	jb, err := jsonBytes(res, opt)
	if err != nil {
		return nil, err
	}
	if err := st.WriteFile(JSONFile, jb); err != nil {
		return nil, err
	}
	if len(res.Candidates) > 0 {
		if err := writeMaps(st.Path(MapsFile), res, opt); err != nil {
			return nil, err
		}
	}
	var figs []string
	if opt.Figures != nil {
		staged := st.Path(FiguresDir)
		if err := os.Mkdir(staged, 0o777); err != nil {
			return nil, err
		}
		paths, err := opt.Figures(staged)
		if err != nil {
			return nil, fmt.Errorf("drawing the comparison figures (nothing was written to %s): %w", dir, err)
		}
		for _, p := range paths {
			figs = append(figs, filepath.Join(dir, FiguresDir, filepath.Base(p)))
		}
		names = append(names, FiguresDir)
	}
	if err := st.Commit(names, opt.Force); err != nil {
		return nil, err
	}
	var out []string
	for _, n := range names {
		if n != FiguresDir {
			out = append(out, filepath.Join(dir, n))
		}
	}
	return append(out, figs...), nil
}

func num(x float64) string {
	if x != x {
		return "NaN"
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}

// csvBytes: one row per run, the reference first (an ensemble view).
func csvBytes(res *Result) ([]byte, error) {
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	head := []string{"run", "role"}
	for _, s := range res.ReferenceScalars {
		head = append(head, fmt.Sprintf("%s [%s]", s.Name, s.Units), fmt.Sprintf("%s_%s [%s]", s.Name, vocab.Difference, s.Units))
	}
	for _, m := range mapNames {
		head = append(head, m.name+"_"+vocab.PatternCorrelation+" [1]", fmt.Sprintf("%s_%s [%s]", m.name, vocab.CentredRMSDifference, m.units), fmt.Sprintf("%s_%s [%s]", m.name, vocab.Bias, m.units))
	}
	for _, e := range res.ReferenceEstimates {
		u := e.Units
		head = append(head, fmt.Sprintf("%s [%s]", e.Name, u), fmt.Sprintf("%s_%s [%s]", e.Name, vocab.CILower, u), fmt.Sprintf("%s_%s [%s]", e.Name, vocab.CIUpper, u),
			fmt.Sprintf("%s_%s [%s]", e.Name, vocab.Difference, u), fmt.Sprintf("%s_%s [%s]", e.Name, vocab.CombinedHalfWidth, u), e.Name+"_"+vocab.Verdict)
	}
	w.Write(head)
	row := []string{res.Reference.Name, "reference"}
	for _, s := range res.ReferenceScalars {
		row = append(row, num(s.Cand), "0")
	}
	for range mapNames {
		row = append(row, "1", "0", "0")
	}
	for _, e := range res.ReferenceEstimates {
		row = append(row, num(e.Ref), num(e.RefCI.Lo), num(e.RefCI.Hi), "0", "", "")
	}
	w.Write(row)
	for _, c := range res.Candidates {
		row := []string{c.Name, "candidate"}
		for _, rs := range res.ReferenceScalars {
			s, ok := c.Scalar(rs.Name)
			if !ok {
				row = append(row, "", "")
				continue
			}
			row = append(row, num(s.Cand), num(s.Diff))
		}
		for _, m := range c.Maps {
			row = append(row, num(m.Corr), num(m.CRMS), num(m.Bias))
		}
		byName := map[string]Estimate{}
		for _, e := range c.Estimates {
			byName[e.Name] = e
		}
		for _, re := range res.ReferenceEstimates {
			e, ok := byName[re.Name]
			if !ok {
				row = append(row, "", "", "", "", "", "")
				continue
			}
			row = append(row, num(e.Cand), num(e.CandCI.Lo), num(e.CandCI.Hi), num(e.Diff), num(e.Combined), Verdict(e))
		}
		w.Write(row)
	}
	w.Flush()
	return buf.Bytes(), w.Error()
}

// Verdict is the verdict word of an estimate (package vocab): within,
// outside, or untested (no interval in one of the runs).
func Verdict(e Estimate) string {
	switch {
	case !e.Tested:
		return vocab.Untested
	case e.Within:
		return vocab.Within
	}
	return vocab.Outside
}

// flipsCSVBytes: comparison_flips.csv, one row per run, patch and SST
// perturbation (the reference's rows first): the changed fraction and its
// difference from the reference.
func flipsCSVBytes(res *Result) ([]byte, error) {
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	w.Write([]string{"run", "role", "patch", "sst_perturbation [K]", "changed [1]", "changed_difference [1]"})
	if res.Reference.Relations != nil {
		for _, p := range res.Reference.Relations.Flips {
			for _, r := range p.Rows {
				w.Write([]string{res.Reference.Name, "reference", p.Patch.Name, num(r.DeltaT), num(r.Changed), "0"})
			}
		}
	}
	for _, c := range res.Candidates {
		for _, f := range c.Flips {
			w.Write([]string{c.Name, "candidate", f.Patch, num(f.DeltaT), num(f.CandChanged), num(f.DiffChanged)})
		}
	}
	w.Flush()
	return buf.Bytes(), w.Error()
}

// jnum is the JSON number with units every lidscope JSON file uses (NaN
// and ±Inf as null).
type jnum = jsonnum.Num

func jv(x float64, u string) jnum { return jsonnum.Num{Value: x, Units: u} }

func jsonBytes(res *Result, opt WriteOptions) ([]byte, error) {
	type jscalar struct {
		Reference  jnum `json:"reference"`
		Candidate  jnum `json:"candidate"`
		Difference jnum `json:"difference"`
	}
	type jmap struct {
		Cells             int    `json:"cells"`
		PatternCorr       jnum   `json:"pattern_correlation"`
		CentredRMS        jnum   `json:"centred_rms_difference"`
		Bias              jnum   `json:"bias"`
		ReferenceMean     jnum   `json:"reference_mean"`
		CandidateMean     jnum   `json:"candidate_mean"`
		ReferenceStd      jnum   `json:"reference_std"`
		CandidateStd      jnum   `json:"candidate_std"`
		WeightingAndCells string `json:"weighting"`
	}
	type jci struct {
		Lower jnum `json:"lower"`
		Upper jnum `json:"upper"`
	}
	ci := func(iv relations.Interval, u string) jci { return jci{jv(iv.Lo, u), jv(iv.Hi, u)} }
	type jest struct {
		Kind        string `json:"kind"`
		Description string `json:"description"`
		Reference   jnum   `json:"reference"`
		ReferenceCI jci    `json:"reference_ci"`
		Candidate   jnum   `json:"candidate"`
		CandidateCI jci    `json:"candidate_ci"`
		Difference  jnum   `json:"difference"`
		Combined    jnum   `json:"combined_half_width"`
		Verdict     string `json:"verdict"`
	}
	type jflip struct {
		Patch          string `json:"patch"`
		DeltaT         jnum   `json:"sst_perturbation"`
		Reference      jnum   `json:"reference_changed"`
		Candidate      jnum   `json:"candidate_changed"`
		Difference     jnum   `json:"changed_difference"`
		RefConvChange  jnum   `json:"reference_convective_change"`
		CandConvChange jnum   `json:"candidate_convective_change"`
		DiffConvChange jnum   `json:"convective_change_difference"`
	}
	type jcand struct {
		Name          string             `json:"name"`
		Dir           string             `json:"dir"`
		Scalars       map[string]jscalar `json:"scalars"`
		Maps          map[string]jmap    `json:"maps"`
		Sensitivities map[string]jest    `json:"sensitivities"`
		Thresholds    map[string]jest    `json:"thresholds"`
		Flips         []jflip            `json:"flips"`
		Notes         []string           `json:"notes"`
	}
	doc := struct {
		Format     string          `json:"format"`
		Version    string          `json:"lidscope_version"`
		Reference  map[string]any  `json:"reference"`
		Candidates []jcand         `json:"candidates"`
		Mismatches []string        `json:"mismatches"`
		Scalars    map[string]jnum `json:"reference_scalars"`
		Estimates  map[string]any  `json:"reference_estimates"`
		Method     string          `json:"difference_uncertainty_method"`
	}{Format: jsonFormat, Version: opt.Version, Mismatches: res.Mismatches, Scalars: map[string]jnum{},
		Estimates: map[string]any{}, Method: CombinedMethod}
	if doc.Mismatches == nil {
		doc.Mismatches = []string{}
	}
	m := res.Reference.Meta
	doc.Reference = map[string]any{"name": res.Reference.Name, "dir": res.Reference.Dir, "period": m.Period,
		"regime_definition": m.Regimes.String(), vocab.Conventions: m.MetricsConventions, vocab.StudyHash: m.StudyHash}
	for _, s := range res.ReferenceScalars {
		doc.Scalars[s.Name] = jv(s.Cand, s.Units)
	}
	for _, e := range res.ReferenceEstimates {
		doc.Estimates[e.Name] = map[string]any{"kind": e.Kind, "description": e.Description, "value": jv(e.Ref, e.Units), "ci": ci(e.RefCI, e.Units)}
	}
	if rel := res.Reference.Relations; rel != nil {
		doc.Reference[vocab.RelationshipsMode] = rel.Mode.String()
		doc.Reference[vocab.Relationships+"_config"] = rel.Config
	}
	for _, c := range res.Candidates {
		jc := jcand{Name: c.Name, Dir: c.Dir, Scalars: map[string]jscalar{}, Maps: map[string]jmap{},
			Sensitivities: map[string]jest{}, Thresholds: map[string]jest{}, Flips: []jflip{}, Notes: append([]string{}, c.Notes...)}
		for _, e := range c.Estimates {
			je := jest{Kind: e.Kind, Description: e.Description, Reference: jv(e.Ref, e.Units), ReferenceCI: ci(e.RefCI, e.Units),
				Candidate: jv(e.Cand, e.Units), CandidateCI: ci(e.CandCI, e.Units), Difference: jv(e.Diff, e.Units), Combined: jv(e.Combined, e.Units)}
			je.Verdict = Verdict(e)
			if e.Kind == "threshold" {
				jc.Thresholds[e.Name] = je
			} else {
				jc.Sensitivities[e.Name] = je
			}
		}
		for _, f := range c.Flips {
			jc.Flips = append(jc.Flips, jflip{f.Patch, jv(f.DeltaT, "K"), jv(f.RefChanged, "1"), jv(f.CandChanged, "1"), jv(f.DiffChanged, "1"),
				jv(f.RefConvChange, "1"), jv(f.CandConvChange, "1"), jv(f.DiffConvChange, "1")})
		}
		for _, s := range c.Scalars {
			jc.Scalars[s.Name] = jscalar{jv(s.Ref, s.Units), jv(s.Cand, s.Units), jv(s.Diff, s.Units)}
		}
		for _, mp := range c.Maps {
			jc.Maps[mp.Name] = jmap{mp.N, jv(mp.Corr, "1"), jv(mp.CRMS, mp.Units), jv(mp.Bias, mp.Units),
				jv(mp.RefMean, mp.Units), jv(mp.CandMean, mp.Units), jv(mp.RefStd, mp.Units), jv(mp.CandStd, mp.Units),
				"ocean cells of the tropical band valid in both runs, weighted by cell area inside the band; centred RMS difference as Taylor (2001, eq. 2)"}
		}
		doc.Candidates = append(doc.Candidates, jc)
	}
	return json.MarshalIndent(doc, "", "  ")
}

func writeMaps(path string, res *Result, opt WriteOptions) error {
	l := res.Reference.Acc.L
	w, err := cfwrite.Create(path, cfwrite.Options{
		Title:     fmt.Sprintf("lidscope comparison with reference %s: difference maps (candidate − reference)", res.Reference.Name),
		Source:    "lidscope " + opt.Version,
		Command:   opt.Command,
		Overwrite: opt.Force,
		Attributes: map[string]any{
			"reference":         res.Reference.Name,
			"regime_definition": res.Reference.Meta.Regimes.String(),
			vocab.Conventions:   res.Reference.Meta.MetricsConventions,
			"period":            res.Reference.Meta.Period,
		},
	})
	if err != nil {
		return err
	}
	defer w.Abort()
	g := res.Reference.Meta.Grid
	cg := cfwrite.Grid{Lat: l.Lat, Lon: l.Lon}
	if g != nil && len(g.Lat) == len(l.Lat) && len(g.Lon) == len(l.Lon) {
		cg.LatBounds, cg.LonBounds = g.LatBounds, g.LonBounds
	}
	if err := w.SetGrid(cg); err != nil {
		return err
	}
	var meanings []string
	for _, c := range res.Candidates {
		meanings = append(meanings, c.Name)
	}
	if err := w.AddCategories(cfwrite.Categories{Name: "candidate", LongName: "candidate run", Meanings: meanings}); err != nil {
		return err
	}
	vars := make([]*cfwrite.Var, len(mapNames))
	for k, mn := range mapNames {
		v, err := w.AddVar(cfwrite.VarSpec{Name: mn.name + "_" + vocab.Difference, Dims: []string{"candidate", cfwrite.DimLat, cfwrite.DimLon},
			Units: mn.units, LongName: fmt.Sprintf("%s of the candidate minus that of the reference (%s)", mn.name, res.Reference.Name)})
		if err != nil {
			return err
		}
		vars[k] = v
	}
	for k, mn := range mapNames {
		var all []float64
		for _, c := range res.Candidates {
			all = append(all, c.Diff[mn.name]...)
		}
		if err := vars[k].Write(all); err != nil {
			return err
		}
	}
	return w.Close()
}
