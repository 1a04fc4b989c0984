package relations

import (
	"fmt"
	"math"
	"regexp"
	"sort"
	"strconv"
	"strings"

	"lidscope/accumulate"
	"lidscope/regimes"
	"lidscope/vocab"
)

// Mode says what the relationships are computed on.
type Mode int

const (
	// Climatological relates the values as they are: composites over
	// space and time, dominated by the geographic and seasonal contrasts
	// (e.g. the stratocumulus decks against the trade-cumulus regions).
	Climatological Mode = iota
	// Anomaly relates deseasonalised monthly anomalies: each value minus
	// the climatology of its cell and calendar month over the record
	// (optionally also minus a linear trend per cell and calendar month).
	Anomaly
)

// String names the mode as every output writes it.
func (m Mode) String() string {
	switch m {
	case Climatological:
		return "climatological"
	case Anomaly:
		return "anomaly"
	}
	return "Mode(" + strconv.Itoa(int(m)) + ")"
}

// ParseMode reads a mode name ("climatological" or "anomaly"; case and
// surrounding blanks are ignored).
func ParseMode(s string) (Mode, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "climatological":
		return Climatological, nil
	case "anomaly":
		return Anomaly, nil
	}
	return 0, fmt.Errorf("relations: unknown mode %q: use \"climatological\" (composites of the values) or \"anomaly\" (deseasonalised monthly anomalies)", s)
}

// Patch is a lat–lon box whose SST is perturbed in the flip analysis.
type Patch struct {
	Name                     string
	South, North, West, East float64 // degrees; West > East wraps across the dateline
}

func (p Patch) region() accumulate.Region {
	return accumulate.Region{Name: p.Name, South: p.South, North: p.North, West: p.West, East: p.East}
}

// Bootstrap configures the circular block bootstrap over time steps.
type Bootstrap struct {
	N           int    // replicates for the regression CIs; 0 = off
	BlockLength int    // block length in time steps (default 12)
	Seed        uint64 // seed of the resampling (fixed; recorded in every output)
}

// Indicator names of the convection indicators.
const (
	IndicatorOmega  = "omega"         // convective where omega500 < threshold (Pa s-1); ascent
	IndicatorPrecip = "precipitation" // convective where precipitation > threshold (kg m-2 s-1)
	IndicatorOLR    = "olr"           // convective where OLR < threshold (W m-2)
)

// Names of the derived predictor and the band domain.
const (
	RelSST     = vocab.RelSST    // SST − tropical-mean SST (accumulate.Step.Rel), K
	BandDomain = "tropical_band" // the domain of all band cells
)

