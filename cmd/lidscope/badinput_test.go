package main

// Bad input, end to end (issue 5: "each gets a test"). Each test starts
// from the small synthetic world of badWorld (package fixtures: invented
// data, labelled synthetic), breaks one thing the way real files and
// studies break, and runs `lidscope run` through run() in main.go, so the
// whole command path is exercised. A failure must give exit status 1, a
// message naming the file, variable or study key and what to do, nothing
// on stdout, and no output under its final name (maps.nc, series.nc, …,
// run-state.gob) and no hidden staging directory or temporary file in the
// output folder (badFails). Input that lidscope can use after a documented
// step (NaN/Inf masked and counted, a mask on another grid with an analysis
// grid, partly overlapping periods) must run and say so in the notes.

import (
	"encoding/json"
	"fmt"
	"io/fs"
	"lidscope/internal/testutil"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/fixtures"
	"lidscope/netcdf"
)

// TestBadInputBaseline runs the unbroken world, so that every failure
// below is caused by its one break and not by the world itself.
func TestBadInputBaseline(t *testing.T) {
	d := badWorld(t, nil)
	stdout, _ := badSucceeds(t, badStudy(t, d, nil))
	for _, want := range []string{"dataset bad-input: 24 time steps (2001-01 … 2002-12) on 36×72 regular 5°×5°", `note: sst (sst): units "degC" → K: x +273.15`} {
		if !strings.Contains(stdout, want) {
			t.Errorf("stdout lacks %q:\n%s", want, stdout)
		}
	}
	for _, bad := range []string{"NaN values", "infinite values", "dropped", "regridded", "impossible"} {
		if strings.Contains(stdout, bad) {
			t.Errorf("the unbroken world reports %q:\n%s", bad, stdout)
		}
	}
}

// replaceSST rewrites every SST file of world d (or only the one with the
// given index when only >= 0) through badCopyNC with edit.
func replaceSST(t *testing.T, d string, only int, format netcdf.Format, edit ncEdit) []string {
	t.Helper()
	files := badFiles(t, d, "sst", 2)
	for i, f := range files {
		if only >= 0 && i != only {
			continue
		}
		orig := f + ".orig"
		if err := os.Rename(f, orig); err != nil {
			t.Fatal(err)
		}
		badCopyNC(t, orig, f, format, edit)
		if err := os.Remove(orig); err != nil {
			t.Fatal(err)
		}
	}
	return files
}

func TestBadMissingRole(t *testing.T) {
	cases := []struct {
		name   string
		break_ func(t *testing.T, d string) string // returns the study
		want   func(d string) []string
	}{
		{"no low_cloud input in the study", func(t *testing.T, d string) string {
			return badStudy(t, d, func(s string) string {
				return replaceOnce(s, `      low_cloud: "low_cloud/*.nc"`, `      # low cloud left out`)
			})
		}, func(d string) []string {
			return []string{"study.yaml:7: datasets.bad-input.files:", `analysis.cloud is low_cloud, but dataset "bad-input" has no low_cloud input`}
		}},
		{"no sst input in the study", func(t *testing.T, d string) string {
			return badStudy(t, d, func(s string) string {
				return replaceOnce(s, `      sst: "sst/*.nc"`, `      # sst left out`)
			})
		}, func(d string) []string {
			return []string{"study.yaml:7: datasets.bad-input.files:", "needs files for role sst (files.sst): SST is the minimum"}
		}},
		{"the glob matches no file", func(t *testing.T, d string) string {
			for _, f := range badFiles(t, d, "low_cloud", 2) {
				if err := os.Remove(f); err != nil {
					t.Fatal(err)
				}
			}
			return badStudy(t, d, nil)
		}, func(d string) []string {
			return []string{"study.yaml:10: datasets.bad-input.files.low_cloud:", `role low_cloud: no file matches "low_cloud/*.nc"`, "check the path"}
		}},
		{"the file does not hold the role", func(t *testing.T, d string) string {
			return badStudy(t, d, func(s string) string { return replaceOnce(s, `low_cloud: "low_cloud/*.nc"`, `low_cloud: "sst/*.nc"`) })
		}, func(d string) []string {
			return []string{"role low_cloud: " + filepath.Join(d, "sst", "sst_200101-200112.nc") + ": no variable found for role low_cloud", "variables.low_cloud: NAME"}
		}},
		{"the variable the study names is not in the file", func(t *testing.T, d string) string {
			return badStudy(t, d, func(s string) string {
				return replaceOnce(s, "    ocean:\n", "    variables: {sst: tos}\n    ocean:\n")
			})
		}, func(d string) []string {
			return []string{filepath.Join(d, "sst", "sst_200101-200112.nc") + " has no variable tos", "(variables.sst; the file has lat, lat_bnds, lon, lon_bnds, time, time_bnds, sst)"}
		}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := badWorld(t, nil)
			badFails(t, c.break_(t, d), c.want(d)...)
		})
	}
}

