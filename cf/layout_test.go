package cf

import (
	"fmt"
	"math"
	"testing"

	"lidscope/netcdf"
)

// The canonical layout (see geometry.go) is checked cell by cell against
// the values the CDL fixtures put where; every expected slab below is
// worked out by hand from the CDL data section.

func TestLayoutNorthSouthAnd0360(t *testing.T) {
	eachKind(t, "grid_ns_0360", func(t *testing.T, path string) {
		f := mustOpen(t, path, Spec{Role: RoleSST})
		if f.Var != "sst" {
			t.Fatalf("role sst found as %q", f.Var)
		}
		sameFloats(t, "lat", f.Layout.Lat, []float64{-10, 0, 10}, 0)
		// stored 0, 90, 180, 270 → −180 (180), −90 (270), 0, 90
		sameFloats(t, "lon", f.Layout.Lon, []float64{-180, -90, 0, 90}, 0)
		// stored rows lat 10: 281…284, lat 0: 285…288, lat −10: 289…292;
		// canonical columns take stored columns 2, 3, 0, 1.
		sameValues(t, slab(t, f, 0), []float64{
			291, 292, 289, 290,
			287, 288, 285, 286,
			283, 284, 281, 282,
		}, 0)
		if !hasNote(f.Notes, "north to south") || !hasNote(f.Notes, "normalised") {
			t.Errorf("notes do not record the reordering: %q", f.Notes)
		}
		// Derived bounds: half-way between stored centres, outer edges half a
		// step out, then reordered like the centres (common practice).
		if f.Layout.LatFromFile || f.Layout.LonFromFile {
			t.Error("bounds reported as read from the file, but the file has none")
		}
		sameBounds(t, "lat bounds", f.Layout.LatBounds, [][2]float64{{-15, -5}, {-5, 5}, {5, 15}}, 1e-9)
		sameBounds(t, "lon bounds", f.Layout.LonBounds, [][2]float64{{-225, -135}, {-135, -45}, {-45, 45}, {45, 135}}, 1e-9)
		if f.NT() != 1 || f.Time == nil || f.Time.Dates[0].String() != "2000-01-15T12:00:00" {
			t.Errorf("time axis: %+v", f.Time)
		}
	})
}

func TestLayoutWrapColumnAndFileBounds(t *testing.T) {
	eachKind(t, "grid_wrap", func(t *testing.T, path string) {
		f := mustOpen(t, path, Spec{Role: RoleSurfaceAir})
		sameFloats(t, "lon", f.Layout.Lon, []float64{-180, -90, 0, 90}, 0)
		sameFloats(t, "lat", f.Layout.Lat, []float64{-30, 30}, 0)
		// degC → K: x + 273.15; the wrap column (180, a copy of −180) dropped.
		sameValues(t, slab(t, f, 0), []float64{
			274.15, 275.15, 276.15, 277.15,
			278.15, 279.15, 280.15, 281.15,
		}, 1e-4)
		if !hasNote(f.Notes, "wrap-around") {
			t.Errorf("notes do not mention the dropped wrap column: %q", f.Notes)
		}
		if !f.Layout.LatFromFile || f.Layout.LonFromFile {
			t.Errorf("LatFromFile=%v LonFromFile=%v, want true, false", f.Layout.LatFromFile, f.Layout.LonFromFile)
		}
		sameBounds(t, "lat bounds", f.Layout.LatBounds, [][2]float64{{-90, 0}, {0, 90}}, 0)
		sameBounds(t, "lon bounds", f.Layout.LonBounds, [][2]float64{{-225, -135}, {-135, -45}, {-45, 45}, {45, 135}}, 1e-9)
		if f.Time != nil || f.NT() != 1 {
			t.Errorf("a field without time axis has Time %v, NT %d", f.Time, f.NT())
		}
	})
}

func TestLayoutWrap0360WithLonBounds(t *testing.T) {
	eachKind(t, "grid_wrap0360", func(t *testing.T, path string) {
		f := mustOpen(t, path, Spec{Role: RoleSST})
		// stored 0, 120, 240, 360 → −120 (240), 0 (0), 120 (120); 360 dropped
		sameFloats(t, "lon", f.Layout.Lon, []float64{-120, 0, 120}, 0)
		sameValues(t, slab(t, f, 0), []float64{293, 291, 292, 297, 295, 296}, 0)
		if !f.Layout.LonFromFile || f.Layout.LatFromFile {
			t.Errorf("LonFromFile=%v LatFromFile=%v, want true, false", f.Layout.LonFromFile, f.Layout.LatFromFile)
		}
		// file bounds move with their centre: 240's [180, 300] → [−180, −60]
		sameBounds(t, "lon bounds", f.Layout.LonBounds, [][2]float64{{-180, -60}, {-60, 60}, {60, 180}}, 1e-4)
		// two latitudes −45, 45: derived edges −90, 0, 90 (clamped at the poles)
		sameBounds(t, "lat bounds", f.Layout.LatBounds, [][2]float64{{-90, 0}, {0, 90}}, 0)
	})
}

