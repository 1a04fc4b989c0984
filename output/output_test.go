package output

import (
	"bytes"
	"crypto/sha256"
	"encoding/csv"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"lidscope/netcdf"
	"lidscope/regimes"
	"lidscope/vocab"
)

// ncFile opens a written file with the project's netCDF-C binding.
func ncFile(t *testing.T, path string) *netcdf.File {
	t.Helper()
	f, err := netcdf.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { f.Close() })
	return f
}

func readVar(t *testing.T, f *netcdf.File, name string) ([]float64, *netcdf.Var) {
	t.Helper()
	v, err := f.Var(name)
	if err != nil {
		t.Fatalf("%s: variable %s: %v", f.Path(), name, err)
	}
	d, err := v.ReadAllFloat64()
	if err != nil {
		t.Fatal(err)
	}
	return d, v
}

func textAttr(t *testing.T, get func(string) (netcdf.Attr, error), name string) string {
	t.Helper()
	a, err := get(name)
	if err != nil {
		t.Fatalf("attribute %s: %v", name, err)
	}
	s, ok := a.Text()
	if !ok {
		t.Fatalf("attribute %s is not text: %v", name, a)
	}
	return s
}

// near compares a value read from a float32 variable with the exact one.
func near(got, want float64) bool {
	if math.IsNaN(want) {
		return math.IsNaN(got)
	}
	return math.Abs(got-want) <= 1e-6*math.Max(1, math.Abs(want))
}

// The fill value of float variables (cfwrite.DefaultFill, stored as float32).
const fill32 = float64(float32(1e20))

func fromFill(x float64) float64 {
	if x == fill32 || x == 1e20 {
		return math.NaN()
	}
	return x
}

// TestMapsByHand reads maps.nc back with the netCDF-C binding and checks
// columns whose statistics are worked out by hand from the fixture's
// regime sequences (synthetic truth).
func TestMapsByHand(t *testing.T) {
	f := newFixture(t)
	dir, _ := f.write(t)
	nc := ncFile(t, filepath.Join(dir, MapsNC))
	nan := math.NaN()
	cases := []struct {
		name string
		cell int
		want float64
	}{
		// column 5, "CCSTSC", eis 5…10
		{"convective_time_fraction", 5, 0.5},
		{"transition_time_fraction", 5, 1.0 / 6},
		{"subsidence_time_fraction", 5, 2.0 / 6},
		{"crossing_rate", 5, 4},      // C→S, S→C in half a year
		{"convective_dwell", 5, 1.5}, // runs of 2 and 1 steps
		{"subsidence_dwell", 5, 3},   // steps 2…4, the transition step inside
		{"valid_steps", 5, 6},
		{"rel_sst_mean", 5, 0.25},                // (1+1−1+0.5−1+1)/6
		{"rel_sst_std", 5, math.Sqrt(4.875 / 6)}, // population
		{"crossing_rate", 3, 10},                 // "CSCSCS"
		{"subsidence_dwell", 7, 3},               // "LCCSLS": steps 3…5 across the gap
		{"valid_steps", 7, 4},
		{"crossing_rate", 7, 2},
		{"convective_dwell", 4, nan}, // "TTTTTT"
		{"transition_time_fraction", 4, 1},
		{"crossing_rate", 4, 0},
		{"convective_time_fraction", 0, nan}, // land
		{"rel_sst_mean", 0, nan},
		{"crossing_rate", 12, 6}, // "CTSCTS": three crossings
	}
	for _, c := range cases {
		d, _ := readVar(t, nc, c.name)
		got := d[c.cell]
		if c.name != "valid_steps" {
			got = fromFill(got)
		}
		if !near(got, c.want) {
			t.Errorf("%s at column %d = %v, want %v", c.name, c.cell, got, c.want)
		}
	}
	// Regime variables [time][regime][lat][lon], regime k = regimes.All[k]
	// (convective, transition, subsidence).
	n := 16
	reg := []struct {
		name string
		cell int
		want [3]float64
	}{
		{"eis_mean", 5, [3]float64{7, 8, 8}}, // C: 5, 6, 10; T: 8; S: 7, 9
		{"eis_count", 5, [3]float64{3, 1, 2}},
		{"eis_mean", 6, [3]float64{8.5, nan, 9}}, // S: 6, NaN, 10, 11
		{"eis_count", 6, [3]float64{2, 0, 3}},
		{"t700_mean", 5, [3]float64{272.5, 272.5, 272.5}},
		{"cloud_mean", 5, [3]float64{0.35, 0.475, 0.475}},
		{"cloud_count", 0, [3]float64{0, 0, 0}},
	}
	for _, c := range reg {
		d, _ := readVar(t, nc, c.name)
		if len(d) != 3*n {
			t.Fatalf("%s has %d values, want %d", c.name, len(d), 3*n)
		}
		for k := range 3 {
			got := d[k*n+c.cell]
			if !strings.HasSuffix(c.name, "_count") {
				got = fromFill(got)
			}
			if !near(got, c.want[k]) {
				t.Errorf("%s[%s] at column %d = %v, want %v", c.name, regimes.All[k], c.cell, got, c.want[k])
			}
		}
	}
}