func TestBadUnits(t *testing.T) {
	attr := func(v any) ncEdit { return ncEdit{Attrs: map[string]map[string]any{"sst": {"units": v}}} }
	first := func(d string) string { return filepath.Join(d, "sst", "sst_200101-200112.nc") }
	cases := []struct {
		name   string
		break_ func(t *testing.T, d string) string
		want   func(d string) []string
	}{
		// The fixtures store SST in degC (about −1.8…29 °C in this world).
		// Read as kelvin, every value is impossible for an SST; the
		// regimes would not even change (they depend on SST differences),
		// so only a check of the values can tell.
		{"file says K but holds degC", func(t *testing.T, d string) string {
			replaceSST(t, d, -1, netcdf.FormatNetCDF4Classic, attr("K"))
			return badStudy(t, d, nil)
		}, func(d string) []string {
			return []string{"role sst, variable sst in " + first(d) + ` (units attribute "K")`,
				"these look like degrees Celsius, not kelvin; if so set units.sst: degC in the study"}
		}},
		{"study says K over a degC file", func(t *testing.T, d string) string {
			return badStudy(t, d, func(s string) string { return replaceOnce(s, "    ocean:\n", "    units: {sst: K}\n    ocean:\n") })
		}, func(d string) []string {
			return []string{"role sst, variable sst in " + first(d) + ` (units "K" from the study, units.sst)`,
				"these look like degrees Celsius, not kelvin"}
		}},
		{"file units are not a temperature", func(t *testing.T, d string) string {
			replaceSST(t, d, -1, netcdf.FormatNetCDF4Classic, attr("m s-1"))
			return badStudy(t, d, nil)
		}, func(d string) []string {
			return []string{"role sst: " + first(d) + ": variable sst (units attribute)", `"m s-1" is not a temperature unit`, "set units.sst in the study"}
		}},
		{"study units are not a temperature", func(t *testing.T, d string) string {
			return badStudy(t, d, func(s string) string { return replaceOnce(s, "    ocean:\n", "    units: {sst: m}\n    ocean:\n") })
		}, func(d string) []string {
			return []string{"study.yaml:12: datasets.bad-input.units.sst:", `"m" is not a temperature unit`}
		}},
		{"no units attribute", func(t *testing.T, d string) string {
			replaceSST(t, d, -1, netcdf.FormatNetCDF4Classic, attr(nil))
			return badStudy(t, d, nil)
		}, func(d string) []string {
			return []string{first(d) + ": variable sst has no units attribute", "units.sst: K"}
		}},
		// Cloud in percent labelled as a fraction: values up to ~90 are
		// impossible for a cloud fraction.
		{"cloud percent labelled 1", func(t *testing.T, d string) string {
			for _, f := range badFiles(t, d, "low_cloud", 2) {
				orig := f + ".orig"
				if err := os.Rename(f, orig); err != nil {
					t.Fatal(err)
				}
				badCopyNC(t, orig, f, netcdf.FormatNetCDF4Classic, ncEdit{Attrs: map[string]map[string]any{"low_cloud": {"units": "1"}}})
				if err := os.Remove(orig); err != nil {
					t.Fatal(err)
				}
			}
			return badStudy(t, d, nil)
		}, func(d string) []string {
			return []string{"role low_cloud, variable low_cloud in " + filepath.Join(d, "low_cloud", "low_cloud_200101-200112.nc") + ` (units attribute "1")`,
				"look like percent; if so set units.low_cloud: % in the study"}
		}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := badWorld(t, nil)
			badFails(t, c.break_(t, d), c.want(d)...)
		})
	}
}