func TestLayoutLonLatOrderAndExactLevel(t *testing.T) {
	eachKind(t, "grid_lonlat", func(t *testing.T, path string) {
		f := mustOpen(t, path, Spec{Role: RoleAirTemp, Level: 70000})
		if f.Level == nil || !f.Level.Exact || f.Level.Lower != 1 {
			t.Fatalf("level pick %+v, want exact index 1 (700 hPa)", f.Level)
		}
		// stored at 700 hPa, [lon][lat]: lon −90: 270, 270.1; lon 0: 271,
		// 271.1; lon 90: 272, 272.1 → [lat][lon]
		sameValues(t, slab(t, f, 0), []float64{270, 271, 272, 270.1, 271.1, 272.1}, 1e-4)
		if !hasNote(f.Notes, "[lon][lat]") {
			t.Errorf("notes do not record the transposition: %q", f.Notes)
		}
		if f.Time.Calendar != "proleptic_gregorian" || f.Time.Dates[0].String() != "1990-06-01T12:00:00" {
			t.Errorf("time %s %v", f.Time.Calendar, f.Time.Dates)
		}
	})
}

func TestLayoutGaussianAndLengthOneDims(t *testing.T) {
	// 4-point Gauss–Legendre abscissae, Abramowitz & Stegun (1964), Table
	// 25.4: ±0.339981043584856, ±0.861136311594053; Gaussian latitudes are
	// their arcsines.
	gauss := []float64{-0.861136311594053, -0.339981043584856, 0.339981043584856, 0.861136311594053}
	want := make([]float64, 4)
	for i, x := range gauss {
		want[i] = math.Asin(x) * 180 / math.Pi
	}
	eachKind(t, "grid_gauss_extra", func(t *testing.T, path string) {
		f := mustOpen(t, path, Spec{Role: RoleSurfaceAir})
		sameFloats(t, "lat", f.Layout.Lat, want, 1e-9)
		if d := describeLayout(f.Layout); !hasNote([]string{d}, "Gaussian") {
			t.Errorf("layout description %q does not say Gaussian", d)
		}
		if !hasNote(f.Notes, "length-1 dimension realization ignored") {
			t.Errorf("notes: %q", f.Notes)
		}
		if f.NT() != 2 || f.Time.Calendar != "noleap" {
			t.Fatalf("NT %d calendar %s", f.NT(), f.Time.Calendar)
		}
		// step 1, stored north to south, rows lat 59.4: 361…364, 19.9:
		// 381…384, −19.9: 391…394, −59.4: 371…374; columns 0, 90, 180, 270
		// → −180, −90, 0, 90 take stored columns 2, 3, 0, 1.
		sameValues(t, slab(t, f, 1), []float64{
			373, 374, 371, 372,
			393, 394, 391, 392,
			383, 384, 381, 382,
			363, 364, 361, 362,
		}, 0)
		// derived latitude bounds: midpoints, outer edges half a step out
		// (−59.44 − 19.78 = −79.23), within the poles.
		b := f.Layout.LatBounds
		if math.Abs(b[0][0]-(want[0]-(want[1]-want[0])/2)) > 1e-9 || math.Abs(b[1][0]-(want[0]+want[1])/2) > 1e-9 {
			t.Errorf("lat bounds %v", b)
		}
		_, err := Open([]string{path}, Spec{Role: RoleSurfaceAir, Var: "tens"})
		errHas(t, err, "dimension ens (length 2)", "tens")
	})
}

// TestNewLayoutErrors covers coordinates a layout cannot be built from.
func TestNewLayoutErrors(t *testing.T) {
	cases := []struct {
		name     string
		lat, lon []float64
		want     string
	}{
		{"lat beyond pole", []float64{-91, 0}, []float64{0, 1}, "outside −90…90"},
		{"lat radians?", []float64{0, 100}, []float64{0, 1}, "radians"},
		{"lat not monotonic", []float64{0, 10, 5}, []float64{0, 1}, "not strictly monotonic"},
		{"lon not monotonic", []float64{0, 1}, []float64{0, 10, 10}, "not strictly monotonic"},
		{"two wrap columns", []float64{0, 1}, []float64{0, 180, 360, 540}, "coincide modulo 360"},
		{"duplicate not at the ends", []float64{0, 1}, []float64{0, 100, 360, 370}, "coincide modulo 360"},
		{"span of two turns", []float64{0, 1}, []float64{-170, 0, 550}, "coincide modulo 360"},
		{"no latitudes", nil, []float64{0, 1}, "at least one"},
		{"no longitudes", []float64{0, 1}, nil, "at least one"},
		{"NaN longitude", []float64{0, 1}, []float64{0, math.NaN()}, "not a finite"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := newLayout("f.nc", "lat", "lon", c.lat, c.lon, nil, nil, true)
			errHas(t, err, c.want, "f.nc")
		})
	}
}

