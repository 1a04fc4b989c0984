package cf

import (
	"sort"
	"strings"

	"lidscope/netcdf"
	"lidscope/units"
	"lidscope/vocab"
)

// Role is what lidscope uses a variable for.
type Role string

// Roles. The names come from the table of names (package vocab); the
// standard_names that identify them come from the CF Standard Name Table.
const (
	RoleSST          Role = vocab.RoleSST                   // sea-surface temperature
	RoleAirTemp      Role = vocab.RoleAirTemperature        // on pressure levels (T700, T850)
	RoleSurfaceAir   Role = vocab.RoleSurfaceAirTemperature // near-surface air temperature
	RoleLowCloud     Role = vocab.RoleLowCloud              // low-cloud area fraction
	RoleCloud        Role = vocab.RoleCloud                 // total cloud area fraction
	RoleSWUp         Role = vocab.RoleTOASWUp               // TOA outgoing shortwave flux
	RoleOLR          Role = vocab.RoleOLR                   // TOA outgoing longwave flux
	RoleOmega        Role = vocab.RoleOmega                 // vertical pressure velocity (on levels: omega500)
	RoleSurfacePres  Role = vocab.RoleSurfacePressure       // surface air pressure
	RoleSeaLevelPres Role = vocab.RoleSeaLevelPressure
	RoleRH           Role = vocab.RoleRelativeHumidity
	RoleDewPoint     Role = vocab.RoleDewPointTemperature
	RoleSpecHum      Role = vocab.RoleSpecificHumidity
	RoleSeaFraction  Role = vocab.RoleSeaFraction
	RoleLandFraction Role = vocab.RoleLandFraction
	RoleSeaIce       Role = vocab.RoleSeaIce
	RolePrecip       Role = vocab.RolePrecipitation
	RoleEastWind     Role = vocab.RoleEastwardWind  // near-surface eastward wind
	RoleNorthWind    Role = vocab.RoleNorthwardWind // near-surface northward wind
)

// roleSpec says how a role is recognised and in which units it is read.
type roleSpec struct {
	Role          Role
	Kind          units.Kind
	StandardNames []string
	Names         []string // variable names that identify the role when no standard_name does
}

var roleSpecs = []roleSpec{
	{RoleSST, units.Temperature, []string{"sea_surface_temperature", "sea_surface_skin_temperature",
		"sea_surface_foundation_temperature", "sea_water_temperature"}, []string{"sst", "tos", "analysed_sst", "sea_surface_temperature"}},
	{RoleAirTemp, units.Temperature, []string{"air_temperature"}, []string{"ta", "t", "air", "temp", "temperature", "t700"}},
	{RoleSurfaceAir, units.Temperature, []string{"air_temperature"}, []string{"tas", "t2m", "2t", "t2"}},
	{RoleLowCloud, units.Fraction, []string{"low_type_cloud_area_fraction"}, []string{"cldlow", "lcc", "low_cloud", "cll", "cldlow_cal"}},
	{RoleCloud, units.Fraction, []string{"cloud_area_fraction"}, []string{"clt", "tcc", "cldtot", "total_cloud"}},
	{RoleSWUp, units.Flux, []string{"toa_outgoing_shortwave_flux"}, []string{"rsut", "toa_sw_all_mon", "fsut"}},
	{RoleOLR, units.Flux, []string{"toa_outgoing_longwave_flux"}, []string{"rlut", "olr", "toa_lw_all_mon", "flut"}},
	{RoleOmega, units.Omega, []string{"lagrangian_tendency_of_air_pressure",
		"vertical_air_velocity_expressed_as_tendency_of_pressure"}, []string{"wap", "omega", "w500", "omega500"}},
	{RoleSurfacePres, units.Pressure, []string{"surface_air_pressure"}, []string{"ps", "sp", "pres_sfc"}},
	{RoleSeaLevelPres, units.Pressure, []string{"air_pressure_at_mean_sea_level", "air_pressure_at_sea_level"}, []string{"psl", "msl", "slp", "mslp"}},
	{RoleRH, units.Fraction, []string{"relative_humidity"}, []string{"hurs", "rh", "hur"}},
	{RoleDewPoint, units.Temperature, []string{"dew_point_temperature"}, []string{"d2m", "2d", "tdps", "dewpoint"}},
	{RoleSpecHum, units.MixingRatio, []string{"specific_humidity"}, []string{"hus", "huss", "q"}},
	{RoleSeaFraction, units.Fraction, []string{"sea_area_fraction", "sea_binary_mask"}, []string{"sftof", "sea_fraction"}},
	{RoleLandFraction, units.Fraction, []string{"land_area_fraction", "land_binary_mask"}, []string{"sftlf", "lsm", "lsmask", "landsea", "land_sea_mask", "lsm_frac"}},
	{RoleSeaIce, units.Fraction, []string{"sea_ice_area_fraction"}, []string{"siconc", "sic", "ci", "seaice", "ice_fraction"}},
	{RolePrecip, units.Precipitation, []string{"precipitation_flux", "lwe_precipitation_rate"}, []string{"pr", "precip", "prate", "tp"}},
	{RoleEastWind, units.Speed, []string{"eastward_wind"}, []string{"uas", "u10", "10u"}},
	{RoleNorthWind, units.Speed, []string{"northward_wind"}, []string{"vas", "v10", "10v"}},
}

