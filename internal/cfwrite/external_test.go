package cfwrite_test

import (
	"encoding/json"
	"fmt"
	"lidscope/internal/testutil"
	"math"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"lidscope/internal/cfwrite"
)

// Independent readers: the files are checked with tools that share no code
// with this package: ncdump (Unidata netCDF-C utilities, Debian netcdf-bin),
// xarray with netCDF4 and cftime (Debian python3-xarray, python3-netcdf4,
// python3-cftime, run by Debian's python3) and CDO (Debian cdo).

func run(t *testing.T, name string, args ...string) string {
	t.Helper()
	out, err := exec.Command(name, args...).CombinedOutput()
	if err != nil {
		t.Fatalf("%s %s: %v\n%s", name, strings.Join(args, " "), err, out)
	}
	return string(out)
}

func containsAll(t *testing.T, tool, text string, want []string) {
	t.Helper()
	for _, w := range want {
		if !strings.Contains(text, w) {
			t.Errorf("%s output lacks %q", tool, w)
		}
	}
	if t.Failed() {
		t.Logf("%s output:\n%s", tool, text)
	}
}

// TestNcdumpDeclarations: `ncdump -hs` (netcdf-bin) shows the CDL
// declarations CF-1.10 asks for and the storage settings (chunk sizes,
// deflate level, shuffle) the writer promises; `ncdump -v` shows the
// missing values as "_", netCDF's notation for the fill value.
func TestNcdumpDeclarations(t *testing.T) {
	t.Parallel()
	ncdump := testutil.Tool(t, "ncdump")
	dir := t.TempDir()
	maps := filepath.Join(dir, "maps.nc")
	table := filepath.Join(dir, "table.nc")
	writeMaps(t, maps, "standard")
	writeTable(t, table)

	if k := strings.TrimSpace(run(t, ncdump, "-k", maps)); k != "netCDF-4 classic model" {
		t.Errorf("ncdump -k: %q, want netCDF-4 classic model", k)
	}
	containsAll(t, "ncdump -hs maps.nc", run(t, ncdump, "-hs", maps), []string{
		"\tlat = 3 ;", "\tlon = 4 ;", "\tbnds = 2 ;", "\ttime = UNLIMITED ; // (2 currently)",
		"\tdouble lat(lat) ;",
		`lat:standard_name = "latitude" ;`, `lat:units = "degrees_north" ;`, `lat:axis = "Y" ;`, `lat:bounds = "lat_bnds" ;`,
		"\tdouble lat_bnds(lat, bnds) ;",
		"\tdouble lon(lon) ;",
		`lon:standard_name = "longitude" ;`, `lon:units = "degrees_east" ;`, `lon:axis = "X" ;`, `lon:bounds = "lon_bnds" ;`,
		"\tdouble lon_bnds(lon, bnds) ;",
		"\tdouble time(time) ;",
		`time:standard_name = "time" ;`, `time:units = "days since 1979-01-01" ;`, `time:calendar = "standard" ;`,
		`time:axis = "T" ;`, `time:bounds = "time_bnds" ;`,
		"\tdouble time_bnds(time, bnds) ;",
		"\tdouble plev ;", `plev:standard_name = "air_pressure" ;`, `plev:units = "Pa" ;`, `plev:positive = "down" ;`,
		"\tfloat sst(time, lat, lon) ;",
		`sst:standard_name = "sea_surface_temperature" ;`, `sst:units = "K" ;`, "sst:_FillValue = 1.e+20f ;",
		`sst:cell_methods = "time: mean area: mean where sea" ;`, "sst:valid_min = 260.f ;",
		"sst:_ChunkSizes = 1, 3, 4 ;", "sst:_DeflateLevel = 4 ;", `sst:_Shuffle = "true" ;`,
		`ta700:coordinates = "plev" ;`,
		"\tdouble sst_tropmean(time) ;", "sst_tropmean:_FillValue = 1.e+20 ;",
		`:Conventions = "CF-1.10" ;`,
		`:title = "lidscope synthetic test field (invented data)" ;`,
		`:history = "2026-03-04T05:06:07Z: lidscope maps --in \'sst file.nc\'" ;`,
		`:lidscope_version = "0.0-test" ;`,
	})
	// Step 0 row 1 is 294, _, 296, 297: index 5 is missing.
	containsAll(t, "ncdump -v sst maps.nc", run(t, ncdump, "-v", "sst", maps), []string{
		"294, _, 296, 297,", "298.25, 299.25, _, 301.25 ;",
	})
	containsAll(t, "ncdump -hs table.nc", run(t, ncdump, "-h", table), []string{
		"\tregime = 2 ;", "\teis_bin = 3 ;",
		"\tint regime(regime) ;", "regime:flag_values = 0, 1 ;", `regime:flag_meanings = "convective subsidence" ;`,
		"\tdouble eis_bin(eis_bin) ;", `eis_bin:bounds = "eis_bin_bnds" ;`, "\tdouble eis_bin_bnds(eis_bin, bnds) ;",
		"\tfloat cloud_mean(regime, eis_bin) ;",
		"\tint count(regime, eis_bin) ;", "count:_FillValue = -2147483647 ;",
	})
}

