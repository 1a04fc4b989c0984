package netcdf

/*
#include <stdlib.h>
#include <netcdf.h>
*/
import "C"

import (
	"fmt"
	"unsafe"
)

// Attr is an attribute with its value decoded to a Go value:
// string for NC_CHAR text, []string for NC_STRING, and for numeric types a
// slice of the matching Go type ([]int8, []uint8, []int16, []uint16, []int32,
// []uint32, []int64, []uint64, []float32, []float64).
type Attr struct {
	Name  string
	Type  Type
	Len   int
	Value any
}

// Text returns the attribute as a string: NC_CHAR text as is, a single
// NC_STRING value; ok is false for any other type or length.
func (a Attr) Text() (string, bool) {
	switch v := a.Value.(type) {
	case string:
		return v, true
	case []string:
		if len(v) == 1 {
			return v[0], true
		}
	}
	return "", false
}

// Float64s returns a numeric attribute's values converted to float64;
// ok is false for text attributes.
func (a Attr) Float64s() ([]float64, bool) {
	switch v := a.Value.(type) {
	case []int8:
		return conv(v), true
	case []uint8:
		return conv(v), true
	case []int16:
		return conv(v), true
	case []uint16:
		return conv(v), true
	case []int32:
		return conv(v), true
	case []uint32:
		return conv(v), true
	case []int64:
		return conv(v), true
	case []uint64:
		return conv(v), true
	case []float32:
		return conv(v), true
	case []float64:
		return append([]float64(nil), v...), true
	}
	return nil, false
}

func conv[T int8 | uint8 | int16 | uint16 | int32 | uint32 | int64 | uint64 | float32](s []T) []float64 {
	out := make([]float64, len(s))
	for i, x := range s {
		out[i] = float64(x)
	}
	return out
}

// String formats the value for messages.
func (a Attr) String() string {
	if s, ok := a.Text(); ok {
		return fmt.Sprintf("%q", s)
	}
	if f, ok := a.Float64s(); ok {
		if len(f) == 1 {
			return fmt.Sprint(f[0])
		}
		return fmt.Sprint(f)
	}
	return fmt.Sprint(a.Value)
}

const global = C.NC_GLOBAL

// Attrs returns the file's global attributes.
func (f *File) Attrs() ([]Attr, error) { return attrs(f, global, "") }

// Attr returns one global attribute; errors.Is(err, ErrNotAttr) when absent.
func (f *File) Attr(name string) (Attr, error) { return attr(f, global, "", name) }

// Attrs returns the variable's attributes, in order.
func (v *Var) Attrs() ([]Attr, error) { return attrs(v.f, v.id, v.Name) }

// Attr returns one attribute of the variable; errors.Is(err, ErrNotAttr) when absent.
func (v *Var) Attr(name string) (Attr, error) { return attr(v.f, v.id, v.Name, name) }

// PutAttr writes a global attribute (define mode); see Var.PutAttr for value types.
func (f *File) PutAttr(name string, value any) error { return putAttr(f, global, "", name, value) }

// PutAttr writes an attribute (define mode). value may be a string (NC_CHAR
// text), []string (NC_STRING, NetCDF-4 only), or a number or slice of
// int8, uint8, int16, uint16, int32, uint32, int64, uint64, int (stored as
// NC_INT), float32 or float64.
func (v *Var) PutAttr(name string, value any) error { return putAttr(v.f, v.id, v.Name, name, value) }

func attrs(f *File, varid C.int, vname string) ([]Attr, error) {
	var out []Attr
	var err error
	do(func() {
		var n C.int
		if varid == global {
			err = check(C.nc_inq_natts(f.ncid(), &n), "nc_inq_natts", f.h.path, "")
		} else {
			err = check(C.nc_inq_varnatts(f.ncid(), varid, &n), "nc_inq_varnatts", f.h.path, vname)
		}
		if err != nil {
			return
		}
		for i := C.int(0); i < n; i++ {
			var name [C.NC_MAX_NAME + 1]C.char
			if err = check(C.nc_inq_attname(f.ncid(), varid, i, &name[0]), "nc_inq_attname", f.h.path, vname); err != nil {
				return
			}
			var a Attr
			if a, err = attrLocked(f, varid, vname, C.GoString(&name[0])); err != nil {
				return
			}
			out = append(out, a)
		}
	})
	return out, err
}

func attr(f *File, varid C.int, vname, name string) (Attr, error) {
	var a Attr
	var err error
	do(func() { a, err = attrLocked(f, varid, vname, name) })
	return a, err
}

func where(vname, name string) string {
	if vname == "" {
		return "global attribute " + name
	}
	return vname + ":" + name
}

