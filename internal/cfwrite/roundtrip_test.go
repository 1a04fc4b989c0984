package cfwrite_test

import (
	"math"
	"reflect"
	"testing"

	"lidscope/internal/cfwrite"
	"lidscope/netcdf"
)

// readAttrs returns a variable's attributes (or the globals when v is nil)
// by name.
func readAttrs(t *testing.T, f *netcdf.File, v *netcdf.Var) map[string]any {
	t.Helper()
	var as []netcdf.Attr
	var err error
	if v == nil {
		as, err = f.Attrs()
	} else {
		as, err = v.Attrs()
	}
	must(t, err)
	out := map[string]any{}
	for _, a := range as {
		out[a.Name] = a.Value
	}
	return out
}

func readAll(t *testing.T, f *netcdf.File, name string) (*netcdf.Var, []float64) {
	t.Helper()
	v, err := f.Var(name)
	must(t, err)
	x, err := v.ReadAllFloat64()
	must(t, err)
	return v, x
}

// TestRoundTripMaps writes the map fixture and reads it back with the
// project's netCDF-C binding, checking layout, attributes and values
// exactly. The expected attribute values are those the CF-1.10 conventions
// prescribe (§2.6.2 globals, §4.1–4.4 coordinates, §7.1 bounds, §2.5.1 fill).
func TestRoundTripMaps(t *testing.T) {
	path := tempPath(t, "maps.nc")
	writeMaps(t, path, "standard")
	f, err := netcdf.Open(path)
	must(t, err)
	defer f.Close()

	format, err := f.Format()
	must(t, err)
	if format != netcdf.FormatNetCDF4Classic {
		t.Errorf("format %v, want NetCDF-4 classic model", format)
	}
	dims, err := f.Dims()
	must(t, err)
	gotDims := map[string]netcdf.Dim{}
	for _, d := range dims {
		gotDims[d.Name] = d
	}
	for name, n := range map[string]int{"lat": 3, "lon": 4, "bnds": 2, "time": 2} {
		if gotDims[name].Len != n {
			t.Errorf("dimension %s has length %d, want %d", name, gotDims[name].Len, n)
		}
	}
	if !gotDims["time"].Unlimited || gotDims["lat"].Unlimited {
		t.Errorf("time must be the only unlimited dimension: %+v", dims)
	}

	wantGlobals := map[string]any{
		"Conventions":      "CF-1.10",
		"title":            "lidscope synthetic test field (invented data)",
		"institution":      "lidscope test suite",
		"source":           "lidscope cfwrite tests",
		"history":          "2026-03-04T05:06:07Z: lidscope maps --in 'sst file.nc'",
		"input_files":      "none (synthetic)",
		"lidscope_version": "0.0-test",
	}
	if got := readAttrs(t, f, nil); !reflect.DeepEqual(got, wantGlobals) {
		t.Errorf("global attributes\n got %#v\nwant %#v", got, wantGlobals)
	}

	cases := []struct {
		name   string
		typ    netcdf.Type
		dims   []string
		attrs  map[string]any
		values []float64 // nil: not checked here
	}{
		{"lat", netcdf.Double, []string{"lat"}, map[string]any{
			"standard_name": "latitude", "long_name": "latitude", "units": "degrees_north",
			"axis": "Y", "bounds": "lat_bnds"}, fixLat},
		{"lon", netcdf.Double, []string{"lon"}, map[string]any{
			"standard_name": "longitude", "long_name": "longitude", "units": "degrees_east",
			"axis": "X", "bounds": "lon_bnds"}, fixLon},
		// Edges halfway between centres, the outer ones half a spacing out.
		{"lat_bnds", netcdf.Double, []string{"lat", "bnds"}, map[string]any{}, []float64{15, 5, 5, -5, -5, -15}},
		{"lon_bnds", netcdf.Double, []string{"lon", "bnds"}, map[string]any{}, []float64{-45, 45, 45, 135, 135, 225, 225, 315}},
		{"time", netcdf.Double, []string{"time"}, map[string]any{
			"standard_name": "time", "long_name": "time", "units": "days since 1979-01-01",
			"calendar": "standard", "axis": "T", "bounds": "time_bnds"}, []float64{15, 45}},
		{"time_bnds", netcdf.Double, []string{"time", "bnds"}, map[string]any{}, []float64{0, 31, 31, 59}},
		{"plev", netcdf.Double, nil, map[string]any{
			"standard_name": "air_pressure", "long_name": "pressure", "units": "Pa",
			"positive": "down", "axis": "Z"}, []float64{70000}},
		{"sst", netcdf.Float, []string{"time", "lat", "lon"}, map[string]any{
			"standard_name": "sea_surface_temperature", "long_name": "sea surface temperature",
			"units": "K", "_FillValue": []float32{1e20}, "cell_methods": "time: mean area: mean where sea",
			"comment": "invented values", "valid_min": []float32{260}}, nil},
		{"ta700", netcdf.Float, []string{"time", "lat", "lon"}, map[string]any{
			"standard_name": "air_temperature", "long_name": "air temperature at 700 hPa",
			"units": "K", "_FillValue": []float32{1e20}, "cell_methods": "time: mean",
			"coordinates": "plev"}, nil},
		{"sst_tropmean", netcdf.Double, []string{"time"}, map[string]any{
			"long_name": "tropical-mean sea surface temperature", "units": "K",
			"_FillValue": []float64{1e20}, "cell_methods": "time: mean area: mean where sea"},
			[]float64{300.125, 301.125}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			v, vals := readAll(t, f, c.name)
			if v.Type != c.typ {
				t.Errorf("type %v, want %v", v.Type, c.typ)
			}
			var dn []string
			for _, d := range v.Dims {
				dn = append(dn, d.Name)
			}
			if !reflect.DeepEqual(dn, c.dims) {
				t.Errorf("dimensions %v, want %v", dn, c.dims)
			}
			if got := readAttrs(t, f, v); !reflect.DeepEqual(got, c.attrs) {
				t.Errorf("attributes\n got %#v\nwant %#v", got, c.attrs)
			}
			if c.values != nil && !reflect.DeepEqual(vals, c.values) {
				t.Errorf("values %v, want %v", vals, c.values)
			}
			sh, df, lv, err := v.Deflate()
			must(t, err)
			if len(v.Dims) > 0 && (!sh || !df || lv != 4) {
				t.Errorf("compression shuffle=%v deflate=%v level=%d, want shuffle, deflate level 4", sh, df, lv)
			}
		})
	}

	// SST: every value exact, NaN stored as the fill value 1e20f.
	v, err := f.Var("sst")
	must(t, err)
	raw := make([]float32, 24)
	must(t, v.ReadFloat32([]int{0, 0, 0}, []int{2, 3, 4}, raw))
	for s := range 2 {
		for k := range 12 {
			want := fixSST(s, k)
			got := raw[s*12+k]
			if math.IsNaN(want) {
				if got != float32(1e20) {
					t.Errorf("sst step %d index %d: NaN stored as %g, want the fill value 1e20f", s, k, got)
				}
			} else if float64(got) != want {
				t.Errorf("sst step %d index %d: %g, want %g", s, k, got, want)
			}
		}
	}
}

