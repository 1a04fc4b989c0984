// Package netcdf is a small cgo binding to the C netCDF library
// (Unidata netCDF-C, Debian package libnetcdf-dev, pkg-config name "netcdf").
//
// It covers what lidscope needs: opening files of every on-disk format
// (classic, 64-bit offset, CDF5, NetCDF-4/HDF5), inquiring dimensions
// (including unlimited ones), variables and attributes of every type,
// hyperslab reads into caller-owned float32/float64 slices, and creating
// NetCDF-4 files with chunking and deflate+shuffle compression.
//
// Thread safety: netCDF-C is not thread-safe, so every library call made by
// this package runs on one goroutine locked to one OS thread (see exec.go).
// All exported functions and methods may be called from any goroutine. A path
// opened for reading is opened once per process and shared by every Open of
// the same path; the handle is closed when the last File is closed.
// Groups are not supported: variables are looked up in the root group.
package netcdf

/*
#cgo pkg-config: netcdf
#include <stdlib.h>
#include <netcdf.h>
*/
import "C"

import (
	"fmt"
	"path/filepath"
	"sync"
	"unsafe"
)

// Type is a netCDF external data type.
type Type int

// The netCDF data types.
const (
	Byte   Type = C.NC_BYTE
	Char   Type = C.NC_CHAR
	Short  Type = C.NC_SHORT
	Int    Type = C.NC_INT
	Float  Type = C.NC_FLOAT
	Double Type = C.NC_DOUBLE
	UByte  Type = C.NC_UBYTE
	UShort Type = C.NC_USHORT
	UInt   Type = C.NC_UINT
	Int64  Type = C.NC_INT64
	UInt64 Type = C.NC_UINT64
	String Type = C.NC_STRING
)

func (t Type) String() string {
	switch t {
	case Byte:
		return "byte"
	case Char:
		return "char"
	case Short:
		return "short"
	case Int:
		return "int"
	case Float:
		return "float"
	case Double:
		return "double"
	case UByte:
		return "ubyte"
	case UShort:
		return "ushort"
	case UInt:
		return "uint"
	case Int64:
		return "int64"
	case UInt64:
		return "uint64"
	case String:
		return "string"
	}
	return fmt.Sprintf("type%d", int(t))
}

// Numeric reports whether values of the type can be read as numbers.
func (t Type) Numeric() bool { return t != Char && t != String && t >= Byte && t <= UInt64 }

// Format is the on-disk format of a file.
type Format int

// On-disk formats.
const (
	FormatClassic        Format = C.NC_FORMAT_CLASSIC
	Format64BitOffset    Format = C.NC_FORMAT_64BIT_OFFSET
	FormatCDF5           Format = C.NC_FORMAT_CDF5
	FormatNetCDF4        Format = C.NC_FORMAT_NETCDF4
	FormatNetCDF4Classic Format = C.NC_FORMAT_NETCDF4_CLASSIC
)

func (f Format) String() string {
	switch f {
	case FormatClassic:
		return "classic"
	case Format64BitOffset:
		return "64-bit offset"
	case FormatCDF5:
		return "CDF5 (64-bit data)"
	case FormatNetCDF4:
		return "NetCDF-4"
	case FormatNetCDF4Classic:
		return "NetCDF-4 classic model"
	}
	return fmt.Sprintf("format%d", int(f))
}

// Dim is a dimension.
type Dim struct {
	ID        int
	Name      string
	Len       int // current length (for an unlimited dimension: records written so far)
	Unlimited bool
}

// shared is one open netCDF id, shared by every File opened on the same path.
type shared struct {
	ncid  C.int
	path  string
	refs  int
	write bool
}

var (
	regMu    sync.Mutex
	registry = map[string]*shared{}
)

// File is an open netCDF file (or a shared reference to one).
type File struct {
	h      *shared
	closed bool
}

