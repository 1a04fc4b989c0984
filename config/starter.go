package config

import (
	"fmt"
	"math"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"

	"lidscope/cf"
	"lidscope/relations"
)

// Starter returns a commented starter study (YAML) for the files that
// cf.Inspect reported on: each recognised role with its files and
// variable, units overrides where inspect found values that contradict
// their units (commented out, to be confirmed), a 12-month climatology
// declaration where a 12-step time axis has non-CF units (for the dataset
// when every time axis is a climatology, else for that role), a categorical
// ocean mask where inspect saw one, the surface and sea-ice settings the
// inputs allow, and every analysis default written out. Lines that need a
// decision are marked CHECK; a missing SST (the one required role) is
// marked MISSING, and each missing optional input (air_temperature for
// LTS/EIS, low_cloud or cloud for the cloud statistics) is marked WITHOUT
// with what the run will lack. When the files give SST the text loads as
// it is.
//
// paths[i] is how the study should name the file of reports[i] (e.g.
// relative to the folder the study will be saved in); when paths is
// shorter, reports[i].Path is used.
func Starter(reports []*cf.FileReport, paths []string) string {
	s := newStarter(reports, paths)
	return s.text()
}

type starterField struct {
	file  string
	vr    cf.VarReport
	steps int // length of the file's time dimension, 0 if unknown
}

type starter struct {
	// byRole holds, per role, the files read as one record: the first file
	// found and those with the same variable name and grid.
	byRole map[cf.Role][]starterField
	// others holds the further files of a role that cannot join that
	// record (another variable name or grid): offered in comments.
	others   map[cf.Role][]starterField
	unusable []string // files with no usable field, with the reason
	ambig    []string
	first    string
	// used are the files that gave a field (as inspect opened them) and
	// sourceIDs their source_id attributes, for the dataset name.
	used      []string
	sourceIDs []string
}

var (
	// inspect's advice, "set units: K in the study" or "set units.sst: K in the study"
	unitsHint   = regexp.MustCompile(`set units(?:\.[a-z_]+)?: (\S+) in the study`)
	ambigReport = regexp.MustCompile(`^role (\S+) is ambiguous: variables (.+) all qualify`)
)

func newStarter(reports []*cf.FileReport, paths []string) *starter {
	s := &starter{byRole: map[cf.Role][]starterField{}, others: map[cf.Role][]starterField{}}
	for i, rep := range reports {
		if rep == nil {
			continue
		}
		p := rep.Path
		if i < len(paths) && paths[i] != "" {
			p = paths[i]
		}
		steps := timeSteps(rep)
		if len(rep.Fields) > 0 {
			s.used = append(s.used, rep.Path)
			s.sourceIDs = append(s.sourceIDs, rep.SourceID)
		}
		for _, vr := range rep.Fields {
			f := starterField{file: p, vr: vr, steps: steps}
			if prev := s.byRole[vr.Role]; len(prev) > 0 && (prev[0].vr.Var != vr.Var || gridKey(prev[0].vr.Grid) != gridKey(vr.Grid)) {
				s.others[vr.Role] = append(s.others[vr.Role], f)
				continue
			}
			s.byRole[vr.Role] = append(s.byRole[vr.Role], f)
			if s.first == "" {
				s.first = p
			}
		}
		for _, prob := range rep.Problems {
			if m := ambigReport.FindStringSubmatch(prob); m != nil {
				s.ambig = append(s.ambig, fmt.Sprintf("%s: %s in %s", m[1], m[2], p))
			}
		}
		if len(rep.Fields) == 0 {
			why := "no variable recognised"
			if len(rep.Problems) > 0 {
				why = rep.Problems[0]
			}
			s.unusable = append(s.unusable, fmt.Sprintf("%s (%s)", p, oneLine(why)))
		}
	}
	return s
}

// lacks says, for each optional input no file gave, what the run will
// not have; the study runs without it.
func (s *starter) lacks() []string {
	var out []string
	if !s.has(cf.RoleAirTemp) {
		out = append(out, fmt.Sprintf("%s: no file gave 700 hPa temperature, so the run will have no LTS, EIS (and no relationship analysis); to add them:  %s: \"FILE_OR_GLOB\"", cf.RoleAirTemp, cf.RoleAirTemp))
	}
	if !s.has(cf.RoleLowCloud) && !s.has(cf.RoleCloud) {
		out = append(out, fmt.Sprintf("cloud: no file gave low_cloud or cloud, so the run will have no cloud statistics and no relationship analysis; to add them:  %s: \"FILE_OR_GLOB\"", cf.RoleLowCloud))
	}
	return out
}

