package relations

import "lidscope/internal/jsonnum"

// num is jsonnum.Num under a short name, for the many literals below:
// num{Value: x, Units: "K"} is written as {"value": x, "units": "K"}, the
// shape of package output's JSON files.
type num = jsonnum.Num

type jInterval struct {
	Lo num `json:"lower"`
	Hi num `json:"upper"`
}

func ji(i Interval, u string) jInterval {
	return jInterval{num{Value: i.Lo, Units: u}, num{Value: i.Hi, Units: u}}
}

type jBox struct {
	South num `json:"south"`
	North num `json:"north"`
	West  num `json:"west"`
	East  num `json:"east"`
}

func box4(s, n, w, e float64) *jBox {
	return &jBox{num{Value: s, Units: "degrees_north"}, num{Value: n, Units: "degrees_north"}, num{Value: w, Units: "degrees_east"}, num{Value: e, Units: "degrees_east"}}
}

// jsonDoc builds relationships.json, one section at a time.
func jsonDoc(r *Results, meta Meta) map[string]any {
	doc := map[string]any{
		"format":                         "lidscope-relationships",
		"format_version":                 FormatVersion,
		"dataset":                        meta.Dataset,
		"title":                          meta.Title,
		"lidscope_version":               meta.Version,
		"study_hash":                     meta.StudyHash,
		"relationships_mode":             r.Mode.String(),
		"relationships_mode_description": r.ModeNote,
		"detrended":                      r.Detrended,
		"regime_definition":              r.RegimeDefinition,
		"uncertainty_method":             r.Uncertainty,
		"relationships_config":           r.Config,
		"period":                         map[string]any{"label": meta.Period, "first": r.First, "last": r.Last, "time_steps": jsonnum.Count(r.Steps), "years": jsonnum.Count(r.Years)},
		"regime_index":                   regimeOrder(),
		"notes":                          append([]string{}, r.Notes...),
	}
	jsonAxes(doc, r)
	for _, s := range []struct {
		key   string
		build func(*Results) any
	}{
		{"binned", jsonBinned},
		{"joint_composites", jsonJoint},
		{"regressions", jsonRegressions},
		{"partial_regressions", jsonPartials},
		{"flips", jsonFlips},
		{"threshold", jsonThreshold},
		{"omega_regimes", jsonOmega},
	} {
		doc[s.key] = s.build(r)
	}
	return doc
}

// jsonAxes adds the domains, seasons, predictors (with their bin edges)
// and responses.
func jsonAxes(doc map[string]any, r *Results) {
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
}

// jsonBinned is the binned relationships section.
func jsonBinned(r *Results) any {
	binned := []map[string]any{}
	for _, b := range r.Binned {
		var bins []map[string]any
		for _, s := range b.Bins {
			bins = append(bins, map[string]any{"lower": num{Value: s.Lower, Units: b.PredUnits}, "upper": num{Value: s.Upper, Units: b.PredUnits},
				"mean": num{Value: s.Mean, Units: b.RespUnits}, "std": num{Value: s.Std, Units: b.RespUnits}, "stderr": num{Value: s.StdErr, Units: b.RespUnits},
				"count": jsonnum.Count(s.N), "time_steps": jsonnum.Count(s.Steps), "n_eff": num{Value: s.NEff, Units: "1"}, "area": num{Value: s.Area, Units: "m2"}})
		}
		binned = append(binned, map[string]any{"relationships_mode": r.Mode.String(), "domain": b.Domain, "season": b.Season, "regime": b.Regime.String(),
			"predictor": b.Predictor, "response": b.Response, "out_of_range": jsonnum.Count(b.OutOfRange), "response_lag1_autocorrelation": num{Value: b.R1, Units: "1"}, "bins": bins})
	}
	return binned
}

// jsonJoint is the joint composites section.
func jsonJoint(r *Results) any {
	joint := []map[string]any{}
	for _, j := range r.Joint {
		mean := make([]num, len(j.Mean))
		freq := make([]num, len(j.Mean))
		count := make([]num, len(j.Mean))
		for k := range j.Mean {
			mean[k], freq[k], count[k] = num{Value: j.Mean[k], Units: j.Units}, num{Value: j.Frequency[k], Units: "1"}, jsonnum.Count(j.Count[k])
		}
		joint = append(joint, map[string]any{"relationships_mode": r.Mode.String(), "domain": j.Domain, "season": j.Season, "response": j.Response,
			"rel_sst_edges": j.RelEdges, "eis_edges": j.EISEdge, "layout": "[rel_sst bin][eis bin], row-major",
			"mean": mean, "frequency": freq, "count": count})
	}
	return joint
}

