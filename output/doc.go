// Package output writes a run's results: the accumulated regime statistics
// (package accumulate) with the run's provenance, into one directory.
//
// # Files
//
// Write produces six files, each written completely into a hidden staging
// directory (".lidscope-output-*") inside the output directory and moved to
// its final name only when all six are complete:
//
//   - maps.nc: per-column maps over the whole record (CF-1.10, NetCDF-4
//     classic model, written with package cfwrite).
//   - series.nc: time series over the tropical band.
//   - series.csv: the same series, one row per time step.
//   - regions.csv: one row per region × regime.
//   - summary.json: a machine-readable summary.
//   - provenance.json: how the results were made.
//
// # maps.nc
//
// The analysis grid (lat, lon with lat_bnds, lon_bnds from Meta.Grid), a
// time axis of length one standing for the whole record, and the categorical
// axis regime (int coordinate, flag_values 0 1 2, flag_meanings "convective
// transition subsidence"; index k is regimes.All[k]). The time value is the
// middle of the averaging period and time_bnds its ends: from Meta.TimeBounds
// when given; otherwise half a step beyond the first and last time stamps
// (half the spacing to the neighbouring stamp, the rule grid.New uses for
// outer latitude edges; for monthly mid-month stamps this is within about a
// day of the month edges), and a processing note says so. A one-step record
// without bounds has no time_bnds.
//
// Variables, all over (time, lat, lon) or (time, regime, lat, lon):
//
//   - convective_time_fraction, transition_time_fraction,
//     subsidence_time_fraction (1):
//     the fraction of the column's valid time steps (ocean, data present) in
//     each regime; NaN (fill) where the column was never valid.
//   - crossing_rate (yr-1): convective↔subsidence crossings per year of
//     record (record length = steps / Meta.StepsPerYear); the UDUNITS-2 yr is
//     the tropical year, 365.242198781 days (udunits2-common.xml).
//   - convective_dwell, subsidence_dwell: mean run length in the regime
//     (regimes.Track.MeanDwell: runs cut off by the ends of the record
//     included), in units "month" (UDUNITS-2: a twelfth of a year) when
//     Meta.StepsPerYear is 12, else in time steps (units "1", with
//     sampling_frequency saying how long a step is). The unit is in the
//     units attribute, never in the name.
//   - valid_steps (int): time steps in which the column was valid.
//   - rel_sst_mean, rel_sst_std (K): time mean and population standard
//     deviation of SST − tropical-mean SST over the valid steps.
//   - for each quantity q of the layout, q_mean (time, regime, lat, lon) in
//     the quantity's units and q_count (int), the number of steps averaged.
//
// Units come from a table of quantity names (KnownQuantities, QuantityUnits):
// sst, t700, lts, eis, ectei in K; cloud, low_cloud in 1; toa_sw_up, olr in
// W m-2; omega in Pa s-1. An unknown name is an error. Quantities with a CF
// standard name carry it; t700 also names the scalar coordinate p700
// (air_pressure, 70000 Pa; CF-1.10 §5.7).
//
// # cell_methods
//
// Regime-conditioned means are written "time: mean (comment: over the time
// steps in which the column was in the regime given by the regime
// coordinate)", with "interval: 1 month" before the comment for monthly
// data (CF-1.10 §7.3.2). The form "time: mean where convective" is not
// used: in CF-1.10 §7.3.3 the word after "where" is an area type from the
// CF area-type table (e.g. sea, sea_ice) or the name of a string-valued
// area_type coordinate, and a regime of relative SST is neither; the regime
// is instead a coordinate of the variable and the condition is stated in the
// comment, which CF leaves free. Counts are "time: sum" of an indicator,
// fractions "time: mean" of one, the spread "time: standard_deviation".
// In series.nc the band means are "area: mean where sea (comment: ...)",
// sea being an area type.
//
// Global attributes (both NetCDF files) besides those cfwrite writes
// (Conventions, title, source, history from Meta.Command and Meta.End):
// dataset, lidscope_version, study_hash, conventions (the metrics
// conventions text: the study's conventions section resolved; not CF's
// Conventions), regime_definition,
// the regime definition's attributes (regimes.Definition.Attributes:
// regime_rule, delta or percentile, half_width, band [south, north], each
// number typed with its units in NAME_units), period, time_steps (int),
// sampling_frequency (yr-1), regime_index, files (the input files: role,
// path, size, SHA-256), processing_notes,
// quantities (the per-column quantities the run has, space-separated) and
// absent_quantities (what it lacks for want of an optional input: without
// air_temperature there is no t700, lts, eis; without low_cloud or cloud no
// cloud quantity), and time_axis for a run over a 12-month climatology
// (the time stamps stand for calendar months; step labels, in series.csv
// and summary.json, are Jan … Dec). Absent quantities have no variables or
// columns in any file. Empty attributes are left out.
//
// # series.nc and series.csv
//
// series.nc has the time axis of Meta.TimeUnits and Meta.Calendar (with
// time_bnds when Meta.TimeBounds is given) and tropical_mean_sst(time) (K),
// area_fraction(time, regime) (1) and q_band_mean(time, regime) for every
// quantity, area-weighted over the band's valid ocean cells.
//
// series.csv has a header row whose columns carry their units in brackets,
// "name [units]": label, year, month, time [Meta.TimeUnits], date (the time
// value decoded in Meta.Calendar, ISO 8601), tropical_mean_sst [K],
// R_area_fraction [1] and R_q_band_mean [units] for each regime R in the
// order convective, transition, subsidence. Numbers are the shortest text
// that reads back to the same float64; missing values are NaN.
//
// # regions.csv
//
// One row per region and regime: region, regime, the box (south, north
// [degrees_north], west, east [degrees_east]), area_time_fraction [1] (the
// regime's share of the region's valid area × time), rel_sst_mean
// and rel_sst_std [K] (area-weighted over the region and all
// regimes, repeated on each of its rows), and for every quantity q_mean,
// q_std (area-weighted population standard deviation over cells and steps)
// and q_count [1] (number of cell-steps).
//
// # summary.json
//
// An object with "format": "lidscope-summary" and "format_version": 4.
// Every number is written as {"value": x, "units": "K"} ("value": null for
// no data; counts have units "1"). A statistic over a sample is
// {"mean": N, "std": N, "count": N} with those numbers; std is the population
// standard deviation. Keys:
//
//   - dataset, title, lidscope_version, study_hash (strings);
//   - period: label, first and last {label, date, time}, time_steps,
//     sampling_frequency, calendar;
//   - regime_definition: text, rule, delta (null for the percentile rule),
//     half_width, percentile (null for the relative_sst rule), band
//     {south, north}, regime_index;
//   - area_fraction.{convective, transition, subsidence},
//     tropical_mean_sst: statistics over the time
//     steps (steps without valid band ocean left out);
//   - band_mean.Q.R: the mean over the band and the record of
//     quantity Q in regime R, each column's values weighted by its area
//     inside the band (Σ w x / Σ w over columns and steps in the regime);
//     std and count over the same cell-steps;
//   - crossing_rate: mean, the band-area-weighted mean over the columns
//     inside the band that were ever valid ocean, and cells, their number;
//   - regions: [{name, box {south, north, west, east}, rel_sst,
//     regimes.R {area_time_fraction, quantities.Q}}];
//   - notes: what the run converted or dropped, in plain words;
//   - quantities and absent_quantities: as the NetCDF attributes, as lists.
//
// # provenance.json
//
// "format": "lidscope-provenance", "format_version": 4; lidscope_version,
// command, dataset, title, study (the resolved study text), study_hash,
// conventions, regime_definition, files [{role, path, size, modified,
// sha256}], run {start, end (RFC 3339, UTC), duration}, host {os, arch,
// go_version, cpus, netcdf_c_library}, time {units, calendar, time_steps,
// bounds} (the time coordinate), outputs [{name, size, sha256}] for the
// five other files, and notes. Each name is the one the study and the
// NetCDF files use for the same thing (package vocab).
//
// # Atomicity and overwriting
//
// Without Options.Force, Write refuses before writing anything when any of
// the six files exists in the directory (errors.Is(err, fs.ErrExist)), and
// a file that appears while it writes is not replaced. With Force the
// earlier outputs are moved aside and restored if moving the new ones in
// fails. Other files in the directory are never touched. On any error the
// staging directory is removed and no file of the run is left under a final
// name; a killed process leaves at most the hidden staging directory.
package output
