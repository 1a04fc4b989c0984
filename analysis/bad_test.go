package analysis

// Bad input at the library level: the errors analysis.Run returns wrap the
// cause with %w all the way up, so a program embedding lidscope can tell a
// damaged file from a study problem with errors.Is / errors.As, and a
// failed dataset yields no report. The command-level tests of the same
// breaks (messages, exit status, no partial outputs) are in
// cmd/lidscope/badinput_test.go.

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"lidscope/config"
	"lidscope/fixtures"
	"lidscope/internal/testutil"
	"lidscope/netcdf"
	"lidscope/output"
)

// badLibWorld writes a small synthetic world (invented data; 5°, two
// years, one file per year) and returns its folder.
func badLibWorld(t *testing.T) string {
	t.Helper()
	o := fixtures.DefaultOptions()
	o.Name = "bad-lib"
	o.Resolution = 5
	o.Years = 2
	o.YearsPerFile = 1
	o.Command = []string{"lidscope-test"}
	return testutil.PrivateWorld(t, "bad-lib", func(dir string) error {
		_, err := fixtures.Generate(dir, o)
		return err
	})
}

func badLibSST(t *testing.T, dir string) []string {
	t.Helper()
	m, err := filepath.Glob(filepath.Join(dir, "sst", "*.nc"))
	if err != nil || len(m) != 2 {
		t.Fatalf("SST files: %v %v", m, err)
	}
	sort.Strings(m)
	return m
}

func TestBadErrorsWrap(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name   string
		break_ func(t *testing.T, dir string) map[string]string // returns study flags
		is     error
	}{
		{"NetCDF-4 file truncated", func(t *testing.T, dir string) map[string]string {
			p := badLibSST(t, dir)[1]
			st, err := os.Stat(p)
			if err != nil {
				t.Fatal(err)
			}
			if err := os.Truncate(p, st.Size()/2); err != nil {
				t.Fatal(err)
			}
			return nil
		}, netcdf.ErrHDF5},
		{"not a NetCDF file", func(t *testing.T, dir string) map[string]string {
			if err := os.WriteFile(badLibSST(t, dir)[1], []byte(strings.Repeat("x", 4096)), 0o644); err != nil {
				t.Fatal(err)
			}
			return nil
		}, netcdf.ErrNotNetCDF},
		{"the study names a variable the file lacks", func(t *testing.T, dir string) map[string]string {
			return map[string]string{"datasets.bad-lib.variables": "{sst: tos}"}
		}, netcdf.ErrNotVar},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := badLibWorld(t)
			flags := c.break_(t, dir)
			r, err := config.Load(filepath.Join(dir, fixtures.StudyFile), config.LoadOptions{LookupEnv: config.NoEnvironment, Flags: flags})
			if err != nil {
				t.Fatalf("config.Load: %v", err)
			}
			out := filepath.Join(t.TempDir(), "out")
			reps, err := Run(context.Background(), r, nil, Options{OutDir: out})
			if !errors.Is(err, c.is) {
				t.Fatalf("error %v does not wrap %v", err, c.is)
			}
			if !strings.HasPrefix(err.Error(), "dataset bad-lib: ") {
				t.Errorf("the error does not name the dataset: %v", err)
			}
			if len(reps) != 0 {
				t.Errorf("%d reports from a failed run", len(reps))
			}
			for _, n := range append(output.OutputNames(), StateFile) {
				if _, err := os.Stat(filepath.Join(out, n)); err == nil {
					t.Errorf("%s written by a failed run", n)
				}
			}
		})
	}
	t.Run("study typo", func(t *testing.T) {
		dir := badLibWorld(t)
		_, err := config.Load(filepath.Join(dir, fixtures.StudyFile), config.LoadOptions{LookupEnv: config.NoEnvironment, Flags: map[string]string{"analysis.treshold": "1"}})
		var ce *config.Error
		if !errors.As(err, &ce) {
			t.Fatalf("error %v (%T) is not a *config.Error", err, err)
		}
	})
}

// TestBadDemoRelativeFolder: with a relative folder (the command's default
// is "lidscope-demo") the demo's results go to FOLDER/results. config
// resolves a relative output.dir against the study's folder, so before
// the folder was made absolute they landed in FOLDER/data/FOLDER/results.
func TestBadDemoRelativeFolder(t *testing.T) {
	t.Chdir(t.TempDir())
	sc := fixtures.DefaultOptions()
	sc.Resolution = 5
	sc.Years = 2
	sc.YearsPerFile = 1
	d, err := Demo(context.Background(), "demo", DemoOptions{Scenario: &sc, Options: Options{NoPlots: true}}) // the check is of where the results go
	if err != nil {
		t.Fatal(err)
	}
	wd, err := os.Getwd()
	if err != nil {
		t.Fatal(err)
	}
	for _, rep := range d.Reports {
		want := filepath.Join(wd, "demo", "results", rep.Dataset)
		if rep.OutDir != want {
			t.Errorf("results of %s in %s, want %s", rep.Dataset, rep.OutDir, want)
		}
		if _, err := os.Stat(filepath.Join(want, output.MapsNC)); err != nil {
			t.Error(err)
		}
	}
	if _, err := os.Stat(filepath.Join("demo", "data", "demo")); err == nil {
		t.Errorf("demo/data/demo exists: results went below the data folder")
	}
}
