package grid_test

import (
	"math"
	"os/exec"
	"strconv"
	"strings"
	"testing"

	"lidscope/grid"
	"lidscope/internal/testutil"
)

// TestGaussianTable compares abscissas x = sin φ and weights with
// Abramowitz & Stegun (1964), Handbook of Mathematical Functions, Table 25.4
// (Gauss–Legendre abscissas and weights, 15 digits; values from memory; the
// n = 2 and n = 3 entries are also the closed forms 1/√3, √(3/5), 8/9, 5/9).
func TestGaussianTable(t *testing.T) {
	table := map[int][][2]float64{ // positive abscissas, weight
		2: {{0.577350269189626, 1}},
		3: {{0, 0.888888888888889}, {0.774596669241483, 0.555555555555556}},
		4: {{0.339981043584856, 0.652145154862546}, {0.861136311594053, 0.347854845137454}},
		5: {{0, 0.568888888888889}, {0.538469310105683, 0.478628670499366}, {0.906179845938664, 0.236926885056189}},
		6: {{0.238619186083197, 0.467913934572691}, {0.661209386466265, 0.360761573048139}, {0.932469514203152, 0.171324492379170}},
	}
	for n, rows := range table {
		lat, w := grid.GaussianLatitudes(n)
		for _, r := range rows {
			found := false
			for k := range lat {
				x := math.Sin(lat[k] * math.Pi / 180)
				if math.Abs(x-r[0]) < 1e-14 {
					found = true
					if math.Abs(w[k]-r[1]) > 1e-14 {
						t.Errorf("n=%d x=%v: weight %.16g, table %.15g", n, r[0], w[k], r[1])
					}
					// mirror
					m := len(lat) - 1 - k
					if math.Abs(lat[m]+lat[k]) > 1e-13 || w[m] != w[k] {
						t.Errorf("n=%d: roots %d and %d not symmetric", n, k, m)
					}
				}
			}
			if !found {
				t.Errorf("n=%d: abscissa %v (A&S Table 25.4) not among %v", n, r[0], lat)
			}
		}
	}
}

// TestGaussianT42: the first (northernmost) T42 Gaussian latitude is
// 87.8638° (from memory), and the weights sum to 2 for several sizes.
func TestGaussianT42(t *testing.T) {
	lat, _ := grid.GaussianLatitudes(64)
	if math.Abs(lat[63]-87.8638) > 5e-5 {
		t.Errorf("T42 first latitude %.6f, want 87.8638", lat[63])
	}
	for _, n := range []int{1, 7, 64, 320, 1280} {
		lat, w := grid.GaussianLatitudes(n)
		var s float64
		for k := range w {
			s += w[k]
			if k > 0 && !(lat[k] > lat[k-1]) {
				t.Fatalf("n=%d: latitudes not ascending at %d", n, k)
			}
		}
		if math.Abs(s-2) > 1e-12 {
			t.Errorf("n=%d: weights sum to %.16g, want 2", n, s)
		}
	}
}

// TestGaussianAgainstCDO compares Gaussian latitudes with those CDO 2.1.1
// prints for its built-in grids (cdo griddes): t42grid (64), n48 (96), n80
// (160).
func TestGaussianAgainstCDO(t *testing.T) {
	t.Parallel()
	testutil.Tool(t, "cdo")
	for _, c := range []struct {
		name string
		n    int
	}{{"t42grid", 64}, {"n48", 96}, {"n80", 160}} {
		var out []byte
		var err error
		for try := 0; try < 3; try++ { // CDO 2.1.1 occasionally crashes
			out, err = exec.Command("cdo", "-s", "griddes", "-const,1,"+c.name).Output()
			if err == nil {
				break
			}
		}
		if err != nil {
			t.Fatalf("cdo griddes %s: %v", c.name, err)
		}
		text := string(out)
		if !strings.Contains(text, "gridtype  = gaussian") {
			t.Fatalf("cdo griddes %s: not a gaussian grid:\n%s", c.name, text)
		}
		_, rest, _ := strings.Cut(text, "yvals     =")
		var yv []float64
		for _, f := range strings.Fields(rest) {
			x, err := strconv.ParseFloat(f, 64)
			if err != nil {
				break // next key
			}
			yv = append(yv, x)
		}
		if len(yv) != c.n {
			t.Fatalf("cdo griddes %s: %d latitudes, want %d", c.name, len(yv), c.n)
		}
		lat, _ := grid.GaussianLatitudes(c.n)
		for k, v := range yv { // CDO lists them north→south
			if got := lat[c.n-1-k]; math.Abs(got-v) > 1e-11 {
				t.Errorf("%s latitude %d: ours %.15g, CDO %.15g", c.name, k, got, v)
			}
		}
	}
}

