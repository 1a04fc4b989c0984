package config

import (
	"fmt"
	"math"
	"path/filepath"
	"regexp"
	"slices"
	"sort"
	"strconv"
	"strings"

	"lidscope/calendar"
	"lidscope/cf"
	"lidscope/metrics"
	"lidscope/regimes"
	"lidscope/regrid"
	"lidscope/relations"
	"lidscope/units"
)

// Defaults of the analysis (see the package documentation for why).
const (
	DefaultBandSouth = -30.0 // degrees north
	DefaultBandNorth = 30.0  // degrees north
	// DefaultPercentile is p of the sst_percentile rule, percent.
	DefaultPercentile    = 70.0
	DefaultThreshold     = 1.5  // K
	DefaultMinOcean      = 0.5  // ocean fraction
	DefaultMaxSeaIce     = 0.15 // sea-ice fraction
	DefaultMinCoverage   = 0.5  // conservative remapping
	DefaultMaskThreshold = 0.5  // remapped masks
	DefaultOutputDir     = "out"
	// MaxThreshold bounds |δ|, K: relative SST rarely leaves ±5 K, so a
	// larger δ is a units mistake.
	MaxThreshold = 10.0
)

// nameRE is the form of dataset names: they are keys of the study (lower
// case, like every key; no dot, which separates key paths) and folder
// names of the results.
var nameRE = regexp.MustCompile(`^[a-z0-9][a-z0-9_-]*$`)

// boxNameRE is the form of region and patch names: they become flag
// meanings of the relationship files, which must start with a letter.
var boxNameRE = regexp.MustCompile(`^[A-Za-z][A-Za-z0-9_.-]*$`)

// where turns a key path into a Problem located by line or origin.
type where struct {
	file    string
	lines   *lineIndex
	origins map[string]string
}

func (w *where) origin(path string) string {
	for p := path; p != ""; {
		if o, ok := w.origins[p]; ok {
			return o
		}
		i := strings.LastIndexByte(p, '.')
		if i < 0 {
			break
		}
		p = p[:i]
	}
	return ""
}

func (w *where) problem(path, msg string) Problem {
	p := Problem{File: w.file, Key: path, Msg: msg}
	if o := w.origin(path); o != "" {
		p.Origin = o
	} else {
		p.Line = w.lines.line(path)
	}
	return p
}

type decoder struct {
	*where
	probs []Problem
}

func (d *decoder) fail(path, format string, a ...any) {
	d.probs = append(d.probs, d.problem(path, fmt.Sprintf(format, a...)))
}

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

var seasons = map[string][]int{"DJF": {12, 1, 2}, "MAM": {3, 4, 5}, "JJA": {6, 7, 8}, "SON": {9, 10, 11}}

var resolutionRE = regexp.MustCompile(`^([0-9]*\.?[0-9]+)\s*deg$`)

// decode builds the typed study from the raw tree. Problems go to d.
func (d *decoder) decode(tree map[string]any, r *Study) {
	d.analysis(sub(tree, "analysis"), r)
	out := sub(tree, "output")
	dir := d.str(out, "output", "dir", DefaultOutputDir)
	if dir == "" {
		d.fail("output.dir", "is empty: give a folder (default %q)", DefaultOutputDir)
		dir = DefaultOutputDir
	}
	if !filepath.IsAbs(dir) {
		dir = filepath.Join(r.Dir, dir)
	}
	r.Output = Output{Dir: filepath.Clean(dir), Plots: d.boolean(out, "output", "plots", true)}
	r.Limits = d.limits(sub(tree, "limits"))

	sets, _ := tree["datasets"].(map[string]any)
	if _, isList := tree["datasets"].([]any); isList {
		return // checkKeys explained the table form
	}
	if len(sets) == 0 {
		d.fail("datasets", "the study has no datasets: add a table \"datasets:\" with one entry per dataset, keyed by its name, each with its files")
		return
	}
	envNames := map[string]string{}
	for _, name := range d.fileOrder("datasets", sets) {
		if other, dup := envNames[EnvName(name)]; dup {
			d.fail(join("datasets", name), "datasets %q and %q differ only in - and _, so the environment cannot tell them apart (%s); rename one", other, name, EnvName(join("datasets", name)))
		}
		envNames[EnvName(name)] = name
		m, _ := sets[name].(map[string]any)
		if _, isTable := sets[name].(map[string]any); !isTable && sets[name] != nil {
			continue // checkKeys reported it
		}
		r.Datasets = append(r.Datasets, d.dataset(join("datasets", name), name, m, r))
	}
	d.checkGridTarget(r)
	d.relationships(sub(tree, "relationships"), r)
	d.factors(sub(tree, "factors"), sub(tree, "relationships"), r)
}

