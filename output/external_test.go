package output

// Checks with reference tools nobody here wrote: Debian's xarray/cftime
// (through Debian's python3), CDO 2.1.1 and the UDUNITS-2 library that CDO
// depends on. Each test skips when its tool is missing and CI is unset, and
// fails when CI is set.

import (
	"encoding/json"
	"lidscope/internal/testutil"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// runTool runs a reference tool and returns its standard output; standard
// error goes to the test log only on failure (CDO's HDF5 layer prints
// harmless diagnostics there for attributes it probes).
func runTool(t *testing.T, name string, args ...string) string {
	t.Helper()
	cmd := exec.Command(name, args...)
	var stderr strings.Builder
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("%s %s: %v\n%s\n%s", name, strings.Join(args, " "), err, out, lastLines(stderr.String(), 20))
	}
	return string(out)
}

func lastLines(s string, n int) string {
	l := strings.Split(strings.TrimRight(s, "\n"), "\n")
	if len(l) > n {
		l = l[len(l)-n:]
	}
	return strings.Join(l, "\n")
}

const xarrayScript = `
import json, sys
import numpy as np
import xarray as xr
maps = xr.open_dataset(sys.argv[1])
ser = xr.open_dataset(sys.argv[2])
def iso(v):
    s = str(v)
    return s.replace(" ", "T")[:19]
out = {
    "series_time_dtype": str(ser.time.dtype),
    "series_first": iso(ser.time.values[0]),
    "series_last": iso(ser.time.values[-1]),
    "series_steps": int(ser.time.size),
    "maps_time": iso(maps.time.values[0]),
    "maps_bounds": [iso(v) for v in maps[maps.time.attrs["bounds"]].values[0]] if "bounds" in maps.time.attrs else [],
    "flag_meanings": maps.regime.attrs["flag_meanings"],
    "land_convective_fraction_is_nan": bool(np.isnan(maps.convective_time_fraction.values[0, 0, 0])),
    "eis_mean_col5": [None if np.isnan(x) else float(x) for x in maps.eis_mean.values[0, :, 1, 1]],
    "eis_mean_col6": [None if np.isnan(x) else float(x) for x in maps.eis_mean.values[0, :, 1, 2]],
    "dwell_units": maps.convective_dwell.attrs["units"],
    "conv_area_mean": float(np.nanmean(ser.area_fraction.values[:, 0])),
    "conv_area_std": float(np.nanstd(ser.area_fraction.values[:, 0])),
    "sst_mean": float(ser.tropical_mean_sst.mean()),
    "p700": float(maps.p700),
}
print(json.dumps(out))
`

// xarrayRead opens both NetCDF outputs with Debian's xarray (times decoded
// by xarray, through cftime for non-standard calendars).
func xarrayRead(t *testing.T, dir string) map[string]any {
	t.Helper()
	py := testutil.Python(t, "xarray", "netCDF4", "cftime", "numpy")
	out := runTool(t, py, "-c", xarrayScript, filepath.Join(dir, MapsNC), filepath.Join(dir, SeriesNC))
	var m map[string]any
	if err := json.Unmarshal([]byte(out), &m); err != nil {
		t.Fatalf("xarray script output %q: %v", out, err)
	}
	return m
}

