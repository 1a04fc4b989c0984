package config

import (
	"math"
	"strconv"
	"strings"

	"lidscope/cf"
	"lidscope/relations"
	"lidscope/vocab"
)

// Factors is the study's factors section: the cloud-controlling factor
// regressions (package factors). On is false without the section.
type Factors struct {
	On bool
	// Use lists the factors, in output order (quantity names of vocab).
	Use []string
	// Response is the response quantity as written; AnalysisCloud (the
	// default) stands for each dataset's analysis cloud (FactorsFor
	// resolves it).
	Response      string
	Method        string    // ols or ridge
	Penalties     []float64 // ridge penalties; nil: the default grid
	Level         float64   // interval level
	CellFoldYears int       // per-cell cross-validation blocks, years
	Maps          bool
	Bootstrap     FactorsBootstrap
}

// FactorsBootstrap is factors.bootstrap.
type FactorsBootstrap struct {
	Replicates int
	BlockYears int
	Seed       uint64
}

// FactorNames are the factors a study may list, in the table's order.
var FactorNames = []string{vocab.SST, vocab.EIS, vocab.LTS, vocab.RH700, vocab.Omega700, vocab.TAdv, vocab.WindSpeed}

// Defaults of the factors section, with their reasons.
const (
	// DefaultFactorsMethod: ridge regression with the penalty chosen by
	// cross-validation is stable with collinear factors (Ceppi & Nowack
	// 2021, PNAS 118); the CV picks 0 (OLS) when shrinking does not help.
	DefaultFactorsMethod = "ridge"
	DefaultFactorsLevel  = 0.95
	// DefaultCellFoldYears: five blocks for a 40-year record keep each
	// cell's state small (issue 15) while each held-out block spans
	// several years of autocorrelated anomalies.
	DefaultCellFoldYears = 8
)

// factorRoles says which inputs a factor needs: every role of one of the
// alternatives (rh700: relative humidity on levels, or specific humidity
// and air temperature at 700 hPa).
func factorRoles(f string) [][]cf.Role {
	switch f {
	case vocab.SST:
		return [][]cf.Role{{cf.RoleSST}}
	case vocab.EIS, vocab.LTS:
		return [][]cf.Role{{cf.RoleAirTemp}}
	case vocab.RH700:
		return [][]cf.Role{{cf.RoleRH}, {cf.RoleSpecHum, cf.RoleAirTemp}}
	case vocab.Omega700:
		return [][]cf.Role{{cf.RoleOmega}}
	case vocab.TAdv, vocab.WindSpeed:
		return [][]cf.Role{{cf.RoleEastWind, cf.RoleNorthWind}}
	}
	return nil
}

// FactorSource says from which roles a dataset's factor comes: the first
// alternative of factorRoles whose roles the dataset gives, nil when none.
func FactorSource(ds *Dataset, f string) []cf.Role {
	for _, alt := range factorRoles(f) {
		ok := true
		for _, r := range alt {
			if len(ds.Inputs[r]) == 0 && !ds.hasPattern(r) {
				ok = false
			}
		}
		if ok {
			return alt
		}
	}
	return nil
}

func rolesText(alts [][]cf.Role) string {
	var s []string
	for _, alt := range alts {
		var a []string
		for _, r := range alt {
			a = append(a, string(r))
		}
		s = append(s, strings.Join(a, " and "))
	}
	return strings.Join(s, ", or ")
}

// factorsResponses are the roles a factor regression may take as response.
var factorsResponses = []string{AnalysisCloud, vocab.LowCloud, vocab.Cloud, vocab.TOASWUp}

