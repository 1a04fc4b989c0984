package vocab_test

import (
	"testing"

	"lidscope/cf"
	"lidscope/vocab"
)

// The one role→level table: where each role's field lies and the pressure
// it is read at from a pressure axis. T700: Klein and Hartmann (1993),
// Wood and Bretherton (2006, eq. 4); omega500: Bony et al. (2004); the
// 700-hPa humidity: Kawai, Koshiro and Webb (2017, ECTEI) and rh700 of
// the factors; near-surface relative/specific humidity (hurs, huss) for
// the LCL of EIS: Wood and Bretherton (2006) use the surface humidity.
func TestRoleVertical(t *testing.T) {
	want := map[cf.Role]struct {
		v       vocab.Vertical
		pa, def float64
	}{
		cf.RoleAirTemp: {vocab.PressureLevels, 70000, 70000},
		cf.RoleOmega:   {vocab.AtLevel, 50000, 50000},
		cf.RoleRH:      {vocab.SurfaceOrLevels, 70000, 0},
		cf.RoleSpecHum: {vocab.SurfaceOrLevels, 70000, 0},
	}
	for _, r := range cf.Roles() {
		w, ok := want[r]
		if !ok {
			w.v = vocab.SingleLevel
		}
		v, pa := vocab.RoleVertical(string(r))
		if v != w.v || pa != w.pa {
			t.Errorf("RoleVertical(%s) = %d, %g Pa; want %d, %g Pa", r, v, pa, w.v, w.pa)
		}
		if got := vocab.DefaultLevel(string(r)); got != w.def {
			t.Errorf("DefaultLevel(%s) = %g Pa, want %g Pa", r, got, w.def)
		}
	}
	if v, pa := vocab.RoleVertical("no_such_role"); v != vocab.SingleLevel || pa != 0 {
		t.Errorf("RoleVertical(no_such_role) = %d, %g; want SingleLevel, 0", v, pa)
	}
}