// fileOrder returns the keys of table m (at path) in the order the study
// file writes them; keys the file does not have a line for (given by a
// flag or the environment) come last, sorted.
func (d *decoder) fileOrder(path string, m map[string]any) []string {
	keys := sortedKeys(m)
	sort.SliceStable(keys, func(i, j int) bool {
		li, lj := d.lines.lines[join(path, keys[i])], d.lines.lines[join(path, keys[j])]
		if (li > 0) != (lj > 0) {
			return li > 0
		}
		return li < lj
	})
	return keys
}

func (d *decoder) analysis(m map[string]any, r *Study) {
	a := &r.Analysis
	band := sub(m, "band")
	s, _ := d.num(band, "analysis.band", "south", DefaultBandSouth)
	n, _ := d.num(band, "analysis.band", "north", DefaultBandNorth)
	switch {
	case s < -90 || s > 90:
		d.fail("analysis.band.south", "%v° is not a latitude: give −90…90 (default %v)", s, DefaultBandSouth)
	case n < -90 || n > 90:
		d.fail("analysis.band.north", "%v° is not a latitude: give −90…90 (default %v)", n, DefaultBandNorth)
	case s >= n:
		d.fail("analysis.band", "south (%v°) must be less than north (%v°)", s, n)
	}
	a.Band = regimes.Band{South: s, North: n}
	a.Threshold, _ = d.num(m, "analysis", "threshold", DefaultThreshold)
	if math.Abs(a.Threshold) >= MaxThreshold {
		d.fail("analysis.threshold", "δ = %v K is implausible: SST minus the tropical-mean SST rarely leaves ±5 K; give |δ| < %v K (default %v K)", a.Threshold, MaxThreshold, DefaultThreshold)
	}
	a.Transition, _ = d.num(m, "analysis", "transition", 0)
	if a.Transition < 0 {
		d.fail("analysis.transition", "the half-width of the transition band must be ≥ 0 K, not %v (0 = no transition band)", a.Transition)
	}
	rule, _ := d.choice(m, "analysis", "rule", string(regimes.RuleRelativeSST), string(regimes.RuleRelativeSST), string(regimes.RuleSSTPercentile))
	a.Rule = regimes.Rule(rule)
	_, hasP := m["percentile"]
	_, hasT := m["threshold"]
	switch {
	case a.Rule == regimes.RuleSSTPercentile:
		a.Percentile, _ = d.num(m, "analysis", "percentile", DefaultPercentile)
		if !(a.Percentile > 0 && a.Percentile < 100) {
			d.fail("analysis.percentile", "p = %v is not a percentile: give 0 < p < 100 (default %v)", a.Percentile, DefaultPercentile)
		}
		if hasT {
			d.fail("analysis.threshold", "the sst_percentile rule finds δ at each step from the percentile; leave threshold out or use rule: relative_sst")
		}
	case hasP:
		d.fail("analysis.percentile", "percentile is used only with rule: sst_percentile (the rule here is relative_sst, a threshold δ); add rule: sst_percentile or remove percentile")
	}
	a.CloudChoice, _ = d.choice(m, "analysis", "cloud", "auto", "auto", "low_cloud", "cloud")

	for _, b := range d.boxes(m, "analysis", "regions", "region") {
		a.Regions = append(a.Regions, Region(b))
	}
	if _, ok := present(m, "domain"); ok {
		a.Domain = d.domain(sub(m, "domain"))
	}

	g := sub(m, "grid")
	a.Grid.Target = d.str(g, "analysis.grid", "target", "")
	switch t := a.Grid.Target; {
	case t == "":
	case resolutionRE.MatchString(t):
		x, _ := strconv.ParseFloat(resolutionRE.FindStringSubmatch(t)[1], 64)
		nlat, nlon := 180/x, 360/x
		if !(x > 0 && x <= 90) || math.Abs(nlat-math.Round(nlat)) > 1e-9 || math.Abs(nlon-math.Round(nlon)) > 1e-9 {
			d.fail("analysis.grid.target", "%q: a regular global grid needs a spacing that divides 180° (e.g. 1deg, 2deg, 2.5deg)", t)
		}
		a.Grid.Resolution = x
	default:
		if _, ok := cf.KindOf(cf.Role(t)); ok {
			a.Grid.TargetRole = cf.Role(t)
		} else {
			cands := append(roleNames(&key{}), "1deg", "2deg", "2.5deg")
			d.fail("analysis.grid.target", "%q is neither a role nor a resolution such as \"2.5deg\"; %s", t, suggest(t, cands))
		}
	}
	a.Grid.Method = map[cf.Role]regrid.Method{}
	for role, v := range sub(g, "method") {
		if !isRole(schema.keys["analysis"].keys["grid"].keys["method"], role) {
			continue
		}
		p := "analysis.grid.method." + role
		s, ok := v.(string)
		switch strings.TrimSpace(s) {
		case "conservative":
			a.Grid.Method[cf.Role(role)] = regrid.Conservative
		case "bilinear":
			a.Grid.Method[cf.Role(role)] = regrid.Bilinear
		default:
			if !ok {
				d.fail(p, "must be conservative or bilinear, not %s", describe(v))
			} else {
				d.fail(p, "%q is not conservative or bilinear; %s", s, suggest(s, []string{"conservative", "bilinear"}))
			}
		}
	}
	a.Grid.MinCoverage, _ = d.fraction(g, "analysis.grid", "min_coverage", DefaultMinCoverage)
	a.Grid.MaskThreshold, _ = d.fraction(g, "analysis.grid", "mask_threshold", DefaultMaskThreshold)
}

