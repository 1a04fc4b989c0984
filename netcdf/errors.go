package netcdf

/*
#include <netcdf.h>
*/
import "C"

import (
	"fmt"
	"strings"
)

// Error is an error status returned by the netCDF-C library, with the
// operation and the file and variable or attribute it concerned. Its text
// comes from nc_strerror. Compare with the sentinels below using errors.Is.
type Error struct {
	Code int    // netCDF-C status (negative) or a system errno (positive)
	Op   string // the library call, e.g. "nc_open"
	Path string // file path, if known
	Name string // variable, dimension or attribute name, if any
}

func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString("netcdf: ")
	b.WriteString(e.Op)
	if e.Path != "" {
		b.WriteString(" ")
		b.WriteString(e.Path)
	}
	if e.Name != "" {
		fmt.Fprintf(&b, " (%s)", e.Name)
	}
	b.WriteString(": ")
	b.WriteString(strerror(e.Code))
	return b.String()
}

// Is reports whether target is a netCDF error with the same status code, so
// that errors.Is(err, netcdf.ErrNotVar) works on wrapped errors.
func (e *Error) Is(target error) bool {
	t, ok := target.(*Error)
	return ok && t.Op == "" && t.Code == e.Code
}

// strerror must be called from the executor or with constant codes; nc_strerror
// only indexes a static table, so it is safe anywhere.
func strerror(code int) string {
	return C.GoString(C.nc_strerror(C.int(code)))
}

// Sentinel errors for use with errors.Is.
var (
	ErrNotVar      = &Error{Code: int(C.NC_ENOTVAR)}    // variable not found
	ErrNotAttr     = &Error{Code: int(C.NC_ENOTATT)}    // attribute not found
	ErrNotNetCDF   = &Error{Code: int(C.NC_ENOTNC)}     // not a netCDF file (or truncated)
	ErrBadDim      = &Error{Code: int(C.NC_EBADDIM)}    // dimension not found
	ErrBadType     = &Error{Code: int(C.NC_EBADTYPE)}   // wrong type for the operation
	ErrRange       = &Error{Code: int(C.NC_ERANGE)}     // value out of range for the type
	ErrEdge        = &Error{Code: int(C.NC_EEDGE)}      // start+count beyond the variable's shape
	ErrHDF5        = &Error{Code: int(C.NC_EHDFERR)}    // error inside HDF5 (damaged NetCDF-4 file)
	ErrExists      = &Error{Code: int(C.NC_EEXIST)}     // file exists and may not be overwritten
	ErrNameInUse   = &Error{Code: int(C.NC_ENAMEINUSE)} // dimension/variable/attribute name already defined
	ErrNotInDefine = &Error{Code: int(C.NC_ENOTINDEFINE)}
	ErrInDefine    = &Error{Code: int(C.NC_EINDEFINE)}
	ErrChar        = &Error{Code: int(C.NC_ECHAR)} // numeric read of a text variable
	ErrNoSuchFile  = &Error{Code: 2}               // ENOENT, as nc_open returns it
)

func check(status C.int, op, path, name string) error {
	if status == C.NC_NOERR {
		return nil
	}
	return &Error{Code: int(status), Op: op, Path: path, Name: name}
}
