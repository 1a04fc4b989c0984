// Package jsonnum writes numbers together with their units the way every
// lidscope JSON file does: {"value": 301.5, "units": "K"}. A NaN or
// infinite value (no data) is written as "value": null, since JSON has no
// such numbers (RFC 8259 §6). Marshal encodes a whole document.
package jsonnum

import (
	"bytes"
	"encoding/json"
	"math"
	"strconv"
)

// Num is a number with its units (a UDUNITS string such as "K", "m2" or
// "1" for a pure number).
type Num struct {
	Value float64
	Units string
}

// MarshalJSON writes {"value":x,"units":u}: x as the shortest decimal that
// reads back to the same float64, null when x is NaN or infinite.
func (n Num) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteString(`{"value":`)
	if math.IsNaN(n.Value) || math.IsInf(n.Value, 0) {
		b.WriteString("null")
	} else {
		b.WriteString(strconv.FormatFloat(n.Value, 'g', -1, 64))
	}
	b.WriteString(`,"units":`)
	u, err := json.Marshal(n.Units)
	if err != nil {
		return nil, err
	}
	b.Write(u)
	b.WriteByte('}')
	return b.Bytes(), nil
}

// UnmarshalJSON reads {"value":x,"units":u} back; a null or missing value
// (no data) reads as NaN, so a write-read round trip keeps NaN.
func (n *Num) UnmarshalJSON(b []byte) error {
	var v struct {
		Value *float64 `json:"value"`
		Units string   `json:"units"`
	}
	if err := json.Unmarshal(b, &v); err != nil {
		return err
	}
	n.Value, n.Units = math.NaN(), v.Units
	if v.Value != nil {
		n.Value = *v.Value
	}
	return nil
}

// Count is a number of things (time steps, cells, values), in units "1".
func Count[T ~int | ~int32 | ~int64](n T) Num { return Num{float64(n), "1"} }

// Marshal encodes v for people to read: indented by two spaces, with <, >
// and & left as they are, and ending in a newline.
func Marshal(v any) ([]byte, error) {
	var b bytes.Buffer
	e := json.NewEncoder(&b)
	e.SetEscapeHTML(false)
	e.SetIndent("", "  ")
	if err := e.Encode(v); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}
