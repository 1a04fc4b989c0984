package figures

import (
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"

	"lidscope/regimes"
	"lidscope/relations"
)

// jv is a number of relationships.json: {"value": x or null, "units": u}.
type jv struct {
	Value *float64 `json:"value"`
	Units string   `json:"units"`
}

func (v jv) f() float64 {
	if v.Value == nil {
		return math.NaN()
	}
	return *v.Value
}

func (v jv) i() int64 {
	if v.Value == nil {
		return 0
	}
	return int64(math.Round(*v.Value))
}

type jci struct {
	Lo jv `json:"lower"`
	Hi jv `json:"upper"`
}

func (c jci) iv() relations.Interval { return relations.Interval{Lo: c.Lo.f(), Hi: c.Hi.f()} }

// relationsJSON is the part of relationships.json (relations/doc.go,
// format "lidscope-relationships", version 1) the figures use.
type relationsJSON struct {
	Format           string `json:"format"`
	FormatVersion    int    `json:"format_version"`
	Mode             string `json:"mode"`
	ModeDescription  string `json:"mode_description"`
	Detrended        bool   `json:"detrended"`
	RegimeDefinition string `json:"regime_definition"`
	Responses        []struct {
		Name  string `json:"name"`
		Units string `json:"units"`
	} `json:"responses"`
	Binned []struct {
		Domain, Season, Regime, Predictor, Response string
		OutOfRange                                  jv `json:"out_of_range"`
		Bins                                        []struct {
			Lower, Upper, Mean, Std, Stderr, N, Steps, Area jv
			NEff                                            jv `json:"n_eff"`
		} `json:"bins"`
	} `json:"binned"`
	Joint []struct {
		Domain, Season, Response string
		RelEdges                 []float64 `json:"rel_sst_edges"`
		EISEdges                 []float64 `json:"eis_edges"`
		Mean, Frequency, Count   []jv
	} `json:"joint_composites"`
	Regressions []struct {
		Domain, Season, Regime, Response, Predictor string
		N, Steps, Area, Slope, Intercept            jv
		SlopeSE                                     jv  `json:"slope_se"`
		SlopeCI                                     jci `json:"slope_ci"`
		InterceptSE                                 jv  `json:"intercept_se"`
		InterceptCI                                 jci `json:"intercept_ci"`
		R                                           jv  `json:"r"`
		NEffSlope                                   jv  `json:"n_eff_slope"`
		NEffCorr                                    jv  `json:"n_eff_corr"`
		Note                                        string
	} `json:"regressions"`
	Flips []struct {
		Patch string `json:"patch"`
		Box   struct {
			South, North, West, East jv
		} `json:"box"`
		Cells, Steps jv
		Share        struct{ Mean, Min, Max jv } `json:"band_share_f"`
		Rows         []struct {
			DeltaT jv `json:"delta_t"`
			In     struct {
				Changed          jv
				ToConvective     jv `json:"to_convective"`
				FromConvective   jv `json:"from_convective"`
				ConvectiveBefore jv `json:"convective_before"`
				ConvectiveAfter  jv `json:"convective_after"`
			} `json:"inside"`
			Out struct {
				Changed          jv
				ToConvective     jv `json:"to_convective"`
				FromConvective   jv `json:"from_convective"`
				ConvectiveBefore jv `json:"convective_before"`
				ConvectiveAfter  jv `json:"convective_after"`
			} `json:"outside"`
		} `json:"rows"`
	} `json:"flips"`
	Threshold *struct {
		Indicator, Condition string
		N                    jv
		Logistic             struct{ Intercept, Slope jv } `json:"logistic"`
		Relative             jv                            `json:"relative"`
		RelativeCI           jci                           `json:"relative_ci"`
		Absolute             jv                            `json:"absolute"`
		AbsoluteCI           jci                           `json:"absolute_ci"`
		TropicalMean         jv                            `json:"tropical_mean_sst"`
		Replicates           jv                            `json:"replicates"`
		Note                 string
	} `json:"threshold"`
}

func parseRegime(s string) (regimes.Regime, error) {
	for _, r := range []regimes.Regime{regimes.Convective, regimes.Transition, regimes.Subsidence} {
		if r.String() == s {
			return r, nil
		}
	}
	return regimes.Missing, fmt.Errorf("unknown regime %q", s)
}

