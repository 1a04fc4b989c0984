package cf

import (
	"encoding/json"
	"fmt"
	"math"
	"sort"
	"strings"

	"lidscope/internal/jsonnum"
	"lidscope/netcdf"
	"lidscope/vocab"
)

// FileReport is what inspect found in one file.
type FileReport struct {
	Path     string      `json:"path"`
	Format   string      `json:"format,omitempty"`
	Dims     []DimReport `json:"dimensions,omitempty"`
	Fields   []VarReport `json:"fields,omitempty"`
	Other    []string    `json:"other_variables,omitempty"`
	Problems []string    `json:"problems,omitempty"`
	// SourceID is the file's source_id global attribute (CMIP and
	// obs4MIPs name the model or data set with it), "" when absent.
	SourceID string `json:"source_id,omitempty"`
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
	Var        string `json:"variable"`
	Role       Role   `json:"role"`
	How        string `json:"recognised_by"`
	Units      string `json:"units"`
	Conversion string `json:"conversion"`
	Grid       string `json:"grid,omitempty"`
	Level      string `json:"level,omitempty"`
	Time       string `json:"time,omitempty"`
	Calendar   string `json:"calendar,omitempty"`
	Decoding   string `json:"decoding,omitempty"`
	// Min and Max are the smallest and largest values of the sample
	// inspect read, after conversion to SIUnits. In JSON they are
	// "sample_min" and "sample_max", {"value": x, "units": SIUnits}: units
	// live in the units field, never in a name.
	Min      *float64 `json:"-"`
	Max      *float64 `json:"-"`
	SIUnits  string   `json:"-"`
	Notes    []string `json:"notes,omitempty"`
	Problems []string `json:"problems,omitempty"`
	// Spec is how Inspect opened the field (variable and level), so that
	// callers can open it again the same way.
	Spec Spec `json:"-"`
}

// varReportJSON is VarReport as JSON: the sample range as numbers with
// their units.
type varReportJSON struct {
	plainVarReport
	Min *jsonnum.Num `json:"sample_min,omitempty"`
	Max *jsonnum.Num `json:"sample_max,omitempty"`
}

type plainVarReport VarReport

// MarshalJSON writes the sample range as "sample_min" and "sample_max",
// each {"value": x, "units": "K"}.
func (v VarReport) MarshalJSON() ([]byte, error) {
	j := varReportJSON{plainVarReport: plainVarReport(v)}
	if v.Min != nil && v.Max != nil {
		j.Min = &jsonnum.Num{Value: *v.Min, Units: v.SIUnits}
		j.Max = &jsonnum.Num{Value: *v.Max, Units: v.SIUnits}
	}
	return json.Marshal(j)
}

// UnmarshalJSON reads what MarshalJSON writes.
func (v *VarReport) UnmarshalJSON(b []byte) error {
	var j varReportJSON
	if err := json.Unmarshal(b, &j); err != nil {
		return err
	}
	*v = VarReport(j.plainVarReport)
	if j.Min != nil && j.Max != nil {
		lo, hi := j.Min.Value, j.Max.Value
		v.Min, v.Max, v.SIUnits = &lo, &hi, j.Min.Units
	}
	return nil
}

// levelFor is the pressure inspect uses for a role with a vertical axis:
// the role's level of the one role table ([vocab.RoleVertical]; 700 hPa
// for air temperature and the humidities, 500 hPa for omega).
func levelFor(r Role) float64 {
	_, pa := vocab.RoleVertical(string(r))
	return pa
}

// Inspect reports on one file: which variables fill which roles, how they
// will be decoded, and every problem found. It never panics on a damaged
// file; an unreadable file gives a report with Usable false.
func Inspect(path string) *FileReport { return InspectWith(path, InspectOptions{}) }

// InspectOptions are the settings of InspectWith.
type InspectOptions struct {
	// MemoryBudget bounds the bytes reading one time step of a field may
	// take (0: DefaultMemoryBudget); larger fields are reported, not read.
	MemoryBudget int64
}

// InspectWith is Inspect with options.
func InspectWith(path string, o InspectOptions) *FileReport {
	rep := &FileReport{Path: path}
	if err := CheckRegular(path); err != nil {
		rep.Problems = append(rep.Problems, err.Error())
		return rep
	}
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
	if a, err := nf.Attr("source_id"); err == nil {
		if t, ok := a.Text(); ok {
			rep.SourceID = strings.TrimSpace(t)
		}
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
		vr := inspectVar(path, m, o)
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

func inspectVar(path string, m RoleMatch, o InspectOptions) (vr VarReport) {
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
	vr.Spec = Spec{Role: m.Role, Var: m.Var, Level: level, MemoryBudget: o.MemoryBudget}
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
	a, err := Assess(fld)
	if err != nil {
		vr.Problems = append(vr.Problems, err.Error())
		return vr
	}
	if a.Valid > 0 {
		vr.Min, vr.Max = &a.Min, &a.Max
	}
	for _, p := range a.Problems {
		vr.Problems = append(vr.Problems, p.Text)
	}
	vr.Notes = append(vr.Notes, a.Notes...)
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
		kind = fmt.Sprintf("regular %g° latitude", round6(math.Abs(lat[len(lat)-1]-lat[0])/float64(max(1, len(lat)-1))))
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
