package relations

import (
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"

	"lidscope/internal/jsonnum"
	"lidscope/regimes"
)

// rjv is a number of relationships.json ({"value": x or null, "units": u},
// read by package jsonnum; null reads as NaN).
type rjv struct{ jsonnum.Num }

func (v rjv) f() float64 { return v.Value }

// i is the value as a count (0 when null).
func (v rjv) i() int64 {
	if v.Value != v.Value {
		return 0
	}
	return int64(math.Round(v.Value))
}

type rjci struct {
	Lo rjv `json:"lower"`
	Hi rjv `json:"upper"`
}

func (c rjci) iv() Interval { return Interval{Lo: c.Lo.f(), Hi: c.Hi.f()} }

// readDoc is the part of relationships.json (relations/doc.go,
// format "lidscope-relationships", version 3) that ReadResults restores.
// FormatVersion is the format_version of relationships.json. Version 2
// names the study (study_hash) where version 1 used an earlier word;
// version 3 uses the one table of names (package vocab).
const FormatVersion = 3

type readDoc struct {
	Format           string `json:"format"`
	FormatVersion    int    `json:"format_version"`
	Mode             string `json:"relationships_mode"`
	ModeDescription  string `json:"relationships_mode_description"`
	Detrended        bool   `json:"detrended"`
	RegimeDefinition string `json:"regime_definition"`
	Config           string `json:"relationships_config"`
	Uncertainty      string `json:"uncertainty_method"`
	Responses        []struct {
		Name  string `json:"name"`
		Units string `json:"units"`
	} `json:"responses"`
	Binned []struct {
		Domain, Season, Regime, Predictor, Response string
		OutOfRange                                  rjv `json:"out_of_range"`
		Bins                                        []struct {
			Lower, Upper, Mean, Std, Stderr, Area rjv
			N                                     rjv `json:"count"`
			Steps                                 rjv `json:"time_steps"`
			NEff                                  rjv `json:"n_eff"`
		} `json:"bins"`
	} `json:"binned"`
	Joint []struct {
		Domain, Season, Response string
		RelEdges                 []float64 `json:"rel_sst_edges"`
		EISEdges                 []float64 `json:"eis_edges"`
		Mean, Frequency, Count   []rjv
	} `json:"joint_composites"`
	Regressions []struct {
		Domain, Season, Regime, Response, Predictor string
		Area, Slope, Intercept                      rjv
		N                                           rjv  `json:"count"`
		Steps                                       rjv  `json:"time_steps"`
		SlopeSE                                     rjv  `json:"slope_stderr"`
		SlopeCI                                     rjci `json:"slope_ci"`
		InterceptSE                                 rjv  `json:"intercept_stderr"`
		InterceptCI                                 rjci `json:"intercept_ci"`
		R                                           rjv  `json:"r"`
		RCI                                         rjci `json:"r_ci"`
		NEffSlope                                   rjv  `json:"slope_n_eff"`
		NEffCorr                                    rjv  `json:"r_n_eff"`
		Note                                        string
	} `json:"regressions"`
	Partials []struct {
		Domain, Season, Regime, Response string
		Area, Intercept, R2              rjv
		N                                rjv `json:"count"`
		Steps                            rjv `json:"time_steps"`
		NEff                             rjv `json:"n_eff"`
		Coefficients                     []struct {
			Predictor, Controls string
			Coefficient         rjv
			SE                  rjv  `json:"stderr"`
			CI                  rjci `json:"ci"`
		} `json:"coefficients"`
		Note string
	} `json:"partial_regressions"`
	Flips []struct {
		Patch string `json:"patch"`
		Box   struct {
			South, North, West, East rjv
		} `json:"box"`
		Cells rjv
		Steps rjv                          `json:"time_steps"`
		Share struct{ Mean, Min, Max rjv } `json:"patch_area_fraction"`
		Rows  []struct {
			DeltaT rjv `json:"sst_perturbation"`
			In     struct {
				Changed          rjv
				ToConvective     rjv `json:"to_convective"`
				FromConvective   rjv `json:"from_convective"`
				ConvectiveBefore rjv `json:"convective_before"`
				ConvectiveAfter  rjv `json:"convective_after"`
			} `json:"inside"`
			Out struct {
				Changed          rjv
				ToConvective     rjv `json:"to_convective"`
				FromConvective   rjv `json:"from_convective"`
				ConvectiveBefore rjv `json:"convective_before"`
				ConvectiveAfter  rjv `json:"convective_after"`
			} `json:"outside"`
		} `json:"rows"`
	} `json:"flips"`
	Threshold *struct {
		Indicator, Condition string
		N                    rjv                            `json:"count"`
		Logistic             struct{ Intercept, Slope rjv } `json:"logistic"`
		Relative             rjv                            `json:"relative"`
		RelativeCI           rjci                           `json:"relative_ci"`
		Absolute             rjv                            `json:"absolute"`
		AbsoluteCI           rjci                           `json:"absolute_ci"`
		TropicalMean         rjv                            `json:"tropical_mean_sst"`
		Replicates           rjv                            `json:"bootstrap_replicates"`
		Note                 string
	} `json:"threshold"`
}

