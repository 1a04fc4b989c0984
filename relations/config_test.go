package relations

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"lidscope/accumulate"
	"lidscope/regimes"
)

func TestDefaultsValid(t *testing.T) {
	if err := Defaults().Validate(); err != nil {
		t.Fatal(err)
	}
	c := Defaults()
	if len(c.DeltaT) != 8 || c.DeltaT[0] != -4 || c.DeltaT[7] != 4 || c.Bootstrap.BlockLength != 12 || c.Mode != Climatological || !math.IsNaN(c.IndicatorThreshold) {
		t.Errorf("defaults %+v", c)
	}
	for _, m := range []Mode{Climatological, Anomaly} {
		b := DefaultBins(m)
		for _, p := range []string{"eis", "lts", RelSST} {
			e := b[p]
			for k := 1; k < len(e); k++ {
				if !(e[k] > e[k-1]) {
					t.Errorf("%v %s edges not increasing", m, p)
				}
			}
		}
	}
	if got := DefaultBins(Climatological)["eis"]; got[0] != -6 || got[len(got)-1] != 14 || len(got) != 21 {
		t.Errorf("EIS default edges %v", got)
	}
}

func TestValidateRejects(t *testing.T) {
	cases := []struct {
		name string
		mod  func(*Config)
		want string
	}{
		{"mode", func(c *Config) { c.Mode = 7 }, "Mode"},
		{"detrend needs anomaly", func(c *Config) { c.Detrend = true }, "Detrend"},
		{"unknown predictor", func(c *Config) { c.Bins = map[string][]float64{"cloud": {0, 1}} }, "not a predictor"},
		{"one edge", func(c *Config) { c.Bins = map[string][]float64{"eis": {0}} }, "at least 2"},
		{"decreasing edges", func(c *Config) { c.Bins = map[string][]float64{"eis": {0, 2, 1}} }, "increase"},
		{"NaN edge", func(c *Config) { c.Bins = map[string][]float64{"eis": {0, math.NaN()}} }, "finite"},
		{"duplicate response", func(c *Config) { c.Responses = []string{"cloud", "cloud"} }, "distinct"},
		{"response is predictor", func(c *Config) { c.Responses = []string{"eis"}; c.Bins = DefaultBins(0) }, "also a predictor"},
		{"region name", func(c *Config) { c.Regions = []accumulate.Region{{Name: "two words", South: 0, North: 1}} }, "region name"},
		{"region reserved", func(c *Config) { c.Regions = []accumulate.Region{{Name: BandDomain, South: 0, North: 1}} }, "twice"},
		{"region box", func(c *Config) { c.Regions = []accumulate.Region{{Name: "r", South: 10, North: 0}} }, "south < north"},
		{"patch twice", func(c *Config) { c.Patches = []Patch{{Name: "p", North: 1}, {Name: "p", North: 1}} }, "patch name"},
		{"delta T", func(c *Config) { c.DeltaT = []float64{math.Inf(1)} }, "DeltaT"},
		{"bootstrap N", func(c *Config) { c.Bootstrap.N = -1 }, "Bootstrap.N"},
		{"block length", func(c *Config) { c.Bootstrap.BlockLength = 0 }, "BlockLength"},
		{"indicator", func(c *Config) { c.Indicator = "rain" }, "Indicator"},
		{"olr threshold", func(c *Config) { c.Indicator = IndicatorOLR; c.IndicatorThreshold = 0 }, "never holds"},
		{"precip threshold", func(c *Config) { c.Indicator = IndicatorPrecip; c.IndicatorThreshold = -1 }, "≥ 0"},
		{"threshold bins", func(c *Config) { c.Indicator = IndicatorOmega; c.ThresholdBinWidth = 0 }, "ThresholdBinWidth"},
		{"partial", func(c *Config) { c.Partial = [2]string{"eis", "eis"} }, "Partial"},
		{"decorrelation", func(c *Config) { c.DecorrelationLength = -1 }, "DecorrelationLength"},
		{"classifier", func(c *Config) { c.Classifier.HalfWidth = -1 }, "Classifier"},
	}
	for _, c := range cases {
		cfg := Defaults()
		c.mod(&cfg)
		err := cfg.Validate()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: err = %v, want one mentioning %q", c.name, err, c.want)
		}
	}
}

