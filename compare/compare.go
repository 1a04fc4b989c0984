// Package compare sets finished runs side by side: one reference (usually
// observations) and one or more candidates (usually models), all on one
// analysis grid. For each candidate it reports map statistics against the
// reference (area-weighted pattern correlation, centred RMS difference and
// bias of the convective-frequency and crossings-per-year maps, with the
// difference maps), and scalar diagnostics side by side (tropical-mean SST,
// convective area fraction and its variability, regime-mean EIS, LTS and
// cloud). From each run's relationship results it sets side by side the
// subsidence-regime cloud sensitivities (slopes on EIS and LTS, partial
// sensitivities) with their 95 % intervals, the difference to the
// reference and whether it lies within the combined uncertainty
// (CombinedMethod), the flip fractions per patch and ΔT, and the
// estimated thresholds.
//
// Runs made with different metrics conventions, regime definitions, bands,
// periods, grids or relationship configurations (anomaly against
// climatological slopes) measure different things; Compare refuses them unless
// told to allow the mismatch, and then lists every mismatch.
package compare

import (
	"fmt"
	"lidscope/vocab"
	"math"

	"lidscope/accumulate"
	"lidscope/output"
	"lidscope/regimes"
	"lidscope/relations"
)

// Run is a finished run.
type Run struct {
	Name string // the dataset name (or the folder)
	Dir  string
	Meta output.Meta
	Acc  *accumulate.Acc
	// Relations are the run's relationship results (relationships.json,
	// relations.ReadResults); nil when the run has none (a merged run),
	// when no sensitivities, flips or thresholds are compared.
	Relations *relations.Results
}

// Label names the run in messages: its name and, when known, its folder
// (two runs of one dataset differ only by their folders).
func (r Run) Label() string {
	if r.Dir == "" || r.Dir == r.Name {
		return r.Name
	}
	return r.Name + " (" + r.Dir + ")"
}

// Options control a comparison.
type Options struct {
	// AllowMismatch compares runs whose studies, periods or grids differ;
	// the mismatches are listed in the result.
	AllowMismatch bool
}

// MapStat compares one per-column map of a candidate with the reference
// over the cells of the tropical band where both are valid, weighted by
// the cell area inside the band.
type MapStat struct {
	Name  string  `json:"name"`
	Units string  `json:"units"`
	N     int     `json:"cells"`
	Corr  float64 `json:"pattern_correlation"`
	// CRMS is the centred RMS difference (Taylor 2001, J. Geophys. Res.
	// 106(D7), eq. 2): the RMS of the difference after removing each map's
	// weighted mean.
	CRMS     float64 `json:"centred_rms_difference"`
	Bias     float64 `json:"bias"` // candidate mean − reference mean
	RefMean  float64 `json:"reference_mean"`
	CandMean float64 `json:"candidate_mean"`
	RefStd   float64 `json:"reference_std"`
	CandStd  float64 `json:"candidate_std"`
}

// Scalar is one diagnostic of the reference and a candidate.
type Scalar struct {
	Name  string  `json:"name"`
	Units string  `json:"units"`
	Ref   float64 `json:"reference"`
	Cand  float64 `json:"candidate"`
	Diff  float64 `json:"difference"` // candidate − reference
}

// Candidate is the comparison of one candidate with the reference.
type Candidate struct {
	Name    string    `json:"name"`
	Dir     string    `json:"dir"`
	Maps    []MapStat `json:"maps"`
	Scalars []Scalar  `json:"scalars"`
	// Estimates are the subsidence-regime cloud sensitivities (slopes on
	// EIS and LTS, partial sensitivities) and the convection thresholds,
	// side by side with the reference's (see CombinedMethod).
	Estimates []Estimate `json:"-"`
	// Flips compare the perturbation flip fractions per patch and ΔT.
	Flips []FlipDiff `json:"-"`
	// Notes say what could not be compared and why.
	Notes []string `json:"-"`
	// Diff holds the difference maps (candidate − reference, NaN where
	// either is missing), by map name.
	Diff map[string][]float64 `json:"-"`
}

// Result is a whole comparison.
type Result struct {
	Reference  Run
	Candidates []Candidate
	// ReferenceScalars are the reference's own diagnostics (for the table's first row).
	ReferenceScalars []Scalar
	// ReferenceEstimates are the reference's own sensitivities and
	// thresholds (in Ref and RefCI).
	ReferenceEstimates []Estimate
	Mismatches         []string
	// Version and RegimeText are set by Read: the lidscope version that
	// wrote the comparison and the reference's regime definition as
	// written (a read-back Result has no regimes.Definition).
	Version, RegimeText string
}

// mapNames are the maps compared, with their units.
var mapNames = []struct{ name, units string }{
	{"convective_" + vocab.TimeFraction, vocab.UnitOne},
	{vocab.CrossingRate, vocab.UnitPerYear},
}