// Open opens path read-only. Opening a path that is already open in this
// process returns another reference to the same library handle.
func Open(path string) (*File, error) {
	abs, err := filepath.Abs(path)
	if err != nil {
		abs = path
	}
	regMu.Lock()
	defer regMu.Unlock()
	if h, ok := registry[abs]; ok && !h.write {
		h.refs++
		return &File{h: h}, nil
	}
	var ncid C.int
	var status C.int
	cpath := C.CString(path)
	defer C.free(unsafe.Pointer(cpath))
	do(func() { status = C.nc_open(cpath, C.NC_NOWRITE, &ncid) })
	if err := check(status, "nc_open", path, ""); err != nil {
		return nil, err
	}
	h := &shared{ncid: ncid, path: path, refs: 1}
	registry[abs] = h
	return &File{h: h}, nil
}

// Create creates a NetCDF-4 (HDF5-based) file at path, overwriting any
// existing file, and leaves it in define mode.
func Create(path string) (*File, error) { return CreateFormat(path, FormatNetCDF4) }

// CreateFormat creates a file of the given on-disk format, overwriting any
// existing file, and leaves it in define mode.
func CreateFormat(path string, format Format) (*File, error) {
	var mode C.int = C.NC_CLOBBER
	switch format {
	case FormatClassic:
	case Format64BitOffset:
		mode |= C.NC_64BIT_OFFSET
	case FormatCDF5:
		mode |= C.NC_CDF5
	case FormatNetCDF4:
		mode |= C.NC_NETCDF4
	case FormatNetCDF4Classic:
		mode |= C.NC_NETCDF4 | C.NC_CLASSIC_MODEL
	default:
		return nil, fmt.Errorf("netcdf: create %s: unknown format %v", path, format)
	}
	abs, err := filepath.Abs(path)
	if err != nil {
		abs = path
	}
	regMu.Lock()
	defer regMu.Unlock()
	if _, ok := registry[abs]; ok {
		return nil, fmt.Errorf("netcdf: create %s: the file is open in this process; close it first", path)
	}
	cpath := C.CString(path)
	defer C.free(unsafe.Pointer(cpath))
	var ncid, status C.int
	var errno error
	do(func() { status, errno = C.nc_create(cpath, mode, &ncid) })
	if err := checkIO(status, errno, "nc_create", path, ""); err != nil {
		return nil, err
	}
	h := &shared{ncid: ncid, path: path, refs: 1, write: true}
	registry[abs] = h
	return &File{h: h}, nil
}

// Path is the path the file was opened with.
func (f *File) Path() string { return f.h.path }

// Close releases this reference; the library handle is closed (and, for a
// file being written, flushed) when the last reference is released.
func (f *File) Close() error {
	if f.closed {
		return nil
	}
	f.closed = true
	regMu.Lock()
	defer regMu.Unlock()
	f.h.refs--
	if f.h.refs > 0 {
		return nil
	}
	for k, v := range registry {
		if v == f.h {
			delete(registry, k)
		}
	}
	var status C.int
	var errno error
	do(func() { status, errno = C.nc_close(f.h.ncid) })
	return checkIO(status, errno, "nc_close", f.h.path, "")
}

func (f *File) ncid() C.int { return f.h.ncid }

// Format returns the file's on-disk format.
func (f *File) Format() (Format, error) {
	var fm, status C.int
	do(func() { status = C.nc_inq_format(f.ncid(), &fm) })
	return Format(fm), check(status, "nc_inq_format", f.h.path, "")
}

// Dims returns every dimension of the root group, in id order.
func (f *File) Dims() ([]Dim, error) {
	var dims []Dim
	var err error
	do(func() {
		var nd C.int
		if err = check(C.nc_inq_ndims(f.ncid(), &nd), "nc_inq_ndims", f.h.path, ""); err != nil {
			return
		}
		ids := make([]C.int, nd)
		if nd > 0 {
			if err = check(C.nc_inq_dimids(f.ncid(), &nd, &ids[0], 0), "nc_inq_dimids", f.h.path, ""); err != nil {
				return
			}
		}
		unl := f.unlimitedLocked()
		for _, id := range ids {
			var d Dim
			if d, err = f.dimLocked(id, unl); err != nil {
				return
			}
			dims = append(dims, d)
		}
	})
	return dims, err
}

// unlimitedLocked returns the set of unlimited dimension ids (executor only).
func (f *File) unlimitedLocked() map[C.int]bool {
	out := map[C.int]bool{}
	var n C.int
	if C.nc_inq_unlimdims(f.ncid(), &n, nil) != C.NC_NOERR || n == 0 {
		return out
	}
	ids := make([]C.int, n)
	if C.nc_inq_unlimdims(f.ncid(), &n, &ids[0]) != C.NC_NOERR {
		return out
	}
	for _, id := range ids {
		out[id] = true
	}
	return out
}