// Text is stable: fixed key order, the resolved defaults spelled out.
func TestConfigText(t *testing.T) {
	c := Defaults()
	c.Indicator = IndicatorOLR
	got := c.Text()
	keys := []string{"mode: climatological", "detrend: false", "bins.eis (K): [-6 -5", "bins.lts (K)", "bins.rel_sst (K): [-8 -7.5",
		"responses: auto", "seasons: false", "delta_t (K): [-4 -3 -2 -1 1 2 3 4]", "bootstrap: replicates 0, block length 12 steps, seed 20040101",
		"indicator: olr < 240 W m-2", "threshold_fit:", "omega_bins: false", "regime_definition: convective where", "partial_regression: eis + sst",
		"decorrelation_length (m): 1e+06"}
	pos := 0
	for _, k := range keys {
		i := strings.Index(got[pos:], k)
		if i < 0 {
			t.Fatalf("Text lacks %q after position %d:\n%s", k, pos, got)
		}
		pos += i
	}
	if c.Text() != got {
		t.Error("Text is not deterministic")
	}
	c.Mode = Anomaly
	if !strings.Contains(c.Text(), "bins.eis (K): [-3 -2.5") {
		t.Error("anomaly-mode default bins not in Text")
	}
}

func TestNewRejects(t *testing.T) {
	l := rowLayout(4, "sst", "lts", "eis", "cloud")
	cases := []struct {
		name string
		mod  func(*Config, *accumulate.Layout)
		want string
	}{
		{"missing predictor", func(c *Config, l *accumulate.Layout) { c.Bins = map[string][]float64{"ectei": {0, 1}} }, "not a quantity"},
		{"missing response", func(c *Config, l *accumulate.Layout) { c.Responses = []string{"olr"} }, "not a quantity"},
		{"no cloud", func(c *Config, l *accumulate.Layout) { l.Quantities = []string{"sst", "lts", "eis", "olr"} }, "no cloud"},
		{"missing indicator", func(c *Config, l *accumulate.Layout) { c.Indicator = IndicatorOmega }, "indicator"},
		{"empty region", func(c *Config, l *accumulate.Layout) {
			c.Regions = []accumulate.Region{{Name: "none", South: 50, North: 60, West: 0, East: 10}}
		}, "no grid cell"},
		{"empty patch", func(c *Config, l *accumulate.Layout) { c.Patches = []Patch{{Name: "none", South: 50, North: 60}} }, "no grid cell"},
		{"sizes", func(c *Config, l *accumulate.Layout) { l.Area = l.Area[:2] }, "sizes"},
	}
	for _, c := range cases {
		cfg := Defaults()
		lc := l
		lc.Quantities = append([]string(nil), l.Quantities...)
		c.mod(&cfg, &lc)
		_, err := New(cfg, lc, nil)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: err = %v, want one mentioning %q", c.name, err, c.want)
		}
	}
}