// namedBox is a decoded region or patch.
// domain decodes analysis.domain: south and north (defaults −90, 90) and,
// for a box, both west and east (neither: every longitude).
func (d *decoder) domain(m map[string]any) *Region {
	const p = "analysis.domain"
	s, _ := d.num(m, p, "south", -90)
	n, _ := d.num(m, p, "north", 90)
	w, wSet := d.num(m, p, "west", -180)
	e, eSet := d.num(m, p, "east", 180)
	switch {
	case s < -90 || s > 90 || n < -90 || n > 90:
		d.fail(p, "south %v° and north %v° must be latitudes (−90…90)", s, n)
	case s >= n:
		d.fail(p, "south (%v°) must be less than north (%v°)", s, n)
	case wSet != eSet:
		d.fail(p, "give both west and east for a box, or neither for every longitude")
	case w < -180 || w > 360 || e < -180 || e > 360:
		d.fail(p, "west %v° and east %v° must be longitudes in −180…360", w, e)
	case wSet && w == e:
		d.fail(p, "west and east are both %v°: a domain needs a width (west > east crosses the 0°/180° meridian; leave both out for every longitude)", w)
	}
	return &Region{Name: "domain", South: s, North: n, West: w, East: e}
}

type namedBox struct {
	Name                     string
	South, North, West, East float64
}

// boxes decodes the list key k of m (at path): named lat–lon boxes, each
// {name, south, north, west, east}; what ("region", "patch") names them
// in messages.
func (d *decoder) boxes(m map[string]any, path, k, what string) []namedBox {
	var out []namedBox
	list, _ := m[k].([]any)
	names := map[string]int{}
	for i, x := range list {
		rm, _ := x.(map[string]any)
		if rm == nil {
			continue // checkKeys reported it
		}
		p := join(path, k) + "." + strconv.Itoa(i)
		b := namedBox{Name: d.str(rm, p, "name", "")}
		switch {
		case b.Name == "":
			d.fail(p, "a %s needs a name (a letter, then letters, digits and _ . -)", what)
		case !boxNameRE.MatchString(b.Name):
			d.fail(join(p, "name"), "%q: %s names start with a letter and contain only letters, digits and _ . -", b.Name, what)
		case b.Name == relations.BandDomain:
			d.fail(join(p, "name"), "%q is the name of the whole tropical band in the results; choose another %s name", b.Name, what)
		default:
			if j, dup := names[b.Name]; dup {
				d.fail(join(p, "name"), "%s name %q is used twice (also %s.%d)", what, b.Name, join(path, k), j)
			} else {
				names[b.Name] = i
			}
		}
		need := func(key string) float64 {
			v, set := d.num(rm, p, key, 0)
			if !set {
				d.fail(p, "%s %q needs %s", what, b.Name, key)
			}
			return v
		}
		b.South, b.North, b.West, b.East = need("south"), need("north"), need("west"), need("east")
		switch {
		case b.South < -90 || b.North > 90 || b.South >= b.North:
			d.fail(p, "south %v° and north %v° must lie within −90…90 with south < north", b.South, b.North)
		case b.West < -180 || b.West > 360 || b.East < -180 || b.East > 360:
			d.fail(p, "west %v° and east %v° must be longitudes in −180…360", b.West, b.East)
		case b.West == b.East:
			d.fail(p, "west and east are both %v°: a %s needs a width (west > east crosses the 0°/180° meridian)", b.West, what)
		}
		out = append(out, b)
	}
	return out
}

