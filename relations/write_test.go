package relations

import (
	"encoding/csv"
	"encoding/json"
	"errors"
	"io/fs"
	"lidscope/internal/testutil"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"lidscope/netcdf"
	"lidscope/regimes"
)

func richResults(t *testing.T) *Results {
	t.Helper()
	l := richLayout()
	acc, err := New(richConfig(), l, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range richSteps(48, 9) {
		acc.AddStep(s)
	}
	res, err := acc.Results()
	if err != nil {
		t.Fatal(err)
	}
	return res
}

var testMeta = Meta{Dataset: "synthetic-test", Title: "relations test (invented data)", Version: "0.0.0-test",
	Command: []string{"lidscope", "test"}, Created: time.Date(2026, 1, 2, 3, 4, 5, 0, time.UTC)}

func TestWriteFilesAndContents(t *testing.T) {
	t.Parallel()
	res := richResults(t)
	dir := filepath.Join(t.TempDir(), "out")
	files, err := Write(dir, res, testMeta, WriteOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(files) != 5 {
		t.Fatalf("files %v", files)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 5 {
		t.Errorf("directory holds %d entries (staging left behind?)", len(entries))
	}
	// JSON: number shape, mode, regime definition, uncertainty method.
	b, err := os.ReadFile(filepath.Join(dir, RelationshipsJSON))
	if err != nil {
		t.Fatal(err)
	}
	var doc map[string]any
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	if doc["relationships_mode"] != "climatological" || doc["format"] != "lidscope-relationships" || !strings.Contains(doc["uncertainty_method"].(string), "Bretherton") ||
		!strings.Contains(doc["regime_definition"].(string), "0.4 K") {
		t.Errorf("JSON header: mode %v format %v uncertainty %v regime %v", doc["relationships_mode"], doc["format"], doc["uncertainty_method"], doc["regime_definition"])
	}
	regs := doc["regressions"].([]any)
	if len(regs) != len(res.Regressions) {
		t.Fatalf("%d regressions in JSON, %d in results", len(regs), len(res.Regressions))
	}
	r0 := regs[0].(map[string]any)
	slope := r0["slope"].(map[string]any)
	if slope["units"] != res.Regressions[0].SlopeUnits || slope["value"].(float64) != res.Regressions[0].Slope || r0["relationships_mode"] != "climatological" {
		t.Errorf("first regression slope %v, want {%v %v}", slope, res.Regressions[0].Slope, res.Regressions[0].SlopeUnits)
	}
	if doc["threshold"] == nil || len(doc["flips"].([]any)) != 2 || len(doc["omega_regimes"].([]any)) == 0 {
		t.Error("threshold, flips or omega blocks missing from JSON")
	}
	// CSVs parse and have one row per result.
	for name, want := range map[string]int{RegressionsCSV: len(res.Regressions) + 2*len(res.Partials), FlipsCSV: 2 * len(res.Flips[0].Rows),
		ThresholdsCSV: 1 + len(res.Threshold.Years)} {
		f, _ := os.Open(filepath.Join(dir, name))
		rows, err := csv.NewReader(f).ReadAll()
		f.Close()
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if len(rows)-1 != want {
			t.Errorf("%s: %d rows, want %d", name, len(rows)-1, want)
		}
	}
	// NetCDF: read back one binned mean and the categorical axes.
	f, err := netcdf.Open(filepath.Join(dir, RelationshipsNC))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	v, err := f.Var("cloud_vs_eis_mean")
	if err != nil {
		t.Fatal(err)
	}
	data, _ := v.ReadAllFloat64()
	shape := v.Shape()
	if len(shape) != 4 || shape[0] != 3 || shape[1] != 5 || shape[2] != 3 || shape[3] != 20 {
		t.Fatalf("cloud_vs_eis_mean shape %v, want [3 5 3 20]", shape)
	}
	var bt Binned
	for _, x := range res.Binned {
		if x.Domain == "west" && x.Season == "JJA" && x.Regime == regimes.Subsidence && x.Predictor == "eis" && x.Response == "cloud" {
			bt = x
		}
	}
	base := ((1*5+3)*3 + 2) * 20 // domain 1 (west), season 3 (JJA), regime index 2 (subsidence)
	checked := 0
	for k, b := range bt.Bins {
		got := data[base+k]
		if math.IsNaN(b.Mean) {
			if got < 1e19 {
				t.Errorf("empty bin %d stored as %g, want the fill value", k, got)
			}
			continue
		}
		checked++
		if math.Abs(got-b.Mean) > 1e-6*math.Abs(b.Mean) {
			t.Errorf("bin %d: file %g, results %g", k, got, b.Mean)
		}
	}
	if checked == 0 {
		t.Error("no non-empty bin compared")
	}
	mode, _ := f.Attr("relationships_mode")
	fm, _ := mustVar(t, f, "domain").Attr("flag_meanings")
	if !strings.Contains(mode.String(), "climatological") || !strings.Contains(fm.String(), "tropical_band west north") {
		t.Errorf("relationships_mode %v, domain flag_meanings %v", mode, fm)
	}
}

func mustVar(t *testing.T, f *netcdf.File, name string) *netcdf.Var {
	t.Helper()
	v, err := f.Var(name)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// Write refuses to overwrite without Force, replaces with Force, and on a
// failure while moving files into place leaves the earlier outputs as
// they were.
func TestWriteAtomicity(t *testing.T) {
	res := richResults(t)
	dir := t.TempDir()
	if _, err := Write(dir, res, testMeta, WriteOptions{}); err != nil {
		t.Fatal(err)
	}
	before, _ := os.ReadFile(filepath.Join(dir, RegressionsCSV))
	if _, err := Write(dir, res, testMeta, WriteOptions{}); !errors.Is(err, fs.ErrExist) {
		t.Errorf("second Write without Force: %v, want fs.ErrExist", err)
	}
	res2 := *res
	res2.Regressions = res.Regressions[:1]
	hookCommit = func(name string) error {
		if name == ThresholdsCSV {
			return errors.New("injected failure")
		}
		return nil
	}
	_, err := Write(dir, &res2, testMeta, WriteOptions{Force: true})
	hookCommit = nil
	if err == nil {
		t.Fatal("injected failure not reported")
	}
	after, _ := os.ReadFile(filepath.Join(dir, RegressionsCSV))
	if string(after) != string(before) {
		t.Error("a failed Write changed the earlier regressions.csv")
	}
	if _, err := Write(dir, &res2, testMeta, WriteOptions{Force: true}); err != nil {
		t.Fatal(err)
	}
	after, _ = os.ReadFile(filepath.Join(dir, RegressionsCSV))
	if string(after) == string(before) {
		t.Error("Write with Force did not replace regressions.csv")
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if strings.HasPrefix(e.Name(), ".") {
			t.Errorf("left behind: %s", e.Name())
		}
	}
	if _, err := Write(filepath.Join(dir, RegressionsCSV), res, testMeta, WriteOptions{}); err == nil {
		t.Error("writing into a file path must fail")
	}
}

// xarray (Debian python3-xarray, through Debian's python3) opens
// relationships.nc, decodes the fill values and sees the bins and
// categorical axes; ncdump -h (netcdf-bin) reads the header.
func TestWriteReadByXarray(t *testing.T) {
	t.Parallel()
	py := testutil.Python(t, "numpy", "xarray", "netCDF4")
	res := richResults(t)
	dir := t.TempDir()
	if _, err := Write(dir, res, testMeta, WriteOptions{}); err != nil {
		t.Fatal(err)
	}
	script := `
import json, sys
import numpy as np
import xarray as xr
ds = xr.open_dataset(sys.argv[1])
m = ds["cloud_vs_eis_mean"]
print(json.dumps({"dims": list(m.dims), "nan": int(np.isnan(m.values).sum()), "size": int(m.size),
  "eis_bnds": ds["eis_bin_bnds"].values[0].tolist(), "mode": ds.attrs["relationships_mode"],
  "omega_pdf_sum": float(np.nansum(ds["omega_pdf"].values[0,0]) * 10),
  "omega_freq_units": ds["omega_pdf"].attrs["units"],
  "west_jja_subs": [None if np.isnan(x) else float(x) for x in m.values[1,3,2]]}))
`
	out, err := exec.Command(py, "-c", script, filepath.Join(dir, RelationshipsNC)).CombinedOutput()
	if err != nil {
		t.Fatalf("xarray: %v\n%s", err, out)
	}
	var got struct {
		Dims           []string
		NaN, Size      int
		EISBnds        []float64 `json:"eis_bnds"`
		Mode           string
		OmegaPDFSum    float64    `json:"omega_pdf_sum"`
		OmegaFreqUnits string     `json:"omega_freq_units"`
		WestJJASubs    []*float64 `json:"west_jja_subs"`
	}
	if err := json.Unmarshal(out, &got); err != nil {
		t.Fatalf("%v: %s", err, out)
	}
	if strings.Join(got.Dims, " ") != "domain season regime eis_bin" || got.Mode != "climatological" || got.EISBnds[0] != -6 || got.EISBnds[1] != -5 {
		t.Errorf("xarray sees %+v", got)
	}
	if got.NaN == 0 || got.NaN == got.Size {
		t.Errorf("%d of %d values missing: fill values not decoded as NaN?", got.NaN, got.Size)
	}
	o := res.Omega[0]
	var share float64
	for _, b := range o.Bins {
		share += b.Frequency
	}
	if math.Abs(got.OmegaPDFSum-share) > 1e-5 {
		t.Errorf("xarray: Σ pdf × 10 = %g, results' in-range share %g", got.OmegaPDFSum, share)
	}
	for _, bt := range res.Binned {
		if bt.Domain == "west" && bt.Season == "JJA" && bt.Regime == regimes.Subsidence && bt.Predictor == "eis" && bt.Response == "cloud" {
			for k, b := range bt.Bins {
				x := got.WestJJASubs[k]
				if (x == nil) != math.IsNaN(b.Mean) || (x != nil && math.Abs(*x-b.Mean) > 1e-6*math.Abs(b.Mean)) {
					t.Errorf("bin %d: xarray %v, results %g", k, x, b.Mean)
				}
			}
		}
	}
	nd := testutil.Tool(t, "ncdump")
	hdr, err := exec.Command(nd, "-h", filepath.Join(dir, RelationshipsNC)).CombinedOutput()
	if err != nil {
		t.Fatalf("ncdump: %v\n%s", err, hdr)
	}
	for _, want := range []string{":Conventions = \"CF-1.10\"", "cloud_vs_eis_stderr(domain, season, regime, eis_bin)", "omega_pdf:units = \"d hPa-1\"", ":uncertainty_method"} {
		if !strings.Contains(string(hdr), want) {
			t.Errorf("ncdump -h lacks %q", want)
		}
	}
}
