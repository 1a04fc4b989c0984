package cf

import (
	"math"
	"testing"

	"lidscope/netcdf"
)

// Packing and missing-data rules of the NetCDF User Guide, Appendix A
// ("Attribute Conventions"), with the expected numbers written out by hand.
// NUG worked case: a short variable with scale_factor 0.01, add_offset
// 273.15, _FillValue −32767 and valid_range [−30000, 30000] (both in the
// packed domain, as the NUG requires); unpacked = stored × 0.01 + 273.15:
//
//	−32767 → missing (_FillValue)
//	−30001 → missing (below valid_range, tested before unpacking)
//	−30000 → −300.00 + 273.15 = −26.85
//	     0 → 273.15
//	  1234 → 12.34 + 273.15 = 285.49
//	 30000 → 300.00 + 273.15 = 573.15
//	 30001 → missing (above valid_range)
//	−32768 → missing (below valid_range)
var nugCase = []float64{nan, nan, -26.85, 273.15, 285.49, 573.15, nan, nan}

func TestPackingFromFile(t *testing.T) {
	t.Parallel()
	cases := []struct {
		v    string
		role Role
		want []float64
		note string
		infs int64
	}{
		{"t_nug", RoleSST, nugCase, "", 0},
		// valid_min 250.f has the type of scale_factor (float), not of the
		// stored shorts: it is tested after unpacking (a tolerated writer
		// mistake, noted). −2316 → 249.99 < 250: missing; −2000 → 253.15;
		// 30001 → 573.16; −32768 → −54.53 < 250: missing.
		{"t_unp", RoleSST, []float64{nan, nan, 253.15, 273.15, 285.49, 573.15, 573.16, nan}, "applied to unpacked values", 0},
		// missing_value scalar; no _FillValue, so the default float fill
		// 9.96921e+36 (NC_FILL_FLOAT) masks too
		{"m_scalar", RoleSST, []float64{nan, 1, 2, -998, nan, 3, 4, 5}, "", 0},
		// missing_value vector: each value masks
		{"m_vector", RoleSST, []float64{nan, nan, -777, 1, 2, 3, 4, 5}, "", 0},
		{"vmin", RoleSST, []float64{nan, nan, 0, 0.5, 1, 2, 3, nan}, "", 0},
		{"vmax", RoleSST, []float64{99, 100, nan, nan, 1, 2, 3, nan}, "", 0},
		// short without _FillValue: default −32767 masks, and — no valid
		// range given — implies valid_min = −32767 + 1, so −32768 masks too
		{"s_default", RoleSST, []float64{nan, nan, -32766, 0, 1, 2, 3, 4}, "", 0},
		// byte without _FillValue: the NUG says all values are valid
		{"b_default", RoleLandFraction, []float64{-127, -128, -126, 0, 1, 2, 3, 127}, "", 0},
		// byte with _FillValue −127: negative fill implies valid_min −126
		{"b_fill", RoleLandFraction, []float64{nan, nan, -126, 0, 1, 2, 3, 127}, "", 0},
		// NaN and ±Inf are missing; the two infinities are counted
		{"f_nan", RoleSST, []float64{nan, nan, nan, 1, 2, 3, 4, 5}, "", 2},
		// positive fill 1e20 implies a valid maximum just below it
		{"f_posfill", RoleSST, []float64{nan, nan, 5, nan, 1, 2, 3, 4}, "", 0},
		// _FillValue 0 masks only 0 (documented deviation, see mask.go)
		{"z_fill", RoleSST, []float64{nan, -5, 5, 1, 2, 3, 4, -32767}, "", 0},
	}
	eachKind(t, "packing", func(t *testing.T, path string) {
		for _, c := range cases {
			f := mustOpen(t, path, Spec{Role: c.role, Var: c.v})
			sameValues(t, slab(t, f, 0), c.want, 1e-4)
			if c.note != "" && !hasNote(f.Notes, c.note) {
				t.Errorf("%s: notes %q lack %q", c.v, f.Notes, c.note)
			}
			if f.InfCount() != c.infs {
				t.Errorf("%s: InfCount %d, want %d", c.v, f.InfCount(), c.infs)
			}
		}
	})
}

func attrs(kv ...any) []netcdf.Attr {
	var out []netcdf.Attr
	for i := 0; i < len(kv); i += 2 {
		a := netcdf.Attr{Name: kv[i].(string), Value: kv[i+1]}
		switch v := kv[i+1].(type) {
		case []int16:
			a.Type, a.Len = netcdf.Short, len(v)
		case []int8:
			a.Type, a.Len = netcdf.Byte, len(v)
		case []float32:
			a.Type, a.Len = netcdf.Float, len(v)
		case []float64:
			a.Type, a.Len = netcdf.Double, len(v)
		case string:
			a.Type, a.Len = netcdf.Char, len(v)
		}
		out = append(out, a)
	}
	return out
}

