// Package vocab is lidscope's one table of names: every NetCDF variable
// and attribute, CSV header, JSON key, figure label and console word that
// lidscope writes is made of its terms. It sits below every package that
// writes (output, relations, compare, figures, analysis) and imports only
// metrics.
//
// # Quantities
//
// One row per physical quantity (Quantities, Lookup): its name, units
// (UDUNITS-2, SI as the accumulators hold them), CF long_name and
// standard_name (where the CF table has one), whether it is a temperature
// difference, the input roles it needs, and how it is computed (read from
// an input, computed by the metrics kernel into the SlabOutput slice that
// Quantity.Slab selects, or derived), whether the metrics conventions turn
// it on (Enabled, Switch), and whether it may be a predictor or a response
// of the relationship analysis:
//
//	sst, t700                      K      from input (sst, air_temperature)
//	lts, eis, ectei                K      kernel (ectei with metrics.ectei)
//	cloud, low_cloud               1      from input
//	toa_sw_up, olr                 W m-2  from input
//	omega                          Pa s-1 from input
//	precipitation                  kg m-2 s-1
//	rel_sst, tropical_mean_sst     K      derived
//
// # Names
//
// A name is terms joined by "_" (Check): a quantity, a regime
// (convective, transition, subsidence; regime first: subsidence_eis_mean),
// a statistic (mean, std, stderr, count, n_eff, ci_lower, ci_upper,
// lag1_autocorrelation, difference, bias, pattern_correlation,
// centred_rms_difference, slope, intercept, r, r2), a regime-definition
// name (delta, half_width, percentile, band, regime_definition,
// regime_rule, regime_index), the relationship analysis (relationships_…),
// a verdict word (within, outside, untested; pass, fail; mismatch) or one
// of the words listed in names.go. Units are never terms: they go in the
// units attribute (NAME_units for a number attribute), the CSV header's
// [units] or the JSON units field; SlopeUnits spells a slope's units the
// one way (K-1, W m-2 K-1).
//
// # Adding a quantity
//
// A new metric is its physics function in metrics (with the kernel slice it
// fills) and one row in quantities (quantity.go): outputs, units, predictor
// checks and long names follow from the row.
package vocab
