package config

import (
	"fmt"
	"regexp"
	"sort"
	"strconv"
	"strings"
)

// The ensemble block names many candidate datasets at once:
//
//	ensemble:
//	  names: "{model}-{member}"
//	  over:
//	    model: [alpha, beta]
//	    member: [m1, m2]
//	  dataset:
//	    files:
//	      sst: "runs/{model}/{member}/sst_*.nc"
//	  each:
//	    beta-m2:
//	      variables: {sst: ts}
//
// Every combination of the lists under over gives one dataset, named by
// names with each {placeholder} replaced; the dataset table is copied for
// it with the same replacement in every string. each holds per-dataset
// overrides, keyed by expanded name, laid over the copy key by key. The
// expanded datasets join those under datasets; a name given twice is a
// problem. Problems in an expanded dataset name the line in the ensemble
// block it came from.

// ensembleKeys are the keys of the ensemble block.
var ensembleKeys = []string{"names", "over", "dataset", "each"}

var placeholderRE = regexp.MustCompile(`\{([^{}]*)\}`)

// expandEnsemble replaces tree["ensemble"] by the datasets it names,
// added to tree["datasets"], and indexes their lines in w.
func expandEnsemble(tree map[string]any, w *where) []Problem {
	raw, present := tree["ensemble"]
	if !present {
		return nil
	}
	delete(tree, "ensemble")
	if raw == nil {
		return nil
	}
	var probs []Problem
	fail := func(path, format string, a ...any) {
		probs = append(probs, w.problem(path, fmt.Sprintf(format, a...)))
	}
	m, ok := raw.(map[string]any)
	if !ok {
		fail("ensemble", "must be a table with names, over and dataset, not %s", describe(raw))
		return probs
	}
	for _, k := range sortedKeys(m) {
		if !contains(ensembleKeys, k) {
			fail(join("ensemble", k), "unknown key %q in ensemble; %s", k, suggest(k, ensembleKeys))
		}
	}
	names, ok := m["names"].(string)
	if !ok || strings.TrimSpace(names) == "" {
		fail("ensemble.names", "give the name of each dataset as a template with placeholders, e.g. names: \"{model}-{member}\"")
		return probs
	}
	overRaw, ok := m["over"].(map[string]any)
	if !ok || len(overRaw) == 0 {
		fail("ensemble.over", "give each placeholder's values as a list, e.g. over: {model: [alpha, beta], member: [m1, m2]}")
		return probs
	}
	keys := sortedKeys(overRaw)
	over := map[string][]string{}
	for _, k := range keys {
		l, ok := overRaw[k].([]any)
		if !ok || len(l) == 0 {
			fail(join("ensemble.over", k), "must be a non-empty list of values, not %s", describe(overRaw[k]))
			continue
		}
		seen := map[string]bool{}
		for i, x := range l {
			s := scalarString(x)
			if s == "" {
				fail(join(join("ensemble.over", k), strconv.Itoa(i)), "is empty or not a plain value (%s): give a word or number", describe(x))
				continue
			}
			if seen[s] {
				fail(join(join("ensemble.over", k), strconv.Itoa(i)), "value %q is given twice for %s", s, k)
				continue
			}
			seen[s] = true
			over[k] = append(over[k], s)
		}
	}
	tmpl, ok := m["dataset"].(map[string]any)
	if !ok {
		fail("ensemble.dataset", "give the dataset table every expanded dataset is made from (files, variables, ...), with placeholders such as {%s}", keys[0])
		return probs
	}
	// Every placeholder must be one of over; names must use all of them,
	// or two combinations would get the same name.
	check := func(path, s string) {
		for _, sm := range placeholderRE.FindAllStringSubmatch(s, -1) {
			if _, ok := overRaw[sm[1]]; !ok {
				fail(path, "placeholder {%s} is not one of ensemble.over (%s); %s", sm[1], strings.Join(keys, ", "), suggest(sm[1], keys))
			}
		}
	}
	check("ensemble.names", names)
	for _, k := range keys {
		if !strings.Contains(names, "{"+k+"}") {
			fail("ensemble.names", "%q does not use {%s}, so datasets that differ only in %s would share a name; put {%s} in it", names, k, k, k)
		}
	}
	walkStrings(tmpl, "ensemble.dataset", check)
	if len(probs) > 0 || len(over) != len(keys) {
		return probs
	}

	sets, _ := tree["datasets"].(map[string]any)
	if sets == nil {
		if _, isList := tree["datasets"].([]any); isList {
			return probs // checkKeys explains the table form
		}
		sets = map[string]any{}
		tree["datasets"] = sets
	}
	each, _ := m["each"].(map[string]any)
	if e, present := m["each"]; present && e != nil && each == nil {
		fail("ensemble.each", "must be a table keyed by expanded dataset name, not %s", describe(e))
	}
	made := map[string]bool{}
	var order []string
	for _, vals := range combinations(keys, over) {
		name := fill(names, vals)
		if made[name] {
			continue // cannot happen: names uses every placeholder
		}
		made[name] = true
		order = append(order, name)
		if _, clash := sets[name]; clash {
			fail(join("datasets", name), "dataset %q is also named by the ensemble (ensemble.names %q); rename one, or give its changes under ensemble.each.%s", name, names, name)
			continue
		}
		ds := substitute(tmpl, vals).(map[string]any)
		if o, ok := each[name].(map[string]any); ok {
			overlay(ds, o)
		} else if each[name] != nil {
			fail(join("ensemble.each", name), "must be a table of dataset keys, not %s", describe(each[name]))
		}
		sets[name] = ds
		w.lines.alias(join("datasets", name), w.lines.line("ensemble.names"))
		w.lines.copyPrefix(join("ensemble.each", name), join("datasets", name))
		w.lines.copyPrefix("ensemble.dataset", join("datasets", name))
	}
	for _, n := range sortedKeys(each) {
		if !made[n] {
			fail(join("ensemble.each", n), "%q is not one of the ensemble's datasets; %s", n, suggest(n, order))
		}
	}
	return probs
}

