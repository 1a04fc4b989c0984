package analysis

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"lidscope/regimes"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"lidscope/config"
	"lidscope/figures"
	"lidscope/internal/testutil"
	"lidscope/output"
)

// bandSeries is an independent computation (numpy/xarray, not lidscope)
// of the tropical-mean SST and of the convective area fraction of each of
// the 12 months of the STR SST climatology (cdf/sstdata_netcdf.nc): cells
// with values in the file's valid_range (−1.8…35 °C) are ocean; the repeated
// 360° longitude is dropped; each cell weighs its area inside 30°S–30°N
// (sin φn − sin φs, bounds half-way between centres, clipped to ±90°);
// convective where SST − tropical mean > 1.5 K.
const bandSeries = `
import sys, json, numpy as np, xarray as xr
ds = xr.open_dataset(sys.argv[1], decode_times=False, mask_and_scale=False)
sst = ds["sst"].values[:, :, :-1].astype(float)
sst = np.where((sst >= -1.8) & (sst <= 35), sst + 273.15, np.nan)
lat = ds["lat"].values.astype(float)
edges = np.concatenate([[-90], (lat[1:] + lat[:-1]) / 2, [90]])
s, n = np.clip(edges[:-1], -30, 30), np.clip(edges[1:], -30, 30)
w = np.sin(np.radians(n)) - np.sin(np.radians(s))
out = []
for m in range(sst.shape[0]):
    x = sst[m]
    W = np.broadcast_to(w[:, None], x.shape)
    ok = ~np.isnan(x) & (W > 0)
    mean = float((W[ok] * x[ok]).sum() / W[ok].sum())
    conv = float(W[ok][(x[ok] - mean) > 1.5].sum() / W[ok].sum())
    out.append([mean, conv])
print(json.dumps(out))
`

// TestRealSSTOnlyStudy runs a study with SST as its only input (the real
// STR SST climatology, whose time axis must be declared a climatology),
// first with the ocean taken from SST and compared month by month with
// the independent numpy computation above, then with the real categorical
// land-sea mask (cdf/landsea.nc, 0 = ocean) on its own 1° grid.
func TestRealSSTOnlyStudy(t *testing.T) {
	sst := testutil.RealData(t, "cdf/sstdata_netcdf.nc")
	mask := testutil.RealData(t, "cdf/landsea.nc")
	py := testutil.Python(t, "xarray", "numpy")
	dir := t.TempDir()
	studies := map[string]string{
		"sst_mask": `datasets:
  str-sst:
    files:
      sst: "` + sst + `"
    time: {climatology: true}
    ocean: {mask: sst}
output: {dir: "` + dir + `", plots: true}
`,
		"categorical_mask": `datasets:
  str-sst-landsea:
    files:
      sst: "` + sst + `"
      land_fraction: "` + mask + `"
    time: {climatology: true}
    ocean: {mask: categorical, from: land_fraction, values: [0]}
analysis:
  grid: {target: sst}
output: {dir: "` + dir + `", plots: true}
`,
	}
	for _, name := range []string{"sst_mask", "categorical_mask"} {
		t.Run(name, func(t *testing.T) {
			p := filepath.Join(dir, name+".yaml")
			if err := os.WriteFile(p, []byte(studies[name]), 0o644); err != nil {
				t.Fatal(err)
			}
			r, err := config.Load(p, config.LoadOptions{LookupEnv: config.NoEnvironment})
			if err != nil {
				t.Fatal(err)
			}
			reps, err := Run(context.Background(), r, nil, Options{})
			if err != nil {
				t.Fatal(err)
			}
			rep := reps[0]
			if q := rep.Result.Acc.L.Quantities; !slices.Equal(q, []string{"sst"}) {
				t.Errorf("quantities %v, want [sst]", q)
			}
			if len(rep.Result.Labels) != 12 {
				t.Fatalf("%d steps, want the 12 months", len(rep.Result.Labels))
			}
			// a climatological axis is labelled by calendar month
			if l := rep.Result.Labels; l[0] != "Jan" || l[11] != "Dec" || !rep.Meta.Climatology || rep.Meta.Period != "Jan … Dec" {
				t.Errorf("labels %v, climatology %v, period %q", l, rep.Meta.Climatology, rep.Meta.Period)
			}
			for _, f := range []string{"map_convective_time_fraction", "map_crossing_rate", "map_relative_sst", "series"} {
				if _, err := os.Stat(filepath.Join(rep.OutDir, figures.DefaultDirName, f+".png")); err != nil {
					t.Errorf("figure %s: %v", f, err)
				}
			}
			if _, err := os.Stat(filepath.Join(rep.OutDir, figures.DefaultDirName, "map_eis.png")); err == nil {
				t.Error("an EIS map from a run without T700")
			}
			if name != "sst_mask" {
				// the mask leaves out land: fewer valid columns than SST alone
				return
			}
			out, err := exec.Command(py, "-c", bandSeries, sst).Output()
			if err != nil {
				t.Fatalf("python: %v", err)
			}
			var want [][2]float64
			if err := json.Unmarshal(out, &want); err != nil {
				t.Fatal(err)
			}
			got := readSeries(t, filepath.Join(rep.OutDir, output.SeriesCSV), "tropical_mean_sst [K]", "convective_area_fraction [1]")
			for m := range want {
				if math.Abs(got[m][0]-want[m][0]) > 1e-4 || math.Abs(got[m][1]-want[m][1]) > 1e-6 {
					t.Errorf("month %d: tropical-mean SST %.6f K, convective fraction %.6f; numpy %.6f K, %.6f", m+1, got[m][0], got[m][1], want[m][0], want[m][1])
				}
			}
		})
	}
}

