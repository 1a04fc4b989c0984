package config

import (
	"fmt"
	"strings"
	"unicode"

	"lidscope/cf"
)

// CheckDatasetName returns an error unless name can name a dataset: it
// becomes a folder below the output folder, so it must be one plain path
// element that no tool mistakes for an option or a hidden file: lower-case
// letters, digits, _ and -, starting with a letter or digit; never "." or
// "..", a path separator or a control character.
func CheckDatasetName(name string) error {
	const rule = "a dataset name is made of lower-case letters, digits, _ and -, starting with a letter or digit (it is a key of the study and a folder name of the results)"
	switch {
	case name == "":
		return fmt.Errorf("a dataset needs a name (%s)", rule)
	case name == "." || name == "..":
		return fmt.Errorf("%q cannot name a dataset: it names a folder itself (%s)", name, rule)
	case strings.ContainsAny(name, `/\`):
		return fmt.Errorf("%s: a dataset name may not hold a path separator (%s)", cf.QuotePath(name), rule)
	case strings.IndexFunc(name, unicode.IsControl) >= 0:
		return fmt.Errorf("%s: a dataset name may not hold control characters (%s)", cf.QuotePath(name), rule)
	case name[0] == '-':
		return fmt.Errorf("%q: a dataset name may not start with - (it would read as an option) (%s)", name, rule)
	case name[0] == '.':
		return fmt.Errorf("%q: a dataset name may not start with . (it would be a hidden folder) (%s)", name, rule)
	case !nameRE.MatchString(name):
		return fmt.Errorf("%q: %s", name, rule)
	}
	return nil
}

// acceptList reads a dataset's accept key: names of usability checks.
func (d *decoder) acceptList(m map[string]any, path string) []string {
	v, ok := present(m, "accept")
	if !ok {
		return nil
	}
	p := join(path, "accept")
	var names []string
	switch t := v.(type) {
	case string:
		names = strings.Split(t, ",")
	case []any:
		for i, x := range t {
			s, ok := x.(string)
			if !ok {
				d.fail(join(p, fmt.Sprint(i)), "must be the name of a check, not %s", describe(x))
				continue
			}
			names = append(names, s)
		}
	default:
		d.fail(p, "must be a list of check names, not %s", describe(v))
		return nil
	}
	var out []string
	for _, n := range names {
		n = strings.TrimSpace(n)
		if n == "" {
			continue
		}
		if cf.DescribeCheck(n) == "" {
			d.fail(p, "%q is not a check lidscope makes; the checks are: %s", n, strings.Join(cf.CheckNames(), ", "))
			continue
		}
		out = append(out, n)
	}
	return out
}

// limits reads the limits section.
func (d *decoder) limits(m map[string]any) Limits {
	var l Limits
	v, ok := present(m, "memory_budget")
	if !ok {
		return l
	}
	s := fmt.Sprint(v)
	if f, isNum := toFloat(v); isNum {
		s = fmt.Sprintf("%.0f", f)
	}
	b, err := cf.ParseBytes(s)
	if err != nil {
		d.fail("limits.memory_budget", "%v", err)
		return l
	}
	if b < 1<<20 {
		d.fail("limits.memory_budget", "%s is too small to read any input: give at least 1MiB", cf.FormatBytes(b))
		return l
	}
	l.MemoryBudget = b
	return l
}
