package factors

import (
	"bytes"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"testing"

	"lidscope/accumulate"
	"lidscope/regimes"
	"lidscope/relations"
)

// world is a synthetic-truth world (invented): an nlat×nlon grid of
// ocean, every cell in the band, regimes alternating by column
// (subsidence in even columns, convective in odd), monthly steps over
// years; three factors with seasonal cycles and AR(1) anomalies
// (ρ = 0.5) correlated with each other, and a response
// y = seasonal + Σ β_k x'_k + 0.02ε (white noise).
type world struct {
	nlat, nlon, years int
	beta              []float64
	l                 accumulate.Layout
	steps             []*accumulate.Step
}

var plantedBeta = []float64{-0.04, 0.03, 0.5} // per K, per K, per unit: invented

func newWorld(seed uint64, nlat, nlon, years int) *world {
	w := &world{nlat: nlat, nlon: nlon, years: years, beta: plantedBeta}
	n := nlat * nlon
	l := accumulate.Layout{NLat: nlat, NLon: nlon, Quantities: []string{"sst", "eis", "rh700", "low_cloud"}, Cloud: "low_cloud"}
	for j := 0; j < nlat; j++ {
		l.Lat = append(l.Lat, -20+40*(float64(j)+0.5)/float64(nlat))
	}
	for i := 0; i < nlon; i++ {
		l.Lon = append(l.Lon, -180+360*(float64(i)+0.5)/float64(nlon))
	}
	for c := 0; c < n; c++ {
		a := 1e10 * math.Cos(l.Lat[c/nlon]*math.Pi/180)
		l.Area = append(l.Area, a)
		l.BandWeight = append(l.BandWeight, a)
	}
	w.l = l
	rng := rand.New(rand.NewPCG(seed, 15))
	anom := make([][3]float64, n)
	for y := 0; y < years; y++ {
		for m := 1; m <= 12; m++ {
			s := &accumulate.Step{Year: 2000 + y, Month: m, Regime: make([]regimes.Regime, n), Rel: make([]float32, n)}
			vals := make([][]float32, 4)
			for q := range vals {
				vals[q] = make([]float32, n)
			}
			season := math.Sin(2 * math.Pi * float64(m) / 12)
			for c := 0; c < n; c++ {
				if c%nlon%2 == 0 {
					s.Regime[c] = regimes.Subsidence
				} else {
					s.Regime[c] = regimes.Convective
				}
				common := rng.NormFloat64()
				for k := 0; k < 3; k++ {
					e := 0.6*rng.NormFloat64() + 0.4*common
					anom[c][k] = 0.5*anom[c][k] + e*[3]float64{0.5, 0.8, 0.05}[k]
				}
				x := [3]float64{298 + 2*season + anom[c][0], 5 + season + anom[c][1], 0.6 + 0.1*season + anom[c][2]}
				ys := 0.3 + 0.05*season + 0.02*rng.NormFloat64()
				for k := 0; k < 3; k++ {
					ys += w.beta[k] * anom[c][k]
				}
				vals[0][c], vals[1][c], vals[2][c], vals[3][c] = float32(x[0]), float32(x[1]), float32(x[2]), float32(ys)
			}
			s.Values = vals
			w.steps = append(w.steps, s)
		}
	}
	return w
}

func (w *world) climatology() *relations.Climatology {
	c := relations.NewClimatology(w.l)
	for _, s := range w.steps {
		c.AddStep(s)
	}
	return c
}

func testConfig() Config {
	return Config{Factors: []string{"sst", "eis", "rh700"}, Response: "low_cloud", Method: MethodRidge, Level: 0.95, CellFoldYears: 4, Maps: true,
		Regions: []accumulate.Region{{Name: "east", South: -20, North: 20, West: 0, East: 180}}}
}

func testUnits(q string) string {
	switch q {
	case "sst", "eis":
		return "K"
	}
	return "1"
}

// TestPlantedSensitivities: the regional fits recover the planted
// sensitivities within their 95 % intervals (synthetic truth), and the
// per-cell intervals cover them in about 95 % of the cells.
func TestPlantedSensitivities(t *testing.T) {
	t.Parallel()
	w := newWorld(1, 6, 24, 16)
	clim := w.climatology()
	// OLS: the ridge estimate is shrunk towards 0 and its interval is not
	// meant to cover (see the package documentation).
	cfg := testConfig()
	cfg.Method = MethodOLS
	a, err := New(cfg, w.l, clim)
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range w.steps {
		a.AddStep(s)
	}
	r := a.Results(testUnits)
	// Every estimate within 3.5 standard errors of the planted value (a
	// chance failure has probability about 1 % over the 27 cases), and
	// the 95 % intervals cover it in at least 80 % of them.
	in, all := 0, 0
	for _, f := range r.Fits {
		for k, s := range f.Sens {
			b := w.beta[k]
			all++
			if s.Lo <= b && b <= s.Hi {
				in++
			}
			if math.Abs(s.Coef-b) > 3.5*s.SE {
				t.Errorf("%s %s %s: planted %g, estimate %g ± %g (N_eff %g)", f.Domain, f.Regime, s.Factor, b, s.Coef, s.SE, f.NEff)
			}
		}
		if !(f.CVR2 > 0.5) {
			t.Errorf("%s %s: CV R² %g, want > 0.5 for a planted linear model with small noise", f.Domain, f.Regime, f.CVR2)
		}
	}
	t.Logf("regional 95 %% intervals cover the planted sensitivity in %d of %d cases", in, all)
	if float64(in) < 0.8*float64(all) {
		t.Errorf("regional intervals cover in %d of %d cases, want ≥ 80 %%", in, all)
	}
	m := r.Maps
	hit, cases, maxErr := 0, 0, 0.0
	for k, b := range w.beta {
		for c := range m.Coef[k] {
			if m.Coef[k][c] != m.Coef[k][c] {
				t.Fatalf("cell %d has no fit", c)
			}
			cases++
			if m.Lo[k][c] <= b && b <= m.Hi[k][c] {
				hit++
			}
			maxErr = math.Max(maxErr, math.Abs(m.Coef[k][c]-b)/m.SE[k][c])
		}
	}
	cov := float64(hit) / float64(cases)
	t.Logf("per-cell 95 %% interval coverage %.3f over %d cells × factors; largest |error|/SE %.2f", cov, cases, maxErr)
	if cov < 0.85 {
		t.Errorf("per-cell coverage %.3f, want about 0.95 (≥ 0.85)", cov)
	}
}