// TestMapsMatchAccumulator checks every value of maps.nc against the
// accumulator it was written from.
func TestMapsMatchAccumulator(t *testing.T) {
	f := newFixture(t)
	dir, _ := f.write(t)
	nc := ncFile(t, filepath.Join(dir, MapsNC))
	acc := f.acc
	cf := acc.ConvectiveFraction()
	got, _ := readVar(t, nc, "convective_time_fraction")
	for i := range cf {
		if !near(fromFill(got[i]), cf[i]) {
			t.Errorf("convective_time_fraction[%d] = %v, accumulator %v", i, got[i], cf[i])
		}
	}
	cpy := acc.CrossingsPerYear(12)
	got, _ = readVar(t, nc, "crossing_rate")
	for i := range cpy {
		if !near(fromFill(got[i]), cpy[i]) {
			t.Errorf("crossing_rate[%d] = %v, accumulator %v", i, got[i], cpy[i])
		}
	}
	for qi, q := range fixQuantities {
		m, _ := readVar(t, nc, q+"_mean")
		c, _ := readVar(t, nc, q+"_count")
		for k, r := range regimes.All {
			for i := range acc.NCells() {
				mo := acc.Moments(qi, r, i)
				if !near(fromFill(m[k*16+i]), mo.MeanOrNaN()) || c[k*16+i] != float64(mo.N) {
					t.Errorf("%s[%s][%d] = %v (n %v), accumulator %v (n %d)", q, r, i, m[k*16+i], c[k*16+i], mo.MeanOrNaN(), mo.N)
				}
			}
		}
	}
}