// jsonRegressions is the simple regressions section.
func jsonRegressions(r *Results) any {
	regs := []map[string]any{}
	for _, g := range r.Regressions {
		m := map[string]any{"relationships_mode": r.Mode.String(), "domain": g.Domain, "season": g.Season, "regime": g.Regime.String(),
			"response": g.Response, "predictor": g.Predictor, "count": jsonnum.Count(g.N), "time_steps": jsonnum.Count(g.Steps), "area": num{Value: g.Area, Units: "m2"},
			"slope": num{Value: g.Slope, Units: g.SlopeUnits}, "slope_stderr": num{Value: g.SlopeSE, Units: g.SlopeUnits}, "slope_ci": ji(g.SlopeCI, g.SlopeUnits),
			"intercept": num{Value: g.Intercept, Units: g.Units}, "intercept_stderr": num{Value: g.InterceptSE, Units: g.Units}, "intercept_ci": ji(g.InterceptCI, g.Units),
			"r": num{Value: g.R, Units: "1"}, "r_ci": ji(g.RCI, "1"),
			"slope_n_eff": num{Value: g.NEffSlope, Units: "1"}, "r_n_eff": num{Value: g.NEffCorr, Units: "1"},
			"lag1_autocorrelation": map[string]num{"predictor": {Value: g.R1X, Units: "1"}, "response": {Value: g.R1Y, Units: "1"}, "residual": {Value: g.R1Resid, Units: "1"}},
			"independent_areas":    num{Value: g.IndependentAreas, Units: "1"}, "note": g.Note}
		if g.Boot != nil {
			m["bootstrap"] = map[string]any{"replicates": jsonnum.Count(g.Boot.Replicates), "failed": jsonnum.Count(g.Boot.Failed),
				"slope_ci": ji(g.Boot.Slope, g.SlopeUnits), "r_ci": ji(g.Boot.R, "1")}
		}
		regs = append(regs, m)
	}
	return regs
}

// jsonPartials is the partial regressions section.
func jsonPartials(r *Results) any {
	parts := []map[string]any{}
	for _, p := range r.Partials {
		var coefs []map[string]any
		for k := 0; k < 2; k++ {
			c := map[string]any{"predictor": p.Predictors[k], "controls": p.Predictors[1-k], "coefficient": num{Value: p.Coef[k], Units: p.CoefUnits},
				"stderr": num{Value: p.SE[k], Units: p.CoefUnits}, "ci": ji(p.CI[k], p.CoefUnits), "predictor_lag1_autocorrelation": num{Value: p.R1X[k], Units: "1"}}
			if p.Boot != nil {
				c["bootstrap_ci"] = ji(p.Boot[k], p.CoefUnits)
			}
			coefs = append(coefs, c)
		}
		parts = append(parts, map[string]any{"relationships_mode": r.Mode.String(), "domain": p.Domain, "season": p.Season, "regime": p.Regime.String(),
			"response": p.Response, "count": jsonnum.Count(p.N), "time_steps": jsonnum.Count(p.Steps), "area": num{Value: p.Area, Units: "m2"}, "coefficients": coefs,
			"intercept": num{Value: p.Intercept, Units: p.Units}, "r2": num{Value: p.R2, Units: "1"}, "n_eff": num{Value: p.NEff, Units: "1"}, "residual_lag1_autocorrelation": num{Value: p.R1Resid, Units: "1"},
			"independent_areas": num{Value: p.IndependentAreas, Units: "1"}, "note": p.Note})
	}
	return parts
}

