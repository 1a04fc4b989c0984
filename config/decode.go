package config

import (
	"fmt"
	"math"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"

	"lidscope/cf"
	"lidscope/regimes"
	"lidscope/regrid"
	"lidscope/relations"
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

// studyKeys names metrics.Conventions fields by their study keys in messages.
var studyKeys = strings.NewReplacer(
	"Conventions.LapsePressure", "conventions.lapse_pressure (Conventions.LapsePressure)",
	"Conventions.SurfacePressure", "surface.pressure (Conventions.SurfacePressure)",
	"Conventions.AssumedRH", "surface.humidity (Conventions.AssumedRH)",
	"Conventions.ECTEIBeta", "conventions.ectei_beta (Conventions.ECTEIBeta)",
	"Conventions.Constants", "conventions.constants (Conventions.Constants)",
	"; start from metrics.DefaultConventions()", "",
)
