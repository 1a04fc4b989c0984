package constraint

import (
	"errors"
	"fmt"
	"math"
	"regexp"
	"slices"
	"strconv"
	"strings"

	"lidscope/factors"
)

// Estimate is a change per kelvin of global warming with its standard
// error and interval (NaN where unknown).
type Estimate struct {
	Value, SE, Lo, Hi float64
}

func nanEstimate() Estimate { return Estimate{math.NaN(), math.NaN(), math.NaN(), math.NaN()} }

// FactorChange is one factor's part of one domain's constraint.
type FactorChange struct {
	Factor, Units string
	// PerKelvin is Δx/ΔT of the model, factor units per K, with its
	// standard error.
	PerKelvin, PerKelvinSE float64
	// ObsCoef and ModelCoef are the sensitivities of the observations and
	// of the model's control run, response units per factor unit, with
	// their standard errors.
	ObsCoef, ObsCoefSE     float64
	ModelCoef, ModelCoefSE float64
	// Contribution is ObsCoef·PerKelvin (response units per K) and
	// ModelContribution ModelCoef·PerKelvin, with standard errors.
	Contribution, ContributionSE           float64
	ModelContribution, ModelContributionSE float64
}

// Domain is the constraint of one domain and regime slot of the factor
// analysis.
type Domain struct {
	Domain, Regime string
	Factors        []FactorChange
	// Constrained is Σ_i ObsCoef_i·PerKelvin_i; Predicted the model's own
	// sensitivities times its own factor changes; Actual the model's own
	// ΔC/ΔT (the change of the response's time mean over ΔT). All in
	// response units per K.
	Constrained, Predicted, Actual Estimate
	// Steps are the time steps of the domain-mean series of the
	// observations, the control and the warm run.
	ObsSteps, ControlSteps, WarmSteps int64
	Note                              string
}

// Cells are the per-cell constraint on the common grid of the three runs
// ([lat][lon] row-major, NaN where a cell lacks a fit or a mean).
type Cells struct {
	NLat, NLon  int
	Lat, Lon    []float64
	LatB, LonB  [][2]float64
	Constrained []float64 // response units per K
	SE          []float64
	Predicted   []float64
	Actual      []float64
	// Contribution and PerKelvin are per factor: [factor][cell].
	Contribution [][]float64
	PerKelvin    [][]float64
}

// Result is a constraint: the inputs' identities, the warming and the
// per-domain and per-cell results.
type Result struct {
	Observations, Control, Warm RunInfo
	Response, ResponseUnits     string
	Factors                     []factors.FactorInfo
	// Warming is ΔT, K; WarmingSource says where it came from.
	Warming       float64
	WarmingSource string
	Level         float64
	Domains       []Domain
	Cells         *Cells
	Notes         []string
}

// RunInfo identifies an input run folder.
type RunInfo struct {
	Dir, Dataset, StudyHash string
}

// Domain returns the result of one domain and regime.
func (r *Result) Domain(domain, regime string) (*Domain, bool) {
	for i := range r.Domains {
		if r.Domains[i].Domain == domain && r.Domains[i].Regime == regime {
			return &r.Domains[i], true
		}
	}
	return nil, false
}

// Options control Compute.
type Options struct {
	// Warming is ΔT, K; zero means computed from WarmingFrom.
	Warming float64
	// WarmingFrom is a temperature quantity of the runs' maps (e.g. "sst")
	// whose area-weighted global means give ΔT when Warming is zero.
	WarmingFrom string
	// Level is the interval level (0: the observations' level).
	Level float64
}

// ErrMismatch is wrapped by the errors that refuse runs that do not belong
// together.
var ErrMismatch = errors.New("the runs do not belong together")

