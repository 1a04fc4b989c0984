package constraint_test

import (
	"fmt"

	"lidscope/constraint"
	"lidscope/factors"
)

// A model's low-cloud change per kelvin constrained by observed
// sensitivities to two factors (invented numbers): the observed
// sensitivities times the model's factor changes, beside the model's own.
func ExampleCompute() {
	fit := func(coef, mean [2]float64) *factors.Results {
		r := &factors.Results{Response: "low_cloud", ResponseUnits: "1", Method: factors.MethodOLS, Level: 0.95,
			Factors: []factors.FactorInfo{{Name: "sst", Units: "K"}, {Name: "eis", Units: "K"}}}
		f := factors.RegionFit{Domain: "tropical_band", Regime: "subsidence", N: 120, Cov: make([]float64, 4)}
		for i, n := range []string{"sst", "eis"} {
			f.Sens = append(f.Sens, factors.Sensitivity{Factor: n, Units: "K", Coef: coef[i], Mean: mean[i]})
		}
		r.Fits = []factors.RegionFit{f}
		return r
	}
	obs := constraint.NewRun("observations", fit([2]float64{-0.01, 0.05}, [2]float64{299, 4}))
	ctrl := constraint.NewRun("model", fit([2]float64{-0.002, 0.03}, [2]float64{298, 4}))
	warm := constraint.NewRun("model-warm", fit([2]float64{-0.002, 0.03}, [2]float64{302, 5}))
	ctrl.SetResponseMean("tropical_band", "subsidence", 0.30, 0)
	warm.SetResponseMean("tropical_band", "subsidence", 0.31, 0)
	res, err := constraint.Compute(obs, ctrl, warm, constraint.Options{Warming: 4})
	if err != nil {
		fmt.Println(err)
		return
	}
	d, _ := res.Domain("tropical_band", "subsidence")
	for _, f := range d.Factors {
		fmt.Printf("%s: change %.2f K per K, contribution %+.4f per K\n", f.Factor, f.PerKelvin, f.Contribution)
	}
	fmt.Printf("constrained %+.4f, predicted by the model's own sensitivities %+.4f, actual %+.4f per K\n",
		d.Constrained.Value, d.Predicted.Value, d.Actual.Value)
	// Output:
	// sst: change 1.00 K per K, contribution -0.0100 per K
	// eis: change 0.25 K per K, contribution +0.0125 per K
	// constrained +0.0025, predicted by the model's own sensitivities +0.0055, actual +0.0025 per K
}
