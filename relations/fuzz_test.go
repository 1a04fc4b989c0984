package relations

import (
	"math"
	"strings"
	"testing"
)

// ParseMode accepts exactly the two names (any case, surrounding blanks)
// and round-trips through Mode.String.
func FuzzParseMode(f *testing.F) {
	for _, s := range []string{"climatological", "anomaly", " Anomaly ", "", "anom", "CLIMATOLOGICAL\n"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		m, err := ParseMode(s)
		w := strings.ToLower(strings.TrimSpace(s))
		if (w == "climatological" || w == "anomaly") != (err == nil) {
			t.Fatalf("ParseMode(%q) = %v, %v", s, m, err)
		}
		if err == nil && m.String() != w {
			t.Fatalf("ParseMode(%q).String() = %q", s, m.String())
		}
	})
}

// FitLogistic never panics, and a fit it returns is a stationary point of
// the likelihood with p = 0.5 at X50.
func FuzzFitLogistic(f *testing.F) {
	f.Add(1.0, 3.0, 5.0, 9.0, 10.0, 10.0, 10.0, 10.0)
	f.Add(0.0, 0.0, 10.0, 10.0, 10.0, 10.0, 10.0, 10.0)
	f.Fuzz(func(t *testing.T, y0, y1, y2, y3, n0, n1, n2, n3 float64) {
		x := []float64{-1, 0, 1, 2}
		n := []float64{n0, n1, n2, n3}
		y := []float64{y0, y1, y2, y3}
		for k := range n {
			if !(n[k] >= 0 && n[k] < 1e6) || !(y[k] >= 0 && y[k] <= n[k]) {
				return
			}
		}
		l, err := FitLogistic(x, y, n)
		if err != nil {
			return
		}
		var g0, g1, s float64
		for k := range x {
			p := 1 / (1 + math.Exp(-(l.B0 + l.B1*x[k])))
			g0 += y[k] - n[k]*p
			g1 += (y[k] - n[k]*p) * x[k]
			s += n[k]
		}
		if math.Abs(g0)/s > 1e-6 || math.Abs(g1)/s > 1e-6 {
			t.Fatalf("fit %+v is not stationary: gradient %g %g", l, g0/s, g1/s)
		}
		if l.B1 != 0 && math.Abs(l.B0+l.B1*l.X50) > 1e-9*(1+math.Abs(l.B0)) {
			t.Fatalf("X50 %g does not give p = 0.5", l.X50)
		}
	})
}
