// Package runcmp compares the result files of two lidscope run folders
// value by value, for tests that check that pieces and a merge, or N
// processes, give what one run gives. NetCDF variables (every numeric
// value, and the attributes but history), CSV cells and JSON leaves are
// compared with a relative tolerance for numbers; provenance.json (times,
// command lines, inputs), the run state (which embeds the provenance) and
// figures are skipped, as are the keys and attributes named in Options.
package runcmp

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"lidscope/netcdf"
)

// Options tune a comparison.
type Options struct {
	Tol float64 // relative tolerance for numbers (default 1e-9)
	// IgnoreKeys are JSON object keys and NetCDF global attributes that
	// may differ (e.g. study_hash for a merge).
	IgnoreKeys []string
}

// skipped are files whose content records how and when a run was made.
var skipped = map[string]bool{"provenance.json": true, "run-state.gob": true, "run-manifest.json": true}

// Folders compares every result file of a with the same file of b and
// returns the differences (none: the same results). Files present in one
// folder only are differences too.
func Folders(a, b string, o Options) ([]string, error) {
	if o.Tol == 0 {
		o.Tol = 1e-9
	}
	ign := map[string]bool{"history": true}
	for _, k := range o.IgnoreKeys {
		ign[k] = true
	}
	fa, err := results(a)
	if err != nil {
		return nil, err
	}
	fb, err := results(b)
	if err != nil {
		return nil, err
	}
	var diffs []string
	for n := range fb {
		if !fa[n] {
			diffs = append(diffs, fmt.Sprintf("%s: only in %s", n, b))
		}
	}
	var names []string
	for n := range fa {
		names = append(names, n)
	}
	sort.Strings(names)
	if len(names) == 0 {
		return nil, fmt.Errorf("%s holds no result files", a)
	}
	for _, n := range names {
		if !fb[n] {
			diffs = append(diffs, fmt.Sprintf("%s: only in %s", n, a))
			continue
		}
		pa, pb := filepath.Join(a, n), filepath.Join(b, n)
		var d []string
		switch filepath.Ext(n) {
		case ".nc":
			d, err = ncDiff(pa, pb, o.Tol, ign)
		case ".csv":
			d, err = csvDiff(pa, pb, o.Tol)
		case ".json":
			d, err = jsonDiff(pa, pb, o.Tol, ign)
		default:
			d, err = bytesDiff(pa, pb)
		}
		if err != nil {
			return nil, err
		}
		for _, x := range d {
			diffs = append(diffs, n+": "+x)
		}
	}
	return diffs, nil
}

// Names lists the result files Folders compares in dir.
func Names(dir string) ([]string, error) {
	m, err := results(dir)
	var out []string
	for n := range m {
		out = append(out, n)
	}
	sort.Strings(out)
	return out, err
}

func results(dir string) (map[string]bool, error) {
	es, err := os.ReadDir(dir)
	if err != nil {
		return nil, err
	}
	out := map[string]bool{}
	for _, e := range es {
		n := e.Name()
		if e.IsDir() || strings.HasPrefix(n, ".") || skipped[n] {
			continue
		}
		switch filepath.Ext(n) {
		case ".png", ".svg", ".pdf", ".lock":
			continue
		}
		out[n] = true
	}
	return out, nil
}

func near(x, y, tol float64) bool {
	if x == y || (math.IsNaN(x) && math.IsNaN(y)) {
		return true
	}
	return math.Abs(x-y) <= tol*math.Max(1, math.Max(math.Abs(x), math.Abs(y)))
}

func bytesDiff(a, b string) ([]string, error) {
	x, err := os.ReadFile(a)
	if err != nil {
		return nil, err
	}
	y, err := os.ReadFile(b)
	if err != nil {
		return nil, err
	}
	if !bytes.Equal(x, y) {
		return []string{"contents differ"}, nil
	}
	return nil, nil
}

func csvDiff(a, b string, tol float64) ([]string, error) {
	read := func(p string) ([][]string, error) {
		f, err := os.Open(p)
		if err != nil {
			return nil, err
		}
		defer f.Close()
		r := csv.NewReader(f)
		r.FieldsPerRecord = -1
		r.Comment = '#'
		return r.ReadAll()
	}
	x, err := read(a)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", a, err)
	}
	y, err := read(b)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", b, err)
	}
	if len(x) != len(y) {
		return []string{fmt.Sprintf("%d rows vs %d", len(x), len(y))}, nil
	}
	var d []string
	for i := range x {
		if len(x[i]) != len(y[i]) {
			d = append(d, fmt.Sprintf("row %d: %d cells vs %d", i+1, len(x[i]), len(y[i])))
			continue
		}
		for j := range x[i] {
			if !sameText(x[i][j], y[i][j], tol) {
				d = append(d, fmt.Sprintf("row %d column %d: %q vs %q", i+1, j+1, x[i][j], y[i][j]))
			}
		}
		if len(d) > 10 {
			break
		}
	}
	return d, nil
}

// sameText compares two cells: as numbers when both are numbers.
func sameText(x, y string, tol float64) bool {
	if x == y {
		return true
	}
	fx, e1 := strconv.ParseFloat(strings.TrimSpace(x), 64)
	fy, e2 := strconv.ParseFloat(strings.TrimSpace(y), 64)
	return e1 == nil && e2 == nil && near(fx, fy, tol)
}

