package cf

import (
	"encoding/json"
	"lidscope/internal/testutil"
	"math"
	"os/exec"
	"path/filepath"
	"testing"

	"lidscope/netcdf"
)

// Round trip: a packed file written with the netcdf binding is read back
// by cf, and cf's decoded values are compared with two independent readers
// from Debian: xarray (python3-xarray; open_dataset applies CF
// mask_and_scale: _FillValue and missing_value masked, then stored ×
// scale_factor + add_offset) and netCDF4-python (python3-netcdf4; also
// masks outside valid_range, NUG Appendix A). cf's float64 decoding must
// agree to 1e-6; the float32 slab to 1e-6 relative.

// Stored (packed) values of the round-trip file, [time][lat][lon], lat
// north to south (30, 0, −30), lon 0, 90, 180, 270.
var rtRaw = []int16{
	-32767, 100, 200, 300,
	-32000, 1000, 1500, 2000,
	2500, 2600, 2700, 2800,

	-1234, 0, 1, 2,
	3, -32767, 5, 6,
	7, 8, -32000, 29999,
}

const rtScale, rtOffset = 0.01, 273.15

func writeRoundTrip(t testing.TB, path string) {
	t.Helper()
	f, err := netcdf.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	must := func(err error) {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
	}
	_, err = f.DefDim("time", netcdf.Unlimited)
	must(err)
	_, err = f.DefDim("lat", 3)
	must(err)
	_, err = f.DefDim("lon", 4)
	must(err)
	tv, err := f.DefVar("time", netcdf.Double, []string{"time"})
	must(err)
	must(tv.PutAttr("units", "days since 2010-01-01"))
	must(tv.PutAttr("calendar", "365_day"))
	la, err := f.DefVar("lat", netcdf.Float, []string{"lat"})
	must(err)
	must(la.PutAttr("units", "degrees_north"))
	lo, err := f.DefVar("lon", netcdf.Float, []string{"lon"})
	must(err)
	must(lo.PutAttr("units", "degrees_east"))
	var vs []*netcdf.Var
	for _, name := range []string{"sst", "sstv"} {
		v, err := f.DefVar(name, netcdf.Short, []string{"time", "lat", "lon"})
		must(err)
		must(v.SetChunking([]int{1, 3, 4}))
		must(v.SetDeflate(true, 4))
		must(v.PutAttr("standard_name", "sea_surface_temperature"))
		must(v.PutAttr("units", "K"))
		must(v.PutAttr("scale_factor", rtScale))
		must(v.PutAttr("add_offset", rtOffset))
		must(v.PutAttr("_FillValue", int16(-32767)))
		must(v.PutAttr("missing_value", int16(-32000)))
		if name == "sstv" {
			must(v.PutAttr("valid_range", []int16{-1000, 2600}))
		}
		vs = append(vs, v)
	}
	must(f.EndDef())
	must(tv.WriteFloat64([]int{0}, []int{2}, []float64{15, 45}))
	must(la.WriteFloat64([]int{0}, []int{3}, []float64{30, 0, -30}))
	must(lo.WriteFloat64([]int{0}, []int{4}, []float64{0, 90, 180, 270}))
	raw := make([]float64, len(rtRaw))
	for i, x := range rtRaw {
		raw[i] = float64(x)
	}
	for _, v := range vs {
		must(v.WriteFloat64([]int{0, 0, 0}, []int{2, 3, 4}, raw))
	}
	must(f.Close())
}

// canonicalOf maps stored [lat][lon] index → canonical index for the
// round-trip grid: lat reversed, lon columns 2, 3, 0, 1.
func rtCanonical(stored int) int {
	y, x := stored/4, stored%4
	return (2-y)*4 + (x+2)%4
}

func TestRoundTrip(t *testing.T) {
	path := filepath.Join(t.TempDir(), "rt.nc")
	writeRoundTrip(t, path)
	f := mustOpen(t, path, Spec{Role: RoleSST, Var: "sst"})
	if f.Time.Calendar != "noleap" || f.NT() != 2 {
		t.Fatalf("time %+v", f.Time)
	}
	for ts := 0; ts < 2; ts++ {
		want := make([]float64, 12)
		for i := 0; i < 12; i++ {
			r := rtRaw[ts*12+i]
			v := float64(r)*rtScale + rtOffset
			if r == -32767 || r == -32000 {
				v = nan
			}
			want[rtCanonical(i)] = v
		}
		sameValues(t, slab(t, f, ts), want, 1e-4)
	}
}

const decodeScript = `
import json, sys, math
import numpy, xarray, netCDF4
path = sys.argv[1]
def clean(a):
    return [None if (v is None or (isinstance(v, float) and math.isnan(v))) else float(v) for v in a]
out = {}
# Decode in float64 (this xarray unpacks shorts to float32): read the raw
# values, widen them, then let xarray.decode_cf apply mask_and_scale.
raw = xarray.open_dataset(path, decode_cf=False)
for name in ("sst", "sstv"):
    raw[name] = raw[name].astype("float64", keep_attrs=True)
ds = xarray.decode_cf(raw)
for name in ("sst", "sstv"):
    out["xarray_" + name] = clean(ds[name].values.ravel().tolist())
nc = netCDF4.Dataset(path)
for name in ("sst", "sstv"):
    a = nc[name][:]
    out["netcdf4_" + name] = clean(numpy.ma.filled(a.astype("float64"), numpy.nan).ravel().tolist())
print(json.dumps(out))
`

func TestDecodeAgainstXarrayAndNetCDF4(t *testing.T) {
	t.Parallel()
	py := testutil.Python(t, "xarray", "netCDF4", "numpy")
	path := filepath.Join(t.TempDir(), "rt.nc")
	writeRoundTrip(t, path)
	out, err := exec.Command(py, "-c", decodeScript, path).Output()
	if err != nil {
		t.Fatalf("python: %v", err)
	}
	var ref map[string][]*float64
	if err := json.Unmarshal(out, &ref); err != nil {
		t.Fatalf("%v: %s", err, out)
	}
	for _, c := range []struct{ v, tool string }{
		{"sst", "xarray"}, {"sst", "netcdf4"}, // xarray ignores valid_range, so
		{"sstv", "netcdf4"}, // only netCDF4-python is compared on sstv
	} {
		f := mustOpen(t, path, Spec{Role: RoleSST, Var: c.v})
		want := ref[c.tool+"_"+c.v]
		if len(want) != 24 {
			t.Fatalf("%s %s: %d values", c.tool, c.v, len(want))
		}
		for ts := 0; ts < 2; ts++ {
			got := slab(t, f, ts)
			// and the float64 path, before the float32 slab
			m := &f.segs[0].mask
			for i := 0; i < 12; i++ {
				w := want[ts*12+i]
				g := float64(got[rtCanonical(i)])
				g64 := m.Decode(float64(rtRaw[ts*12+i]))
				switch {
				case w == nil:
					if !math.IsNaN(g) || !math.IsNaN(g64) {
						t.Errorf("%s %s step %d cell %d: cf %v, %s missing", c.v, c.tool, ts, i, g, c.tool)
					}
				case math.Abs(g64-*w) > 1e-6 || math.Abs(g-*w) > 1e-6*math.Abs(*w):
					t.Errorf("%s %s step %d cell %d: cf %v (float64 %v), %s %v", c.v, c.tool, ts, i, g, g64, c.tool, *w)
				}
			}
		}
	}
}