func attrLocked(f *File, varid C.int, vname, name string) (Attr, error) {
	cname := C.CString(name)
	defer C.free(unsafe.Pointer(cname))
	var xt C.nc_type
	var ln C.size_t
	if err := check(C.nc_inq_att(f.ncid(), varid, cname, &xt, &ln), "nc_inq_att", f.h.path, where(vname, name)); err != nil {
		return Attr{}, err
	}
	a := Attr{Name: name, Type: Type(xt), Len: int(ln)}
	n := int(ln)
	get := func(p unsafe.Pointer) error {
		if n == 0 {
			return nil
		}
		return check(C.nc_get_att(f.ncid(), varid, cname, p), "nc_get_att", f.h.path, where(vname, name))
	}
	var err error
	switch a.Type {
	case Char:
		b := make([]byte, n+1)
		err = get(unsafe.Pointer(&b[0]))
		// CF text is not NUL-terminated, but some writers include a trailing NUL.
		s := b[:n]
		for len(s) > 0 && s[len(s)-1] == 0 {
			s = s[:len(s)-1]
		}
		a.Value = string(s)
	case String:
		ptrs := make([]*C.char, n+1)
		if n > 0 {
			if err = check(C.nc_get_att_string(f.ncid(), varid, cname, &ptrs[0]), "nc_get_att_string", f.h.path, where(vname, name)); err == nil {
				ss := make([]string, n)
				for i := range ss {
					if ptrs[i] != nil {
						ss[i] = C.GoString(ptrs[i])
					}
				}
				C.nc_free_string(C.size_t(n), &ptrs[0])
				a.Value = ss
			}
		} else {
			a.Value = []string{}
		}
	case Byte:
		a.Value, err = getSlice[int8](n, get)
	case UByte:
		a.Value, err = getSlice[uint8](n, get)
	case Short:
		a.Value, err = getSlice[int16](n, get)
	case UShort:
		a.Value, err = getSlice[uint16](n, get)
	case Int:
		a.Value, err = getSlice[int32](n, get)
	case UInt:
		a.Value, err = getSlice[uint32](n, get)
	case Int64:
		a.Value, err = getSlice[int64](n, get)
	case UInt64:
		a.Value, err = getSlice[uint64](n, get)
	case Float:
		a.Value, err = getSlice[float32](n, get)
	case Double:
		a.Value, err = getSlice[float64](n, get)
	default:
		err = fmt.Errorf("netcdf: %s %s: attribute of user-defined type %d is not supported", f.h.path, where(vname, name), int(xt))
	}
	return a, err
}

func getSlice[T any](n int, get func(unsafe.Pointer) error) ([]T, error) {
	s := make([]T, n+1) // +1: a valid pointer even for n == 0
	if err := get(unsafe.Pointer(&s[0])); err != nil {
		return nil, err
	}
	return s[:n], nil
}

func putAttr(f *File, varid C.int, vname, name string, value any) error {
	cname := C.CString(name)
	defer C.free(unsafe.Pointer(cname))
	var status C.int
	op := "nc_put_att"
	put := func(t Type, n int, p unsafe.Pointer) {
		do(func() { status = C.nc_put_att(f.ncid(), varid, cname, C.nc_type(t), C.size_t(n), p) })
	}
	switch v := value.(type) {
	case string:
		op = "nc_put_att_text"
		b := []byte(v)
		b = append(b, 0)
		do(func() {
			status = C.nc_put_att_text(f.ncid(), varid, cname, C.size_t(len(v)), (*C.char)(unsafe.Pointer(&b[0])))
		})
	case []string:
		op = "nc_put_att_string"
		cs := make([]*C.char, len(v)+1)
		for i, s := range v {
			cs[i] = C.CString(s)
		}
		do(func() { status = C.nc_put_att_string(f.ncid(), varid, cname, C.size_t(len(v)), &cs[0]) })
		for i := range v {
			C.free(unsafe.Pointer(cs[i]))
		}
	case int:
		x := int32(v)
		if int(x) != v {
			return fmt.Errorf("netcdf: %s %s: int %d does not fit NC_INT; pass an int64", f.h.path, where(vname, name), v)
		}
		put(Int, 1, unsafe.Pointer(&x))
	case []int:
		xs := make([]int32, len(v)+1)
		for i, y := range v {
			xs[i] = int32(y)
			if int(xs[i]) != y {
				return fmt.Errorf("netcdf: %s %s: int %d does not fit NC_INT; pass []int64", f.h.path, where(vname, name), y)
			}
		}
		put(Int, len(v), unsafe.Pointer(&xs[0]))
	case int8:
		put(Byte, 1, unsafe.Pointer(&v))
	case []int8:
		putSlice(put, Byte, v)
	case uint8:
		put(UByte, 1, unsafe.Pointer(&v))
	case []uint8:
		putSlice(put, UByte, v)
	case int16:
		put(Short, 1, unsafe.Pointer(&v))
	case []int16:
		putSlice(put, Short, v)
	case uint16:
		put(UShort, 1, unsafe.Pointer(&v))
	case []uint16:
		putSlice(put, UShort, v)
	case int32:
		put(Int, 1, unsafe.Pointer(&v))
	case []int32:
		putSlice(put, Int, v)
	case uint32:
		put(UInt, 1, unsafe.Pointer(&v))
	case []uint32:
		putSlice(put, UInt, v)
	case int64:
		put(Int64, 1, unsafe.Pointer(&v))
	case []int64:
		putSlice(put, Int64, v)
	case uint64:
		put(UInt64, 1, unsafe.Pointer(&v))
	case []uint64:
		putSlice(put, UInt64, v)
	case float32:
		put(Float, 1, unsafe.Pointer(&v))
	case []float32:
		putSlice(put, Float, v)
	case float64:
		put(Double, 1, unsafe.Pointer(&v))
	case []float64:
		putSlice(put, Double, v)
	default:
		return fmt.Errorf("netcdf: %s %s: attribute value of Go type %T is not supported", f.h.path, where(vname, name), value)
	}
	return check(status, op, f.h.path, where(vname, name))
}

func putSlice[T any](put func(Type, int, unsafe.Pointer), t Type, v []T) {
	buf := make([]T, len(v)+1)
	copy(buf, v)
	put(t, len(v), unsafe.Pointer(&buf[0]))
}