func jsonDiff(a, b string, tol float64, ign map[string]bool) ([]string, error) {
	read := func(p string) (any, error) {
		bs, err := os.ReadFile(p)
		if err != nil {
			return nil, err
		}
		dec := json.NewDecoder(bytes.NewReader(bs))
		dec.UseNumber()
		var v any
		if err := dec.Decode(&v); err != nil {
			return nil, fmt.Errorf("%s: %w", p, err)
		}
		return v, nil
	}
	x, err := read(a)
	if err != nil {
		return nil, err
	}
	y, err := read(b)
	if err != nil {
		return nil, err
	}
	var d []string
	walkJSON("", x, y, tol, ign, &d)
	return d, nil
}

func walkJSON(path string, x, y any, tol float64, ign map[string]bool, d *[]string) {
	if len(*d) > 10 {
		return
	}
	switch xv := x.(type) {
	case map[string]any:
		yv, ok := y.(map[string]any)
		if !ok {
			*d = append(*d, path+": object vs other")
			return
		}
		keys := map[string]bool{}
		for k := range xv {
			keys[k] = true
		}
		for k := range yv {
			keys[k] = true
		}
		var ks []string
		for k := range keys {
			ks = append(ks, k)
		}
		sort.Strings(ks)
		for _, k := range ks {
			if ign[k] {
				continue
			}
			walkJSON(path+"."+k, xv[k], yv[k], tol, ign, d)
		}
	case []any:
		yv, ok := y.([]any)
		if !ok || len(xv) != len(yv) {
			*d = append(*d, fmt.Sprintf("%s: arrays differ in length", path))
			return
		}
		for i := range xv {
			walkJSON(fmt.Sprintf("%s[%d]", path, i), xv[i], yv[i], tol, ign, d)
		}
	case json.Number:
		yn, ok := y.(json.Number)
		fx, e1 := xv.Float64()
		fy, e2 := yn.Float64()
		if !ok || e1 != nil || e2 != nil || !near(fx, fy, tol) {
			*d = append(*d, fmt.Sprintf("%s: %v vs %v", path, x, y))
		}
	default:
		if fmt.Sprint(x) != fmt.Sprint(y) {
			*d = append(*d, fmt.Sprintf("%s: %v vs %v", path, x, y))
		}
	}
}

func ncDiff(a, b string, tol float64, ign map[string]bool) ([]string, error) {
	fa, err := netcdf.Open(a)
	if err != nil {
		return nil, err
	}
	defer fa.Close()
	fb, err := netcdf.Open(b)
	if err != nil {
		return nil, err
	}
	defer fb.Close()
	var d []string
	ga, err := fa.Attrs()
	if err != nil {
		return nil, err
	}
	gb, err := fb.Attrs()
	if err != nil {
		return nil, err
	}
	d = append(d, attrDiff("global", ga, gb, tol, ign)...)
	va, err := fa.Vars()
	if err != nil {
		return nil, err
	}
	vb, err := fb.Vars()
	if err != nil {
		return nil, err
	}
	if len(va) != len(vb) {
		d = append(d, fmt.Sprintf("%d variables vs %d", len(va), len(vb)))
	}
	for _, v := range va {
		w, err := fb.Var(v.Name)
		if err != nil {
			d = append(d, fmt.Sprintf("variable %s only in %s", v.Name, a))
			continue
		}
		aa, _ := v.Attrs()
		ab, _ := w.Attrs()
		d = append(d, attrDiff(v.Name, aa, ab, tol, ign)...)
		if fmt.Sprint(v.Shape()) != fmt.Sprint(w.Shape()) {
			d = append(d, fmt.Sprintf("%s: shape %v vs %v", v.Name, v.Shape(), w.Shape()))
			continue
		}
		if !v.Type.Numeric() {
			continue
		}
		x, err := v.ReadAllFloat64()
		if err != nil {
			return nil, fmt.Errorf("%s: %w", a, err)
		}
		y, err := w.ReadAllFloat64()
		if err != nil {
			return nil, fmt.Errorf("%s: %w", b, err)
		}
		bad := 0
		for i := range x {
			if !near(x[i], y[i], tol) {
				if bad == 0 {
					d = append(d, fmt.Sprintf("%s[%d]: %v vs %v", v.Name, i, x[i], y[i]))
				}
				bad++
			}
		}
		if bad > 1 {
			d = append(d, fmt.Sprintf("%s: %d of %d values differ", v.Name, bad, len(x)))
		}
	}
	return d, nil
}

func attrDiff(where string, a, b []netcdf.Attr, tol float64, ign map[string]bool) []string {
	m := map[string]netcdf.Attr{}
	for _, x := range b {
		m[x.Name] = x
	}
	var d []string
	for _, x := range a {
		if ign[x.Name] {
			continue
		}
		y, ok := m[x.Name]
		if !ok {
			d = append(d, fmt.Sprintf("%s: attribute %s only in the first", where, x.Name))
			continue
		}
		if fx, ok := x.Float64s(); ok {
			fy, ok := y.Float64s()
			if !ok || len(fx) != len(fy) {
				d = append(d, fmt.Sprintf("%s:%s: %v vs %v", where, x.Name, x, y))
				continue
			}
			for i := range fx {
				if !near(fx[i], fy[i], tol) {
					d = append(d, fmt.Sprintf("%s:%s: %v vs %v", where, x.Name, x, y))
					break
				}
			}
			continue
		}
		if x.String() != y.String() {
			d = append(d, fmt.Sprintf("%s:%s: %q vs %q", where, x.Name, x.String(), y.String()))
		}
	}
	return d
}