// TestRoundTripTable checks the categorical and binned axes of the regime
// table fixture (CF-1.10 §3.5 flags, §7.1 bounds) and int32 data.
func TestRoundTripTable(t *testing.T) {
	path := tempPath(t, "table.nc")
	writeTable(t, path)
	f, err := netcdf.Open(path)
	must(t, err)
	defer f.Close()

	v, vals := readAll(t, f, "regime")
	if v.Type != netcdf.Int {
		t.Errorf("regime type %v, want int", v.Type)
	}
	if !reflect.DeepEqual(vals, []float64{0, 1}) {
		t.Errorf("regime values %v", vals)
	}
	wantAttrs := map[string]any{"long_name": "SST regime", "flag_values": []int32{0, 1},
		"flag_meanings": "convective subsidence"}
	if got := readAttrs(t, f, v); !reflect.DeepEqual(got, wantAttrs) {
		t.Errorf("regime attributes\n got %#v\nwant %#v", got, wantAttrs)
	}
	v, vals = readAll(t, f, "eis_bin")
	if !reflect.DeepEqual(vals, []float64{-1, 1, 3}) {
		t.Errorf("eis_bin centres %v, want -1 1 3", vals)
	}
	if got, want := readAttrs(t, f, v), map[string]any{"long_name": "estimated inversion strength bin",
		"units": "K", "bounds": "eis_bin_bnds"}; !reflect.DeepEqual(got, want) {
		t.Errorf("eis_bin attributes\n got %#v\nwant %#v", got, want)
	}
	if _, vals = readAll(t, f, "eis_bin_bnds"); !reflect.DeepEqual(vals, []float64{-2, 0, 0, 2, 2, 4}) {
		t.Errorf("eis_bin_bnds %v", vals)
	}
	_, vals = readAll(t, f, "cloud_mean")
	for r := range 2 {
		for b := range 3 {
			want, got := fixSlope(r, b), vals[r*3+b]
			if math.IsNaN(want) {
				want = float64(float32(1e20))
			}
			if got != want {
				t.Errorf("cloud_mean[%d][%d] = %g, want %g", r, b, got, want)
			}
		}
	}
	v, vals = readAll(t, f, "count")
	if v.Type != netcdf.Int {
		t.Errorf("count type %v, want int", v.Type)
	}
	if !reflect.DeepEqual(vals, []float64{0, 1, 2, 10, 11, 12}) {
		t.Errorf("count %v", vals)
	}
	if a, err := v.Attr("_FillValue"); err != nil || !reflect.DeepEqual(a.Value, []int32{-2147483647}) {
		t.Errorf("count _FillValue %v %v, want NC_FILL_INT -2147483647", a.Value, err)
	}
}

