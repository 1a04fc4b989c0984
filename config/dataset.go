// Decoding of one dataset: its files, per-role variables, units and
// coordinates, time selection, sea ice, cloud input and what it cannot do
// without.

package config

import (
	"fmt"
	"path/filepath"
	"strconv"
	"strings"

	"lidscope/calendar"
	"lidscope/cf"
	"lidscope/units"
)

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
	inPath := d.datasetFiles(path, m, &ds)
	has := func(r cf.Role) bool { return ds.hasPattern(r) || ds.hasPattern(allKey) }
	explicit := ds.hasPattern
	d.datasetTables(path, m, &ds, has)
	d.timeSel(join(path, "time"), sub(m, "time"), &ds.Time, has, ds.timedRoles())
	d.ocean(join(path, "ocean"), sub(m, "ocean"), &ds, has, explicit)
	d.seaIce(path, m, &ds, has, explicit)
	ectei, _ := sub(m, "conventions")["ectei"].(bool) // checked by d.conventions
	d.surface(join(path, "surface"), sub(m, "surface"), &ds, has, explicit, ectei)
	d.conventions(join(path, "conventions"), sub(m, "conventions"), &ds, has)
	d.datasetCloud(inPath, r, &ds, has, explicit)
	d.datasetNeeds(path, inPath, &ds, has)
	ds.OutputDir = filepath.Join(r.Output.Dir, ds.Name)
	return ds
}

// datasetFiles decodes the files table (the file patterns of each role)
// and returns its path for later problems.
func (d *decoder) datasetFiles(path string, m map[string]any, ds *Dataset) string {
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
	return inPath
}

// datasetTables decodes the variables, units and coordinates tables; each
// entry names a role that has files.
func (d *decoder) datasetTables(path string, m map[string]any, ds *Dataset, has func(cf.Role) bool) {
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
}

// timedRoles are the roles with files of their own that are read with a
// time axis (nil, all unknown, when files.any is used).
func (ds *Dataset) timedRoles() []cf.Role {
	var timed []cf.Role
	if !ds.hasPattern(allKey) {
		for _, r := range cf.Roles() {
			if ds.hasPattern(r) && r != cf.RoleLandFraction && r != cf.RoleSeaFraction {
				timed = append(timed, r)
			}
		}
	}
	return timed
}

// seaIce decodes the sea_ice table: sea-ice exclusion needs a sea_ice input.
func (d *decoder) seaIce(path string, m map[string]any, ds *Dataset, has, explicit func(cf.Role) bool) {
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
}

// datasetCloud chooses the dataset's cloud input: analysis.cloud, else
// an explicit low_cloud or cloud input, else low cloud from files.any.
func (d *decoder) datasetCloud(inPath string, r *Study, ds *Dataset, has, explicit func(cf.Role) bool) {
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
}

// datasetNeeds checks the inputs the dataset cannot do without: SST,
// and the 700 hPa temperature when its conventions read it.
func (d *decoder) datasetNeeds(path, inPath string, ds *Dataset, has func(cf.Role) bool) {
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
}

// timeSel decodes the time table; timed are the roles with files of
// their own that are read with a time axis (all of them unknown when
// files.any is used: then timed is nil).
func (d *decoder) timeSel(path string, m map[string]any, t *TimeSelection, has func(cf.Role) bool, timed []cf.Role) {
	t.Units = d.str(m, path, "units", "")
	t.Calendar = d.str(m, path, "calendar", "")
	t.Climatology = d.boolean(m, path, "climatology", false)
	d.timeDecl(path, t.TimeDecl(), "")

	d.timeByRole(path, m, t, has)
	d.timeRange(path, m, t, timed)
	d.timeMonths(path, m, t)
}

// timeByRole decodes the per-role time declarations: each key falls back
// to the dataset's.
func (d *decoder) timeByRole(path string, m map[string]any, t *TimeSelection, has func(cf.Role) bool) {
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
}

// timeRange decodes start and end, which select years of the record the
// run follows; when every timed role is a declared climatology there are
// none.
func (d *decoder) timeRange(path string, m map[string]any, t *TimeSelection, timed []cf.Role) {
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
}

// timeMonths decodes months or season, the calendar months a run keeps.
func (d *decoder) timeMonths(path string, m map[string]any, t *TimeSelection) {
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