// readSeries reads two columns of series.csv.
func readSeries(t *testing.T, path, a, b string) [][2]float64 {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	ia, ib := slices.Index(rows[0], a), slices.Index(rows[0], b)
	if ia < 0 || ib < 0 {
		t.Fatalf("series.csv has no %q or %q: %s", a, b, strings.Join(rows[0], ", "))
	}
	var out [][2]float64
	for _, r := range rows[1:] {
		x, _ := strconv.ParseFloat(r[ia], 64)
		y, _ := strconv.ParseFloat(r[ib], 64)
		out = append(out, [2]float64{x, y})
	}
	return out
}

// TestRealSSTWithT700Study runs a study with SST and 700 hPa temperature
// and no cloud on real files (the STR SST climatology, declared a
// climatology for its role only, and the one-month T42 temperature field
// of nug/rectilinear_grid_3D.nc): the run has LTS and EIS, their maps, no
// cloud and no relationship analysis, and its single step is the month
// of the temperature field. LTS is checked per cell against θ700 − θs
// (Klein & Hartmann 1993, J. Climate 6, p. 1588; θ = T (p0/p)^κ, p0 = 1000
// hPa, κ = Rd/cpd, common practice) at the conventions' surface pressure.
func TestRealSSTWithT700Study(t *testing.T) {
	sst := testutil.RealData(t, "cdf/sstdata_netcdf.nc")
	ta := testutil.RealData(t, "nug/rectilinear_grid_3D.nc")
	dir := t.TempDir()
	p := filepath.Join(dir, "study.yaml")
	study := `datasets:
  str-t42:
    files:
      sst: "` + sst + `"
      air_temperature: "` + ta + `"
    time:
      sst: {climatology: true}
    ocean: {mask: sst}
analysis:
  grid: {target: sst}
output: {dir: "` + dir + `", plots: true}
`
	if err := os.WriteFile(p, []byte(study), 0o644); err != nil {
		t.Fatal(err)
	}
	r, err := config.Load(p, config.LoadOptions{LookupEnv: config.NoEnvironment})
	if err != nil {
		t.Fatal(err)
	}
	reps, err := Run(context.Background(), r, nil, Options{})
	if err != nil {
		t.Fatal(err)
	}
	rep := reps[0]
	l := rep.Result.Acc.L
	if !slices.Equal(l.Quantities, []string{"sst", "t700", "lts", "eis"}) || l.Cloud != "" {
		t.Fatalf("quantities %v, cloud %q", l.Quantities, l.Cloud)
	}
	if len(rep.Result.Labels) != 1 || rep.Result.Labels[0] != "2001-01" || rep.Relations != nil {
		t.Errorf("labels %v, relationships %v", rep.Result.Labels, rep.Relations != nil)
	}
	for _, f := range []string{"map_eis", "map_lts", "map_convective_time_fraction", "series"} {
		if _, err := os.Stat(filepath.Join(rep.OutDir, figures.DefaultDirName, f+".png")); err != nil {
			t.Errorf("figure %s: %v", f, err)
		}
	}
	conv := r.Datasets[0].Metrics
	c := conv.Constants
	theta := func(T, p float64) float64 { return T * math.Pow(c.P0/p, c.Rd/c.Cpd) }
	qi := func(n string) int { return slices.Index(l.Quantities, n) }
	checked := 0
	acc := rep.Result.Acc
	for i := range acc.NCells() {
		for rg := regimes.Regime(0); rg < 3; rg++ {
			lts := acc.Moments(qi("lts"), rg, i)
			if lts.N == 0 {
				continue
			}
			s, t7 := acc.Moments(qi("sst"), rg, i).Mean, acc.Moments(qi("t700"), rg, i).Mean
			if want := theta(t7, 70000) - theta(s, conv.SurfacePressure); math.Abs(lts.Mean-want) > 2e-3 {
				t.Fatalf("cell %d: LTS %.5f K, θ700 − θs %.5f K", i, lts.Mean, want)
			}
			checked++
		}
	}
	if checked < 1000 {
		t.Errorf("only %d cells checked", checked)
	}
}