func (f *File) dimLocked(id C.int, unl map[C.int]bool) (Dim, error) {
	var name [C.NC_MAX_NAME + 1]C.char
	var n C.size_t
	if err := check(C.nc_inq_dim(f.ncid(), id, &name[0], &n), "nc_inq_dim", f.h.path, ""); err != nil {
		return Dim{}, err
	}
	return Dim{ID: int(id), Name: C.GoString(&name[0]), Len: int(n), Unlimited: unl[id]}, nil
}

// Var is a variable of an open file. Its Dims are those at lookup time.
type Var struct {
	f     *File
	id    C.int
	Name  string
	Type  Type
	Dims  []Dim
	NAtts int
}

// Shape returns the dimension lengths at lookup time.
func (v *Var) Shape() []int {
	s := make([]int, len(v.Dims))
	for i, d := range v.Dims {
		s[i] = d.Len
	}
	return s
}

// File returns the file the variable belongs to.
func (v *Var) File() *File { return v.f }

// Var looks up a variable by name.
func (f *File) Var(name string) (*Var, error) {
	var v *Var
	var err error
	cname := C.CString(name)
	defer C.free(unsafe.Pointer(cname))
	do(func() {
		var id C.int
		if err = check(C.nc_inq_varid(f.ncid(), cname, &id), "nc_inq_varid", f.h.path, name); err != nil {
			return
		}
		v, err = f.varLocked(id, f.unlimitedLocked())
	})
	return v, err
}

// Vars returns every variable of the root group, in id order.
func (f *File) Vars() ([]*Var, error) {
	var vars []*Var
	var err error
	do(func() {
		var nv C.int
		if err = check(C.nc_inq_nvars(f.ncid(), &nv), "nc_inq_nvars", f.h.path, ""); err != nil {
			return
		}
		unl := f.unlimitedLocked()
		for id := C.int(0); id < nv; id++ {
			var v *Var
			if v, err = f.varLocked(id, unl); err != nil {
				return
			}
			vars = append(vars, v)
		}
	})
	return vars, err
}

func (f *File) varLocked(id C.int, unl map[C.int]bool) (*Var, error) {
	var name [C.NC_MAX_NAME + 1]C.char
	var xtype C.nc_type
	var ndims, natts C.int
	if err := check(C.nc_inq_var(f.ncid(), id, &name[0], &xtype, &ndims, nil, &natts), "nc_inq_var", f.h.path, ""); err != nil {
		return nil, err
	}
	v := &Var{f: f, id: id, Name: C.GoString(&name[0]), Type: Type(xtype), NAtts: int(natts)}
	if ndims > 0 {
		ids := make([]C.int, ndims)
		if err := check(C.nc_inq_vardimid(f.ncid(), id, &ids[0]), "nc_inq_vardimid", f.h.path, v.Name); err != nil {
			return nil, err
		}
		for _, did := range ids {
			d, err := f.dimLocked(did, unl)
			if err != nil {
				return nil, err
			}
			v.Dims = append(v.Dims, d)
		}
	}
	return v, nil
}

// sizes checks start/count against the variable rank and the destination length.
func (v *Var) sizes(start, count []int, n int) ([]C.size_t, []C.size_t, error) {
	if len(start) != len(v.Dims) || len(count) != len(v.Dims) {
		return nil, nil, fmt.Errorf("netcdf: %s variable %s has %d dimensions, got start %v count %v", v.f.h.path, v.Name, len(v.Dims), start, count)
	}
	total := 1
	cs := make([]C.size_t, len(start)+1) // +1 so &cs[0] is valid for scalars
	cc := make([]C.size_t, len(count)+1)
	for i := range start {
		if start[i] < 0 || count[i] < 0 {
			return nil, nil, fmt.Errorf("netcdf: %s variable %s: negative start %v or count %v", v.f.h.path, v.Name, start, count)
		}
		cs[i] = C.size_t(start[i])
		cc[i] = C.size_t(count[i])
		total *= count[i]
	}
	if total != n {
		return nil, nil, fmt.Errorf("netcdf: %s variable %s: buffer holds %d values, hyperslab %v has %d", v.f.h.path, v.Name, n, count, total)
	}
	return cs, cc, nil
}

