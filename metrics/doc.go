// Package metrics computes lower-tropospheric stability metrics for one
// atmospheric column or for a whole 2-D slab of columns: potential
// temperature, saturation vapour pressure and humidity conversions, the two
// moist-adiabatic gradients, hypsometric thickness, the lifting condensation
// level (LCL), lower-tropospheric stability (LTS), estimated inversion
// strength (EIS) and the estimated cloud-top entrainment index (ECTEI).
//
// # Units
//
// Every function takes and returns SI units: temperature in K, pressure in
// Pa, humidity in kg/kg (specific humidity, mixing ratio) or as a fraction
// 0–1 (relative humidity), height in m, lapse rates in K m-1. Nothing in this
// package converts units; callers use package units for that.
//
// # Choices that change the number
//
// Published EIS values differ by a few tenths of a kelvin depending on the
// constants, the saturation-vapour-pressure formula, the LCL method, where
// the moist lapse rate is evaluated, and the surface pressure and humidity
// assumed. Every such choice is a field of [Conventions]; [Conventions.Text] gives a
// stable one-line description to store in output metadata, and
// [DefaultConventions] documents the defaults.
//
// # Kernels
//
// [Kernel.Slab] and [Kernel.Slab64] compute a whole 2-D slab from float32
// inputs into caller-owned slices without allocating. A NaN in any input a
// column uses gives NaN in every output of that column, and so does a
// physically impossible input (counted separately in [SlabStats]).
// [Kernel.Column] computes one column with every intermediate value and a
// descriptive error, for the command line and for checking.
//
// # References
//
//   - Bolton, D., 1980: The computation of equivalent potential temperature.
//     Mon. Wea. Rev., 108, 1046–1053.
//   - Kawai, H., T. Koshiro and M. J. Webb, 2017: Interpretation of factors
//     controlling low cloud cover and low cloud feedback using a unified
//     predictive index. J. Climate, 30, 9119–9131.
//   - Klein, S. A. and D. L. Hartmann, 1993: The seasonal cycle of low
//     stratiform clouds. J. Climate, 6, 1587–1606.
//   - Lawrence, M. G., 2005: The relationship between relative humidity and
//     the dewpoint temperature in moist air. Bull. Amer. Meteor. Soc., 86,
//     225–233.
//   - Murphy, D. M. and T. Koop, 2005: Review of the vapour pressures of ice
//     and supercooled water for atmospheric applications. Q. J. R. Meteorol.
//     Soc., 131, 1539–1565.
//   - Romps, D. M., 2017: Exact expression for the lifting condensation
//     level. J. Atmos. Sci., 74, 3891–3900.
//   - Wood, R. and C. S. Bretherton, 2006: On the relationship between
//     stratiform low cloud cover and lower-tropospheric stability. J.
//     Climate, 19, 6425–6432.
//   - American Meteorological Society, Glossary of Meteorology:
//     "moist-adiabatic lapse rate".
package metrics
