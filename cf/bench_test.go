package cf

import (
	"path/filepath"
	"testing"

	"lidscope/netcdf"
)

// benchFile writes a synthetic 1° global file (invented values): packed
// short air temperature on 4 pressure levels (no 700 hPa, so reading it
// interpolates), 12 steps, north to south on 0–360 longitudes.
func benchFile(b *testing.B) string {
	b.Helper()
	path := filepath.Join(b.TempDir(), "bench.nc")
	f, err := netcdf.Create(path)
	if err != nil {
		b.Fatal(err)
	}
	must := func(err error) {
		if err != nil {
			b.Fatal(err)
		}
	}
	const nt, nz, ny, nx = 12, 4, 180, 360
	for _, d := range []struct {
		n string
		l int
	}{{"time", nt}, {"plev", nz}, {"lat", ny}, {"lon", nx}} {
		_, err := f.DefDim(d.n, d.l)
		must(err)
	}
	tv, _ := f.DefVar("time", netcdf.Double, []string{"time"})
	must(tv.PutAttr("units", "days since 2000-01-01"))
	pv, _ := f.DefVar("plev", netcdf.Float, []string{"plev"})
	must(pv.PutAttr("units", "hPa"))
	la, _ := f.DefVar("lat", netcdf.Float, []string{"lat"})
	must(la.PutAttr("units", "degrees_north"))
	lo, _ := f.DefVar("lon", netcdf.Float, []string{"lon"})
	must(lo.PutAttr("units", "degrees_east"))
	v, err := f.DefVar("ta", netcdf.Short, []string{"time", "plev", "lat", "lon"})
	must(err)
	must(v.SetChunking([]int{1, 1, ny, nx}))
	must(v.SetDeflate(true, 1))
	must(v.PutAttr("units", "K"))
	must(v.PutAttr("standard_name", "air_temperature"))
	must(v.PutAttr("scale_factor", 0.01))
	must(v.PutAttr("add_offset", 250.0))
	must(v.PutAttr("_FillValue", int16(-32767)))
	must(f.EndDef())
	times := make([]float64, nt)
	for i := range times {
		times[i] = float64(15 + 30*i)
	}
	must(tv.WriteFloat64([]int{0}, []int{nt}, times))
	must(pv.WriteFloat64([]int{0}, []int{nz}, []float64{1000, 850, 600, 500}))
	lat := make([]float64, ny)
	for i := range lat {
		lat[i] = 89.5 - float64(i)
	}
	must(la.WriteFloat64([]int{0}, []int{ny}, lat))
	lon := make([]float64, nx)
	for i := range lon {
		lon[i] = 0.5 + float64(i)
	}
	must(lo.WriteFloat64([]int{0}, []int{nx}, lon))
	buf := make([]float64, nz*ny*nx)
	for i := range buf {
		buf[i] = float64(i%4000 - 2000)
	}
	for ts := 0; ts < nt; ts++ {
		must(v.WriteFloat64([]int{ts, 0, 0, 0}, []int{1, nz, ny, nx}, buf))
	}
	must(f.Close())
	return path
}

func benchRead(b *testing.B, level float64) {
	path := benchFile(b)
	fld, err := Open([]string{path}, Spec{Role: RoleAirTemp, Level: level})
	if err != nil {
		b.Fatal(err)
	}
	defer fld.Close()
	dst := make([]float32, fld.Len())
	var s Scratch
	b.SetBytes(int64(4 * fld.Len()))
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if err := fld.ReadSlab(i%fld.NT(), dst, &s); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkReadSlabExact reads one 180×360 packed level per step.
func BenchmarkReadSlabExact(b *testing.B) { benchRead(b, 85000) }

// BenchmarkReadSlabInterpolated reads two levels and interpolates in ln p.
func BenchmarkReadSlabInterpolated(b *testing.B) { benchRead(b, 70000) }

// BenchmarkNewMaskDecode is the per-value decoding cost.
func BenchmarkNewMaskDecode(b *testing.B) {
	m, err := newMask("v", netcdf.Short, attrs("scale_factor", []float64{0.01}, "add_offset", []float64{273.15},
		"_FillValue", []int16{-32767}, "valid_range", []int16{-30000, 30000}))
	if err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	var sum float64
	for i := 0; i < b.N; i++ {
		sum += m.Decode(float64(i%60000 - 30000))
	}
	_ = sum
}
