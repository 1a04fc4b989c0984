package factors

import (
	"math"
	"math/rand/v2"
	"sort"
	"strings"

	"lidscope/relations"
)

// FactorInfo names a factor and its units.
type FactorInfo struct {
	Name  string
	Units string
}

// Sensitivity is one factor's coefficient in one fit.
type Sensitivity struct {
	Factor    string
	Units     string  // the factor's units
	CoefUnits string  // response units per factor unit
	Coef      float64 // response units per factor unit
	CoefSD    float64 // response units per standard deviation of the factor anomaly
	SE        float64 // standard error of Coef
	Lo, Hi    float64 // interval of Coef at the fit's level
	VIF       float64
	SD        float64 // standard deviation of the factor anomaly
	Mean      float64 // time mean of the raw domain-mean factor
	MeanSE    float64 // its standard error (Bretherton et al. 1999 eq. 30)
	// BootLo, BootHi: block-bootstrap percentile interval (NaN without).
	BootLo, BootHi float64
}

// Excludes0 reports whether the interval excludes zero.
func (s Sensitivity) Excludes0() bool { return s.Lo > 0 || s.Hi < 0 }

// RegionFit is the fit of one domain (the tropical band or a region) and
// regime slot.
type RegionFit struct {
	Domain  string
	Regime  string
	N       int64 // time steps with a complete domain mean
	NEff    float64
	Penalty float64
	R2      float64 // in sample
	CVR2    float64 // cross-validated (leave one year out)
	R1Resid float64 // lag-1 autocorrelation of the residual series
	Sens    []Sensitivity
	Cov     []float64 // p×p coefficient covariance, physical units
	// RespMean and RespMeanSE: time mean of the raw domain-mean response
	// and its standard error (as Sensitivity.Mean, MeanSE).
	RespMean, RespMeanSE float64
	Note                 string
}

// Maps are the per-cell fits ([factor][cell] and [cell], row-major
// [lat][lon]; NaN where a cell has no fit).
type Maps struct {
	NLat, NLon             int
	Lat, Lon               []float64
	Coef, CoefSD, SE       [][]float64
	Lo, Hi, VIF, SD        [][]float64
	Cov                    [][]float64 // [j*p+l][cell]
	R2, CVR2, NEff, N, Pen []float64
	Failed                 int // cells with samples but no fit
}

// Results are a factor analysis's outcome.
type Results struct {
	Response      string
	ResponseUnits string
	Method        string
	Level         float64
	Detrend       bool
	CellFoldYears int
	Bootstrap     Bootstrap
	Factors       []FactorInfo
	Fits          []RegionFit
	Maps          *Maps
	Steps         int
	Notes         []string
}

// Fit returns the fit of a domain and regime.
func (r *Results) Fit(domain, regime string) (*RegionFit, bool) {
	for i := range r.Fits {
		if r.Fits[i].Domain == domain && r.Fits[i].Regime == regime {
			return &r.Fits[i], true
		}
	}
	return nil, false
}

// UnitsFunc gives the units of a quantity name.
type UnitsFunc func(name string) string

// streamBootstrap is the second PCG word of the bootstrap generator.
const streamBootstrap = 0x66616374 // "fact"

// Results computes the fits. units gives each quantity's units.
func (a *Acc) Results(units UnitsFunc) *Results {
	p := len(a.fq)
	res := &Results{Response: a.cfg.Response, ResponseUnits: units(a.cfg.Response), Method: a.cfg.Method, Level: a.cfg.Level,
		Detrend: a.cfg.Detrend, CellFoldYears: a.cfg.CellFoldYears, Bootstrap: a.cfg.Bootstrap, Steps: len(a.steps)}
	for _, f := range a.cfg.Factors {
		res.Factors = append(res.Factors, FactorInfo{f, units(f)})
	}
	// the month grid of the record
	var t0, t1 int64
	if len(a.steps) > 0 {
		t0 = monthIndex(a.steps[0].Year, a.steps[0].Month)
		t1 = monthIndex(a.steps[len(a.steps)-1].Year, a.steps[len(a.steps)-1].Month)
	}
	T := int(t1-t0) + 1
	if len(a.steps) == 0 {
		T = 0
	}
	for d := range a.doms {
		for g := 0; g < nslot; g++ {
			j := d*nslot + g
			fit := a.regionFit(res, j, t0, T, p)
			fit.Domain, fit.Regime = a.doms[d].Name, SlotNames[g]
			res.Fits = append(res.Fits, fit)
		}
	}
	if a.cfg.Maps {
		res.Maps = a.maps(res)
	}
	return res
}

