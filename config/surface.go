// Decoding of a dataset's ocean mask, surface (temperature, pressure,
// humidity) and metrics conventions.

package config

import (
	"slices"
	"strings"

	"lidscope/cf"
	"lidscope/metrics"
	"lidscope/units"
)

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
