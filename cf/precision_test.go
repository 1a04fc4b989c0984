package cf

import (
	"math"
	"testing"
)

// TestReadInFilePrecision: variables stored as float, byte or short are
// read in float32 (the file's precision) and decoded in the same pass that
// finds the slab's range. Every value must be the same bits as when the
// variable is read as double (netCDF-C's conversion), and the range must be
// that of the values written. Fixtures: testdata/packing.cdl (packed and
// unpacked shorts and bytes, floats with fill values, missing values and
// valid ranges) and testdata/levels.cdl (floats interpolated between two
// levels), compiled with ncgen.
func TestReadInFilePrecision(t *testing.T) {
	cases := []struct {
		file, v string
		role    Role
		level   float64
	}{
		{"packing", "t_nug", RoleSST, 0},
		{"packing", "t_unp", RoleSST, 0},
		{"packing", "m_scalar", RoleSST, 0},
		{"packing", "m_vector", RoleSST, 0},
		{"packing", "vmin", RoleSST, 0},
		{"packing", "vmax", RoleSST, 0},
		{"packing", "s_default", RoleSST, 0},
		{"packing", "b_default", RoleLandFraction, 0},
		{"packing", "b_fill", RoleLandFraction, 0},
		{"packing", "f_nan", RoleSST, 0},
		{"packing", "f_posfill", RoleSST, 0},
		{"packing", "z_fill", RoleSST, 0},
		{"levels", "ta_pa", RoleAirTemp, 70000},
		{"levels", "ta_exact", RoleAirTemp, 70000},
	}
	paths := map[string]string{}
	for _, c := range cases {
		if paths[c.file] == "" {
			paths[c.file] = fixture(t, c.file, "netCDF-4")
		}
		f := mustOpen(t, paths[c.file], Spec{Role: c.role, Var: c.v, Level: c.level})
		narrow := make([]float32, f.Len())
		r, err := f.ReadSlabRange(0, narrow, nil)
		if err != nil {
			t.Fatalf("%s: %v", c.v, err)
		}
		readAllAsDouble = true
		wide := slab(t, f, 0)
		readAllAsDouble = false
		for i := range narrow {
			if math.Float32bits(narrow[i]) != math.Float32bits(wide[i]) && !(narrow[i] != narrow[i] && wide[i] != wide[i]) {
				t.Errorf("%s cell %d: %v read in float32, %v read as double", c.v, i, narrow[i], wide[i])
			}
		}
		want := SlabRange{Min: math.Inf(1), Max: math.Inf(-1)}
		for _, x := range wide {
			if x == x {
				want.Valid++
				want.Min, want.Max = math.Min(want.Min, float64(x)), math.Max(want.Max, float64(x))
			}
		}
		if r != want {
			t.Errorf("%s: range %+v, want %+v", c.v, r, want)
		}
	}
}