// Config holds every choice of the relationship analysis. Start from
// Defaults; Validate names the first bad field; Text is a stable
// description that goes into every output.
type Config struct {
	Mode    Mode
	Detrend bool // anomaly mode: also remove a linear trend per cell and calendar month
	// Bins are the bin edges (strictly increasing, in K) per predictor:
	// "eis", "lts", "rel_sst" and optionally "sst", "t700", "ectei". A nil
	// map means DefaultBins(Mode). The predictors of the single-predictor
	// regressions are the keys of Bins.
	Bins map[string][]float64
	// Responses are the quantities related to the predictors. Nil means
	// the layout's cloud quantity (Layout.Cloud), then "cloud",
	// "low_cloud" and "toa_sw_up", those the layout has.
	Responses []string
	// Regions are further domains besides the tropical band.
	Regions []accumulate.Region
	// Seasons adds DJF, MAM, JJA and SON subsets to the whole record.
	Seasons bool
	// Patches and DeltaT (K) define the perturbation flips.
	Patches []Patch
	DeltaT  []float64
	// Bootstrap adds block-bootstrap CIs to the regressions when N > 0;
	// its BlockLength and Seed are also used for the threshold CI.
	Bootstrap Bootstrap
	// Indicator ("" = no threshold estimation, "omega", "precipitation",
	// "olr") and its threshold in SI units of the quantity; NaN means
	// DefaultIndicatorThreshold(Indicator).
	Indicator          string
	IndicatorThreshold float64
	// OmegaBins adds the omega500 regime composites (Bony et al. 2004)
	// when the layout has "omega".
	OmegaBins bool

	// Classifier is the regime definition of the run (needed to
	// reclassify perturbed SSTs in the flip analysis).
	Classifier regimes.Classifier
	// Regimes is the whole regime definition (for its text; its fixed
	// classifier is Classifier). A zero Regimes leaves the text to
	// Classifier.
	Regimes regimes.Definition
	// Partial are the two predictors of the partial regression (default
	// "eis" and "sst").
	Partial [2]string
	// DecorrelationLength (m) sets the independent-area count of the
	// effective sample size: one independent sample per L² of sampled
	// area per time step (default 1e6 m). 0 counts every cell as
	// independent.
	DecorrelationLength float64
	// ThresholdReplicates is the number of bootstrap replicates of the
	// threshold CI (default 1000).
	ThresholdReplicates int
	// ThresholdBinWidth (K) is the relative-SST bin of the logistic fit
	// (default 0.05 K, bins from ThresholdRange[0] to ThresholdRange[1]).
	ThresholdBinWidth float64
	ThresholdRange    [2]float64
}

// Defaults returns the default configuration (climatological mode,
// default bins, ΔT = ±1…±4 K, no bootstrap of the regressions, no
// threshold estimation, δ = 0 K).
func Defaults() Config {
	return Config{
		Mode:                Climatological,
		DeltaT:              []float64{-4, -3, -2, -1, 1, 2, 3, 4},
		Bootstrap:           Bootstrap{N: 0, BlockLength: 12, Seed: 20040101},
		IndicatorThreshold:  math.NaN(),
		Partial:             [2]string{"eis", "sst"},
		DecorrelationLength: 1e6,
		ThresholdReplicates: 1000,
		ThresholdBinWidth:   0.05,
		ThresholdRange:      [2]float64{-12, 8},
	}
}

// DefaultBins returns the default bin edges (K) of a mode. Climatological:
// EIS −6…14 K and LTS 6…30 K in 1 K bins, relative SST −8…4 K in 0.5 K
// bins. Anomaly: EIS and LTS −3…3 K in 0.5 K bins, relative SST −2…2 K in
// 0.25 K bins.
func DefaultBins(m Mode) map[string][]float64 {
	if m == Anomaly {
		return map[string][]float64{
			"eis":  edges(-3, 3, 0.5),
			"lts":  edges(-3, 3, 0.5),
			RelSST: edges(-2, 2, 0.25),
		}
	}
	return map[string][]float64{
		"eis":  edges(-6, 14, 1),
		"lts":  edges(6, 30, 1),
		RelSST: edges(-8, 4, 0.5),
	}
}

// edges returns lo, lo+w, …, hi (computed as lo + k·w, no accumulation).
func edges(lo, hi, w float64) []float64 {
	n := int(math.Round((hi - lo) / w))
	out := make([]float64, n+1)
	for k := range out {
		out[k] = lo + float64(k)*w
	}
	return out
}

// DefaultIndicatorThreshold returns the default threshold of an indicator
// in SI units: omega500 < 0 Pa s-1 (ascent), precipitation > 5 mm d-1
// (5/86400 kg m-2 s-1; a choice, the order of the rain rate of tropical
// convective regions — from memory), OLR < 240 W m-2 (common practice for
// deep convection). NaN for an unknown indicator.
func DefaultIndicatorThreshold(ind string) float64 {
	switch ind {
	case IndicatorOmega:
		return 0
	case IndicatorPrecip:
		return 5.0 / 86400
	case IndicatorOLR:
		return 240
	}
	return math.NaN()
}

