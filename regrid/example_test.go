package regrid_test

import (
	"fmt"
	"math"

	"lidscope/grid"
	"lidscope/regrid"
)

// Remap a synthetic 2° sea-surface-temperature-like field (invented data)
// with a missing block to the T42 Gaussian grid. The weights are computed
// once and can then be applied to every time step.
func ExampleNewWeights() {
	src, _ := grid.GlobalRegular(2, 2, 1)
	dst, _ := grid.GlobalGaussian(64, 128, 0, grid.GaussMidpoint)
	w, err := regrid.NewWeights(src, dst, regrid.Options{Method: regrid.Conservative, MinCoverage: 0.5})
	if err != nil {
		fmt.Println(err)
		return
	}
	sst := make([]float32, src.Size())
	for j, lat := range src.Lat {
		for i := range src.Lon {
			sst[j*src.NLon()+i] = float32(271.35 + 30*math.Cos(lat*math.Pi/180))
			if lat > 10 && lat < 30 && i < 10 { // a missing block
				sst[j*src.NLon()+i] = float32(math.NaN())
			}
		}
	}
	out := make([]float32, dst.Size())
	if err := w.Apply(out, sst); err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(src, "→", dst)
	fmt.Printf("%d links\n", w.NumLinks())
	fmt.Printf("equator-adjacent T42 cell at %.4f°N, %.4f°E: %.3f K\n", dst.Lat[32], dst.Lon[64], out[32*dst.NLon()+64])
	fmt.Printf("cell at %.4f°N, %.4f°E inside the missing block: %v\n", dst.Lat[39], dst.Lon[2], out[39*dst.NLon()+2])
	// The T42 cell spans 0…2.7906°N; it overlaps the 2° source bands 0…2°N
	// and 2…4°N in the ratio sin 2° : (sin 2.7906° − sin 2°), which gives
	// 301.335 K from the source values 301.345 K and 301.309 K.

	// Output:
	// 90×180 regular 2°×2°, lat -89…89, lon 1…359 → 64×128 gaussian, lat -87.8638…87.8638, lon 0…357.1875
	// 46816 links
	// equator-adjacent T42 cell at 1.3953°N, 180.0000°E: 301.335 K
	// cell at 20.9296°N, 5.6250°E inside the missing block: NaN
}

// Remap a 1° land mask to 2.5° as fractions, keep the cells at least half
// land, and blank the rest of a field on the 2.5° grid.
func ExampleRemapMask() {
	src, _ := grid.GlobalRegular(1, 1, 0.5)
	dst, _ := grid.GlobalRegular(2.5, 2.5, 1.25)
	w, err := regrid.NewWeights(src, dst, regrid.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	// Invented land: everything east of 0° and west of 1.5°E.
	land := make([]bool, src.Size())
	for j := range src.Lat {
		land[j*src.NLon()+0] = true // 0…1°E
		land[j*src.NLon()+1] = true // 1…2°E
	}
	frac := make([]float64, dst.Size())
	_ = regrid.MaskFraction(w, frac, land)
	keep := make([]bool, dst.Size())
	_ = regrid.RemapMask(w, keep, land, regrid.DefaultMaskThreshold)
	fmt.Printf("land fraction of the 0…2.5°E cells: %.2f, kept: %v\n", frac[0], keep[0])
	fmt.Printf("land fraction of the 2.5…5°E cells: %.2f, kept: %v\n", frac[1], keep[1])

	field := make([]float32, dst.Size())
	_ = regrid.MaskOut(field, keep)
	fmt.Println(field[0], field[1])
	// Output:
	// land fraction of the 0…2.5°E cells: 0.80, kept: true
	// land fraction of the 2.5…5°E cells: 0.00, kept: false
	// 0 NaN
}