// slab transfers n values between Go memory and the hyperslab start/count:
// it checks the sizes, does nothing for an empty slab, and otherwise runs
// call (one nc_get_vara_* or nc_put_vara_*, named op in errors) on the
// netCDF thread with the C start and count arrays.
func (v *Var) slab(start, count []int, n int, op string, call func(start, count *C.size_t) (C.int, error)) error {
	cs, cc, err := v.sizes(start, count, n)
	if err != nil {
		return err
	}
	if n == 0 {
		return nil
	}
	var status C.int
	var errno error
	do(func() { status, errno = call(&cs[0], &cc[0]) })
	return checkIO(status, errno, op, v.f.h.path, v.Name)
}

// ReadFloat64 reads the hyperslab start/count into dst (len(dst) must equal
// the product of count), converting from the variable's type. Values are raw:
// no unpacking or fill masking is done here (see package cf).
func (v *Var) ReadFloat64(start, count []int, dst []float64) error {
	return v.slab(start, count, len(dst), "nc_get_vara_double", func(cs, cc *C.size_t) (C.int, error) {
		st, errno := C.nc_get_vara_double(v.f.ncid(), v.id, cs, cc, (*C.double)(unsafe.Pointer(&dst[0])))
		return st, errno
	})
}

// ReadFloat32 reads the hyperslab start/count into dst, like ReadFloat64.
func (v *Var) ReadFloat32(start, count []int, dst []float32) error {
	return v.slab(start, count, len(dst), "nc_get_vara_float", func(cs, cc *C.size_t) (C.int, error) {
		st, errno := C.nc_get_vara_float(v.f.ncid(), v.id, cs, cc, (*C.float)(unsafe.Pointer(&dst[0])))
		return st, errno
	})
}

// ReadAllFloat64 reads the whole variable (for coordinates and small variables).
func (v *Var) ReadAllFloat64() ([]float64, error) {
	shape := v.Shape()
	n := 1
	for _, s := range shape {
		n *= s
	}
	dst := make([]float64, n)
	return dst, v.ReadFloat64(make([]int, len(shape)), shape, dst)
}

// WriteFloat64 writes src to the hyperslab start/count (file in data mode).
func (v *Var) WriteFloat64(start, count []int, src []float64) error {
	return v.slab(start, count, len(src), "nc_put_vara_double", func(cs, cc *C.size_t) (C.int, error) {
		st, errno := C.nc_put_vara_double(v.f.ncid(), v.id, cs, cc, (*C.double)(unsafe.Pointer(&src[0])))
		return st, errno
	})
}

// WriteFloat32 writes src to the hyperslab start/count (file in data mode).
func (v *Var) WriteFloat32(start, count []int, src []float32) error {
	return v.slab(start, count, len(src), "nc_put_vara_float", func(cs, cc *C.size_t) (C.int, error) {
		st, errno := C.nc_put_vara_float(v.f.ncid(), v.id, cs, cc, (*C.float)(unsafe.Pointer(&src[0])))
		return st, errno
	})
}

// Unlimited is the length to pass to DefDim for an unlimited dimension.
const Unlimited = 0

// DefDim defines a dimension (file in define mode); n = Unlimited makes it unlimited.
func (f *File) DefDim(name string, n int) (Dim, error) {
	cname := C.CString(name)
	defer C.free(unsafe.Pointer(cname))
	var id, status C.int
	size := C.size_t(n)
	if n == Unlimited {
		size = C.NC_UNLIMITED
	}
	do(func() { status = C.nc_def_dim(f.ncid(), cname, size, &id) })
	if err := check(status, "nc_def_dim", f.h.path, name); err != nil {
		return Dim{}, err
	}
	return Dim{ID: int(id), Name: name, Len: n, Unlimited: n == Unlimited}, nil
}

