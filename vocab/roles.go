package vocab

import "lidscope/metrics"

// Input role names: what lidscope reads a variable for. They are the keys
// of a study's inputs section and the role column of provenance. Package
// cf's Role constants take their values from here.
const (
	RoleSST                   = "sst"
	RoleAirTemperature        = "air_temperature"
	RoleSurfaceAirTemperature = "surface_air_temperature"
	RoleLowCloud              = "low_cloud"
	RoleCloud                 = "cloud"
	RoleTOASWUp               = "toa_sw_up"
	RoleOLR                   = "olr"
	RoleOmega                 = "omega"
	RoleSurfacePressure       = "surface_pressure"
	RoleSeaLevelPressure      = "sea_level_pressure"
	RoleRelativeHumidity      = "relative_humidity"
	RoleDewPointTemperature   = "dew_point_temperature"
	RoleSpecificHumidity      = "specific_humidity"
	RoleSeaFraction           = "sea_fraction"
	RoleLandFraction          = "land_fraction"
	RoleSeaIce                = "sea_ice"
	RolePrecipitation         = "precipitation"
	// RoleEastwardWind and RoleNorthwardWind are the near-surface (e.g.
	// 10 m) wind components, CF standard names eastward_wind and
	// northward_wind: the factors t_adv and wind_speed.
	RoleEastwardWind  = "eastward_wind"
	RoleNorthwardWind = "northward_wind"
)

// Vertical is where in the column a role's field lies: the one table of
// levels that reading (config's default specs), cf's role matching and
// cf's inspect all use.
type Vertical int

const (
	// SingleLevel: a surface, near-surface or column field; a variable
	// with a pressure axis does not fill the role.
	SingleLevel Vertical = iota + 1
	// PressureLevels: on pressure levels only, read at the role's level
	// (air_temperature: T700).
	PressureLevels
	// AtLevel: read at the role's level, from a pressure axis or from a
	// single-level field at that level (a scalar pressure coordinate, CF
	// §5.7): omega, read as omega500.
	AtLevel
	// SurfaceOrLevels: near-surface and single level by default (the
	// surface humidity of the LCL: hurs, huss); on pressure levels when a
	// use asks for a level, then at the role's level by default (rh700,
	// q700 of ECTEI).
	SurfaceOrLevels
)

// roleLevels holds the roles that are not SingleLevel, with the pressure
// (Pa) each is read at from a pressure axis. 700 hPa for T700 (Klein and
// Hartmann 1993; Wood and Bretherton 2006), for the 700-hPa humidity of
// ECTEI (Kawai et al. 2017) and for rh700; 500 hPa for omega500 (Bony et
// al. 2004).
var roleLevels = map[string]struct {
	v  Vertical
	pa float64
}{
	RoleAirTemperature:   {PressureLevels, metrics.P700},
	RoleOmega:            {AtLevel, 50000},
	RoleRelativeHumidity: {SurfaceOrLevels, metrics.P700},
	RoleSpecificHumidity: {SurfaceOrLevels, metrics.P700},
}

// RoleVertical returns where role's field lies and the pressure, Pa, at
// which it is read from a pressure axis (0 for SingleLevel roles and
// names that are not roles).
func RoleVertical(role string) (Vertical, float64) {
	if l, ok := roleLevels[role]; ok {
		return l.v, l.pa
	}
	return SingleLevel, 0
}

// DefaultLevel is the pressure, Pa, at which a role is read when no use
// asks for a level: the role's level for PressureLevels and AtLevel
// roles, 0 (single level) otherwise.
func DefaultLevel(role string) float64 {
	switch v, pa := RoleVertical(role); v {
	case PressureLevels, AtLevel:
		return pa
	}
	return 0
}