// Compute computes the constraint of the model (control, warm) by the
// observations obs. See the package documentation.
func Compute(obs, control, warm *Run, opt Options) (*Result, error) {
	if err := checkRuns(obs, control, warm); err != nil {
		return nil, err
	}
	res := &Result{Observations: obs.info(), Control: control.info(), Warm: warm.info(),
		Response: obs.Factors.Response, ResponseUnits: obs.Factors.ResponseUnits,
		Factors: slices.Clone(obs.Factors.Factors), Level: opt.Level}
	if res.Level == 0 {
		res.Level = obs.Factors.Level
	}
	if !(res.Level > 0 && res.Level < 1) {
		return nil, fmt.Errorf("constraint: interval level %g: give a level between 0 and 1 (e.g. 0.95)", res.Level)
	}
	var err error
	if res.Warming, res.WarmingSource, err = warming(control, warm, opt); err != nil {
		return nil, err
	}
	for _, of := range obs.Factors.Fits {
		cf, ok1 := control.Factors.Fit(of.Domain, of.Regime)
		wf, ok2 := warm.Factors.Fit(of.Domain, of.Regime)
		if !ok1 || !ok2 {
			res.Notes = append(res.Notes, fmt.Sprintf("%s/%s: the model runs have no fit of this domain and regime", of.Domain, of.Regime))
			continue
		}
		if of.N == 0 || cf.N == 0 || wf.N == 0 {
			res.Notes = append(res.Notes, fmt.Sprintf("%s/%s: no samples in the observations or a model run", of.Domain, of.Regime))
			continue
		}
		d := domainResult(&of, cf, wf, control.resp(of.Domain, of.Regime), warm.resp(of.Domain, of.Regime), res.Warming, res.Level)
		res.Domains = append(res.Domains, d)
	}
	if len(res.Domains) == 0 {
		return nil, fmt.Errorf("constraint: no domain and regime has a factor fit in all three runs (%s, %s, %s)", obs.Dir, control.Dir, warm.Dir)
	}
	cells, note := cellResult(obs, control, warm, res.Warming, res.Level)
	res.Cells = cells
	if note != "" {
		res.Notes = append(res.Notes, note)
	}
	return res, nil
}

// checkRuns refuses runs whose factor analyses cannot be combined.
func checkRuns(obs, control, warm *Run) error {
	for _, r := range []*Run{obs, control, warm} {
		if r == nil || r.Factors == nil {
			return errors.New("constraint: a run without a factor analysis was given (Load reads factors.json)")
		}
	}
	list := func(r *Run) string {
		var s []string
		for _, f := range r.Factors.Factors {
			s = append(s, f.Name+" ["+f.Units+"]")
		}
		return strings.Join(s, ", ")
	}
	for _, x := range []struct {
		what string
		r    *Run
	}{{"the model's control run", control}, {"the model's warm run", warm}} {
		if a, b := list(obs), list(x.r); a != b {
			return fmt.Errorf("constraint: the factors differ: the observations (%s) have %s, %s (%s) has %s; run both with the same factors block (factors.use) of the study: %w",
				obs.Dir, a, x.what, x.r.Dir, b, ErrMismatch)
		}
		if a, b := obs.Factors.Response, x.r.Factors.Response; a != b {
			return fmt.Errorf("constraint: the response differs: the observations (%s) regress %s, %s (%s) %s; use the same factors.response: %w",
				obs.Dir, a, x.what, x.r.Dir, b, ErrMismatch)
		}
		if a, b := obs.Factors.ResponseUnits, x.r.Factors.ResponseUnits; a != b {
			return fmt.Errorf("constraint: the response units differ: %s in the observations (%s), %s in %s (%s): %w", a, obs.Dir, b, x.what, x.r.Dir, ErrMismatch)
		}
	}
	// The control and warm runs: the same study but for the dataset.
	for _, key := range studyBlocks {
		a, b := control.study[key], warm.study[key]
		if a != b {
			return fmt.Errorf("constraint: the model's control run (%s) and warm run (%s) were made with different studies: their %s blocks differ; process both with one study (only the dataset may differ): %w",
				control.Dir, warm.Dir, key, ErrMismatch)
		}
	}
	for _, x := range []struct{ what, a, b string }{
		{"metrics conventions", control.conventions, warm.conventions},
		{"regime definitions", control.regimes, warm.regimes},
		{"factor methods", control.Factors.Method, warm.Factors.Method},
	} {
		if x.a != x.b {
			return fmt.Errorf("constraint: the model's control run (%s) and warm run (%s) differ in their %s (%q, %q); process both with one study: %w",
				control.Dir, warm.Dir, x.what, x.a, x.b, ErrMismatch)
		}
	}
	if control.Factors.Detrend != warm.Factors.Detrend {
		return fmt.Errorf("constraint: the model's control run (%s) and warm run (%s) differ in detrending; process both with one study: %w", control.Dir, warm.Dir, ErrMismatch)
	}
	return nil
}