// TestRoundTripLevels checks a [time][plev][lat][lon] variable: the pressure
// coordinate (CF-1.10 §4.3) and the value order.
func TestRoundTripLevels(t *testing.T) {
	path := tempPath(t, "levels.nc")
	opts := fixOptions()
	opts.DeflateLevel = 9
	w, err := cfwrite.Create(path, opts)
	must(t, err)
	defer w.Abort()
	must(t, w.SetGrid(cfwrite.Grid{Lat: fixLat, Lon: fixLon}))
	must(t, w.SetLevels(cfwrite.Levels{Pa: []float64{100000, 85000, 70000}, Bounds: [][2]float64{{105000, 92500}, {92500, 77500}, {77500, 62500}}}))
	must(t, w.SetTime(cfwrite.TimeAxis{Units: "hours since 2000-01-01 00:00:00", Calendar: "proleptic_gregorian"}))
	v, err := w.AddVar(cfwrite.VarSpec{Name: "ta", Dims: []string{"time", "plev", "lat", "lon"}, Units: "K", StandardName: "air_temperature"})
	must(t, err)
	for s := range 3 {
		i, err := w.AppendTime(float64(6 * s))
		must(t, err)
		d := make([]float64, 36)
		for k := range d {
			d[k] = float64(1000*s + k)
		}
		must(t, v.WriteStep(i, d))
	}
	must(t, w.Close())

	f, err := netcdf.Open(path)
	must(t, err)
	defer f.Close()
	pv, vals := readAll(t, f, "plev")
	if !reflect.DeepEqual(vals, []float64{100000, 85000, 70000}) {
		t.Errorf("plev %v", vals)
	}
	want := map[string]any{"standard_name": "air_pressure", "long_name": "pressure", "units": "Pa",
		"positive": "down", "axis": "Z", "bounds": "plev_bnds"}
	if got := readAttrs(t, f, pv); !reflect.DeepEqual(got, want) {
		t.Errorf("plev attributes\n got %#v\nwant %#v", got, want)
	}
	if _, vals = readAll(t, f, "plev_bnds"); !reflect.DeepEqual(vals, []float64{105000, 92500, 92500, 77500, 77500, 62500}) {
		t.Errorf("plev_bnds %v", vals)
	}
	tv, vals := readAll(t, f, "time")
	if !reflect.DeepEqual(vals, []float64{0, 6, 12}) {
		t.Errorf("time %v", vals)
	}
	if a, _ := tv.Attr("calendar"); a.Value != "proleptic_gregorian" {
		t.Errorf("calendar %v", a.Value)
	}
	v2, vals := readAll(t, f, "ta")
	for i, x := range vals {
		if want := float64(1000*(i/36) + i%36); x != want {
			t.Fatalf("ta flat index %d = %g, want %g", i, x, want)
		}
	}
	if _, _, lv, _ := v2.Deflate(); lv != 9 {
		t.Errorf("deflate level %d, want 9 (Options.DeflateLevel)", lv)
	}
}