// useOtherWorld replaces world d's files of one role directory by those of
// world o (same names are not needed: the study globs the directory).
func useOtherWorld(t *testing.T, d, o, sub string) {
	t.Helper()
	for _, f := range badFiles(t, d, sub, 2) {
		if err := os.Remove(f); err != nil {
			t.Fatal(err)
		}
	}
	for _, f := range badFiles(t, o, sub, 2) {
		badCopyFile(t, f, filepath.Join(d, sub, filepath.Base(f)))
	}
}

const gridTargetSST = "  transition: 0.0\n  grid: {target: sst}\n"

// TestBadGridMismatch: low cloud on a 10° grid, everything else on 5°.
func TestBadGridMismatch(t *testing.T) {
	d := badWorld(t, nil)
	o := badWorld(t, func(o *fixtures.Options) { o.Resolution = 10 })
	useOtherWorld(t, d, o, "low_cloud")
	study := badStudy(t, d, nil)
	c0, c1 := filepath.Join(d, "low_cloud", "low_cloud_200101-200112.nc"), filepath.Join(d, "low_cloud", "low_cloud_200201-200212.nc")
	s0 := filepath.Join(d, "sst", "sst_200101-200112.nc")
	badFails(t, study,
		"role low_cloud ("+c0+", "+c1+") is on grid 18×36 regular 10°×10°",
		"but sst ("+s0, "is on grid 36×72 regular 5°×5°",
		"set an analysis grid in the study (analysis.grid.target: sst, or a resolution such as 2deg) to regrid")

	// The fix the message names works.
	study = badStudy(t, d, func(s string) string { return replaceOnce(s, "  transition: 0.0\n", gridTargetSST) })
	stdout, _ := badSucceeds(t, study)
	want := "note: low_cloud regridded from 18×36 regular 10°×10°, lat -85…85, lon -175…175 to 36×72 regular 5°×5°, lat -87.5…87.5, lon -177.5…177.5 (conservative, min coverage 0.5)"
	if !strings.Contains(stdout, want) {
		t.Errorf("stdout lacks %q:\n%s", want, stdout)
	}
}