// timeSteps guesses the length of a report's time dimension: a dimension
// named like time, else the unlimited one.
func timeSteps(rep *cf.FileReport) int {
	for _, d := range rep.Dims {
		switch strings.ToLower(d.Name) {
		case "time", "t", "month", "months", "date":
			return d.Len
		}
	}
	for _, d := range rep.Dims {
		if d.Unlimited {
			return d.Len
		}
	}
	return 0
}

func oneLine(s string) string {
	s = strings.Join(strings.Fields(s), " ")
	if len(s) > 200 {
		s = s[:197] + "..."
	}
	return s
}

// timeProblem reports whether a field could not be read because of its
// time coordinate's units or calendar.
func timeProblem(vr cf.VarReport) (string, bool) {
	for _, p := range vr.Problems {
		if strings.Contains(p, "time coordinate") && (strings.Contains(p, "units") || strings.Contains(p, "calendar")) {
			return p, true
		}
	}
	return "", false
}

// byName reports whether inspect recognised the field by its name only
// (cf writes "variable name … and its units" then).
func byName(vr cf.VarReport) bool { return strings.HasPrefix(vr.How, "variable name") }

// byLongName: recognised by its long_name or sky-cover units only (a run
// reads it only when the study names the variable, as the starter does).
func byLongName(vr cf.VarReport) bool {
	return strings.HasPrefix(vr.How, "long name") || strings.HasPrefix(vr.How, "units ")
}

func (s *starter) has(r cf.Role) bool { return len(s.byRole[r]) > 0 }

// quote writes a YAML double-quoted string (Go's escapes are valid YAML).
func quote(v string) string { return strconv.Quote(v) }