// series returns the domain-mean series of slot j on the month grid.
func (a *Acc) series(j int, t0 int64, T, p int) (z [][]float64, raw [][]float64, present []bool, years []int) {
	z = make([][]float64, a.K)
	for k := range z {
		z[k] = make([]float64, T)
	}
	raw = make([][]float64, a.K)
	for k := range raw {
		raw[k] = make([]float64, T)
	}
	present = make([]bool, T)
	years = make([]int, T)
	for _, s := range a.steps {
		t := int(monthIndex(s.Year, s.Month) - t0)
		years[t] = s.Year
		if s.W[j] > 0 {
			present[t] = true
			for k := 0; k < a.K; k++ {
				z[k][t] = s.Anom[j*a.K+k]
			}
			for k := 0; k < a.K; k++ {
				raw[k][t] = s.Raw[j*a.K+k]
			}
		}
	}
	return
}

func lag1Or0(z []float64, present []bool, notes *[]string, what string) float64 {
	r := relations.Lag1(z, present)
	if r != r {
		*notes = append(*notes, "lag-1 autocorrelation of the "+what+" series not estimable; taken as 0")
		return 0
	}
	return r
}

// nEffRegression is the effective sample size of a multiple regression of
// n samples: with the largest product of a factor's and the residual's
// lag-1 autocorrelations ρ = max_k r_k r_e, n(1 − ρ)/(1 + ρ), capped at n
// (Bretherton et al. 1999, J. Climate 12, eq. 31; the rule of the
// relationships' two-predictor regression).
func nEffRegression(n float64, r1x []float64, r1e float64) float64 {
	prod := math.Inf(-1)
	for _, r := range r1x {
		prod = math.Max(prod, r*r1e)
	}
	return relations.EffectiveSizeCorr(n, prod, 1)
}

func (a *Acc) regionFit(res *Results, j int, t0 int64, T, p int) RegionFit {
	fit := RegionFit{Penalty: math.NaN(), R2: math.NaN(), CVR2: math.NaN(), NEff: math.NaN(), R1Resid: math.NaN()}
	var notes []string
	z, raw, present, years := a.series(j, t0, T, p)
	yrs := NewYears(a.K)
	x := make([]float64, a.K)
	for t := 0; t < T; t++ {
		if !present[t] {
			continue
		}
		for k := range x {
			x[k] = z[k][t]
		}
		yrs.Add(years[t], x, 1)
		fit.N++
	}
	fit.Sens = make([]Sensitivity, p)
	for k := range fit.Sens {
		f := res.Factors[k]
		fit.Sens[k] = Sensitivity{Factor: f.Name, Units: f.Units, CoefUnits: slopeUnits(res.ResponseUnits, f.Units),
			Coef: math.NaN(), CoefSD: math.NaN(), SE: math.NaN(), Lo: math.NaN(), Hi: math.NaN(), VIF: math.NaN(), SD: math.NaN(),
			Mean: math.NaN(), MeanSE: math.NaN(), BootLo: math.NaN(), BootHi: math.NaN()}
		fit.Sens[k].Mean, fit.Sens[k].MeanSE = meanSE(raw[k], z[k], present)
	}
	fit.RespMean, fit.RespMeanSE = meanSE(raw[p], z[p], present)
	fit.Cov = make([]float64, p*p)
	for i := range fit.Cov {
		fit.Cov[i] = math.NaN()
	}
	if fit.N == 0 {
		fit.Note = "no complete samples"
		return fit
	}
	f, cvR2, pen, err := fitFolds(yrs.Folds(), a.cfg.penalties())
	if err != nil {
		fit.Note = err.Error()
		return fit
	}
	if cvR2 != cvR2 {
		notes = append(notes, "fewer than two years: no cross-validation, no penalty chosen")
	}
	fit.Penalty, fit.CVR2, fit.R2 = pen, cvR2, f.R2
	e := make([]float64, T)
	xs := make([]float64, p)
	for t := 0; t < T; t++ {
		if present[t] {
			for k := range xs {
				xs[k] = z[k][t]
			}
			e[t] = z[p][t] - f.Predict(xs)
		}
	}
	fit.R1Resid = lag1Or0(e, present, &notes, "residual")
	r1x := make([]float64, p)
	for k := range r1x {
		r1x[k] = lag1Or0(z[k], present, &notes, res.Factors[k].Name)
	}
	fit.NEff = nEffRegression(float64(fit.N), r1x, fit.R1Resid)
	if !(fit.NEff > float64(p)+1) {
		notes = append(notes, "effective sample size ≤ factors + 1: no interval")
	}
	cov := f.Cov(fit.NEff)
	copy(fit.Cov, cov)
	for k := range fit.Sens {
		s := &fit.Sens[k]
		s.Coef, s.CoefSD, s.SD, s.VIF = f.Coef[k], f.CoefSD[k], f.SD[k], f.VIF[k]
		s.SE = f.SE(k, fit.NEff)
		s.Lo, s.Hi = f.Interval(k, fit.NEff, a.cfg.Level)
	}
	if a.cfg.Bootstrap.Replicates > 0 {
		a.bootstrap(&fit, z, present, years, T, pen, &notes)
	}
	fit.Note = strings.Join(notes, "; ")
	return fit
}

