package cf

import (
	"lidscope/internal/testutil"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// Real files nobody here wrote: Debian's libncarg-data (NCAR Graphics
// example data), unpacked by `make realdata` into $LIDSCOPE_REALDATA
// (subfolders cdf/ and nug/). Values read through cf are compared cell by
// cell with ncdump (netcdf-bin) output.

// ncdumpValues runs `ncdump -v name` and parses the root group's data of
// variable name into float64s; "_" (fill) and NaN become NaN.
func ncdumpValues(t *testing.T, path, name string) []float64 {
	t.Helper()
	tool := testutil.Tool(t, "ncdump")
	out, err := exec.Command(tool, "-p", "9,17", "-v", name, path).Output()
	if err != nil {
		t.Fatalf("ncdump -v %s %s: %v", name, path, err)
	}
	s := string(out)
	i := strings.Index(s, "\ndata:")
	if i < 0 {
		t.Fatalf("ncdump output has no data section")
	}
	s = s[i:]
	j := strings.Index(s, "\n "+name+" =")
	if j < 0 {
		t.Fatalf("ncdump output has no data for %s", name)
	}
	s = s[j+len(name)+4:]
	s = s[:strings.Index(s, ";")]
	var vals []float64
	for _, f := range strings.Split(s, ",") {
		f = strings.TrimSpace(f)
		switch {
		case f == "_" || strings.HasPrefix(f, "NaN"):
			vals = append(vals, math.NaN())
			continue
		}
		x, err := strconv.ParseFloat(strings.TrimSuffix(f, "f"), 64)
		if err != nil {
			t.Fatalf("ncdump value %q: %v", f, err)
		}
		vals = append(vals, x)
	}
	return vals
}

// compareWithNcdump checks every canonical cell of slab got (time step ts,
// level index z of nz) against the stored value ncdump prints, decoded by
// want. The stored cell of canonical (i, j) is found from the coordinate
// values alone: the latitude equal to Layout.Lat[i], the first longitude
// equal to Layout.Lon[j] modulo 360. Stored order [time][lev][lat][lon].
func compareWithNcdump(t *testing.T, path string, f *Field, latName, lonName string, got []float32, ts, z, nz int, want func(stored float64) float64) {
	t.Helper()
	data := ncdumpValues(t, path, f.Var)
	lat := ncdumpValues(t, path, latName)
	lon := ncdumpValues(t, path, lonName)
	ny, nx := len(lat), len(lon)
	find := func(c []float64, x float64, mod bool) int {
		for k, y := range c {
			if mod {
				y = math.Mod(math.Mod(y+180, 360)+360, 360) - 180
			}
			if math.Abs(y-x) < 1e-4 {
				return k
			}
		}
		t.Fatalf("coordinate %v not in the file's %v", x, c)
		return -1
	}
	bad := 0
	for i, la := range f.Layout.Lat {
		k := find(lat, la, false)
		for j, lo := range f.Layout.Lon {
			m := find(lon, lo, true)
			w := want(data[((ts*nz+z)*ny+k)*nx+m])
			g := float64(got[i*len(f.Layout.Lon)+j])
			if math.IsNaN(w) != math.IsNaN(g) || (!math.IsNaN(w) && math.Abs(g-w) > 1e-4*math.Max(1, math.Abs(w))) {
				if bad++; bad < 5 {
					t.Errorf("%s cell (%g, %g): cf %v, ncdump gives %v", f.Var, la, lo, g, w)
				}
			}
		}
	}
	if bad > 0 {
		t.Errorf("%d cells differ", bad)
	}
}

func TestRealSSTClimatology(t *testing.T) {
	t.Parallel()
	path := testutil.RealData(t, "cdf/sstdata_netcdf.nc")
	rep := Inspect(path)
	if rep.Usable {
		t.Error("sstdata reported usable without declaring its time axis")
	}
	if len(rep.Fields) == 0 || rep.Fields[0].Role != RoleSST || rep.Fields[0].Var != "sst" {
		t.Fatalf("fields %+v", rep.Fields)
	}
	p := strings.Join(rep.Fields[0].Problems, "; ")
	for _, want := range []string{`units = "Month"`, "time.climatology: true", "time.units", "12 steps"} {
		if !strings.Contains(p, want) {
			t.Errorf("problem does not explain %q: %s", want, p)
		}
	}
	f := mustOpen(t, path, Spec{Role: RoleSST, Overrides: Overrides{Climatology: true}})
	if f.Conv.From != "deg_C" || f.Conv.Offset != 273.15 {
		t.Errorf("conversion %s", f.Conv)
	}
	if f.Layout.NLat() != 91 || f.Layout.NLon() != 180 || !hasNote(f.Notes, "wrap-around") {
		t.Errorf("grid %d×%d, notes %q (181 longitudes 0…360: the last repeats the first)", f.Layout.NLat(), f.Layout.NLon(), f.Notes)
	}
	for _, ts := range []int{0, 6} {
		got := slab(t, f, ts)
		compareWithNcdump(t, path, f, "lat", "lon", got, ts, 0, 1, func(x float64) float64 {
			if math.IsNaN(x) || x < -1.8001 || x > 35.0001 { // valid_range −1.8, 35
				return math.NaN()
			}
			return x + 273.15
		})
	}
}

func TestRealLandSeaMask(t *testing.T) {
	t.Parallel()
	path := testutil.RealData(t, "cdf/landsea.nc")
	rep := Inspect(path)
	if len(rep.Fields) != 1 || rep.Fields[0].Role != RoleLandFraction || rep.Fields[0].Var != "LSMASK" {
		t.Fatalf("fields %+v", rep.Fields)
	}
	if p := strings.Join(rep.Fields[0].Problems, "; "); !strings.Contains(p, "categorical mask") || !strings.Contains(p, "0…4") {
		t.Errorf("problems %q", p)
	}
	if rep.Usable {
		t.Error("a categorical mask reported usable as a fraction")
	}
	f := mustOpen(t, path, Spec{Role: RoleLandFraction})
	got := slab(t, f, 0)
	compareWithNcdump(t, path, f, "lat", "lon", got, 0, 0, 1, func(x float64) float64 { return x }) // byte, no fill: all valid
}

func TestRealPressureLevels(t *testing.T) {
	t.Parallel()
	path := testutil.RealData(t, "nug/rectilinear_grid_3D.nc")
	rep := Inspect(path)
	if !rep.Usable || len(rep.Fields) != 1 || rep.Fields[0].Role != RoleAirTemp || rep.Fields[0].Var != "t" {
		t.Fatalf("report %+v", rep)
	}
	if !strings.Contains(rep.Fields[0].Grid, "Gaussian") || !strings.Contains(rep.Fields[0].Level, "700 hPa read directly") {
		t.Errorf("grid %q level %q", rep.Fields[0].Grid, rep.Fields[0].Level)
	}
	f := mustOpen(t, path, Spec{Role: RoleAirTemp, Level: 70000})
	if !hasNote(f.Notes, "north to south") {
		t.Errorf("notes %q", f.Notes)
	}
	// levels in Pa: 100000, 92500, 85000, 77500, 70000 (index 4), 60000 (5), …
	compareWithNcdump(t, path, f, "lat", "lon", slab(t, f, 0), 0, 4, 17, func(x float64) float64 { return x })

	// 650 hPa, between 700 (index 4) and 600 hPa (index 5), linear in ln p:
	// W = ln(650/600)/ln(700/600) on the 700 hPa value.
	g := mustOpen(t, path, Spec{Role: RoleAirTemp, Level: 65000})
	w := math.Log(650.0/600) / math.Log(700.0/600)
	if g.Level.Exact || math.Abs(g.Level.W-w) > 1e-12 {
		t.Fatalf("pick %+v, want W %v", g.Level, w)
	}
	t700 := slab(t, f, 0)
	f600 := mustOpen(t, path, Spec{Role: RoleAirTemp, Level: 60000})
	t600 := slab(t, f600, 0)
	got := slab(t, g, 0)
	for i := range got {
		want := (1-w)*float64(t600[i]) + w*float64(t700[i])
		if math.Abs(float64(got[i])-want) > 1e-3 {
			t.Fatalf("cell %d: %v, want %v", i, got[i], want)
		}
	}
	_, err := Open([]string{path}, Spec{Role: RoleAirTemp, Level: 105000})
	errHas(t, err, "outside the file's levels (10…1000 hPa)")
}

func TestRealLandFractionPercent(t *testing.T) {
	path := testutil.RealData(t, "nug/sftlf_mod1_rectilinear_grid_2D.nc")
	rep := Inspect(path)
	if !rep.Usable || len(rep.Fields) != 1 {
		t.Fatalf("report %+v", rep)
	}
	fr := rep.Fields[0]
	if fr.Role != RoleLandFraction || !strings.Contains(fr.How, "standard_name land_area_fraction") || !strings.Contains(fr.Conversion, "× 0.01") {
		t.Errorf("field %+v", fr)
	}
	f := mustOpen(t, path, Spec{Role: RoleLandFraction})
	if !f.Layout.LatFromFile || !f.Layout.LonFromFile {
		t.Error("bounds not read from lat_bnds/lon_bnds")
	}
	compareWithNcdump(t, path, f, "lat", "lon", slab(t, f, 0), 0, 0, 1, func(x float64) float64 {
		if x == float64(float32(1e20)) {
			return math.NaN()
		}
		return x / 100
	})
}

func TestRealNetCDF4Strings(t *testing.T) {
	t.Parallel()
	path := testutil.RealData(t, "cdf/nc4uvt.nc")
	rep := Inspect(path)
	if rep.Format != "NetCDF-4" || len(rep.Fields) != 1 || rep.Fields[0].Var != "T" || rep.Fields[0].Role != RoleAirTemp {
		t.Fatalf("report %+v", rep)
	}
	if p := strings.Join(rep.Fields[0].Problems, "; "); !strings.Contains(p, `units = "Month"`) || !strings.Contains(p, "time.units") {
		t.Errorf("problems %q", p)
	}
	// long_name "Month since Jan 1988"; ncdump shows the one value is 0
	f := mustOpen(t, path, Spec{Role: RoleAirTemp, Level: 70000, Overrides: Overrides{TimeUnits: "months since 1988-01-01"}})
	if f.Conv.From != "C" || f.Conv.Offset != 273.15 {
		t.Errorf("units %s (NC_STRING attribute \"C\")", f.Conv)
	}
	if f.Time.Dates[0].String() != "1988-01-01T00:00:00" {
		t.Errorf("time %v", f.Time.Dates)
	}
	// lev (hPa) 1000, 850, 700 (index 2), …; 14 levels
	compareWithNcdump(t, path, f, "lat", "lon", slab(t, f, 0), 0, 2, 14, func(x float64) float64 {
		if x == -999 {
			return math.NaN()
		}
		return x + 273.15
	})
}

func TestRealOceanNotAir(t *testing.T) {
	path := testutil.RealData(t, "cdf/ocean.nc")
	rep := Inspect(path)
	for _, fr := range rep.Fields {
		if fr.Var == "T" {
			t.Errorf("ocean potential temperature T taken as %s", fr.Role)
		}
	}
	if rep.Usable {
		t.Error("ocean.nc reported usable")
	}
	nf := mustOpenNC(t, path)
	if _, err := FindRole(nf, RoleAirTemp); err == nil {
		t.Error("FindRole found an air temperature in ocean.nc")
	}
}

func TestRealRotatedAndCurvilinear(t *testing.T) {
	rep := Inspect(testutil.RealData(t, "nug/tas_rotated_grid_EUR11.nc"))
	if rep.Usable || len(rep.Fields) != 1 || !strings.Contains(strings.Join(rep.Fields[0].Problems, ""), "rotated-pole") {
		t.Errorf("rotated grid: %+v", rep)
	}
	rep = Inspect(testutil.RealData(t, "nug/tos_ocean_bipolar_grid.nc"))
	if rep.Usable || !strings.Contains(strings.Join(rep.Problems, ""), "tos (standard_name sea_surface_temperature) looks like role sst but cannot be used") {
		t.Errorf("curvilinear grid: %+v", rep.Problems)
	}
}

// Every file of the real data folders gives a report, without panicking;
// files that are not netCDF give an unusable report that says so.
func TestRealEveryFileInspects(t *testing.T) {
	t.Parallel()
	dir := filepath.Dir(testutil.RealData(t, "cdf/ocean.nc"))
	var files []string
	for _, sub := range []string{"cdf", "nug"} {
		es, err := os.ReadDir(filepath.Join(filepath.Dir(dir), sub))
		if err != nil {
			t.Fatal(err)
		}
		for _, e := range es {
			if !e.IsDir() {
				files = append(files, filepath.Join(filepath.Dir(dir), sub, e.Name()))
			}
		}
	}
	if len(files) < 50 {
		t.Fatalf("only %d files found", len(files))
	}
	usable := 0
	for _, p := range files {
		rep := func() (r *FileReport) {
			defer func() {
				if x := recover(); x != nil {
					t.Errorf("%s: panic %v", p, x)
				}
			}()
			return Inspect(p)
		}()
		if rep == nil {
			continue
		}
		if rep.Usable {
			usable++
		} else if len(rep.Problems) == 0 && !anyFieldProblem(rep) {
			t.Errorf("%s is unusable but the report says no why", p)
		}
		if ext := filepath.Ext(p); ext != ".nc" && ext != ".cdf" && rep.Usable {
			t.Errorf("%s (not netCDF) reported usable", p)
		}
	}
	t.Logf("%d files inspected, %d usable", len(files), usable)
	if usable == 0 {
		t.Error("no real file usable")
	}
}

func anyFieldProblem(r *FileReport) bool {
	for _, f := range r.Fields {
		if len(f.Problems) > 0 {
			return true
		}
	}
	return false
}
