package vocab

import (
	"fmt"
	"sort"
	"strings"
)

// Statistic names: the suffix (or JSON key) of a statistic of a quantity,
// e.g. eis_mean, low_cloud_vs_eis_n_eff.
const (
	Mean                   = "mean"
	Std                    = "std"    // population standard deviation
	StdErr                 = "stderr" // standard error of a mean or a coefficient
	Count                  = "count"  // number of samples (cell-steps, steps, cells)
	NEff                   = "n_eff"  // effective sample size
	CI                     = "ci"     // confidence interval {lower, upper}
	CILower                = "ci_lower"
	CIUpper                = "ci_upper"
	Lower                  = "lower"
	Upper                  = "upper"
	Lag1                   = "lag1_autocorrelation"
	Difference             = "difference" // candidate minus reference
	Min                    = "min"
	Max                    = "max"
	Bias                   = "bias"
	PatternCorrelation     = "pattern_correlation"
	CentredRMSDifference   = "centred_rms_difference"
	Frequency              = "frequency"
	PDF                    = "pdf"
	Slope                  = "slope"
	Intercept              = "intercept"
	Correlation            = "r"  // Pearson correlation coefficient
	R2                     = "r2" // coefficient of determination
	Coefficient            = "coefficient"
	BandMean               = "band_mean"
	CombinedHalfWidth      = "combined_half_width"
	AreaFraction           = "area_fraction"            // share of the band's valid ocean area in a regime
	TimeFraction           = "time_fraction"            // share of a column's valid time steps in a regime
	ConvectiveAreaFraction = "convective_area_fraction" // AreaFraction of the convective regime
	Dwell                  = "dwell"                    // mean run length in a regime
	CrossingRate           = "crossing_rate"            // convective↔subsidence crossings per year
	ValidSteps             = "valid_steps"
	TimeSteps              = "time_steps"
	SamplingFrequency      = "sampling_frequency" // time steps per year, units yr-1
)

// Regime-definition names (attributes and JSON keys).
const (
	Delta     = "delta"      // δ: the relative-SST threshold of the classifier, K
	HalfWidth = "half_width" // h: half-width of the transition band, K
	Band      = "band"       // the tropical band [south, north], degrees_north
	// Percentile is p of the percentile-of-SST definition, in percent.
	Percentile        = "percentile"
	RegimeDefinition  = "regime_definition"
	RegimeIndex       = "regime_index"
	Relationships     = "relationships" // the relationship analysis, in every name
	RelationshipsMode = "relationships_mode"
)

// Provenance names: what a run was made from, in every output (NetCDF
// global attributes, JSON keys) under the names the study itself uses for
// them (its conventions and files sections).
const (
	// Conventions: the metrics conventions text (metrics.Conventions.Text),
	// the study's conventions section resolved. In NetCDF it sits beside
	// CF's own Conventions attribute ("CF-1.10"), which it is not.
	Conventions = "conventions"
	// Files: the input files read, each with its role, path, size and
	// SHA-256 (the study's files section).
	Files = "files"
	// Study is the resolved study text; StudyHash its SHA-256.
	Study     = "study"
	StudyHash = "study_hash"
	// TimeAxisNote is the NetCDF global attribute that says the time
	// axis is a 12-month climatology; provenance.json describes the time
	// coordinate itself under "time" (units, calendar, time_steps, bounds).
	TimeAxisNote = "time_axis"
)

// Verdict words: one spelling in console output, CSV and JSON.
const (
	// Within: the candidate's estimate lies within the combined interval
	// of the reference.
	Within = "within"
	// Outside: it does not.
	Outside = "outside"
	// Untested: one of the two has no interval.
	Untested = "untested"
	// Pass and Fail: a synthetic-truth check of the demo.
	Pass = "pass"
	Fail = "fail"
	// Verdict is the name of the column or key holding one of these.
	Verdict = "verdict"
	// Mismatch: two runs were made with different settings (study,
	// conventions, regime definition) and are compared anyway.
	Mismatch = "mismatch"
)

// Unit strings (UDUNITS-2) used by lidscope's outputs.
const (
	UnitKelvin       = "K"
	UnitOne          = "1"
	UnitPerKelvin    = "K-1"
	UnitPerYear      = "yr-1"
	UnitSquareMetre  = "m2"
	UnitDegreesNorth = "degrees_north"
	UnitDegreesEast  = "degrees_east"
	UnitPercent      = "%"
	UnitMonth        = "month"
	UnitByte         = "byte"
	UnitSecond       = "s"
)