func parseRegimeName(s string) (regimes.Regime, error) {
	for _, r := range []regimes.Regime{regimes.Convective, regimes.Transition, regimes.Subsidence} {
		if r.String() == s {
			return r, nil
		}
	}
	return regimes.Missing, fmt.Errorf("unknown regime %q", s)
}

// ReadResults reads a run's relationships.json (written by Write, format
// "lidscope-relationships" version FormatVersion) from dir back into
// Results; an earlier version is refused with a request to re-run. It
// restores the mode, configuration text, regime definition and
// uncertainty method, the binned tables, joint composites, regressions, two-predictor partial
// regressions, flips and threshold. It returns (nil, nil) when dir has no
// such file (a merged run, or one made before relationships existed).
func ReadResults(runDir string) (*Results, error) {
	p := filepath.Join(runDir, RelationshipsJSON)
	b, err := os.ReadFile(p)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, nil
	}
	if err != nil {
		return nil, fmt.Errorf("relations: %w", err)
	}
	var j readDoc
	if err := json.Unmarshal(b, &j); err != nil {
		return nil, fmt.Errorf("relations: %s is not valid JSON: %w", p, err)
	}
	if j.Format != "lidscope-relationships" {
		return nil, fmt.Errorf("relations: %s has format %q; this lidscope reads \"lidscope-relationships\" version %d", p, j.Format, FormatVersion)
	}
	if j.FormatVersion != FormatVersion {
		return nil, fmt.Errorf("relations: %s has format version %d; this lidscope reads version %d (earlier versions use names since renamed: see the README's changes): re-run the analysis of %s with this version", p, j.FormatVersion, FormatVersion, runDir)
	}
	bad := func(what string, err error) error {
		return fmt.Errorf("relations: %s: %s: %w", p, what, err)
	}
	mode, err := ParseMode(j.Mode)
	if err != nil {
		return nil, bad("mode", err)
	}
	r := &Results{Mode: mode, Detrended: j.Detrended, ModeNote: j.ModeDescription, RegimeDefinition: j.RegimeDefinition,
		Config: j.Config, Uncertainty: j.Uncertainty}
	for _, v := range j.Responses {
		r.Responses = append(r.Responses, Variable{Name: v.Name, Units: v.Units})
	}
	for k, jb := range j.Binned {
		reg, err := parseRegimeName(jb.Regime)
		if err != nil {
			return nil, bad(fmt.Sprintf("binned[%d]", k), err)
		}
		bn := Binned{Domain: jb.Domain, Season: jb.Season, Regime: reg, Predictor: jb.Predictor, Response: jb.Response, OutOfRange: jb.OutOfRange.i()}
		for _, s := range jb.Bins {
			bn.Bins = append(bn.Bins, BinStat{Lower: s.Lower.f(), Upper: s.Upper.f(), N: s.N.i(), Steps: int(s.Steps.i()),
				Area: s.Area.f(), Mean: s.Mean.f(), Std: s.Std.f(), NEff: s.NEff.f(), StdErr: s.Stderr.f()})
			bn.PredUnits, bn.RespUnits = s.Lower.Units, s.Mean.Units
		}
		r.Binned = append(r.Binned, bn)
	}
	for k, jj := range j.Joint {
		n := (len(jj.RelEdges) - 1) * (len(jj.EISEdges) - 1)
		if len(jj.RelEdges) < 2 || len(jj.EISEdges) < 2 || len(jj.Mean) != n || len(jj.Frequency) != n || len(jj.Count) != n {
			return nil, bad(fmt.Sprintf("joint_composites[%d]", k), fmt.Errorf("%d×%d bins but %d means, %d frequencies, %d counts",
				len(jj.RelEdges)-1, len(jj.EISEdges)-1, len(jj.Mean), len(jj.Frequency), len(jj.Count)))
		}
		jt := Joint{Domain: jj.Domain, Season: jj.Season, Response: jj.Response, RelEdges: jj.RelEdges, EISEdge: jj.EISEdges}
		for i := 0; i < n; i++ {
			jt.Mean = append(jt.Mean, jj.Mean[i].f())
			jt.Frequency = append(jt.Frequency, jj.Frequency[i].f())
			jt.Count = append(jt.Count, jj.Count[i].i())
			if jj.Mean[i].Units != "" {
				jt.Units = jj.Mean[i].Units
			}
		}
		r.Joint = append(r.Joint, jt)
	}
	for k, g := range j.Regressions {
		reg, err := parseRegimeName(g.Regime)
		if err != nil {
			return nil, bad(fmt.Sprintf("regressions[%d]", k), err)
		}
		r.Regressions = append(r.Regressions, Regression{Domain: g.Domain, Season: g.Season, Regime: reg,
			Response: g.Response, Predictor: g.Predictor, SlopeUnits: g.Slope.Units, Units: g.Intercept.Units,
			N: g.N.i(), Steps: int(g.Steps.i()), Area: g.Area.f(), Slope: g.Slope.f(), SlopeSE: g.SlopeSE.f(), SlopeCI: g.SlopeCI.iv(),
			Intercept: g.Intercept.f(), InterceptSE: g.InterceptSE.f(), InterceptCI: g.InterceptCI.iv(), R: g.R.f(), RCI: g.RCI.iv(),
			NEffSlope: g.NEffSlope.f(), NEffCorr: g.NEffCorr.f(), Note: g.Note})
	}
	for k, g := range j.Partials {
		reg, err := parseRegimeName(g.Regime)
		if err != nil {
			return nil, bad(fmt.Sprintf("partial_regressions[%d]", k), err)
		}
		if len(g.Coefficients) != 2 {
			return nil, bad(fmt.Sprintf("partial_regressions[%d]", k), fmt.Errorf("%d coefficients, want 2 (a two-predictor fit)", len(g.Coefficients)))
		}
		pt := Partial{Domain: g.Domain, Season: g.Season, Regime: reg, Response: g.Response, Units: g.Intercept.Units,
			N: g.N.i(), Steps: int(g.Steps.i()), Area: g.Area.f(), Intercept: g.Intercept.f(), R2: g.R2.f(), NEff: g.NEff.f(), Note: g.Note}
		for c, co := range g.Coefficients {
			pt.Predictors[c] = co.Predictor
			pt.Coef[c], pt.SE[c], pt.CI[c] = co.Coefficient.f(), co.SE.f(), co.CI.iv()
			pt.CoefUnits = co.Coefficient.Units
		}
		r.Partials = append(r.Partials, pt)
	}
	for _, fl := range j.Flips {
		pf := PatchFlips{Patch: Patch{Name: fl.Patch, South: fl.Box.South.f(), North: fl.Box.North.f(), West: fl.Box.West.f(), East: fl.Box.East.f()},
			Cells: int(fl.Cells.i()), Steps: int(fl.Steps.i()), FMean: fl.Share.Mean.f(), FMin: fl.Share.Min.f(), FMax: fl.Share.Max.f()}
		for _, x := range fl.Rows {
			pf.Rows = append(pf.Rows, FlipRow{DeltaT: x.DeltaT.f(),
				Changed: x.In.Changed.f(), ToConvective: x.In.ToConvective.f(), FromConvective: x.In.FromConvective.f(),
				ConvectiveBefore: x.In.ConvectiveBefore.f(), ConvectiveAfter: x.In.ConvectiveAfter.f(),
				OutChanged: x.Out.Changed.f(), OutToConvective: x.Out.ToConvective.f(), OutFromConvective: x.Out.FromConvective.f(),
				OutConvectiveBefore: x.Out.ConvectiveBefore.f(), OutConvectiveAfter: x.Out.ConvectiveAfter.f()})
		}
		r.Flips = append(r.Flips, pf)
	}
	if t := j.Threshold; t != nil {
		r.Threshold = &Threshold{Indicator: t.Indicator, Condition: t.Condition, N: t.N.i(),
			B0: t.Logistic.Intercept.f(), B1: t.Logistic.Slope.f(), Rel: t.Relative.f(), RelCI: t.RelativeCI.iv(),
			Abs: t.Absolute.f(), AbsCI: t.AbsoluteCI.iv(), TropicalMean: t.TropicalMean.f(), Replicates: int(t.Replicates.i()), Note: t.Note}
	}
	return r, nil
}