const xarrayMaps = `
import json, sys
import numpy as np, xarray as xr
def clean(a):
    return [None if np.isnan(v) else float(v) for v in np.asarray(a, dtype=float).ravel()]
out = {}
with xr.open_dataset(sys.argv[1]) as ds:
    out["time"] = [str(v) for v in ds.time.values]
    out["time_bnds"] = [str(v) for v in ds.time_bnds.values.ravel()]
    out["sst_dtype"] = str(ds.sst.dtype)
    out["sst"] = clean(ds.sst.values)
    out["sst_fill"] = float(ds.sst.encoding["_FillValue"])
    out["sst_units"] = ds.sst.attrs["units"]
    out["mean"] = clean(ds.sst_tropmean.values)
    out["plev"] = float(ds.ta700.coords["plev"].values)
    out["lat_bnds"] = clean(ds[ds.lat.attrs["bounds"]].values)
    out["chunks"] = list(ds.sst.encoding["chunksizes"])
    out["conventions"] = ds.attrs["Conventions"]
print(json.dumps(out))
`

const xarrayTable = `
import json, sys
import numpy as np, xarray as xr
with xr.open_dataset(sys.argv[1]) as ds:
    out = {
        "regime": [int(v) for v in ds.regime.values],
        "flag_values": [int(v) for v in ds.regime.attrs["flag_values"]],
        "flag_meanings": ds.regime.attrs["flag_meanings"].split(),
        "eis_bin": [float(v) for v in ds.eis_bin.values],
        "cloud_mean": [None if np.isnan(v) else float(v) for v in ds.cloud_mean.values.ravel()],
        "count": [float(v) for v in ds["count"].values.ravel()],
    }
print(json.dumps(out))
`

const xarrayCalendars = `
import json, sys
import xarray as xr
out = []
for p in sys.argv[1:]:
    with xr.open_dataset(p) as ds:
        v = ds.time.values[0]
        out.append([type(v).__name__, str(v)])
print(json.dumps(out))
`

func python(t *testing.T, py, script string, v any, args ...string) {
	t.Helper()
	out := run(t, py, append([]string{"-c", script}, args...)...)
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if err := json.Unmarshal([]byte(lines[len(lines)-1]), v); err != nil {
		t.Fatalf("python output %q: %v", out, err)
	}
}

// TestXarrayReadsMaps: xarray decodes the time axis to the dates that
// "days since 1979-01-01" with the standard calendar denotes (CF-1.10 §4.4;
// 15 and 45 days after 1979-01-01 are 1979-01-16 and 1979-02-15 by the
// ordinary calendar), masks the fill values as NaN, and finds the scalar
// coordinate and the bounds by their attributes.
func TestXarrayReadsMaps(t *testing.T) {
	t.Parallel()
	py := testutil.Python(t, "xarray", "netCDF4", "cftime")
	path := tempPath(t, "maps.nc")
	writeMaps(t, path, "standard")
	var got struct {
		Time        []string
		TimeBnds    []string `json:"time_bnds"`
		SSTDtype    string   `json:"sst_dtype"`
		SST         []*float64
		SSTFill     float64 `json:"sst_fill"`
		SSTUnits    string  `json:"sst_units"`
		Mean        []*float64
		Plev        float64
		LatBnds     []*float64 `json:"lat_bnds"`
		Chunks      []int
		Conventions string
	}
	python(t, py, xarrayMaps, &got, path)
	if want := []string{"1979-01-16T00:00:00.000000000", "1979-02-15T00:00:00.000000000"}; fmt.Sprint(got.Time) != fmt.Sprint(want) {
		t.Errorf("xarray decodes time as %v, want %v", got.Time, want)
	}
	wantBnds := []string{"1979-01-01T00:00:00.000000000", "1979-02-01T00:00:00.000000000",
		"1979-02-01T00:00:00.000000000", "1979-03-01T00:00:00.000000000"}
	if fmt.Sprint(got.TimeBnds) != fmt.Sprint(wantBnds) {
		t.Errorf("xarray decodes time_bnds as %v, want %v", got.TimeBnds, wantBnds)
	}
	if got.SSTDtype != "float32" || got.SSTFill != float64(float32(1e20)) || got.SSTUnits != "K" {
		t.Errorf("sst dtype %s fill %g units %s, want float32, 1e20f, K", got.SSTDtype, got.SSTFill, got.SSTUnits)
	}
	if len(got.SST) != 24 {
		t.Fatalf("xarray read %d sst values, want 24", len(got.SST))
	}
	for i, p := range got.SST {
		want := fixSST(i/12, i%12)
		switch {
		case math.IsNaN(want) && p != nil:
			t.Errorf("sst[%d]: xarray reads %g, want NaN (masked fill)", i, *p)
		case !math.IsNaN(want) && (p == nil || *p != want):
			t.Errorf("sst[%d]: xarray reads %v, want %g", i, p, want)
		}
	}
	if len(got.Mean) != 2 || got.Mean[0] == nil || *got.Mean[0] != 300.125 {
		t.Errorf("sst_tropmean %v", got.Mean)
	}
	if got.Plev != 70000 {
		t.Errorf("scalar coordinate plev %g, want 70000", got.Plev)
	}
	if got.Conventions != "CF-1.10" || fmt.Sprint(got.Chunks) != "[1 3 4]" {
		t.Errorf("Conventions %q chunks %v", got.Conventions, got.Chunks)
	}
	var lb []float64
	for _, p := range got.LatBnds {
		lb = append(lb, *p)
	}
	if fmt.Sprint(lb) != "[15 5 5 -5 -5 -15]" {
		t.Errorf("lat_bnds via the bounds attribute: %v", lb)
	}
}

