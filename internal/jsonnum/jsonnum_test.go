package jsonnum

import (
	"encoding/json"
	"math"
	"testing"
	"unicode/utf8"
)

// The expected texts follow the JSON number grammar of RFC 8259 §6 (no
// NaN or infinities; an exponent may carry a sign) and Go's strconv
// shortest round-trip formatting ('g', -1: exponent form from 1e21 and
// below 1e-4, and whenever it is shorter, as for 5.1e+14).
func TestMarshalJSON(t *testing.T) {
	cases := []struct {
		n    Num
		want string
	}{
		{Num{301.5, "K"}, `{"value":301.5,"units":"K"}`},
		{Num{0, "1"}, `{"value":0,"units":"1"}`},
		{Num{-12.25, "hPa d-1"}, `{"value":-12.25,"units":"hPa d-1"}`},
		{Num{0.1, "1"}, `{"value":0.1,"units":"1"}`},
		{Num{5.1e14, "m2"}, `{"value":5.1e+14,"units":"m2"}`},
		{Num{1e21, "m2"}, `{"value":1e+21,"units":"m2"}`},
		{Num{6.5e-3, "K m-1"}, `{"value":0.0065,"units":"K m-1"}`},
		{Num{5e-324, "1"}, `{"value":5e-324,"units":"1"}`},
		{Num{math.NaN(), "K"}, `{"value":null,"units":"K"}`},
		{Num{math.Inf(1), "K"}, `{"value":null,"units":"K"}`},
		{Num{math.Inf(-1), "K"}, `{"value":null,"units":"K"}`},
		{Num{2, `a "quoted" \ unit`}, `{"value":2,"units":"a \"quoted\" \\ unit"}`},
		{Num{2, ""}, `{"value":2,"units":""}`},
		{Count(42), `{"value":42,"units":"1"}`},
		{Count(int64(-3)), `{"value":-3,"units":"1"}`},
		{Count(int32(1 << 30)), `{"value":1.073741824e+09,"units":"1"}`},
		{Count(100000), `{"value":100000,"units":"1"}`},
	}
	for _, c := range cases {
		b, err := json.Marshal(c.n)
		if err != nil {
			t.Errorf("%v: %v", c.n, err)
			continue
		}
		if string(b) != c.want {
			t.Errorf("%v: %s, want %s", c.n, b, c.want)
		}
	}
}

// Inside a struct or map, encoding/json calls MarshalJSON and re-indents
// its output.
func TestMarshalDocument(t *testing.T) {
	doc := map[string]any{
		"sst":  Num{300.25, "K"},
		"note": "a < b & c > d",
		"n":    Count(7),
	}
	b, err := Marshal(doc)
	if err != nil {
		t.Fatal(err)
	}
	want := `{
  "n": {
    "value": 7,
    "units": "1"
  },
  "note": "a < b & c > d",
  "sst": {
    "value": 300.25,
    "units": "K"
  }
}
`
	if string(b) != want {
		t.Errorf("Marshal:\n%s\nwant:\n%s", b, want)
	}
	if _, err := Marshal(map[string]any{"bad": math.NaN()}); err == nil {
		t.Error("a bare NaN float encoded without error")
	}
}

// Any value and units give valid JSON that reads back to the same number
// (null for NaN and ±Inf) and the same units string (invalid UTF-8 comes
// back as valid UTF-8, with U+FFFD for the bad bytes).
func FuzzMarshalJSON(f *testing.F) {
	f.Add(301.5, "K")
	f.Add(math.NaN(), "")
	f.Add(math.Inf(-1), "m2")
	f.Add(-0.0, `"\`)
	f.Add(1e300, "µm")
	f.Fuzz(func(t *testing.T, v float64, u string) {
		b, err := Num{v, u}.MarshalJSON()
		if err != nil {
			t.Fatal(err)
		}
		if !json.Valid(b) {
			t.Fatalf("%v %q: invalid JSON %s", v, u, b)
		}
		var back struct {
			Value *float64 `json:"value"`
			Units string   `json:"units"`
		}
		if err := json.Unmarshal(b, &back); err != nil {
			t.Fatal(err)
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			if back.Value != nil {
				t.Fatalf("%v written as %s, want null", v, b)
			}
		} else if back.Value == nil || *back.Value != v || math.Signbit(*back.Value) != math.Signbit(v) {
			t.Fatalf("%v written as %s", v, b)
		}
		if utf8.ValidString(u) && back.Units != u || !utf8.ValidString(back.Units) {
			t.Fatalf("units %q read back as %q", u, back.Units)
		}
	})
}

func BenchmarkMarshalJSON(b *testing.B) {
	n := Num{301.123456789, "K"}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := n.MarshalJSON(); err != nil {
			b.Fatal(err)
		}
	}
}

// TestUnmarshalRoundTrip: what Marshal writes reads back to the same
// number and units; null (no data) and a missing value read as NaN
// (RFC 8259 has no NaN, so null stands for it, common practice).
func TestUnmarshalRoundTrip(t *testing.T) {
	for _, tc := range []struct {
		name string
		in   Num
	}{
		{"kelvin", Num{301.5, "K"}},
		{"shortest decimal", Num{0.1 + 0.2, "1"}},
		{"tiny", Num{5e-324, "K-1"}},
		{"negative", Num{-2.25e7, "Pa s-1"}},
		{"nan", Num{math.NaN(), "K"}},
		{"inf", Num{math.Inf(1), "W m-2"}},
	} {
		b, err := tc.in.MarshalJSON()
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		var got Num
		if err := got.UnmarshalJSON(b); err != nil {
			t.Fatalf("%s: reading %s: %v", tc.name, b, err)
		}
		want := tc.in.Value
		if math.IsInf(want, 0) {
			want = math.NaN() // written as null
		}
		if got.Units != tc.in.Units || !(got.Value == want || (got.Value != got.Value && want != want)) {
			t.Errorf("%s: %s read back as %v, want %v %q", tc.name, b, got, want, tc.in.Units)
		}
	}
	var n Num
	if err := n.UnmarshalJSON([]byte(`{"units":"K"}`)); err != nil || n.Value == n.Value || n.Units != "K" {
		t.Errorf("missing value: %v %v, want NaN K", n, err)
	}
	if err := n.UnmarshalJSON([]byte(`{"value":"3","units":"K"}`)); err == nil {
		t.Errorf("a value given as text was accepted")
	}
}
