package config

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"math"
	"sort"
	"strings"

	"lidscope/calendar"
	"lidscope/cf"
	"lidscope/metrics"
	"lidscope/regimes"
	"lidscope/regrid"
	"lidscope/relations"
	"lidscope/vocab"
)

// Study is a loaded study: typed, validated, with every default applied
// and every input glob expanded. Build it with [Load].
type Study struct {
	// Path is the study file as given to Load (ParseName for Parse); Dir
	// is its folder (the dir given to Parse), against which relative file
	// patterns and the output folder are resolved.
	Path, Dir string
	// Format is "yaml", "toml" or "json" (from the file name extension,
	// or as given to Parse).
	Format string
	// Source is the text of the file, unchanged.
	Source string
	// Datasets are the datasets of the study, in file order (at least one).
	Datasets []Dataset
	// Ensemble lists the datasets the study's ensemble block named, in
	// name order, with the folder each was matched from (none without
	// one).
	Ensemble []EnsembleMember
	// Analysis holds the regime and grid settings shared by all datasets.
	Analysis Analysis
	// Output says where results go.
	Output Output
	// Limits bound the resources a run may use.
	Limits Limits
	// Relations is the relationship analysis (the relationships section),
	// shared by all datasets: relations.Defaults() with the study's
	// settings, the regime definition of Analysis as Classifier and
	// Analysis.Regions as Regions. Its Responses are the responses as
	// written (nil when the study lists none; they may contain
	// AnalysisCloud): give relations.New the configuration of
	// [Study.RelationsFor], whose responses are resolved per dataset.
	Relations relations.Config
	// RelationsOff is true when the study turns the relationship analysis
	// off (relationships.enabled: false): runs then give the regime
	// statistics only, and skip the relationship pass.
	RelationsOff bool
	// Factors is the factors section (Factors.On false without one).
	Factors Factors
	// Overrides lists the values set by flags and environment variables,
	// in the order applied (environment first, then flags).
	Overrides []Override

	// shown maps each input file to how Resolved writes it: relative to
	// Dir when its pattern was relative, else absolute.
	shown map[string]string
}

// Override is one value set from outside the study file.
type Override struct {
	// Key is the dotted key path, e.g. "analysis.threshold".
	Key string
	// Value is the value as given.
	Value string
	// Origin is "flag KEY" or "environment NAME".
	Origin string
}

// Dataset is one dataset (observations, a reanalysis or one model run).
type Dataset struct {
	// Name is unique within the study and made of [A-Za-z0-9_.-]; it is
	// used in output paths.
	Name        string
	Description string
	// Accept names the usability checks of lidscope inspect (cf.CheckNames)
	// whose verdict the study overrides for this dataset: the run goes on
	// and records the accepted check in its notes.
	Accept []string
	// Inputs are the files of each role the analysis reads, each list
	// sorted, with globs expanded and relative patterns resolved against
	// the study's folder. Roles the settings need but the study lists
	// only under files.any get the files of All.
	Inputs map[cf.Role][]string
	// All are the files of files.any (files that may hold any role),
	// expanded like Inputs. Empty when files.any is not used.
	All []string
	// Patterns are the input patterns as written (key "all" included).
	Patterns map[string][]string
	// Variables names the variable to read per role (else cf finds it).
	Variables map[cf.Role]string
	// Units overrides the units attribute per role.
	Units map[cf.Role]string
	// Coordinates names coordinate variables (and level units) per role.
	Coordinates map[cf.Role]Coordinates
	// Time holds the time overrides and the time selection.
	Time TimeSelection
	// Ocean says how ocean columns are told from land.
	Ocean OceanMask
	// SeaIce says whether and how ice-covered columns are excluded.
	SeaIce SeaIce
	// Surface says which inputs give the surface state, and which roles.
	Surface Surface
	// Cloud is the role that gives the cloud of the analysis:
	// cf.RoleLowCloud or cf.RoleCloud.
	Cloud cf.Role
	// Metrics is the complete metrics conventions, surface settings included
	// (Surface, PressureField, SurfacePressure, Humidity, AssumedRH). It
	// has passed metrics.Conventions.Validate.
	Metrics metrics.Conventions
	// OutputDir is where this dataset's results go: Output.Dir/Name.
	OutputDir string
	// RelationResponses are the responses of the relationship analysis
	// for this dataset, as quantity (role) names: relationships.responses
	// with analysis_cloud replaced by Cloud, or by default Cloud plus
	// toa_sw_up when the dataset names a toa_sw_up input.
	RelationResponses []string
}