// TestMapsMetadata checks the CF metadata of maps.nc (CF-1.10 §3.1 units,
// §3.5 flags, §5.7 scalar coordinates, §7.1 bounds, §7.3 cell_methods).
func TestMapsMetadata(t *testing.T) {
	f := newFixture(t)
	f.meta.TimeBounds = fixBounds
	dir, _ := f.write(t)
	nc := ncFile(t, filepath.Join(dir, MapsNC))
	units := map[string]string{
		"convective_time_fraction": "1", "transition_time_fraction": "1", "subsidence_time_fraction": "1",
		"crossing_rate": "yr-1", "convective_dwell": "month", "subsidence_dwell": "month",
		"valid_steps":  "1",
		"rel_sst_mean": "K", "rel_sst_std": "K",
		"eis_mean": "K", "t700_mean": "K", "cloud_mean": "1", "eis_count": "1",
	}
	for name, u := range units {
		_, v := readVar(t, nc, name)
		if got := textAttr(t, v.Attr, "units"); got != u {
			t.Errorf("%s:units = %q, want %q", name, got, u)
		}
		if !strings.HasPrefix(textAttr(t, v.Attr, "cell_methods"), "time: ") {
			t.Errorf("%s has no time cell method", name)
		}
	}
	_, v := readVar(t, nc, "eis_mean")
	cm := textAttr(t, v.Attr, "cell_methods")
	if strings.Contains(cm, "where") || !strings.HasPrefix(cm, "time: mean (interval: 1 month comment: ") {
		t.Errorf("eis_mean:cell_methods = %q; want a time mean with the regime stated in the comment (CF-1.10 §7.3.2, §7.3.3)", cm)
	}
	if d := v.Dims; len(d) != 4 || d[0].Name != "time" || d[1].Name != "regime" || d[2].Name != "lat" || d[3].Name != "lon" {
		t.Errorf("eis_mean dimensions %v, want time, regime, lat, lon", d)
	}
	_, v = readVar(t, nc, "t700_mean")
	if got := textAttr(t, v.Attr, "coordinates"); got != "p700" {
		t.Errorf("t700_mean:coordinates = %q, want p700", got)
	}
	if got := textAttr(t, v.Attr, "standard_name"); got != "air_temperature" {
		t.Errorf("t700_mean:standard_name = %q", got)
	}
	p, _ := readVar(t, nc, "p700")
	if len(p) != 1 || p[0] != 70000 {
		t.Errorf("p700 = %v, want 70000 Pa", p)
	}
	_, rv := readVar(t, nc, "regime")
	if got := textAttr(t, rv.Attr, "flag_meanings"); got != "convective transition subsidence" {
		t.Errorf("regime:flag_meanings = %q", got)
	}
	fv, err := rv.Attr("flag_values")
	if err != nil {
		t.Fatal(err)
	}
	if vals, _ := fv.Float64s(); len(vals) != 3 || vals[0] != 0 || vals[1] != 1 || vals[2] != 2 {
		t.Errorf("regime:flag_values = %v", fv)
	}
	// The record's time axis: middle of 2001-01-01 … 2001-07-01.
	tv, _ := readVar(t, nc, "time")
	tb, _ := readVar(t, nc, "time_bnds")
	if len(tv) != 1 || tv[0] != (11323+11504)/2.0 || len(tb) != 2 || tb[0] != 11323 || tb[1] != 11504 {
		t.Errorf("time = %v, time_bnds = %v; want the record 11323…11504 days", tv, tb)
	}
	lb, _ := readVar(t, nc, "lat_bnds")
	want := []float64{-20, -10, -10, 0, 0, 10, 10, 20}
	for i := range want {
		if lb[i] != want[i] {
			t.Fatalf("lat_bnds = %v, want %v", lb, want)
		}
	}
	g := func(name string) string { return textAttr(t, nc.Attr, name) }
	for name, want := range map[string]string{
		"Conventions": "CF-1.10", "dataset": "synthetic test record", "lidscope_version": "0.0.0-test",
		"study_hash": "sha256:0123abcd", "conventions": f.meta.MetricsConventions,
		"regime_definition": f.meta.Regimes.String(), "regime_rule": "relative_sst", "delta_units": "K", "half_width_units": "K",
		"band_units": "degrees_north", "period": "2001-01 … 2001-06", "sampling_frequency_units": "yr-1",
	} {
		if got := g(name); got != want {
			t.Errorf("global %s = %q, want %q", name, got, want)
		}
	}
	// Numbers are typed attributes, their units in name_units.
	for name, want := range map[string][]float64{
		"delta": {0.5}, "half_width": {0.25}, "band": {-30, 30}, "time_steps": {6}, "sampling_frequency": {12},
	} {
		a, err := nc.Attr(name)
		if err != nil {
			t.Fatalf("global %s: %v", name, err)
		}
		got, ok := a.Float64s()
		if !ok || fmt.Sprint(got) != fmt.Sprint(want) {
			t.Errorf("global %s = %v (%s), want the number(s) %v", name, a.Value, a.Type, want)
		}
	}
	if h := g("history"); !strings.HasPrefix(h, "2024-03-01T12:01:30Z: lidscope run --study 'my study.toml' --out res") {
		t.Errorf("history = %q", h)
	}
	if n := g("processing_notes"); n != f.meta.Notes[0] {
		t.Errorf("processing_notes = %q, want only the run's note (bounds were given)", n)
	}
}