// domainResult combines one domain's three fits.
func domainResult(of, cf, wf *factors.RegionFit, rc, rw meanSE, dT, level float64) Domain {
	p := len(of.Sens)
	d := Domain{Domain: of.Domain, Regime: of.Regime, ObsSteps: of.N, ControlSteps: cf.N, WarmSteps: wf.N,
		Constrained: nanEstimate(), Predicted: nanEstimate(), Actual: nanEstimate()}
	dx, dxVar := make([]float64, p), make([]float64, p*p)
	beta, mbeta := make([]float64, p), make([]float64, p)
	for i := range p {
		dx[i] = wf.Sens[i].Mean - cf.Sens[i].Mean
		dxVar[i*p+i] = sq(wf.Sens[i].MeanSE) + sq(cf.Sens[i].MeanSE)
		beta[i], mbeta[i] = of.Sens[i].Coef, cf.Sens[i].Coef
	}
	var notes []string
	for _, n := range []string{of.Note, cf.Note, wf.Note} {
		if n != "" {
			notes = append(notes, n)
		}
	}
	for i := range p {
		d.Factors = append(d.Factors, FactorChange{Factor: of.Sens[i].Factor, Units: of.Sens[i].Units,
			PerKelvin: dx[i] / dT, PerKelvinSE: math.Sqrt(dxVar[i*p+i]) / dT,
			ObsCoef: beta[i], ObsCoefSE: of.Sens[i].SE, ModelCoef: mbeta[i], ModelCoefSE: cf.Sens[i].SE,
			Contribution: math.NaN(), ContributionSE: math.NaN(), ModelContribution: math.NaN(), ModelContributionSE: math.NaN()})
	}
	if c, err := factors.Constrain(beta, of.Cov, dx, dxVar, dT, level); err == nil {
		d.Constrained = Estimate{c.Change, c.SE, c.Lo, c.Hi}
		for i := range p {
			d.Factors[i].Contribution, d.Factors[i].ContributionSE = c.Contrib[i], c.ContribSE[i]
		}
	} else {
		notes = append(notes, "no constrained change: "+err.Error())
	}
	if c, err := factors.Constrain(mbeta, cf.Cov, dx, dxVar, dT, level); err == nil {
		d.Predicted = Estimate{c.Change, c.SE, c.Lo, c.Hi}
		for i := range p {
			d.Factors[i].ModelContribution, d.Factors[i].ModelContributionSE = c.Contrib[i], c.ContribSE[i]
		}
	} else {
		notes = append(notes, "no change predicted by the model's own sensitivities: "+err.Error())
	}
	if !math.IsNaN(rc.mean) && !math.IsNaN(rw.mean) {
		v := (rw.mean - rc.mean) / dT
		se := math.Hypot(rc.se, rw.se) / dT
		z := NormalQuantile(level)
		d.Actual = Estimate{v, se, v - z*se, v + z*se}
	} else {
		notes = append(notes, "the model runs do not record the response's mean of this domain and regime")
	}
	d.Note = strings.Join(notes, "; ")
	return d
}

