package constraint

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/factors"
	"lidscope/fixtures"
	"lidscope/netcdf"
)

// truthRun turns a synthetic world's truth record into factor results with
// the planted sensitivities as exact coefficients (zero covariance) and
// the truth's area- and time-mean factors and cloud as the domain means
// (zero standard errors): one fit per region (regime "all") and the band's
// subsidence regime.
func truthRun(t *testing.T, tr *fixtures.Truth) *Run {
	t.Helper()
	ft := tr.Factors
	p := len(ft.Names)
	res := &factors.Results{Response: "low_cloud", ResponseUnits: "1", Method: factors.MethodOLS, Level: 0.95}
	for i, n := range ft.Names {
		res.Factors = append(res.Factors, factors.FactorInfo{Name: n, Units: ft.Units[i]})
	}
	run := NewRun(tr.Options.Name, res)
	add := func(domain, regime string, m fixtures.FactorMeans) {
		fit := factors.RegionFit{Domain: domain, Regime: regime, N: int64(len(tr.Months)), Cov: make([]float64, p*p)}
		for i, n := range ft.Names {
			fit.Sens = append(fit.Sens, factors.Sensitivity{Factor: n, Units: ft.Units[i], Coef: ft.Planted[i], Mean: m.Factors[i]})
		}
		res.Fits = append(res.Fits, fit)
		run.SetResponseMean(domain, regime, m.Cloud, 0)
	}
	for _, m := range ft.Regions {
		add(m.Name, "all", m)
	}
	add("tropical_band", "subsidence", ft.Subsidence)
	return run
}

// TestPlantedChangeRecovered: with the planted sensitivities and a control
// world and its warm twin (fixtures.WarmTwin), the constrained change is the
// planted Σ_i s_i Δx_i/ΔT of fixtures.PlantedChange, and — the cloud model
// being linear and the noise the same realisation in both worlds — equal
// to the model's own change wherever the cloud is in the subsidence
// regime; the self-consistency (the model's own sensitivities, here the
// same) agrees too.
//
// Tolerance: Compute and PlantedChange do the same arithmetic on the same
// numbers in another order, so they agree to rounding (1e-12 relative);
// against the model's own change the float32 storage of the cloud in %
// (ulp 3.8e-8 as a fraction near 50 %) over ΔT = 4 K bounds the
// difference by 1e-8 per K.
func TestPlantedChangeRecovered(t *testing.T) {
	t.Parallel()
	opt := fixtures.DefaultOptions()
	opt.Resolution, opt.Years, opt.YearsPerFile = 4, 2, 2
	ctrl, err := fixtures.Generate(t.TempDir(), opt)
	if err != nil {
		t.Fatal(err)
	}
	warm, err := fixtures.Generate(t.TempDir(), fixtures.WarmTwin(opt, 4))
	if err != nil {
		t.Fatal(err)
	}
	want, err := fixtures.PlantedChange(ctrl, warm, nil)
	if err != nil {
		t.Fatal(err)
	}
	obs, c, w := truthRun(t, ctrl), truthRun(t, ctrl), truthRun(t, warm)
	res, err := Compute(obs, c, w, Options{Warming: want[0].Warming})
	if err != nil {
		t.Fatal(err)
	}
	subsidenceOnly := map[string]bool{"upwelling_magna_north": true, "upwelling_magna_south": true,
		"upwelling_parva_north": true, "upwelling_parva_south": true, "subsidence": true}
	for _, ch := range want {
		domain, regime := ch.Name, "all"
		if ch.Name == "subsidence" {
			domain, regime = "tropical_band", "subsidence"
		}
		d, ok := res.Domain(domain, regime)
		if !ok {
			t.Fatalf("no result for %s/%s", domain, regime)
		}
		if e := math.Abs(d.Constrained.Value - ch.Planted); e > 1e-12*math.Abs(ch.Planted) {
			t.Errorf("%s: constrained %.12g, planted %.12g", ch.Name, d.Constrained.Value, ch.Planted)
		}
		if d.Constrained.SE != 0 || d.Predicted.Value != d.Constrained.Value {
			t.Errorf("%s: exact inputs give SE %g and predicted %g (constrained %g)", ch.Name, d.Constrained.SE, d.Predicted.Value, d.Constrained.Value)
		}
		var sum float64
		for i, f := range d.Factors {
			sum += f.Contribution
			if math.Abs(f.PerKelvin-ch.PerKelvin[i]) > 1e-12*math.Max(1e-9, math.Abs(ch.PerKelvin[i])) {
				t.Errorf("%s: Δ%s/ΔT %g, want %g", ch.Name, f.Factor, f.PerKelvin, ch.PerKelvin[i])
			}
		}
		if math.Abs(sum-d.Constrained.Value) > 1e-15 {
			t.Errorf("%s: contributions sum to %g, constrained %g", ch.Name, sum, d.Constrained.Value)
		}
		if subsidenceOnly[ch.Name] {
			if e := math.Abs(d.Actual.Value - d.Constrained.Value); e > 1e-8 {
				t.Errorf("%s: the model's own change %.10g differs from the constrained %.10g by %.2g", ch.Name, d.Actual.Value, d.Constrained.Value, e)
			}
		}
	}
}

