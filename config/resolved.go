package config

import (
	"encoding/json"
	"lidscope/regimes"
	"math"
	"path/filepath"
	"sort"
	"strings"

	"lidscope/metrics"
	"lidscope/relations"
)

// ResolvedFormat is the version tag at the start of Resolved(); it changes
// only when the text's layout does. Version 3 writes the keys of the study
// file (datasets keyed by name, files, conventions, …).
const ResolvedFormat = "lidscope-study-resolved/3"

// object is a JSON table; encoding/json writes its keys sorted.
type object = map[string]any

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

// Resolved returns a stable canonical text of everything the study
// decides once defaults, overrides and globs are applied: indented JSON
// with sorted keys, starting with the ResolvedFormat tag, written with the
// keys of the study file. Every key has its value, defaults included:
// numbers in SI units (surface.pressure 100000 is Pa), the files of each
// role (globs expanded, relative to the study's folder; roles read from
// files.any are listed too), the time declaration of every role that has
// its own (complete, with the dataset's values filled in), the metrics
// conventions under conventions, and the relationships section with its
// bins resolved. What the study decides without a key of its own is under
// "derived" per dataset: the cloud role of the analysis, the output folder
// and the relationship responses (relationships.responses resolved for
// that dataset, which is why the relationships section has no responses). Studies that decide the same give the
// same text, whatever their format, key order, comments or spelling of
// defaults. It does not contain the study's own path or text.
func (r *Study) Resolved() string {
	sets := object{}
	for i := range r.Datasets {
		d := &r.Datasets[i]
		sets[d.Name] = r.resolvedDataset(d)
	}
	a := r.Analysis
	regions := []object{}
	for _, reg := range a.Regions {
		regions = append(regions, object{"name": reg.Name, "south": reg.South, "north": reg.North, "west": reg.West, "east": reg.East})
	}
	methods := object{}
	for _, role := range sortedRoles(a.Grid.Method) {
		methods[string(role)] = a.Grid.Method[role].String()
	}
	out := object{
		"format":   ResolvedFormat,
		"datasets": sets,
		"analysis": object{
			"band":       object{"south": a.Band.South, "north": a.Band.North},
			"threshold":  a.Threshold,
			"transition": a.Transition,
			"cloud":      a.CloudChoice,
			"regions":    regions,
			"grid": object{
				"target":         a.Grid.Target,
				"method":         methods,
				"min_coverage":   a.Grid.MinCoverage,
				"mask_threshold": a.Grid.MaskThreshold,
			},
		},
		"output":        object{"dir": r.rel(r.Output.Dir), "plots": r.Output.Plots},
		"relationships": resolvedRelations(r.Relations),
	}
	if r.Factors.On {
		out["factors"] = resolvedFactors(r.Factors)
	}
	if a.Rule == regimes.RuleSSTPercentile {
		an := out["analysis"].(object)
		an["rule"], an["percentile"] = string(a.Rule), a.Percentile
		delete(an, "threshold")
	}
	if dm := a.Domain; dm != nil {
		// only when set, so that the resolved text (and hash) of a study
		// without a domain is what it was
		out["analysis"].(object)["domain"] = object{"south": dm.South, "north": dm.North, "west": dm.West, "east": dm.East}
	}
	var b strings.Builder
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", "  ")
	if err := enc.Encode(out); err != nil {
		// Only strings, finite numbers (Load rejects others), booleans,
		// lists and maps are encoded: this cannot happen.
		panic("config: encoding the resolved study: " + err.Error())
	}
	// "format" first, so that the tag starts the text
	s := b.String()
	tag := "  \"format\": " + quote(ResolvedFormat) + ",\n"
	return "{\n" + tag + strings.Replace(strings.TrimPrefix(s, "{\n"), tag, "", 1)
}