// kelvinPredictors are the quantities allowed as predictors (all in K):
// the predictors of the table of names (package vocab).
var kelvinPredictors = func() map[string]bool {
	m := map[string]bool{}
	for _, p := range vocab.Predictors() {
		m[p] = true
	}
	return m
}()

func predictorList() string { return strings.Join(vocab.Predictors(), ", ") }

var nameRE = regexp.MustCompile(`^[A-Za-z][A-Za-z0-9_.+@-]*$`)

// Validate checks the configuration on its own (New also checks it
// against the layout).
func (c Config) Validate() error {
	for _, check := range []func() error{c.validateMode, c.validateBins, c.validateResponses,
		c.validateNames, c.validateSampling, c.validateIndicator, c.validateRegression} {
		if err := check(); err != nil {
			return err
		}
	}
	return nil
}

// validateMode checks the mode and detrending.
func (c Config) validateMode() error {
	if c.Mode != Climatological && c.Mode != Anomaly {
		return fmt.Errorf("relations: Config.Mode = %v: use Climatological or Anomaly", c.Mode)
	}
	if c.Detrend && c.Mode != Anomaly {
		return fmt.Errorf("relations: Config.Detrend needs Mode = Anomaly (a trend is removed from the anomalies only)")
	}
	return nil
}

// validateBins checks the bin edges of each predictor.
func (c Config) validateBins() error {
	for _, p := range sortedKeys(c.Bins) {
		e := c.Bins[p]
		if !kelvinPredictors[p] {
			return fmt.Errorf("relations: Config.Bins[%q]: %q is not a predictor; use one of %s (all in K)", p, p, predictorList())
		}
		if len(e) < 2 {
			return fmt.Errorf("relations: Config.Bins[%q] has %d edges; give at least 2", p, len(e))
		}
		for k, x := range e {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				return fmt.Errorf("relations: Config.Bins[%q] edge %d is %v; edges must be finite", p, k, x)
			}
			if k > 0 && !(x > e[k-1]) {
				return fmt.Errorf("relations: Config.Bins[%q] edges must increase strictly: edge %d = %g after %g", p, k, x, e[k-1])
			}
		}
	}
	return nil
}

// validateResponses checks that the responses are distinct and not
// predictors.
func (c Config) validateResponses() error {
	seen := map[string]bool{}
	for _, r := range c.Responses {
		if r == "" || seen[r] {
			return fmt.Errorf("relations: Config.Responses %v: names must be non-empty and distinct", c.Responses)
		}
		seen[r] = true
		if kelvinPredictors[r] && (c.Bins[r] != nil || r == c.Partial[0] || r == c.Partial[1]) {
			return fmt.Errorf("relations: Config.Responses: %q is also a predictor", r)
		}
	}
	return nil
}

// validateNames checks the names and boxes of the regions and patches.
func (c Config) validateNames() error {
	names := map[string]bool{BandDomain: true}
	for _, r := range c.Regions {
		if !nameRE.MatchString(r.Name) {
			return fmt.Errorf("relations: region name %q: use a letter followed by letters, digits or _ . + @ - (it becomes a NetCDF flag meaning)", r.Name)
		}
		if names[r.Name] {
			return fmt.Errorf("relations: region name %q is used twice (or is the reserved %q)", r.Name, BandDomain)
		}
		names[r.Name] = true
		if err := box(r.South, r.North, r.West, r.East); err != nil {
			return fmt.Errorf("relations: region %q: %w", r.Name, err)
		}
	}
	pn := map[string]bool{}
	for _, p := range c.Patches {
		if !nameRE.MatchString(p.Name) || pn[p.Name] {
			return fmt.Errorf("relations: patch name %q: names must be distinct, a letter followed by letters, digits or _ . + @ -", p.Name)
		}
		pn[p.Name] = true
		if err := box(p.South, p.North, p.West, p.East); err != nil {
			return fmt.Errorf("relations: patch %q: %w", p.Name, err)
		}
	}
	return nil
}

