package main

// Inputs that `lidscope inspect` calls NOT USABLE do not run (issue 13):
// run applies the same checks (cf.Assess) and stops with the same message,
// unless the study accepts the named check for the dataset, which the run
// records. Each case breaks the small synthetic world of badWorld
// (invented data) in one way; before, every one of them ran with exit 0.

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/cf"
	"lidscope/netcdf"
)

// rewriteNC rewrites path in place through badCopyNC.
func rewriteNC(t *testing.T, path string, edit ncEdit) {
	t.Helper()
	orig := path + ".orig"
	if err := os.Rename(path, orig); err != nil {
		t.Fatal(err)
	}
	badCopyNC(t, orig, path, netcdf.FormatNetCDF4Classic, edit)
	if err := os.Remove(orig); err != nil {
		t.Fatal(err)
	}
}

// landInPercentLabelledOne relabels the world's land fraction (0–100 %)
// as a 0–1 fraction.
func landInPercentLabelledOne(t *testing.T, d string) {
	rewriteNC(t, filepath.Join(d, "land_area_fraction.nc"), ncEdit{Attrs: map[string]map[string]any{"land_fraction": {"units": "1"}}})
}

func TestUnusableInputsDoNotRun(t *testing.T) {
	cases := []struct {
		name   string
		check  string
		break_ func(t *testing.T, d string)
		want   []string
	}{
		{"land fraction in percent labelled 1", cf.CheckLooksPercent, landInPercentLabelledOne,
			[]string{"role land_fraction, variable land_fraction", "land_area_fraction.nc", "values up to 100 look like percent"}},
		{"cloud missing everywhere", cf.CheckAllMissing, func(t *testing.T, d string) {
			for _, f := range badFiles(t, d, "low_cloud", 2) {
				rewriteNC(t, f, ncEdit{Data: func(name string, _ []int, v []float64) {
					if name == "low_cloud" {
						for i := range v {
							v[i] = math.NaN()
						}
					}
				}})
			}
		}, []string{"role low_cloud, variable low_cloud", "every sampled value is missing"}},
		{"SST 0 everywhere", cf.CheckSSTZero, func(t *testing.T, d string) {
			replaceSST(t, d, -1, netcdf.FormatNetCDF4Classic, ncEdit{Data: func(name string, _ []int, v []float64) {
				if name == "sst" {
					for i := range v {
						if v[i] < 1e19 {
							v[i] = 0
						}
					}
				}
			}})
		}, []string{"role sst, variable sst", "SST is 0 everywhere"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := badWorld(t, nil)
			c.break_(t, d)
			study := badStudy(t, d, nil)
			want := append([]string{"NOT USABLE (as lidscope inspect reports)", "[check " + c.check + "]", "accept: [" + c.check + "]"}, c.want...)
			stderr := badFails(t, study, want...)
			// inspect gives the same verdict, in the same words
			files, err := filepath.Glob(filepath.Join(d, "*", "*.nc"))
			if err != nil {
				t.Fatal(err)
			}
			files = append(files, filepath.Join(d, "land_area_fraction.nc"))
			found := false
			for _, f := range files {
				r := cf.Inspect(f)
				for _, fr := range r.Fields {
					for _, p := range fr.Problems {
						if strings.Contains(stderr, p) {
							found = true
							if r.Usable {
								t.Errorf("%s: inspect calls it usable", f)
							}
						}
					}
				}
			}
			if !found {
				t.Errorf("no problem of lidscope inspect appears in the run's message:\n%s", stderr)
			}
		})
	}
	t.Run("accepted in the study, recorded", func(t *testing.T) {
		d := badWorld(t, nil)
		landInPercentLabelledOne(t, d)
		study := badStudy(t, d, func(s string) string {
			return replaceOnce(s, "    ocean:\n", "    accept: [looks_percent]\n    ocean:\n")
		})
		stdout, out := badSucceeds(t, study)
		note := "land_fraction (land_fraction): check looks_percent accepted by the study (accept)"
		if !strings.Contains(stdout, note) {
			t.Errorf("stdout lacks %q:\n%s", note, stdout)
		}
		b, err := os.ReadFile(filepath.Join(out, "provenance.json"))
		if err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(string(b), note) {
			t.Errorf("provenance.json does not record the accepted check %q", note)
		}
	})
	t.Run("unknown check name", func(t *testing.T) {
		d := badWorld(t, nil)
		study := badStudy(t, d, func(s string) string {
			return replaceOnce(s, "    ocean:\n", "    accept: [looks_percnt]\n    ocean:\n")
		})
		badFails(t, study, "datasets.bad-input.accept", `"looks_percnt" is not a check`, cf.CheckLooksPercent)
	})
}
