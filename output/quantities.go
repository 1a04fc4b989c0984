package output

import (
	"fmt"
	"sort"
	"strings"
)

// TimeAxisClimatology is the time_axis global attribute of a run over a
// 12-month climatology.
const TimeAxisClimatology = "12-month climatology: the time stamps stand for the calendar months January … December, not for dates"

// quantity is what the output files say about one accumulated quantity.
type quantity struct {
	Units        string // UDUNITS-2 string of the SI values the accumulator holds
	LongName     string
	StandardName string  // CF standard name, "" when the table has none
	PressurePa   float64 // single pressure level of the quantity (scalar coordinate), 0 if none
}

// quantities maps the quantity names of accumulate.Layout to their units
// and names. Units are those the accumulator holds (SI, as package
// accumulate says). Standard names are from the CF Standard Name Table
// (from memory; the same names package cf recognises on input). LTS, EIS and
// ECTEI have no standard name; their long names cite the definitions:
// LTS = θ700 − θsurface (Klein & Hartmann 1993, J. Climate 6, 1587–1606),
// EIS (Wood & Bretherton 2006, J. Climate 19, 6425–6432, eq. 4),
// ECTEI (Kawai, Koshiro & Webb 2017, J. Climate 30, 9119–9131).
var quantities = map[string]quantity{
	"sst":       {Units: "K", LongName: "sea surface temperature", StandardName: "sea_surface_temperature"},
	"t700":      {Units: "K", LongName: "air temperature at 700 hPa", StandardName: "air_temperature", PressurePa: 70000},
	"lts":       {Units: "K", LongName: "lower-tropospheric stability (potential temperature at 700 hPa minus at the surface)"},
	"eis":       {Units: "K", LongName: "estimated inversion strength"},
	"ectei":     {Units: "K", LongName: "estimated cloud-top entrainment index"},
	"cloud":     {Units: "1", LongName: "total cloud area fraction", StandardName: "cloud_area_fraction"},
	"low_cloud": {Units: "1", LongName: "low-type cloud area fraction", StandardName: "low_type_cloud_area_fraction"},
	"toa_sw_up": {Units: "W m-2", LongName: "outgoing shortwave flux at the top of the atmosphere", StandardName: "toa_outgoing_shortwave_flux"},
	"olr":       {Units: "W m-2", LongName: "outgoing longwave flux at the top of the atmosphere", StandardName: "toa_outgoing_longwave_flux"},
	"omega":     {Units: "Pa s-1", LongName: "vertical pressure velocity (omega)", StandardName: "lagrangian_tendency_of_air_pressure"},
}

// KnownQuantities lists the quantity names Write accepts, sorted.
func KnownQuantities() []string {
	out := make([]string, 0, len(quantities))
	for k := range quantities {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// lookupQuantity returns the table entry of name, or an error that lists the
// names Write knows.
func lookupQuantity(name string) (quantity, error) {
	q, ok := quantities[name]
	if !ok {
		return quantity{}, fmt.Errorf("output: quantity %q in the accumulator's layout has no entry in the output units table (known: %s); add it to output/quantities.go with its units and names", name, strings.Join(KnownQuantities(), ", "))
	}
	return q, nil
}

// QuantityUnits returns the units Write records for a quantity name, e.g.
// "K" for "eis" and "W m-2" for "olr"; ok is false for an unknown name.
func QuantityUnits(name string) (units string, ok bool) {
	q, ok := quantities[name]
	return q.Units, ok
}