// DefVar defines a variable over the named dimensions (file in define mode).
func (f *File) DefVar(name string, t Type, dims []string) (*Var, error) {
	cname := C.CString(name)
	defer C.free(unsafe.Pointer(cname))
	var v *Var
	var err error
	do(func() {
		ids := make([]C.int, len(dims)+1)
		unl := f.unlimitedLocked()
		var ds []Dim
		for i, dn := range dims {
			cd := C.CString(dn)
			st := C.nc_inq_dimid(f.ncid(), cd, &ids[i])
			C.free(unsafe.Pointer(cd))
			if err = check(st, "nc_inq_dimid", f.h.path, dn); err != nil {
				return
			}
			var d Dim
			if d, err = f.dimLocked(ids[i], unl); err != nil {
				return
			}
			ds = append(ds, d)
		}
		var id C.int
		if err = check(C.nc_def_var(f.ncid(), cname, C.nc_type(t), C.int(len(dims)), &ids[0], &id), "nc_def_var", f.h.path, name); err != nil {
			return
		}
		v = &Var{f: f, id: id, Name: name, Type: t, Dims: ds}
	})
	return v, err
}

// SetChunking sets the chunk sizes of a NetCDF-4 variable (define mode).
func (v *Var) SetChunking(chunks []int) error {
	if len(chunks) != len(v.Dims) {
		return fmt.Errorf("netcdf: %s variable %s has %d dimensions, got %d chunk sizes", v.f.h.path, v.Name, len(v.Dims), len(chunks))
	}
	cs := make([]C.size_t, len(chunks)+1)
	for i, c := range chunks {
		cs[i] = C.size_t(c)
	}
	var status C.int
	do(func() { status = C.nc_def_var_chunking(v.f.ncid(), v.id, C.NC_CHUNKED, &cs[0]) })
	return check(status, "nc_def_var_chunking", v.f.h.path, v.Name)
}

// SetChunkCache sets the size in bytes, the number of slots and the
// preemption (0–1) of a NetCDF-4 variable's HDF5 chunk cache
// (nc_set_var_chunk_cache). A cache smaller than a chunk is bypassed: each
// write of a whole chunk goes straight to the file, compressed then,
// instead of staying in memory until the file is closed.
func (v *Var) SetChunkCache(size, slots int, preemption float64) error {
	var status C.int
	do(func() {
		status = C.nc_set_var_chunk_cache(v.f.ncid(), v.id, C.size_t(size), C.size_t(slots), C.float(preemption))
	})
	return check(status, "nc_set_var_chunk_cache", v.f.h.path, v.Name)
}

// SetDeflate turns on zlib compression (level 1–9) and optionally the
// shuffle filter for a NetCDF-4 variable (define mode).
func (v *Var) SetDeflate(shuffle bool, level int) error {
	sh := C.int(0)
	if shuffle {
		sh = 1
	}
	var status C.int
	do(func() { status = C.nc_def_var_deflate(v.f.ncid(), v.id, sh, 1, C.int(level)) })
	return check(status, "nc_def_var_deflate", v.f.h.path, v.Name)
}

// Deflate reports a variable's compression settings.
func (v *Var) Deflate() (shuffle bool, deflate bool, level int, err error) {
	var sh, df, lv, status C.int
	do(func() { status = C.nc_inq_var_deflate(v.f.ncid(), v.id, &sh, &df, &lv) })
	return sh != 0, df != 0, int(lv), check(status, "nc_inq_var_deflate", v.f.h.path, v.Name)
}

// EndDef leaves define mode.
func (f *File) EndDef() error {
	var status C.int
	var errno error
	do(func() { status, errno = C.nc_enddef(f.ncid()) })
	return checkIO(status, errno, "nc_enddef", f.h.path, "")
}

// Redef re-enters define mode.
func (f *File) Redef() error {
	var status C.int
	do(func() { status = C.nc_redef(f.ncid()) })
	return check(status, "nc_redef", f.h.path, "")
}

// Sync flushes a file being written to disk.
func (f *File) Sync() error {
	var status C.int
	var errno error
	do(func() { status, errno = C.nc_sync(f.ncid()) })
	return checkIO(status, errno, "nc_sync", f.h.path, "")
}

// LibVersion returns the netCDF-C library version string.
func LibVersion() string {
	var s string
	do(func() { s = C.GoString(C.nc_inq_libvers()) })
	return s
}