func TestXarrayReadsOutputs(t *testing.T) {
	t.Parallel()
	for _, bounded := range []bool{true, false} {
		t.Run(map[bool]string{true: "with time bounds", false: "inferred bounds"}[bounded], func(t *testing.T) {
			f := newFixture(t)
			if bounded {
				f.meta.TimeBounds = fixBounds
			}
			dir, _ := f.write(t)
			m := xarrayRead(t, dir)
			// Days since 1970-01-01: 11337 is 2001-01-15 and 11488 is
			// 2001-06-15 (see fixTimes; calendar arithmetic).
			if !strings.HasPrefix(m["series_time_dtype"].(string), "datetime64") ||
				m["series_first"] != "2001-01-15T00:00:00" || m["series_last"] != "2001-06-15T00:00:00" || m["series_steps"].(float64) != 6 {
				t.Errorf("xarray decoded series time as %v %v … %v (%v steps)", m["series_time_dtype"], m["series_first"], m["series_last"], m["series_steps"])
			}
			// The record 2001-01-01 … 2001-07-01 (11323 … 11504 days), middle
			// 11413.5 = 2001-04-01T12:00; inferred: 11321.5 … 11503.5.
			wantT, wantB := "2001-04-01T12:00:00", []any{"2001-01-01T00:00:00", "2001-07-01T00:00:00"}
			if !bounded {
				wantT, wantB = "2001-03-31T12:00:00", []any{"2000-12-30T12:00:00", "2001-06-30T12:00:00"}
			}
			b := m["maps_bounds"].([]any)
			if m["maps_time"] != wantT || len(b) != 2 || b[0] != wantB[0] || b[1] != wantB[1] {
				t.Errorf("xarray decoded the maps period as %v %v, want %v %v", m["maps_time"], b, wantT, wantB)
			}
			if m["flag_meanings"] != "convective transition subsidence" || m["dwell_units"] != "month" || m["p700"].(float64) != 70000 {
				t.Errorf("attributes as xarray reads them: %v %v %v", m["flag_meanings"], m["dwell_units"], m["p700"])
			}
			if m["land_convective_fraction_is_nan"] != true {
				t.Error("xarray did not mask the land column's fill value as NaN")
			}
			// Hand-worked columns 5 and 6 (see TestMapsByHand), regime
			// order convective, transition, subsidence.
			if fmtList(m["eis_mean_col5"]) != "7 8 8" || fmtList(m["eis_mean_col6"]) != "8.5 NaN 9" {
				t.Errorf("xarray reads eis_mean %v and %v, want 7 8 8 and 8.5 NaN 9", m["eis_mean_col5"], m["eis_mean_col6"])
			}
			// numpy's nanmean/nanstd over series.nc against summary.json.
			s := readJSON(t, filepath.Join(dir, SummaryJSON))
			if got, want := value(t, s, "area_fraction", "convective", "mean"), m["conv_area_mean"].(float64); math.Abs(got-want) > 1e-7 {
				t.Errorf("summary convective area fraction mean %v, numpy over series.nc %v", got, want)
			}
			if got, want := value(t, s, "area_fraction", "convective", "std"), m["conv_area_std"].(float64); math.Abs(got-want) > 1e-7 {
				t.Errorf("summary convective area fraction std %v, numpy over series.nc %v", got, want)
			}
			if got, want := value(t, s, "tropical_mean_sst", "mean"), m["sst_mean"].(float64); math.Abs(got-want) > 1e-9 {
				t.Errorf("summary tropical-mean SST %v, xarray %v", got, want)
			}
		})
	}
}

func fmtList(v any) string {
	var parts []string
	for _, x := range v.([]any) {
		if x == nil {
			parts = append(parts, "NaN")
		} else {
			parts = append(parts, strconv.FormatFloat(x.(float64), 'g', 7, 64))
		}
	}
	return strings.Join(parts, " ")
}

// TestXarrayNoLeap: a model calendar reaches both files; cftime decodes
// it. In the noleap calendar 2001-01-01 is 31 × 365 = 11315 days after
// 1970-01-01 (CF-1.10 §4.4.1: every year has 365 days).
func TestXarrayNoLeap(t *testing.T) {
	t.Parallel()
	f := newFixture(t)
	f.meta.Calendar = "noleap"
	for i := range f.meta.TimeValues {
		f.meta.TimeValues[i] -= 8 // the standard calendar's 8 leap days of 1972 … 2000
	}
	dir, _ := f.write(t)
	m := xarrayRead(t, dir)
	if m["series_first"] != "2001-01-15T00:00:00" || m["series_last"] != "2001-06-15T00:00:00" {
		t.Errorf("cftime decoded the noleap axis as %v … %v, want 2001-01-15 … 2001-06-15", m["series_first"], m["series_last"])
	}
	if strings.HasPrefix(m["series_time_dtype"].(string), "datetime64") {
		t.Errorf("a noleap axis decoded to %v; xarray should use cftime objects", m["series_time_dtype"])
	}
}