// checkGridTarget: a role named as the target grid must be read by every dataset.
func (d *decoder) checkGridTarget(r *Study) {
	t := r.Analysis.Grid.TargetRole
	if t == "" {
		return
	}
	for _, ds := range r.Datasets {
		if !ds.hasPattern(t) && !ds.hasPattern(allKey) {
			d.fail("analysis.grid.target", "names role %s, but dataset %q has no %s input; give one or choose another target", t, ds.Name, t)
		}
	}
}

func (ds *Dataset) hasPattern(r cf.Role) bool {
	_, ok := ds.Patterns[string(r)]
	return ok
}

// dataset decodes one dataset. Files are expanded later (expandInputs).
func (d *decoder) dataset(path, name string, m map[string]any, r *Study) Dataset {
	ds := Dataset{
		Name:        name,
		Patterns:    map[string][]string{},
		Variables:   map[cf.Role]string{},
		Units:       map[cf.Role]string{},
		Coordinates: map[cf.Role]Coordinates{},
		Inputs:      map[cf.Role][]string{},
	}
	if err := CheckDatasetName(ds.Name); err != nil {
		d.fail(path, "%v", err)
	}
	ds.Description = d.str(m, path, "about", "")
	ds.Accept = d.acceptList(m, path)

	// files
	inPath := join(path, "files")
	inputs := sub(m, "files")
	for _, k := range sortedKeys(inputs) {
		if !isRole(datasetKeys.keys["files"], k) {
			continue // reported by checkKeys
		}
		if pats := d.strList(inputs, inPath, k); len(pats) > 0 {
			ds.Patterns[k] = pats
		}
	}
	if _, ok := present(m, "files"); !ok || len(inputs) == 0 {
		d.fail(path, "dataset %q has no files: give at least files.sst (files.air_temperature adds LTS and EIS, files.low_cloud or files.cloud the cloud statistics)", ds.Name)
	}
	has := func(r cf.Role) bool { return ds.hasPattern(r) || ds.hasPattern(allKey) }
	explicit := ds.hasPattern

	// variables, units, coordinates
	for role, v := range sub(m, "variables") {
		if !isRole(datasetKeys.keys["variables"], role) {
			continue
		}
		s := d.str(map[string]any{role: v}, join(path, "variables"), role, "")
		if s != "" {
			ds.Variables[cf.Role(role)] = s
		}
	}
	for role, v := range sub(m, "units") {
		if !isRole(datasetKeys.keys["units"], role) {
			continue
		}
		p := join(path, "units")
		s := d.str(map[string]any{role: v}, p, role, "")
		if s == "" {
			continue
		}
		kind, _ := cf.KindOf(cf.Role(role))
		if _, err := units.Parse(kind, s); err != nil {
			d.fail(join(p, role), "%v", err)
			continue
		}
		ds.Units[cf.Role(role)] = s
	}
	for role, v := range sub(m, "coordinates") {
		if !isRole(datasetKeys.keys["coordinates"], role) {
			continue
		}
		cm, _ := v.(map[string]any)
		p := join(join(path, "coordinates"), role)
		c := Coordinates{
			Lat: d.str(cm, p, "lat", ""), Lon: d.str(cm, p, "lon", ""),
			Level: d.str(cm, p, "level", ""), Time: d.str(cm, p, "time", ""),
			LevelUnits: d.str(cm, p, "level_units", ""),
		}
		if c.LevelUnits != "" {
			if _, err := units.Parse(units.Pressure, c.LevelUnits); err != nil {
				d.fail(join(p, "level_units"), "%v (lidscope reads pressure levels only)", err)
			}
		}
		ds.Coordinates[cf.Role(role)] = c
	}
	for _, tbl := range []string{"variables", "units", "coordinates"} {
		for role := range sub(m, tbl) {
			if isRole(datasetKeys.keys[tbl], role) && !has(cf.Role(role)) {
				d.fail(join(join(path, tbl), role), "role %s has no files (files.%s); give them or remove this entry", role, role)
			}
		}
	}

	var timed []cf.Role
	if !ds.hasPattern(allKey) {
		for _, r := range cf.Roles() {
			if ds.hasPattern(r) && r != cf.RoleLandFraction && r != cf.RoleSeaFraction {
				timed = append(timed, r)
			}
		}
	}
	d.timeSel(join(path, "time"), sub(m, "time"), &ds.Time, has, timed)
	d.ocean(join(path, "ocean"), sub(m, "ocean"), &ds, has, explicit)

	// sea ice
	si := sub(m, "sea_ice")
	ds.SeaIce.MaxFraction, _ = d.fraction(si, join(path, "sea_ice"), "max_fraction", DefaultMaxSeaIce)
	_, siSet := present(m, "sea_ice")
	switch {
	case explicit(cf.RoleSeaIce):
		ds.SeaIce.Use = true
	case siSet && has(cf.RoleSeaIce):
		ds.SeaIce.Use = true // from files.any
	case siSet:
		d.fail(join(path, "sea_ice"), "sea-ice exclusion needs a sea_ice input (files.sea_ice); give one or remove sea_ice")
	}

	ectei, _ := sub(m, "conventions")["ectei"].(bool) // checked by d.conventions
	d.surface(join(path, "surface"), sub(m, "surface"), &ds, has, explicit, ectei)
	d.conventions(join(path, "conventions"), sub(m, "conventions"), &ds, has)

	// cloud
	switch r.Analysis.CloudChoice {
	case "low_cloud", "cloud":
		ds.Cloud = cf.Role(r.Analysis.CloudChoice)
		if !has(ds.Cloud) {
			d.fail(inPath, "analysis.cloud is %s, but dataset %q has no %s input", ds.Cloud, ds.Name, ds.Cloud)
		}
	default:
		switch {
		case explicit(cf.RoleLowCloud):
			ds.Cloud = cf.RoleLowCloud
		case explicit(cf.RoleCloud):
			ds.Cloud = cf.RoleCloud
		case has(cf.RoleLowCloud):
			ds.Cloud = cf.RoleLowCloud // from files.any: low cloud is preferred
		default:
			// No cloud input: the run has no cloud statistics and no
			// relationship analysis (Dataset.Lacks says so).
		}
	}
	if !has(cf.RoleSST) {
		d.fail(inPath, "dataset %q needs files for role %s (files.%s): SST is the minimum lidscope runs on", ds.Name, cf.RoleSST, cf.RoleSST)
	}
	if !has(cf.RoleAirTemp) {
		if ds.Metrics.ECTEI {
			d.fail(join(path, "conventions"), "conventions.ectei needs 700 hPa temperature, but dataset %q has no %s input; give files.%s or remove conventions.ectei", ds.Name, cf.RoleAirTemp, cf.RoleAirTemp)
		}
		if ds.Metrics.T850Field {
			d.fail(join(path, "conventions"), "the metrics conventions read temperature at %g hPa from the %s input, but dataset %q has none; give files.%s or choose another lapse-rate convention", ds.Metrics.LapsePressure/100, cf.RoleAirTemp, ds.Name, cf.RoleAirTemp)
		}
	}
	ds.OutputDir = filepath.Join(r.Output.Dir, ds.Name)
	return ds
}