// TestBadMaskOtherGrid: the land fraction comes on a 4° grid, which does
// not nest in the 5° grid of the other inputs. Without an analysis grid
// the run stops and says how to fix it; with analysis.grid.target: sst the
// mask is remapped conservatively as a fraction and thresholded at 0.5
// (config's mask_threshold default), and the run says so. The ocean
// columns the run used are checked against CDO's first-order conservative
// remapping of the same land fraction (cdo remapcon; Jones 1999, Mon. Wea.
// Rev. 127, 2204–2210), thresholded the same way.
func TestBadMaskOtherGrid(t *testing.T) {
	d := badWorld(t, nil)
	o := badWorld(t, func(o *fixtures.Options) { o.Resolution = 4 })
	land := filepath.Join(d, "land_area_fraction.nc")
	land5 := filepath.Join(t.TempDir(), "land5.nc")
	badCopyFile(t, land, land5)
	badCopyFile(t, filepath.Join(o, "land_area_fraction.nc"), land)

	badFails(t, badStudy(t, d, nil),
		"role land_fraction ("+land+") is on grid 45×90 regular 4°×4°",
		"but sst ("+filepath.Join(d, "sst", "sst_200101-200112.nc"), "is on grid 36×72 regular 5°×5°",
		"analysis.grid.target: sst")

	stdout, out := badSucceeds(t, badStudy(t, d, func(s string) string { return replaceOnce(s, "  transition: 0.0\n", gridTargetSST) }))
	if want := "note: land_fraction regridded from 45×90 regular 4°×4°"; !strings.Contains(stdout, want) {
		t.Errorf("stdout lacks %q:\n%s", want, stdout)
	}

	cdo := testutil.Tool(t, "cdo")
	remapped := filepath.Join(t.TempDir(), "land4to5.nc")
	if b, err := execCombined(cdo, "-s", "remapcon,"+land5, land, remapped); err != nil {
		t.Fatalf("cdo remapcon: %v\n%s", err, b)
	}
	ref := readVar(t, remapped, "land_fraction") // %, canonical 5° layout (the grid of land5)
	l5 := readVar(t, land5, "land_fraction")
	valid := readVar(t, filepath.Join(out, "maps.nc"), "valid_steps")
	if len(ref) != 36*72 || len(l5) != 36*72 || len(valid) != 36*72 {
		t.Fatalf("sizes: cdo %d, 5° land %d, valid_steps %d; want %d", len(ref), len(l5), len(valid), 36*72)
	}
	ocean, bad := 0, 0
	for i := range ref {
		// SST is present where the 5° land fraction is below 50 %; the
		// mask keeps cells whose remapped ocean fraction is at least 0.5.
		want := l5[i] < 50 && 1-ref[i]/100 >= 0.5
		got := valid[i] == 24
		if !got && valid[i] != 0 {
			t.Errorf("cell %d: %g valid steps, want 0 or 24", i, valid[i])
		}
		if want {
			ocean++
		}
		if got != want && math.Abs(ref[i]-50) > 1e-3 {
			bad++
			if bad <= 5 {
				t.Errorf("cell %d (lat row %d, lon col %d): run ocean=%v, CDO remapped land %.4f %% and 5° land %.0f %% say %v", i, i/72, i%72, got, ref[i], l5[i], want)
			}
		}
	}
	if bad > 0 {
		t.Errorf("%d of %d cells disagree with CDO's remapped mask", bad, len(ref))
	}
	if ocean < 1000 {
		t.Errorf("only %d ocean cells: the comparison would prove little", ocean)
	}
}

func TestBadCalendars(t *testing.T) {
	t.Run("files of one record", func(t *testing.T) {
		d := badWorld(t, nil)
		o := badWorld(t, func(o *fixtures.Options) { o.Calendar = "noleap" })
		s := badFiles(t, d, "sst", 2)
		badCopyFile(t, badFiles(t, o, "sst", 2)[1], s[1])
		badFails(t, badStudy(t, d, nil), "role sst: files of one record must share a calendar: "+s[0]+" uses standard, "+s[1]+" uses noleap")
	})
	t.Run("between roles", func(t *testing.T) {
		d := badWorld(t, nil)
		o := badWorld(t, func(o *fixtures.Options) { o.Calendar = "360_day" })
		useOtherWorld(t, d, o, "low_cloud")
		c := badFiles(t, d, "low_cloud", 2)
		s := badFiles(t, d, "sst", 2)
		badFails(t, badStudy(t, d, nil),
			"role low_cloud ("+c[0]+", "+c[1]+") uses the 360_day calendar but sst ("+s[0]+", "+s[1]+") uses standard",
			"cdo setcalendar", "time.calendar")
	})
}