// TestCDOSinfo: CDO reads both files and sees the grid, the regime axis
// and the time axis.
func TestCDOSinfo(t *testing.T) {
	cdo := testutil.Tool(t, "cdo")
	f := newFixture(t)
	dir, _ := f.write(t)
	maps := runTool(t, cdo, "sinfo", filepath.Join(dir, MapsNC))
	for _, want := range []string{"lonlat", "points=16 (4x4)", "cellbounds", "regime : 0 to 2 by 1", "time : 1 step", "2001-03-31 12:00:00", "Bounds = true"} {
		if !strings.Contains(squeeze(maps), want) {
			t.Errorf("cdo sinfo maps.nc does not show %q:\n%s", want, maps)
		}
	}
	// 15 variables: 3 fractions, crossing rate, 2 dwell, valid steps,
	// 2 relative SST, 3 quantities × (mean, count).
	if n := len(regexp.MustCompile(`(?m)^\s+\d+ : unknown`).FindAllString(maps, -1)); n != 15 {
		t.Errorf("cdo sinfo lists %d variables in maps.nc, want 15:\n%s", n, maps)
	}
	series := runTool(t, cdo, "sinfo", filepath.Join(dir, SeriesNC))
	for _, want := range []string{"time : 6 steps", "2001-01-15 00:00:00", "2001-06-15 00:00:00", "p700 : 70000 Pa"} {
		if !strings.Contains(squeeze(series), want) {
			t.Errorf("cdo sinfo series.nc does not show %q:\n%s", want, series)
		}
	}
}

// squeeze collapses runs of blanks, since CDO aligns its columns.
func squeeze(s string) string { return regexp.MustCompile(`[ \t]+`).ReplaceAllString(s, " ") }

func cdoValues(t *testing.T, out string) []float64 {
	t.Helper()
	var v []float64
	for _, f := range strings.Fields(out) {
		x, err := strconv.ParseFloat(f, 64)
		if err != nil {
			t.Fatalf("cdo output %q: %v", out, err)
		}
		v = append(v, x)
	}
	return v
}

// TestCDOWeightedMeans checks the area weighting of summary.json against
// CDO's fldmean (area-weighted field mean with CDO's own cell areas from
// lat_bnds/lon_bnds, missing values left out; CDO 2.1.1 documentation,
// "fldmean"): the crossings per year averaged over the band's ocean
// columns, and the band regime means, which are Σ w n m / Σ w n for the
// per-column means m and counts n of maps.nc.
func TestCDOWeightedMeans(t *testing.T) {
	t.Parallel()
	cdo := testutil.Tool(t, "cdo")
	f := newFineFixture(t)
	dir := filepath.Join(t.TempDir(), "out")
	if _, err := Write(dir, f.acc, f.meta, Options{}); err != nil {
		t.Fatal(err)
	}
	maps := filepath.Join(dir, MapsNC)
	s := readJSON(t, filepath.Join(dir, SummaryJSON))
	rel := func(a, b float64) float64 { return math.Abs(a-b) / math.Max(math.Abs(b), 1e-300) }

	got := cdoValues(t, runTool(t, cdo, "-s", "-outputf,%.17g,1", "-fldmean", "-selname,crossing_rate", maps))
	want := value(t, s, "crossing_rate", "mean")
	if len(got) != 1 || rel(got[0], want) > 1e-6 {
		t.Errorf("CDO fldmean of crossing_rate = %v, summary.json %v", got, want)
	}
	for _, q := range []string{"eis", "cloud"} {
		out := runTool(t, cdo, "-s", "-outputf,%.17g,1", "-div",
			"-fldmean", "-setmisstoc,0", "-mul", "-selname,"+q+"_mean", maps, "-selname,"+q+"_count", maps,
			"-fldmean", "-selname,"+q+"_count", maps)
		got := cdoValues(t, out)
		if len(got) != 3 {
			t.Fatalf("CDO gave %v for the three regimes of %s", got, q)
		}
		for k, name := range []string{"convective", "transition", "subsidence"} {
			// float32 storage of the per-column means limits the agreement.
			if w := value(t, s, "band_mean", q, name, "mean"); rel(got[k], w) > 1e-6 {
				t.Errorf("band mean of %s in %s: CDO %v, summary.json %v", q, name, got[k], w)
			}
		}
	}
}

const udunitsScript = `
import ctypes, json, sys
u = ctypes.CDLL("libudunits2.so.0")
u.ut_set_error_message_handler(u.ut_ignore)
u.ut_read_xml.restype = ctypes.c_void_p
u.ut_read_xml.argtypes = [ctypes.c_char_p]
u.ut_parse.restype = ctypes.c_void_p
u.ut_parse.argtypes = [ctypes.c_void_p, ctypes.c_char_p, ctypes.c_int]
u.ut_get_converter.restype = ctypes.c_void_p
u.ut_get_converter.argtypes = [ctypes.c_void_p, ctypes.c_void_p]
u.cv_convert_double.restype = ctypes.c_double
u.cv_convert_double.argtypes = [ctypes.c_void_p, ctypes.c_double]
system = u.ut_read_xml(None)
if not system:
    sys.exit("UDUNITS-2 could not read its unit database")
out = {}
for pair in json.loads(sys.argv[1]):
    unit, si = pair
    a = u.ut_parse(system, unit.encode(), 1)  # UT_UTF8
    b = u.ut_parse(system, si.encode(), 1)
    if not a or not b:
        out[unit] = None
        continue
    c = u.ut_get_converter(a, b)
    out[unit] = u.cv_convert_double(c, 1.0) if c else None
print(json.dumps(out))
`