// jsonFlips is the perturbation flips section.
func jsonFlips(r *Results) any {
	flips := []map[string]any{}
	for _, pf := range r.Flips {
		var rows []map[string]any
		for _, x := range pf.Rows {
			rows = append(rows, map[string]any{"sst_perturbation": num{Value: x.DeltaT, Units: "K"},
				"inside": map[string]num{"changed": {Value: x.Changed, Units: "1"}, "to_convective": {Value: x.ToConvective, Units: "1"}, "from_convective": {Value: x.FromConvective, Units: "1"},
					"convective_before": {Value: x.ConvectiveBefore, Units: "1"}, "convective_after": {Value: x.ConvectiveAfter, Units: "1"}, "convective_change": {Value: x.ConvectiveChange(), Units: "1"}},
				"outside": map[string]num{"changed": {Value: x.OutChanged, Units: "1"}, "to_convective": {Value: x.OutToConvective, Units: "1"}, "from_convective": {Value: x.OutFromConvective, Units: "1"},
					"convective_before": {Value: x.OutConvectiveBefore, Units: "1"}, "convective_after": {Value: x.OutConvectiveAfter, Units: "1"}, "convective_change": {Value: x.OutConvectiveChange(), Units: "1"}}})
		}
		p := pf.Patch
		flips = append(flips, map[string]any{"patch": p.Name, "box": box4(p.South, p.North, p.West, p.East), "cells": jsonnum.Count(pf.Cells), "time_steps": jsonnum.Count(pf.Steps),
			"patch_area_fraction": map[string]num{"mean": {Value: pf.FMean, Units: "1"}, "min": {Value: pf.FMin, Units: "1"}, "max": {Value: pf.FMax, Units: "1"}},
			"area_time_inside":    num{Value: pf.AreaTime, Units: "m2"}, "area_time_outside": num{Value: pf.OutAreaTime, Units: "m2"},
			"definition": "relative SST inside the patch becomes SST* + ΔT(1 - f), outside SST* - ΔT f, ΔT the SST perturbation and f the patch's share of the band ocean area at each step (patch_area_fraction); fractions of ocean area x time (inside: cell area; outside: band area)",
			"rows":       rows})
	}
	return flips
}

// jsonOmega is the omega500 regimes section.
func jsonOmega(r *Results) any {
	omega := []map[string]any{}
	for _, o := range r.Omega {
		var bins []map[string]any
		for b, ob := range o.Bins {
			m := map[string]any{"lower": num{Value: ob.Lower, Units: "hPa d-1"}, "upper": num{Value: ob.Upper, Units: "hPa d-1"}, "count": jsonnum.Count(ob.N), "area": num{Value: ob.Area, Units: "m2"},
				"frequency": num{Value: ob.Frequency, Units: "1"}, "pdf": num{Value: ob.PDF, Units: "d hPa-1"}}
			resp := map[string]any{}
			for _, or := range o.Responses {
				resp[or.Response] = map[string]num{"mean": {Value: or.Mean[b], Units: or.Units}, "std": {Value: or.Std[b], Units: or.Units}, "count": jsonnum.Count(or.N[b])}
			}
			m["responses"] = resp
			bins = append(bins, m)
		}
		omega = append(omega, map[string]any{"domain": o.Domain, "season": o.Season, "out_of_range": jsonnum.Count(o.OutOfRange),
			"values": "actual values (composites), in both modes", "bins": bins})
	}
	return omega
}

// jsonThreshold is the threshold section (null without a threshold).
func jsonThreshold(r *Results) any {
	if t := r.Threshold; t != nil {
		var years []map[string]any
		for _, y := range t.Years {
			years = append(years, map[string]any{"year": y.Year, "time_steps": jsonnum.Count(y.Steps), "count": jsonnum.Count(y.N), "relative": num{Value: y.Rel, Units: "K"},
				"absolute": num{Value: y.Abs, Units: "K"}, "tropical_mean_sst": num{Value: y.TropicalMean, Units: "K"}, "logistic_slope": num{Value: y.LogisticSlope, Units: "K-1"}, "note": y.Note})
		}
		return map[string]any{"indicator": t.Indicator, "condition": t.Condition,
			"indicator_threshold": num{Value: t.IndicatorThreshold, Units: t.IndicatorUnits}, "count": jsonnum.Count(t.N), "area": num{Value: t.Area, Units: "m2"}, "out_of_range": jsonnum.Count(t.OutOfRange),
			"method":   "logistic regression of the indicator on relative SST over band ocean cell-steps (binned, IRLS, area weights); threshold where p = 0.5; absolute = relative + the record's tropical-mean SST",
			"logistic": map[string]num{"intercept": {Value: t.B0, Units: "1"}, "slope": {Value: t.B1, Units: "K-1"}},
			"relative": num{Value: t.Rel, Units: "K"}, "relative_ci": ji(t.RelCI, "K"),
			"absolute": num{Value: t.Abs, Units: "K"}, "absolute_ci": ji(t.AbsCI, "K"),
			"tropical_mean_sst": num{Value: t.TropicalMean, Units: "K"}, "bootstrap_replicates": jsonnum.Count(t.Replicates), "bootstrap_failed": jsonnum.Count(t.Failed),
			"years": years, "tracking_slope": num{Value: t.Tracking, Units: "1"}, "tracking_ci": ji(t.TrackingCI, "1"), "note": t.Note}
	}
	return nil
}
