package analysis

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/config"
	"lidscope/factors"
	"lidscope/fixtures"
	"lidscope/internal/runcmp"
	"lidscope/pipeline"
	"lidscope/vocab"
)

// factorsStudy loads the small world's study with a factors section
// (sst and eis, the fields the world has) given as flags.
func factorsStudy(t *testing.T, data string, extra map[string]string) *config.Study {
	t.Helper()
	flags := map[string]string{"factors.use": "sst,eis", "factors.cell_fold_years": "2", "relationships.mode": "anomaly"}
	for k, v := range extra {
		flags[k] = v
	}
	r, err := config.Load(filepath.Join(data, fixtures.StudyFile), config.LoadOptions{LookupEnv: config.NoEnvironment, Flags: flags})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// TestFactorsPiecesMergeToTheSingleRun: with a factors section, a run
// writes factors.json/csv/nc, and pieces by two stages (the climatology
// of the whole record first), merged, give the single run's files
// (every output, the factor files included; internal/runcmp).
func TestFactorsPiecesMergeToTheSingleRun(t *testing.T) {
	dir := t.TempDir()
	data := smallData(t)
	r := factorsStudy(t, data, nil)
	if r.Relations.Mode.String() != "anomaly" {
		t.Fatalf("a factors section did not set anomaly mode (mode %s)", r.Relations.Mode)
	}
	whole, err := Run(context.Background(), r, nil, Options{OutDir: filepath.Join(dir, "whole"), NoPlots: true})
	if err != nil {
		t.Fatal(err)
	}
	res, err := factors.ReadRun(whole[0].OutDir)
	if err != nil {
		t.Fatal(err)
	}
	if res.Maps == nil || len(res.Fits) == 0 || len(res.Factors) != 2 {
		t.Fatalf("factor results incomplete: %d fits, %d factors, maps %v", len(res.Fits), len(res.Factors), res.Maps != nil)
	}
	fit, ok := res.Fit("tropical_band", "all")
	if !ok || fit.N == 0 || !(fit.NEff > 0) {
		t.Fatalf("no tropical-band fit: %+v", fit)
	}
	const n = 3
	var clims, dirs []string
	for k := 1; k <= n; k++ {
		c, err := ComputeClimatology(context.Background(), r, &r.Datasets[0], Options{Piece: pipeline.Piece{K: k, N: n}})
		if err != nil {
			t.Fatal(err)
		}
		p := filepath.Join(dir, fmt.Sprintf("clim-%d.gob", k))
		if err := WriteClimatology(p, c); err != nil {
			t.Fatal(err)
		}
		clims = append(clims, p)
	}
	clim, err := MergeClimatologies(clims)
	if err != nil {
		t.Fatal(err)
	}
	for k := 1; k <= n; k++ {
		out := filepath.Join(dir, fmt.Sprintf("piece-%d", k))
		if _, err := Run(context.Background(), r, nil, Options{OutDir: out, NoPlots: true, Piece: pipeline.Piece{K: k, N: n}, Climatology: clim}); err != nil {
			t.Fatal(err)
		}
		dirs = append(dirs, out)
	}
	m, err := Merge(dirs, filepath.Join(dir, "merged"), Options{})
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range factors.OutputNames() {
		if _, err := os.Stat(filepath.Join(m.OutDir, f)); err != nil {
			t.Errorf("merged run lacks %s: %v", f, err)
		}
	}
	d, err := runcmp.Folders(whole[0].OutDir, m.OutDir, runcmp.Options{Tol: 1e-6, IgnoreKeys: mergeKeys})
	if err != nil {
		t.Fatal(err)
	}
	for _, x := range d {
		t.Errorf("factor pieces differ from the single run: %s", x)
	}
}

// TestFactorsNeedTheirInputs: a factor whose inputs a dataset does not
// give is refused at the study line, naming the factor, the input and
// what to do.
func TestFactorsNeedTheirInputs(t *testing.T) {
	t.Parallel()
	data := smallData(t)
	for _, c := range []struct{ use, want string }{
		{"sst,rh700", "relative_humidity"},
		{"t_adv", "eastward_wind"},
		{"omega700", "omega"},
		{"sst,cloudiness", "not a factor"},
	} {
		_, err := config.Load(filepath.Join(data, fixtures.StudyFile), config.LoadOptions{LookupEnv: config.NoEnvironment, Flags: map[string]string{"factors.use": c.use, "relationships.mode": "anomaly"}})
		if err == nil {
			t.Errorf("factors.use %s: accepted without the inputs", c.use)
			continue
		}
		for _, w := range []string{"factors.use", c.want} {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("factors.use %s: error does not say %q:\n%v", c.use, w, err)
			}
		}
	}
	_, err := config.Load(filepath.Join(data, fixtures.StudyFile), config.LoadOptions{LookupEnv: config.NoEnvironment,
		Flags: map[string]string{"factors.use": "sst", "relationships.mode": "climatological"}})
	if err == nil || !strings.Contains(err.Error(), "anomaly") {
		t.Errorf("factors with relationships.mode: climatological: %v, want an error asking for anomaly mode", err)
	}
}

// TestFactorOutputsNamesAndFigures: a run with a factors section writes
// the factor files with names made of the table's terms only (as
// TestEveryOutputNameIsInTheTable checks the demo's), and draws the two
// factor figures from them.
func TestFactorOutputsNamesAndFigures(t *testing.T) {
	t.Parallel()
	data := smallData(t)
	r := factorsStudy(t, data, map[string]string{"factors.bootstrap.replicates": "20"})
	res := filepath.Join(t.TempDir(), "results")
	rep, err := Run(context.Background(), r, nil, Options{OutDir: filepath.Join(res, "synthetic-demo"), NoCoastlines: true})
	if err != nil {
		t.Fatal(err)
	}
	out := rep[0].OutDir
	extra := userNames(t, res)
	check := func(name, where string) {
		if err := vocab.Check(name, extra...); err != nil {
			t.Errorf("%s (in %s): %v", name, where, err)
		}
	}
	b, err := os.ReadFile(filepath.Join(out, factors.JSONFile))
	if err != nil {
		t.Fatal(err)
	}
	var v any
	if err := json.Unmarshal(b, &v); err != nil {
		t.Fatal(err)
	}
	jsonKeys(v, func(k string) { check(k, factors.JSONFile) })
	f, err := os.Open(filepath.Join(out, factors.CSVFile))
	if err != nil {
		t.Fatal(err)
	}
	head, err := csv.NewReader(f).Read()
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	for _, h := range head {
		name, _, _ := strings.Cut(h, " [")
		check(name, factors.CSVFile+" header")
	}
	ncNames(t, filepath.Join(out, factors.MapsFile), factors.MapsFile, check)
	for _, fig := range []string{"map_factor_sensitivities.png", "factor_sensitivities.png"} {
		fi, err := os.Stat(filepath.Join(out, "figures", fig))
		if err != nil || fi.Size() < 10000 {
			t.Errorf("figure %s not drawn (%v)", fig, err)
		}
	}
	fr, err := factors.ReadRun(out)
	if err != nil {
		t.Fatal(err)
	}
	if fit, _ := fr.Fit("tropical_band", "subsidence"); fit == nil || fit.Sens[0].BootLo != fit.Sens[0].BootLo {
		t.Errorf("no bootstrap interval in the tropical-band subsidence fit: %+v", fit)
	}
}
