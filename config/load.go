package config

import (
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"github.com/spf13/viper"

	"lidscope/cf"
)

// LoadOptions are the values that override the study file.
type LoadOptions struct {
	// Flags maps dotted keys to values, as given on the command line, e.g.
	// "analysis.threshold": "1.0" or "datasets.obs.conventions.svp": "bolton";
	// "datasets.*.KEY" sets KEY in every dataset.
	// Values are read like YAML flow values ("[12, 1, 2]" is a list,
	// "null" removes the key so that its default applies). Flags win over
	// the environment, which wins over the file.
	Flags map[string]string
	// LookupEnv looks up environment variables; nil means os.LookupEnv.
	// Each key has the variable EnvName(key), e.g.
	// LIDSCOPE_ANALYSIS_THRESHOLD; empty values are ignored. Use
	// NoEnvironment to ignore the environment.
	LookupEnv func(name string) (string, bool)
}

// NoEnvironment is a LookupEnv that finds nothing.
func NoEnvironment(string) (string, bool) { return "", false }

// formatOf returns the study format from the file name extension.
func formatOf(path string) (string, error) {
	switch strings.ToLower(filepath.Ext(path)) {
	case ".yaml", ".yml":
		return "yaml", nil
	case ".toml":
		return "toml", nil
	case ".json":
		return "json", nil
	}
	return "", fmt.Errorf("study %s: unknown format %q: name the file .yaml (or .yml), .toml or .json", path, filepath.Ext(path))
}

// Load reads, checks and resolves a study. Values come, highest
// precedence first, from opt.Flags, the environment (opt.LookupEnv), the
// file, and the defaults documented in the package documentation. Input
// globs are expanded relative to the study's folder.
//
// Every problem found (unknown keys with the nearest valid key, values out
// of range, contradictions, globs that match nothing) is reported at once:
// the error is an *Error listing each problem with its file, line and key.
// A file that cannot be read or parsed gives a plain error naming it.
func Load(path string, opt LoadOptions) (*Study, error) {
	format, err := formatOf(path)
	if err != nil {
		return nil, err
	}
	if err := cf.CheckRegular(path); err != nil { // a FIFO would block the read
		return nil, readErr(path, err)
	}
	src, err := os.ReadFile(path)
	if err != nil {
		return nil, readErr(path, err)
	}
	return load(path, filepath.Dir(path), format, src, opt)
}

// ParseName is the name a study given to [Parse] goes by in messages and
// in [Study].Path.
const ParseName = "(study text)"

// Parse reads, checks and resolves a study given as text, for programs
// that build a study without writing a file: src is its text in format
// ("yaml", "toml" or "json"), dir the folder against which relative file
// patterns and output.dir are resolved (the folder a study file would lie
// in; "" is the current folder). Everything else is as [Load]: overrides
// from opt, defaults, every problem at once as an *Error, whose problems
// name the line of src and ParseName as the file.
func Parse(src []byte, format, dir string, opt LoadOptions) (*Study, error) {
	switch format {
	case "yaml", "toml", "json":
	default:
		return nil, fmt.Errorf("config.Parse: unknown format %q: give yaml, toml or json", format)
	}
	if dir == "" {
		dir = "."
	}
	return load(ParseName, dir, format, src, opt)
}

func load(path, dir, format string, src []byte, opt LoadOptions) (r *Study, err error) {
	tree, err := parse(path, format, src)
	if err != nil {
		return nil, err
	}
	r = &Study{Path: path, Dir: dir, Format: format, Source: string(src), shown: map[string]string{}}
	w := &where{file: path, lines: indexLines(format, src), origins: map[string]string{}}
	ensProbs, members := expandEnsemble(tree, w, dir)
	r.Ensemble = members
	applied, probs := applyOverrides(tree, opt, path, w.origins)
	probs = append(ensProbs, probs...)
	for _, o := range applied {
		r.Overrides = append(r.Overrides, Override{Key: o.Key, Value: o.Value, Origin: o.Origin})
	}
	probs = append(probs, checkKeys(tree, w)...)
	d := &decoder{where: w}
	d.decode(tree, r)
	probs = append(probs, d.probs...)
	probs = append(probs, r.expandInputs(w)...)
	if len(probs) > 0 {
		sortProblems(probs)
		return nil, &Error{File: path, Problems: probs}
	}
	return r, nil
}

// parse reads the file text with viper, which folds keys to lower case.
func parse(path, format string, src []byte) (tree map[string]any, err error) {
	defer func() {
		// The format parsers viper uses have panicked on some damaged
		// input in the past; a study must give an error, never a crash.
		if p := recover(); p != nil {
			tree, err = nil, fmt.Errorf("study %s: the %s text cannot be read (%v); check its syntax", path, format, p)
		}
	}()
	if err := checkDepth(path, format, src); err != nil {
		return nil, err
	}
	v := viper.NewWithOptions(viper.KeyDelimiter("\x1f"))
	v.SetConfigType(format)
	if err := v.ReadConfig(bytes.NewReader(src)); err != nil {
		return nil, fmt.Errorf("study %s is not valid %s: %w", path, strings.ToUpper(format), unwrapParse(err))
	}
	tree = v.AllSettings()
	if d := treeDepth(tree, MaxDepth); d > MaxDepth {
		return nil, fmt.Errorf("study %s: tables and lists nest more than %d levels deep (a study needs about 5); check the brackets, braces, dotted keys and indentation", path, MaxDepth)
	}
	return tree, nil
}

