package cf

import (
	"math"
	"strings"
	"testing"

	"lidscope/units"
)

// Units are normalised to SI for each role: temperatures to K (0 °C =
// 273.15 K by definition of the Celsius scale, BIPM SI Brochure 2019),
// fractions to 0–1, pressures to Pa (1 hPa = 1 mbar = 100 Pa), omega to
// Pa s-1 (1 hPa day-1 = 100 Pa / 86400 s).
func TestUnitsPerRole(t *testing.T) {
	cases := []struct {
		v    string
		role Role
		want []float64
	}{
		{"t_K", RoleSST, []float64{273.15, 300.15}},
		{"t_degC", RoleSST, []float64{273.15, 300.15}},
		{"t_deg_C", RoleSST, []float64{273.15, 300.15}},
		{"t_C", RoleAirTemp, []float64{273.15, 300.15}},
		{"t_Celsius", RoleSurfaceAir, []float64{273.15, 300.15}},
		{"t_sign", RoleSST, []float64{273.15, 300.15}},
		{"c_pct", RoleCloud, []float64{0.25, 0.8}},
		{"c_one", RoleLowCloud, []float64{0.25, 0.8}},
		{"c_nounits", RoleCloud, []float64{0.25, 0.8}},
		{"p_Pa", RoleSurfacePres, []float64{70000, 101325}},
		{"p_hPa", RoleSurfacePres, []float64{70000, 101325}},
		{"p_mbar", RoleSeaLevelPres, []float64{70000, 101325}},
		{"w_Pas", RoleOmega, []float64{0.1, -0.05}},
		{"w_hPaday", RoleOmega, []float64{0.1, -0.05}}, // 86.4 hPa/day × 100/86400 = 0.1 Pa/s
	}
	eachKind(t, "units", func(t *testing.T, path string) {
		for _, c := range cases {
			f := mustOpen(t, path, Spec{Role: c.role, Var: c.v})
			got := slab(t, f, 0)
			for i := range c.want {
				if math.Abs(float64(got[i])-c.want[i]) > 1e-5*math.Max(1, math.Abs(c.want[i])) {
					t.Errorf("%s as %s: cell %d = %v, want %v (%s)", c.v, c.role, i, got[i], c.want[i], f.Conv)
				}
			}
		}
		_, err := Open([]string{path}, Spec{Role: RoleSST, Var: "t_furlong"})
		errHas(t, err, "t_furlong", "furlongs", "set units.sst in the study")
		_, err = Open([]string{path}, Spec{Role: RoleSST, Var: "t_nounits"})
		errHas(t, err, "t_nounits", "no units attribute", "units.sst: K")
		// the study's units fix both
		f := mustOpen(t, path, Spec{Role: RoleSST, Var: "t_nounits", Overrides: Overrides{Units: "K"}})
		sameValues(t, slab(t, f, 0), []float64{273.15, 300.15}, 1e-4)
		f = mustOpen(t, path, Spec{Role: RoleSST, Var: "t_kelvin_in_C", Overrides: Overrides{Units: "K"}})
		sameValues(t, slab(t, f, 0), []float64{273.15, 300.15}, 1e-4)
	})
}

