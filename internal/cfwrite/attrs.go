package cfwrite

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"lidscope/netcdf"
)

// attr is one attribute to write, in order.
type attr struct {
	name  string
	value any
}

// isNameByte reports whether c may appear in a CF name after the first letter.
func isNameByte(c byte) bool {
	return c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' || c == '_'
}

// checkName checks a dimension or variable name against CF-1.10 §2.3: it
// must begin with a letter and use only letters, digits and underscores.
func checkName(s string) error {
	if s == "" {
		return errors.New("the name is empty")
	}
	if len(s) > 256 {
		return fmt.Errorf("the name is %d bytes long; netCDF allows 256", len(s))
	}
	if c := s[0]; !(c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z') {
		return errors.New("the name must begin with a letter (CF-1.10 §2.3)")
	}
	for i := 0; i < len(s); i++ {
		if !isNameByte(s[i]) {
			return fmt.Errorf("the name may use only letters, digits and '_' (CF-1.10 §2.3), found %q", s[i])
		}
	}
	return nil
}

// checkAttrName checks a caller-supplied attribute name: the rules of
// checkName, so names with a leading underscore (reserved by netCDF) are
// refused.
func checkAttrName(s string) error { return checkName(s) }

// checkStandardName checks the form of a standard name (CF-1.10 §3.3: no
// blanks; the table's names are letters, digits and underscores beginning
// with a letter). The standard name table itself is not consulted.
func checkStandardName(s string) error {
	if s == "" {
		return nil
	}
	if err := checkName(s); err != nil {
		return fmt.Errorf("standard_name %q is not of the form CF standard names have: %w", s, err)
	}
	return nil
}

// typedAttrs are attributes CF requires in the data variable's own type
// (CF-1.10 §2.5.1 and §3.5).
var typedAttrs = map[string]bool{
	"valid_min": true, "valid_max": true, "valid_range": true,
	"actual_range": true, "missing_value": true,
}

// extraAttrs converts a caller's attribute map to an ordered list, refusing
// reserved names and unsupported types. t is the variable's type, used for
// the attributes CF wants in that type.
func extraAttrs(m map[string]any, reserved []string, t netcdf.Type) ([]attr, error) {
	var out []attr
	for _, k := range sortedKeys(m) {
		if err := checkAttrName(k); err != nil {
			return nil, fmt.Errorf("attribute %q: %w", k, err)
		}
		for _, r := range reserved {
			if k == r {
				return nil, fmt.Errorf("attribute %q is set by the writer from its own field; set the field instead of Attributes", k)
			}
		}
		v, err := attrValue(m[k])
		if err != nil {
			return nil, fmt.Errorf("attribute %q: %w", k, err)
		}
		if typedAttrs[k] {
			if v, err = convertAttr(v, t); err != nil {
				return nil, fmt.Errorf("attribute %q: %w", k, err)
			}
		}
		out = append(out, attr{k, v})
	}
	return out, nil
}

// attrValue normalises a supported Go value: string, bool (NC_BYTE 1 or
// 0), float64, float32, int, int32 or a slice of the numeric ones.
func attrValue(v any) (any, error) {
	switch x := v.(type) {
	case string:
		return x, nil
	case bool:
		if x {
			return []int8{1}, nil
		}
		return []int8{0}, nil
	case float64:
		return []float64{x}, checkFinite([]float64{x})
	case []float64:
		if len(x) == 0 {
			return nil, errors.New("empty []float64 value")
		}
		return append([]float64(nil), x...), checkFinite(x)
	case float32:
		return []float32{x}, checkFinite([]float64{float64(x)})
	case []float32:
		if len(x) == 0 {
			return nil, errors.New("empty []float32 value")
		}
		f := make([]float64, len(x))
		for i, y := range x {
			f[i] = float64(y)
		}
		return append([]float32(nil), x...), checkFinite(f)
	case int:
		return toInt32s([]int{x})
	case []int:
		if len(x) == 0 {
			return nil, errors.New("empty []int value")
		}
		return toInt32s(x)
	case int32:
		return []int32{x}, nil
	case []int32:
		if len(x) == 0 {
			return nil, errors.New("empty []int32 value")
		}
		return append([]int32(nil), x...), nil
	}
	return nil, fmt.Errorf("values of Go type %T are not supported; use string, bool, float64, float32, int, int32 or a slice of the numbers", v)
}

func checkFinite(x []float64) error {
	for _, y := range x {
		if math.IsNaN(y) || math.IsInf(y, 0) {
			return fmt.Errorf("value %v is not finite", y)
		}
	}
	return nil
}

func toInt32s(x []int) ([]int32, error) {
	out := make([]int32, len(x))
	for i, y := range x {
		if y < math.MinInt32 || y > math.MaxInt32 {
			return nil, fmt.Errorf("int %d does not fit the 32-bit integers of the netCDF classic model", y)
		}
		out[i] = int32(y)
	}
	return out, nil
}

// convertAttr converts a numeric attribute to the variable type t.
func convertAttr(v any, t netcdf.Type) (any, error) {
	var f []float64
	switch x := v.(type) {
	case []float64:
		f = x
	case []float32:
		f = make([]float64, len(x))
		for i, y := range x {
			f[i] = float64(y)
		}
	case []int32:
		f = make([]float64, len(x))
		for i, y := range x {
			f[i] = float64(y)
		}
	default:
		return nil, errors.New("must be numeric, in the variable's type (CF-1.10 §2.5.1)")
	}
	switch t {
	case netcdf.Double:
		return f, nil
	case netcdf.Float:
		out := make([]float32, len(f))
		for i, y := range f {
			if math.Abs(y) > math.MaxFloat32 {
				return nil, fmt.Errorf("value %g does not fit the variable's float32 type", y)
			}
			out[i] = float32(y)
		}
		return out, nil
	case netcdf.Int:
		out := make([]int32, len(f))
		for i, y := range f {
			if y != math.Trunc(y) || y < math.MinInt32 || y > math.MaxInt32 {
				return nil, fmt.Errorf("value %g is not an int32, the variable's type", y)
			}
			out[i] = int32(y)
		}
		return out, nil
	}
	return nil, fmt.Errorf("unsupported variable type %v", t)
}

// putAttrs writes attributes in order (define mode).
func putAttrs(v *netcdf.Var, as []attr) error {
	for _, a := range as {
		if err := v.PutAttr(a.name, a.value); err != nil {
			return err
		}
	}
	return nil
}

// words splits a blank-separated attribute such as coordinates.
func words(s string) []string { return strings.Fields(s) }