// SlopeUnits returns the units of a regression slope of a response in
// units ru on a predictor in units pu: "K-1" for a fraction on K, "W m-2
// K-1" for a flux on K. This is the one spelling of a slope's units in
// every file and figure.
func SlopeUnits(ru, pu string) string {
	inv := invert(pu)
	switch {
	case ru == "" || ru == "1":
		return inv
	case inv == "1":
		return ru
	}
	return ru + " " + inv
}

// invert returns the UDUNITS-2 text of 1/u for a product of powers such as
// "K", "m2" or "Pa s-1".
func invert(u string) string {
	if u == "" || u == "1" {
		return "1"
	}
	var out []string
	for _, f := range strings.Fields(u) {
		base, exp := f, 1
		if i := strings.IndexAny(f, "-0123456789"); i > 0 {
			base = f[:i]
			fmt.Sscanf(f[i:], "%d", &exp)
		}
		exp = -exp
		if exp == 1 {
			out = append(out, base)
		} else {
			out = append(out, fmt.Sprintf("%s%d", base, exp))
		}
	}
	return strings.Join(out, " ")
}

// Kind groups the terms of the table.
type Kind string

// The kinds of terms.
const (
	KindQuantity  Kind = "quantity"
	KindStatistic Kind = "statistic"
	KindRegime    Kind = "regime"
	KindVerdict   Kind = "verdict"
	KindRole      Kind = "input role"
	KindCF        Kind = "CF/NUG attribute"
	KindWord      Kind = "word"
)

// Term is one entry of the table of names.
type Term struct {
	Name string
	Kind Kind
	Doc  string
}

// words are the other terms names are made of (JSON keys, attributes,
// qualifiers). A name written to an output is a sequence of terms joined by
// "_" (see Check).
var words = []Term{
	// regimes
	{"convective", KindRegime, "regime: relative SST above the threshold"},
	{"transition", KindRegime, "regime: within the transition half-width"},
	{"subsidence", KindRegime, "regime: relative SST below the threshold"},
	{"regime", KindRegime, "the regime axis or key"},
	{"regimes", KindRegime, "per-regime object"},
	// verdicts
	{Within, KindVerdict, "estimate inside the combined interval"},
	{Outside, KindVerdict, "estimate outside the combined interval"},
	{Untested, KindVerdict, "no interval to test"},
	{Pass, KindVerdict, "synthetic-truth check passed"},
	{Fail, KindVerdict, "synthetic-truth check failed"},
	{Mismatch, KindVerdict, "runs made with different settings"},
	{"mismatches", KindVerdict, "list of mismatches"},
	{Verdict, KindVerdict, "column or key holding a verdict word"},
	// CF and NUG attributes (CF-1.10 §§2–7, NUG Appendix A)
	{"Conventions", KindCF, ""}, {"title", KindCF, ""}, {"source", KindCF, ""}, {"history", KindCF, ""},
	{"references", KindCF, ""}, {"comment", KindCF, ""}, {"units", KindCF, ""}, {"long_name", KindCF, ""},
	{"standard_name", KindCF, ""}, {"_FillValue", KindCF, ""}, {"cell_methods", KindCF, ""}, {"axis", KindCF, ""},
	{"bounds", KindCF, ""}, {"positive", KindCF, ""}, {"flag_values", KindCF, ""}, {"flag_meanings", KindCF, ""},
	{"coordinates", KindCF, ""}, {"calendar", KindCF, ""}, {"bnds", KindCF, "bounds dimension and suffix"},
	{"lat", KindCF, ""}, {"lon", KindCF, ""}, {"time", KindCF, ""}, {"p700", KindCF, "700 hPa scalar coordinate"},
	{"p500", KindCF, "500 hPa scalar coordinate"},
	// other words
}

// plain lists the other words, each documented by its use.
var plain = strings.Fields(`
	absolute area arch bin bins binned bootstrap box candidate candidates cells
	changed changes command condition config controls coefficients
	dataset date definition description dir domain domains duration
	east edges end failed first format version from go host inside
	independent areas indicator input files inputs joint composites kind
	label last layout lidscope library logistic maps method mode modified month
	name netcdf note notes omega_regimes os out of range outputs
	partial regressions patch path period predictor predictors processing
	quantities reference regions region relative replicates residual response responses
	rows run scalars scope season seasons sensitivities sha256 size south north west
	start steps study hash text threshold thresholds to tracking uncertainty
	value values weighting year years role cpus estimates
	before after change given on vs c
	grid ocean mask rule tropical detrended all
	flips flip perturbation crossing metrics conventions absent
	committed id manifest extras
	variable variables dimensions length unlimited usable problems recognised by conversion decoding fields
	standardised vif covariance cv penalty level excludes zero use
	cell_fold_years block_years fold without fit fits
	constraint constrained predicted actual contribution observed observations model control warm
	created
	`)

