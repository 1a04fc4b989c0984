package config

import (
	"fmt"
	"os"
	"sort"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"
)

// EnvPrefix starts the name of every environment variable Load reads.
const EnvPrefix = "LIDSCOPE_"

// EnvName returns the environment variable that overrides a dotted key:
// EnvPrefix, then the key in capitals with dots and hyphens replaced by
// underscores ("datasets.obs-v2.conventions.svp" →
// "LIDSCOPE_DATASETS_OBS_V2_CONVENTIONS_SVP"), so that every name can be
// set from a shell.
func EnvName(dotted string) string {
	return EnvPrefix + strings.ToUpper(envSep.Replace(dotted))
}

var envSep = strings.NewReplacer(".", "_", "-", "_")

// parseValue reads an override value the way a YAML flow value is read:
// "1.5" is a number, "true" a boolean, "[12, 1, 2]" a list and
// "{south: -20, north: 20}" a table; anything else (including text YAML
// cannot read, such as "*.nc") is the string itself. "null" and "~" remove
// the key, so that its default applies.
func parseValue(raw string) (v any, remove bool) {
	if strings.TrimSpace(raw) == "" {
		return raw, false
	}
	var out any
	if err := yaml.Unmarshal([]byte(raw), &out); err != nil {
		return raw, false
	}
	switch t := strings.TrimSpace(raw); {
	case out == nil && (t == "null" || t == "~" || t == "Null" || t == "NULL"):
		return nil, true
	case out == nil:
		return raw, false
	}
	return lowerKeys(out), false
}

// lowerKeys folds table keys to lower case, as the file loader does.
func lowerKeys(v any) any {
	switch t := v.(type) {
	case map[string]any:
		m := make(map[string]any, len(t))
		for k, x := range t {
			m[strings.ToLower(k)] = lowerKeys(x)
		}
		return m
	case []any:
		for i := range t {
			t[i] = lowerKeys(t[i])
		}
	}
	return v
}

// setPath sets (or, with remove, deletes) the value at a dotted path of
// the raw tree, creating tables on the way. The path must follow the
// schema; list elements must exist already.
func setPath(tree map[string]any, path string, val any, remove bool) error {
	parts := strings.Split(path, ".")
	k := schema
	var node any = tree
	done := ""
	for i, part := range parts {
		last := i == len(parts)-1
		switch k.kind {
		case kTable, kRoles, kNamed, kEdges, kNames:
			m, ok := node.(map[string]any)
			if !ok {
				return fmt.Errorf("%s is not a table in the study, so %s cannot be set", done, path)
			}
			if k.kind == kNames {
				if _, ok := m[part]; !ok {
					return fmt.Errorf("the study has no %s %q, and flags and the environment cannot add one; %s", k.what, part, suggestNames(part, m))
				}
				if last {
					return fmt.Errorf("%s %q is a whole table and cannot be set in one value; set its keys (e.g. %s.time.start)", k.what, part, join(done, part))
				}
			}
			child := k.child(part)
			if child == nil {
				where := "at the top of the study"
				if done != "" {
					where = "in " + done
				}
				return fmt.Errorf("unknown key %q %s; %s", part, where, suggest(part, k.names()))
			}
			if last && child.kind == kNames {
				return fmt.Errorf("%s cannot be set as a whole from outside the study (flags and the environment change the keys of its entries, e.g. %s.NAME.time.start)", join(done, part), join(done, part))
			}
			if last {
				if remove {
					delete(m, part)
				} else {
					m[part] = val
				}
				return nil
			}
			next, ok := m[part]
			if !ok || next == nil {
				if child.kind == kList {
					return fmt.Errorf("%s has no elements in the study, so %s cannot be set; set the whole list with %s", join(done, part), path, join(done, part))
				}
				next = map[string]any{}
				m[part] = next
			}
			node, k = next, child
		case kList:
			l, ok := node.([]any)
			if !ok {
				return fmt.Errorf("%s is not a list in the study, so %s cannot be set", done, path)
			}
			n, err := strconv.Atoi(part)
			if err != nil || n < 0 {
				return fmt.Errorf("%s is a list: after %s. give an element number from 0 (e.g. %s.0), not %q", done, done, done, part)
			}
			if n >= len(l) {
				return fmt.Errorf("%s has %d element(s) (numbered from 0), so there is no element %d", done, len(l), n)
			}
			if last {
				if remove {
					return fmt.Errorf("list elements cannot be removed one by one; set the whole list %s", done)
				}
				l[n] = val
				return nil
			}
			if l[n] == nil {
				l[n] = map[string]any{}
			}
			node, k = l[n], k.elem
		default:
			return fmt.Errorf("%s is %s and has no keys inside, so %s cannot be set", done, k.kind, path)
		}
		done = join(done, part)
	}
	return nil
}