// Coordinates are coordinate overrides for one role. Empty fields mean:
// found by cf from the file's metadata.
type Coordinates struct {
	Lat, Lon, Level, Time string // coordinate variable names
	// LevelUnits overrides the units of the vertical coordinate.
	LevelUnits string
}

// TimeSelection holds the time declarations of a dataset and the months
// and years the analysis uses.
type TimeSelection struct {
	// Units and Calendar override the time coordinate's attributes
	// (for files with non-CF time units); empty: from the file.
	Units, Calendar string
	// Climatology declares the time axes as 12 calendar months, January first.
	Climatology bool
	// ByRole holds the declarations of roles that have their own
	// (time.ROLE in the study), each complete: a key the role does not
	// set is the dataset's. [TimeSelection.For] gives any role's.
	ByRole map[cf.Role]TimeDecl
	// Start and End are the first and last year-month used (inclusive);
	// nil means unbounded. Always nil when every time axis is declared a
	// climatology.
	Start, End *calendar.YearMonth
	// Months are the calendar months used (1–12, in the order written);
	// empty means every month. Season is the season name when the months
	// were given as one (DJF, MAM, JJA, SON), else "".
	Months []int
	Season string
}

// TimeDecl says how to read a time axis whose file does not say it in a
// CF way: the time units and calendar that replace the coordinate's
// attributes (empty: the file's), or that it is a 12-month climatology,
// January first.
type TimeDecl struct {
	Units, Calendar string
	Climatology     bool
}

// TimeDecl returns the dataset's own time declaration.
func (t TimeSelection) TimeDecl() TimeDecl {
	return TimeDecl{Units: t.Units, Calendar: t.Calendar, Climatology: t.Climatology}
}

// For returns the time declaration of role r: its own (ByRole), else the
// dataset's.
func (t TimeSelection) For(r cf.Role) TimeDecl {
	if d, ok := t.ByRole[r]; ok {
		return d
	}
	return t.TimeDecl()
}

// Selects reports whether the time step of the given year and month
// (1–12) is part of the analysis. For a climatology (Climatology) the year
// is ignored. The run asks it of the record it follows: the SST's, or, when
// SST is a 12-month climatology beside a dated record of another role,
// that record's.
func (t TimeSelection) Selects(year, month int) bool {
	if month < 1 || month > 12 {
		return false
	}
	if len(t.Months) > 0 {
		found := false
		for _, m := range t.Months {
			if m == month {
				found = true
				break
			}
		}
		if !found {
			return false
		}
	}
	if t.Climatology {
		return true
	}
	ym := calendar.YearMonth{Year: year, Month: month}
	if t.Start != nil && ym.Index() < t.Start.Index() {
		return false
	}
	if t.End != nil && ym.Index() > t.End.Index() {
		return false
	}
	return true
}

// Selects reports whether the dataset's time selection includes the given
// year and month (1–12); see [TimeSelection.Selects].
func (d *Dataset) Selects(year, month int) bool { return d.Time.Selects(year, month) }

// OceanMethod says how ocean columns are identified.
type OceanMethod int

// The ocean-mask methods.
const (
	// OceanWhereSST: a column is ocean where the SST is present (not
	// missing). The default when no fraction input is given.
	OceanWhereSST OceanMethod = iota + 1
	// OceanFromFraction: ocean where the ocean fraction (1 − land_fraction,
	// or sea_fraction) is at least MinOceanFraction.
	OceanFromFraction
	// OceanFromCategories: ocean where a categorical mask takes one of
	// OceanValues.
	OceanFromCategories
)

// String returns the study spelling: "sst", "fraction" or "categorical".
func (m OceanMethod) String() string {
	switch m {
	case OceanWhereSST:
		return "sst"
	case OceanFromFraction:
		return "fraction"
	case OceanFromCategories:
		return "categorical"
	}
	return fmt.Sprintf("OceanMethod(%d)", int(m))
}

// OceanMask is the ocean-mask setting of a dataset.
type OceanMask struct {
	Method OceanMethod
	// Role is the mask input (cf.RoleLandFraction or cf.RoleSeaFraction);
	// empty for OceanWhereSST.
	Role cf.Role
	// MinOceanFraction is the smallest ocean fraction (0–1) of an ocean
	// column, for OceanFromFraction (default 0.5).
	MinOceanFraction float64
	// OceanValues are the mask values that mean ocean, for
	// OceanFromCategories (default [0]).
	OceanValues []float64
}