// syntheticWords are the parameters and records of the synthetic demo
// world (truth.json, package fixtures).
var syntheticWords = strings.Fields(`
	classifier clipped nudged options physics series seed resolution file
	equator pole warm_pool cold_tongue upwelling seasonal amplitude
	oscillation gain polar drop true sample noise land other months
	autocorrelated at
	factor factors names warming global planted sensitivity per advection missing
	weather shared variance fraction base trade meridional wind
	`)

// Terms returns the whole table of terms: quantities, statistics,
// regime-definition names, verdicts, roles, CF attributes and words, sorted
// by name.
func Terms() []Term {
	var out []Term
	for _, q := range quantities {
		out = append(out, Term{q.Name, KindQuantity, q.LongName})
	}
	for _, s := range statistics {
		out = append(out, Term{s, KindStatistic, ""})
	}
	for _, r := range roles {
		out = append(out, Term{r, KindRole, ""})
	}
	out = append(out, words...)
	for _, w := range plain {
		out = append(out, Term{w, KindWord, ""})
	}
	for _, w := range syntheticWords {
		out = append(out, Term{w, KindWord, "synthetic demo world"})
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Name < out[j].Name })
	return out
}

var statistics = []string{Mean, Std, StdErr, Count, NEff, CI, CILower, CIUpper, Lower, Upper, Lag1, Difference, Min, Max,
	Bias, PatternCorrelation, CentredRMSDifference, Frequency, PDF, Slope, Intercept, Correlation, R2, Coefficient,
	BandMean, CombinedHalfWidth, AreaFraction, TimeFraction, ConvectiveAreaFraction, Dwell, CrossingRate, ValidSteps,
	TimeSteps, SamplingFrequency, Delta, HalfWidth, Band, Percentile, RegimeDefinition, RegimeIndex, Relationships,
	RelationshipsMode}

var roles = []string{RoleSST, RoleAirTemperature, RoleSurfaceAirTemperature, RoleLowCloud, RoleCloud, RoleTOASWUp,
	RoleOLR, RoleOmega, RoleSurfacePressure, RoleSeaLevelPressure, RoleRelativeHumidity, RoleDewPointTemperature,
	RoleSpecificHumidity, RoleSeaFraction, RoleLandFraction, RoleSeaIce, RolePrecipitation, RoleEastwardWind, RoleNorthwardWind}

var termSet = func() map[string]bool {
	m := map[string]bool{}
	for _, t := range Terms() {
		m[t.Name] = true
	}
	return m
}()

// IsTerm reports whether s is one term of the table.
func IsTerm(s string) bool { return termSet[s] }

// Check reports whether name is made of terms of the table joined by "_"
// (e.g. "low_cloud_vs_eis_n_eff" = low_cloud + vs + eis + n_eff). extra
// are the user's own names that may appear in names (region, patch,
// season and dataset names). The error names the part that is not in the
// table.
func Check(name string, extra ...string) error {
	if termSet[name] {
		return nil
	}
	ex := map[string]bool{}
	for _, e := range extra {
		ex[e] = true
	}
	tok := strings.Split(name, "_")
	if strings.HasPrefix(name, "_") {
		tok = append([]string{"_" + tok[1]}, tok[2:]...)
	}
	n := len(tok)
	ok := make([]bool, n+1) // ok[i]: tok[:i] splits into terms
	ok[0] = true
	for j := 1; j <= n; j++ {
		for i := 0; i < j && !ok[j]; i++ {
			if !ok[i] {
				continue
			}
			w := strings.Join(tok[i:j], "_")
			ok[j] = termSet[w] || ex[w]
		}
	}
	if ok[n] {
		return nil
	}
	// the longest good prefix, to say which part is unknown
	last := 0
	for i := n; i >= 0; i-- {
		if ok[i] {
			last = i
			break
		}
	}
	return fmt.Errorf("name %q is not made of terms of the table of names (vocab): %q is not a term; use the table's name for it or add the term to package vocab", name, strings.Join(tok[last:], "_"))
}