// TestXarrayCalendars: one value, 59 days since 2000-01-01, decoded by
// xarray/cftime in three calendars of CF-1.10 §4.4.1. By the calendars'
// definitions: standard has 31 + 29 days in Jan–Feb 2000 (2000 is a
// Gregorian leap year), so day 59 is 2000-02-29; noleap has 31 + 28, so
// 2000-03-01; 360_day has 30 + 30, so 2000-02-30. Non-standard calendars
// decode to cftime objects.
func TestXarrayCalendars(t *testing.T) {
	t.Parallel()
	py := testutil.Python(t, "xarray", "netCDF4", "cftime")
	dir := t.TempDir()
	cals := []struct{ cal, typ, date string }{
		{"standard", "datetime64", "2000-02-29T00:00:00.000000000"},
		{"noleap", "DatetimeNoLeap", "2000-03-01 00:00:00"},
		{"360_day", "Datetime360Day", "2000-02-30 00:00:00"},
	}
	var paths []string
	for _, c := range cals {
		p := filepath.Join(dir, c.cal+".nc")
		w, err := cfwrite.Create(p, fixOptions())
		must(t, err)
		must(t, w.SetTime(cfwrite.TimeAxis{Units: "days since 2000-01-01", Calendar: c.cal}))
		v, err := w.AddVar(cfwrite.VarSpec{Name: "x", Dims: []string{"time"}, Units: "1", LongName: "synthetic"})
		must(t, err)
		i, err := w.AppendTime(59)
		must(t, err)
		must(t, v.WriteStep(i, []float64{1}))
		must(t, w.Close())
		paths = append(paths, p)
	}
	var got [][2]string
	python(t, py, xarrayCalendars, &got, paths...)
	for i, c := range cals {
		if got[i][0] != c.typ || got[i][1] != c.date {
			t.Errorf("%s: xarray decodes day 59 as %s %q, want %s %q", c.cal, got[i][0], got[i][1], c.typ, c.date)
		}
	}
}

// TestXarrayReadsTable: the categorical axis keeps its flag_values and
// flag_meanings (CF-1.10 §3.5), the empty bin reads as NaN.
func TestXarrayReadsTable(t *testing.T) {
	t.Parallel()
	py := testutil.Python(t, "xarray", "netCDF4")
	path := tempPath(t, "table.nc")
	writeTable(t, path)
	var got struct {
		Regime       []int
		FlagValues   []int      `json:"flag_values"`
		FlagMeanings []string   `json:"flag_meanings"`
		EISBin       []float64  `json:"eis_bin"`
		CloudMean    []*float64 `json:"cloud_mean"`
		Count        []float64
	}
	python(t, py, xarrayTable, &got, path)
	if fmt.Sprint(got.Regime, got.FlagValues, got.FlagMeanings) != "[0 1] [0 1] [convective subsidence]" {
		t.Errorf("regime %v flag_values %v flag_meanings %v", got.Regime, got.FlagValues, got.FlagMeanings)
	}
	if fmt.Sprint(got.EISBin) != "[-1 1 3]" {
		t.Errorf("eis_bin %v", got.EISBin)
	}
	for i, p := range got.CloudMean {
		want := fixSlope(i/3, i%3)
		if math.IsNaN(want) != (p == nil) || (p != nil && *p != want) {
			t.Errorf("cloud_mean[%d] = %v, want %g", i, p, want)
		}
	}
	if fmt.Sprint(got.Count) != "[0 1 2 10 11 12]" {
		t.Errorf("count %v", got.Count)
	}
}

