package cf

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"

	"lidscope/netcdf"
	"lidscope/units"
)

// FileReport is what inspect found in one file.
type FileReport struct {
	Path     string      `json:"path"`
	Format   string      `json:"format,omitempty"`
	Dims     []DimReport `json:"dimensions,omitempty"`
	Fields   []VarReport `json:"fields,omitempty"`
	Other    []string    `json:"other_variables,omitempty"`
	Problems []string    `json:"problems,omitempty"`
	// Usable is false when the file cannot be read, or no variable in it
	// could be used for any role.
	Usable bool `json:"usable"`
}

// DimReport is one dimension.
type DimReport struct {
	Name      string `json:"name"`
	Len       int    `json:"length"`
	Unlimited bool   `json:"unlimited,omitempty"`
}

// VarReport is one variable recognised for a role.
type VarReport struct {
	Var        string   `json:"variable"`
	Role       Role     `json:"role"`
	How        string   `json:"recognised_by"`
	Units      string   `json:"units"`
	Conversion string   `json:"conversion"`
	Grid       string   `json:"grid,omitempty"`
	Level      string   `json:"level,omitempty"`
	Time       string   `json:"time,omitempty"`
	Calendar   string   `json:"calendar,omitempty"`
	Decoding   string   `json:"decoding,omitempty"`
	Min        *float64 `json:"sample_min_si,omitempty"`
	Max        *float64 `json:"sample_max_si,omitempty"`
	SIUnits    string   `json:"si_units,omitempty"`
	Notes      []string `json:"notes,omitempty"`
	Problems   []string `json:"problems,omitempty"`
	// Spec is how Inspect opened the field (variable and level), so that
	// callers can open it again the same way.
	Spec Spec `json:"-"`
}

// levelFor is the pressure inspect uses for a role with a vertical axis.
func levelFor(r Role) float64 {
	switch r {
	case RoleAirTemp, RoleSpecHum, RoleRH:
		return 70000
	case RoleOmega:
		return 50000
	}
	return 0
}

// Inspect reports on one file: which variables fill which roles, how they
// will be decoded, and every problem found. It never panics on a damaged
// file; an unreadable file gives a report with Usable false.
func Inspect(path string) *FileReport {
	rep := &FileReport{Path: path}
	if err := checkClassicSize(path); err != nil {
		rep.Problems = append(rep.Problems, err.Error())
		return rep
	}
	nf, err := netcdf.Open(path)
	if err != nil {
		rep.Problems = append(rep.Problems, fmt.Sprintf("cannot open: %v", err))
		return rep
	}
	defer nf.Close()
	if fm, err := nf.Format(); err == nil {
		rep.Format = fm.String()
	}
	dims, err := nf.Dims()
	if err != nil {
		rep.Problems = append(rep.Problems, err.Error())
		return rep
	}
	for _, d := range dims {
		rep.Dims = append(rep.Dims, DimReport{d.Name, d.Len, d.Unlimited})
	}
	cands, amb, rej, err := roleCandidates(nf)
	if err != nil {
		rep.Problems = append(rep.Problems, err.Error())
		return rep
	}
	rep.Problems = append(rep.Problems, amb...)
	for _, x := range rej {
		if _, found := cands[x.Role]; !found {
			rep.Problems = append(rep.Problems, x.String())
		}
	}
	vars, _ := nf.Vars()
	skip := auxNames(nf, vars)
	used := map[string]bool{}
	var roles []string
	for r := range cands {
		roles = append(roles, string(r))
	}
	sort.Strings(roles)
	for _, rs := range roles {
		m := cands[Role(rs)]
		vr := inspectVar(path, m)
		used[m.Var] = true
		if len(vr.Problems) == 0 {
			rep.Usable = true
		}
		rep.Fields = append(rep.Fields, vr)
	}
	for _, v := range vars {
		if !skip[v.Name] && !used[v.Name] && len(v.Dims) > 0 {
			desc := v.Name
			if sn := textAttr(v, "standard_name"); sn != "" {
				desc += " (" + sn + ")"
			} else if ln := textAttr(v, "long_name"); ln != "" {
				desc += " (\"" + ln + "\")"
			}
			rep.Other = append(rep.Other, desc)
		}
	}
	if len(rep.Fields) == 0 {
		rep.Problems = append(rep.Problems, "no variable was recognised for any role; name variables and their roles in the study")
	}
	return rep
}

