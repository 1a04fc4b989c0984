package factors_test

import (
	"fmt"
	"math"

	"lidscope/factors"
	"lidscope/relations"
)

// Fitting low cloud on two factors from co-moments kept per year, with
// the ridge penalty chosen by cross-validation over the years (invented
// numbers).
func ExampleCrossValidate() {
	var fs factors.Folds
	for year := 0; year < 4; year++ {
		c := relations.NewCoMoments(3) // EIS, SST, low cloud
		for i := 0; i < 20; i++ {
			eis := 2 + math.Sin(float64(7*i+year))*2       // K
			sst := 295 + math.Cos(float64(3*i+5*year))*1.5 // K
			cloud := 0.2 + 0.03*eis - 0.02*(sst-295) + 0.001*math.Sin(float64(11*i+year))
			c.Add([]float64{eis, sst, cloud}, 1)
		}
		fs.Pieces = append(fs.Pieces, c)
		fs.Labels = append(fs.Labels, fmt.Sprint(2001+year))
	}
	cv, err := factors.CrossValidate(fs, []float64{0, 0.01, 0.1, 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	f := cv.Fit
	fmt.Printf("penalty %g, CV R² %.3f\n", cv.Penalty, cv.R2)
	for j, name := range []string{"EIS", "SST"} {
		lo, hi := f.Interval(j, 60, 0.95)
		fmt.Printf("%s: %.4f per K [%.4f, %.4f], %.4f per sd, VIF %.2f\n", name, f.Coef[j], lo, hi, f.CoefSD[j], f.VIF[j])
	}
	// Output:
	// penalty 0, CV R² 1.000
	// EIS: 0.0300 per K [0.0299, 0.0302], 0.0421 per sd, VIF 1.00
	// SST: -0.0200 per K [-0.0201, -0.0198], -0.0209 per sd, VIF 1.00
}

// Temperature advection by a westerly of 5 m s-1 over SST falling
// eastward by 1 K per 10° of longitude at the equator.
func ExampleAdvection() {
	lat := []float64{-5, 0, 5}
	lon := []float64{180, 190, 200}
	sst := []float64{301, 300, 299, 301, 300, 299, 301, 300, 299}
	u := []float64{5, 5, 5, 5, 5, 5, 5, 5, 5}
	v := make([]float64, 9)
	adv, _ := factors.Advection(sst, u, v, lat, lon, false)
	fmt.Printf("%.3e K s-1 = %.2f K per day\n", adv[4], adv[4]*86400)
	// Output:
	// 4.497e-06 K s-1 = 0.39 K per day
}

// An observational constraint: observed sensitivities times a model's
// factor changes per kelvin of global warming (invented numbers).
func ExampleConstrain() {
	beta := []float64{0.012, -0.010}       // low-cloud fraction per K of EIS, per K of SST
	betaCov := []float64{4e-6, 0, 0, 1e-6} // their covariance
	dx := []float64{0.9, 3.1}              // model's ΔEIS and ΔSST, K
	dxCov := []float64{0.01, 0, 0, 0.0025} // sampling error of the changes
	r, _ := factors.Constrain(beta, betaCov, dx, dxCov, 3.0, 0.95)
	fmt.Printf("ΔC/ΔT = %.4f per K [%.4f, %.4f]\n", r.Change, r.Lo, r.Hi)
	fmt.Printf("EIS part %.4f, SST part %.4f\n", r.Contrib[0], r.Contrib[1])
	// Output:
	// ΔC/ΔT = -0.0067 per K [-0.0092, -0.0042]
	// EIS part 0.0036, SST part -0.0103
}

// Yearly co-moments of a cell from two pieces of its record, merged, as
// the folds of cross-validation; and the bytes a year's moments take for
// seven factors.
func ExampleYears() {
	a, b := factors.NewYears(2), factors.NewYears(2) // one factor and the response
	for i := 0; i < 48; i++ {
		x := math.Sin(float64(i))
		piece := a
		if i >= 30 {
			piece = b
		}
		piece.Add(2001+i/12, []float64{x, 0.5 * x}, 1)
	}
	if err := a.Merge(b); err != nil {
		fmt.Println(err)
		return
	}
	fs := a.Folds()
	for i, c := range fs.Pieces {
		fmt.Println(fs.Labels[i], c.N)
	}
	fmt.Println(factors.BytesPerYear(7), "bytes per year for 7 factors")
	// Output:
	// 2001 12
	// 2002 12
	// 2003 12
	// 2004 12
	// 592 bytes per year for 7 factors
}
