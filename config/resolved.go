package config

import (
	"encoding/json"
	"path/filepath"
	"sort"
	"strings"
)

// ResolvedFormat is the version tag at the start of Resolved(); it changes
// only when the text's layout does.
const ResolvedFormat = "lidscope-study-resolved/2"

type resolvedStudy struct {
	Format   string            `json:"format"`
	Datasets []resolvedDataset `json:"datasets"`
	Analysis resolvedAnalysis  `json:"analysis"`
	Output   resolvedOutput    `json:"output"`
}

type resolvedDataset struct {
	Name        string                       `json:"name"`
	Description string                       `json:"description"`
	Inputs      map[string][]string          `json:"inputs"`
	All         []string                     `json:"all_files,omitempty"`
	Variables   map[string]string            `json:"variables,omitempty"`
	Units       map[string]string            `json:"units,omitempty"`
	Coordinates map[string]map[string]string `json:"coordinates,omitempty"`
	Time        map[string]any               `json:"time"`
	Ocean       map[string]any               `json:"ocean"`
	SeaIce      map[string]any               `json:"sea_ice"`
	Surface     map[string]string            `json:"surface"`
	Cloud       string                       `json:"cloud"`
	Metrics     string                       `json:"metrics"`
	OutputDir   string                       `json:"output_dir"`
	// Relationships is relations.Config.Text() of RelationsFor, by line.
	Relationships []string `json:"relationships"`
}

type resolvedAnalysis struct {
	Band       [2]float64       `json:"band_south_north"`
	Threshold  float64          `json:"threshold_k"`
	Transition float64          `json:"transition_k"`
	Regime     string           `json:"regimes"`
	Cloud      string           `json:"cloud"`
	Regions    []map[string]any `json:"regions"`
	Grid       map[string]any   `json:"grid"`
}

type resolvedOutput struct {
	Dir   string `json:"dir"`
	Plots bool   `json:"plots"`
}

// rel writes a path relative to the study's folder (slash-separated):
// input files as their pattern was written (relative patterns give
// relative names, absolute patterns absolute ones), other paths relative
// when they lie inside the folder, so that the text does not depend on
// where the study's folder is.
func (r *Study) rel(path string) string {
	if s, ok := r.shown[path]; ok {
		return s
	}
	if q, err := filepath.Rel(r.Dir, path); err == nil && q != ".." && !strings.HasPrefix(q, ".."+string(filepath.Separator)) {
		return filepath.ToSlash(q)
	}
	return filepath.ToSlash(path)
}

// Resolved returns a stable canonical text (indented JSON with sorted
// keys, starting with the ResolvedFormat tag) of everything the study
// decides once defaults, overrides and globs are applied: per dataset the
// files of each role (relative to the study's folder), the overrides, the
// time selection, masks, surface settings, cloud role and the complete
// metrics conventions text; the analysis and output settings. Studies that
// decide the same give the same text, whatever their format, key order,
// comments or spelling of defaults. It does not contain the study's own
// path or text. Per dataset it also holds the relationship analysis of
// that dataset (relations.Config.Text of [Study.RelationsFor], one line
// per entry).
func (r *Study) Resolved() string {
	out := resolvedStudy{Format: ResolvedFormat}
	for i := range r.Datasets {
		d := &r.Datasets[i]
		rd := resolvedDataset{
			Name:        d.Name,
			Description: d.Description,
			Inputs:      map[string][]string{},
			Time:        map[string]any{},
			Cloud:       string(d.Cloud),
			Metrics:     d.Metrics.Text(),
			OutputDir:   r.rel(d.OutputDir),
		}
		rd.Relationships = strings.Split(strings.TrimSuffix(r.RelationsFor(d).Text(), "\n"), "\n")
		for _, role := range sortedRoles(d.Inputs) {
			// files of one role, as written
			files := make([]string, len(d.Inputs[role]))
			for j, f := range d.Inputs[role] {
				files[j] = r.rel(f)
			}
			rd.Inputs[string(role)] = files
		}
		for _, f := range d.All {
			rd.All = append(rd.All, r.rel(f))
		}
		if len(d.Variables) > 0 {
			rd.Variables = map[string]string{}
			for k, v := range d.Variables {
				rd.Variables[string(k)] = v
			}
		}
		if len(d.Units) > 0 {
			rd.Units = map[string]string{}
			for k, v := range d.Units {
				rd.Units[string(k)] = v
			}
		}
		if len(d.Coordinates) > 0 {
			rd.Coordinates = map[string]map[string]string{}
			for k, c := range d.Coordinates {
				m := map[string]string{}
				for n, v := range map[string]string{"lat": c.Lat, "lon": c.Lon, "level": c.Level, "time": c.Time, "level_units": c.LevelUnits} {
					if v != "" {
						m[n] = v
					}
				}
				rd.Coordinates[string(k)] = m
			}
		}
		t := d.Time
		rd.Time["units"] = t.Units
		rd.Time["calendar"] = t.Calendar
		rd.Time["climatology"] = t.Climatology
		if t.Start != nil {
			rd.Time["start"] = t.Start.String()
		}
		if t.End != nil {
			rd.Time["end"] = t.End.String()
		}
		months := append([]int{}, t.Months...)
		sort.Ints(months) // the order written decides nothing
		rd.Time["months"] = months
		rd.Ocean = map[string]any{"mask": d.Ocean.Method.String()}
		switch d.Ocean.Method {
		case OceanFromFraction:
			rd.Ocean["role"] = string(d.Ocean.Role)
			rd.Ocean["min_ocean_fraction"] = d.Ocean.MinOceanFraction
		case OceanFromCategories:
			rd.Ocean["role"] = string(d.Ocean.Role)
			vals := append([]float64{}, d.Ocean.OceanValues...)
			sort.Float64s(vals)
			rd.Ocean["ocean_values"] = vals
		}
		rd.SeaIce = map[string]any{"use": d.SeaIce.Use}
		if d.SeaIce.Use {
			rd.SeaIce["max_fraction"] = d.SeaIce.MaxFraction
		}
		rd.Surface = map[string]string{
			"temperature_role": string(d.Surface.TemperatureRole),
			"pressure_role":    string(d.Surface.PressureRole),
			"humidity_role":    string(d.Surface.HumidityRole),
		}
		out.Datasets = append(out.Datasets, rd)
	}
	a := r.Analysis
	ra := resolvedAnalysis{
		Band:       [2]float64{a.Band.South, a.Band.North},
		Threshold:  a.Threshold,
		Transition: a.Transition,
		Regime:     a.Classifier().String(),
		Cloud:      a.CloudChoice,
		Regions:    []map[string]any{},
	}
	for _, reg := range a.Regions {
		ra.Regions = append(ra.Regions, map[string]any{"name": reg.Name, "south": reg.South, "north": reg.North, "west": reg.West, "east": reg.East})
	}
	methods := map[string]string{}
	for _, role := range sortedRoles(a.Grid.Method) {
		methods[string(role)] = a.Grid.Method[role].String()
	}
	ra.Grid = map[string]any{
		"target":         a.Grid.Target,
		"method":         methods,
		"min_coverage":   a.Grid.MinCoverage,
		"mask_threshold": a.Grid.MaskThreshold,
	}
	out.Analysis = ra
	out.Output = resolvedOutput{Dir: r.rel(r.Output.Dir), Plots: r.Output.Plots}
	var b strings.Builder
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", "  ")
	if err := enc.Encode(out); err != nil {
		// Only strings, finite numbers (Load rejects others), booleans,
		// lists and maps are encoded: this cannot happen.
		panic("config: encoding the resolved study: " + err.Error())
	}
	return b.String()
}