// IsOcean reports whether mask value v (as delivered by cf: a fraction
// 0–1 for fraction masks, the stored category otherwise) marks an ocean
// column. A missing value (NaN) is never ocean. For OceanWhereSST it
// reports whether v (the SST) is present.
func (o OceanMask) IsOcean(v float64) bool {
	if math.IsNaN(v) {
		return false
	}
	switch o.Method {
	case OceanFromFraction:
		frac := v
		if o.Role == cf.RoleLandFraction {
			frac = 1 - v
		}
		return frac >= o.MinOceanFraction
	case OceanFromCategories:
		for _, x := range o.OceanValues {
			if v == x {
				return true
			}
		}
		return false
	}
	return true
}

// SeaIce is the sea-ice exclusion of a dataset.
type SeaIce struct {
	// Use is true when a sea_ice input is given: columns with more ice
	// than MaxFraction are excluded.
	Use bool
	// MaxFraction is the largest sea-ice fraction (0–1) of a column that
	// is kept (default 0.15, the ice-edge convention of common practice).
	MaxFraction float64
}

// Excludes reports whether a column with sea-ice fraction f is excluded.
// Missing ice (NaN) does not exclude: many ice products leave open ocean
// missing. Without Use nothing is excluded.
func (s SeaIce) Excludes(f float64) bool {
	return s.Use && f > s.MaxFraction
}

// Surface says where the surface state comes from. The same choices are
// in Dataset.Metrics; this adds which roles to read.
type Surface struct {
	// TemperatureRole is cf.RoleSST or cf.RoleSurfaceAir.
	TemperatureRole cf.Role
	// PressureRole is cf.RoleSurfacePres when surface pressure is a
	// field, else empty (Metrics.SurfacePressure is used).
	PressureRole cf.Role
	// HumidityRole is the humidity input (relative_humidity, dew_point_temperature or
	// specific_humidity) when humidity is a field, else empty
	// (Metrics.AssumedRH is used).
	HumidityRole cf.Role
}

// Analysis holds the settings shared by every dataset.
type Analysis struct {
	// Band is the latitude band of the tropical-mean SST (default 30°S–30°N).
	Band regimes.Band
	// Threshold is δ, K: a column is convective where SST minus the
	// tropical-mean SST exceeds it (default 1.5 K; see the package doc).
	Threshold float64
	// Transition is the half-width, K, of a transition band around δ
	// (default 0: none).
	Transition float64
	// Rule is the regime rule (regimes.RuleRelativeSST, the default, or
	// regimes.RuleSSTPercentile) and Percentile its p (percent) for the
	// percentile rule (analysis.rule, analysis.percentile).
	Rule       regimes.Rule
	Percentile float64
	// CloudChoice is "auto" (low_cloud where given, else cloud),
	// "low_cloud" or "cloud"; each Dataset.Cloud holds the outcome.
	CloudChoice string
	// Regions are named longitude–latitude boxes for regional results.
	Regions []Region
	// Domain, when not nil, is the analysis domain (analysis.domain): a
	// latitude band or a box outside which no per-column statistics are
	// kept (maps are empty there). Nil: the whole grid. The tropical mean,
	// the band series, regions and relationships do not depend on it.
	Domain *Region
	// Grid is the analysis grid when inputs come on different grids.
	Grid Grid
}

// Classifier returns the fixed classifier (δ, h) of the analysis.
func (a Analysis) Classifier() regimes.Classifier {
	return regimes.Classifier{Delta: a.Threshold, HalfWidth: a.Transition}
}

// Regimes returns the regime definition of the analysis.
func (a Analysis) Regimes() regimes.Definition {
	return regimes.Definition{Band: a.Band, Rule: a.Rule, Delta: a.Threshold, HalfWidth: a.Transition, Percentile: a.Percentile}
}

// Region is a named box. West and East are degrees east in either
// convention (−180…180 or 0…360); West > East (after normalising both to
// 0…360) means the box crosses the 180° or 0° meridian the short way.
type Region struct {
	Name                     string
	South, North, West, East float64
}

// Contains reports whether the point (lat, lon), degrees north and east
// in any longitude convention, lies inside the region (bounds included).
func (r Region) Contains(lat, lon float64) bool {
	if !(lat >= r.South && lat <= r.North) {
		return false
	}
	w, e, x := lon360(r.West), lon360(r.East), lon360(lon)
	if r.East-r.West >= 360 {
		return true
	}
	if w <= e {
		return x >= w && x <= e
	}
	return x >= w || x <= e
}

func lon360(x float64) float64 {
	x = math.Mod(x, 360)
	if x < 0 {
		x += 360
	}
	return x
}

