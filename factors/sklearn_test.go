package factors

import (
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/internal/testutil"
)

// refScript fits the same design matrix with Debian's scikit-learn and
// numpy, independently of this package:
//   - LinearRegression (sample_weight) on the raw factors: OLS coefficients;
//   - Ridge(alpha = Σw·λ) on factors standardised with their weighted mean
//     and population standard deviation (for unit weights alpha = n·λ);
//   - numpy: the same ridge by np.linalg.lstsq on the √w-scaled design
//     augmented with √(Σw λ)·I rows; the coefficient covariance
//     σ̂²(ZᵀWZ+αI)⁻¹ZᵀWZ(ZᵀWZ+αI)⁻¹ with σ̂² = Σwe²·n/Σw/(n − p − 1)
//     (OLS for λ = 0: σ̂²(ZᵀWZ)⁻¹, common practice);
//   - VIF_j = 1/(1 − R_j²) from the weighted regression of factor j on
//     the others (np.linalg.lstsq);
//   - blocked cross-validation: for each fold, Ridge fitted on the other
//     folds (standardised with their own weighted moments), held-out
//     Σ w e² summed over folds.
const refScript = `
import json, sys
import numpy as np
from sklearn.linear_model import LinearRegression, Ridge
d = np.loadtxt(sys.argv[1], delimiter=",")
lams = [float(s) for s in sys.argv[2].split(",")]
p = d.shape[1] - 3
X, y, w, fold = d[:, :p], d[:, p], d[:, p+1], d[:, p+2].astype(int)
n = len(y)
def std(X, w):
    m = np.average(X, axis=0, weights=w)
    s = np.sqrt(np.average((X - m)**2, axis=0, weights=w))
    return m, s
out = {}
lr = LinearRegression().fit(X, y, sample_weight=w)
out["ols_coef"] = lr.coef_.tolist(); out["ols_intercept"] = float(lr.intercept_)
m, s = std(X, w)
Z = (X - m) / s
W = w.sum()
fits = []
for lam in lams:
    r = Ridge(alpha=W*lam, solver="cholesky").fit(Z, y, sample_weight=w)
    sw = np.sqrt(w)
    zc = Z - np.average(Z, axis=0, weights=w)
    yc = y - np.average(y, weights=w)
    A = np.vstack([zc * sw[:, None], np.sqrt(W*lam) * np.eye(p)])
    bnp = np.linalg.lstsq(A, np.concatenate([yc * sw, np.zeros(p)]), rcond=None)[0]
    e = yc - zc @ bnp
    s2 = np.sum(w * e**2) / W * n / (n - p - 1)
    G = (zc.T * w) @ zc * n / W
    Ainv = np.linalg.inv(G + n*lam*np.eye(p))
    cov = s2 * Ainv @ G @ Ainv
    fits.append({"lam": lam, "sk_coef_sd": r.coef_.tolist(), "sk_intercept": float(r.intercept_),
                 "np_coef_sd": bnp.tolist(), "np_se_sd": np.sqrt(np.diag(cov)).tolist()})
out["fits"] = fits
vif = []
for j in range(p):
    others = [k for k in range(p) if k != j]
    A = np.column_stack([np.ones(n), X[:, others]]) * np.sqrt(w)[:, None]
    b = np.linalg.lstsq(A, X[:, j] * np.sqrt(w), rcond=None)[0]
    e = X[:, j] - np.column_stack([np.ones(n), X[:, others]]) @ b
    r2 = 1 - np.sum(w * e**2) / np.sum(w * (X[:, j] - np.average(X[:, j], weights=w))**2)
    vif.append(1 / (1 - r2))
out["vif"] = vif
cv = []
for lam in lams:
    sse = 0.0
    for f in np.unique(fold):
        tr, te = fold != f, fold == f
        mt, st = std(X[tr], w[tr])
        r = Ridge(alpha=w[tr].sum()*lam, solver="cholesky").fit((X[tr] - mt) / st, y[tr], sample_weight=w[tr])
        pred = r.predict((X[te] - mt) / st)
        sse += float(np.sum(w[te] * (y[te] - pred)**2))
    cv.append(sse)
out["cv_sse"] = cv
out["cyy"] = float(np.sum(w * (y - np.average(y, weights=w))**2))
print(json.dumps(out))
`

type refOut struct {
	OLSCoef      []float64 `json:"ols_coef"`
	OLSIntercept float64   `json:"ols_intercept"`
	Fits         []struct {
		Lam         float64   `json:"lam"`
		SKCoefSD    []float64 `json:"sk_coef_sd"`
		SKIntercept float64   `json:"sk_intercept"`
		NPCoefSD    []float64 `json:"np_coef_sd"`
		NPSESD      []float64 `json:"np_se_sd"`
	} `json:"fits"`
	VIF   []float64 `json:"vif"`
	CVSSE []float64 `json:"cv_sse"`
	Cyy   float64   `json:"cyy"`
}