// envPaths lists, in the order they are applied, every key path an
// environment variable may override: each key of the schema, with list
// elements that exist in tree numbered, and each role of role tables.
// Whole lists (analysis.regions) come before their elements.
func envPaths(tree map[string]any) []string {
	var out []string
	var gen func(k *key, path string, node any)
	gen = func(k *key, path string, node any) {
		switch k.kind {
		case kTable, kRoles, kNamed:
			m, _ := node.(map[string]any)
			for _, n := range k.names() {
				gen(k.child(n), join(path, n), m[n])
			}
		case kNames:
			// only the names present in the study (a dataset cannot be
			// added from the environment)
			m, _ := node.(map[string]any)
			for _, n := range sortedKeys(m) {
				gen(k.elem, join(path, n), m[n])
			}
		case kEdges:
			// the whole value (a list or a table), then the table's keys
			out = append(out, path)
			for _, n := range k.names() {
				out = append(out, join(path, n))
			}
		case kList:
			out = append(out, path)
			l, _ := node.([]any)
			for i, x := range l {
				gen(k.elem, join(path, strconv.Itoa(i)), x)
			}
		default:
			out = append(out, path)
		}
	}
	gen(schema, "", tree)
	return out
}

// override is one value set from outside the file.
type override struct {
	Key, Value, Origin string
}

// applyOverrides applies environment then flag overrides to tree and
// returns what was applied, and the problems of those that could not be.
// origins records where each overridden path's value came from.
func applyOverrides(tree map[string]any, opt LoadOptions, file string, origins map[string]string) ([]override, []Problem) {
	var applied []override
	var probs []Problem
	lookup := opt.LookupEnv
	if lookup == nil {
		lookup = os.LookupEnv
	}
	for _, p := range envPaths(tree) {
		name := EnvName(p)
		raw, ok := lookup(name)
		if !ok || raw == "" {
			continue
		}
		v, rm := parseValue(raw)
		org := "environment " + name
		if err := setPath(tree, p, v, rm); err != nil {
			probs = append(probs, Problem{File: file, Key: p, Origin: org, Msg: err.Error()})
			continue
		}
		origins[p] = org
		applied = append(applied, override{p, raw, org})
	}
	keys := make([]string, 0, len(opt.Flags))
	for k := range opt.Flags {
		keys = append(keys, k)
	}
	sort.Slice(keys, func(i, j int) bool {
		di, dj := strings.Count(keys[i], "."), strings.Count(keys[j], ".")
		if di != dj {
			return di < dj
		}
		return keys[i] < keys[j]
	})
	for _, k := range keys {
		raw := opt.Flags[k]
		p := strings.ToLower(strings.TrimSpace(k))
		org := "flag " + k
		if p == "" || strings.Contains(p, "..") || strings.HasPrefix(p, ".") || strings.HasSuffix(p, ".") {
			probs = append(probs, Problem{File: file, Key: k, Origin: org, Msg: "not a dotted key path such as analysis.threshold or datasets.NAME.conventions.svp"})
			continue
		}
		for _, q := range everyDataset(tree, p) {
			v, rm := parseValue(raw)
			if err := setPath(tree, q, v, rm); err != nil {
				probs = append(probs, Problem{File: file, Key: q, Origin: org, Msg: err.Error()})
				continue
			}
			origins[q] = org
			applied = append(applied, override{q, raw, org})
		}
	}
	return applied, probs
}

