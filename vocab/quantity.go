package vocab

import (
	"fmt"
	"sort"
	"strings"

	"lidscope/metrics"
)

// Source says how a quantity's per-column values come about.
type Source int

const (
	// FromInput: read from the input of Quantity.Roles[0], converted to
	// Quantity.Units by package cf.
	FromInput Source = iota + 1
	// FromKernel: computed per column by the metrics kernel
	// (metrics.Kernel.Slab) into the output slice Quantity.Slab selects.
	FromKernel
	// Derived: computed by lidscope from other quantities (relative SST,
	// the tropical mean); not accumulated as a column quantity.
	Derived
	// FromStep: computed per time step by the pipeline from several
	// input fields (t_adv needs SST's neighbours, wind_speed both wind
	// components), then accumulated as a column quantity.
	FromStep
)

// Quantity is one row of the table of quantities: everything the outputs,
// the study checks and the figures need to know about a physical quantity.
type Quantity struct {
	Name         string // the one name in every output, e.g. "eis"
	Units        string // UDUNITS-2 units of the SI values lidscope holds
	LongName     string // CF long_name
	StandardName string // CF standard name, "" when the CF table has none
	// TemperatureDifference is true for a difference of temperatures
	// (LTS, EIS, ECTEI, relative SST): K, never converted with an offset.
	TemperatureDifference bool
	// PressurePa is the single pressure level of the quantity (a scalar
	// coordinate in NetCDF, CF-1.10 §5.7), 0 if none.
	PressurePa float64
	// Roles are the input roles (RoleSST, …) the quantity needs; for
	// FromInput the first is the input it is read from.
	Roles  []string
	Source Source
	// Slab selects the kernel output slice for a FromKernel quantity.
	Slab func(out *metrics.SlabOutput, dst []float32)
	// Enabled says whether the metrics conventions compute the quantity;
	// nil means always (for FromKernel) or whenever its input is given.
	Enabled func(c metrics.Conventions) bool
	// Switch names the metrics conventions key that turns the quantity on,
	// for messages ("" when always on).
	Switch string
	// Predictor: may be binned and regressed on in the relationship
	// analysis. Response: may be a response there.
	Predictor, Response bool
	// Reference cites the definition (for long names and documentation).
	Reference string
}

// Quantity names.
const (
	SST             = "sst"
	T700            = "t700"
	LTS             = "lts"
	EIS             = "eis"
	ECTEI           = "ectei"
	Cloud           = "cloud"
	LowCloud        = "low_cloud"
	TOASWUp         = "toa_sw_up"
	OLR             = "olr"
	Omega           = "omega"
	Precipitation   = "precipitation"
	RelSST          = "rel_sst"
	TropicalMeanSST = "tropical_mean_sst"
	// Cloud-controlling factors (package factors).
	RH700     = "rh700"
	Omega700  = "omega700"
	TAdv      = "t_adv"
	WindSpeed = "wind_speed"
)