// TestSeriesNC reads series.nc back.
func TestSeriesNC(t *testing.T) {
	f := newFixture(t)
	f.meta.TimeBounds = fixBounds
	dir, _ := f.write(t)
	nc := ncFile(t, filepath.Join(dir, SeriesNC))
	tv, _ := readVar(t, nc, "time")
	tb, _ := readVar(t, nc, "time_bnds")
	for i := range fixTimes {
		if tv[i] != fixTimes[i] || tb[2*i] != fixBounds[i][0] || tb[2*i+1] != fixBounds[i][1] {
			t.Fatalf("time %v bounds %v, want %v %v", tv, tb, fixTimes, fixBounds)
		}
	}
	sst, _ := readVar(t, nc, "tropical_mean_sst")
	af, _ := readVar(t, nc, "area_fraction")
	em, _ := readVar(t, nc, "eis_band_mean")
	for ts, p := range f.acc.Series {
		if sst[ts] != p.TropMean {
			t.Errorf("tropical_mean_sst[%d] = %v, want %v (stored as double)", ts, sst[ts], p.TropMean)
		}
		sum := 0.0
		for k, r := range regimes.All {
			sum += af[ts*3+k]
			if !near(af[ts*3+k], p.AreaFraction[r]) || !near(fromFill(em[ts*3+k]), p.Means[0][r]) {
				t.Errorf("step %d %s: area_fraction %v eis %v, want %v %v", ts, r, af[ts*3+k], em[ts*3+k], p.AreaFraction[r], p.Means[0][r])
			}
		}
		if math.Abs(sum-1) > 1e-6 {
			t.Errorf("step %d: area fractions sum to %v", ts, sum)
		}
	}
}

func readCSV(t *testing.T, path string) (head []string, rows [][]string) {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(bytes.NewReader(b)).ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return recs[0], recs[1:]
}

func column(t *testing.T, head []string, name string) int {
	t.Helper()
	for i, h := range head {
		if h == name {
			return i
		}
	}
	t.Fatalf("no column %q in %v", name, head)
	return -1
}

func parseF(t *testing.T, s string) float64 {
	t.Helper()
	x, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatalf("%q: %v", s, err)
	}
	return x
}

func TestSeriesCSV(t *testing.T) {
	f := newFixture(t)
	dir, _ := f.write(t)
	head, rows := readCSV(t, filepath.Join(dir, SeriesCSV))
	if len(rows) != fixSteps {
		t.Fatalf("%d rows, want %d", len(rows), fixSteps)
	}
	if want := 6 + 3 + 3*len(fixQuantities); len(head) != want {
		t.Errorf("%d columns, want %d: %v", len(head), want, head)
	}
	cl, cy, cm := column(t, head, "label"), column(t, head, "year"), column(t, head, "month")
	ct, cd := column(t, head, "time [days since 1970-01-01]"), column(t, head, "date")
	cs := column(t, head, "tropical_mean_sst [K]")
	cc := column(t, head, "convective_area_fraction [1]")
	ce := column(t, head, "subsidence_eis_band_mean [K]")
	column(t, head, "transition_cloud_band_mean [1]")
	for i, r := range rows {
		p := f.acc.Series[i]
		if r[cl] != p.Label || r[cy] != "2001" || r[cm] != strconv.Itoa(i+1) {
			t.Errorf("row %d: %v", i, r[:3])
		}
		if parseF(t, r[ct]) != fixTimes[i] || parseF(t, r[cs]) != p.TropMean ||
			parseF(t, r[cc]) != p.AreaFraction[regimes.Convective] || parseF(t, r[ce]) != p.Means[0][regimes.Subsidence] {
			t.Errorf("row %d values differ from the accumulator: %v", i, r)
		}
	}
	// The dates: the 15th of each month (see fixTimes).
	if rows[0][cd] != "2001-01-15T00:00:00" || rows[5][cd] != "2001-06-15T00:00:00" {
		t.Errorf("dates %q … %q, want 2001-01-15T00:00:00 … 2001-06-15T00:00:00", rows[0][cd], rows[5][cd])
	}
}