func inspectVar(path string, m RoleMatch) (vr VarReport) {
	vr = VarReport{Var: m.Var, Role: m.Role, How: m.How}
	switch {
	case m.ByLongName:
		vr.Notes = append(vr.Notes, "recognised by long name (and units) only: confirm the role by naming the variable in the study (variables."+string(m.Role)+": "+m.Var+")")
	case m.ByName:
		vr.Notes = append(vr.Notes, "recognised by name only (no standard_name): confirm the role in the study")
	}
	kind, _ := KindOf(m.Role)
	vr.SIUnits = kind.SI()
	level := 0.0
	if m.NLevels > 1 {
		level = levelFor(m.Role)
	}
	vr.Spec = Spec{Role: m.Role, Var: m.Var, Level: level}
	// Every problem of the variable in one pass: the open reads on past
	// those it can (time, units, level, packing) and lists each.
	var probs []string
	defer func() { vr.Problems = dedupe(append(probs, vr.Problems...)) }()
	fld, err := openCollecting(path, vr.Spec, &probs)
	if err != nil {
		probs = append(probs, err.Error())
		// still say what the units are, and what else is wrong with the
		// attributes, if we can
		if nf, e2 := netcdf.Open(path); e2 == nil {
			if v, e3 := nf.Var(m.Var); e3 == nil {
				vr.Units = textAttr(v, "units")
				probs = append(probs, attrProblems(path, v, m.Role, kind)...)
			}
			nf.Close()
		}
		return vr
	}
	defer fld.Close()
	vr.Units = fld.Conv.From
	vr.Conversion = fld.Conv.String()
	vr.Grid = describeLayout(fld.Layout)
	if fld.Level != nil {
		vr.Level = fld.Level.Describe()
	}
	if fld.Time != nil {
		vr.Time = fld.Time.Span()
		vr.Calendar = fld.Time.Calendar
		if fld.Time.Note != "" {
			vr.Notes = append(vr.Notes, fld.Time.Note)
		}
	}
	vr.Decoding = fld.segs[0].mask.Describe()
	if fld.segs[0].mask.standIn {
		vr.Decoding = "the packing or missing-value attributes cannot be used (see the problems); values sampled as stored"
	}
	for _, n := range fld.Notes {
		if n != "units "+fld.Conv.String() { // already on the units line
			vr.Notes = append(vr.Notes, n)
		}
	}
	// Sample the first, middle and last steps for a plausibility check.
	buf := make([]float32, fld.Len())
	lo, hi := math.Inf(1), math.Inf(-1)
	valid, total := 0, 0
	nt := fld.NT()
	for _, t := range uniq([]int{0, nt / 2, nt - 1}) {
		if err := fld.ReadSlab(t, buf, nil); err != nil {
			vr.Problems = append(vr.Problems, err.Error())
			return vr
		}
		for _, x := range buf {
			total++
			if x == x {
				valid++
				lo, hi = math.Min(lo, float64(x)), math.Max(hi, float64(x))
			}
		}
	}
	if valid > 0 {
		vr.Min, vr.Max = &lo, &hi
	}
	if !slices.Contains(fld.Notes, notUnpacked) {
		vr.Problems = append(vr.Problems, CheckValues(m.Role, fld.Conv, lo, hi, valid, total)...)
	}
	if n := fld.InfCount(); n > 0 {
		vr.Problems = append(vr.Problems, fmt.Sprintf("%d infinite values in the sampled steps (treated as missing)", n))
	}
	return vr
}

func uniq(x []int) []int {
	var out []int
	seen := map[int]bool{}
	for _, v := range x {
		if v >= 0 && !seen[v] {
			seen[v] = true
			out = append(out, v)
		}
	}
	return out
}

func describeLayout(l *Layout) string {
	lat, lon := l.Lat, l.Lon
	kind := "irregular"
	if len(lat) == 1 {
		kind = "a single latitude"
	} else if regular(lat, 1e-4) {
		kind = fmt.Sprintf("regular %g°", round6(math.Abs(lat[len(lat)-1]-lat[0])/float64(max(1, len(lat)-1))))
	} else if len(lat) > 2 {
		kind = "irregular (e.g. Gaussian) latitudes"
	}
	dlon := ""
	if regular(lon, 1e-4) && len(lon) > 1 {
		dlon = fmt.Sprintf(" × %g° longitude", round6((lon[len(lon)-1]-lon[0])/float64(len(lon)-1)))
	}
	b := boundsWords("lat", l.LatBounds, l.LatFromFile) + ", " + boundsWords("lon", l.LonBounds, l.LonFromFile)
	if l.LatFromFile && l.LonFromFile {
		b = "bounds from the file"
	} else if !l.LatFromFile && !l.LonFromFile && l.LatBounds != nil && l.LonBounds != nil {
		b = "bounds derived from midpoints"
	}
	return fmt.Sprintf("%d×%d lat×lon, %s%s; lat %g…%g, lon %g…%g; %s", len(lat), len(lon), kind, dlon, lat[0], lat[len(lat)-1], lon[0], lon[len(lon)-1], b)
}

