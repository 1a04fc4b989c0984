package cf_test

import (
	"fmt"
	"log"
	"os"
	"path/filepath"

	"lidscope/cf"
	"lidscope/netcdf"
)

// exampleFile writes a small synthetic SST file (invented values): two
// monthly steps on a 2×3 grid stored north to south on 0–360 longitudes,
// in degrees Celsius, packed as shorts with a fill value.
func exampleFile(dir string) string {
	path := filepath.Join(dir, "sst_example.nc")
	f, err := netcdf.Create(path)
	if err != nil {
		log.Fatal(err)
	}
	check := func(err error) {
		if err != nil {
			log.Fatal(err)
		}
	}
	_, err = f.DefDim("time", netcdf.Unlimited)
	check(err)
	_, err = f.DefDim("lat", 2)
	check(err)
	_, err = f.DefDim("lon", 3)
	check(err)
	tv, err := f.DefVar("time", netcdf.Double, []string{"time"})
	check(err)
	check(tv.PutAttr("units", "days since 2020-01-01"))
	check(tv.PutAttr("calendar", "standard"))
	la, err := f.DefVar("lat", netcdf.Float, []string{"lat"})
	check(err)
	check(la.PutAttr("units", "degrees_north"))
	lo, err := f.DefVar("lon", netcdf.Float, []string{"lon"})
	check(err)
	check(lo.PutAttr("units", "degrees_east"))
	v, err := f.DefVar("tos", netcdf.Short, []string{"time", "lat", "lon"})
	check(err)
	check(v.PutAttr("standard_name", "sea_surface_temperature"))
	check(v.PutAttr("units", "degC"))
	check(v.PutAttr("scale_factor", 0.01))
	check(v.PutAttr("_FillValue", int16(-32767)))
	check(f.EndDef())
	check(tv.WriteFloat64([]int{0}, []int{2}, []float64{15, 45}))
	check(la.WriteFloat64([]int{0}, []int{2}, []float64{10, -10}))
	check(lo.WriteFloat64([]int{0}, []int{3}, []float64{0, 120, 240}))
	check(v.WriteFloat64([]int{0, 0, 0}, []int{2, 2, 3}, []float64{
		2000, 2100, -32767, // lat 10: lon 0, 120, 240
		2500, 2600, 2700, // lat −10
		2010, 2110, 2210,
		2510, 2610, 2710,
	}))
	check(f.Close())
	return path
}

// Open finds the SST variable by its standard_name, and ReadSlab delivers
// each time step south to north, on −180…180 longitudes, in kelvin, with
// the fill value as NaN.
func ExampleOpen() {
	dir, _ := os.MkdirTemp("", "cf-example")
	defer os.RemoveAll(dir)
	fld, err := cf.Open([]string{exampleFile(dir)}, cf.Spec{Role: cf.RoleSST})
	if err != nil {
		log.Fatal(err)
	}
	defer fld.Close()
	fmt.Println("variable:", fld.Var, "—", fld.Conv)
	fmt.Println("lat:", fld.Layout.Lat, "lon:", fld.Layout.Lon)
	fmt.Println("time:", fld.Time.Span())
	buf := make([]float32, fld.Len())
	for t := 0; t < fld.NT(); t++ {
		if err := fld.ReadSlab(t, buf, nil); err != nil {
			log.Fatal(err)
		}
		fmt.Printf("step %d: %.2f\n", t, buf)
	}
	// Output:
	// variable: tos — "degC" → K: x +273.15
	// lat: [-10 10] lon: [-120 0 120]
	// time: 2020-01-16T00:00:00 … 2020-02-15T00:00:00, 2 monthly steps (standard calendar)
	// step 0: [300.15 298.15 299.15 NaN 293.15 294.15]
	// step 1: [300.25 298.25 299.25 295.25 293.25 294.25]
}

// A Scratch per goroutine lets ReadSlab reuse its buffers.
func ExampleField_ReadSlab() {
	dir, _ := os.MkdirTemp("", "cf-example")
	defer os.RemoveAll(dir)
	fld, err := cf.Open([]string{exampleFile(dir)}, cf.Spec{Role: cf.RoleSST, Var: "tos"})
	if err != nil {
		log.Fatal(err)
	}
	defer fld.Close()
	var s cf.Scratch
	buf := make([]float32, fld.Len())
	if err := fld.ReadSlab(1, buf, &s); err != nil {
		log.Fatal(err)
	}
	nlon := fld.Layout.NLon()
	for i, lat := range fld.Layout.Lat {
		fmt.Printf("lat %3g: %.2f\n", lat, buf[i*nlon:(i+1)*nlon])
	}
	// Output:
	// lat -10: [300.25 298.25 299.25]
	// lat  10: [295.25 293.25 294.25]
}

// Inspect says what lidscope recognises in a file and how it will decode it.
func ExampleInspect() {
	dir, _ := os.MkdirTemp("", "cf-example")
	defer os.RemoveAll(dir)
	rep := cf.Inspect(exampleFile(dir))
	fmt.Println("usable:", rep.Usable, "format:", rep.Format)
	for _, f := range rep.Fields {
		fmt.Println(f.Role, "←", f.Var, "by", f.How)
		fmt.Println("  units:", f.Conversion)
		fmt.Println("  grid:", f.Grid)
		fmt.Println("  decoding:", f.Decoding)
		fmt.Printf("  sample: %.2f … %.2f %s\n", *f.Min, *f.Max, f.SIUnits)
		for _, n := range f.Notes {
			fmt.Println("  note:", n)
		}
	}
	// Output:
	// usable: true format: NetCDF-4
	// sst ← tos by standard_name sea_surface_temperature
	//   units: "degC" → K: x +273.15
	//   grid: 2×3 lat×lon, regular 20° latitude × 120° longitude; lat -10…10, lon -120…120; bounds derived from midpoints
	//   decoding: packed: value = stored × 0.01 + 0; _FillValue -32767; valid (implied by the fill value) -32766…+Inf
	//   sample: 293.15 … 300.25 K
	//   note: latitude stored north to south: reordered south to north
	//   note: longitudes 0…240 normalised to −180…180
}