// Mismatches lists how two runs' definitions differ.
func Mismatches(a, b Run) []string {
	var out []string
	chk := func(what string, x, y any) {
		if fmt.Sprint(x) != fmt.Sprint(y) {
			out = append(out, fmt.Sprintf("%s differs: %s has %v, %s has %v", what, a.Label(), x, b.Label(), y))
		}
	}
	chk("metrics conventions", a.Meta.MetricsConventions, b.Meta.MetricsConventions)
	for _, d := range a.Meta.Regimes.Diff(b.Meta.Regimes) {
		out = append(out, fmt.Sprintf("regime definition, %s differs: %s has %s, %s has %s", d.What, a.Label(), d.A, b.Label(), d.B))
	}
	chk("period", a.Meta.Period, b.Meta.Period)
	chk("time steps per year", a.Meta.StepsPerYear, b.Meta.StepsPerYear)
	if a.Acc.L.Cloud != "" && b.Acc.L.Cloud != "" {
		// a run without cloud is compared on what both have (Compare's notes)
		chk("cloud field", a.Acc.L.Cloud, b.Acc.L.Cloud)
	}
	out = append(out, relationMismatches(a, b)...)
	la, lb := a.Acc.L, b.Acc.L
	if la.NLat != lb.NLat || la.NLon != lb.NLon {
		out = append(out, fmt.Sprintf("grid differs: %s is %d×%d, %s is %d×%d (put both on one analysis grid)", a.Label(), la.NLat, la.NLon, b.Label(), lb.NLat, lb.NLon))
	} else {
		for i := range la.Lat {
			if math.Abs(la.Lat[i]-lb.Lat[i]) > 1e-6 {
				out = append(out, fmt.Sprintf("grid differs: latitude %d is %g in %s, %g in %s", i, la.Lat[i], a.Label(), lb.Lat[i], b.Label()))
				break
			}
		}
		for i := range la.Lon {
			if math.Abs(la.Lon[i]-lb.Lon[i]) > 1e-6 {
				out = append(out, fmt.Sprintf("grid differs: longitude %d is %g in %s, %g in %s", i, la.Lon[i], a.Label(), lb.Lon[i], b.Label()))
				break
			}
		}
	}
	return out
}

// Compare compares every candidate with the reference.
func Compare(ref Run, cands []Run, opt Options) (*Result, error) {
	if len(cands) == 0 {
		return nil, fmt.Errorf("give at least one candidate run to compare with the reference %s", ref.Name)
	}
	res := &Result{Reference: ref, ReferenceScalars: scalars(ref), ReferenceEstimates: ownEstimates(ref)}
	for _, c := range cands {
		mm := Mismatches(ref, c)
		res.Mismatches = append(res.Mismatches, mm...)
		if len(mm) > 0 && !opt.AllowMismatch {
			continue
		}
		gridOK := ref.Acc.L.NLat == c.Acc.L.NLat && ref.Acc.L.NLon == c.Acc.L.NLon
		if !gridOK {
			return nil, fmt.Errorf("%s and %s are on different grids; maps cannot be compared even with --allow-mismatch: run both on one analysis grid", ref.Label(), c.Label())
		}
		cr := Candidate{Name: c.Name, Dir: c.Dir, Diff: map[string][]float64{}}
		rm, cm := maps(ref), maps(c)
		w := ref.Acc.L.BandWeight
		for _, mn := range mapNames {
			st, diff := mapStat(rm[mn.name], cm[mn.name], w)
			st.Name, st.Units = mn.name, mn.units
			cr.Maps = append(cr.Maps, st)
			cr.Diff[mn.name] = diff
		}
		// Compare what both runs have (a run without T700 has no LTS/EIS,
		// one without cloud no cloud means); list what could not be.
		refBy := map[string]Scalar{}
		for _, s := range res.ReferenceScalars {
			refBy[s.Name] = s
		}
		candBy := map[string]bool{}
		for _, s := range scalars(c) {
			candBy[s.Name] = true
			r, ok := refBy[s.Name]
			if !ok {
				cr.Notes = append(cr.Notes, fmt.Sprintf("%s not compared: only %s has it (the reference %s lacks the input)", s.Name, c.Name, ref.Name))
				continue
			}
			s.Ref = r.Cand
			s.Diff = s.Cand - s.Ref
			cr.Scalars = append(cr.Scalars, s)
		}
		for _, s := range res.ReferenceScalars {
			if !candBy[s.Name] {
				cr.Notes = append(cr.Notes, fmt.Sprintf("%s not compared: only the reference %s has it (%s lacks the input)", s.Name, ref.Name, c.Name))
			}
		}
		switch {
		case ref.Relations == nil:
			cr.Notes = append(cr.Notes, fmt.Sprintf("the reference %s has no relationship results (relationships.json): sensitivities, flips and thresholds not compared", ref.Name))
		case c.Relations == nil:
			cr.Notes = append(cr.Notes, fmt.Sprintf("%s has no relationship results (relationships.json): sensitivities, flips and thresholds not compared", c.Name))
		default:
			est, notes := estimates(res.ReferenceEstimates, ownEstimates(c), ref.Name, c.Name)
			cr.Estimates, cr.Notes = est, append(cr.Notes, notes...)
			cr.Flips = flipDiffs(ref.Relations, c.Relations)
		}
		res.Candidates = append(res.Candidates, cr)
	}
	if len(res.Mismatches) > 0 && !opt.AllowMismatch {
		return nil, &MismatchError{List: res.Mismatches}
	}
	return res, nil
}

