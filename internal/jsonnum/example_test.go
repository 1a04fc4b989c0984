package jsonnum_test

import (
	"fmt"
	"math"

	"lidscope/internal/jsonnum"
)

func Example() {
	type band struct {
		MeanSST jsonnum.Num `json:"mean_sst"`
		Missing jsonnum.Num `json:"missing"`
		Cells   jsonnum.Num `json:"cells"`
	}
	b, _ := jsonnum.Marshal(band{
		MeanSST: jsonnum.Num{Value: 300.5, Units: "K"},
		Missing: jsonnum.Num{Value: math.NaN(), Units: "K"},
		Cells:   jsonnum.Count(1440),
	})
	fmt.Print(string(b))
	// Output:
	// {
	//   "mean_sst": {
	//     "value": 300.5,
	//     "units": "K"
	//   },
	//   "missing": {
	//     "value": null,
	//     "units": "K"
	//   },
	//   "cells": {
	//     "value": 1440,
	//     "units": "1"
	//   }
	// }
}