func boundsWords(axis string, b [][2]float64, fromFile bool) string {
	switch {
	case fromFile:
		return axis + " bounds from the file"
	case b == nil:
		return "no " + axis + " bounds (a single point)"
	}
	return axis + " bounds derived from midpoints"
}

func round6(x float64) float64 { return math.Round(x*1e6) / 1e6 }

func regular(x []float64, tol float64) bool {
	if len(x) < 3 {
		return true
	}
	d := x[1] - x[0]
	for i := 2; i < len(x); i++ {
		if math.Abs((x[i]-x[i-1])-d) > tol*math.Max(1, math.Abs(d)) {
			return false
		}
	}
	return true
}

// CheckValues compares the range of SI values of a role with what is
// physically possible and reports what looks like mislabelled units. It
// never converts anything: the study must confirm or override the units.
func CheckValues(r Role, conv units.Conversion, lo, hi float64, valid, total int) []string {
	var out []string
	if total > 0 && valid == 0 {
		return []string{"every sampled value is missing (check _FillValue / missing_value and the variable)"}
	}
	if valid == 0 {
		return nil
	}
	rawLo, rawHi := (lo-conv.Offset)/conv.Scale, (hi-conv.Offset)/conv.Scale
	rng := fmt.Sprintf("stored values %.4g…%.4g %q", rawLo, rawHi, conv.From)
	switch conv.Kind {
	case units.Temperature:
		switch {
		case conv.Offset != 0 && rawLo > 150 && rawHi < 350:
			out = append(out, rng+": these look like kelvin, not Celsius; if so set units."+string(r)+": K in the study")
		case conv.Offset == 0 && rawHi < 100 && rawLo > -100:
			out = append(out, rng+": these look like degrees Celsius, not kelvin; if so set units."+string(r)+": degC in the study")
		case lo < 150 || hi > 350:
			out = append(out, rng+": outside 150…350 K, impossible for "+string(r))
		}
		// (a tolerance: slabs are float32, so 0 °C comes back as 273.15f)
		if r == RoleSST && math.Abs(rawLo) < 1e-3 && math.Abs(rawHi) < 1e-3 {
			out = append(out, rng+": SST is 0 everywhere in the sampled steps; suspicious (a land mask or fill?)")
		}
	case units.Fraction:
		switch {
		case conv.Scale == 1 && hi > 1.05 && hi <= 10 && hi == math.Trunc(hi) && lo == math.Trunc(lo) && (r == RoleLandFraction || r == RoleSeaFraction):
			out = append(out, rng+": small whole numbers, not a 0–1 fraction: probably a categorical mask; declare in the study which values are ocean")
		case conv.Scale == 1 && hi > 1.05 && hi <= 10 && hi == math.Trunc(hi) && lo == math.Trunc(lo):
			out = append(out, rng+": small whole numbers, not a 0–1 fraction (oktas 0–8? tenths 0–10? category codes?); for cloud cover in oktas set units."+string(r)+": oktas (× 0.125), in tenths units."+string(r)+": tenths (× 0.1) in the study; otherwise convert them to a fraction first")
		case conv.Scale == 0.125 && hi > 1.0001 && hi <= 1.126:
			out = append(out, rng+": okta 9 means sky obscured (WMO code table 2700, from memory), not a cover; declare it missing in the file (e.g. ncatted -a missing_value,VAR,o,f,9)")
		case conv.Scale == 1 && hi > 1.05 && hi <= 100.5:
			out = append(out, rng+": values up to 100 look like percent; if so set units."+string(r)+": % in the study")
		case hi > 1.05 || lo < -0.05:
			out = append(out, rng+": a fraction must lie in 0…1")
		case conv.Scale == 0.01 && rawHi <= 1.0 && rawHi > 0:
			out = append(out, rng+": labelled percent but no value exceeds 1; if these are 0–1 fractions set units."+string(r)+": 1 in the study")
		}
	case units.Pressure:
		if hi < 2000 && hi > 0 {
			out = append(out, rng+": far too small for Pa; if these are hPa set units."+string(r)+": hPa in the study")
		} else if hi > 120000 {
			out = append(out, rng+": above 1200 hPa; check the units")
		}
	case units.Flux:
		if hi > 1500 || lo < -1 {
			out = append(out, rng+": outside 0…1500 W m-2; check the units")
		}
	case units.Omega:
		if math.Max(math.Abs(lo), math.Abs(hi)) > 20 {
			out = append(out, rng+": |omega| above 20 Pa s-1; check the units (hPa day-1?)")
		}
	}
	if len(out) > 0 {
		out[0] = strings.TrimSpace(out[0])
	}
	return out
}