// validateSampling checks the SST perturbations and the bootstrap.
func (c Config) validateSampling() error {
	for k, d := range c.DeltaT {
		if math.IsNaN(d) || math.IsInf(d, 0) || math.Abs(d) > 50 {
			return fmt.Errorf("relations: Config.DeltaT[%d] = %v K must be finite and within ±50 K", k, d)
		}
	}
	if c.Bootstrap.N < 0 || c.Bootstrap.N > 100000 {
		return fmt.Errorf("relations: Config.Bootstrap.N = %d: use 0 (off) to 100000 replicates", c.Bootstrap.N)
	}
	if c.Bootstrap.BlockLength < 1 {
		return fmt.Errorf("relations: Config.Bootstrap.BlockLength = %d time steps must be ≥ 1 (default 12)", c.Bootstrap.BlockLength)
	}
	return nil
}

// validateIndicator checks the convection indicator of the threshold and
// its settings.
func (c Config) validateIndicator() error {
	switch c.Indicator {
	case "":
	case IndicatorOmega, IndicatorPrecip, IndicatorOLR:
		t := c.IndicatorThreshold
		if math.IsInf(t, 0) {
			return fmt.Errorf("relations: Config.IndicatorThreshold = %v must be finite (NaN for the default)", t)
		}
		if c.Indicator == IndicatorOLR && t <= 0 {
			return fmt.Errorf("relations: Config.IndicatorThreshold = %g W m-2 for olr: OLR < %g never holds; use e.g. 240 (NaN for the default)", t, t)
		}
		if c.Indicator == IndicatorPrecip && t < 0 {
			return fmt.Errorf("relations: Config.IndicatorThreshold = %g kg m-2 s-1 for precipitation must be ≥ 0", t)
		}
		if c.ThresholdReplicates < 0 || c.ThresholdReplicates > 100000 {
			return fmt.Errorf("relations: Config.ThresholdReplicates = %d: use 0 (no CI) to 100000", c.ThresholdReplicates)
		}
		if !(c.ThresholdBinWidth > 0) || !(c.ThresholdRange[1] > c.ThresholdRange[0]) || math.IsInf(c.ThresholdRange[0], 0) || math.IsInf(c.ThresholdRange[1], 0) {
			return fmt.Errorf("relations: Config.ThresholdBinWidth = %v K and ThresholdRange = %v K: need a positive width and a finite increasing range", c.ThresholdBinWidth, c.ThresholdRange)
		}
		if (c.ThresholdRange[1]-c.ThresholdRange[0])/c.ThresholdBinWidth > 100000 {
			return fmt.Errorf("relations: Config.ThresholdBinWidth = %g K makes more than 100000 bins; use a wider bin", c.ThresholdBinWidth)
		}
	default:
		return fmt.Errorf("relations: Config.Indicator = %q: use \"\" (none), %q, %q or %q", c.Indicator, IndicatorOmega, IndicatorPrecip, IndicatorOLR)
	}
	return nil
}

// validateRegression checks the partial regression's predictors, the
// decorrelation length and the classifier.
func (c Config) validateRegression() error {
	if c.Partial[0] == "" || c.Partial[1] == "" || c.Partial[0] == c.Partial[1] || !kelvinPredictors[c.Partial[0]] || !kelvinPredictors[c.Partial[1]] {
		return fmt.Errorf("relations: Config.Partial = %q: give two different predictors among %s", c.Partial, predictorList())
	}
	if !(c.DecorrelationLength >= 0) || math.IsInf(c.DecorrelationLength, 0) {
		return fmt.Errorf("relations: Config.DecorrelationLength = %v m must be finite and ≥ 0 (default 1e6)", c.DecorrelationLength)
	}
	if err := c.Classifier.Validate(); err != nil {
		return fmt.Errorf("relations: Config.Classifier: %w", err)
	}
	return nil
}