// A grid crossing the date line keeps contiguous derived bounds: they are
// derived in stored order before the longitudes are normalised.
func TestLayoutDateLineBounds(t *testing.T) {
	l, err := newLayout("f.nc", "lat", "lon", []float64{0, 1}, []float64{170, 180, 190}, nil, nil, true)
	if err != nil {
		t.Fatal(err)
	}
	sameFloats(t, "lon", l.Lon, []float64{-180, -170, 170}, 1e-12)
	sameBounds(t, "lon bounds", l.LonBounds, [][2]float64{{-185, -175}, {-175, -165}, {165, 175}}, 1e-12)
	// src maps canonical cell → stored index: stored columns 1, 2, 0
	want := []int{1, 2, 0, 4, 5, 3}
	for i, s := range l.src {
		if s != want[i] {
			t.Fatalf("src %v, want %v", l.src, want)
		}
	}
}

func TestLayoutBoundsOutsideCentreNoted(t *testing.T) {
	l, err := newLayout("f.nc", "lat", "lon", []float64{0, 10}, []float64{0, 10},
		[][2]float64{{-5, 5}, {15, 25}}, nil, true)
	if err != nil {
		t.Fatal(err)
	}
	if !hasNote(l.Notes, "outside its cell bounds") {
		t.Errorf("notes %q", l.Notes)
	}
}

// The formats themselves: the netCDF-4 fixture is really compressed.
func TestFixtureIsCompressed(t *testing.T) {
	path := fixture(t, "grid_ns_0360", "netCDF-4")
	nf, err := netcdf.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer nf.Close()
	v, err := nf.Var("sst")
	if err != nil {
		t.Fatal(err)
	}
	shuffle, deflate, level, err := v.Deflate()
	if err != nil || !shuffle || !deflate || level != 4 {
		t.Errorf("Deflate() = %v %v %d %v, want shuffle, deflate level 4", shuffle, deflate, level, err)
	}
	for _, k := range ncgenKinds {
		nf, err := netcdf.Open(fixture(t, "grid_ns_0360", k))
		if err != nil {
			t.Fatal(err)
		}
		fm, _ := nf.Format()
		nf.Close()
		want := map[string]netcdf.Format{"classic": netcdf.FormatClassic, "64-bit offset": netcdf.Format64BitOffset,
			"cdf5": netcdf.FormatCDF5, "netCDF-4": netcdf.FormatNetCDF4}[k]
		if fm != want {
			t.Errorf("ncgen -k %s gave format %v", k, fm)
		}
	}
}

func TestNormLon(t *testing.T) {
	for _, c := range []struct{ in, out float64 }{
		{0, 0}, {180, -180}, {-180, -180}, {359.5, -0.5}, {360, 0}, {540, -180}, {-190, 170},
		{-180.00000000000003, -180}, // rounding must not give 180
		{-1e-15, -1e-15},
	} {
		got := normLon(c.in)
		d := math.Mod(got-c.out+540, 360) - 180 // equal modulo 360
		if got < -180 || got >= 180 || math.Abs(d) > 1e-9 {
			t.Errorf("normLon(%v) = %v, want %v", c.in, got, c.out)
		}
	}
}

// ReadSlab is safe for concurrent use with one Scratch per goroutine.
func TestReadSlabConcurrent(t *testing.T) {
	path := fixture(t, "grid_gauss_extra", "netCDF-4")
	f := mustOpen(t, path, Spec{Role: RoleSurfaceAir})
	want := [][]float32{slab(t, f, 0), slab(t, f, 1)}
	done := make(chan error, 8)
	for g := 0; g < 8; g++ {
		go func(g int) {
			var s Scratch
			buf := make([]float32, f.Len())
			for i := 0; i < 50; i++ {
				ts := (g + i) % 2
				if err := f.ReadSlab(ts, buf, &s); err != nil {
					done <- err
					return
				}
				for k := range buf {
					if buf[k] != want[ts][k] {
						done <- fmt.Errorf("goroutine %d step %d cell %d: %v, want %v", g, ts, k, buf[k], want[ts][k])
						return
					}
				}
			}
			done <- nil
		}(g)
	}
	for g := 0; g < 8; g++ {
		if err := <-done; err != nil {
			t.Error(err)
		}
	}
}