func TestRegionsCSV(t *testing.T) {
	f := newFixture(t)
	dir, _ := f.write(t)
	head, rows := readCSV(t, filepath.Join(dir, RegionsCSV))
	if len(rows) != 2*3 {
		t.Fatalf("%d rows, want 2 regions × 3 regimes", len(rows))
	}
	cr, cg := column(t, head, "region"), column(t, head, "regime")
	cs := column(t, head, "area_time_fraction [1]")
	cm, cn := column(t, head, "eis_mean [K]"), column(t, head, "eis_count [1]")
	column(t, head, "cloud_std [1]")
	column(t, head, "rel_sst_mean [K]")
	share := map[string]float64{}
	for i, r := range rows {
		k := i / 3
		rs := f.acc.Regions[k]
		reg := regimes.All[i%3]
		if r[cr] != rs.Region.Name || r[cg] != reg.String() {
			t.Errorf("row %d is %s/%s, want %s/%s", i, r[cr], r[cg], rs.Region.Name, reg)
		}
		share[r[cr]] += parseF(t, r[cs])
		m := rs.Values[0][reg]
		if parseF(t, r[cm]) != m.MeanOrNaN() || r[cn] != strconv.FormatInt(m.N, 10) {
			t.Errorf("row %d: eis %s (n %s), accumulator %v (n %d)", i, r[cm], r[cn], m.MeanOrNaN(), m.N)
		}
	}
	for name, s := range share {
		if math.Abs(s-1) > 1e-12 {
			t.Errorf("region %s: area-time shares sum to %v", name, s)
		}
	}
	// "west" holds columns at lon 0 and 90 (i%4 ∈ {0,1}); its valid
	// cell-steps with eis: columns 1, 4, 5 (6 each), 8, 9, 12, 13 (6 each);
	// column 0 is land. 7 × 6 = 42 values over the three regimes.
	n := 0
	for _, r := range rows[:3] {
		x, _ := strconv.Atoi(r[cn])
		n += x
	}
	if n != 42 {
		t.Errorf("west has %d eis values, want 42", n)
	}
}

// walkNumbers checks that every JSON number sits in a {"value", "units"}
// object (format_version excepted) and returns how many there are.
func walkNumbers(t *testing.T, path string, v any) int {
	t.Helper()
	switch x := v.(type) {
	case map[string]any:
		if val, ok := x["value"]; ok {
			u, uok := x["units"].(string)
			if len(x) != 2 || !uok || u == "" {
				t.Errorf("%s: a value object must have exactly value and non-empty units: %v", path, x)
			}
			if _, num := val.(float64); !num && val != nil {
				t.Errorf("%s: value %v is not a number or null", path, val)
			}
			return 1
		}
		n := 0
		for k, e := range x {
			if k == "format_version" {
				continue
			}
			n += walkNumbers(t, path+"."+k, e)
		}
		return n
	case []any:
		n := 0
		for i, e := range x {
			n += walkNumbers(t, path+"["+strconv.Itoa(i)+"]", e)
		}
		return n
	case float64:
		t.Errorf("%s: bare number %v without units", path, x)
	}
	return 0
}

func readJSON(t *testing.T, path string) map[string]any {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return m
}

// get follows a path of keys through decoded JSON.
func get(t *testing.T, v any, keys ...string) any {
	t.Helper()
	for _, k := range keys {
		m, ok := v.(map[string]any)
		if !ok {
			t.Fatalf("%v: not an object at %q", keys, k)
		}
		if v, ok = m[k]; !ok {
			t.Fatalf("%v: no key %q", keys, k)
		}
	}
	return v
}

func value(t *testing.T, v any, keys ...string) float64 {
	t.Helper()
	x := get(t, v, append(keys, "value")...)
	if x == nil {
		return math.NaN()
	}
	return x.(float64)
}

// bandWeights are the fixture's band weights up to a constant: every cell
// lies inside 30°S–30°N, so the weight is the cell area, proportional to
// sin φ2 − sin φ1 on a regular grid (common practice).
func bandWeights() []float64 {
	s := func(d float64) float64 { return math.Sin(d * math.Pi / 180) }
	row := []float64{s(-10) - s(-20), s(0) - s(-10), s(10) - s(0), s(20) - s(10)}
	w := make([]float64, 16)
	for i := range w {
		w[i] = row[i/4]
	}
	return w
}

// crossings counts convective↔subsidence changes, skipping transition and
// missing steps (the hysteresis rule of package regimes), written here
// independently of regimes.Track.
func crossings(i int) (n int, valid bool) {
	last := regimes.Missing
	for ts := 0; ts < fixSteps; ts++ {
		r := fixRegime(i, ts)
		if r != regimes.Missing {
			valid = true
		}
		if r != regimes.Convective && r != regimes.Subsidence {
			continue
		}
		if last != regimes.Missing && r != last {
			n++
		}
		last = r
	}
	return n, valid
}