func (r *Study) resolvedDataset(d *Dataset) object {
	files := object{}
	for _, role := range sortedRoles(d.Inputs) {
		fs := make([]string, len(d.Inputs[role]))
		for j, f := range d.Inputs[role] {
			fs[j] = r.rel(f)
		}
		files[string(role)] = fs
	}
	if len(d.All) > 0 {
		fs := make([]string, len(d.All))
		for j, f := range d.All {
			fs[j] = r.rel(f)
		}
		files[allKey] = fs
	}
	vars, unitsT, coords := object{}, object{}, object{}
	for k, v := range d.Variables {
		vars[string(k)] = v
	}
	for k, v := range d.Units {
		unitsT[string(k)] = v
	}
	for k, c := range d.Coordinates {
		m := object{}
		for n, v := range map[string]string{"lat": c.Lat, "lon": c.Lon, "level": c.Level, "time": c.Time, "level_units": c.LevelUnits} {
			if v != "" {
				m[n] = v
			}
		}
		coords[string(k)] = m
	}

	t := d.Time
	tm := object{"units": t.Units, "calendar": t.Calendar, "climatology": t.Climatology}
	for role, decl := range t.ByRole {
		tm[string(role)] = object{"units": decl.Units, "calendar": decl.Calendar, "climatology": decl.Climatology}
	}
	if t.Start != nil {
		tm["start"] = t.Start.String()
	}
	if t.End != nil {
		tm["end"] = t.End.String()
	}
	months := append([]int{}, t.Months...)
	sort.Ints(months) // the order written decides nothing; a season is its months
	tm["months"] = months

	ocean := object{"mask": d.Ocean.Method.String()}
	switch d.Ocean.Method {
	case OceanFromFraction:
		ocean["from"] = string(d.Ocean.Role)
		ocean["min_fraction"] = d.Ocean.MinOceanFraction
	case OceanFromCategories:
		ocean["from"] = string(d.Ocean.Role)
		vals := append([]float64{}, d.Ocean.OceanValues...)
		sort.Float64s(vals)
		ocean["values"] = vals
	}
	var seaIce any // null: no sea-ice exclusion
	if d.SeaIce.Use {
		seaIce = object{"max_fraction": d.SeaIce.MaxFraction}
	}

	m := d.Metrics
	surface := object{"temperature": "sst"}
	if m.Surface == metrics.SurfaceAir {
		surface["temperature"] = "air"
	}
	if m.PressureField {
		surface["pressure"] = "field"
	} else {
		surface["pressure"] = m.SurfacePressure
	}
	if d.Surface.HumidityRole != "" {
		surface["humidity"] = string(d.Surface.HumidityRole)
	} else {
		surface["humidity"] = m.AssumedRH
	}
	t850 := "mean"
	if m.T850Field {
		t850 = "field"
	}
	c := m.Constants
	conventions := object{
		"svp": m.SVP.String(), "lcl": m.LCL.String(), "t850": t850,
		"lapse_pressure": m.LapsePressure, "lapse_moisture": m.LapseMoisture.String(),
		"ectei": m.ECTEI, "ectei_beta": m.ECTEIBeta, "ectei_surface": m.ECTEISurface.String(),
		"constants": object{"rd": c.Rd, "rv": c.Rv, "cpd": c.Cpd, "lv0": c.Lv0, "lv_slope": c.LvSlope, "g": c.G, "p0": c.P0},
	}
	return object{
		"about":       d.Description,
		"files":       files,
		"variables":   vars,
		"units":       unitsT,
		"coordinates": coords,
		"time":        tm,
		"ocean":       ocean,
		"sea_ice":     seaIce,
		"surface":     surface,
		"conventions": conventions,
		"derived": object{
			"cloud":      string(d.Cloud),
			"output_dir": r.rel(d.OutputDir),
			"responses":  append([]string{}, d.RelationResponses...),
		},
	}
}

// resolvedRelations writes the relationships section with the study's
// keys. The regime definition and the regions are those of analysis; the
// responses are resolved per dataset (derived.responses).
func resolvedRelations(c relations.Config) object {
	bins := c.Bins
	if bins == nil {
		bins = relations.DefaultBins(c.Mode)
	}
	rb := object{}
	for p, e := range bins {
		if len(e) > 0 {
			rb[p] = e
		}
	}
	patches := []object{}
	for _, p := range c.Patches {
		patches = append(patches, object{"name": p.Name, "south": p.South, "north": p.North, "west": p.West, "east": p.East})
	}
	th := object{"indicator": c.Indicator}
	if c.Indicator != "" {
		v := c.IndicatorThreshold
		if math.IsNaN(v) {
			v = relations.DefaultIndicatorThreshold(c.Indicator)
		}
		th["value"] = v
		th["bin_width"] = c.ThresholdBinWidth
		th["range"] = []float64{c.ThresholdRange[0], c.ThresholdRange[1]}
		th["replicates"] = c.ThresholdReplicates
	}
	return object{
		"mode":      c.Mode.String(),
		"detrend":   c.Detrend,
		"bins":      rb,
		"seasons":   c.Seasons,
		"patches":   patches,
		"delta_t":   append([]float64{}, c.DeltaT...),
		"bootstrap": object{"replicates": c.Bootstrap.N, "block_length": c.Bootstrap.BlockLength, "seed": c.Bootstrap.Seed},
		"threshold": th,
		// omega_regimes, decorrelation_length (m) and partial as written
		"omega_regimes":        c.OmegaBins,
		"decorrelation_length": c.DecorrelationLength,
		"partial":              []string{c.Partial[0], c.Partial[1]},
	}
}
