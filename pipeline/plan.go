package pipeline

import (
	"fmt"

	"lidscope/accumulate"
	"lidscope/cf"
	"lidscope/config"
	"lidscope/metrics"
	"lidscope/regrid"
	"lidscope/vocab"
)

// extraRoles are composited by regime when a dataset gives them.
var extraRoles = []cf.Role{cf.RoleCloud, cf.RoleLowCloud, cf.RoleSWUp, cf.RoleOLR, cf.RolePrecip, cf.RoleOmega}

// PlanFor builds the plan of one dataset of a loaded study.
func PlanFor(r *config.Study, d *config.Dataset) (Plan, error) {
	in := func(role cf.Role) Input { return Input{Paths: d.Inputs[role], Spec: d.Spec(role)} }
	need := func(role cf.Role) (Input, error) {
		if len(d.Inputs[role]) == 0 {
			return Input{}, fmt.Errorf("dataset %s: no input files for role %s", d.Name, role)
		}
		return in(role), nil
	}
	p := Plan{Dataset: d.Name, Metrics: d.Metrics, Regimes: r.Analysis.Regimes(), Select: d.Selects,
		MemoryBudget: r.Limits.MemoryBudget}
	if len(d.Accept) > 0 {
		p.Accept = map[string]bool{}
		for _, c := range d.Accept {
			p.Accept[c] = true
		}
	}
	var err error
	if p.SST, err = need(cf.RoleSST); err != nil {
		return p, err
	}
	opt := func(role cf.Role) *Input {
		if role == "" || len(d.Inputs[role]) == 0 {
			return nil
		}
		x := in(role)
		return &x
	}
	// T700 and cloud are optional (SST is the minimum); which quantities
	// the run has follows from which of them are present. A role read from
	// files.any (not named in the study) is absent when those files do not
	// hold it.
	fromAll := func(role cf.Role) (*Input, error) {
		x := opt(role)
		if x == nil || len(d.Patterns[string(role)]) > 0 {
			return x, nil
		}
		ok, why, err := cf.HasRole(x.Paths, x.Spec)
		if err != nil {
			return nil, fmt.Errorf("dataset %s: %w", d.Name, err)
		}
		if !ok {
			p.Notes = append(p.Notes, fmt.Sprintf("%s is not in the files of files.any, so the run goes without it (%s)", role, why))
			return nil, nil
		}
		return x, nil
	}
	if p.T700, err = fromAll(cf.RoleAirTemp); err != nil {
		return p, err
	}
	if p.Cloud, err = fromAll(d.Cloud); err != nil {
		return p, err
	}
	if d.Surface.TemperatureRole == cf.RoleSurfaceAir {
		if p.SurfaceAir = opt(cf.RoleSurfaceAir); p.SurfaceAir == nil {
			return p, fmt.Errorf("dataset %s: the metrics use surface air temperature but no surface_air_temperature input is given", d.Name)
		}
	}
	p.SurfacePressure = opt(d.Surface.PressureRole)
	p.Humidity = opt(d.Surface.HumidityRole)
	if d.Metrics.T850Field && p.T700 != nil {
		x := Input{Paths: d.Inputs[cf.RoleAirTemp], Spec: d.SpecAt(cf.RoleAirTemp, d.Metrics.LapsePressure)}
		p.T850 = &x
	}
	if d.Metrics.ECTEI {
		p.Q700 = opt(cf.RoleSpecHum)
	}
	if d.SeaIce.Use {
		p.SeaIce = opt(cf.RoleSeaIce)
		p.MaxSeaIce = d.SeaIce.MaxFraction
	}
	for _, role := range extraRoles {
		if role != d.Cloud && len(d.Inputs[role]) > 0 {
			p.Extras = append(p.Extras, in(role))
		}
	}
	if r.Factors.On {
		if p.Factors, err = factorInputs(d, r.Factors.Use, p.T700 != nil); err != nil {
			return p, err
		}
	}
	switch d.Ocean.Method {
	case config.OceanWhereSST:
		p.Ocean = Ocean{Kind: "sst"}
	case config.OceanFromFraction:
		p.Ocean = Ocean{Kind: "fraction", Input: opt(d.Ocean.Role), MinFraction: d.Ocean.MinOceanFraction}
	case config.OceanFromCategories:
		p.Ocean = Ocean{Kind: "categorical", Input: opt(d.Ocean.Role), OceanValues: d.Ocean.OceanValues}
	}
	for _, rg := range r.Analysis.Regions {
		p.Regions = append(p.Regions, accumulate.Region{Name: rg.Name, South: rg.South, North: rg.North, West: rg.West, East: rg.East})
	}
	if dm := r.Analysis.Domain; dm != nil {
		p.Domain = &accumulate.Region{Name: dm.Name, South: dm.South, North: dm.North, West: dm.West, East: dm.East}
	}
	g := r.Analysis.Grid
	p.Grid = GridPlan{Target: g.Target, MinCoverage: g.MinCoverage, MaskThreshold: g.MaskThreshold, Methods: map[cf.Role]regrid.Method{}}
	for _, role := range cf.Roles() {
		p.Grid.Methods[role] = g.MethodFor(role)
	}
	return p, nil
}

// factorInputs are the inputs of the factors use of dataset d (hasT700:
// the plan has the 700 hPa temperature).
func factorInputs(d *config.Dataset, use []string, hasT700 bool) (*FactorInputs, error) {
	fi := &FactorInputs{Use: append([]string(nil), use...)}
	at := func(role cf.Role, pa float64) *Input {
		if len(d.Inputs[role]) == 0 {
			return nil
		}
		return &Input{Paths: d.Inputs[role], Spec: d.SpecAt(role, pa)}
	}
	for _, f := range fi.Use {
		var miss string
		switch f {
		case vocab.EIS, vocab.LTS:
			if !hasT700 {
				miss = "air_temperature"
			}
		case vocab.RH700:
			if fi.RH = at(cf.RoleRH, metrics.P700); fi.RH == nil && hasT700 {
				fi.Q = at(cf.RoleSpecHum, metrics.P700)
			}
			if fi.RH == nil && fi.Q == nil {
				miss = "relative_humidity (or specific_humidity and air_temperature)"
			}
		case vocab.Omega700:
			if fi.Omega = at(cf.RoleOmega, metrics.P700); fi.Omega == nil {
				miss = "omega"
			}
		case vocab.TAdv, vocab.WindSpeed:
			fi.U, fi.V = at(cf.RoleEastWind, 0), at(cf.RoleNorthWind, 0)
			if fi.U == nil || fi.V == nil {
				miss = "eastward_wind and northward_wind"
			}
		}
		if miss != "" {
			return nil, fmt.Errorf("dataset %s: factor %s (factors.use) needs the %s input, which the dataset's files do not give; add it to datasets.%s.files or remove %s from factors.use", d.Name, f, miss, d.Name, f)
		}
	}
	return fi, nil
}
