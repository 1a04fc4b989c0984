// Typed values of the study tree (numbers, strings, lists, choices), each
// read with the path of its key for the problems it finds.

package config

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"

	"lidscope/calendar"
	"lidscope/units"
)

func toFloat(v any) (float64, bool) {
	switch t := v.(type) {
	case float64:
		return t, true
	case float32:
		return float64(t), true
	case int:
		return float64(t), true
	case int8:
		return float64(t), true
	case int16:
		return float64(t), true
	case int32:
		return float64(t), true
	case int64:
		return float64(t), true
	case uint:
		return float64(t), true
	case uint8:
		return float64(t), true
	case uint16:
		return float64(t), true
	case uint32:
		return float64(t), true
	case uint64:
		return float64(t), true
	}
	return 0, false
}

func present(m map[string]any, k string) (any, bool) {
	v, ok := m[k]
	return v, ok && v != nil
}

func sub(m map[string]any, k string) map[string]any {
	t, _ := m[k].(map[string]any)
	if t == nil {
		return map[string]any{}
	}
	return t
}

// str reads a string (numbers are taken as their text).
func (d *decoder) str(m map[string]any, path, k, def string) string {
	v, ok := present(m, k)
	if !ok {
		return def
	}
	switch t := v.(type) {
	case string:
		return strings.TrimSpace(t)
	case bool:
		d.fail(join(path, k), "must be a string, not %s (quote it)", describe(v))
		return def
	}
	if f, ok := toFloat(v); ok {
		return strconv.FormatFloat(f, 'f', -1, 64)
	}
	d.fail(join(path, k), "must be a string, not %s", describe(v))
	return def
}

// num reads a finite number (a string holding a number is accepted).
func (d *decoder) num(m map[string]any, path, k string, def float64) (float64, bool) {
	v, ok := present(m, k)
	if !ok {
		return def, false
	}
	f, isNum := toFloat(v)
	if s, isStr := v.(string); isStr {
		var err error
		f, err = strconv.ParseFloat(strings.TrimSpace(s), 64)
		isNum = err == nil
	}
	if !isNum {
		d.fail(join(path, k), "must be a number, not %s", describe(v))
		return def, true
	}
	if math.IsNaN(f) || math.IsInf(f, 0) {
		d.fail(join(path, k), "must be a finite number, not %v", f)
		return def, true
	}
	return f, true
}

// fraction reads a number in [lo, 1].
func (d *decoder) fraction(m map[string]any, path, k string, def float64) (float64, bool) {
	f, set := d.num(m, path, k, def)
	if set && !(f >= 0 && f <= 1) {
		d.fail(join(path, k), "%v is not a fraction: give a value from 0 to 1 (0.5 means 50 %%)", f)
		return def, set
	}
	return f, set
}

func (d *decoder) boolean(m map[string]any, path, k string, def bool) bool {
	v, ok := present(m, k)
	if !ok {
		return def
	}
	switch t := v.(type) {
	case bool:
		return t
	case string:
		switch strings.ToLower(strings.TrimSpace(t)) {
		case "true":
			return true
		case "false":
			return false
		}
	}
	d.fail(join(path, k), "must be true or false, not %s", describe(v))
	return def
}

// strList reads a string or a list of strings.
func (d *decoder) strList(m map[string]any, path, k string) []string {
	v, ok := present(m, k)
	if !ok {
		return nil
	}
	p := join(path, k)
	switch t := v.(type) {
	case string:
		if strings.TrimSpace(t) == "" {
			d.fail(p, "is empty: give a file, a glob such as \"sst/*.nc\", or a list of them")
			return nil
		}
		return []string{strings.TrimSpace(t)}
	case []any:
		if len(t) == 0 {
			d.fail(p, "is an empty list: give at least one file or glob")
			return nil
		}
		var out []string
		for i, x := range t {
			s, ok := x.(string)
			if !ok || strings.TrimSpace(s) == "" {
				d.fail(join(p, strconv.Itoa(i)), "must be a file name or glob, not %s", describe(x))
				continue
			}
			out = append(out, strings.TrimSpace(s))
		}
		return out
	}
	d.fail(p, "must be a file name, a glob or a list of them, not %s", describe(v))
	return nil
}

// numList reads a number, a list of numbers, or a comma-separated text of
// numbers (as flags and environment variables give them).
func (d *decoder) numList(m map[string]any, path, k string) ([]float64, bool) {
	v, ok := present(m, k)
	if !ok {
		return nil, false
	}
	p := join(path, k)
	var items []any
	switch t := v.(type) {
	case []any:
		items = t
	case string:
		for _, s := range strings.Split(t, ",") {
			items = append(items, strings.TrimSpace(s))
		}
	default:
		items = []any{v}
	}
	if len(items) == 0 {
		d.fail(p, "is an empty list")
		return nil, true
	}
	out := make([]float64, 0, len(items))
	for i, x := range items {
		f, isNum := toFloat(x)
		if s, isStr := x.(string); isStr {
			var err error
			f, err = strconv.ParseFloat(s, 64)
			isNum = err == nil
		}
		if !isNum || math.IsNaN(f) || math.IsInf(f, 0) {
			d.fail(join(p, strconv.Itoa(i)), "must be a finite number, not %s", describe(x))
			continue
		}
		out = append(out, f)
	}
	return out, true
}

// choice reads one of a fixed set of words.
func (d *decoder) choice(m map[string]any, path, k, def string, choices ...string) (string, bool) {
	_, set := present(m, k)
	s := d.str(m, path, k, def)
	if !set {
		return def, false
	}
	if slices.Contains(choices, s) {
		return s, true
	}
	d.fail(join(path, k), "%q is not one of %s; %s", s, strings.Join(choices, ", "), suggest(s, choices))
	return def, true
}

// parseYearMonth reads "YYYY-MM".
func parseYearMonth(s string) (calendar.YearMonth, error) {
	i := strings.LastIndexByte(s, '-')
	if i <= 0 || i == len(s)-1 {
		return calendar.YearMonth{}, fmt.Errorf("%q is not a year and month: write YYYY-MM, e.g. \"1979-01\" (quoted)", s)
	}
	y, err1 := strconv.Atoi(s[:i])
	mo, err2 := strconv.Atoi(s[i+1:])
	if err1 != nil || err2 != nil || len(s[i+1:]) != 2 {
		return calendar.YearMonth{}, fmt.Errorf("%q is not a year and month: write YYYY-MM, e.g. \"1979-01\" (quoted)", s)
	}
	if mo < 1 || mo > 12 {
		return calendar.YearMonth{}, fmt.Errorf("%q: month %d is not 1–12", s, mo)
	}
	return calendar.YearMonth{Year: y, Month: mo}, nil
}

func sortedKeys(m map[string]any) []string {
	out := make([]string, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

func cmpOr(a, b string) string {
	if a != "" {
		return a
	}
	return b
}

// quantity reads a number (SI) or a string with units.
func quantity(k units.Kind, v any) (float64, error) {
	if f, ok := toFloat(v); ok {
		if math.IsNaN(f) || math.IsInf(f, 0) {
			return 0, fmt.Errorf("%v is not finite", f)
		}
		return f, nil
	}
	s, ok := v.(string)
	if !ok {
		return 0, fmt.Errorf("not %s", describe(v))
	}
	f, _, err := units.ParseQuantity(k, s)
	if err == nil && (math.IsNaN(f) || math.IsInf(f, 0)) {
		err = fmt.Errorf("%q is not finite", s)
	}
	return f, err
}
