package compare

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/accumulate"
	"lidscope/grid"
	"lidscope/netcdf"
	"lidscope/output"
	"lidscope/regimes"
)

// run builds a tiny run whose per-column convective fractions are conv
// (invented values), two time steps, all cells in the band.
func run(t *testing.T, name string, conv []float64) Run {
	t.Helper()
	n := len(conv)
	l := accumulate.Layout{NLat: 1, NLon: n, Lat: []float64{0}, Quantities: []string{"eis", "lts", "low_cloud"}, Cloud: "low_cloud"}
	for i := 0; i < n; i++ {
		l.Lon = append(l.Lon, float64(i*10))
		l.Area = append(l.Area, 1)
		l.BandWeight = append(l.BandWeight, 1)
	}
	a, err := accumulate.New(l)
	if err != nil {
		t.Fatal(err)
	}
	// 4 steps: a cell with fraction f is convective in round(4f) of them.
	for k := 0; k < 4; k++ {
		s := &accumulate.Step{Label: "s", TropMean: 300, Rel: make([]float32, n), Regime: make([]regimes.Regime, n),
			Values: [][]float32{make([]float32, n), make([]float32, n), make([]float32, n)}}
		for i, f := range conv {
			s.Regime[i] = regimes.Subsidence
			if float64(k) < f*4 {
				s.Regime[i] = regimes.Convective
			}
			s.Values[0][i], s.Values[1][i], s.Values[2][i] = 3, 17, 0.4
		}
		a.AddCells(s, 0, n)
		a.AddStep(s)
	}
	var lb [][2]float64
	for _, x := range l.Lon {
		lb = append(lb, [2]float64{x - 5, x + 5})
	}
	g, err := grid.New(l.Lat, l.Lon, [][2]float64{{-5, 5}}, lb)
	if err != nil {
		t.Fatal(err)
	}
	return Run{Name: name, Dir: name, Acc: a, Meta: output.Meta{Grid: g, Dataset: name, MetricsConventions: "m", Regimes: regimes.Definition{Band: regimes.Band{South: -30, North: 30}, Delta: 1.5}, Period: "p", StepsPerYear: 12}}
}

func TestSelfComparisonIsExact(t *testing.T) {
	a := run(t, "obs", []float64{0, 0.25, 0.5, 1})
	res, err := Compare(a, []Run{a}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	for _, m := range res.Candidates[0].Maps {
		if m.Corr != 1 || m.CRMS != 0 || m.Bias != 0 {
			t.Errorf("%s: corr %v crms %v bias %v, want 1, 0, 0", m.Name, m.Corr, m.CRMS, m.Bias)
		}
	}
	for _, s := range res.Candidates[0].Scalars {
		if s.Diff != 0 {
			t.Errorf("%s differs from itself by %v", s.Name, s.Diff)
		}
	}
}

// TestMapStatsByHand: reference fractions {0, .25, .5, 1}, candidate
// {.25, .25, .75, 1}, equal weights. Means 0.4375 and 0.5625, bias 0.125;
// centred difference (b−b̄)−(a−ā) = {0.125, −0.125, 0.125, −0.125}, so the
// centred RMS difference (Taylor 2001, eq. 2) is 0.125; correlation from
// the centred cross products: cov = 0.1015625·… computed below by hand.
func TestMapStatsByHand(t *testing.T) {
	ref := []float64{0, 0.25, 0.5, 1}
	cand := []float64{0.25, 0.25, 0.75, 1}
	st, diff := mapStat(ref, cand, []float64{1, 1, 1, 1})
	if math.Abs(st.Bias-0.125) > 1e-15 || math.Abs(st.CRMS-0.125) > 1e-15 {
		t.Errorf("bias %v crms %v, want 0.125 and 0.125", st.Bias, st.CRMS)
	}
	// a−ā = {−.4375, −.1875, .0625, .5625}; b−b̄ = {−.3125, −.3125, .1875, .4375}
	cov := (0.4375*0.3125 + 0.1875*0.3125 + 0.0625*0.1875 + 0.5625*0.4375) / 4
	va := (0.4375*0.4375 + 0.1875*0.1875 + 0.0625*0.0625 + 0.5625*0.5625) / 4
	vb := (0.3125*0.3125*2 + 0.1875*0.1875 + 0.4375*0.4375) / 4
	if want := cov / math.Sqrt(va*vb); math.Abs(st.Corr-want) > 1e-14 {
		t.Errorf("corr %v, hand %v", st.Corr, want)
	}
	if diff[0] != 0.25 || diff[3] != 0 {
		t.Errorf("difference map %v", diff)
	}
	// Taylor (2001) law of cosines: E'² = σr² + σc² − 2σrσc·R.
	if lhs, rhs := st.CRMS*st.CRMS, st.RefStd*st.RefStd+st.CandStd*st.CandStd-2*st.RefStd*st.CandStd*st.Corr; math.Abs(lhs-rhs) > 1e-14 {
		t.Errorf("Taylor identity: %v vs %v", lhs, rhs)
	}
}

func TestMismatchesAreRefusedAndListed(t *testing.T) {
	a := run(t, "obs", []float64{0, 1})
	b := run(t, "model", []float64{0, 1})
	b.Meta.Regimes.Delta = 1.0
	b.Meta.Period = "q"
	b.Meta.MetricsConventions = "other"
	_, err := Compare(a, []Run{b}, Options{})
	var me *MismatchError
	if !errors.As(err, &me) || len(me.List) != 3 {
		t.Fatalf("want 3 listed mismatches, got %v", err)
	}
	for _, want := range []string{"threshold", "period", "metrics conventions"} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("message lacks %q: %v", want, err)
		}
	}
	res, err := Compare(a, []Run{b}, Options{AllowMismatch: true})
	if err != nil || len(res.Mismatches) != 3 || len(res.Candidates) != 1 {
		t.Fatalf("allow-mismatch: %v %+v", err, res)
	}
}