// TestNewMask checks the pure decoding rules value by value.
func TestNewMask(t *testing.T) {
	type io struct{ in, out float64 }
	cases := []struct {
		name string
		typ  netcdf.Type
		as   []netcdf.Attr
		want []io
		err  string
	}{
		{"NUG worked case", netcdf.Short, attrs("scale_factor", []float64{0.01}, "add_offset", []float64{273.15},
			"_FillValue", []int16{-32767}, "valid_range", []int16{-30000, 30000}),
			[]io{{-32767, nan}, {-30001, nan}, {-30000, -26.85}, {0, 273.15}, {1234, 285.49}, {30000, 573.15}, {30001, nan}}, ""},
		{"scale only", netcdf.Short, attrs("scale_factor", []float32{0.5}), []io{{4, 2}, {-32767, nan}, {-32768, nan}}, ""},
		{"offset only", netcdf.Short, attrs("add_offset", []float64{100}), []io{{4, 104}}, ""},
		{"missing_value in packed domain", netcdf.Short, attrs("scale_factor", []float64{2.0}, "missing_value", []int16{-1}),
			[]io{{-1, nan}, {1, 2}}, ""},
		// float missing_value on packed shorts: tested after unpacking
		{"missing_value unpacked", netcdf.Short, attrs("scale_factor", []float32{2}, "missing_value", []float32{-2}),
			[]io{{-1, nan}, {-2, -4}}, ""},
		{"float default fill implies a range", netcdf.Float, nil,
			[]io{{float64(float32(9.9692099683868690e+36)), nan}, {1e37, nan}, {1e36, 1e36}}, ""},
		{"negative float fill", netcdf.Float, attrs("_FillValue", []float32{-999}), []io{{-999, nan}, {-1000, nan}, {-998.9, -998.9}}, ""},
		{"double fill two ulps", netcdf.Double, attrs("_FillValue", []float64{1}),
			[]io{{1, nan}, {math.Nextafter(1, 0), nan}, {math.Nextafter(math.Nextafter(1, 0), 0), math.Nextafter(math.Nextafter(1, 0), 0)}}, ""},
		{"valid_range wins over valid_min", netcdf.Float, attrs("valid_range", []float32{0, 10}, "valid_min", []float32{5}),
			[]io{{1, 1}, {11, nan}}, ""},
		{"byte, no fill: all valid", netcdf.Byte, nil, []io{{-128, -128}, {-127, -127}, {127, 127}}, ""},
		{"text scale", netcdf.Short, attrs("scale_factor", "0.01"), nil, "is text"},
		{"zero scale", netcdf.Short, attrs("scale_factor", []float64{0}), nil, "cannot be unpacked"},
		{"NaN offset", netcdf.Short, attrs("add_offset", []float64{math.NaN()}), nil, "cannot be unpacked"},
		{"two scales", netcdf.Short, attrs("scale_factor", []float64{1, 2}), nil, "must have one"},
		{"two fills", netcdf.Short, attrs("_FillValue", []int16{1, 2}), nil, "must have one"},
		{"reversed range", netcdf.Short, attrs("valid_range", []int16{5, 1}), nil, "two increasing values"},
		{"empty valid_min", netcdf.Short, attrs("valid_min", []int16{}), nil, "must be one number"},
		{"min above max", netcdf.Short, attrs("valid_min", []int16{5}, "valid_max", []int16{1}), nil, "above valid_max"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m, err := newMask("v", c.typ, c.as)
			if c.err != "" {
				errHas(t, err, c.err, "v:")
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			for _, x := range c.want {
				got := m.Decode(x.in)
				if math.IsNaN(x.out) != math.IsNaN(got) || (!math.IsNaN(got) && math.Abs(got-x.out) > 1e-9*math.Max(1, math.Abs(x.out))) {
					t.Errorf("Decode(%v) = %v, want %v (mask %s)", x.in, got, x.out, m.Describe())
				}
			}
		})
	}
}

// FuzzMask: random attribute values never make newMask or Decode panic;
// NaN and ±Inf stored values always decode to NaN, and a decoded value is
// either NaN or the unpacked stored value.
func FuzzMask(f *testing.F) {
	f.Add(int16(-32767), int16(-30000), int16(30000), 0.01, 273.15, int16(-1), float32(5), 1234.0, uint8(0xff))
	f.Add(int16(0), int16(5), int16(1), 0.0, math.NaN(), int16(0), float32(math.NaN()), math.Inf(1), uint8(0))
	f.Fuzz(func(t *testing.T, fill, vmin, vmax int16, scale, offset float64, miss int16, fmiss float32, x float64, which uint8) {
		var as []netcdf.Attr
		add := func(bit uint8, kv ...any) {
			if which&bit != 0 {
				as = append(as, attrs(kv...)...)
			}
		}
		add(1, "_FillValue", []int16{fill})
		add(2, "valid_min", []int16{vmin})
		add(4, "valid_max", []int16{vmax})
		add(8, "scale_factor", []float64{scale})
		add(16, "add_offset", []float64{offset})
		add(32, "missing_value", []int16{miss, fill})
		add(64, "valid_range", []float32{float32(vmin), float32(vmax)})
		add(128, "missing_value", []float32{fmiss})
		for _, typ := range []netcdf.Type{netcdf.Short, netcdf.Float, netcdf.Byte} {
			m, err := newMask("v", typ, as)
			if err != nil {
				continue
			}
			_ = m.Describe()
			for _, bad := range []float64{math.NaN(), math.Inf(1), math.Inf(-1)} {
				if y := m.Decode(bad); !math.IsNaN(y) {
					t.Fatalf("Decode(%v) = %v with %s", bad, y, m.Describe())
				}
			}
			y := m.Decode(x)
			if !math.IsNaN(y) && y != x*m.Scale+m.Offset && !(m.Scale == 1 && m.Offset == 0 && y == x) {
				t.Fatalf("Decode(%v) = %v, not the unpacked value %v", x, y, x*m.Scale+m.Offset)
			}
		}
	})
}