// unwrapParse drops viper's own "While parsing config:" wrapper (the
// caller names the file and format) while keeping the parser's error.
func unwrapParse(err error) error {
	var pe viper.ConfigParseError
	if errors.As(err, &pe) {
		if u := pe.Unwrap(); u != nil {
			return u
		}
	}
	return err
}

// expandInputs expands the input patterns of every dataset and fills
// Inputs, including the roles taken from files.any.
func (r *Study) expandInputs(w *where) []Problem {
	var probs []Problem
	for i := range r.Datasets {
		ds := &r.Datasets[i]
		base := join(join("datasets", ds.Name), "files")
		keys := make([]string, 0, len(ds.Patterns))
		for k := range ds.Patterns {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		for _, k := range keys {
			files, ps := expand(r.Dir, ds.Patterns[k], join(base, k), ds.Name, k, w, r.shown)
			probs = append(probs, ps...)
			if k == allKey {
				ds.All = files
			} else {
				ds.Inputs[cf.Role(k)] = files
			}
		}
		if len(ds.All) > 0 {
			for _, role := range ds.needed(r) {
				if _, ok := ds.Inputs[role]; !ok {
					ds.Inputs[role] = ds.All
				}
			}
		}
	}
	return probs
}

// needed lists the roles the dataset's settings read.
func (ds *Dataset) needed(r *Study) []cf.Role {
	out := []cf.Role{cf.RoleSST, cf.RoleAirTemp}
	for _, x := range []cf.Role{ds.Cloud, ds.Surface.TemperatureRole, ds.Surface.PressureRole, ds.Surface.HumidityRole, ds.Ocean.Role, r.Analysis.Grid.TargetRole} {
		if x != "" {
			out = append(out, x)
		}
	}
	if ds.Metrics.ECTEI {
		out = append(out, cf.RoleSpecHum)
	}
	if ds.SeaIce.Use {
		out = append(out, cf.RoleSeaIce)
	}
	// the relationship analysis: responses, indicator, omega regimes
	for _, q := range ds.RelationResponses {
		out = append(out, cf.Role(q))
	}
	if role, ok := indicatorRoles[r.Relations.Indicator]; ok {
		out = append(out, role)
	}
	if r.Relations.OmegaBins {
		out = append(out, cf.RoleOmega)
	}
	out = append(out, ds.factorInputs(r)...)
	return out
}

// expand resolves patterns against dir and returns the matching files,
// sorted and without duplicates.
func expand(dir string, patterns []string, key, dataset, role string, w *where, shown map[string]string) ([]string, []Problem) {
	var probs []Problem
	seen := map[string]bool{}
	var files []string
	for j, pat := range patterns {
		k := key
		if len(patterns) > 1 {
			k = join(key, fmt.Sprint(j))
		}
		full := pat
		if !filepath.IsAbs(full) {
			full = filepath.Join(dir, pat)
		}
		matches, err := filepath.Glob(full)
		if err != nil {
			probs = append(probs, w.problem(k, fmt.Sprintf("dataset %q, role %s: %q is not a valid glob (%v)", dataset, role, pat, err)))
			continue
		}
		n := 0
		for _, m := range matches {
			if st, err := os.Stat(m); err != nil || st.IsDir() {
				continue
			}
			n++
			if !seen[m] {
				seen[m] = true
				files = append(files, m)
			}
			if _, ok := shown[m]; !ok {
				shown[m] = filepath.ToSlash(m)
				if !filepath.IsAbs(pat) {
					if q, err := filepath.Rel(dir, m); err == nil {
						shown[m] = filepath.ToSlash(q)
					}
				}
			}
		}
		if n == 0 {
			where := ""
			if !filepath.IsAbs(pat) {
				where = fmt.Sprintf(" (relative to the study's folder %s)", dir)
			}
			probs = append(probs, w.problem(k, fmt.Sprintf("dataset %q, role %s: no file matches %q%s; check the path", dataset, role, pat, where)))
		}
	}
	sort.Strings(files)
	return files, probs
}

// readErr words a study that cannot be read; a missing one is told what to
// give instead.
func readErr(path string, err error) error {
	if errors.Is(err, fs.ErrNotExist) {
		return fmt.Errorf("study %s does not exist: give the path of a study file (lidscope study init FILE... --output %s writes a starter): %w", path, path, err)
	}
	return fmt.Errorf("reading study: %w", err)
}
