package compare

import (
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sort"

	"lidscope/internal/jsonnum"
	"lidscope/relations"
	"lidscope/vocab"
)

// jsonFormat tags comparison.json; Read refuses other tags. Version 4
// names the reference's metrics conventions "conventions" (version 3:
// metrics_conventions), as the study and every run output do.
const jsonFormat = "lidscope-comparison/4"

// ErrNotComparison is wrapped by Read's error for a folder that holds no
// comparison.json.
var ErrNotComparison = errors.New("not a comparison folder")

// Read reads a comparison back from its folder (comparison.json, as Write
// wrote it), so that its figures can be drawn again without the runs being
// compared anew. The result has what the figures need: the reference's
// name, folder, period, study hash and regime definition (RegimeText), its
// scalars and estimates, and per candidate its name, folder, scalars, map
// statistics, estimates and notes; the accumulators, the relationship
// results and the difference maps are not read (Run.Acc and
// Run.Relations are nil, Candidate.Diff empty). Estimates come in the
// order of the comparison (slopes, partial sensitivities, each by name,
// then the relative and the absolute threshold); scalars
// and map statistics by name.
func Read(dir string) (*Result, error) {
	p := filepath.Join(dir, JSONFile)
	b, err := os.ReadFile(p)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, fmt.Errorf("%s has no %s: %w (lidscope compare writes one)", dir, JSONFile, ErrNotComparison)
	}
	if err != nil {
		return nil, err
	}
	var doc struct {
		Format    string `json:"format"`
		Version   string `json:"lidscope_version"`
		Reference struct {
			Name      string `json:"name"`
			Dir       string `json:"dir"`
			Period    string `json:"period"`
			Regimes   string `json:"regime_definition"`
			Metrics   string `json:"conventions"`
			StudyHash string `json:"study_hash"`
		} `json:"reference"`
		Candidates []struct {
			Name    string `json:"name"`
			Dir     string `json:"dir"`
			Scalars map[string]struct {
				Reference, Candidate, Difference jsonnum.Num
			} `json:"scalars"`
			Maps map[string]struct {
				Cells         int         `json:"cells"`
				PatternCorr   jsonnum.Num `json:"pattern_correlation"`
				CentredRMS    jsonnum.Num `json:"centred_rms_difference"`
				Bias          jsonnum.Num `json:"bias"`
				ReferenceMean jsonnum.Num `json:"reference_mean"`
				CandidateMean jsonnum.Num `json:"candidate_mean"`
				ReferenceStd  jsonnum.Num `json:"reference_std"`
				CandidateStd  jsonnum.Num `json:"candidate_std"`
			} `json:"maps"`
			Sensitivities map[string]readEstimate `json:"sensitivities"`
			Thresholds    map[string]readEstimate `json:"thresholds"`
			Notes         []string                `json:"notes"`
		} `json:"candidates"`
		Mismatches []string               `json:"mismatches"`
		Scalars    map[string]jsonnum.Num `json:"reference_scalars"`
		Estimates  map[string]struct {
			Kind        string      `json:"kind"`
			Description string      `json:"description"`
			Value       jsonnum.Num `json:"value"`
			CI          readCI      `json:"ci"`
		} `json:"reference_estimates"`
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		return nil, fmt.Errorf("%s: %w; write the comparison again (lidscope compare)", p, err)
	}
	if doc.Format != jsonFormat {
		return nil, fmt.Errorf("%s is format %q, this lidscope reads %q; write the comparison again with this version (lidscope compare)", p, doc.Format, jsonFormat)
	}
	res := &Result{Mismatches: doc.Mismatches, Version: doc.Version, RegimeText: doc.Reference.Regimes}
	res.Reference.Name, res.Reference.Dir = doc.Reference.Name, doc.Reference.Dir
	m := &res.Reference.Meta
	m.Dataset, m.Period, m.StudyHash, m.MetricsConventions, m.Version = doc.Reference.Name, doc.Reference.Period, doc.Reference.StudyHash, doc.Reference.Metrics, doc.Version
	for _, n := range sortedKeys(doc.Scalars) {
		s := doc.Scalars[n]
		res.ReferenceScalars = append(res.ReferenceScalars, Scalar{Name: n, Units: s.Units, Ref: s.Value, Cand: s.Value})
	}
	for n, e := range doc.Estimates {
		res.ReferenceEstimates = append(res.ReferenceEstimates, Estimate{Name: n, Kind: e.Kind, Description: e.Description, Units: e.Value.Units,
			Ref: e.Value.Value, RefCI: e.CI.interval(), Cand: e.Value.Value, CandCI: e.CI.interval()})
	}
	sortEstimates(res.ReferenceEstimates)
	for _, jc := range doc.Candidates {
		c := Candidate{Name: jc.Name, Dir: jc.Dir, Notes: jc.Notes}
		for _, n := range sortedKeys(jc.Scalars) {
			s := jc.Scalars[n]
			c.Scalars = append(c.Scalars, Scalar{Name: n, Units: s.Candidate.Units, Ref: s.Reference.Value, Cand: s.Candidate.Value, Diff: s.Difference.Value})
		}
		for _, n := range sortedKeys(jc.Maps) {
			x := jc.Maps[n]
			c.Maps = append(c.Maps, MapStat{Name: n, Units: x.Bias.Units, N: x.Cells, Corr: x.PatternCorr.Value, CRMS: x.CentredRMS.Value, Bias: x.Bias.Value,
				RefMean: x.ReferenceMean.Value, CandMean: x.CandidateMean.Value, RefStd: x.ReferenceStd.Value, CandStd: x.CandidateStd.Value})
		}
		for _, set := range []map[string]readEstimate{jc.Sensitivities, jc.Thresholds} {
			for n, e := range set {
				c.Estimates = append(c.Estimates, e.estimate(n))
			}
		}
		sortEstimates(c.Estimates)
		res.Candidates = append(res.Candidates, c)
	}
	return res, nil
}