// Grid is the analysis-grid setting.
type Grid struct {
	// Target is the setting as written: "" (all inputs must share a
	// grid), a role name, or a resolution such as "2.5deg".
	Target string
	// TargetRole is the role whose grid is the target (when Target names
	// a role).
	TargetRole cf.Role
	// Resolution is the spacing in degrees of a regular global target
	// grid (when Target is a resolution), else 0.
	Resolution float64
	// Method is the remapping method per role, for roles set in the
	// study; [Grid.MethodFor] applies the default.
	Method map[cf.Role]regrid.Method
	// MinCoverage is the smallest valid overlap fraction of a target cell
	// for conservative remapping (default 0.5).
	MinCoverage float64
	// MaskThreshold is the fraction at which remapped masks are
	// thresholded (default 0.5).
	MaskThreshold float64
}

// MethodFor returns the remapping method of role r (default conservative).
func (g Grid) MethodFor(r cf.Role) regrid.Method {
	if m, ok := g.Method[r]; ok {
		return m
	}
	return regrid.Conservative
}

// Output is where results go.
type Output struct {
	// Dir is the output folder (default "out"), resolved against the
	// study's folder; each dataset writes into Dir/<dataset name>.
	Dir string
	// Plots is true when figures are drawn (default true).
	Plots bool
}

// Dataset returns the dataset of the given name; the error lists the
// names available.
func (r *Study) Dataset(name string) (*Dataset, error) {
	names := make([]string, len(r.Datasets))
	for i := range r.Datasets {
		if r.Datasets[i].Name == name {
			return &r.Datasets[i], nil
		}
		names[i] = r.Datasets[i].Name
	}
	hint := ""
	if n := nearest(name, names); n != "" {
		hint = fmt.Sprintf(" (did you mean %q?)", n)
	}
	return nil, fmt.Errorf("study %s has no dataset %q%s; its datasets are: %s", r.Path, name, hint, strings.Join(names, ", "))
}

// levelOf is the pressure, Pa, at which a role is read by default: the
// role's default level of the one role table ([vocab.DefaultLevel]: 700
// hPa for air temperature, T700; 500 hPa for omega, omega500; single
// level otherwise, relative and specific humidity being the near-surface
// humidity), and 700 hPa ([vocab.RoleVertical]) for specific humidity
// when ECTEI uses q700.
func (d *Dataset) levelOf(r cf.Role) float64 {
	if r == cf.RoleSpecHum && d.Metrics.ECTEI {
		_, pa := vocab.RoleVertical(string(r))
		return pa
	}
	return vocab.DefaultLevel(string(r))
}

// Spec returns how cf should read role r: the variable (if named), the
// pressure level (70000 Pa for air_temperature, and for
// specific_humidity when ECTEI is on; 50000 Pa for omega; else none),
// units and coordinate overrides, and the role's time declaration
// ([TimeSelection.For]: its own, else the dataset's). No time declaration
// is given to the mask roles (land_fraction, sea_fraction), which lidscope
// reads as fixed fields.
func (d *Dataset) Spec(r cf.Role) cf.Spec {
	return d.SpecAt(r, d.levelOf(r))
}

// SpecAt is [Dataset.Spec] at pressure level p, Pa (e.g. 85000 for the
// air temperature at 850 hPa when Metrics.T850Field is set).
func (d *Dataset) SpecAt(r cf.Role, p float64) cf.Spec {
	c := d.Coordinates[r]
	s := cf.Spec{Role: r, Var: d.Variables[r], Level: p}
	s.Lat, s.Lon, s.Overrides.Level, s.Time, s.LevelUnits = c.Lat, c.Lon, c.Level, c.Time, c.LevelUnits
	s.Units = d.Units[r]
	if r != cf.RoleLandFraction && r != cf.RoleSeaFraction {
		t := d.Time.For(r)
		s.TimeUnits, s.Calendar, s.Climatology = t.Units, t.Calendar, t.Climatology
	}
	return s
}

// Roles lists the roles of Inputs in a stable order (that of cf.Roles).
func (d *Dataset) Roles() []cf.Role {
	var out []cf.Role
	for _, r := range cf.Roles() {
		if _, ok := d.Inputs[r]; ok {
			out = append(out, r)
		}
	}
	return out
}

// Hash returns the SHA-256 of Resolved(), in hexadecimal: a short
// provenance identifier of everything the study decides.
func (r *Study) Hash() string {
	sum := sha256.Sum256([]byte(r.Resolved()))
	return hex.EncodeToString(sum[:])
}

func sortedRoles[T any](m map[cf.Role]T) []cf.Role {
	out := make([]cf.Role, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Slice(out, func(i, j int) bool { return out[i] < out[j] })
	return out
}

// Limits bound the resources a run may use.
type Limits struct {
	// MemoryBudget is the most bytes one input's time step, or a run's
	// per-column arrays, may take (limits.memory_budget, e.g. "4GiB");
	// 0 means cf.DefaultMemoryBudget.
	MemoryBudget int64
}