// Scalar returns the candidate's scalar of that name; ok is false when
// the candidate or the reference lacks it (Notes say which).
func (c Candidate) Scalar(name string) (s Scalar, ok bool) {
	for _, x := range c.Scalars {
		if x.Name == name {
			return x, true
		}
	}
	return Scalar{}, false
}

// MismatchError lists why runs were not compared.
type MismatchError struct{ List []string }

func (e *MismatchError) Error() string {
	s := "the runs were made differently and are not comparable (use --allow-mismatch to compare anyway):"
	for _, m := range e.List {
		s += "\n  " + m
	}
	return s
}

func maps(r Run) map[string][]float64 {
	spy := r.Meta.StepsPerYear
	if spy == 0 {
		spy = 12
	}
	return map[string][]float64{
		"convective_" + vocab.TimeFraction: r.Acc.ConvectiveFraction(),
		vocab.CrossingRate:                 r.Acc.CrossingsPerYear(spy),
	}
}

// mapStat computes the weighted statistics of cand against ref.
func mapStat(ref, cand, w []float64) (MapStat, []float64) {
	diff := make([]float64, len(ref))
	var sw, sr, sc float64
	n := 0
	for i := range ref {
		diff[i] = math.NaN()
		if ref[i] != ref[i] || cand[i] != cand[i] {
			continue
		}
		diff[i] = cand[i] - ref[i]
		if w[i] <= 0 {
			continue
		}
		n++
		sw += w[i]
		sr += w[i] * ref[i]
		sc += w[i] * cand[i]
	}
	st := MapStat{N: n, Corr: math.NaN(), CRMS: math.NaN(), Bias: math.NaN(), RefMean: math.NaN(), CandMean: math.NaN(), RefStd: math.NaN(), CandStd: math.NaN()}
	if sw == 0 {
		return st, diff
	}
	mr, mc := sr/sw, sc/sw
	var vr, vc, cov, d2 float64
	for i := range ref {
		if ref[i] != ref[i] || cand[i] != cand[i] || w[i] <= 0 {
			continue
		}
		a, b := ref[i]-mr, cand[i]-mc
		vr += w[i] * a * a
		vc += w[i] * b * b
		cov += w[i] * a * b
		d2 += w[i] * (b - a) * (b - a)
	}
	st.RefMean, st.CandMean, st.Bias = mr, mc, mc-mr
	st.RefStd, st.CandStd = math.Sqrt(vr/sw), math.Sqrt(vc/sw)
	st.CRMS = math.Sqrt(d2 / sw)
	if vr > 0 && vc > 0 {
		st.Corr = cov / math.Sqrt(vr*vc)
	} else if d2 == 0 {
		st.Corr = 1 // identical constant maps
	}
	return st, diff
}

// scalars are a run's own diagnostics (in the Cand field).
func scalars(r Run) []Scalar {
	a := r.Acc
	var out []Scalar
	add := func(name, units string, v float64) { out = append(out, Scalar{Name: name, Units: units, Cand: v}) }
	var mSST, mConv, n float64
	for _, p := range a.Series {
		if p.TropMean == p.TropMean {
			mSST += p.TropMean
		}
		if c := p.AreaFraction[regimes.Convective]; c == c {
			mConv += c
			n++
		}
	}
	ns := float64(len(a.Series))
	mSST /= ns
	mConv /= n
	var vConv float64
	for _, p := range a.Series {
		if c := p.AreaFraction[regimes.Convective]; c == c {
			vConv += (c - mConv) * (c - mConv)
		}
	}
	add("tropical_mean_sst", "K", mSST)
	add(vocab.ConvectiveAreaFraction+"_"+vocab.Mean, vocab.UnitOne, mConv)
	add(vocab.ConvectiveAreaFraction+"_"+vocab.Std, vocab.UnitOne, math.Sqrt(vConv/n))
	q := map[string]int{}
	for i, name := range a.L.Quantities {
		q[name] = i
	}
	cloud := a.L.Cloud
	if cloud == "" {
		cloud = "cloud"
	}
	names := []string{"eis", "lts", cloud}
	for _, name := range names {
		k, ok := q[name]
		if !ok {
			continue
		}
		for _, rg := range []regimes.Regime{regimes.Subsidence, regimes.Convective} {
			units := "K"
			if name == cloud {
				units = "1"
			}
			add(fmt.Sprintf("%s_%s_%s", rg, name, vocab.Mean), units, bandMean(a, k, rg))
		}
	}
	return out
}

// bandMean is the band-area- and time-weighted regime mean of quantity k.
func bandMean(a *accumulate.Acc, k int, r regimes.Regime) float64 {
	var sw, swx float64
	for i, w := range a.L.BandWeight {
		if m := a.Moments(k, r, i); w > 0 && m.W > 0 {
			sw += w * m.W
			swx += w * m.W * m.Mean
		}
	}
	if sw == 0 {
		return math.NaN()
	}
	return swx / sw
}