// Roles lists every role lidscope knows, in a stable order.
func Roles() []Role {
	out := make([]Role, len(roleSpecs))
	for i, s := range roleSpecs {
		out[i] = s.Role
	}
	return out
}

// KindOf returns the physical quantity of a role (for units conversion).
func KindOf(r Role) (units.Kind, bool) {
	for _, s := range roleSpecs {
		if s.Role == r {
			return s.Kind, true
		}
	}
	return 0, false
}

// RoleMatch is a variable recognised as a role, and how.
type RoleMatch struct {
	Role Role
	Var  string
	How  string
	// ByName is true when only the variable name identified it (weaker
	// evidence than a standard_name; reported so users can confirm).
	ByName bool
	// ByLongName is true when only the long_name (or, for cloud, sky-cover
	// units) identified it (ByName is then true too): weaker still, so a
	// run uses it only when the study names the variable.
	ByLongName bool
	// NLevels is the length of its pressure axis (0 when it has none, e.g.
	// a single level given by a scalar coordinate).
	NLevels int
}

// matchRoles returns the roles variable v could fill. hasLevels says
// whether it has a pressure axis.
func matchRoles(v *netcdf.Var, hasLevels bool) []RoleMatch {
	sn := strings.ToLower(textAttr(v, "standard_name"))
	name := strings.ToLower(v.Name)
	var out []RoleMatch
	levelOK := func(s roleSpec) bool {
		return levelsOK(s.Role, hasLevels)
	}
	if sn != "" {
		for _, s := range roleSpecs {
			for _, want := range s.StandardNames {
				if sn == want && levelOK(s) {
					out = append(out, RoleMatch{Role: s.Role, Var: v.Name, How: "standard_name " + sn})
				}
			}
		}
		if len(out) > 0 {
			return out
		}
	}
	for _, s := range roleSpecs {
		for _, want := range s.Names {
			if name == want && levelOK(s) {
				if sn != "" && !contains(s.StandardNames, sn) {
					continue // a standard_name that says otherwise wins over the name
				}
				if _, err := units.Parse(s.Kind, textAttr(v, "units")); err != nil && s.Kind != units.Fraction {
					// a name alone, with units that do not fit, is not evidence
					continue
				}
				out = append(out, RoleMatch{Role: s.Role, Var: v.Name, How: "variable name " + v.Name + " and its units", ByName: true})
			}
		}
	}
	if len(out) == 0 && sn == "" {
		out = longNameMatches(v, hasLevels)
	}
	return out
}

func contains(s []string, x string) bool {
	for _, y := range s {
		if y == x {
			return true
		}
	}
	return false
}

// assignRoles picks one variable per role among candidates, reporting
// ambiguities (two standard_name matches, or two name matches with no
// standard_name match) instead of choosing at random.
func assignRoles(matches []RoleMatch) (map[Role]RoleMatch, []string) {
	by := map[Role][]RoleMatch{}
	for _, m := range matches {
		by[m.Role] = append(by[m.Role], m)
	}
	out := map[Role]RoleMatch{}
	var amb []string
	roles := make([]string, 0, len(by))
	for r := range by {
		roles = append(roles, string(r))
	}
	sort.Strings(roles)
	for _, rs := range roles {
		r := Role(rs)
		ms := by[r]
		var strong, weak, weakest []RoleMatch
		for _, m := range ms {
			switch {
			case m.ByLongName:
				weakest = append(weakest, m)
			case m.ByName:
				weak = append(weak, m)
			default:
				strong = append(strong, m)
			}
		}
		pick := strong
		if len(pick) == 0 {
			pick = weak
		}
		if len(pick) == 0 {
			pick = weakest
		}
		if len(pick) == 1 {
			out[r] = pick[0]
			continue
		}
		names := make([]string, len(pick))
		for i, m := range pick {
			names[i] = m.Var
		}
		amb = append(amb, "role "+string(r)+" is ambiguous: variables "+strings.Join(names, ", ")+
			" all qualify; name the one to use in the study (variables."+string(r)+": NAME)")
	}
	return out, amb
}

// levelsOK says whether a variable with (hasLevels) or without a pressure
// axis may fill role r, by the one role table of package vocab
// ([vocab.RoleVertical]): PressureLevels roles need the axis, SingleLevel
// roles must not have it, AtLevel and SurfaceOrLevels roles take either.
func levelsOK(r Role, hasLevels bool) bool {
	switch v, _ := vocab.RoleVertical(string(r)); v {
	case vocab.PressureLevels:
		return hasLevels
	case vocab.SingleLevel:
		return !hasLevels
	}
	return true
}