// NormalQuantile is the two-sided normal quantile of level, the one
// factors.Constrain uses (Student's t at a very large number of degrees of
// freedom).
func NormalQuantile(level float64) float64 { return factors.TQuantile(0.5+level/2, 1e12) }

func sq(x float64) float64 { return x * x }

// cellResult is the per-cell constraint, when all three runs have maps on
// one grid.
func cellResult(obs, control, warm *Run, dT, level float64) (*Cells, string) {
	om, cm, wm := obs.Factors.Maps, control.cells, warm.cells
	if om == nil {
		return nil, "no per-cell constraint: the observations have no factor maps (factors.nc; factors.maps: true)"
	}
	if cm == nil || wm == nil {
		return nil, "no per-cell constraint: the model runs have no maps.nc"
	}
	if !sameGrid(om.Lat, om.Lon, cm.Lat, cm.Lon) || !sameGrid(cm.Lat, cm.Lon, wm.Lat, wm.Lon) {
		return nil, "no per-cell constraint: the observations and the model runs are on different grids (regrid them to one analysis grid: analysis.grid.target)"
	}
	p := len(obs.Factors.Factors)
	n := om.NLat * om.NLon
	c := &Cells{NLat: om.NLat, NLon: om.NLon, Lat: om.Lat, Lon: om.Lon, LatB: cm.LatB, LonB: cm.LonB,
		Constrained: nanSlice(n), SE: nanSlice(n), Predicted: nanSlice(n), Actual: nanSlice(n)}
	for range p {
		c.Contribution = append(c.Contribution, nanSlice(n))
		c.PerKelvin = append(c.PerKelvin, nanSlice(n))
	}
	var xc, xw [][]float64
	for _, f := range obs.Factors.Factors {
		a, b := cm.Mean[f.Name], wm.Mean[f.Name]
		if a == nil || b == nil {
			return nil, fmt.Sprintf("no per-cell constraint: the model runs' maps.nc have no %s_mean", f.Name)
		}
		xc, xw = append(xc, a), append(xw, b)
	}
	rc, rw := cm.Mean[obs.Factors.Response], wm.Mean[obs.Factors.Response]
	cmaps, wmaps := control.Factors.Maps, warm.Factors.Maps
	beta, cov := make([]float64, p), make([]float64, p*p)
	mbeta, mcov := make([]float64, p), make([]float64, p*p)
	dx, dxVar := make([]float64, p), make([]float64, p*p)
	for k := range n {
		ok := true
		for i := range p {
			beta[i] = om.Coef[i][k]
			dx[i] = xw[i][k] - xc[i][k]
			dxVar[i*p+i] = 0
			if cmaps != nil && wmaps != nil {
				dxVar[i*p+i] = sq(cmaps.SD[i][k])/cmaps.NEff[k] + sq(wmaps.SD[i][k])/wmaps.NEff[k]
			}
			for l := range p {
				cov[i*p+l] = om.Cov[i*p+l][k]
			}
			if math.IsNaN(beta[i]) || math.IsNaN(dx[i]) {
				ok = false
			}
		}
		if rc != nil && rw != nil {
			c.Actual[k] = (rw[k] - rc[k]) / dT
		}
		if !ok {
			continue
		}
		for i := range p {
			c.PerKelvin[i][k] = dx[i] / dT
		}
		dxc := dxVar
		if hasNaN(dxVar) {
			dxc = nil
		}
		if r, err := factors.Constrain(beta, cov, dx, dxc, dT, level); err == nil {
			c.Constrained[k], c.SE[k] = r.Change, r.SE
			for i := range p {
				c.Contribution[i][k] = r.Contrib[i]
			}
		}
		if cmaps != nil {
			okm := true
			for i := range p {
				mbeta[i] = cmaps.Coef[i][k]
				okm = okm && !math.IsNaN(mbeta[i])
				for l := range p {
					mcov[i*p+l] = cmaps.Cov[i*p+l][k]
				}
			}
			if okm {
				if r, err := factors.Constrain(mbeta, mcov, dx, nil, dT, level); err == nil {
					c.Predicted[k] = r.Change
				}
			}
		}
	}
	return c, ""
}