// ReadRelations reads a run's relationships.json (written by
// relations.Write) into the results the relationship figures draw. It
// returns (nil, nil) when the run has no such file.
func ReadRelations(runDir string) (*relations.Results, error) {
	p := filepath.Join(runDir, relations.RelationshipsJSON)
	b, err := os.ReadFile(p)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, nil
	}
	if err != nil {
		return nil, fmt.Errorf("figures: %w", err)
	}
	var j relationsJSON
	if err := json.Unmarshal(b, &j); err != nil {
		return nil, fmt.Errorf("figures: %s is not valid JSON: %w", p, err)
	}
	if j.Format != "lidscope-relationships" || j.FormatVersion != 1 {
		return nil, fmt.Errorf("figures: %s has format %q version %d; this lidscope reads \"lidscope-relationships\" version 1", p, j.Format, j.FormatVersion)
	}
	bad := func(what string, err error) error {
		return fmt.Errorf("figures: %s: %s: %w", p, what, err)
	}
	mode, err := relations.ParseMode(j.Mode)
	if err != nil {
		return nil, bad("mode", err)
	}
	r := &relations.Results{Mode: mode, Detrended: j.Detrended, ModeNote: j.ModeDescription, RegimeDefinition: j.RegimeDefinition}
	for _, v := range j.Responses {
		r.Responses = append(r.Responses, relations.Variable{Name: v.Name, Units: v.Units})
	}
	for k, jb := range j.Binned {
		reg, err := parseRegime(jb.Regime)
		if err != nil {
			return nil, bad(fmt.Sprintf("binned[%d]", k), err)
		}
		bn := relations.Binned{Domain: jb.Domain, Season: jb.Season, Regime: reg, Predictor: jb.Predictor, Response: jb.Response, OutOfRange: jb.OutOfRange.i()}
		for _, s := range jb.Bins {
			bn.Bins = append(bn.Bins, relations.BinStat{Lower: s.Lower.f(), Upper: s.Upper.f(), N: s.N.i(), Steps: int(s.Steps.i()),
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
		jt := relations.Joint{Domain: jj.Domain, Season: jj.Season, Response: jj.Response, RelEdges: jj.RelEdges, EISEdge: jj.EISEdges}
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
		reg, err := parseRegime(g.Regime)
		if err != nil {
			return nil, bad(fmt.Sprintf("regressions[%d]", k), err)
		}
		r.Regressions = append(r.Regressions, relations.Regression{Domain: g.Domain, Season: g.Season, Regime: reg,
			Response: g.Response, Predictor: g.Predictor, SlopeUnits: g.Slope.Units, Units: g.Intercept.Units,
			N: g.N.i(), Steps: int(g.Steps.i()), Area: g.Area.f(), Slope: g.Slope.f(), SlopeSE: g.SlopeSE.f(), SlopeCI: g.SlopeCI.iv(),
			Intercept: g.Intercept.f(), InterceptSE: g.InterceptSE.f(), InterceptCI: g.InterceptCI.iv(), R: g.R.f(),
			NEffSlope: g.NEffSlope.f(), NEffCorr: g.NEffCorr.f(), Note: g.Note})
	}
	for _, fl := range j.Flips {
		pf := relations.PatchFlips{Patch: relations.Patch{Name: fl.Patch, South: fl.Box.South.f(), North: fl.Box.North.f(), West: fl.Box.West.f(), East: fl.Box.East.f()},
			Cells: int(fl.Cells.i()), Steps: int(fl.Steps.i()), FMean: fl.Share.Mean.f(), FMin: fl.Share.Min.f(), FMax: fl.Share.Max.f()}
		for _, x := range fl.Rows {
			pf.Rows = append(pf.Rows, relations.FlipRow{DeltaT: x.DeltaT.f(),
				Changed: x.In.Changed.f(), ToConvective: x.In.ToConvective.f(), FromConvective: x.In.FromConvective.f(),
				ConvectiveBefore: x.In.ConvectiveBefore.f(), ConvectiveAfter: x.In.ConvectiveAfter.f(),
				OutChanged: x.Out.Changed.f(), OutToConvective: x.Out.ToConvective.f(), OutFromConvective: x.Out.FromConvective.f(),
				OutConvectiveBefore: x.Out.ConvectiveBefore.f(), OutConvectiveAfter: x.Out.ConvectiveAfter.f()})
		}
		r.Flips = append(r.Flips, pf)
	}
	if t := j.Threshold; t != nil {
		r.Threshold = &relations.Threshold{Indicator: t.Indicator, Condition: t.Condition, N: t.N.i(),
			B0: t.Logistic.Intercept.f(), B1: t.Logistic.Slope.f(), Rel: t.Relative.f(), RelCI: t.RelativeCI.iv(),
			Abs: t.Absolute.f(), AbsCI: t.AbsoluteCI.iv(), TropicalMean: t.TropicalMean.f(), Replicates: int(t.Replicates.i()), Note: t.Note}
	}
	return r, nil
}