func TestBadTimeOverlap(t *testing.T) {
	t.Run("none", func(t *testing.T) {
		d := badWorld(t, nil)
		o := badWorld(t, func(o *fixtures.Options) { o.StartYear = 1990 })
		useOtherWorld(t, d, o, "low_cloud")
		badFails(t, badStudy(t, d, nil),
			"no time step is common to every input",
			"24 sst time steps dropped because low_cloud has no matching step (2001-01, 2001-02, …, 2002-12)",
			"low_cloud 1990-01-16T12:00:00 … 1991-12-16T12:00:00, 24 monthly steps (standard calendar) ("+filepath.Join(d, "low_cloud", "low_cloud_199001-199012.nc"),
			"sst 2001-01-16T12:00:00 … 2002-12-16T12:00:00",
			"time.start, time.end")
	})
	// Partly overlapping periods are not an error: the run keeps the
	// common steps and says which were dropped.
	t.Run("partial", func(t *testing.T) {
		d := badWorld(t, nil)
		o := badWorld(t, func(o *fixtures.Options) { o.StartYear = 2002 })
		useOtherWorld(t, d, o, "low_cloud")
		stdout, _ := badSucceeds(t, badStudy(t, d, nil))
		for _, want := range []string{"dataset bad-input: 12 time steps (2002-01 … 2002-12)",
			"note: 12 sst time steps dropped because low_cloud has no matching step (2001-01, 2001-02, …, 2001-12)"} {
			if !strings.Contains(stdout, want) {
				t.Errorf("stdout lacks %q:\n%s", want, stdout)
			}
		}
	})
}

// TestBadAllMissingSlab blanks one whole time step of SST (April 2002, the
// 16th of 24 steps, in the second file), so the run fails in mid-stream
// after 15 steps have been accumulated: nothing may be left behind.
func TestBadAllMissingSlab(t *testing.T) {
	d := badWorld(t, nil)
	files := replaceSST(t, d, 1, netcdf.FormatNetCDF4Classic, ncEdit{Data: func(name string, shape []int, v []float64) {
		if name != "sst" {
			return
		}
		n := shape[1] * shape[2]
		for i := 3 * n; i < 4*n; i++ {
			v[i] = 1e20 // the variable's _FillValue
		}
	}})
	badFails(t, badStudy(t, d, nil),
		"role sst, variable sst in "+files[1]+", time step 2002-04: every SST value in the band -30…30°N is missing (an all-missing slab)",
		"time.start, time.end")
}