// Seasons: the DJF subset pools exactly the December–February steps, and
// the four seasons' counts add up to the whole record's.
func TestSeasons(t *testing.T) {
	w := synthWorld{cells: 6, steps: 36, a: 0.2, b: 0.05, sigma: 0.05, phiX: 0.3, phiE: 0.3, sdX: 1, meanX: 5, regime: regimes.Subsidence}
	cfg := Defaults()
	cfg.Seasons = true
	acc, err := New(cfg, w.layout(), nil)
	if err != nil {
		t.Fatal(err)
	}
	w.generate(rand.New(rand.NewPCG(3, 3)), acc.AddStep)
	res, _ := acc.Results()
	if strings.Join(res.Seasons, " ") != "all DJF MAM JJA SON" {
		t.Fatalf("seasons %v", res.Seasons)
	}
	var sum int64
	for _, s := range res.Seasons[1:] {
		r := findReg(t, res, BandDomain, s, regimes.Subsidence, "cloud", "eis")
		if r.N != 6*9 || r.Steps != 9 {
			t.Errorf("%s: N %d steps %d, want 54 and 9", s, r.N, r.Steps)
		}
		sum += r.N
	}
	if all := findReg(t, res, BandDomain, "all", regimes.Subsidence, "cloud", "eis"); all.N != sum {
		t.Errorf("whole record N %d ≠ Σ seasons %d", all.N, sum)
	}
}

// The regression bootstrap: deterministic for a seed, different for
// another, and calibrated: over 100 synthetic records (synthetic truth,
// cells independent, AR(1) in time) the mean bootstrap standard error
// (95 % width / 3.92) is within 20 % of the actual spread of the slopes
// across records (the spread itself is known to about 7 %).
func TestRegressionBootstrap(t *testing.T) {
	t.Parallel()
	w := synthWorld{cells: 16, steps: 240, a: 0.2, b: 0.05, sigma: 0.05, phiX: 0.6, phiE: 0.5, sdX: 1.5, meanX: 5, regime: regimes.Subsidence}
	run := func(rng *rand.Rand, seed uint64) Regression {
		cfg := Defaults()
		cfg.DecorrelationLength = 0
		cfg.Bootstrap = Bootstrap{N: 200, BlockLength: 12, Seed: seed}
		acc, _ := New(cfg, w.layout(), nil)
		w.generate(rng, acc.AddStep)
		res, err := acc.Results()
		if err != nil {
			t.Fatal(err)
		}
		return findReg(t, res, BandDomain, "all", regimes.Subsidence, "cloud", "eis")
	}
	a, b, c := run(rand.New(rand.NewPCG(61, 62)), 1), run(rand.New(rand.NewPCG(61, 62)), 1), run(rand.New(rand.NewPCG(61, 62)), 2)
	if *a.Boot != *b.Boot {
		t.Error("same seed, different bootstrap")
	}
	if *a.Boot == *c.Boot {
		t.Error("different seeds, identical bootstrap")
	}
	if !(a.Boot.Slope.Lo < a.Slope && a.Slope < a.Boot.Slope.Hi) || a.Boot.Failed != 0 {
		t.Errorf("bootstrap interval %+v around slope %g", a.Boot, a.Slope)
	}
	if testing.Short() {
		return
	}
	rng := rand.New(rand.NewPCG(63, 64))
	const n = 100
	var s, s2, bsd float64
	for k := 0; k < n; k++ {
		r := run(rng, uint64(k))
		s += r.Slope
		s2 += r.Slope * r.Slope
		bsd += (r.Boot.Slope.Hi - r.Boot.Slope.Lo) / 3.92
	}
	m := s / n
	sd := math.Sqrt(s2/n - m*m)
	t.Logf("slope spread across records %.3g, mean bootstrap SE %.3g", sd, bsd/n)
	if ratio := bsd / n / sd; ratio < 0.8 || ratio > 1.2 {
		t.Errorf("bootstrap SE / actual spread = %.2f, want 1 ± 0.2", ratio)
	}
}

// Automatic responses: the layout's cloud field first, then the others present.
func TestAutoResponses(t *testing.T) {
	l := rowLayout(2, "sst", "lts", "eis", "toa_sw_up", "low_cloud", "cloud")
	l.Cloud = "low_cloud"
	acc, err := New(Defaults(), l, nil)
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(acc.resp, " "); got != "low_cloud cloud toa_sw_up" {
		t.Errorf("responses %q", got)
	}
}
