package relations

import (
	"encoding/json"
	"fmt"
	"lidscope/internal/testutil"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/accumulate"
	"lidscope/regimes"
)

// wlsScript is weighted least squares written directly in Debian's numpy
// (independent of this package): coefficients by np.linalg.lstsq (SVD) on
// the √w-scaled design, weights rescaled to sum to n, σ² =
// Σ w e²/(n − p), cov = σ² (XᵀWX)⁻¹ (the weighted-least-squares
// convention, common practice), weighted correlation from np.cov with
// aweights.
const wlsScript = `
import json, sys
import numpy as np
d = np.loadtxt(sys.argv[1], delimiter=",")
eis, sst, y, w = d[:,0], d[:,1], d[:,2], d[:,3]
n = len(y)
w = w * n / w.sum()
def wls(cols):
    X = np.column_stack([np.ones(n)] + cols)
    XtW = X.T * w
    A = XtW @ X
    sw = np.sqrt(w)
    beta = np.linalg.lstsq(X * sw[:,None], y * sw, rcond=None)[0]
    e = y - X @ beta
    s2 = np.sum(w * e**2) / (n - X.shape[1])
    cov = s2 * np.linalg.inv(A)
    return beta.tolist(), np.sqrt(np.diag(cov)).tolist()
b1, se1 = wls([eis])
b2, se2 = wls([eis, sst])
c = np.cov(eis, y, aweights=w)
r = c[0,1] / np.sqrt(c[0,0]*c[1,1])
print(json.dumps({"simple": b1, "simple_se": se1, "partial": b2, "partial_se": se2, "r": float(r), "n": n}))
`

// The pooled weighted regressions of an accumulator run against numpy's
// weighted least squares on the same pooled samples (area weights of
// cells at different latitudes), to 1e-9.
func TestRegressionAgainstNumpy(t *testing.T) {
	t.Parallel()
	py := testutil.Python(t, "numpy")
	l := accumulate.Layout{NLat: 3, NLon: 6, Lat: []float64{-20, 0, 20}, Lon: []float64{-150, -90, -30, 30, 90, 150},
		Quantities: []string{"sst", "lts", "eis", "cloud"}}
	for j := 0; j < 3; j++ {
		for i := 0; i < 6; i++ {
			a := 1e10 * math.Cos(l.Lat[j]*math.Pi/180)
			l.Area = append(l.Area, a)
			l.BandWeight = append(l.BandWeight, a*(1-0.2*float64(j%2)))
		}
	}
	cfg := Defaults()
	acc, err := New(cfg, l, nil)
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(11, 12))
	var rows []string
	cl := regimes.Classifier{}
	for k := 0; k < 60; k++ {
		s := newStep(18, 4, k)
		for i := 0; i < 18; i++ {
			s.Rel[i] = float32(rng.NormFloat64() - 0.7)
			if i == 4 && k%5 == 0 {
				s.Rel[i] = float32(math.NaN()) // sometimes missing
			}
			s.Regime[i] = cl.Classify(float64(s.Rel[i]))
			sst := 300 + float64(s.Rel[i]) + 0.2*rng.NormFloat64()
			eis := 4 + 2*rng.NormFloat64() - 0.5*float64(s.Rel[i])
			y := 0.3 + 0.05*eis - 0.02*(sst-300) + 0.05*rng.NormFloat64()
			s.Values[0][i], s.Values[1][i], s.Values[2][i], s.Values[3][i] = float32(sst), float32(eis+11), float32(eis), float32(y)
			if s.Regime[i] == regimes.Subsidence {
				// The pooled sample as the accumulator sees it (float32 values, band weights).
				rows = append(rows, fmt.Sprintf("%.17g,%.17g,%.17g,%.17g", float64(s.Values[2][i]), float64(s.Values[0][i]), float64(s.Values[3][i]), l.BandWeight[i]))
			}
		}
		acc.AddStep(s)
	}
	res, err := acc.Results()
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "pooled.csv")
	if err := os.WriteFile(path, []byte(strings.Join(rows, "\n")+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command(py, "-c", wlsScript, path).CombinedOutput()
	if err != nil {
		t.Fatalf("numpy: %v\n%s", err, out)
	}
	var ref struct {
		Simple, SimpleSE, Partial, PartialSE []float64
		R                                    float64
		N                                    int
	}
	var raw map[string]json.RawMessage
	if err := json.Unmarshal(out, &raw); err != nil {
		t.Fatalf("%v: %s", err, out)
	}
	json.Unmarshal(raw["simple"], &ref.Simple)
	json.Unmarshal(raw["simple_se"], &ref.SimpleSE)
	json.Unmarshal(raw["partial"], &ref.Partial)
	json.Unmarshal(raw["partial_se"], &ref.PartialSE)
	json.Unmarshal(raw["r"], &ref.R)
	json.Unmarshal(raw["n"], &ref.N)

	var reg *Regression
	for k := range res.Regressions {
		g := &res.Regressions[k]
		if g.Domain == BandDomain && g.Season == "all" && g.Regime == regimes.Subsidence && g.Response == "cloud" && g.Predictor == "eis" {
			reg = g
		}
	}
	var par *Partial
	for k := range res.Partials {
		g := &res.Partials[k]
		if g.Domain == BandDomain && g.Season == "all" && g.Regime == regimes.Subsidence && g.Response == "cloud" {
			par = g
		}
	}
	if reg == nil || par == nil {
		t.Fatal("subsidence band regressions missing")
	}
	if reg.N != int64(ref.N) {
		t.Fatalf("pooled N = %d, numpy sample %d", reg.N, ref.N)
	}
	// Standard errors at N_eff = N, from the reported ones at N_eff.
	atN := func(se, neff float64, p int) float64 {
		return se * math.Sqrt((neff-float64(p)-1)/(float64(reg.N)-float64(p)-1))
	}
	checks := []struct {
		name      string
		got, want float64
	}{
		{"intercept", reg.Intercept, ref.Simple[0]},
		{"slope", reg.Slope, ref.Simple[1]},
		{"r", reg.R, ref.R},
		{"intercept SE at N", atN(reg.InterceptSE, reg.NEffSlope, 1), ref.SimpleSE[0]},
		{"slope SE at N", atN(reg.SlopeSE, reg.NEffSlope, 1), ref.SimpleSE[1]},
		{"partial intercept", par.Intercept, ref.Partial[0]},
		{"partial eis", par.Coef[0], ref.Partial[1]},
		{"partial sst", par.Coef[1], ref.Partial[2]},
		{"partial eis SE at N", atN(par.SE[0], par.NEff, 2), ref.PartialSE[1]},
		{"partial sst SE at N", atN(par.SE[1], par.NEff, 2), ref.PartialSE[2]},
	}
	for _, c := range checks {
		if math.Abs(c.got-c.want) > 1e-9*math.Max(1, math.Abs(c.want)) {
			t.Errorf("%s = %.15g, numpy WLS %.15g", c.name, c.got, c.want)
		}
	}
}