// TestMismatchedRuns: runs that do not belong together are refused, with
// what differs and where.
func TestMismatchedRuns(t *testing.T) {
	t.Parallel()
	mk := func(name string, fs ...string) *Run {
		res := &factors.Results{Response: "low_cloud", ResponseUnits: "1", Method: factors.MethodOLS, Level: 0.95}
		fit := factors.RegionFit{Domain: "tropical_band", Regime: "subsidence", N: 120, Cov: make([]float64, len(fs)*len(fs))}
		for _, f := range fs {
			res.Factors = append(res.Factors, factors.FactorInfo{Name: f, Units: "K"})
			fit.Sens = append(fit.Sens, factors.Sensitivity{Factor: f, Units: "K", Coef: 0.01, Mean: 290})
		}
		res.Fits = []factors.RegionFit{fit}
		return NewRun(name, res)
	}
	cases := []struct {
		name            string
		obs, ctrl, warm *Run
		opt             Options
		want            string
		mismatch        bool
	}{
		{"factor lists", mk("obs", "sst", "eis"), mk("ctrl", "sst"), mk("warm", "sst"), Options{Warming: 4}, "the factors differ", true},
		{"factor order", mk("obs", "sst", "eis"), mk("ctrl", "eis", "sst"), mk("warm", "eis", "sst"), Options{Warming: 4}, "the factors differ", true},
		{"warm factors", mk("obs", "sst"), mk("ctrl", "sst"), mk("warm", "eis"), Options{Warming: 4}, "the model's warm run (warm) has eis", true},
		{"response", mk("obs", "sst"), mk("ctrl", "sst"), func() *Run { r := mk("warm", "sst"); r.Factors.Response = "cloud"; return r }(), Options{Warming: 4}, "the response differs", true},
		{"studies", mk("obs", "sst"), func() *Run { r := mk("ctrl", "sst"); r.study["analysis"] = `{"band":1}`; return r }(), mk("warm", "sst"), Options{Warming: 4}, "different studies: their analysis blocks differ", true},
		{"conventions", mk("obs", "sst"), func() *Run { r := mk("ctrl", "sst"); r.conventions = "svp=a"; return r }(), mk("warm", "sst"), Options{Warming: 4}, "metrics conventions", true},
		{"negative warming", mk("obs", "sst"), mk("ctrl", "sst"), mk("warm", "sst"), Options{Warming: -1}, "must be positive", false},
		{"no warming", mk("obs", "sst"), mk("ctrl", "sst"), mk("warm", "sst"), Options{}, "give the global-mean surface warming", false},
		{"warming without maps", mk("obs", "sst"), mk("ctrl", "sst"), mk("warm", "sst"), Options{WarmingFrom: "sst"}, "has no maps.nc", false},
		{"level", mk("obs", "sst"), mk("ctrl", "sst"), mk("warm", "sst"), Options{Warming: 4, Level: 95}, "interval level 95", false},
	}
	for _, c := range cases {
		_, err := Compute(c.obs, c.ctrl, c.warm, c.opt)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one saying %q", c.name, err, c.want)
			continue
		}
		if errors.Is(err, ErrMismatch) != c.mismatch {
			t.Errorf("%s: errors.Is(ErrMismatch) = %v, want %v", c.name, !c.mismatch, c.mismatch)
		}
	}
}

// dirStager writes into a plain folder.
type dirStager string

func (d dirStager) Path(n string) string { return filepath.Join(string(d), n) }
func (d dirStager) WriteFile(n string, b []byte) error {
	return os.WriteFile(filepath.Join(string(d), n), b, 0o644)
}

