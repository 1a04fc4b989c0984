package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"lidscope/internal/testutil"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/cf"
	"lidscope/vocab"
)

// inspectFixture compiles a CDL fixture of package cf (synthetic, invented
// values) into a compressed NetCDF-4 file.
func inspectFixture(t *testing.T, name string) string {
	t.Helper()
	ncgen := testutil.Tool(t, "ncgen")
	out := filepath.Join(t.TempDir(), name+".nc")
	src := filepath.Join("..", "..", "cf", "testdata", name+".cdl")
	if b, err := exec.Command(ncgen, "-k", "netCDF-4", "-o", out, src).CombinedOutput(); err != nil {
		t.Fatalf("ncgen %s: %v\n%s", src, err, b)
	}
	return out
}

func TestInspectText(t *testing.T) {
	path := inspectFixture(t, "grid_ns_0360")
	var buf bytes.Buffer
	if err := runInspect(inspectOptions{Files: []string{path}}, &buf); err != nil {
		t.Fatalf("runInspect: %v\n%s", err, buf.String())
	}
	out := buf.String()
	for _, want := range []string{
		path + "  [usable]",
		"format: NetCDF-4; dimensions: time=1 (unlimited), lat=3, lon=4",
		"sst ← variable sst (standard_name sea_surface_temperature)",
		`units:    "K" is K: no conversion`,
		"grid:     3×4 lat×lon, regular 10° latitude × 90° longitude; lat -10…10, lon -180…90; bounds derived from midpoints",
		"time:     2000-01-15T12:00:00, 1 step (standard calendar)",
		"sample:   281 … 292 K (after conversion)",
		"note:     latitude stored north to south: reordered south to north",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("text report lacks %q:\n%s", want, out)
		}
	}
}

func TestInspectJSON(t *testing.T) {
	good := inspectFixture(t, "grid_ns_0360")
	month := inspectFixture(t, "month_units")
	var buf bytes.Buffer
	err := runInspect(inspectOptions{Files: []string{good, month}, JSON: true}, &buf)
	if !errors.Is(err, errFailed) {
		t.Fatalf("runInspect with an unusable file: %v, want errFailed", err)
	}
	var reps []cf.FileReport
	if err := json.Unmarshal(buf.Bytes(), &reps); err != nil {
		t.Fatalf("JSON: %v\n%s", err, buf.String())
	}
	if len(reps) != 2 || !reps[0].Usable || reps[1].Usable {
		t.Fatalf("reports %+v", reps)
	}
	f := reps[0].Fields[0]
	if f.Role != cf.RoleSST || f.Var != "sst" || f.Min == nil || *f.Min != 281 || *f.Max != 292 || f.SIUnits != "K" {
		t.Errorf("field %+v", f)
	}
	p := strings.Join(reps[1].Fields[0].Problems, "; ")
	if !strings.Contains(p, `units = "Month"`) || !strings.Contains(p, "time.climatology: true") {
		t.Errorf("problems %q", p)
	}
	// the raw JSON keys are the documented ones
	for _, key := range []string{`"path"`, `"usable"`, `"fields"`, `"recognised_by"`, `"sample_min"`, `"sample_max"`, `"problems"`} {
		if !strings.Contains(buf.String(), key) {
			t.Errorf("JSON lacks key %s", key)
		}
	}
	// every key is a name of the table (vocab), and units live in units
	// fields, never in names (no sample_min_si, si_units)
	var doc any
	if err := json.Unmarshal(buf.Bytes(), &doc); err != nil {
		t.Fatal(err)
	}
	var walk func(any)
	walk = func(x any) {
		switch x := x.(type) {
		case map[string]any:
			for k, v := range x {
				if strings.HasSuffix(k, "_si") || strings.HasPrefix(k, "si_") {
					t.Errorf("JSON key %q carries units in its name", k)
				}
				if err := vocab.Check(k); err != nil {
					t.Errorf("JSON key: %v", err)
				}
				walk(v)
			}
		case []any:
			for _, v := range x {
				walk(v)
			}
		}
	}
	walk(doc)
	var raw []struct {
		Fields []map[string]json.RawMessage `json:"fields"`
	}
	if err := json.Unmarshal(buf.Bytes(), &raw); err != nil {
		t.Fatal(err)
	}
	var lo struct {
		Value float64 `json:"value"`
		Units string  `json:"units"`
	}
	if err := json.Unmarshal(raw[0].Fields[0]["sample_min"], &lo); err != nil || lo.Value != 281 || lo.Units != "K" {
		t.Errorf("sample_min = %s (%v), want {\"value\": 281, \"units\": \"K\"}", raw[0].Fields[0]["sample_min"], err)
	}
}

// The whole command line: exit status 0 for usable files, 1 when a file
// cannot be used (the report says why), 2 for a usage mistake.
func TestInspectExitStatus(t *testing.T) {
	good := inspectFixture(t, "grid_ns_0360")
	junk := filepath.Join(t.TempDir(), "junk.nc")
	if err := os.WriteFile(junk, []byte("not a netCDF file"), 0o644); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		args   []string
		status int
		out    string
	}{
		{[]string{"inspect", good}, 0, "[usable]"},
		{[]string{"inspect", "--json", good}, 0, `"usable": true`},
		{[]string{"inspect", good, junk}, 1, "junk.nc  [NOT USABLE]"},
		{[]string{"inspect", filepath.Join(t.TempDir(), "absent.nc")}, 1, "cannot open"},
		{[]string{"inspect"}, 2, ""},
		{[]string{"inspect", "--bogus", good}, 2, ""},
	}
	for _, c := range cases {
		var stdout, stderr bytes.Buffer
		if got := run(c.args, &stdout, &stderr); got != c.status {
			t.Errorf("%v: status %d, want %d\nstdout: %s\nstderr: %s", c.args, got, c.status, stdout.String(), stderr.String())
		}
		if !strings.Contains(stdout.String(), c.out) {
			t.Errorf("%v: stdout lacks %q:\n%s", c.args, c.out, stdout.String())
		}
	}
}
