package metrics

import (
	"math"
	"strings"
	"testing"
)

// The input ranges at their edges: the surface must lie below the 700-hPa
// level of LTS (Klein & Hartmann 1993 define LTS as θ700 − θ_surface) and at
// most 1200 hPa (common practice: above any observed sea-level pressure);
// a measured relative humidity is a fraction up to 1.05 and an assumed one
// in (0, 1] (common practice).
func TestInputRanges(t *testing.T) {
	for _, tc := range []struct {
		name   string
		ok     bool
		wantOK bool
		err    error  // the Check function's error, where there is one
		want   string // in err's text
	}{
		{"ps 1013 hPa", SurfacePressureOK(101300), true, CheckSurfacePressure(101300), ""},
		{"ps at 700 hPa", SurfacePressureOK(70000), false, CheckSurfacePressure(70000), "above 70000 Pa"},
		{"ps 1200 hPa", SurfacePressureOK(120000), true, CheckSurfacePressure(120000), ""},
		{"ps 1013 without a unit", SurfacePressureOK(1013), false, CheckSurfacePressure(1013), "1013hPa"},
		{"ps NaN", SurfacePressureOK(math.NaN()), false, CheckSurfacePressure(math.NaN()), "at most 120000 Pa"},
		{"rh 0", RelativeHumidityOK(0), true, CheckRelativeHumidity(0), ""},
		{"rh 1.05", RelativeHumidityOK(1.05), true, CheckRelativeHumidity(1.05), ""},
		{"rh 80 as a percentage", RelativeHumidityOK(80), false, CheckRelativeHumidity(80), "80 % is 0.8"},
		{"rh negative", RelativeHumidityOK(-0.1), false, CheckRelativeHumidity(-0.1), "[0, 1.05]"},
		{"rh NaN", RelativeHumidityOK(math.NaN()), false, CheckRelativeHumidity(math.NaN()), "outside"},
		{"assumed rh 1", AssumedRHOK(1), true, nil, ""},
		{"assumed rh 0", AssumedRHOK(0), false, nil, ""},
		{"assumed rh 1.01", AssumedRHOK(1.01), false, nil, ""},
	} {
		if tc.ok != tc.wantOK {
			t.Errorf("%s: ok = %v, want %v", tc.name, tc.ok, tc.wantOK)
		}
		if tc.want == "" {
			if tc.err != nil {
				t.Errorf("%s: unexpected error %v", tc.name, tc.err)
			}
		} else if tc.err == nil || !strings.Contains(tc.err.Error(), tc.want) {
			t.Errorf("%s: error %v, want one containing %q", tc.name, tc.err, tc.want)
		}
	}
}