// TestStageRead: Stage writes every file; Read gives the domains back; the
// NetCDF maps hold the per-cell results.
func TestStageRead(t *testing.T) {
	t.Parallel()
	obs := coverageRun(t, 11, trueObsBeta, [3]float64{298, 5, 0.6}, true)
	ctrl := coverageRun(t, 12, trueModelBeta, [3]float64{298, 5, 0.6}, true)
	warm := coverageRun(t, 13, trueModelBeta, [3]float64{298 + dMean[0], 5 + dMean[1], 0.6 + dMean[2]}, true)
	res, err := Compute(obs, ctrl, warm, Options{Warming: 4})
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	if err := Stage(dirStager(dir), res, Meta{Version: "test", Command: []string{"lidscope", "constrain"}}); err != nil {
		t.Fatal(err)
	}
	for _, n := range OutputNames() {
		if _, err := os.Stat(filepath.Join(dir, n)); err != nil {
			t.Errorf("%s not written: %v", n, err)
		}
	}
	back, err := Read(dir)
	if err != nil {
		t.Fatal(err)
	}
	if len(back.Domains) != len(res.Domains) || back.Warming != 4 || len(back.Factors) != 3 {
		t.Fatalf("read back %d domains, warming %g, %d factors", len(back.Domains), back.Warming, len(back.Factors))
	}
	for i, d := range res.Domains {
		b := back.Domains[i]
		if b.Constrained != d.Constrained || b.Domain != d.Domain || b.Factors[2].Contribution != d.Factors[2].Contribution {
			t.Errorf("domain %d read back as %+v, wrote %+v", i, b.Constrained, d.Constrained)
		}
	}
	f, err := netcdf.Open(filepath.Join(dir, MapsFile))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	v, err := f.Var("constrained_change")
	if err != nil {
		t.Fatal(err)
	}
	x, err := v.ReadAllFloat64()
	if err != nil {
		t.Fatal(err)
	}
	for k := range x {
		if math.Abs(x[k]-res.Cells.Constrained[k]) > 1e-15 || math.IsNaN(x[k]) {
			t.Fatalf("cell %d: %g in the file, %g computed", k, x[k], res.Cells.Constrained[k])
		}
	}
	if _, err := Read(t.TempDir()); err == nil || !strings.Contains(err.Error(), "not a constraint folder") {
		t.Errorf("Read of an empty folder: %v", err)
	}
}

func TestParseWarming(t *testing.T) {
	t.Parallel()
	cases := []struct {
		in      string
		warming float64
		from    string
		err     string
	}{
		{"4.1K", 4.1, "", ""}, {" 4 K", 4, "", ""}, {"3.5degC", 3.5, "", ""}, {"sst", 0, "sst", ""},
		{"surface_air_temperature", 0, "surface_air_temperature", ""},
		{"4", 0, "", "has no units"}, {"-2K", 0, "", "must be positive"}, {"0K", 0, "", "must be positive"},
		{"xK", 0, "", "not a number"}, {"", 0, "", "give the global-mean"}, {"4 kelvin!", 0, "", "neither"},
	}
	for _, c := range cases {
		o, err := ParseWarming(c.in)
		switch {
		case c.err != "":
			if err == nil || !strings.Contains(err.Error(), c.err) {
				t.Errorf("ParseWarming(%q): error %v, want %q", c.in, err, c.err)
			}
		case err != nil:
			t.Errorf("ParseWarming(%q): %v", c.in, err)
		case o.Warming != c.warming || o.WarmingFrom != c.from:
			t.Errorf("ParseWarming(%q) = %+v", c.in, o)
		}
	}
}

// TestCompareModels: constraints by one set of observations are set side
// by side; other observations or levels are refused.
func TestCompareModels(t *testing.T) {
	t.Parallel()
	obs := coverageRun(t, 21, trueObsBeta, baseMean, false)
	var results []*Result
	for k, beta := range [][3]float64{trueModelBeta, {-0.02, 0.01, 0.1}} {
		ctrl := coverageRun(t, uint64(22+2*k), beta, baseMean, false)
		warm := coverageRun(t, uint64(23+2*k), beta, [3]float64{baseMean[0] + dMean[0], baseMean[1] + dMean[1], baseMean[2] + dMean[2]}, false)
		ctrl.Dataset = []string{"model-a", "model-b"}[k]
		r, err := Compute(obs, ctrl, warm, Options{Warming: covWarming})
		if err != nil {
			t.Fatal(err)
		}
		results = append(results, r)
	}
	c, err := CompareModels(results, []string{"a", "b"}, "", "")
	if err != nil {
		t.Fatal(err)
	}
	if len(c.Models) != 2 || c.Models[1].Name != "model-b" || len(c.ObsCoef) != 3 {
		t.Fatalf("comparison %+v", c)
	}
	if d := math.Abs(c.Models[1].ModelCoef[0] - (-0.02)); d > 5*c.Models[1].ModelCoefSE[0] {
		t.Errorf("model-b's SST sensitivity %g ± %g, planted −0.02", c.Models[1].ModelCoef[0], c.Models[1].ModelCoefSE[0])
	}
	rows := ComparisonRows(c)
	if want := 1 + 3 + 2*(3+3+1); len(rows) != want {
		t.Errorf("%d rows, want %d", len(rows), want)
	}
	other := *results[1]
	other.Level = 0.9
	if _, err := CompareModels([]*Result{results[0], &other}, []string{"a", "b"}, "", ""); err == nil || !errors.Is(err, ErrMismatch) {
		t.Errorf("levels 0.95 and 0.9 compared: %v", err)
	}
	other = *results[1]
	other.Observations.Dataset = "other-obs"
	if _, err := CompareModels([]*Result{results[0], &other}, []string{"a", "b"}, "", ""); err == nil || !strings.Contains(err.Error(), "same observations") {
		t.Errorf("other observations compared: %v", err)
	}
	if _, err := CompareModels(results, []string{"a", "b"}, "nowhere", "all"); err == nil || !strings.Contains(err.Error(), "no constraint of nowhere/all") {
		t.Errorf("missing domain: %v", err)
	}
}