func runRef(t *testing.T, ss []sample, lams []float64) refOut {
	t.Helper()
	py := testutil.Python(t, "numpy", "sklearn")
	dir := t.TempDir()
	var b strings.Builder
	for _, s := range ss {
		for _, x := range s.x {
			fmt.Fprintf(&b, "%.17g,", x)
		}
		fmt.Fprintf(&b, "%.17g,%.17g,%d\n", s.y, s.w, s.fold)
	}
	data := filepath.Join(dir, "design.csv")
	if err := os.WriteFile(data, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	script := filepath.Join(dir, "ref.py")
	if err := os.WriteFile(script, []byte(refScript), 0o644); err != nil {
		t.Fatal(err)
	}
	var ls []string
	for _, l := range lams {
		ls = append(ls, fmt.Sprintf("%.17g", l))
	}
	out, err := exec.Command(py, script, data, strings.Join(ls, ",")).Output()
	if err != nil {
		if ee, ok := err.(*exec.ExitError); ok {
			t.Fatalf("reference script: %v\n%s", err, ee.Stderr)
		}
		t.Fatal(err)
	}
	var r refOut
	if err := json.Unmarshal(out, &r); err != nil {
		t.Fatalf("reference output %q: %v", out, err)
	}
	return r
}

// OLS, ridge, their coefficient standard errors, VIFs and blocked
// cross-validation against scikit-learn (LinearRegression, Ridge) and
// numpy on the same design matrices (synthetic, correlated factors), to
// 1e-8 relative; unit weights (sklearn's alpha = n·λ) and area-like
// weights (alpha = Σw·λ).
func TestAgainstSklearnNumpy(t *testing.T) {
	lams := []float64{0, 1e-3, 0.05, 0.3, 2}
	const tol = 1e-8
	for _, tc := range []struct {
		name     string
		weighted bool
		rho      float64
		seed     uint64
	}{
		{"unit weights", false, 0.6, 1},
		{"weighted", true, 0.6, 2},
		{"strongly collinear, weighted", true, 0.95, 3},
	} {
		t.Run(tc.name, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(tc.seed, 77))
			ss := planted(rng, 6, 25, 1.5, []float64{0.7, -0.4, 0.25, 0.1}, 0.8, tc.rho, tc.weighted)
			ref := runRef(t, ss, lams)
			fs := foldsOf(ss, 6)
			all, err := fs.Pooled()
			if err != nil {
				t.Fatal(err)
			}
			n := float64(len(ss))
			maxd := map[string]float64{}
			check := func(what string, got, want float64) {
				t.Helper()
				d := math.Abs(got-want) / math.Max(1, math.Abs(want))
				if d > maxd[what] {
					maxd[what] = d
				}
				if !near(got, want, tol) || math.IsNaN(got) {
					t.Errorf("%s: got %.15g, reference %.15g", what, got, want)
				}
			}
			ols, err := FitMoments(all, 0)
			if err != nil {
				t.Fatal(err)
			}
			for j := range ols.Coef {
				check("OLS coefficient vs LinearRegression", ols.Coef[j], ref.OLSCoef[j])
				check("VIF vs regression of each factor on the others", ols.VIF[j], ref.VIF[j])
			}
			check("OLS intercept vs LinearRegression", ols.Intercept, ref.OLSIntercept)
			for _, rf := range ref.Fits {
				f, err := FitMoments(all, rf.Lam)
				if err != nil {
					t.Fatal(err)
				}
				for j := range f.CoefSD {
					check("ridge coefficient per sd vs sklearn Ridge", f.CoefSD[j], rf.SKCoefSD[j])
					check("ridge coefficient per sd vs numpy lstsq", f.CoefSD[j], rf.NPCoefSD[j])
					check("coefficient SE per sd vs numpy sandwich", f.SESD(j, n), rf.NPSESD[j])
				}
				// sklearn's intercept is for standardised factors: a = a_z − Σ b_j m_j/s_j.
				check("ridge intercept vs sklearn Ridge", f.Intercept, rf.SKIntercept-dot(f.CoefSD, ratio(f.Mean, f.SD)))
			}
			cv, err := CrossValidate(fs, lams)
			if err != nil {
				t.Fatal(err)
			}
			for k := range lams {
				check("held-out SSE vs sklearn Ridge per fold", cv.SSE[k], ref.CVSSE[k])
			}
			check("pooled Cyy", cv.Cyy, ref.Cyy)
			t.Logf("chosen penalty %g, CV R² %.4f; max relative differences: %v", cv.Penalty, cv.R2, maxd)
		})
	}
}

func dot(a, b []float64) float64 {
	s := 0.0
	for i := range a {
		s += a[i] * b[i]
	}
	return s
}

func ratio(a, b []float64) []float64 {
	out := make([]float64, len(a))
	for i := range a {
		out[i] = a[i] / b[i]
	}
	return out
}
