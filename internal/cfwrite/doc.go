// Package cfwrite writes CF-compliant NetCDF-4 files: every lidscope output
// (maps, time series, relationship tables) and the demo's synthetic inputs.
//
// # File layout
//
// Files are NetCDF-4 in the classic data model (HDF5 storage, so zlib
// deflate, the shuffle filter and chunking are available, but only the
// classic types and one unlimited dimension), the form CMIP6 requires of its
// output (common practice; from memory of the CMIP6 file-format rules). Every
// variable that has dimensions is deflated (level 4 unless
// Options.DeflateLevel says otherwise) with the shuffle filter.
//
// Global attributes follow CF-1.10 §2.6.2: Conventions = "CF-1.10", title,
// institution and source as given, and history, whose newest line is an
// ISO-8601 UTC timestamp followed by the command line, then the caller's
// provenance attributes in key order.
//
// Coordinates (CF-1.10 chapter 4 and §7.1):
//
//   - lat(lat), lon(lon): double, units degrees_north / degrees_east,
//     standard_name latitude / longitude, axis Y / X, bounds lat_bnds(lat,bnds)
//     and lon_bnds(lon,bnds), computed from the centres when not given.
//   - plev(plev): optional pressure levels, double, Pa, positive "down",
//     axis Z, standard_name air_pressure.
//   - time(time): double over the unlimited dimension, units
//     "<unit> since <date>" with the caller's calendar, axis T, standard_name
//     time, optional time_bnds(time,bnds).
//   - further axes, e.g. bins of a relationship table, with their own double
//     coordinate variable and bounds, and categorical axes (an int coordinate
//     with flag_values / flag_meanings, CF-1.10 §3.5) such as a regime index.
//   - scalar coordinates (CF-1.10 §5.7), e.g. the 700 hPa level of a map,
//     named by a data variable's coordinates attribute.
//
// Data variables are float32 unless VarSpec.Type asks for float64 or int32,
// and always carry _FillValue. A NaN passed in Go is stored as the fill value.
// The default fill is 1e20 for float types, the value CMIP data use for
// _FillValue and missing_value (common practice; from memory of the CMOR
// defaults); it is stored in the variable's own type (1e20f for float32),
// so readers compare like with like. int32 variables use the netCDF default -2147483647 (NC_FILL_INT). Dimension order
// among T, Z, Y and X is the one CF-1.10 §2.4 recommends (T, Z, Y, X) and is
// enforced; time, when present, is the first dimension.
//
// Chunking: a variable over time and lat or lon is stored one time step per
// chunk, so writing a map per step touches one chunk. Other variables over
// time (time series, tables per step) gather up to 64 KiB of steps per chunk;
// variables without time are one chunk when under 4 MiB, otherwise they are
// split along their outer dimensions. VarSpec.Chunks overrides this.
//
// # Use
//
// Create a Writer, declare the axes and variables (SetGrid, SetLevels,
// SetTime, AddAxis, AddCategories, AddScalarCoord, AddVar), then write:
// AppendTime adds one time value and Var.WriteStep the slab of that step;
// Var.Write writes a whole variable. The first write ends the declarations.
// Close finishes the file.
//
// # Atomicity
//
// Everything is written to a hidden temporary file in the destination
// directory (".NAME.tmp-PID-RANDOM") that Close flushes, syncs to disk and
// renames onto the final name. The first error returned by any method is
// final: the writer removes its temporary file at once, and every later call,
// Close included, returns that error. Abort discards the file on purpose; a
// deferred Abort after a successful Close does nothing, so
//
//	w, err := cfwrite.Create(path, opts)
//	if err != nil { return err }
//	defer w.Abort()
//	... declare and write ...
//	return w.Close()
//
// never leaves a partial file under the final name. A process that is killed
// leaves at most its hidden temporary file. An existing file is replaced only
// when Options.Overwrite is set; otherwise Create fails (errors.Is(err,
// fs.ErrExist)) and so does Close if the file appeared in the meantime.
//
// A Writer may be used from several goroutines; its methods are serialised.
package cfwrite
