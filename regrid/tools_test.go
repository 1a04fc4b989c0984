package regrid_test

// Helpers for tests that compare with CDO (Debian package cdo) on files
// written with ncgen and read back with ncdump (Debian package netcdf-bin).

import (
	"bytes"
	"fmt"
	"lidscope/internal/testutil"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"lidscope/grid"
)

func needCDO(t *testing.T) {
	t.Helper()
	testutil.Tool(t, "cdo")
	testutil.Tool(t, "ncgen")
	testutil.Tool(t, "ncdump")
}

// ncField is one 2-D variable for writeNC.
type ncField struct {
	name string
	data []float64 // [lat][lon] in the grid's storage order; NaN = missing
}

const fillValue = -9.0e33

// writeNC writes the grid's coordinates (and bounds when withBounds) and the
// fields to a netCDF-4 file via CDL text and ncgen.
func writeNC(t *testing.T, path string, g *grid.Grid, withBounds bool, fields ...ncField) {
	t.Helper()
	writeNCTitled(t, path, "lidscope synthetic test data (invented)", g, withBounds, fields...)
}

// writeNCTitled is writeNC with a given global title attribute.
func writeNCTitled(t *testing.T, path, title string, g *grid.Grid, withBounds bool, fields ...ncField) {
	t.Helper()
	var b bytes.Buffer
	fmt.Fprintf(&b, "netcdf data {\ndimensions:\n\tlat = %d ;\n\tlon = %d ;\n", g.NLat(), g.NLon())
	if withBounds {
		b.WriteString("\tbnds = 2 ;\n")
	}
	b.WriteString("variables:\n")
	b.WriteString("\tdouble lat(lat) ;\n\t\tlat:units = \"degrees_north\" ;\n\t\tlat:standard_name = \"latitude\" ;\n\t\tlat:axis = \"Y\" ;\n")
	if withBounds {
		b.WriteString("\t\tlat:bounds = \"lat_bnds\" ;\n")
	}
	b.WriteString("\tdouble lon(lon) ;\n\t\tlon:units = \"degrees_east\" ;\n\t\tlon:standard_name = \"longitude\" ;\n\t\tlon:axis = \"X\" ;\n")
	if withBounds {
		b.WriteString("\t\tlon:bounds = \"lon_bnds\" ;\n")
		b.WriteString("\tdouble lat_bnds(lat, bnds) ;\n\tdouble lon_bnds(lon, bnds) ;\n")
	}
	for _, f := range fields {
		fmt.Fprintf(&b, "\tdouble %s(lat, lon) ;\n\t\t%s:_FillValue = %g ;\n\t\t%s:long_name = \"synthetic test field\" ;\n", f.name, f.name, fillValue, f.name)
	}
	fmt.Fprintf(&b, "\n// global attributes:\n\t\t:title = %q ;\ndata:\n", title)
	writeValues(&b, "lat", g.Lat)
	writeValues(&b, "lon", g.Lon)
	if withBounds {
		writeValues(&b, "lat_bnds", flattenBounds(g.LatBounds, !g.LatAscending()))
		writeValues(&b, "lon_bnds", flattenBounds(g.LonBounds, g.NLon() > 1 && g.Lon[1] < g.Lon[0]))
	}
	for _, f := range fields {
		if len(f.data) != g.Size() {
			t.Fatalf("writeNC: field %s has %d values, grid %v has %d", f.name, len(f.data), g, g.Size())
		}
		writeValues(&b, f.name, f.data)
	}
	b.WriteString("}\n")
	cdl := strings.TrimSuffix(path, filepath.Ext(path)) + ".cdl"
	if err := os.WriteFile(cdl, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command("ncgen", "-k", "nc4", "-o", path, cdl).CombinedOutput()
	if err != nil {
		t.Fatalf("ncgen %s: %v\n%s", cdl, err, out)
	}
}

// flattenBounds writes bound pairs in storage direction (for a descending
// axis the first vertex is the high one, as CF files usually have them).
func flattenBounds(b [][2]float64, descending bool) []float64 {
	out := make([]float64, 0, 2*len(b))
	for _, p := range b {
		if descending {
			out = append(out, p[1], p[0])
		} else {
			out = append(out, p[0], p[1])
		}
	}
	return out
}

func writeValues(b *bytes.Buffer, name string, v []float64) {
	fmt.Fprintf(b, " %s =", name)
	for i, x := range v {
		if i > 0 {
			b.WriteByte(',')
		}
		if i%8 == 0 {
			b.WriteString("\n  ")
		} else {
			b.WriteByte(' ')
		}
		if math.IsNaN(x) {
			b.WriteByte('_')
		} else {
			b.WriteString(strconv.FormatFloat(x, 'g', 17, 64))
		}
	}
	b.WriteString(" ;\n")
}

// readNC reads the named variables (flattened, fill values as NaN) with
// ncdump.
func readNC(t *testing.T, path string, names ...string) map[string][]float64 {
	t.Helper()
	out, err := exec.Command("ncdump", "-p", "9,17", "-v", strings.Join(names, ","), path).Output()
	if err != nil {
		t.Fatalf("ncdump %s: %v", path, err)
	}
	_, data, ok := strings.Cut(string(out), "\ndata:\n")
	if !ok {
		t.Fatalf("ncdump %s: no data section", path)
	}
	res := map[string][]float64{}
	for _, name := range names {
		re := regexp.MustCompile(`(?s)\n ` + regexp.QuoteMeta(name) + ` =(.*?);`)
		m := re.FindStringSubmatch(data)
		if m == nil {
			t.Fatalf("ncdump %s: variable %s not found", path, name)
		}
		var vals []float64
		for _, tok := range strings.FieldsFunc(m[1], func(r rune) bool { return r == ',' || r == ' ' || r == '\n' || r == '\t' }) {
			if tok == "_" {
				vals = append(vals, math.NaN())
				continue
			}
			x, err := strconv.ParseFloat(tok, 64)
			if err != nil {
				t.Fatalf("ncdump %s: variable %s: bad value %q", path, name, tok)
			}
			vals = append(vals, x)
		}
		res[name] = vals
	}
	return res
}

// cdo runs CDO with the given environment additions, retrying a failed call
// up to 3 times in all (CDO 2.1.1 occasionally crashes).
func cdo(t *testing.T, env []string, args ...string) {
	t.Helper()
	var last []byte
	var err error
	for try := 0; try < 3; try++ {
		cmd := exec.Command("cdo", append([]string{"-s", "-b", "F64", "-f", "nc4"}, args...)...)
		cmd.Env = append(os.Environ(), env...)
		last, err = cmd.CombinedOutput()
		if err == nil {
			return
		}
		t.Logf("cdo %s: attempt %d failed: %v\n%s", strings.Join(args, " "), try+1, err, last)
	}
	t.Fatalf("cdo %s failed 3 times: %v\n%s", strings.Join(args, " "), err, last)
}

// gridDescFile writes a CDO grid description (text) for g with explicit
// centres; CDO derives the bounds.
func gridDescFile(t *testing.T, dir, name string, g *grid.Grid) string {
	t.Helper()
	var b bytes.Buffer
	fmt.Fprintf(&b, "gridtype = lonlat\nxsize = %d\nysize = %d\n", g.NLon(), g.NLat())
	b.WriteString("xvals =")
	for _, v := range g.Lon {
		fmt.Fprintf(&b, " %s", strconv.FormatFloat(v, 'g', 17, 64))
	}
	b.WriteString("\nyvals =")
	for _, v := range g.Lat {
		fmt.Fprintf(&b, " %s", strconv.FormatFloat(v, 'g', 17, 64))
	}
	b.WriteString("\n")
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// cdoResult reads a remapped field written by CDO and the grid it is on
// (bounds derived by grid.New from the centres CDO wrote).
func cdoResult(t *testing.T, path, name string) (*grid.Grid, []float64) {
	t.Helper()
	v := readNC(t, path, "lat", "lon", name)
	g, err := grid.New(v["lat"], v["lon"], nil, nil)
	if err != nil {
		t.Fatalf("grid of CDO output %s: %v", path, err)
	}
	if len(v[name]) != g.Size() {
		t.Fatalf("CDO output %s: %s has %d values for grid %v", path, name, len(v[name]), g)
	}
	return g, v[name]
}

// compare checks got against the CDO reference to relTol relative error
// (relative to |ref|) and requires missing values to agree exactly.
func compare(t *testing.T, label string, got, ref []float64, relTol float64) {
	t.Helper()
	if len(got) != len(ref) {
		t.Fatalf("%s: %d values, reference has %d", label, len(got), len(ref))
	}
	worst, nMiss, bad := 0.0, 0, 0
	for k := range ref {
		gn, rn := math.IsNaN(got[k]), math.IsNaN(ref[k])
		if gn || rn {
			if gn != rn {
				if bad < 5 {
					t.Errorf("%s: cell %d: got %g, CDO %g (missing in only one)", label, k, got[k], ref[k])
				}
				bad++
			}
			nMiss++
			continue
		}
		rel := math.Abs(got[k]-ref[k]) / math.Max(math.Abs(ref[k]), 1e-300)
		if rel > worst {
			worst = rel
		}
		if rel > relTol {
			if bad < 5 {
				t.Errorf("%s: cell %d: got %.12g, CDO %.12g (relative difference %.2g > %g)", label, k, got[k], ref[k], rel, relTol)
			}
			bad++
		}
	}
	if bad > 0 {
		t.Errorf("%s: %d of %d cells disagree with CDO", label, bad, len(ref))
	}
	t.Logf("%s: %d cells, %d missing in both, largest relative difference from CDO %.2g", label, len(ref), nMiss, worst)
}

// field evaluates the smooth, strictly positive synthetic test field used
// in the comparisons (an invented pattern, values in [0.7, 3.3]).
func field(g *grid.Grid) []float64 {
	out := make([]float64, 0, g.Size())
	for _, la := range g.Lat {
		for _, lo := range g.Lon {
			p, l := la*math.Pi/180, lo*math.Pi/180
			out = append(out, 2+0.8*math.Cos(p)*math.Sin(2*l)+0.5*math.Sin(3*p)*math.Cos(l))
		}
	}
	return out
}
