package output

import (
	"math"
	"strconv"

	"lidscope/internal/jsonnum"
)

// num is jsonnum.Num under a short name, for the many literals of the
// JSON files: num{Value: x, Units: "K"} is written as {"value": x,
// "units": "K"}.
type num = jsonnum.Num

// meanStd is the mean and standard deviation of a sample, with its size.
type meanStd struct {
	Mean num `json:"mean"`
	Std  num `json:"std"`
	N    num `json:"count"`
}

// formatFloat writes x for CSV: the shortest text that reads back to the
// same float64, and "NaN" for no data.
func formatFloat(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "NaN"
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}