// everyDataset expands a flag key "datasets.*.KEY" into that key of every
// dataset of the study (in name order); other keys are returned as they
// are.
func everyDataset(tree map[string]any, p string) []string {
	rest, ok := strings.CutPrefix(p, "datasets.*.")
	if !ok {
		return []string{p}
	}
	sets, _ := tree["datasets"].(map[string]any)
	var out []string
	for _, name := range sortedKeys(sets) {
		out = append(out, "datasets."+name+"."+rest)
	}
	if len(out) == 0 {
		return []string{p} // setPath says there is no such dataset
	}
	return out
}

// checkKeys walks tree against the schema and reports unknown keys (with
// the nearest valid key), values of the wrong shape, and keys written with
// capitals. Names of a kNames table (dataset names) are checked by the
// decoder.
func checkKeys(tree map[string]any, w *where) []Problem {
	var probs []Problem
	var walk func(k *key, path string, node any)
	walk = func(k *key, path string, node any) {
		if node == nil && path != "" {
			return // "key:" with nothing after it is the same as no key
		}
		switch k.kind {
		case kTable, kRoles, kNamed, kEdges, kNames:
			m, ok := node.(map[string]any)
			if k.kind == kEdges && !ok {
				return // a list: its numbers are checked when it is decoded
			}
			if _, isList := node.([]any); isList && k.kind == kNames {
				probs = append(probs, w.problem(path, fmt.Sprintf("must be a table keyed by %s name, not a list: write each %s as \"NAME:\" with its keys indented below it (no \"- name:\" entries)", k.what, k.what)))
				return
			}
			if !ok {
				probs = append(probs, w.problem(path, fmt.Sprintf("must be a table of keys, not %s", describe(node))))
				return
			}
			names := make([]string, 0, len(m))
			for n := range m {
				names = append(names, n)
			}
			sort.Strings(names)
			for _, n := range names {
				p := join(path, n)
				child := k.child(n)
				if child == nil {
					what := "key"
					switch {
					case k.kind == kRoles:
						what = "role"
					case k.what != "":
						what = k.what
					}
					where := "at the top of the study"
					if path != "" {
						where = "in " + path
					}
					if now, old := renamed[k][n]; old {
						msg := fmt.Sprintf("%q is a key of the earlier study layout; it is called %q now", n, now)
						if now == "" {
							msg = fmt.Sprintf("%q is a key of the earlier study layout: a dataset's name is now its key under datasets", n)
						}
						probs = append(probs, w.problem(p, msg))
						continue
					}
					probs = append(probs, w.problem(p, fmt.Sprintf("unknown %s %q %s; %s", what, n, where, suggest(n, k.names()))))
					continue
				}
				if orig, ok := w.lines.upper[p]; ok {
					probs = append(probs, w.problem(p, fmt.Sprintf("key %q must be written in lower case (%s)", orig, n)))
				}
				walk(child, p, m[n])
			}
		case kList:
			l, ok := node.([]any)
			if !ok {
				probs = append(probs, w.problem(path, fmt.Sprintf("must be a list (in YAML, items starting with \"- \"), not %s", describe(node))))
				return
			}
			for i, x := range l {
				p := join(path, strconv.Itoa(i))
				if x == nil {
					probs = append(probs, w.problem(p, "is an empty list entry: give a table of keys, or remove the \"-\""))
					continue
				}
				walk(k.elem, p, x)
			}
		}
	}
	walk(schema, "", tree)
	return probs
}

// suggestNames says which names a kNames table of the study has.
func suggestNames(name string, m map[string]any) string {
	names := sortedKeys(m)
	if len(names) == 0 {
		return "the study has none"
	}
	if n := nearest(name, names); n != "" {
		return fmt.Sprintf("did you mean %q?", n)
	}
	return "the study has: " + strings.Join(names, ", ")
}

// describe names the shape of a raw value for error messages.
func describe(v any) string {
	switch t := v.(type) {
	case nil:
		return "empty"
	case map[string]any:
		return "a table"
	case []any:
		return "a list"
	case string:
		return fmt.Sprintf("the text %q", t)
	case bool:
		return fmt.Sprintf("the boolean %v", t)
	}
	if _, ok := toFloat(v); ok {
		return fmt.Sprintf("the number %v", v)
	}
	return fmt.Sprintf("%v (%T)", v, v)
}