func TestSummaryJSON(t *testing.T) {
	f := newFixture(t)
	dir, _ := f.write(t)
	s := readJSON(t, filepath.Join(dir, SummaryJSON))
	if n := walkNumbers(t, "summary", s); n < 50 {
		t.Errorf("only %d numbers in summary.json", n)
	}
	if get(t, s, "format") != SummaryFormat || get(t, s, "format_version").(float64) != FormatVersion {
		t.Errorf("format %v %v", get(t, s, "format"), get(t, s, "format_version"))
	}
	if get(t, s, "dataset") != "synthetic test record" || get(t, s, "period", "label") != "2001-01 … 2001-06" ||
		get(t, s, "period", "first", "date") != "2001-01-15T00:00:00" {
		t.Errorf("dataset/period wrong: %v", get(t, s, "period"))
	}
	if value(t, s, "regime_definition", "delta") != 0.5 || get(t, s, "regime_definition", "delta", "units") != "K" ||
		value(t, s, "regime_definition", "band", "south") != -30 {
		t.Errorf("regime definition %v", get(t, s, "regime_definition"))
	}
	// Tropical-mean SST 300, 300.1, …, 300.5 K: mean 300.25, population
	// std sqrt(35/12)·0.1.
	if got := value(t, s, "tropical_mean_sst", "mean"); math.Abs(got-300.25) > 1e-9 {
		t.Errorf("tropical_mean_sst mean %v", got)
	}
	if got := value(t, s, "tropical_mean_sst", "std"); math.Abs(got-0.1*math.Sqrt(35.0/12)) > 1e-9 {
		t.Errorf("tropical_mean_sst std %v", got)
	}
	// Band-mean convective area fraction, computed here from the regime
	// sequences and the analytic weights.
	w := bandWeights()
	var fr []float64
	for ts := 0; ts < fixSteps; ts++ {
		var a, tot float64
		for i := range 16 {
			r := fixRegime(i, ts)
			if r == regimes.Missing {
				continue
			}
			tot += w[i]
			if r == regimes.Convective {
				a += w[i]
			}
		}
		fr = append(fr, a/tot)
	}
	mean, std := meanStdOf(fr)
	if got := value(t, s, "area_fraction", "convective", "mean"); math.Abs(got-mean) > 1e-12 {
		t.Errorf("band convective area fraction mean %v, want %v", got, mean)
	}
	if got := value(t, s, "area_fraction", "convective", "std"); math.Abs(got-std) > 1e-12 {
		t.Errorf("band convective area fraction std %v, want %v", got, std)
	}
	// Regime means of each quantity over the band and the record.
	for qi, q := range fixQuantities {
		for _, r := range regimes.All {
			var sw, swx float64
			n := 0
			for ts := 0; ts < fixSteps; ts++ {
				for i := range 16 {
					x := float64(fixValue(qi, i, ts))
					if fixRegime(i, ts) != r || math.IsNaN(x) {
						continue
					}
					sw += w[i]
					swx += w[i] * x
					n++
				}
			}
			got := value(t, s, "band_mean", q, r.String(), "mean")
			if math.Abs(got-swx/sw) > 1e-9*math.Abs(swx/sw) {
				t.Errorf("band_mean.%s.%s = %v, want %v", q, r, got, swx/sw)
			}
			if gn := value(t, s, "band_mean", q, r.String(), "count"); gn != float64(n) {
				t.Errorf("band_mean.%s.%s n = %v, want %d", q, r, gn, n)
			}
		}
	}
	// Crossings per year, band-weighted over columns ever valid.
	var sw, swx float64
	cells := 0
	for i := range 16 {
		n, valid := crossings(i)
		if !valid {
			continue
		}
		cells++
		sw += w[i]
		swx += w[i] * float64(n) / 0.5 // six monthly steps = half a year
	}
	if got := value(t, s, "crossing_rate", "mean"); math.Abs(got-swx/sw) > 1e-12 {
		t.Errorf("crossing_rate mean %v, want %v", got, swx/sw)
	}
	if get(t, s, "crossing_rate", "mean", "units") != "yr-1" || value(t, s, "crossing_rate", "cells") != float64(cells) {
		t.Errorf("crossing_rate %v", get(t, s, "crossing_rate"))
	}
	regs := get(t, s, "regions").([]any)
	if len(regs) != 2 || get(t, regs[0], "name") != "west" {
		t.Fatalf("regions %v", regs)
	}
	share := 0.0
	for _, r := range regimes.All {
		share += value(t, regs[1], "regimes", r.String(), "area_time_fraction")
	}
	if math.Abs(share-1) > 1e-12 {
		t.Errorf("dateline shares sum to %v", share)
	}
	if notes := get(t, s, "notes").([]any); len(notes) != 2 || !strings.Contains(notes[1].(string), "half a step") {
		t.Errorf("notes %v: want the run's note and the inferred-bounds note", notes)
	}
}