// TestMergeEqualsOneRun: the accumulators of two consecutive pieces
// merged give the results of one pass (to rounding), through Encode and
// DecodeAcc, with the split inside a year and inside a fold block.
func TestMergeEqualsOneRun(t *testing.T) {
	t.Parallel()
	w := newWorld(2, 4, 12, 9)
	clim := w.climatology()
	cfg := testConfig()
	cfg.Bootstrap = Bootstrap{Replicates: 50, BlockYears: 2, Seed: 7}
	one, _ := New(cfg, w.l, clim)
	p1, _ := New(cfg, w.l, clim)
	p2, _ := New(cfg, w.l, clim)
	cut := 12*5 + 5
	for i, s := range w.steps {
		one.AddStep(s)
		if i < cut {
			p1.AddStep(s)
		} else {
			p2.AddStep(s)
		}
	}
	var b1, b2 bytes.Buffer
	if err := p1.Encode(&b1); err != nil {
		t.Fatal(err)
	}
	if err := p2.Encode(&b2); err != nil {
		t.Fatal(err)
	}
	d1, err := DecodeAcc(&b1)
	if err != nil {
		t.Fatal(err)
	}
	d2, err := DecodeAcc(&b2)
	if err != nil {
		t.Fatal(err)
	}
	if err := d1.Merge(d2); err != nil {
		t.Fatal(err)
	}
	if err := d2.Merge(d1); err == nil {
		t.Error("merging pieces out of time order was accepted")
	}
	ra, rb := one.Results(testUnits), d1.Results(testUnits)
	if !close(ra, rb, 1e-9) {
		t.Errorf("merged results differ from one pass:\n%+v\n%+v", ra.Fits[0], rb.Fits[0])
	}
}

// close compares every float of two results with a relative tolerance.
func close(a, b *Results, tol float64) bool {
	return deepClose(reflect.ValueOf(a), reflect.ValueOf(b), tol)
}

func deepClose(a, b reflect.Value, tol float64) bool {
	switch a.Kind() {
	case reflect.Pointer, reflect.Interface:
		if a.IsNil() || b.IsNil() {
			return a.IsNil() == b.IsNil()
		}
		return deepClose(a.Elem(), b.Elem(), tol)
	case reflect.Struct:
		for i := 0; i < a.NumField(); i++ {
			if !deepClose(a.Field(i), b.Field(i), tol) {
				return false
			}
		}
		return true
	case reflect.Slice, reflect.Array:
		if a.Len() != b.Len() {
			return false
		}
		for i := 0; i < a.Len(); i++ {
			if !deepClose(a.Index(i), b.Index(i), tol) {
				return false
			}
		}
		return true
	case reflect.Float64:
		x, y := a.Float(), b.Float()
		if x != x || y != y {
			return x != x && y != y
		}
		return math.Abs(x-y) <= tol*math.Max(1, math.Max(math.Abs(x), math.Abs(y)))
	default:
		return reflect.DeepEqual(a.Interface(), b.Interface())
	}
}

type dirStager string

func (d dirStager) Path(n string) string { return filepath.Join(string(d), n) }
func (d dirStager) WriteFile(n string, b []byte) error {
	return os.WriteFile(filepath.Join(string(d), n), b, 0o666)
}

// TestWriteReadRun: what Stage writes, ReadRun reads back.
func TestWriteReadRun(t *testing.T) {
	t.Parallel()
	w := newWorld(3, 4, 8, 6)
	a, err := New(testConfig(), w.l, w.climatology())
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range w.steps {
		a.AddStep(s)
	}
	r := a.Results(testUnits)
	dir := t.TempDir()
	if err := Stage(dirStager(dir), dir, r, Meta{Dataset: "synthetic", Source: "lidscope test"}); err != nil {
		t.Fatal(err)
	}
	got, err := ReadRun(dir)
	if err != nil {
		t.Fatal(err)
	}
	// the reader does not restore the fields not written
	for i := range r.Fits {
		for k := range r.Fits[i].Sens {
			got.Fits[i].Sens[k].Units = r.Fits[i].Sens[k].Units
		}
	}
	got.Maps.Failed = r.Maps.Failed
	if !close(r, got, 1e-12) {
		t.Errorf("read back differs:\n%+v\n%+v", r.Fits[0], got.Fits[0])
	}
	if _, err := ReadRun(t.TempDir()); err == nil {
		t.Error("a folder without factors.json was read")
	}
}
