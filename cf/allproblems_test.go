package cf

import (
	"strings"
	"testing"
)

// TestInspectReportsEveryProblem: inspect lists every problem of a
// variable in one pass, each with its fix, not only the first. The
// fixture has three: non-CF time units, units that contradict the values,
// and a scale_factor with two values (NUG Appendix A: one value).
func TestInspectReportsEveryProblem(t *testing.T) {
	for _, kind := range []string{"classic", "netCDF-4"} {
		t.Run(kind, func(t *testing.T) {
			rep := Inspect(fixture(t, "three_problems", kind))
			if len(rep.Fields) != 1 || rep.Fields[0].Role != RoleSST {
				t.Fatalf("fields %+v, problems %q", rep.Fields, rep.Problems)
			}
			vr := rep.Fields[0]
			want := []struct{ what, problem, fix string }{
				{"time", `units = "Month"`, "time.climatology: true"},
				{"units", "these look like degrees Celsius, not kelvin", "set units.sst: degC in the study"},
				{"packing", "scale_factor has 2 values, it must have one", "fix the file"},
			}
			for _, w := range want {
				found := false
				for _, p := range vr.Problems {
					if strings.Contains(p, w.problem) && strings.Contains(p, w.fix) {
						found = true
					}
				}
				if !found {
					t.Errorf("%s problem (%q, fix %q) missing from %q", w.what, w.problem, w.fix, vr.Problems)
				}
			}
			if len(vr.Problems) != len(want) {
				t.Errorf("%d problems, want %d: %q", len(vr.Problems), len(want), vr.Problems)
			}
			if rep.Usable {
				t.Error("a variable with problems reported usable")
			}
		})
	}
}

// TestLevelNotInFile: a temperature file whose levels all lie below 700
// hPa gets a message that says the level is not in the file and that no
// study setting can help, not a suggestion to set the level units; a file
// whose levels are hPa values labelled Pa gets the level-units fix.
func TestLevelNotInFile(t *testing.T) {
	path := fixture(t, "below700", "classic")
	_, err := Open([]string{path}, Spec{Role: RoleAirTemp, Level: 70000})
	errHas(t, err, "700 hPa lies outside the file's levels (850…1000 hPa)", "the level is not in the file", "no setting in the study can help")
	if strings.Contains(err.Error(), "level_units") {
		t.Errorf("the message suggests level units, which cannot help: %v", err)
	}
	rep := Inspect(path)
	if len(rep.Fields) != 1 || !strings.Contains(strings.Join(rep.Fields[0].Problems, "\n"), "no setting in the study can help") {
		t.Errorf("inspect: %+v %q", rep.Fields, rep.Problems)
	}
	_, err = PickLevel([]float64{1000, 850, 700}, "Pa", 70000)
	errHas(t, err, "if the levels are in fact hPa", "level_units: hPa")
}