func TestWriteOutputs(t *testing.T) {
	a := run(t, "obs", []float64{0, 0.25, 0.5, 1})
	b := run(t, "model", []float64{0.25, 0.25, 0.75, 1})
	res, err := Compare(a, []Run{b}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	files, err := Write(dir, res, WriteOptions{Version: "test"})
	if err != nil || len(files) != 4 {
		t.Fatalf("%v %v", files, err)
	}
	f, err := netcdf.Open(filepath.Join(dir, MapsFile))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	v, err := f.Var("convective_time_fraction_difference")
	if err != nil {
		t.Fatal(err)
	}
	vals, _ := v.ReadAllFloat64()
	if len(vals) != 4 || math.Abs(vals[0]-0.25) > 1e-7 || math.Abs(vals[2]-0.25) > 1e-7 {
		t.Errorf("difference map %v", vals)
	}
	csvb, _ := os.ReadFile(filepath.Join(dir, CSVFile))
	lines := strings.Split(strings.TrimSpace(string(csvb)), "\n")
	if len(lines) != 3 || !strings.HasPrefix(lines[1], "obs,reference") || !strings.HasPrefix(lines[2], "model,candidate") {
		t.Errorf("csv rows: %q", lines)
	}
	if _, err := Write(dir, res, WriteOptions{}); err == nil {
		t.Error("overwrote without Force")
	}
}

// Two runs of one dataset differ only by their folders: mismatch messages
// name the folders.
func TestMismatchesNameTheFolders(t *testing.T) {
	a := run(t, "obs", []float64{0, 1})
	b := run(t, "obs", []float64{0, 1})
	a.Dir, b.Dir = "/runs/obs-delta1.5", "/runs/obs-delta1.0"
	b.Meta.Regimes.Delta = 1.0
	_, err := Compare(a, []Run{b}, Options{})
	if err == nil || !strings.Contains(err.Error(), "obs (/runs/obs-delta1.5) has 1.5") || !strings.Contains(err.Error(), "obs (/runs/obs-delta1.0) has 1") {
		t.Errorf("mismatch of two runs of one dataset: %v", err)
	}
}

// A comparison whose figures fail writes nothing: not its files, and not
// the folder it would have created.
func TestWriteIsOneUnit(t *testing.T) {
	a := run(t, "obs", []float64{0, 0.25, 0.5, 1})
	b := run(t, "model", []float64{0.25, 0.25, 0.75, 1})
	res, err := Compare(a, []Run{b}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "cmp")
	_, err = Write(dir, res, WriteOptions{Figures: func(d string) ([]string, error) {
		if err := os.WriteFile(filepath.Join(d, "half.png"), []byte("x"), 0o644); err != nil {
			return nil, err
		}
		return nil, errors.New("injected figure failure")
	}})
	if err == nil || !strings.Contains(err.Error(), "injected") || !strings.Contains(err.Error(), "nothing was written") {
		t.Errorf("Write with failing figures: %v", err)
	}
	if _, err := os.Stat(dir); err == nil {
		t.Errorf("the failed comparison left %s", dir)
	}
	files, err := Write(dir, res, WriteOptions{Figures: func(d string) ([]string, error) {
		p := filepath.Join(d, "one.png")
		return []string{p}, os.WriteFile(p, []byte("png"), 0o644)
	}})
	if err != nil || len(files) != 5 || files[4] != filepath.Join(dir, FiguresDir, "one.png") {
		t.Fatalf("%v %v", files, err)
	}
	if _, err := os.Stat(files[4]); err != nil {
		t.Error(err)
	}
}