func box(s, n, w, e float64) error {
	for _, x := range []float64{s, n, w, e} {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return fmt.Errorf("box %g…%g N, %g…%g E: bounds must be finite", s, n, w, e)
		}
	}
	if !(s < n) || s < -90 || n > 90 {
		return fmt.Errorf("box %g…%g N: need −90 ≤ south < north ≤ 90", s, n)
	}
	return nil
}

// bins returns the bins in use: Config.Bins, or DefaultBins(Mode) when nil.
func (c Config) bins() map[string][]float64 {
	if c.Bins == nil {
		return DefaultBins(c.Mode)
	}
	return c.Bins
}

// indicatorThreshold returns the threshold in use.
func (c Config) indicatorThreshold() float64 {
	if math.IsNaN(c.IndicatorThreshold) {
		return DefaultIndicatorThreshold(c.Indicator)
	}
	return c.IndicatorThreshold
}

// Text describes the configuration, one "key: value" line each, in a
// fixed order (new keys are appended, never reordered).
func (c Config) Text() string {
	var b strings.Builder
	line := func(k, v string) { b.WriteString(k + ": " + v + "\n") }
	g := func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
	gs := func(x []float64) string {
		s := make([]string, len(x))
		for i, v := range x {
			s[i] = g(v)
		}
		return "[" + strings.Join(s, " ") + "]"
	}
	line("mode", c.Mode.String())
	line("detrend", strconv.FormatBool(c.Detrend))
	bins := c.bins()
	for _, p := range sortedKeys(bins) {
		line("bins."+p+" (K)", gs(bins[p]))
	}
	if c.Responses == nil {
		line("responses", "auto (cloud, low_cloud, toa_sw_up when present)")
	} else {
		line("responses", strings.Join(c.Responses, " "))
	}
	for _, r := range c.Regions {
		line("region."+r.Name, fmt.Sprintf("%g…%g N, %g…%g E", r.South, r.North, r.West, r.East))
	}
	line("seasons", strconv.FormatBool(c.Seasons))
	for _, p := range c.Patches {
		line("patch."+p.Name, fmt.Sprintf("%g…%g N, %g…%g E", p.South, p.North, p.West, p.East))
	}
	line("delta_t (K)", gs(c.DeltaT))
	line("bootstrap", fmt.Sprintf("replicates %d, block length %d steps, seed %d", c.Bootstrap.N, c.Bootstrap.BlockLength, c.Bootstrap.Seed))
	if c.Indicator == "" {
		line("indicator", "none")
	} else {
		op := "<"
		if c.Indicator == IndicatorPrecip {
			op = ">"
		}
		line("indicator", fmt.Sprintf("%s %s %s %s", c.Indicator, op, g(c.indicatorThreshold()), indicatorUnits[c.Indicator]))
		line("threshold_fit", fmt.Sprintf("logistic regression on relative SST in %g K bins over %g…%g K, %d block-bootstrap replicates", c.ThresholdBinWidth, c.ThresholdRange[0], c.ThresholdRange[1], c.ThresholdReplicates))
	}
	line("omega_bins", strconv.FormatBool(c.OmegaBins))
	line("regime_definition", c.regimeText())
	line("partial_regression", c.Partial[0]+" + "+c.Partial[1])
	line("decorrelation_length (m)", g(c.DecorrelationLength))
	return b.String()
}

var indicatorUnits = map[string]string{IndicatorOmega: "Pa s-1", IndicatorPrecip: "kg m-2 s-1", IndicatorOLR: "W m-2"}

func sortedKeys[V any](m map[string]V) []string {
	out := make([]string, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// regimeText states the regime definition.
func (c Config) regimeText() string {
	if c.Regimes.Band != (regimes.Band{}) {
		return c.Regimes.String()
	}
	return c.Classifier.String()
}