func hasNaN(x []float64) bool {
	return slices.ContainsFunc(x, math.IsNaN)
}

func nanSlice(n int) []float64 {
	s := make([]float64, n)
	for i := range s {
		s[i] = math.NaN()
	}
	return s
}

func sameGrid(lat1, lon1, lat2, lon2 []float64) bool {
	eq := func(a, b []float64) bool {
		if len(a) != len(b) {
			return false
		}
		for i := range a {
			if math.Abs(a[i]-b[i]) > 1e-6 {
				return false
			}
		}
		return true
	}
	return eq(lat1, lat2) && eq(lon1, lon2)
}

// warming returns ΔT and where it came from.
func warming(control, warm *Run, opt Options) (float64, string, error) {
	if opt.Warming != 0 {
		if !(opt.Warming > 0) || math.IsInf(opt.Warming, 0) {
			return 0, "", fmt.Errorf("constraint: the global-mean surface warming %g K must be positive: give the warm run's warming over the control run", opt.Warming)
		}
		return opt.Warming, "given", nil
	}
	q := opt.WarmingFrom
	if q == "" {
		return 0, "", errors.New("constraint: give the global-mean surface warming (e.g. 4.1K) or the temperature quantity to compute it from (e.g. sst)")
	}
	a, b, cells, err := globalMeans(control, warm, q)
	if err != nil {
		return 0, "", err
	}
	dT := b - a
	if !(dT > 0) {
		return 0, "", fmt.Errorf("constraint: the global-mean %s of the warm run (%s: %.4g K) is not above that of the control run (%s: %.4g K); give the runs in the order control, warm, or the warming itself",
			q, warm.Dir, b, control.Dir, a)
	}
	return dT, fmt.Sprintf("the change of the cell-area-weighted mean of the per-cell time means of %s over the %d cells valid in both runs", q, cells), nil
}

// ParseWarming reads the global-mean surface warming as the command line
// gives it: a number with temperature-difference units ("4.1K", "4.1 K",
// "4.1degC"; a bare number is refused, since the units say it is a
// warming), or the name of a temperature quantity of the runs' maps from
// which Compute computes it ("sst").
func ParseWarming(s string) (Options, error) {
	t := strings.TrimSpace(s)
	if t == "" {
		return Options{}, errors.New("give the global-mean surface warming with units (e.g. 4.1K) or a temperature quantity of the runs to compute it from (e.g. sst)")
	}
	for _, u := range []string{"degC", "K"} {
		if v, ok := strings.CutSuffix(t, u); ok {
			x, err := strconv.ParseFloat(strings.TrimSpace(v), 64)
			if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
				return Options{}, fmt.Errorf("the warming %q is not a number with units: write e.g. 4.1K", s)
			}
			if !(x > 0) {
				return Options{}, fmt.Errorf("the warming %q must be positive: the warm run's global-mean surface warming over the control run", s)
			}
			return Options{Warming: x}, nil
		}
	}
	if _, err := strconv.ParseFloat(t, 64); err == nil {
		return Options{}, fmt.Errorf("the warming %q has no units: write it with K (e.g. %sK), or name a temperature quantity to compute it from (e.g. sst)", s, t)
	}
	if !quantityRE.MatchString(t) {
		return Options{}, fmt.Errorf("the warming %q is neither a number with units (e.g. 4.1K) nor a quantity name (e.g. sst)", s)
	}
	return Options{WarmingFrom: t}, nil
}

var quantityRE = regexp.MustCompile(`^[a-z][a-z0-9_]*$`)
