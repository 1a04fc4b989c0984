package output

import (
	"bytes"
	"encoding/json"
	"math"
	"strconv"
)

// num is a number with its units, written as {"value": x, "units": "K"};
// a NaN or infinite value (no data) is written as "value": null.
type num struct {
	V float64
	U string
}

func (n num) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteString(`{"value":`)
	if math.IsNaN(n.V) || math.IsInf(n.V, 0) {
		b.WriteString("null")
	} else {
		b.WriteString(strconv.FormatFloat(n.V, 'g', -1, 64))
	}
	b.WriteString(`,"units":`)
	u, err := json.Marshal(n.U)
	if err != nil {
		return nil, err
	}
	b.Write(u)
	b.WriteByte('}')
	return b.Bytes(), nil
}

// count is a number of things (time steps, cells, values), units "1".
func count[T ~int | ~int32 | ~int64](n T) num { return num{float64(n), "1"} }

// meanStd is the mean and standard deviation of a sample, with its size.
type meanStd struct {
	Mean num `json:"mean"`
	Std  num `json:"std"`
	N    num `json:"n"`
}

// formatFloat writes x for CSV: the shortest text that reads back to the
// same float64, and "NaN" for no data.
func formatFloat(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "NaN"
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}

// marshalJSON indents v for people and ends it with a newline.
func marshalJSON(v any) ([]byte, error) {
	var b bytes.Buffer
	e := json.NewEncoder(&b)
	e.SetEscapeHTML(false)
	e.SetIndent("", "  ")
	if err := e.Encode(v); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}
