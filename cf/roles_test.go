package cf

import (
	"testing"

	"lidscope/netcdf"
	"lidscope/vocab"
)

// Roles are found by standard_name (CF Standard Name Table) first, then by
// an unambiguous variable name with fitting units; ambiguities are errors
// that name the candidates.
func TestFindRole(t *testing.T) {
	cases := []struct {
		role Role
		want string // variable, or "" for an error
		err  []string
	}{
		{RoleSST, "foundation", nil},   // standard_name beats the name "sst"
		{RoleSurfaceAir, "tas", nil},   // by name and units
		{RoleAirTemp, "ta", nil},       // by name, with a pressure axis
		{RoleSeaLevelPres, "clt", nil}, // standard_name beats the name "clt"
		{RoleCloud, "", []string{"role cloud is ambiguous", "clt_a", "clt_b", "name the one to use"}},
		{RoleSurfacePres, "", []string{"no variable found for role surface_pressure", "surface_air_pressure"}},
	}
	eachKind(t, "roles", func(t *testing.T, path string) {
		nf, err := netcdf.Open(path)
		if err != nil {
			t.Fatal(err)
		}
		defer nf.Close()
		for _, c := range cases {
			got, err := FindRole(nf, c.role)
			if c.want == "" {
				errHas(t, err, c.err...)
				continue
			}
			if err != nil || got != c.want {
				t.Errorf("FindRole(%s) = %q, %v; want %q", c.role, got, err, c.want)
			}
		}
		cands, _, _, err := roleCandidates(nf)
		if err != nil {
			t.Fatal(err)
		}
		for r, m := range cands {
			if m.Var == "t" {
				t.Errorf("t (on a depth axis) taken as %s", r)
			}
		}
		if !cands[RoleSurfaceAir].ByName || cands[RoleSST].ByName {
			t.Errorf("ByName flags: %+v", cands)
		}
	})
}

func TestRolesAndKinds(t *testing.T) {
	seen := map[Role]bool{}
	for _, r := range Roles() {
		if seen[r] {
			t.Errorf("role %s listed twice", r)
		}
		seen[r] = true
		if _, ok := KindOf(r); !ok {
			t.Errorf("role %s has no kind", r)
		}
	}
	if _, ok := KindOf("nonsense"); ok {
		t.Error("KindOf accepted an unknown role")
	}
	_, err := Open([]string{"x.nc"}, Spec{Role: "nonsense"})
	errHas(t, err, `unknown role "nonsense"`)
	_, err = Open(nil, Spec{Role: RoleSST})
	errHas(t, err, "no input files")
}

// Inspect and reading use the one role table of vocab: inspect samples a
// variable with a pressure axis at the level a run reads it (T700,
// omega500) or a use asks for (rh700, q700), and the roles that need or
// refuse an axis are those of the table (relative humidity, issue 12:
// inspect read it at 700 hPa while the study read it as single level;
// now both follow vocab.RoleVertical).
func TestLevelsFromRoleTable(t *testing.T) {
	for _, r := range Roles() {
		v, pa := vocab.RoleVertical(string(r))
		if got := levelFor(r); got != pa {
			t.Errorf("levelFor(%s) = %g Pa, want the table's %g Pa", r, got, pa)
		}
		if d := vocab.DefaultLevel(string(r)); d != 0 && d != levelFor(r) {
			t.Errorf("%s: read at %g Pa but inspected at %g Pa", r, d, levelFor(r))
		}
		with, without := levelsOK(r, true), levelsOK(r, false)
		wantWith, wantWithout := v != vocab.SingleLevel, v != vocab.PressureLevels
		if with != wantWith || without != wantWithout {
			t.Errorf("%s (%d): levelsOK with axis %v, without %v; want %v, %v", r, v, with, without, wantWith, wantWithout)
		}
	}
	if levelFor(RoleRH) != 70000 || !levelsOK(RoleRH, true) || !levelsOK(RoleRH, false) {
		t.Errorf("relative_humidity: want 700 hPa on levels and either a pressure axis or none")
	}
}