func meanStdOf(x []float64) (float64, float64) {
	var s float64
	for _, v := range x {
		s += v
	}
	m := s / float64(len(x))
	var d float64
	for _, v := range x {
		d += (v - m) * (v - m)
	}
	return m, math.Sqrt(d / float64(len(x)))
}

func TestProvenanceJSON(t *testing.T) {
	f := newFixture(t)
	dir, files := f.write(t)
	p := readJSON(t, filepath.Join(dir, ProvenanceJSON))
	walkNumbers(t, "provenance", p)
	for k, want := range map[string]string{
		"format": ProvenanceFormat, "lidscope_version": "0.0.0-test", "command": f.meta.Command,
		"conventions": f.meta.MetricsConventions, "study": f.meta.Study, "study_hash": f.meta.StudyHash,
	} {
		if got := get(t, p, k); got != want {
			t.Errorf("%s = %v, want %q", k, got, want)
		}
	}
	in := get(t, p, "files").([]any)[0]
	if get(t, in, "sha256") != "ab12" || value(t, in, "size") != 1234 || get(t, in, "modified") != "2024-03-01T11:00:00Z" {
		t.Errorf("input %v", in)
	}
	if get(t, p, "run", "start") != "2024-03-01T12:00:00Z" || value(t, p, "run", "duration") != 90 {
		t.Errorf("run %v", get(t, p, "run"))
	}
	if get(t, p, "host", "os") == "" || !strings.HasPrefix(get(t, p, "host", "go_version").(string), "go") {
		t.Errorf("host %v", get(t, p, "host"))
	}
	outs := get(t, p, "outputs").([]any)
	if len(outs) != 5 {
		t.Fatalf("%d outputs listed, want the 5 other files", len(outs))
	}
	for i, o := range outs {
		b, err := os.ReadFile(files[i])
		if err != nil {
			t.Fatal(err)
		}
		sum := sha256.Sum256(b)
		if get(t, o, "name") != filepath.Base(files[i]) || get(t, o, "sha256") != hex.EncodeToString(sum[:]) || value(t, o, "size") != float64(len(b)) {
			t.Errorf("output %v does not describe %s (%d bytes)", o, files[i], len(b))
		}
	}
}

func TestFilesReturned(t *testing.T) {
	f := newFixture(t)
	dir, files := f.write(t)
	if len(files) != len(OutputNames()) {
		t.Fatalf("files %v", files)
	}
	for i, n := range OutputNames() {
		if files[i] != filepath.Join(dir, n) {
			t.Errorf("files[%d] = %s, want %s", i, files[i], filepath.Join(dir, n))
		}
	}
	if got := dirNames(t, dir); strings.Join(got, " ") != "maps.nc provenance.json regions.csv series.csv series.nc summary.json" {
		t.Errorf("directory holds %v; want the six outputs and no staging files", got)
	}
}

func TestInvalidRequests(t *testing.T) {
	cases := []struct {
		name   string
		change func(f *fixture)
		want   string
	}{
		{"unknown quantity", func(f *fixture) { f.acc.L.Quantities = []string{"eis", "t700", "albedo"} }, `quantity "albedo"`},
		{"no grid", func(f *fixture) { f.meta.Grid = nil }, "Meta.Grid is nil"},
		{"time values", func(f *fixture) { f.meta.TimeValues = f.meta.TimeValues[:5] }, "5 values for 6 time steps"},
		{"time bounds", func(f *fixture) { f.meta.TimeBounds = fixBounds[:2] }, "2 pairs for 6 time steps"},
		{"steps per year", func(f *fixture) { f.meta.StepsPerYear = 0 }, "StepsPerYear"},
		{"time units", func(f *fixture) { f.meta.TimeUnits = "fortnights since 2001-01-01" }, `units "fortnights since 2001-01-01"`},
		{"no calendar", func(f *fixture) { f.meta.Calendar = "" }, "Meta.Calendar"},
		{"band", func(f *fixture) { f.meta.Regimes.Band = regimes.Band{South: 30, North: -30} }, "south < north"},
		{"delta", func(f *fixture) { f.meta.Regimes.Delta = math.NaN() }, "δ = NaN K must be finite"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f := newFixture(t)
			c.change(f)
			dir := filepath.Join(t.TempDir(), "out")
			_, err := Write(dir, f.acc, f.meta, Options{})
			if err == nil || !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("err = %v; want ErrInvalid mentioning %q", err, c.want)
			}
			if _, err := os.Stat(dir); !errors.Is(err, os.ErrNotExist) {
				t.Errorf("an invalid request created %s", dir)
			}
		})
	}
}