// fitFolds cross-validates over the folds (when there are two or more) and
// returns the pooled fit at the chosen penalty, the CV R² and the penalty.
// With one fold the first penalty is used and the CV R² is NaN.
func fitFolds(fs Folds, pens []float64) (Fit, float64, float64, error) {
	nonEmpty := 0
	for _, c := range fs.Pieces {
		if c.N > 0 {
			nonEmpty++
		}
	}
	if nonEmpty >= 2 {
		cv, err := CrossValidate(fs, pens)
		if err == nil {
			return cv.Fit, cv.R2, cv.Penalty, nil
		}
	}
	pooled, err := fs.Pooled()
	if err != nil {
		return Fit{}, math.NaN(), math.NaN(), err
	}
	f, err := FitMoments(pooled, pens[0])
	return f, math.NaN(), pens[0], err
}

// bootstrap resamples whole years in circular blocks of BlockYears
// consecutive years (Politis & Romano 1992), refits with the chosen
// penalty, and keeps the 2.5–97.5 % (for the level) percentile intervals.
func (a *Acc) bootstrap(fit *RegionFit, z [][]float64, present []bool, years []int, T int, pen float64, notes *[]string) {
	var ylist []int
	byYear := map[int][]int{}
	for t := 0; t < T; t++ {
		if present[t] {
			if _, ok := byYear[years[t]]; !ok {
				ylist = append(ylist, years[t])
			}
			byYear[years[t]] = append(byYear[years[t]], t)
		}
	}
	sort.Ints(ylist)
	ny := len(ylist)
	if ny < 2 {
		*notes = append(*notes, "fewer than two years: no bootstrap")
		return
	}
	n := a.cfg.Bootstrap.Replicates
	L := min(a.cfg.Bootstrap.BlockYears, ny)
	p := a.K - 1
	reps := make([][]float64, p)
	rng := rand.New(rand.NewPCG(a.cfg.Bootstrap.Seed, streamBootstrap))
	x := make([]float64, a.K)
	failed := 0
	for b := 0; b < n; b++ {
		c := relations.NewCoMoments(a.K)
		drawn := 0
		for drawn < ny {
			s := rng.IntN(ny)
			for k := 0; k < L && drawn < ny; k++ {
				for _, t := range byYear[ylist[(s+k)%ny]] {
					for v := range x {
						x[v] = z[v][t]
					}
					c.Add(x, 1)
				}
				drawn++
			}
		}
		f, err := FitMoments(c, pen)
		if err != nil {
			failed++
			continue
		}
		for k := 0; k < p; k++ {
			reps[k] = append(reps[k], f.Coef[k])
		}
	}
	lo, hi := (1-a.cfg.Level)/2, (1+a.cfg.Level)/2
	for k := 0; k < p; k++ {
		fit.Sens[k].BootLo, fit.Sens[k].BootHi = quantile(reps[k], lo), quantile(reps[k], hi)
	}
	if failed > 0 {
		*notes = append(*notes, "some bootstrap replicates had no fit")
	}
}