// python runs a script with a Python that imports the modules (testutil.Python:
// skips, or fails under CI, when there is none).
func python(t *testing.T, script string, modules ...string) string {
	t.Helper()
	out, err := exec.Command(testutil.Python(t, modules...), "-c", script).Output()
	if err != nil {
		t.Fatalf("reference script: %v", err)
	}
	return string(out)
}

func floats(t *testing.T, line string) []float64 {
	t.Helper()
	var v []float64
	for _, f := range strings.Fields(line) {
		x, err := strconv.ParseFloat(f, 64)
		if err != nil {
			t.Fatalf("bad number %q from reference", f)
		}
		v = append(v, x)
	}
	return v
}

// TestGaussianAgainstNumPy compares the roots with
// numpy.polynomial.legendre.leggauss (Debian python3-numpy), an independent
// Gauss–Legendre implementation (companion-matrix eigenvalues polished by
// Newton). Its weights are only accurate to about 2e-8 relative near the
// poles for n = 1280 (found against 40-digit arithmetic, see TestGaussianHighPrecision),
// so they are compared to 1e-7.
func TestGaussianAgainstNumPy(t *testing.T) {
	t.Parallel()
	for _, n := range []int{64, 96, 320, 1280} {
		out := python(t, "import numpy\nx, w = numpy.polynomial.legendre.leggauss("+strconv.Itoa(n)+")\n"+
			"print(' '.join(repr(float(v)) for v in x))\nprint(' '.join(repr(float(v)) for v in w))\n", "numpy")
		lines := strings.Split(strings.TrimSpace(out), "\n")
		xs, ws := floats(t, lines[0]), floats(t, lines[1])
		lat, w := grid.GaussianLatitudes(n)
		if len(xs) != n || len(ws) != n {
			t.Fatalf("numpy returned %d roots, %d weights for n=%d", len(xs), len(ws), n)
		}
		for k := range xs {
			if got := math.Sin(lat[k] * math.Pi / 180); math.Abs(got-xs[k]) > 1e-14 {
				t.Errorf("n=%d root %d: ours %.17g, numpy %.17g", n, k, got, xs[k])
			}
			if math.Abs(w[k]-ws[k]) > 1e-7*ws[k] {
				t.Errorf("n=%d weight %d: ours %.17g, numpy %.17g", n, k, w[k], ws[k])
			}
		}
	}
}

// TestGaussianHighPrecision checks roots and weights near the pole and the
// equator against 40-digit decimal arithmetic (the decimal module of the
// Python standard library): each of our roots is
// polished by Newton iteration on P_n with the same three-term recurrence
// carried out in 40 digits, and its weight 2/((1 − x²) P'_n(x)²) evaluated
// there. Only +, −, × and ÷ are needed, all correctly rounded in decimal.
func TestGaussianHighPrecision(t *testing.T) {
	t.Parallel()
	for _, n := range []int{64, 1280} {
		lat, w := grid.GaussianLatitudes(n)
		idx := []int{n - 1, n - 2, n - 3, n / 2, n/2 + 1}
		var guesses []string
		for _, k := range idx {
			guesses = append(guesses, strconv.FormatFloat(math.Sin(lat[k]*math.Pi/180), 'g', 17, 64))
		}
		script := `from decimal import Decimal as D, getcontext
getcontext().prec = 40
n = ` + strconv.Itoa(n) + `
def leg(x):
    p0, p1 = D(1), x
    for k in range(1, n):
        p0, p1 = p1, ((2*k+1)*x*p1 - k*p0)/(k+1)
    return p1, p0
xs, ws = [], []
for g in "` + strings.Join(guesses, " ") + `".split():
    x = D(g)
    for it in range(6):
        p, pm = leg(x)
        x = x - p/(n*(x*p - pm)/(x*x - 1))
    p, pm = leg(x)
    dp = n*(x*p - pm)/(x*x - 1)
    xs.append("%.25e" % x); ws.append("%.25e" % (2/((1 - x*x)*dp*dp)))
print(" ".join(xs)); print(" ".join(ws))
`
		out := python(t, script)
		lines := strings.Split(strings.TrimSpace(out), "\n")
		xs, ws := floats(t, lines[0]), floats(t, lines[1])
		for m, k := range idx {
			if got := math.Sin(lat[k] * math.Pi / 180); math.Abs(got-xs[m]) > 2e-16 {
				t.Errorf("n=%d root %d: ours %.17g, 40-digit %.17g", n, k, got, xs[m])
			}
			if math.Abs(w[k]-ws[m]) > 1e-10*ws[m] {
				t.Errorf("n=%d weight %d: ours %.17g, 40-digit %.17g (relative %.2g)", n, k, w[k], ws[m], math.Abs(w[k]-ws[m])/ws[m])
			}
		}
	}
}