func TestQuantityUnits(t *testing.T) {
	// The units table of the task: K for temperatures and stabilities,
	// 1 for cloud fractions, W m-2 for TOA fluxes, Pa s-1 for omega.
	want := map[string]string{"sst": "K", "t700": "K", "lts": "K", "eis": "K", "ectei": "K",
		"cloud": "1", "low_cloud": "1", "toa_sw_up": "W m-2", "olr": "W m-2", "omega": "Pa s-1", "precipitation": "kg m-2 s-1",
		// the cloud-controlling factors (package factors)
		"rh700": "1", "omega700": "Pa s-1", "t_adv": "K s-1", "wind_speed": "m s-1"}
	for q, u := range want {
		if got, ok := QuantityUnits(q); !ok || got != u {
			t.Errorf("QuantityUnits(%q) = %q, %v; want %q", q, got, ok, u)
		}
	}
	if len(KnownQuantities()) != len(want) {
		t.Errorf("KnownQuantities = %v", KnownQuantities())
	}
	if _, ok := QuantityUnits("albedo"); ok {
		t.Error("unknown quantity accepted")
	}
}

// One name per thing: what a run was made from has the names the study
// uses for it (its conventions and files sections) and the same name in
// provenance.json, summary.json and the NetCDF global attributes; the
// names of format 3 (metrics_conventions, inputs, input_files, study
// {text, hash}, the time_axis object) are gone, and the provenance's time
// object is named after the time coordinate it describes.
func TestProvenanceNamesAreTheStudys(t *testing.T) {
	f := newFixture(t)
	dir, _ := f.write(t)
	p := readJSON(t, filepath.Join(dir, ProvenanceJSON))
	s := readJSON(t, filepath.Join(dir, SummaryJSON))
	nc, err := netcdf.Open(filepath.Join(dir, MapsNC))
	if err != nil {
		t.Fatal(err)
	}
	defer nc.Close()
	for _, name := range []string{vocab.Conventions, vocab.Files, vocab.StudyHash} {
		if _, ok := p[name]; !ok {
			t.Errorf("provenance.json has no %q", name)
		}
		if _, err := nc.Attr(name); err != nil {
			t.Errorf("maps.nc has no global attribute %q: %v", name, err)
		}
	}
	if get(t, s, vocab.StudyHash) != get(t, p, vocab.StudyHash) {
		t.Errorf("summary.json and provenance.json disagree on %s", vocab.StudyHash)
	}
	if textAttr(t, nc.Attr, vocab.Conventions) != get(t, p, vocab.Conventions) {
		t.Errorf("maps.nc and provenance.json disagree on %s", vocab.Conventions)
	}
	for _, old := range []string{"metrics_conventions", "inputs", "input_files", "time_axis"} {
		if _, ok := p[old]; ok {
			t.Errorf("provenance.json still has %q", old)
		}
		if _, err := nc.Attr(old); err == nil {
			t.Errorf("maps.nc still has the global attribute %q", old)
		}
	}
	if _, ok := get(t, p, vocab.Study).(string); !ok {
		t.Errorf("provenance.json study is %T, want the study text", get(t, p, vocab.Study))
	}
	if get(t, p, "time", "units") != f.meta.TimeUnits || get(t, p, "time", "calendar") != f.meta.Calendar {
		t.Errorf("provenance time %v, want the time coordinate's units %q and calendar %q", get(t, p, "time"), f.meta.TimeUnits, f.meta.Calendar)
	}
	if get(t, p, "format_version").(float64) != FormatVersion || FormatVersion < 4 {
		t.Errorf("provenance format_version %v: the renames need version 4", get(t, p, "format_version"))
	}
}
