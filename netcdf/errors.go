package netcdf

/*
#include <netcdf.h>
*/
import "C"

import (
	"errors"
	"fmt"
	"strconv"
	"strings"
	"syscall"
	"unicode"
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
		b.WriteString(quotePath(e.Path))
	}
	if e.Name != "" {
		fmt.Fprintf(&b, " (%s)", e.Name)
	}
	b.WriteString(": ")
	if e.Code > 0 {
		b.WriteString(syscall.Errno(e.Code).Error())
	} else {
		b.WriteString(strerror(e.Code))
	}
	return b.String()
}

// Unwrap gives the system error of a status that is a system errno, so
// that errors.Is(err, syscall.ENOSPC) works.
func (e *Error) Unwrap() error {
	if e.Code > 0 {
		return syscall.Errno(e.Code)
	}
	return nil
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

// ioErrnos are the system errors of a write that the library reports only
// as its own status (NC_EHDFERR, "HDF error", or NC_EIO): a full disk or
// quota, a file too large, an input/output error.
var ioErrnos = []syscall.Errno{syscall.ENOSPC, syscall.EDQUOT, syscall.EFBIG, syscall.EIO}

// checkIO is check for calls that write to disk: when the call failed and
// left one of ioErrnos in errno (cgo clears errno before each call), the
// error is that system error, with the operation and file, so that a full
// disk says "no space left on device" instead of "HDF error".
func checkIO(status C.int, errno error, op, path, name string) error {
	if status == C.NC_NOERR {
		return nil
	}
	var en syscall.Errno
	if errors.As(errno, &en) {
		for _, io := range ioErrnos {
			if en == io {
				return &Error{Code: int(en), Op: op, Path: path, Name: name}
			}
		}
	}
	return check(status, op, path, name)
}

// cStatus converts a status code for checkIO (tests cannot use cgo).
func cStatus(code int) C.int { return C.int(code) }

// quotePath quotes a path that holds control or other unprintable
// characters, so that messages never carry them raw.
func quotePath(p string) string {
	for _, r := range p {
		if r == unicode.ReplacementChar || !unicode.IsPrint(r) {
			return strconv.Quote(p)
		}
	}
	return p
}