// TestBadNaNInf puts NaN, +Inf and −Inf into ocean cells of the second SST
// file (whose _FillValue is 1e20, so NaN is not its missing-data marker).
// The run must succeed, count each kind in its notes (stdout and
// summary.json), and leave exactly those column-steps out: the valid_steps
// map of maps.nc is 24 − (poisoned steps) at each poisoned cell and 24 at
// every other ocean cell, and no SST mean is infinite.
func TestBadNaNInf(t *testing.T) {
	d := badWorld(t, nil)
	type cell struct{ j, i int } // file row (lat, south to north) and column (lon 2.5…357.5)
	poisoned := map[cell]int{}   // cell → poisoned steps
	nNaN, nInf := 0, 0
	replaceSST(t, d, 1, netcdf.FormatNetCDF4Classic, ncEdit{Data: func(name string, shape []int, v []float64) {
		if name != "sst" {
			return
		}
		nlat, nlon := shape[1], shape[2]
		k := 0
		for step := 0; step < shape[0]; step += 3 {
			for j := 10; j < nlat-10; j += 3 {
				for i := step; i < nlon; i += 7 {
					p := (step*nlat+j)*nlon + i
					if v[p] >= 1e19 { // land: fill value
						continue
					}
					switch k % 3 {
					case 0:
						v[p] = math.NaN()
						nNaN++
					case 1:
						v[p] = math.Inf(1)
						nInf++
					default:
						v[p] = math.Inf(-1)
						nInf++
					}
					k++
					poisoned[cell{j, i}]++
				}
			}
		}
	}})
	if nNaN < 10 || nInf < 20 {
		t.Fatalf("only %d NaN and %d Inf values placed", nNaN, nInf)
	}
	stdout, out := badSucceeds(t, badStudy(t, d, nil))
	notes := []string{
		fmt.Sprintf("sst (sst): %d NaN values (not the declared fill value) treated as missing", nNaN),
		fmt.Sprintf("sst (sst): %d infinite values treated as missing", nInf),
	}
	for _, n := range notes {
		if !strings.Contains(stdout, "note: "+n) {
			t.Errorf("stdout lacks the note %q:\n%s", n, stdout)
		}
	}
	var sum struct {
		Notes []string `json:"notes"`
	}
	b, err := os.ReadFile(filepath.Join(out, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &sum); err != nil {
		t.Fatal(err)
	}
	for _, n := range notes {
		if !strings.Contains(strings.Join(sum.Notes, "\n"), n) {
			t.Errorf("summary.json notes lack %q: %q", n, sum.Notes)
		}
	}

	valid := readVar(t, filepath.Join(out, "maps.nc"), "valid_steps") // canonical: lon −177.5…177.5
	const nlat, nlon = 36, 72
	if len(valid) != nlat*nlon {
		t.Fatalf("valid_steps has %d cells, want %d", len(valid), nlat*nlon)
	}
	canon := func(c cell) int { return c.j*nlon + (c.i+nlon/2)%nlon } // file lon 2.5+5i → canonical column
	seen := map[int]bool{}
	for c, n := range poisoned {
		k := canon(c)
		seen[k] = true
		if valid[k] != float64(24-n) {
			t.Errorf("file cell (row %d, col %d): %g valid steps, want %d (24 minus %d poisoned)", c.j, c.i, valid[k], 24-n, n)
		}
	}
	full := 0
	for k, x := range valid {
		if seen[k] {
			continue
		}
		if x != 0 && x != 24 {
			t.Errorf("cell %d, not poisoned: %g valid steps, want 0 (land) or 24", k, x)
		}
		if x == 24 {
			full++
		}
	}
	if full < 1000 {
		t.Errorf("only %d clean ocean cells", full)
	}
	mean := readVar(t, filepath.Join(out, "maps.nc"), "sst_mean")
	for k, x := range mean {
		if math.IsInf(x, 0) || (x < 1e19 && (x < 260 || x > 310)) {
			t.Fatalf("sst_mean[%d] = %g: a poisoned value reached the statistics", k, x)
		}
	}
}

func TestBadTruncated(t *testing.T) {
	cases := []struct {
		name   string
		format netcdf.Format // the second SST file is rewritten in this format (0: kept)
		keep   float64       // fraction of its bytes kept
		want   []string      // after the path
	}{
		// Classic files cut short still open in netCDF-C, which then
		// returns zeros; cf's header-extent check (NetCDF Classic Format
		// Specification) catches them.
		{"classic, 60 %", netcdf.FormatClassic, 0.6, []string{" is truncated: its header describes", "copy or download the file again"}},
		{"classic, last bytes missing", netcdf.FormatClassic, 0.999, []string{" is truncated: its header describes"}},
		// NetCDF-4 (HDF5): the library refuses to open it.
		{"NetCDF-4, 60 %", 0, 0.6, []string{": NetCDF: HDF error", "damaged or truncated"}},
		{"NetCDF-4, last bytes missing", 0, 0.999, []string{": NetCDF: HDF error", "damaged or truncated"}},
		{"not NetCDF at all", 0, -1, []string{": NetCDF: Unknown file format", "not NetCDF"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := badWorld(t, nil)
			s := badFiles(t, d, "sst", 2)
			if c.format != 0 {
				replaceSST(t, d, 1, c.format, ncEdit{})
			}
			if c.keep < 0 {
				if err := os.WriteFile(s[1], []byte(strings.Repeat("these are not the data you want\n", 64)), 0o644); err != nil {
					t.Fatal(err)
				}
			} else {
				badTruncate(t, s[1], c.keep)
			}
			badFails(t, badStudy(t, d, nil), append([]string{"role sst: "}, prefixFirst(s[1], c.want)...)...)
		})
	}
}

// prefixFirst returns want with path put before the first entry, and the
// path alone where the message puts the library's operation first.
func prefixFirst(path string, want []string) []string {
	out := append([]string{}, want...)
	if strings.HasPrefix(out[0], " is truncated") {
		out[0] = path + out[0]
	} else {
		out = append(out, path)
	}
	return out
}

func TestBadStudyTypo(t *testing.T) {
	cases := []struct {
		old, new string
		want     string // key path and suggestion, after "study.yaml:LINE: "
	}{
		{"  threshold: 1.5", "  thresold: 1.5", `analysis.thresold: unknown key "thresold" in analysis; did you mean "threshold"?`},
		{"min_fraction:", "min_fracton:", `datasets.bad-input.ocean.min_fracton: unknown key "min_fracton" in datasets.bad-input.ocean; did you mean "min_fraction"?`},
		{`low_cloud: "low_cloud/*.nc"`, `low_clod: "low_cloud/*.nc"`, `datasets.bad-input.files.low_clod: unknown role "low_clod" in datasets.bad-input.files; did you mean "low_cloud"?`},
		{"analysis:\n", "analysys:\n", `analysys: unknown key "analysys" at the top of the study; did you mean "analysis"?`},
	}
	for _, c := range cases {
		t.Run(c.new, func(t *testing.T) {
			d := badWorld(t, nil)
			var text string
			p := badStudy(t, d, func(s string) string { text = replaceOnce(s, c.old, c.new); return text })
			line := 1 + strings.Count(text[:strings.Index(text, c.new)], "\n")
			badFails(t, p, fmt.Sprintf("%s:%d: %s", p, line, c.want))
		})
	}
	t.Run("--set", func(t *testing.T) {
		d := badWorld(t, nil)
		out := filepath.Join(t.TempDir(), "results")
		code, stdout, stderr := badRun(t, "--quiet", "--out", out, "--set", "analysis.treshold=1", badStudy(t, d, nil))
		if code != 1 || stdout != "" {
			t.Errorf("exit status %d (want 1), stdout %q", code, stdout)
		}
		if want := `analysis.treshold (from flag analysis.treshold): unknown key "treshold" in analysis; did you mean "threshold"?`; !strings.Contains(stderr, want) {
			t.Errorf("the error lacks %q:\n%s", want, stderr)
		}
		badNoOutputs(t, out)
	})
}

// TestBadForceKeepsEarlierResults: a failed run with --force into a folder
// that holds an earlier run's results leaves them exactly as they were.
func TestBadForceKeepsEarlierResults(t *testing.T) {
	d := badWorld(t, nil)
	study := badStudy(t, d, nil)
	out := filepath.Join(t.TempDir(), "results")
	if code, stdout, stderr := badRun(t, "--quiet", "--out", out, study); code != 0 {
		t.Fatalf("first run: exit status %d\n%s\n%s", code, stdout, stderr)
	}
	before := snapshot(t, out)
	badTruncate(t, badFiles(t, d, "sst", 2)[1], 0.5)
	code, stdout, stderr := badRun(t, "--quiet", "--force", "--out", out, study)
	if code != 1 || stdout != "" || !strings.Contains(stderr, "HDF error") {
		t.Fatalf("second run: exit status %d (want 1)\nstdout:\n%s\nstderr:\n%s", code, stdout, stderr)
	}
	after := snapshot(t, out)
	if len(after) != len(before) {
		t.Errorf("the folder held %d files, now %d", len(before), len(after))
	}
	for n, b := range before {
		if after[n] != b {
			t.Errorf("%s changed or vanished after the failed run", n)
		}
	}
}

// snapshot maps each file name in dir to its content.
func snapshot(t *testing.T, dir string) map[string]string {
	t.Helper()
	m := map[string]string{}
	err := filepath.WalkDir(dir, func(p string, e fs.DirEntry, err error) error {
		if err != nil || e.IsDir() {
			return err
		}
		b, err := os.ReadFile(p)
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(dir, p)
		m[rel] = string(b)
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if len(m) < 6 {
		t.Fatalf("%s holds only %d files", dir, len(m))
	}
	return m
}

// readVar reads a whole variable as float64 (values as stored).
func readVar(t *testing.T, path, name string) []float64 {
	t.Helper()
	f, err := netcdf.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	v, err := f.Var(name)
	if err != nil {
		t.Fatal(err)
	}
	x, err := v.ReadAllFloat64()
	if err != nil {
		t.Fatal(err)
	}
	return x
}