type readCI struct {
	Lower jsonnum.Num `json:"lower"`
	Upper jsonnum.Num `json:"upper"`
}

func (c readCI) interval() relations.Interval {
	return relations.Interval{Lo: c.Lower.Value, Hi: c.Upper.Value}
}

// readEstimate is a candidate's estimate as comparison.json holds it.
type readEstimate struct {
	Kind        string      `json:"kind"`
	Description string      `json:"description"`
	Reference   jsonnum.Num `json:"reference"`
	ReferenceCI readCI      `json:"reference_ci"`
	Candidate   jsonnum.Num `json:"candidate"`
	CandidateCI readCI      `json:"candidate_ci"`
	Difference  jsonnum.Num `json:"difference"`
	Combined    jsonnum.Num `json:"combined_half_width"`
	Verdict     string      `json:"verdict"`
}

func (e readEstimate) estimate(name string) Estimate {
	x := Estimate{Name: name, Kind: e.Kind, Description: e.Description, Units: e.Candidate.Units,
		Ref: e.Reference.Value, RefCI: e.ReferenceCI.interval(), Cand: e.Candidate.Value, CandCI: e.CandidateCI.interval(),
		Diff: e.Difference.Value, Combined: e.Combined.Value}
	x.Tested = e.Verdict == vocab.Within || e.Verdict == vocab.Outside
	x.Within = e.Verdict == vocab.Within
	return x
}

// kindOrder is the order of estimate kinds in a comparison (ownEstimates).
var kindOrder = map[string]int{"slope": 0, "partial": 1, "threshold": 2}

func sortEstimates(es []Estimate) {
	sort.SliceStable(es, func(i, j int) bool {
		if a, b := kindOrder[es[i].Kind], kindOrder[es[j].Kind]; a != b {
			return a < b
		}
		if es[i].Kind == "threshold" { // the relative threshold first, as ownEstimates
			return es[i].Name > es[j].Name
		}
		return es[i].Name < es[j].Name
	})
}

func sortedKeys[V any](m map[string]V) []string {
	out := make([]string, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}
