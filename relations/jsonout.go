package relations

import (
	"bytes"
	"encoding/json"
	"math"
	"strconv"
)

// num is a number with its units, written as {"value": x, "units": "K"}
// (the shape of package output's JSON files); NaN or ±Inf is "value": null.
type num struct {
	V float64
	U string
}

func (n num) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteString(`{"value":`)
	if math.IsNaN(n.V) || math.IsInf(n.V, 0) {
		b.WriteString("null")
	} else {
		b.WriteString(strconv.FormatFloat(n.V, 'g', -1, 64))
	}
	b.WriteString(`,"units":`)
	u, err := json.Marshal(n.U)
	if err != nil {
		return nil, err
	}
	b.Write(u)
	b.WriteByte('}')
	return b.Bytes(), nil
}

func cnt[T ~int | ~int32 | ~int64](n T) num { return num{float64(n), "1"} }

type jInterval struct {
	Lo num `json:"lower"`
	Hi num `json:"upper"`
}

func ji(i Interval, u string) jInterval { return jInterval{num{i.Lo, u}, num{i.Hi, u}} }

func marshalJSON(v any) ([]byte, error) {
	var b bytes.Buffer
	e := json.NewEncoder(&b)
	e.SetEscapeHTML(false)
	e.SetIndent("", "  ")
	if err := e.Encode(v); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

type jBox struct {
	South num `json:"south"`
	North num `json:"north"`
	West  num `json:"west"`
	East  num `json:"east"`
}

func box4(s, n, w, e float64) *jBox {
	return &jBox{num{s, "degrees_north"}, num{n, "degrees_north"}, num{w, "degrees_east"}, num{e, "degrees_east"}}
}

// jsonDoc builds relationships.json.
func jsonDoc(r *Results, meta Meta) map[string]any {
	doc := map[string]any{
		"format":              "lidscope-relationships",
		"format_version":      1,
		"dataset":             meta.Dataset,
		"title":               meta.Title,
		"lidscope_version":    meta.Version,
		"recipe_hash":         meta.RecipeHash,
		"mode":                r.Mode.String(),
		"mode_description":    r.ModeNote,
		"detrended":           r.Detrended,
		"regime_definition":   r.RegimeDefinition,
		"uncertainty_method":  r.Uncertainty,
		"config":              r.Config,
		"period":              map[string]any{"label": meta.Period, "first": r.First, "last": r.Last, "steps": cnt(r.Steps), "years": cnt(r.Years)},
		"netcdf_regime_index": regimeOrder(),
		"notes":               append([]string{}, r.Notes...),
	}
	var doms []map[string]any
	for _, d := range r.Domains {
		m := map[string]any{"name": d.Name, "band": d.Band}
		if !d.Band {
			m["box"] = box4(d.South, d.North, d.West, d.East)
		}
		doms = append(doms, m)
	}
	doc["domains"] = doms
	doc["seasons"] = r.Seasons
	var vars []map[string]any
	for _, p := range r.Predictors {
		e := make([]float64, len(p.Edges))
		copy(e, p.Edges)
		vars = append(vars, map[string]any{"name": p.Name, "units": p.Units, "bin_edges": e})
	}
	doc["predictors"] = vars
	var resp []map[string]any
	for _, v := range r.Responses {
		resp = append(resp, map[string]any{"name": v.Name, "units": v.Units})
	}
	doc["responses"] = resp

	binned := []map[string]any{}
	for _, b := range r.Binned {
		var bins []map[string]any
		for _, s := range b.Bins {
			bins = append(bins, map[string]any{"lower": num{s.Lower, b.PredUnits}, "upper": num{s.Upper, b.PredUnits},
				"mean": num{s.Mean, b.RespUnits}, "std": num{s.Std, b.RespUnits}, "stderr": num{s.StdErr, b.RespUnits},
				"n": cnt(s.N), "steps": cnt(s.Steps), "n_eff": num{s.NEff, "1"}, "area": num{s.Area, "m2"}})
		}
		binned = append(binned, map[string]any{"mode": r.Mode.String(), "domain": b.Domain, "season": b.Season, "regime": b.Regime.String(),
			"predictor": b.Predictor, "response": b.Response, "out_of_range": cnt(b.OutOfRange), "lag1_response": num{b.R1, "1"}, "bins": bins})
	}
	doc["binned"] = binned

	joint := []map[string]any{}
	for _, j := range r.Joint {
		mean := make([]num, len(j.Mean))
		freq := make([]num, len(j.Mean))
		count := make([]num, len(j.Mean))
		for k := range j.Mean {
			mean[k], freq[k], count[k] = num{j.Mean[k], j.Units}, num{j.Frequency[k], "1"}, cnt(j.Count[k])
		}
		joint = append(joint, map[string]any{"mode": r.Mode.String(), "domain": j.Domain, "season": j.Season, "response": j.Response,
			"rel_sst_edges": j.RelEdges, "eis_edges": j.EISEdge, "layout": "[rel_sst bin][eis bin], row-major",
			"mean": mean, "frequency": freq, "count": count})
	}
	doc["joint_composites"] = joint

	regs := []map[string]any{}
	for _, g := range r.Regressions {
		m := map[string]any{"mode": r.Mode.String(), "domain": g.Domain, "season": g.Season, "regime": g.Regime.String(),
			"response": g.Response, "predictor": g.Predictor, "n": cnt(g.N), "steps": cnt(g.Steps), "area": num{g.Area, "m2"},
			"slope": num{g.Slope, g.SlopeUnits}, "slope_se": num{g.SlopeSE, g.SlopeUnits}, "slope_ci": ji(g.SlopeCI, g.SlopeUnits),
			"intercept": num{g.Intercept, g.Units}, "intercept_se": num{g.InterceptSE, g.Units}, "intercept_ci": ji(g.InterceptCI, g.Units),
			"r": num{g.R, "1"}, "r_ci": ji(g.RCI, "1"),
			"n_eff_slope": num{g.NEffSlope, "1"}, "n_eff_corr": num{g.NEffCorr, "1"},
			"lag1":              map[string]num{"predictor": {g.R1X, "1"}, "response": {g.R1Y, "1"}, "residual": {g.R1Resid, "1"}},
			"independent_areas": num{g.IndependentAreas, "1"}, "note": g.Note}
		if g.Boot != nil {
			m["bootstrap"] = map[string]any{"replicates": cnt(g.Boot.Replicates), "failed": cnt(g.Boot.Failed),
				"slope_ci": ji(g.Boot.Slope, g.SlopeUnits), "r_ci": ji(g.Boot.R, "1")}
		}
		regs = append(regs, m)
	}
	doc["regressions"] = regs

	parts := []map[string]any{}
	for _, p := range r.Partials {
		var coefs []map[string]any
		for k := 0; k < 2; k++ {
			c := map[string]any{"predictor": p.Predictors[k], "controls": p.Predictors[1-k], "coefficient": num{p.Coef[k], p.CoefUnits},
				"se": num{p.SE[k], p.CoefUnits}, "ci": ji(p.CI[k], p.CoefUnits), "lag1_predictor": num{p.R1X[k], "1"}}
			if p.Boot != nil {
				c["bootstrap_ci"] = ji(p.Boot[k], p.CoefUnits)
			}
			coefs = append(coefs, c)
		}
		parts = append(parts, map[string]any{"mode": r.Mode.String(), "domain": p.Domain, "season": p.Season, "regime": p.Regime.String(),
			"response": p.Response, "n": cnt(p.N), "steps": cnt(p.Steps), "area": num{p.Area, "m2"}, "coefficients": coefs,
			"intercept": num{p.Intercept, p.Units}, "r2": num{p.R2, "1"}, "n_eff": num{p.NEff, "1"}, "lag1_residual": num{p.R1Resid, "1"},
			"independent_areas": num{p.IndependentAreas, "1"}, "note": p.Note})
	}
	doc["partial_regressions"] = parts

	flips := []map[string]any{}
	for _, pf := range r.Flips {
		var rows []map[string]any
		for _, x := range pf.Rows {
			rows = append(rows, map[string]any{"delta_t": num{x.DeltaT, "K"},
				"inside": map[string]num{"changed": {x.Changed, "1"}, "to_convective": {x.ToConvective, "1"}, "from_convective": {x.FromConvective, "1"},
					"convective_before": {x.ConvectiveBefore, "1"}, "convective_after": {x.ConvectiveAfter, "1"}, "convective_change": {x.ConvectiveChange(), "1"}},
				"outside": map[string]num{"changed": {x.OutChanged, "1"}, "to_convective": {x.OutToConvective, "1"}, "from_convective": {x.OutFromConvective, "1"},
					"convective_before": {x.OutConvectiveBefore, "1"}, "convective_after": {x.OutConvectiveAfter, "1"}, "convective_change": {x.OutConvectiveChange(), "1"}}})
		}
		p := pf.Patch
		flips = append(flips, map[string]any{"patch": p.Name, "box": box4(p.South, p.North, p.West, p.East), "cells": cnt(pf.Cells), "steps": cnt(pf.Steps),
			"band_share_f":     map[string]num{"mean": {pf.FMean, "1"}, "min": {pf.FMin, "1"}, "max": {pf.FMax, "1"}},
			"area_time_inside": num{pf.AreaTime, "m2"}, "area_time_outside": num{pf.OutAreaTime, "m2"},
			"definition": "relative SST inside the patch becomes SST* + dT(1 - f), outside SST* - dT f, f the patch's share of the band ocean area at each step; fractions of ocean area x time (inside: cell area; outside: band area)",
			"rows":       rows})
	}
	doc["flips"] = flips

	if t := r.Threshold; t != nil {
		var years []map[string]any
		for _, y := range t.Years {
			years = append(years, map[string]any{"year": y.Year, "steps": cnt(y.Steps), "n": cnt(y.N), "relative": num{y.Rel, "K"},
				"absolute": num{y.Abs, "K"}, "tropical_mean_sst": num{y.TropicalMean, "K"}, "logistic_slope": num{y.LogisticSlope, "K-1"}, "note": y.Note})
		}
		doc["threshold"] = map[string]any{"indicator": t.Indicator, "condition": t.Condition,
			"indicator_threshold": num{t.IndicatorThreshold, t.IndicatorUnits}, "n": cnt(t.N), "area": num{t.Area, "m2"}, "out_of_range": cnt(t.OutOfRange),
			"method":   "logistic regression of the indicator on relative SST over band ocean cell-steps (binned, IRLS, area weights); threshold where p = 0.5; absolute = relative + the record's tropical-mean SST",
			"logistic": map[string]num{"intercept": {t.B0, "1"}, "slope": {t.B1, "K-1"}},
			"relative": num{t.Rel, "K"}, "relative_ci": ji(t.RelCI, "K"),
			"absolute": num{t.Abs, "K"}, "absolute_ci": ji(t.AbsCI, "K"),
			"tropical_mean_sst": num{t.TropicalMean, "K"}, "replicates": cnt(t.Replicates), "failed_replicates": cnt(t.Failed),
			"years": years, "tracking_slope": num{t.Tracking, "1"}, "tracking_ci": ji(t.TrackingCI, "1"), "note": t.Note}
	} else {
		doc["threshold"] = nil
	}

	omega := []map[string]any{}
	for _, o := range r.Omega {
		var bins []map[string]any
		for b, ob := range o.Bins {
			m := map[string]any{"lower": num{ob.Lower, "hPa d-1"}, "upper": num{ob.Upper, "hPa d-1"}, "n": cnt(ob.N), "area": num{ob.Area, "m2"},
				"frequency": num{ob.Frequency, "1"}, "pdf": num{ob.PDF, "d hPa-1"}}
			resp := map[string]any{}
			for _, or := range o.Responses {
				resp[or.Response] = map[string]num{"mean": {or.Mean[b], or.Units}, "std": {or.Std[b], or.Units}, "n": cnt(or.N[b])}
			}
			m["responses"] = resp
			bins = append(bins, m)
		}
		omega = append(omega, map[string]any{"domain": o.Domain, "season": o.Season, "out_of_range": cnt(o.OutOfRange),
			"values": "actual values (composites), in both modes", "bins": bins})
	}
	doc["omega_regimes"] = omega
	return doc
}
