package analysis

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"lidscope/config"
	"lidscope/fixtures"
	"lidscope/relations"
)

// TestRelationshipsOff: relationships.enabled: false runs the regime
// statistics only — no relationship outputs, the reason recorded — and
// they are the same bits as those of the run with the relationship
// analysis (synthetic world of package fixtures, invented data, 4°, 1 year).
func TestRelationshipsOff(t *testing.T) {
	dir := t.TempDir()
	data := filepath.Join(dir, "data")
	o := fixtures.DefaultOptions()
	o.Resolution, o.Years, o.YearsPerFile = 4, 1, 1
	if _, err := fixtures.Generate(data, o); err != nil {
		t.Fatal(err)
	}
	run := func(name string, flags map[string]string) Report {
		t.Helper()
		r, err := config.Load(filepath.Join(data, fixtures.StudyFile), config.LoadOptions{LookupEnv: config.NoEnvironment, Flags: flags})
		if err != nil {
			t.Fatal(err)
		}
		reps, err := Run(context.Background(), r, nil, Options{OutDir: filepath.Join(dir, name), NoPlots: true})
		if err != nil {
			t.Fatal(err)
		}
		return reps[0]
	}
	on := run("on", nil)
	off := run("off", map[string]string{"relationships.enabled": "false"})
	if on.Relations == nil {
		t.Fatal("the default run has no relationship results")
	}
	if off.Relations != nil {
		t.Error("relationships.enabled: false still gave relationship results")
	}
	for _, n := range relations.OutputNames() {
		if _, err := os.Stat(filepath.Join(off.OutDir, n)); err == nil {
			t.Errorf("relationships.enabled: false wrote %s", n)
		}
	}
	if !slices.ContainsFunc(off.Meta.Absent, func(s string) bool { return strings.Contains(s, "relationships.enabled: false") }) {
		t.Errorf("the reason is not recorded: absent %q", off.Meta.Absent)
	}
	var a, b bytes.Buffer
	if err := on.Result.Acc.Encode(&a); err != nil {
		t.Fatal(err)
	}
	if err := off.Result.Acc.Encode(&b); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a.Bytes(), b.Bytes()) {
		t.Error("the regime statistics differ with the relationship analysis off")
	}
}
