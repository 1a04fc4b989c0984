package vocab

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