// quantities is the table. Units are those the accumulators hold (SI).
// Standard names are from the CF Standard Name Table (from memory; the
// same names package cf recognises on input). LTS, EIS, ECTEI and relative
// SST have no standard name; the references cite their definitions.
var quantities = []Quantity{
	{Name: SST, Units: "K", LongName: "sea surface temperature", StandardName: "sea_surface_temperature",
		Roles: []string{RoleSST}, Source: FromInput, Predictor: true},
	{Name: T700, Units: "K", LongName: "air temperature at 700 hPa", StandardName: "air_temperature", PressurePa: 70000,
		Roles: []string{RoleAirTemperature}, Source: FromInput, Predictor: true},
	{Name: LTS, Units: "K", LongName: "lower-tropospheric stability (potential temperature at 700 hPa minus at the surface)",
		TemperatureDifference: true, Roles: []string{RoleSST, RoleAirTemperature}, Source: FromKernel,
		Slab: func(o *metrics.SlabOutput, d []float32) { o.LTS = d }, Predictor: true,
		Reference: "Klein & Hartmann 1993, J. Climate 6, 1587–1606"},
	{Name: EIS, Units: "K", LongName: "estimated inversion strength",
		TemperatureDifference: true, Roles: []string{RoleSST, RoleAirTemperature}, Source: FromKernel,
		Slab: func(o *metrics.SlabOutput, d []float32) { o.EIS = d }, Predictor: true,
		Reference: "Wood & Bretherton 2006, J. Climate 19, 6425–6432, eq. 4"},
	{Name: ECTEI, Units: "K", LongName: "estimated cloud-top entrainment index",
		TemperatureDifference: true, Roles: []string{RoleSST, RoleAirTemperature, RoleSpecificHumidity}, Source: FromKernel,
		Slab:    func(o *metrics.SlabOutput, d []float32) { o.ECTEI = d },
		Enabled: func(c metrics.Conventions) bool { return c.ECTEI }, Switch: "conventions.ectei", Predictor: true,
		Reference: "Kawai, Koshiro & Webb 2017, J. Climate 30, 9119–9131"},
	{Name: Cloud, Units: "1", LongName: "total cloud area fraction", StandardName: "cloud_area_fraction",
		Roles: []string{RoleCloud}, Source: FromInput, Response: true},
	{Name: LowCloud, Units: "1", LongName: "low-type cloud area fraction", StandardName: "low_type_cloud_area_fraction",
		Roles: []string{RoleLowCloud}, Source: FromInput, Response: true},
	{Name: TOASWUp, Units: "W m-2", LongName: "outgoing shortwave flux at the top of the atmosphere", StandardName: "toa_outgoing_shortwave_flux",
		Roles: []string{RoleTOASWUp}, Source: FromInput, Response: true},
	{Name: OLR, Units: "W m-2", LongName: "outgoing longwave flux at the top of the atmosphere", StandardName: "toa_outgoing_longwave_flux",
		Roles: []string{RoleOLR}, Source: FromInput, Response: true},
	{Name: Omega, Units: "Pa s-1", LongName: "vertical pressure velocity (omega)", StandardName: "lagrangian_tendency_of_air_pressure",
		Roles: []string{RoleOmega}, Source: FromInput, Response: true},
	{Name: Precipitation, Units: "kg m-2 s-1", LongName: "precipitation flux", StandardName: "precipitation_flux",
		Roles: []string{RolePrecipitation}, Source: FromInput, Response: true},
	{Name: RH700, Units: "1", LongName: "relative humidity at 700 hPa", StandardName: "relative_humidity", PressurePa: 70000,
		Roles: []string{RoleRelativeHumidity}, Source: FromInput}, // or from specific humidity and T700 (metrics.SVPFormula.RelativeHumidityQ)
	{Name: Omega700, Units: "Pa s-1", LongName: "vertical pressure velocity (omega) at 700 hPa", StandardName: "lagrangian_tendency_of_air_pressure", PressurePa: 70000,
		Roles: []string{RoleOmega}, Source: FromInput},
	{Name: TAdv, Units: "K s-1", LongName: "near-surface horizontal advection of SST, -(u dSST/dx + v dSST/dy)",
		Roles: []string{RoleSST, RoleEastwardWind, RoleNorthwardWind}, Source: FromStep,
		Reference: "Qu et al. 2015, Clim. Dyn. 45, 375–396; Myers & Norris 2016, GRL 43, 2144–2148"},
	{Name: WindSpeed, Units: "m s-1", LongName: "near-surface wind speed", StandardName: "wind_speed",
		Roles: []string{RoleEastwardWind, RoleNorthwardWind}, Source: FromStep},
	{Name: RelSST, Units: "K", LongName: "relative SST (SST minus tropical-mean SST)",
		TemperatureDifference: true, Roles: []string{RoleSST}, Source: Derived, Predictor: true},
	{Name: TropicalMeanSST, Units: "K", LongName: "tropical-mean sea surface temperature", StandardName: "sea_surface_temperature",
		Roles: []string{RoleSST}, Source: Derived},
}

// Quantities returns the table of quantities, in table order (the order
// of the accumulated column quantities in every output).
func Quantities() []Quantity { return append([]Quantity(nil), quantities...) }

// Lookup returns the row of a quantity name.
func Lookup(name string) (Quantity, bool) {
	for _, q := range quantities {
		if q.Name == name {
			return q, true
		}
	}
	return Quantity{}, false
}

// MustLookup returns the row of a quantity name or an error that lists the
// names the table knows and says where to add one.
func MustLookup(name string) (Quantity, error) {
	if q, ok := Lookup(name); ok {
		return q, nil
	}
	return Quantity{}, fmt.Errorf("quantity %q is not in the table of names (known: %s); add a row to vocab/quantity.go", name, strings.Join(QuantityNames(), ", "))
}

// QuantityNames lists every quantity name, sorted.
func QuantityNames() []string {
	out := make([]string, 0, len(quantities))
	for _, q := range quantities {
		out = append(out, q.Name)
	}
	sort.Strings(out)
	return out
}

// ColumnQuantities lists the names of the quantities that are accumulated
// per column (read from an input or computed by the kernel), sorted.
func ColumnQuantities() []string {
	var out []string
	for _, q := range quantities {
		if q.Source != Derived {
			out = append(out, q.Name)
		}
	}
	sort.Strings(out)
	return out
}

// Units returns the units of a quantity name; ok is false for an unknown
// name.
func Units(name string) (units string, ok bool) {
	q, ok := Lookup(name)
	return q.Units, ok
}

// Predictors lists the quantity names that may be predictors in the
// relationship analysis, in table order.
func Predictors() []string {
	var out []string
	for _, q := range quantities {
		if q.Predictor {
			out = append(out, q.Name)
		}
	}
	return out
}

// Computed lists the FromKernel quantities the conventions compute, in
// table order.
func Computed(c metrics.Conventions) []Quantity {
	var out []Quantity
	for _, q := range quantities {
		if q.Source != FromKernel {
			continue
		}
		if q.Enabled == nil || q.Enabled(c) {
			out = append(out, q)
		}
	}
	return out
}

// IsEnabled reports whether the conventions compute q (true for quantities
// that are not computed by the kernel).
func (q Quantity) IsEnabled(c metrics.Conventions) bool {
	return q.Enabled == nil || q.Enabled(c)
}
