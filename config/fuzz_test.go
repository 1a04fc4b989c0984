package config_test

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/config"
)

// FuzzLoad feeds random bytes to Load in each format: it must return a
// study or an error, never panic, and a study it returns must have a
// stable resolved text.
func FuzzLoad(f *testing.F) {
	for _, p := range exampleFiles {
		b, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b, uint8(0))
		f.Add(b, uint8(1))
		f.Add(b, uint8(2))
	}
	f.Add([]byte(head), uint8(0))
	f.Add([]byte("datasets:\n  &a x:\n    files: *a\n"), uint8(0))
	f.Add([]byte("datasets:\n  - name: old-list-form\n    files: {sst: sst.nc}\n"), uint8(0))
	f.Add([]byte("[datasets.1979-01-01]\nabout = 1979-01-01\n"), uint8(1))
	f.Add([]byte(`{"datasets": {"1e400": {"about": 1e400}, "": {}}}`), uint8(2))
	f.Add([]byte(head+"    time:\n      sst: {units: days since 0000-01-01, calendar: 360_day}\n      all: {units: x}\n"), uint8(0))
	f.Add([]byte("analysis: {threshold: .nan, band: [1, 2]}\n"), uint8(0))
	f.Add([]byte(head+"relationships:\n  bins: {eis: {min: 0, max: 1e308, width: 1e-308}, lts: [1, 2]}\n  threshold: {indicator: olr, value: 240 W m-2}\n  bootstrap: {seed: 9007199254740993}\n"), uint8(0))
	f.Add([]byte("[datasets.x]\nfiles = { sst = \"sst.nc\", air_temperature = \"ta.nc\", low_cloud = \"cll.nc\" }\n[relationships.bins]\neis = { min = -1, max = 1, width = 0.1 }\n"), uint8(1))
	exts := []string{".yaml", ".toml", ".json"}
	dir := f.TempDir()
	// the example's data files, so that valid studies can load
	for _, n := range []string{"example/sst/a.nc", "example/ta_1979-1998.nc", "example/ta_1999-2018.nc", "example/cloud/cll_1.nc", "example/mask.nc", "example/model_all_1979-2008.nc", "sst.nc", "ta.nc", "cll.nc"} {
		p := filepath.Join(dir, n)
		os.MkdirAll(filepath.Dir(p), 0o755)
		os.WriteFile(p, nil, 0o644)
	}
	f.Fuzz(func(t *testing.T, src []byte, ext uint8) {
		p := filepath.Join(dir, "fuzz"+exts[int(ext)%3])
		if err := os.WriteFile(p, src, 0o644); err != nil {
			t.Fatal(err)
		}
		r, err := config.Load(p, config.LoadOptions{LookupEnv: config.NoEnvironment, Flags: map[string]string{"output.plots": "false"}})
		if err != nil {
			if err.Error() == "" {
				t.Fatal("empty error message")
			}
			return
		}
		if len(r.Datasets) == 0 {
			t.Fatal("a study without datasets loaded")
		}
		if a, b := r.Resolved(), r.Resolved(); a != b || !strings.HasPrefix(a, "{") {
			t.Fatal("unstable resolved text")
		}
		if len(r.Hash()) != 64 {
			t.Fatal("bad hash")
		}
	})
}

// FuzzOverrides feeds random flag keys and values: problems, never panics.
func FuzzOverrides(f *testing.F) {
	f.Add("analysis.threshold", "1.0")
	f.Add("datasets.base.time.months", "12,1,2")
	f.Add("datasets.base", "{about: x}")
	f.Add("datasets.base.time.sst.calendar", "noleap")
	f.Add("datasets.nobody.about", "x")
	f.Add("analysis.regions", "[{name: a}]")
	f.Add("datasets.99999999999999999999.name", "x")
	f.Add("datasets.-1.name", "null")
	f.Add("datasets", "[]")
	dir := dataDir(f, baseFiles...)
	p := filepath.Join(dir, "r.yaml")
	if err := os.WriteFile(p, []byte(head+"analysis:\n  regions:\n    - {name: a, south: 0, north: 1, west: 0, east: 1}\n"), 0o644); err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, k, v string) {
		env := func(name string) (string, bool) {
			if name == config.EnvName(k) {
				return v, true
			}
			return "", false
		}
		_, _ = config.Load(p, config.LoadOptions{Flags: map[string]string{k: v}, LookupEnv: env})
	})
}