// quantile is the p quantile (Hyndman & Fan 1996 type 7) of v; NaN with
// fewer than two values.
func quantile(v []float64, p float64) float64 {
	if len(v) < 2 {
		return math.NaN()
	}
	s := append([]float64(nil), v...)
	sort.Float64s(s)
	h := p * float64(len(s)-1)
	i := int(math.Floor(h))
	if i >= len(s)-1 {
		return s[len(s)-1]
	}
	return s[i] + (h-float64(i))*(s[i+1]-s[i])
}

// maps computes the per-cell fits.
func (a *Acc) maps(res *Results) *Maps {
	p := len(a.fq)
	n := a.l.NLat * a.l.NLon
	nanv := func() []float64 {
		x := make([]float64, n)
		for i := range x {
			x[i] = math.NaN()
		}
		return x
	}
	per := func() [][]float64 {
		out := make([][]float64, p)
		for k := range out {
			out[k] = nanv()
		}
		return out
	}
	m := &Maps{NLat: a.l.NLat, NLon: a.l.NLon, Lat: a.l.Lat, Lon: a.l.Lon, Coef: per(), CoefSD: per(), SE: per(), Lo: per(), Hi: per(),
		VIF: per(), SD: per(), R2: nanv(), CVR2: nanv(), NEff: nanv(), N: nanv(), Pen: nanv()}
	m.Cov = make([][]float64, p*p)
	for k := range m.Cov {
		m.Cov[k] = nanv()
	}
	pens := a.cfg.penalties()
	for _, cs := range a.state {
		i := int(cs.Cell)
		fs := Folds{Pieces: cs.Folds}
		pooled, err := fs.Pooled()
		if err != nil || pooled.N == 0 {
			continue
		}
		m.N[i] = float64(pooled.N)
		f, cvR2, pen, err := fitFolds(fs, pens)
		if err != nil {
			m.Failed++
			continue
		}
		m.R2[i], m.CVR2[i], m.Pen[i] = f.R2, cvR2, pen
		// lag-1 autocorrelations from the pooled moments
		r1 := make([]float64, a.K)
		for k := range r1 {
			r1[k] = cs.Lag.r1(k, pooled.Mean[k], pooled.C[k*a.K+k], pooled.N)
			if r1[k] != r1[k] {
				r1[k] = 0
			}
		}
		ne := nEffRegression(float64(pooled.N), r1[:p], r1[p])
		m.NEff[i] = ne
		cov := f.Cov(ne)
		for k := range m.Cov {
			m.Cov[k][i] = cov[k]
		}
		for k := 0; k < p; k++ {
			m.Coef[k][i], m.CoefSD[k][i], m.SD[k][i], m.VIF[k][i] = f.Coef[k], f.CoefSD[k], f.SD[k], f.VIF[k]
			m.SE[k][i] = f.SE(k, ne)
			m.Lo[k][i], m.Hi[k][i] = f.Interval(k, ne, a.cfg.Level)
		}
	}
	if m.Failed > 0 {
		res.Notes = append(res.Notes, "some cells had samples but no fit (a factor without spread, or too few samples)")
	}
	return m
}

// meanSE returns the time mean of the raw series and its standard error.
// The error comes from the anomaly series anom (deseasonalised, against
// the record's own monthly climatology): the seasonal cycle, sampled over
// whole years, adds no sampling error to the record mean, but it would
// inflate both the variance and the lag-1 autocorrelation of the raw
// series. The variance divides by n − 12 (the 12 monthly means removed)
// and the effective sample size is Bretherton et al. (1999) eq. 30 with
// the anomalies' lag-1 autocorrelation. (Checked by the coverage study of
// package constraint.)
func meanSE(raw, anom []float64, present []bool) (float64, float64) {
	var s, n float64
	for t, v := range raw {
		if present[t] {
			s += v
			n++
		}
	}
	if n == 0 {
		return math.NaN(), math.NaN()
	}
	m := s / n
	var sa float64
	for t, v := range anom {
		if present[t] {
			sa += v
		}
	}
	ma := sa / n
	var ss float64
	for t, v := range anom {
		if present[t] {
			ss += (v - ma) * (v - ma)
		}
	}
	r1 := relations.Lag1(anom, present)
	if r1 != r1 || n < 14 {
		return m, math.NaN()
	}
	return m, math.Sqrt(ss / (n - 12) / relations.EffectiveSizeMean(n, r1))
}
