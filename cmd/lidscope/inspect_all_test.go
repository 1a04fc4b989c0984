package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"strings"
	"testing"

	"lidscope/cf"
)

// inspect lists every problem of a variable in one pass, in the text
// report and in --json: the fixture (package cf's testdata, invented
// values) has non-CF time units, units that contradict its values and a
// two-valued scale_factor.
func TestInspectEveryProblem(t *testing.T) {
	path := inspectFixture(t, "three_problems")
	wants := []string{`units = "Month"`, "set units.sst: degC in the study", "scale_factor has 2 values"}
	var text bytes.Buffer
	if err := runInspect(inspectOptions{Files: []string{path}}, &text); !errors.Is(err, errFailed) {
		t.Fatalf("runInspect: %v, want errFailed", err)
	}
	if n := strings.Count(text.String(), "PROBLEM:"); n != 3 {
		t.Errorf("%d PROBLEM lines, want 3:\n%s", n, text.String())
	}
	var js bytes.Buffer
	if err := runInspect(inspectOptions{Files: []string{path}, JSON: true}, &js); !errors.Is(err, errFailed) {
		t.Fatalf("runInspect --json: %v, want errFailed", err)
	}
	var reps []cf.FileReport
	if err := json.Unmarshal(js.Bytes(), &reps); err != nil {
		t.Fatal(err)
	}
	if len(reps) != 1 || len(reps[0].Fields) != 1 || len(reps[0].Fields[0].Problems) != 3 {
		t.Fatalf("JSON report %+v", reps)
	}
	for _, w := range wants {
		if !strings.Contains(text.String(), w) {
			t.Errorf("text report lacks %q", w)
		}
		if !strings.Contains(strings.Join(reps[0].Fields[0].Problems, "\n"), w) {
			t.Errorf("JSON problems lack %q", w)
		}
	}
}