// TestCdoReads: CDO recognises the grid as lonlat of the right size, the
// time axis and calendar, counts the missing values per step (infon) and
// computes an area-weighted field mean (fldmean) from the bounds written.
// The expected field mean uses cell areas proportional to
// Δλ·(sin φ_north − sin φ_south), the area of a latitude–longitude cell on a
// sphere (common practice), over the bounds given; the bounds are uneven on
// purpose, so a reader that ignored them and derived edges from the centres
// would get a mean about 1 K away. The cells are 0.5° wide: CDO takes
// cell edges as great-circle arcs, which differ from the parallels by a
// negligible area at that width (at 90° width they would not).
func TestCdoReads(t *testing.T) {
	t.Parallel()
	cdo := testutil.Tool(t, "cdo")
	dir := t.TempDir()
	path := filepath.Join(dir, "maps.nc")
	latB := [][2]float64{{20, 5}, {5, -5}, {-5, -12}}
	w, err := cfwrite.Create(path, fixOptions())
	must(t, err)
	must(t, w.SetGrid(cfwrite.Grid{Lat: fixLat, Lon: []float64{0, 0.5, 1, 1.5}, LatBounds: latB}))
	must(t, w.SetTime(cfwrite.TimeAxis{Units: "days since 1979-01-01", Calendar: "standard", Bounds: true}))
	v, err := w.AddVar(cfwrite.VarSpec{Name: "sst", Dims: []string{"time", "lat", "lon"}, Units: "K", StandardName: "sea_surface_temperature"})
	must(t, err)
	for s, st := range [][3]float64{{15, 0, 31}, {45, 31, 59}} {
		i, err := w.AppendTimeBounded(st[0], st[1], st[2])
		must(t, err)
		d := make([]float64, 12)
		for k := range d {
			d[k] = fixSST(s, k)
		}
		must(t, v.WriteStep(i, d))
	}
	must(t, w.Close())

	containsAll(t, "cdo sinfo", run(t, cdo, "-s", "sinfo", path), []string{
		"NetCDF4 classic zip", "lonlat", "points=12 (4x3)", "available : cellbounds",
		"Calendar = standard", "Bounds = true", "time : 2 steps",
		"1979-01-16 00:00:00  1979-02-15 00:00:00",
	})

	// infon: per step, Gridsize and Miss, then minimum, mean, maximum of the
	// valid values, printed with 2 decimals.
	info := run(t, cdo, "-s", "infon", path)
	var rows [][]string
	for _, l := range strings.Split(info, "\n") {
		f := strings.Fields(l)
		if len(f) >= 12 && f[0] != "-1" && f[len(f)-1] == "sst" {
			rows = append(rows, f)
		}
	}
	if len(rows) != 2 {
		t.Fatalf("cdo infon: %d sst rows, want 2:\n%s", len(rows), info)
	}
	for s, f := range rows {
		var vals []float64
		for k := range 12 {
			if x := fixSST(s, k); !math.IsNaN(x) {
				vals = append(vals, x)
			}
		}
		lo, hi, sum := math.Inf(1), math.Inf(-1), 0.0
		for _, x := range vals {
			lo, hi, sum = math.Min(lo, x), math.Max(hi, x), sum+x
		}
		// Fields: n : date time level gridsize miss : min mean max : name
		if f[5] != "12" || f[6] != strconv.Itoa(12-len(vals)) {
			t.Errorf("cdo infon step %d: gridsize %s miss %s, want 12 and %d", s, f[5], f[6], 12-len(vals))
		}
		for j, want := range []float64{lo, sum / float64(len(vals)), hi} {
			got, err := strconv.ParseFloat(f[8+j], 64)
			if err != nil || math.Abs(got-want) > 0.0051 {
				t.Errorf("cdo infon step %d statistic %d: %s, want %.4f", s, j, f[8+j], want)
			}
		}
	}

	out := run(t, cdo, "-s", "outputf,%.10g", "-fldmean", path)
	got := strings.Fields(out)
	if len(got) != 2 {
		t.Fatalf("cdo fldmean printed %q, want 2 values", out)
	}
	for s := range 2 {
		num, den := 0.0, 0.0
		for k := range 12 {
			x := fixSST(s, k)
			if math.IsNaN(x) {
				continue
			}
			b := latB[k/4]
			a := math.Abs(math.Sin(b[0]*math.Pi/180) - math.Sin(b[1]*math.Pi/180))
			num += a * x
			den += a
		}
		want := num / den
		g, err := strconv.ParseFloat(got[s], 64)
		if err != nil || math.Abs(g-want) > 1e-4 {
			t.Errorf("cdo fldmean step %d = %s, want %.6f (area weights from the written bounds)", s, got[s], want)
		}
	}
}