// combinations lists every assignment of values to keys, the last key
// varying fastest.
func combinations(keys []string, over map[string][]string) []map[string]string {
	out := []map[string]string{{}}
	for _, k := range keys {
		var next []map[string]string
		for _, c := range out {
			for _, v := range over[k] {
				n := make(map[string]string, len(c)+1)
				for a, b := range c {
					n[a] = b
				}
				n[k] = v
				next = append(next, n)
			}
		}
		out = next
	}
	return out
}

func fill(s string, vals map[string]string) string {
	return placeholderRE.ReplaceAllStringFunc(s, func(p string) string {
		if v, ok := vals[p[1:len(p)-1]]; ok {
			return v
		}
		return p
	})
}

// substitute copies v, filling placeholders in every string.
func substitute(v any, vals map[string]string) any {
	switch x := v.(type) {
	case map[string]any:
		out := make(map[string]any, len(x))
		for k, e := range x {
			out[k] = substitute(e, vals)
		}
		return out
	case []any:
		out := make([]any, len(x))
		for i, e := range x {
			out[i] = substitute(e, vals)
		}
		return out
	case string:
		return fill(x, vals)
	}
	return v
}

// overlay lays o over m: tables merge key by key, anything else replaces.
func overlay(m, o map[string]any) {
	for k, v := range o {
		if om, ok := v.(map[string]any); ok {
			if mm, ok := m[k].(map[string]any); ok {
				overlay(mm, om)
				continue
			}
		}
		m[k] = v
	}
}

func walkStrings(v any, path string, f func(path, s string)) {
	switch x := v.(type) {
	case map[string]any:
		for _, k := range sortedKeys(x) {
			walkStrings(x[k], join(path, k), f)
		}
	case []any:
		for i, e := range x {
			walkStrings(e, join(path, strconv.Itoa(i)), f)
		}
	case string:
		f(path, x)
	}
}

func scalarString(x any) string {
	switch v := x.(type) {
	case string:
		return strings.TrimSpace(v)
	case int, int64, float64, uint64:
		return fmt.Sprint(v)
	}
	return ""
}

func contains(l []string, s string) bool {
	for _, x := range l {
		if x == s {
			return true
		}
	}
	return false
}

// alias gives path a line unless it has one.
func (ix *lineIndex) alias(path string, line int) {
	if _, ok := ix.lines[path]; !ok && line > 0 {
		ix.lines[path] = line
	}
}

// copyPrefix gives every path under to the line of the same path under
// from (keeping lines to already has).
func (ix *lineIndex) copyPrefix(from, to string) {
	var ps []string
	for p := range ix.lines {
		if p == from || strings.HasPrefix(p, from+".") {
			ps = append(ps, p)
		}
	}
	sort.Strings(ps)
	for _, p := range ps {
		ix.alias(to+p[len(from):], ix.lines[p])
		if u, ok := ix.upper[p]; ok {
			if _, has := ix.upper[to+p[len(from):]]; !has {
				ix.upper[to+p[len(from):]] = u
			}
		}
	}
}