// TestUDUNITS parses every units string of the outputs with the UDUNITS-2
// library (Debian libudunits2-0, a dependency of CDO) and converts it to
// SI: CF-1.10 §3.1 requires units that UDUNITS understands. yr is the
// tropical year 3.15569259747e7 s and month a twelfth of it
// (udunits2-common.xml of UDUNITS-2.2.28).
func TestUDUNITS(t *testing.T) {
	t.Parallel()
	testutil.Tool(t, "cdo")
	py := testutil.Python(t, "ctypes")
	if _, err := os.Stat("/usr/share/xml/udunits/udunits2.xml"); err != nil {
		testutil.Missing(t, "UDUNITS-2 database missing (Debian libudunits2-data, a dependency of cdo): %v", err)
	}
	f := newFixture(t)
	dir, _ := f.write(t)
	// Every units attribute of both NetCDF files.
	found := map[string]bool{}
	for _, name := range []string{MapsNC, SeriesNC} {
		nc := ncFile(t, filepath.Join(dir, name))
		vs, err := nc.Vars()
		if err != nil {
			t.Fatal(err)
		}
		for _, v := range vs {
			if a, err := v.Attr("units"); err == nil {
				s, _ := a.Text()
				found[s] = true
			}
		}
	}
	// Every units string of the JSON files.
	var walk func(v any)
	walk = func(v any) {
		switch x := v.(type) {
		case map[string]any:
			if u, ok := x["units"].(string); ok {
				found[u] = true
			}
			for _, e := range x {
				walk(e)
			}
		case []any:
			for _, e := range x {
				walk(e)
			}
		}
	}
	walk(readJSON(t, filepath.Join(dir, SummaryJSON)))
	for _, q := range KnownQuantities() { // the whole units table, not only the fixture's
		u, _ := QuantityUnits(q)
		found[u] = true
	}
	walk(readJSON(t, filepath.Join(dir, ProvenanceJSON)))
	// SI unit and factor for each string that may appear.
	si := map[string]struct {
		unit   string
		factor float64
	}{
		"1": {"1", 1}, "K": {"K", 1}, "Pa": {"Pa", 1}, "s": {"s", 1}, "byte": {"1", 8},
		"yr-1": {"s-1", 1 / 3.15569259747e7}, "month": {"s", 3.15569259747e7 / 12},
		"degrees_north": {"degrees_north", 1}, "degrees_east": {"degrees_east", 1},
		"days since 1970-01-01": {"days since 1970-01-01", 1},
		"W m-2":                 {"kg s-3", 1}, "Pa s-1": {"kg m-1 s-3", 1}, "kg m-2 s-1": {"kg m-2 s-1", 1}, "%": {"1", 0.01},
		"m s-1": {"m s-1", 1}, "K s-1": {"K s-1", 1},
	}
	var pairs [][2]string
	for u := range found {
		s, ok := si[u]
		if !ok {
			t.Errorf("units %q appear in the outputs; add them to this test's table", u)
			continue
		}
		pairs = append(pairs, [2]string{u, s.unit})
	}
	arg, _ := json.Marshal(pairs)
	var got map[string]*float64
	if err := json.Unmarshal([]byte(runTool(t, py, "-c", udunitsScript, string(arg))), &got); err != nil {
		t.Fatal(err)
	}
	for _, p := range pairs {
		g := got[p[0]]
		if g == nil {
			t.Errorf("UDUNITS-2 cannot parse %q or convert it to %q", p[0], p[1])
			continue
		}
		if want := si[p[0]].factor; math.Abs(*g-want) > 1e-12*want {
			t.Errorf("UDUNITS-2: 1 %s = %v %s, want %v", p[0], *g, p[1], want)
		}
	}
	for _, must := range []string{"yr-1", "month", "K", "1", "byte"} {
		if !found[must] {
			t.Errorf("units %q expected in the outputs", must)
		}
	}
}
