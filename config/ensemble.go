package config

import (
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"

	"lidscope/cf"
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
// or, one dataset per folder:
//
//	ensemble:
//	  names: "{model}-{member}"
//	  folders: "runs/{model}/{member}"
//	  dataset:
//	    files: {sst: "{folder}/sst_*.nc"}
//
// Every combination of the lists under over gives one dataset, named by
// names with each {placeholder} replaced. With folders, every existing
// folder matching its pattern (relative to the study's folder; each
// {placeholder} stands for one folder name, as * does, and may be filled
// by over first) gives one dataset, the placeholders taking the matched
// folder names and {folder} the matched folder itself; the dataset table is copied for
// it with the same replacement in every string. each holds per-dataset
// overrides, keyed by expanded name, laid over the copy key by key. The
// expanded datasets join those under datasets; a name given twice is a
// problem. Problems in an expanded dataset name the line in the ensemble
// block it came from.

// ensembleKeys are the keys of the ensemble block.
var ensembleKeys = []string{"names", "over", "folders", "dataset", "each"}

// folderKey is the placeholder of the matched folder (ensemble.folders).
const folderKey = "folder"

// EnsembleMember is one dataset an ensemble block named: its name, the
// folder it was matched from (ensemble.folders; "" for over alone, as
// the study wrote it, relative to the study's folder when it was) and
// the placeholder values that made it.
type EnsembleMember struct {
	Name   string
	Folder string
	Values map[string]string
}

var placeholderRE = regexp.MustCompile(`\{([^{}]*)\}`)

// expandEnsemble replaces tree["ensemble"] by the datasets it names,
// added to tree["datasets"], and indexes their lines in w; dir is the
// study's folder (for ensemble.folders). It returns the members in name
// order (none when there are problems).
func expandEnsemble(tree map[string]any, w *where, dir string) (probs []Problem, members []EnsembleMember) {
	raw, present := tree["ensemble"]
	if !present {
		return nil, nil
	}
	delete(tree, "ensemble")
	if raw == nil {
		return nil, nil
	}
	fail := func(path, format string, a ...any) {
		probs = append(probs, w.problem(path, fmt.Sprintf(format, a...)))
	}
	m, ok := raw.(map[string]any)
	if !ok {
		fail("ensemble", "must be a table with names, over (or folders) and dataset, not %s", describe(raw))
		return probs, nil
	}
	for _, k := range sortedKeys(m) {
		if !contains(ensembleKeys, k) {
			fail(join("ensemble", k), "unknown key %q in ensemble; %s", k, suggest(k, ensembleKeys))
		}
	}
	names, ok := m["names"].(string)
	if !ok || strings.TrimSpace(names) == "" {
		fail("ensemble.names", "give the name of each dataset as a template with placeholders, e.g. names: \"{model}-{member}\"")
		return probs, nil
	}
	folders, hasFolders := m["folders"].(string)
	if f, present := m["folders"]; present && (!hasFolders || strings.TrimSpace(folders) == "") {
		fail("ensemble.folders", "must be a folder pattern with placeholders, e.g. folders: \"runs/{model}/{member}\", not %s", describe(f))
		return probs, nil
	}
	overRaw, ok := m["over"].(map[string]any)
	if _, present := m["over"]; !hasFolders && (!ok || len(overRaw) == 0) || hasFolders && present && !ok {
		fail("ensemble.over", "give each placeholder's values as a list, e.g. over: {model: [alpha, beta], member: [m1, m2]}, or the folders of the datasets, e.g. folders: \"runs/{model}/{member}\"")
		return probs, nil
	}
	keys, over := readOver(overRaw, fail)
	all, ok := ensemblePlaceholders(keys, folders, hasFolders, fail)
	if !ok {
		return probs, nil
	}
	tmpl, ok := m["dataset"].(map[string]any)
	if !ok {
		fail("ensemble.dataset", "give the dataset table every expanded dataset is made from (files, variables, ...), with placeholders such as {%s}", all[0])
		return probs, nil
	}
	checkPlaceholders(names, tmpl, all, hasFolders, fail)
	if len(probs) > 0 || len(over) != len(keys) {
		return probs, nil
	}
	combos := combinations(keys, over)
	var from []string // the matched folder of each combination (folders)
	if hasFolders {
		var ps []Problem
		combos, from, ps = matchFolders(dir, folders, combos, w)
		if len(ps) > 0 {
			return append(probs, ps...), nil
		}
	}
	members = addMembers(tree, m, names, keys, tmpl, combos, from, w, fail)
	if len(probs) > 0 {
		return probs, nil
	}
	return nil, members
}

// readOver reads ensemble.over: each placeholder's list of values.
func readOver(overRaw map[string]any, fail func(path, format string, a ...any)) ([]string, map[string][]string) {
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
	return keys, over
}

// ensemblePlaceholders lists the placeholders: those of over, then those
// ensemble.folders adds (it must add one; {folder} is reserved).
func ensemblePlaceholders(keys []string, folders string, hasFolders bool, fail func(path, format string, a ...any)) ([]string, bool) {
	all := append([]string{}, keys...)
	if !hasFolders {
		return all, true
	}
	own := 0
	for _, sm := range placeholderRE.FindAllStringSubmatch(folders, -1) {
		if sm[1] == folderKey {
			fail("ensemble.folders", "{%s} is the matched folder itself; name the folder levels otherwise, e.g. {model}", folderKey)
			return nil, false
		}
		if !contains(all, sm[1]) {
			all = append(all, sm[1])
			own++
		}
	}
	if own == 0 {
		fail("ensemble.folders", "%q has no {placeholder} of its own: give one per folder level that differs between the datasets, e.g. \"runs/{model}\"", folders)
		return nil, false
	}
	return all, true
}

// checkPlaceholders: every placeholder of names and of the template must
// be one of all ({folder} too in the template, with folders); names must
// use all of them, or two combinations would get the same name.
func checkPlaceholders(names string, tmpl map[string]any, all []string, hasFolders bool, fail func(path, format string, a ...any)) {
	where := "ensemble.over"
	if hasFolders {
		where = "ensemble.over or ensemble.folders"
	}
	check := func(path, s string) {
		for _, sm := range placeholderRE.FindAllStringSubmatch(s, -1) {
			if hasFolders && sm[1] == folderKey && path != "ensemble.names" {
				continue
			}
			if !contains(all, sm[1]) {
				fail(path, "placeholder {%s} is not one of %s (%s); %s", sm[1], where, strings.Join(all, ", "), suggest(sm[1], all))
			}
		}
	}
	check("ensemble.names", names)
	for _, k := range all {
		if !strings.Contains(names, "{"+k+"}") {
			fail("ensemble.names", "%q does not use {%s}, so datasets that differ only in %s would share a name; put {%s} in it", names, k, k, k)
		}
	}
	walkStrings(tmpl, "ensemble.dataset", check)
}

// addMembers adds a dataset per combination (with from, the folder each
// was matched from) to tree["datasets"], ensemble.each laid over it, and
// returns the members in name order.
func addMembers(tree, m map[string]any, names string, keys []string, tmpl map[string]any, combos []map[string]string, from []string, w *where, fail func(path, format string, a ...any)) []EnsembleMember {
	sets, _ := tree["datasets"].(map[string]any)
	if sets == nil {
		if _, isList := tree["datasets"].([]any); isList {
			return nil // checkKeys explains the table form
		}
		sets = map[string]any{}
		tree["datasets"] = sets
	}
	each, _ := m["each"].(map[string]any)
	if e, present := m["each"]; present && e != nil && each == nil {
		fail("ensemble.each", "must be a table keyed by expanded dataset name, not %s", describe(e))
	}
	made := map[string]string{} // name → the folder (or values) that made it
	var order []string
	var members []EnsembleMember
	for i, vals := range combos {
		name := fill(names, vals)
		what := describeValues(keys, vals)
		if from != nil {
			what = "folder " + from[i]
			vals = withFolder(vals, from[i])
		}
		if first, dup := made[name]; dup {
			// names uses every placeholder, but values can run together
			// ("a"+"bc" and "ab"+"c")
			fail("ensemble.names", "%s and %s both give the dataset name %q; separate the placeholders in names (e.g. with -)", first, what, name)
			continue
		}
		made[name] = what
		order = append(order, name)
		mb := EnsembleMember{Name: name, Values: vals}
		if from != nil {
			mb.Folder = from[i]
		}
		members = append(members, mb)
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
		if _, ok := made[n]; !ok {
			fail(join("ensemble.each", n), "%q is not one of the ensemble's datasets; %s", n, suggest(n, order))
		}
	}
	sort.Slice(members, func(i, j int) bool { return members[i].Name < members[j].Name })
	return members
}

func describeValues(keys []string, vals map[string]string) string {
	var parts []string
	for _, k := range keys {
		parts = append(parts, k+"="+vals[k])
	}
	return strings.Join(parts, ", ")
}

func withFolder(vals map[string]string, folder string) map[string]string {
	out := make(map[string]string, len(vals)+1)
	for k, v := range vals {
		out[k] = v
	}
	out[folderKey] = folder
	return out
}

// matchFolders expands ensemble.folders: for each combination of the
// values of over, the pattern with them filled in, whose remaining
// {placeholders} each match one folder name (as * does), is matched
// against the folders under dir (a relative pattern is relative to the
// study's folder). It returns one combination per matched folder, with the
// matched names added, and the folders as the pattern spells them (with
// dir's part left off a relative pattern), in the order of the
// combinations and of the matched paths. A pattern matching no folder at
// all is a problem at ensemble.folders.
func matchFolders(dir, pattern string, combos []map[string]string, w *where) ([]map[string]string, []string, []Problem) {
	var out []map[string]string
	var from []string
	var probs []Problem
	for _, c := range combos {
		pat := filepath.ToSlash(filepath.Clean(fill(pattern, c)))
		// a regular expression capturing each placeholder, the rest of the
		// pattern as glob syntax (* and ? within one folder name)
		var re strings.Builder
		re.WriteString("^")
		var order []string
		rest := pat
		for rest != "" {
			loc := placeholderRE.FindStringSubmatchIndex(rest)
			lit := rest
			if loc != nil {
				lit = rest[:loc[0]]
			}
			for _, r := range lit {
				switch r {
				case '*':
					re.WriteString("[^/]*")
				case '?':
					re.WriteString("[^/]")
				default:
					re.WriteString(regexp.QuoteMeta(string(r)))
				}
			}
			if loc == nil {
				break
			}
			re.WriteString("([^/]+)")
			order = append(order, rest[loc[2]:loc[3]])
			rest = rest[loc[1]:]
		}
		re.WriteString("$")
		rx, err := regexp.Compile(re.String())
		glob := placeholderRE.ReplaceAllString(pat, "*")
		full := filepath.FromSlash(glob)
		if !filepath.IsAbs(full) {
			full = filepath.Join(dir, full)
		}
		var matches []string
		if err == nil {
			matches, err = filepath.Glob(full)
		}
		if err != nil {
			probs = append(probs, w.problem("ensemble.folders", fmt.Sprintf("%q is not a valid folder pattern (%v)", pattern, err)))
			return nil, nil, probs
		}
		for _, mt := range matches {
			if st, err := os.Stat(mt); err != nil || !st.IsDir() {
				continue
			}
			rel := mt
			if !filepath.IsAbs(filepath.FromSlash(pat)) {
				if r, err := filepath.Rel(dir, mt); err == nil {
					rel = r
				}
			}
			rel = filepath.ToSlash(rel)
			sm := rx.FindStringSubmatch(rel)
			if sm == nil {
				continue
			}
			vals := make(map[string]string, len(c)+len(order))
			for k, v := range c {
				vals[k] = v
			}
			ok := true
			for i, k := range order {
				if v, seen := vals[k]; seen && v != sm[i+1] {
					ok = false // a placeholder used twice, matched differently
				}
				vals[k] = sm[i+1]
			}
			if ok {
				out = append(out, vals)
				from = append(from, rel)
			}
		}
	}
	if len(out) == 0 {
		probs = append(probs, w.problem("ensemble.folders", fmt.Sprintf("%q matches no folder (looked in %s; each {placeholder} stands for one folder name): check the pattern, or give the values under over", pattern, cf.QuotePath(dir))))
	}
	return out, from, probs
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