func sortedKeys(m map[string]any) []string {
	out := make([]string, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// timeSel decodes the time table; timed are the roles with files of
// their own that are read with a time axis (all of them unknown when
// files.any is used: then timed is nil).
func (d *decoder) timeSel(path string, m map[string]any, t *TimeSelection, has func(cf.Role) bool, timed []cf.Role) {
	t.Units = d.str(m, path, "units", "")
	t.Calendar = d.str(m, path, "calendar", "")
	t.Climatology = d.boolean(m, path, "climatology", false)
	d.timeDecl(path, t.TimeDecl(), "")

	// per-role declarations: each key falls back to the dataset's
	for _, k := range sortedKeys(m) {
		if datasetKeys.keys["time"].keys[k] != nil || !isRole(&key{}, k) {
			continue // the dataset's own keys, or reported by checkKeys
		}
		role, p := cf.Role(k), join(path, k)
		rm, _ := m[k].(map[string]any)
		if rm == nil {
			continue // empty, or not a table (checkKeys reported it)
		}
		if role == cf.RoleLandFraction || role == cf.RoleSeaFraction {
			d.fail(p, "the ocean mask (%s) is read as a fixed field, without its time axis; remove this entry", role)
			continue
		}
		if !has(role) {
			d.fail(p, "role %s has no files (files.%s); give them or remove this entry", role, role)
			continue
		}
		decl := t.TimeDecl()
		decl.Units = d.str(rm, p, "units", decl.Units)
		decl.Calendar = d.str(rm, p, "calendar", decl.Calendar)
		if _, set := present(rm, "climatology"); set {
			decl.Climatology = d.boolean(rm, p, "climatology", false)
			if decl.Climatology {
				decl.Units = d.str(rm, p, "units", "") // the dataset's units do not apply
			}
		}
		d.timeDecl(p, decl, fmt.Sprintf(" (%s's own or the dataset's)", role))
		if t.ByRole == nil {
			t.ByRole = map[cf.Role]TimeDecl{}
		}
		t.ByRole[role] = decl
	}
	// start and end select years of the record the run follows; when every
	// timed role is a declared climatology there are none
	climatology := t.Climatology
	if len(t.ByRole) > 0 && len(timed) > 0 {
		climatology = true
		for _, r := range timed {
			if !t.For(r).Climatology {
				climatology = false
			}
		}
	}
	for _, k := range []string{"start", "end"} {
		s := d.str(m, path, k, "")
		if s == "" {
			continue
		}
		ym, err := parseYearMonth(s)
		if err != nil {
			d.fail(join(path, k), "%v", err)
			continue
		}
		if climatology {
			d.fail(join(path, k), "a 12-month climatology has no years, so %s cannot be used when every time axis is declared a climatology (climatology: true)", k)
			continue
		}
		if k == "start" {
			t.Start = &ym
		} else {
			t.End = &ym
		}
	}
	if t.Start != nil && t.End != nil && t.Start.Index() > t.End.Index() {
		d.fail(join(path, "start"), "start %s is after end %s", t.Start, t.End)
	}
	months, mSet := d.numList(m, path, "months")
	seen := map[int]bool{}
	for i, f := range months {
		mo := int(f)
		if float64(mo) != f || mo < 1 || mo > 12 {
			d.fail(join(join(path, "months"), strconv.Itoa(i)), "%v is not a month: give whole numbers 1–12", f)
			continue
		}
		if seen[mo] {
			d.fail(join(path, "months"), "month %d is listed twice", mo)
			continue
		}
		seen[mo] = true
		t.Months = append(t.Months, mo)
	}
	if s := d.str(m, path, "season", ""); s != "" {
		up := strings.ToUpper(s)
		ms, ok := seasons[up]
		switch {
		case !ok:
			d.fail(join(path, "season"), "%q is not a season: use DJF, MAM, JJA or SON, or list the months", s)
		case mSet:
			d.fail(join(path, "season"), "give either months or season, not both")
		default:
			t.Season, t.Months = up, append([]int(nil), ms...)
		}
	}
}

// timeDecl checks one time declaration (at path); whose says where its
// values come from, for messages.
func (d *decoder) timeDecl(path string, t TimeDecl, whose string) {
	if t.Calendar != "" {
		if _, err := calendar.ParseCalendar(t.Calendar); err != nil {
			d.fail(join(path, "calendar"), "%v", err)
			return
		}
	}
	if t.Units != "" {
		if _, err := calendar.Parse(t.Units, t.Calendar, calendar.Options{CalendarMonths: true}); err != nil {
			d.fail(join(path, "units"), "%v%s", err, whose)
		}
		if t.Climatology {
			d.fail(join(path, "units"), "time units are not used when climatology is true (the axis is declared as 12 months); remove one of them")
		}
	}
}

func (d *decoder) ocean(path string, m map[string]any, ds *Dataset, has, explicit func(cf.Role) bool) {
	o := &ds.Ocean
	def := "sst"
	if explicit(cf.RoleLandFraction) || explicit(cf.RoleSeaFraction) {
		def = "fraction"
	}
	mask, _ := d.choice(m, path, "mask", def, "sst", "fraction", "categorical")
	roleS, roleSet := d.choice(m, path, "from", "", string(cf.RoleLandFraction), string(cf.RoleSeaFraction))
	var minSet, valSet bool
	o.MinOceanFraction, minSet = d.fraction(m, path, "min_fraction", DefaultMinOcean)
	o.OceanValues, valSet = d.numList(m, path, "values")
	switch mask {
	case "sst":
		o.Method = OceanWhereSST
		o.MinOceanFraction = 0
		for k, set := range map[string]bool{"from": roleSet, "min_fraction": minSet, "values": valSet} {
			if set {
				d.fail(join(path, k), "is used only with mask: fraction or mask: categorical, but mask is sst")
			}
		}
		o.OceanValues = nil
		return
	case "fraction":
		o.Method = OceanFromFraction
		if valSet {
			d.fail(join(path, "values"), "is used only with mask: categorical, but mask is fraction")
		}
		o.OceanValues = nil
	case "categorical":
		o.Method = OceanFromCategories
		if minSet {
			d.fail(join(path, "min_fraction"), "is used only with mask: fraction, but mask is categorical")
		}
		o.MinOceanFraction = 0
		if !valSet {
			o.OceanValues = []float64{0}
		}
	}
	switch {
	case roleS != "":
		o.Role = cf.Role(roleS)
	case explicit(cf.RoleLandFraction):
		o.Role = cf.RoleLandFraction
	case explicit(cf.RoleSeaFraction):
		o.Role = cf.RoleSeaFraction
	case has(cf.RoleLandFraction):
		o.Role = cf.RoleLandFraction // from files.any
	}
	if o.Role == "" || !has(o.Role) {
		want := "a land_fraction or sea_fraction input"
		if o.Role != "" {
			want = "a " + string(o.Role) + " input"
		}
		d.fail(join(path, "mask"), "mask %s needs %s (files.%s); give one, or use mask: sst", mask, want, cmpOr(string(o.Role), "land_fraction"))
	}
}

func cmpOr(a, b string) string {
	if a != "" {
		return a
	}
	return b
}

var humidityRoles = []cf.Role{cf.RoleRH, cf.RoleDewPoint, cf.RoleSpecHum}

func (d *decoder) surface(path string, m map[string]any, ds *Dataset, has, explicit func(cf.Role) bool, ectei bool) {
	s := &ds.Surface
	mr := metrics.DefaultConventions()
	temp, _ := d.choice(m, path, "temperature", "sst", "sst", "air")
	if temp == "air" {
		mr.Surface, s.TemperatureRole = metrics.SurfaceAir, cf.RoleSurfaceAir
		if !has(cf.RoleSurfaceAir) {
			d.fail(join(path, "temperature"), "air needs a surface_air_temperature input (files.surface_air_temperature); give one or use sst")
		}
	} else {
		mr.Surface, s.TemperatureRole = metrics.SurfaceSST, cf.RoleSST
	}

	if v, ok := present(m, "pressure"); ok {
		p := join(path, "pressure")
		if str, isStr := v.(string); isStr && strings.TrimSpace(str) == "field" {
			mr.PressureField, s.PressureRole = true, cf.RoleSurfacePres
			if !has(cf.RoleSurfacePres) {
				d.fail(p, "field needs a surface_pressure input (files.surface_pressure); give one or a constant such as 1000hPa")
			}
		} else if pa, err := quantity(units.Pressure, v); err != nil {
			d.fail(p, "give a pressure with units (e.g. 1000hPa; a bare number is Pa) or \"field\": %v", err)
		} else if !(pa > metrics.P700 && pa <= 120000) {
			d.fail(p, "%v Pa is not a surface pressure: give one above 700 hPa and at most 1200 hPa, with units (e.g. 1000hPa; a bare number is Pa)", pa)
		} else {
			mr.SurfacePressure = pa
		}
	}

	if v, ok := present(m, "humidity"); ok {
		p := join(path, "humidity")
		str, isStr := v.(string)
		str = strings.TrimSpace(str)
		switch {
		case isStr && str == "field":
			// With ECTEI on, specific_humidity is the 700-hPa humidity, so
			// it is not a candidate for the surface humidity.
			var given []cf.Role
			for _, r := range humidityRoles {
				if explicit(r) && !(r == cf.RoleSpecHum && ectei) {
					given = append(given, r)
				}
			}
			switch {
			case len(given) == 1:
				s.HumidityRole = given[0]
			case len(given) > 1:
				d.fail(p, "field is ambiguous: the files give %v; write the role to use instead (humidity: %s)", given, given[0])
			case has(cf.RoleRH): // no explicit humidity input, but files.any
				d.fail(p, "field with files.any: write which humidity role to read (relative_humidity, dew_point_temperature or specific_humidity)")
			default:
				d.fail(p, "field needs a humidity input: files.relative_humidity, files.dew_point_temperature or files.specific_humidity; or give an assumed relative humidity such as 0.8")
			}
		case isStr && slices.Contains(humidityRoles, cf.Role(str)):
			s.HumidityRole = cf.Role(str)
			if !has(s.HumidityRole) {
				d.fail(p, "%s needs an input (files.%s)", str, str)
			}
		default:
			rh, err := quantity(units.Fraction, v)
			switch {
			case err != nil:
				d.fail(p, "give an assumed relative humidity (0.8 or 80%%), \"field\", or a humidity role: %v", err)
			case !(rh > 0 && rh <= 1):
				d.fail(p, "%v is not a relative humidity: give a fraction in (0, 1] (0.8 means 80 %%) or write it with %% (80%%)", rh)
			default:
				mr.AssumedRH = rh
			}
		}
		switch s.HumidityRole {
		case cf.RoleRH:
			mr.Humidity = metrics.HumidityRH
		case cf.RoleDewPoint:
			mr.Humidity = metrics.HumidityDewPoint
		case cf.RoleSpecHum:
			mr.Humidity = metrics.HumiditySpecific
		}
	}
	ds.Metrics = mr
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

func (d *decoder) conventions(path string, m map[string]any, ds *Dataset, has func(cf.Role) bool) {
	mr := &ds.Metrics
	if s, set := d.choice(m, path, "svp", mr.SVP.String(), metrics.SVPMurphyKoop.String(), metrics.SVPBolton.String()); set {
		if f, err := metrics.ParseSVPFormula(s); err == nil {
			mr.SVP = f
		}
	}
	if s, set := d.choice(m, path, "lcl", mr.LCL.String(), metrics.LCLRomps.String(), metrics.LCLBolton.String(), metrics.LCLLinear.String()); set {
		if l, err := metrics.ParseLCLMethod(s); err == nil {
			mr.LCL = l
		}
	}
	t850, _ := d.choice(m, path, "t850", "mean", "mean", "field")
	mr.T850Field = t850 == "field"
	if v, ok := present(m, "lapse_pressure"); ok {
		pa, err := quantity(units.Pressure, v)
		if err != nil {
			d.fail(join(path, "lapse_pressure"), "give a pressure with units (e.g. 850hPa; a bare number is Pa): %v", err)
		} else {
			mr.LapsePressure = pa
		}
	}
	if s, set := d.choice(m, path, "lapse_moisture", mr.LapseMoisture.String(), metrics.LapseQs.String(), metrics.LapseRs.String()); set {
		if l, err := metrics.ParseLapseMoisture(s); err == nil {
			mr.LapseMoisture = l
		}
	}
	mr.ECTEI = d.boolean(m, path, "ectei", false)
	mr.ECTEIBeta, _ = d.num(m, path, "ectei_beta", mr.ECTEIBeta)
	if s, set := d.choice(m, path, "ectei_surface", mr.ECTEISurface.String(), metrics.ECTEIAir.String(), metrics.ECTEISaturated.String()); set {
		if e, err := metrics.ParseECTEISurface(s); err == nil {
			mr.ECTEISurface = e
		}
	}
	c := sub(m, "constants")
	cp := join(path, "constants")
	for _, f := range []struct {
		k string
		p *float64
	}{{"rd", &mr.Constants.Rd}, {"rv", &mr.Constants.Rv}, {"cpd", &mr.Constants.Cpd}, {"lv0", &mr.Constants.Lv0},
		{"lv_slope", &mr.Constants.LvSlope}, {"g", &mr.Constants.G}, {"p0", &mr.Constants.P0}} {
		*f.p, _ = d.num(c, cp, f.k, *f.p)
	}
	if mr.ECTEI {
		if !has(cf.RoleSpecHum) {
			d.fail(join(path, "ectei"), "ECTEI needs specific humidity at 700 hPa: give files.specific_humidity (on pressure levels) or set ectei: false")
		}
		if ds.Surface.HumidityRole == cf.RoleSpecHum {
			d.fail(join(path, "ectei"), "the specific_humidity input cannot be both the 700-hPa humidity of ECTEI and the surface humidity; use relative_humidity or dew_point_temperature for surface.humidity, or set ectei: false")
		}
	}
	if err := mr.Validate(); err != nil {
		d.fail(path, "%s", studyKeys.Replace(err.Error()))
	}
}

// studyKeys names metrics.Conventions fields by their study keys in messages.
var studyKeys = strings.NewReplacer(
	"Conventions.LapsePressure", "conventions.lapse_pressure (Conventions.LapsePressure)",
	"Conventions.SurfacePressure", "surface.pressure (Conventions.SurfacePressure)",
	"Conventions.AssumedRH", "surface.humidity (Conventions.AssumedRH)",
	"Conventions.ECTEIBeta", "conventions.ectei_beta (Conventions.ECTEIBeta)",
	"Conventions.Constants", "conventions.constants (Conventions.Constants)",
	"; start from metrics.DefaultConventions()", "",
)