// factors decodes the factors section. It runs after the datasets.
func (d *decoder) factors(m, rel map[string]any, r *Study) {
	const P = "factors"
	if len(m) == 0 {
		return
	}
	f := Factors{On: true}
	// The factor regressions use deseasonalised monthly anomalies against
	// the relationship analysis's first-pass climatology, so they need it
	// on and in anomaly mode; an unset mode becomes anomaly.
	if r.RelationsOff {
		d.fail(P, "the factor regressions use the monthly anomalies of the relationship analysis, which relationships.enabled: false turns off; remove that line or the factors section")
	}
	if _, set := present(rel, "mode"); set && r.Relations.Mode != relations.Anomaly {
		d.fail(join("relationships", "mode"), "is %s, but the factors section regresses deseasonalised monthly anomalies, so it needs mode: anomaly (the default with a factors section); set mode: anomaly or remove the line", r.Relations.Mode)
	}
	r.Relations.Mode = relations.Anomaly
	use, set := d.words(m, P, "use")
	if !set {
		d.fail(join(P, "use"), "the factors section needs the list of factors: use: [%s] (any of them)", strings.Join(FactorNames, ", "))
	}
	seen := map[string]bool{}
	for i, u := range use {
		p := join(P, "use") + "." + strconv.Itoa(i)
		known := false
		for _, n := range FactorNames {
			known = known || n == u
		}
		switch {
		case !known:
			d.fail(p, "%q is not a factor lidscope knows: use %s; %s", u, strings.Join(FactorNames, ", "), suggest(u, FactorNames))
			continue
		case seen[u]:
			d.fail(p, "%s is listed twice", u)
			continue
		}
		seen[u] = true
		f.Use = append(f.Use, u)
		for _, ds := range r.Datasets {
			if !ds.hasPattern(allKey) && FactorSource(&ds, u) == nil {
				d.fail(p, "factor %s needs the %s input, which dataset %q does not give (files.%s); add it to the dataset's files or remove %s from factors.use",
					u, rolesText(factorRoles(u)), ds.Name, factorRoles(u)[0][0], u)
			}
		}
	}
	resp, _ := d.choice(m, P, "response", AnalysisCloud, factorsResponses...)
	f.Response = resp
	if resp != AnalysisCloud {
		for _, ds := range r.Datasets {
			if !ds.hasPattern(cf.Role(resp)) && !ds.hasPattern(allKey) {
				d.fail(join(P, "response"), "response %s needs a %s input, which dataset %q does not give; add it or choose another response (%s)", resp, resp, ds.Name, strings.Join(factorsResponses, ", "))
			}
		}
	} else {
		for _, ds := range r.Datasets {
			if ds.Cloud == "" || (!ds.hasPattern(ds.Cloud) && !ds.hasPattern(allKey)) {
				d.fail(P, "the factor regressions need a response: dataset %q gives no low_cloud or cloud input; add one or set factors.response", ds.Name)
			}
		}
	}
	f.Method, _ = d.choice(m, P, "method", DefaultFactorsMethod, "ols", "ridge")
	if pens, set := d.numList(m, P, "penalties"); set {
		if f.Method != "ridge" {
			d.fail(join(P, "penalties"), "penalties are for method: ridge (method is %s); remove them or set method: ridge", f.Method)
		}
		for i, x := range pens {
			if !(x >= 0) || math.IsInf(x, 0) || x > 1e6 {
				d.fail(join(P, "penalties")+"."+strconv.Itoa(i), "%v is not a ridge penalty: give numbers ≥ 0 (correlation-matrix scale, 0 is OLS) up to 1e6", x)
			}
		}
		f.Penalties = pens
	}
	f.Level, _ = d.num(m, P, "level", DefaultFactorsLevel)
	if !(f.Level >= 0.5 && f.Level < 1) {
		d.fail(join(P, "level"), "%v is not an interval level: give a fraction such as 0.95 (0.5 ≤ level < 1)", f.Level)
	}
	f.CellFoldYears = d.integer(m, P, "cell_fold_years", DefaultCellFoldYears, 1, 1000, "years per block of the per-cell cross-validation")
	f.Maps = d.boolean(m, P, "maps", true)
	bp := join(P, "bootstrap")
	bs := sub(m, "bootstrap")
	f.Bootstrap.Replicates = d.integer(bs, bp, "replicates", 0, 0, MaxReplicates, "0 = no bootstrap")
	f.Bootstrap.BlockYears = d.integer(bs, bp, "block_years", 1, 1, 1000, "consecutive years per block")
	f.Bootstrap.Seed = uint64(d.integer(bs, bp, "seed", 1, 0, MaxSeed, "any whole number; recorded"))
	r.Factors = f
}

// FactorsFor returns the factors section for a dataset, with the response
// resolved (AnalysisCloud becomes the dataset's cloud role).
func (r *Study) FactorsFor(d *Dataset) Factors {
	f := r.Factors
	f.Use = append([]string(nil), f.Use...)
	if f.Response == AnalysisCloud || f.Response == "" {
		f.Response = string(d.Cloud)
	}
	return f
}

// factorInputs are the roles a dataset reads for the factors.
func (ds *Dataset) factorInputs(r *Study) []cf.Role {
	if !r.Factors.On {
		return nil
	}
	var out []cf.Role
	for _, f := range r.Factors.Use {
		for _, alt := range factorRoles(f) {
			out = append(out, alt...)
		}
	}
	if x := r.Factors.Response; x != AnalysisCloud && x != "" {
		out = append(out, cf.Role(x))
	}
	return out
}

func resolvedFactors(f Factors) object {
	pens := []float64{}
	if f.Penalties != nil {
		pens = f.Penalties
	}
	return object{
		"use": f.Use, "response": f.Response, "method": f.Method, "penalties": pens, "level": f.Level,
		"cell_fold_years": f.CellFoldYears, "maps": f.Maps,
		"bootstrap": object{"replicates": f.Bootstrap.Replicates, "block_years": f.Bootstrap.BlockYears, "seed": f.Bootstrap.Seed},
	}
}