// Plausibility checks report what looks like mislabelled units and never
// convert anything (the values in a report are the values as read).
func TestCheckValues(t *testing.T) {
	conv := func(k units.Kind, u string) units.Conversion {
		c, err := units.Parse(k, u)
		if err != nil {
			t.Fatal(err)
		}
		return c
	}
	cases := []struct {
		name   string
		role   Role
		c      units.Conversion
		lo, hi float64 // SI values
		want   string  // "" = no problem
	}{
		{"°C-labelled kelvins", RoleSST, conv(units.Temperature, "degC"), 271.15 + 273.15, 305 + 273.15, "look like kelvin"},
		{"°C-labelled 190–320", RoleAirTemp, conv(units.Temperature, "C"), 190 + 273.15, 320 + 273.15, "look like kelvin"},
		{"real °C", RoleSST, conv(units.Temperature, "degC"), -1.8 + 273.15, 30 + 273.15, ""},
		{"K-labelled Celsius", RoleSST, conv(units.Temperature, "K"), -1.8, 30, "look like degrees Celsius"},
		{"real K", RoleSST, conv(units.Temperature, "K"), 271, 305, ""},
		{"impossible K", RoleAirTemp, conv(units.Temperature, "K"), 120, 400, "outside 150…350 K"},
		{"SST all zero", RoleSST, conv(units.Temperature, "degC"), 273.15, 273.15, "0 everywhere"},
		{"1-labelled percent", RoleCloud, conv(units.Fraction, "1"), 0, 100, "look like percent"},
		{"1-labelled percent, not whole", RoleCloud, conv(units.Fraction, "1"), 0.5, 87.5, "look like percent"},
		{"categorical mask", RoleLandFraction, conv(units.Fraction, "1"), 0, 4, "categorical mask"},
		{"oktas", RoleCloud, conv(units.Fraction, "1"), 0, 8, "oktas"},
		{"real fraction", RoleCloud, conv(units.Fraction, "1"), 0, 1, ""},
		{"percent-labelled fraction", RoleCloud, conv(units.Fraction, "%"), 0, 0.009, "no value exceeds 1"},
		{"fraction above 1", RoleCloud, conv(units.Fraction, "%"), 0, 2, "must lie in 0…1"},
		{"hPa-labelled Pa", RoleSurfacePres, conv(units.Pressure, "Pa"), 500, 1050, "if these are hPa"},
		{"real pressure", RoleSurfacePres, conv(units.Pressure, "hPa"), 50000, 105000, ""},
		{"omega in hPa/day labelled Pa/s", RoleOmega, conv(units.Omega, "Pa s-1"), -80, 60, "above 20 Pa s-1"},
		{"flux", RoleOLR, conv(units.Flux, "W m-2"), 100, 2000, "outside 0…1500"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := strings.Join(CheckValues(c.role, c.c, c.lo, c.hi, 10, 10), "; ")
			if c.want == "" && got != "" || c.want != "" && !strings.Contains(got, c.want) {
				t.Errorf("CheckValues = %q, want %q", got, c.want)
			}
		})
	}
	if got := CheckValues(RoleSST, conv(units.Temperature, "K"), math.Inf(1), math.Inf(-1), 0, 10); len(got) != 1 || !strings.Contains(got[0], "every sampled value is missing") {
		t.Errorf("all missing: %q", got)
	}
}

// Inspect reports the same checks on a file: values are reported, the
// conversion stays as labelled.
func TestInspectReportsImplausibleUnits(t *testing.T) {
	path := fixture(t, "units", "classic")
	f := mustOpen(t, path, Spec{Role: RoleSST, Var: "t_kelvin_in_C"})
	if f.Conv.Offset != 273.15 {
		t.Fatalf("conversion changed: %s", f.Conv)
	}
	buf := slab(t, f, 0)
	lo, hi := float64(buf[0]), float64(buf[1])
	if p := CheckValues(RoleSST, f.Conv, lo, hi, 2, 2); len(p) == 0 || !strings.Contains(p[0], "look like kelvin") || !strings.Contains(p[0], "273.1") {
		t.Errorf("problems %q", p)
	}
	f = mustOpen(t, path, Spec{Role: RoleSST, Var: "sst_zero"})
	buf = slab(t, f, 0)
	if p := strings.Join(CheckValues(RoleSST, f.Conv, float64(buf[0]), float64(buf[1]), 2, 2), "; "); !strings.Contains(p, "0 everywhere") {
		t.Errorf("problems %q", p)
	}
	f = mustOpen(t, path, Spec{Role: RoleCloud, Var: "c_pct_in_one"})
	buf = slab(t, f, 0)
	if buf[1] != 80 { // reported, not converted
		t.Errorf("value %v was converted", buf[1])
	}
	if p := strings.Join(CheckValues(RoleCloud, f.Conv, float64(buf[0]), float64(buf[1]), 2, 2), "; "); !strings.Contains(p, "look like percent") {
		t.Errorf("problems %q", p)
	}
}
