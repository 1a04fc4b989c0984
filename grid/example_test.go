package grid_test

import (
	"fmt"

	"lidscope/grid"
)

func ExampleGlobalGaussian() {
	g, err := grid.GlobalGaussian(64, 128, 0, grid.GaussMidpoint) // T42
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(g)
	fmt.Printf("northernmost latitude %.4f°, bounds %.4f…%.0f\n", g.Lat[63], g.LatBounds[63][0], g.LatBounds[63][1])
	// Output:
	// 64×128 gaussian, lat -87.8638…87.8638, lon 0…357.1875
	// northernmost latitude 87.8638°, bounds 86.4802…90
}

// A file whose longitudes run 0…360 with the first column repeated at the
// end, and latitudes north→south: New detects the wrap column, and
// Canonical gives the layout lidscope works in.
func ExampleCanonical() {
	lat := []float64{60, 30, 0, -30, -60}
	lon := make([]float64, 37)
	for i := range lon {
		lon[i] = 10 * float64(i) // 0, 10, …, 360
	}
	g, err := grid.New(lat, lon, nil, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(g)
	c, p, err := grid.Canonical(g)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(c)
	fmt.Println("canonical column 0 is stored column", p.LonIndex[0], "and row 0 is stored row", p.LatIndex[0])
	// Output:
	// 5×37 regular 30°×10°, lat 60…-60, lon 0…360, wrap column
	// 5×36 regular 30°×10°, lat -60…60, lon -180…170
	// canonical column 0 is stored column 18 and row 0 is stored row 4
}

func ExampleGrid_CellAreas() {
	g, _ := grid.GlobalRegular(1, 1, 0)
	a := g.CellAreas()
	fmt.Printf("1°×1° cell at the equator: %.6g km²\n", a[90*360]/1e6)
	fmt.Printf("1°×1° cell at the pole:    %.6g km²\n", a[179*360]/1e6)
	// Output:
	// 1°×1° cell at the equator: 12363.7 km²
	// 1°×1° cell at the pole:    107.896 km²
}