// literal escapes glob metacharacters so that a file name is matched as is.
func literal(p string) string {
	if filepath.Separator == '\\' {
		return p // Windows: backslashes are separators; names with * ? [ are rare there
	}
	var b strings.Builder
	for _, r := range p {
		if strings.ContainsRune(`*?[\`, r) {
			b.WriteByte('\\')
		}
		b.WriteRune(r)
	}
	return b.String()
}

// StarterName is the dataset name Starter proposes for the files of
// reports, and where it comes from (for the comment beside it and the
// command's message).
func StarterName(reports []*cf.FileReport) (name, from string) {
	return newStarter(reports, nil).name()
}

// name is the dataset name the starter proposes, and where it comes from:
// the source_id global attribute all the files share (CMIP, obs4MIPs);
// else the folder that holds all the files, above folders named after a
// role (obs for obs/sst/*.nc and obs/low_cloud/*.nc); else the first
// file's stem. It has the form of dataset names (lower case; other
// characters become -). A file name stands for one file of a record
// (sst_200101-200512), never for the dataset.
func (s *starter) name() (name, from string) {
	if id := commonText(s.sourceIDs); id != "" {
		if n := datasetName(id); n != "dataset" {
			return n, "the files' source_id attribute"
		}
	}
	if dir := commonFolder(s.used); dir != "" {
		if n := datasetName(filepath.Base(dir)); n != "dataset" {
			return n, "the files' folder " + filepath.Base(dir)
		}
	}
	stem := strings.TrimSuffix(filepath.Base(s.first), filepath.Ext(s.first))
	return datasetName(stem), "the first file's name"
}

// commonText is the one non-empty text all of xs have, else "".
func commonText(xs []string) string {
	if len(xs) == 0 || xs[0] == "" {
		return ""
	}
	for _, x := range xs[1:] {
		if x != xs[0] {
			return ""
		}
	}
	return xs[0]
}

// commonFolder is the deepest folder that holds every file of paths, above
// any folder named after a role (sst/, low_cloud/, …); "" when there is
// none but the root.
func commonFolder(paths []string) string {
	var common string
	for i, p := range paths {
		a, err := filepath.Abs(p)
		if err != nil {
			return ""
		}
		d := filepath.Dir(a)
		if i == 0 {
			common = d
			continue
		}
		for common != filepath.Dir(common) && !within(d, common) {
			common = filepath.Dir(common)
		}
	}
	roles := map[string]bool{}
	for _, r := range cf.Roles() {
		roles[string(r)] = true
	}
	for common != "" && common != filepath.Dir(common) && roles[strings.ToLower(filepath.Base(common))] {
		common = filepath.Dir(common)
	}
	if common == "" || common == filepath.Dir(common) {
		return ""
	}
	return common
}

// within reports whether folder d is dir or below it.
func within(d, dir string) bool {
	r, err := filepath.Rel(dir, d)
	return err == nil && r != ".." && !strings.HasPrefix(r, ".."+string(filepath.Separator))
}

// datasetName puts a text in the form of dataset names.
func datasetName(stem string) string {
	var b strings.Builder
	for _, r := range strings.ToLower(stem) {
		if r < 128 && (r == '_' || r == '-' || r >= '0' && r <= '9' || r >= 'a' && r <= 'z') {
			b.WriteRune(r)
		} else {
			b.WriteByte('-')
		}
	}
	n := strings.Trim(b.String(), "-_")
	switch {
	case n == "":
		return "dataset"
	case yamlWords[n] || strings.Trim(n, "0123456789_") == "":
		return "dataset-" + n // a YAML word or a number would not be read as a name
	}
	return n
}

// yamlWords are plain YAML words that are not read as text.
var yamlWords = map[string]bool{"true": true, "false": true, "yes": true, "no": true, "on": true, "off": true, "null": true, "y": true, "n": true}

func (s *starter) text() string {
	var b strings.Builder
	w := func(format string, a ...any) { fmt.Fprintf(&b, format+"\n", a...) }
	nfiles := 0
	for _, fs := range s.byRole {
		nfiles += len(fs)
	}
	w("# lidscope study: a starter written by `lidscope study init` from what")
	w("# `lidscope inspect` found. Review every line marked CHECK or MISSING.")
	w("# Every key is described in the lidscope config package documentation;")
	w("# relative paths are relative to this file's folder.")
	w("")
	for _, u := range s.unusable {
		w("# not used: %s", u)
	}
	for _, a := range s.ambig {
		w("# CHECK ambiguous role %s; name the variable under variables:", a)
	}
	if len(s.unusable)+len(s.ambig) > 0 {
		w("")
	}
	name, from := s.name()
	w("datasets:  # one entry per dataset, keyed by its name")
	w("  %s:  # named after %s; rename it as you like: lower-case letters, digits, _ and - (the folder of its results)", name, from)
	w("    about: \"\"")
	w("    files:")
	roles := s.roles()
	for _, r := range roles {
		fs := s.byRole[r]
		if len(fs) == 1 {
			w("      %s: %s", r, quote(literal(fs[0].file)))
			continue
		}
		var q []string
		for _, f := range fs {
			q = append(q, quote(literal(f.file)))
		}
		w("      %s: [%s]", r, strings.Join(q, ", "))
	}
	for _, r := range cf.Roles() {
		for _, f := range s.others[r] {
			w("      # CHECK: %s also gives %s (variable %s), but not as one record with the file(s) above", f.file, r, f.vr.Var)
			w("      # (another variable name or grid); to use it instead:  %s: %s", r, quote(literal(f.file)))
		}
	}
	if !s.has(cf.RoleSST) {
		w("      # MISSING: no file gave %s (required: SST is the minimum); add  %s: \"FILE_OR_GLOB\"", cf.RoleSST, cf.RoleSST)
	}
	for _, l := range s.lacks() {
		w("      # WITHOUT %s", l)
	}

	// variables
	if len(roles) > 0 {
		w("    variables:  # as found by inspect; naming them makes the study independent of detection")
		for _, r := range roles {
			fs := s.byRole[r]
			note := ""
			if byName(fs[0].vr) {
				note = fmt.Sprintf("  # CHECK: recognised by its name only (no standard_name); is it %s?", r)
			}
			if byLongName(fs[0].vr) {
				note = fmt.Sprintf("  # CHECK: by long name: confirm (recognised by its %s only; no standard_name); is it %s?", fs[0].vr.How, r)
			}
			w("      %s: %s%s", r, quote(fs[0].vr.Var), note)
		}
	}

	// units suggestions (commented: inspect only suspects)
	var unitLines []string
	for _, r := range roles {
		for _, f := range s.byRole[r] {
			for _, p := range f.vr.Problems {
				if m := unitsHint.FindStringSubmatch(p); m != nil {
					unitLines = append(unitLines, fmt.Sprintf("    #   %s: %s  # %s: %s", r, quote(m[1]), f.file, oneLine(p)))
				}
			}
		}
	}
	if len(unitLines) > 0 {
		w("    # CHECK: inspect found values that contradict their units attribute;")
		w("    # if the units below are right, uncomment them (lidscope never converts on a guess)")
		w("    # units:")
		for _, l := range dedupe(unitLines) {
			w("%s", l)
		}
	}

	s.timeSection(w)
	s.oceanSection(w)
	if s.has(cf.RoleSeaIce) {
		w("    sea_ice:")
		w("      max_fraction: 0.15  # columns with more sea ice are excluded (common practice)")
	}
	s.surfaceSection(w)

	w("")
	w("analysis:")
	w("  band: {south: %v, north: %v}  # latitude band of the tropical-mean SST", DefaultBandSouth, DefaultBandNorth)
	w("  threshold: %v  # delta, K: convective where SST - tropical-mean SST > delta (a choice; recorded)", DefaultThreshold)
	w("  transition: 0  # half-width, K, of a transition band around delta (0 = none)")
	w("  cloud: auto  # auto (low_cloud where given, else cloud) | low_cloud | cloud")
	w("  # regions:")
	w("  #   - {name: box_a, south: -10, north: 10, west: 90, east: 160}")
	w("  grid:")
	if g := s.gridTarget(); g != "" {
		w("    target: %s  # CHECK: the inputs are on different grids; remapped onto the %s grid", g, g)
	} else {
		w("    target: \"\"  # every input shares one grid; or a role, or a resolution such as 2.5deg")
	}
	w("    min_coverage: %v", DefaultMinCoverage)
	w("    mask_threshold: %v", DefaultMaskThreshold)
	w("")
	w("output:")
	w("  dir: %s  # results go to <dir>/<dataset name>", quote(DefaultOutputDir))
	w("  plots: true")
	s.relationshipsSection(w)
	return b.String()
}

// relationshipsSection writes the relationships section commented out,
// every value its default: uncommented once, it decides what no section
// decides (a test checks that).
func (s *starter) relationshipsSection(w func(string, ...any)) {
	def := relations.Defaults()
	num := func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
	nums := func(xs []float64) string {
		out := make([]string, len(xs))
		for i, x := range xs {
			out[i] = num(x)
		}
		return "[" + strings.Join(out, ", ") + "]"
	}
	w("")
	w("# The relationship analysis (cloud against EIS, LTS and relative SST per regime,")
	w("# regressions, regime flips, convective threshold) runs with these defaults;")
	w("# uncomment the section to change them.")
	if len(s.lacks()) > 0 {
		w("# These files give no 700 hPa temperature or no cloud, so the relationship analysis")
		w("# will not run until both are added (see WITHOUT above).")
	}
	w("# relationships:")
	w("#   mode: %s  # climatological (composites) | anomaly (deseasonalised monthly anomalies)", def.Mode)
	w("#   detrend: false  # anomaly mode only: also remove a linear trend")
	w("#   bins:  # predictor -> {min, max, width} or a list of edges, K; replaces the defaults")
	bins := relations.DefaultBins(def.Mode)
	for _, p := range []string{"eis", "lts", relations.RelSST} {
		e := bins[p]
		w("#     %s: {min: %s, max: %s, width: %s}", p, num(e[0]), num(e[len(e)-1]), num(e[1]-e[0]))
	}
	resp := []string{AnalysisCloud}
	if s.has(cf.RoleSWUp) {
		resp = append(resp, string(cf.RoleSWUp))
	}
	w("#   responses: [%s]  # analysis_cloud (the cloud of analysis.cloud) or roles: low_cloud, cloud, toa_sw_up, olr, precipitation, omega", strings.Join(resp, ", "))
	w("#   seasons: false  # true: also DJF, MAM, JJA and SON")
	w("#   # patches:  # boxes whose SST is perturbed by delta_t (none by default), e.g.")
	w("#   #   - {name: east_pacific, south: -10, north: 10, west: -130, east: -80}")
	w("#   delta_t: %s  # K", nums(def.DeltaT))
	w("#   bootstrap: {replicates: %d, block_length: %d, seed: %d}  # replicates 0 = no bootstrap intervals",
		def.Bootstrap.N, def.Bootstrap.BlockLength, def.Bootstrap.Seed)
	w("#   threshold:  # estimation of the convective threshold in relative SST")
	ind := ""
	for _, i := range []string{relations.IndicatorOmega, relations.IndicatorPrecip, relations.IndicatorOLR} {
		if s.has(indicatorRoles[i]) {
			ind = i
			break
		}
	}
	if ind == "" {
		w("#     indicator: \"\"  # off; omega, precipitation or olr need that input")
	} else {
		w("#     indicator: \"\"  # off; CHECK: %s is given, so indicator: %s would estimate it", indicatorRoles[ind], ind)
	}
	w("#   omega_regimes: false  # true: omega500 composites (needs an omega input)")
	w("#   decorrelation_length: %skm  # 0 = every cell independent", num(def.DecorrelationLength/1000))
	w("#   partial: [%s, %s]  # the two predictors of the two-predictor regression", def.Partial[0], def.Partial[1])
}

func dedupe(lines []string) []string {
	var out []string
	seen := map[string]bool{}
	for _, l := range lines {
		if !seen[l] {
			seen[l] = true
			out = append(out, l)
		}
	}
	return out
}

// roles lists the roles found, in cf's order.
func (s *starter) roles() []cf.Role {
	var out []cf.Role
	for _, r := range cf.Roles() {
		if s.has(r) {
			out = append(out, r)
		}
	}
	return out
}

func (s *starter) timeSection(w func(string, ...any)) {
	// Which fields have a time axis that could not be decoded, and is the
	// whole set consistent with a 12-month climatology?
	var bad []starterField
	climOK := true
	anyTime := false
	for _, r := range s.roles() {
		if r == cf.RoleLandFraction || r == cf.RoleSeaFraction {
			continue // masks are read as fixed fields
		}
		for _, f := range s.byRole[r] {
			if _, ok := timeProblem(f.vr); ok {
				bad = append(bad, f)
				anyTime = true
				if f.steps != 12 {
					climOK = false
				}
				continue
			}
			switch {
			case f.vr.Time != "":
				anyTime = true
				if !strings.Contains(f.vr.Time, "12-month climatology") {
					climOK = false
				}
			case len(f.vr.Problems) == 0:
				climOK = false // read fine without a time axis: a declared climatology would not fit it
			}
		}
	}
	w("    time:")
	switch {
	case len(bad) > 0 && climOK:
		w("      # CHECK: inspect could not decode the time axis of %s;", describeFiles(bad))
		w("      # its 12 steps are declared a 12-month climatology, January first")
		w("      climatology: true")
	case len(bad) > 0:
		// A 12-step axis that cannot be dated, beside dated records, is
		// declared a climatology for its role alone: the run aligns it with
		// the dated record by calendar month. Other axes get a hint.
		declared := map[cf.Role]bool{}
		var rest []starterField
		for _, f := range bad {
			if f.steps != 12 {
				rest = append(rest, f)
				continue
			}
			if !declared[f.vr.Role] {
				declared[f.vr.Role] = true
				w("      # CHECK: inspect could not decode the time axis of %s; its 12 steps are", f.file)
				w("      # declared a 12-month climatology, January first, aligned with the dated records by calendar month")
				w("      %s: {climatology: true}", f.vr.Role)
			}
		}
		if len(rest) > 0 {
			w("      # CHECK: inspect could not decode the time axis of %s:", describeFiles(rest))
			for _, f := range rest {
				p, _ := timeProblem(f.vr)
				w("      #   %s", oneLine(p))
			}
			w("      # declare how to read it: for that role only, e.g.")
			r := rest[0].vr.Role
			w("      # %s: {units: \"days since 1979-01-01\", calendar: standard}", r)
			w("      # or, for 12 monthly means without years:  %s: {climatology: true}", r)
			w("      # (units, calendar and climatology written here directly apply to every role)")
		}
		w("      climatology: false")
	default:
		w("      climatology: false")
	}
	if !(len(bad) > 0 && climOK) && anyTime {
		w("      # start: \"1979-01\"  # first year-month used (inclusive)")
		w("      # end: \"2018-12\"    # last year-month used (inclusive)")
	}
	w("      # months: [12, 1, 2]  # or season: DJF | MAM | JJA | SON")
}

func describeFiles(fs []starterField) string {
	var names []string
	for _, f := range fs {
		names = append(names, f.file)
	}
	return strings.Join(dedupe(names), ", ")
}

func (s *starter) oceanSection(w func(string, ...any)) {
	w("    ocean:")
	role := cf.Role("")
	for _, r := range []cf.Role{cf.RoleLandFraction, cf.RoleSeaFraction} {
		if s.has(r) {
			role = r
			break
		}
	}
	if role == "" {
		w("      mask: sst  # ocean where the SST is present; give a land_fraction input for a fraction mask")
		return
	}
	f := s.byRole[role][0]
	// Whole-number values above 1 are category codes, not fractions (the
	// rule inspect applies too; checked here on the sampled range).
	categorical := f.vr.Min != nil && f.vr.Max != nil && *f.vr.Max > 1.05 &&
		*f.vr.Min == math.Trunc(*f.vr.Min) && *f.vr.Max == math.Trunc(*f.vr.Max)
	for _, p := range f.vr.Problems {
		if strings.Contains(p, "categorical") {
			categorical = true
		}
	}
	if categorical {
		rng := ""
		if f.vr.Min != nil && f.vr.Max != nil {
			rng = fmt.Sprintf(" (inspect saw %g…%g)", *f.vr.Min, *f.vr.Max)
		}
		w("      mask: categorical  # inspect found whole-number categories in %s, not fractions", f.vr.Var)
		w("      from: %s", role)
		w("      values: [0]  # CHECK which values of %s mean ocean%s", f.vr.Var, rng)
		return
	}
	w("      mask: fraction")
	w("      from: %s", role)
	w("      min_fraction: %v  # ocean where at least this fraction of the cell is ocean", DefaultMinOcean)
}

func (s *starter) surfaceSection(w func(string, ...any)) {
	w("    surface:")
	if s.has(cf.RoleSurfacePres) {
		w("      pressure: field  # from the surface_pressure input")
	} else {
		w("      pressure: 1000hPa  # or field, with a surface_pressure input")
	}
	ectei := false
	for _, f := range s.byRole[cf.RoleSpecHum] {
		if f.vr.Level != "" {
			ectei = true // on pressure levels: q700 for ECTEI
		}
	}
	var hum []cf.Role
	for _, r := range humidityRoles {
		if s.has(r) && !(r == cf.RoleSpecHum && ectei) {
			hum = append(hum, r)
		}
	}
	switch len(hum) {
	case 0:
		w("      humidity: 0.8  # assumed relative humidity (an assumption, recorded); or a humidity input")
	default:
		note := ""
		if len(hum) > 1 {
			note = fmt.Sprintf("  # CHECK: several humidity inputs (%v); this one is used", hum)
		}
		w("      humidity: %s%s", hum[0], note)
	}
	if s.has(cf.RoleSurfaceAir) {
		w("      temperature: sst  # or air: the surface_air_temperature input")
	} else {
		w("      temperature: sst")
	}
	w("    conventions:  # how LTS and EIS are computed")
	w("      svp: murphy-koop  # murphy-koop | bolton")
	w("      lcl: romps  # romps | bolton | linear")
	w("      t850: mean  # mean ((Ts + T700)/2) | field (air_temperature at 850 hPa)")
	if ectei {
		w("      ectei: true  # specific_humidity on pressure levels is given (q700)")
	} else {
		w("      ectei: false  # true needs specific_humidity on pressure levels")
	}
}

// gridTarget returns "sst" when the recognised fields are on different
// grids (as inspect describes them), else "".
func (s *starter) gridTarget() string {
	grids := map[string]bool{}
	for _, r := range s.roles() {
		for _, f := range s.byRole[r] {
			if g := gridKey(f.vr.Grid); g != "" {
				grids[g] = true
			}
		}
	}
	if len(grids) > 1 && s.has(cf.RoleSST) {
		return string(cf.RoleSST)
	}
	return ""
}

// gridKey keeps the part of inspect's grid description that identifies the
// grid (sizes and coordinate ranges), not how the bounds were found.
func gridKey(g string) string {
	if i := strings.LastIndex(g, ";"); i >= 0 {
		return strings.TrimSpace(g[:i])
	}
	return g
}
