package factors

import (
	"encoding/binary"
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"testing"

	"lidscope/cf"
	"lidscope/internal/testutil"
)

// windsOf is an invented 10-m wind field for the checks (m s-1):
// u = 7 cos φ − 3 + 2 sin 2λ, v = 3 sin 2φ cos λ.
func windsOf(lat, lon []float64) (u, v []float64) {
	for _, la := range lat {
		for _, lo := range lon {
			p, l := la*math.Pi/180, lo*math.Pi/180
			u = append(u, 7*math.Cos(p)-3+2*math.Sin(2*l))
			v = append(v, 3*math.Sin(2*p)*math.Cos(l))
		}
	}
	return u, v
}

// advScript is T_adv = −(u ∂T/∂x + v ∂T/∂y) written directly in numpy
// (independent of this package): neighbours by np.roll (periodic in
// longitude) with NaN padding at the latitude edges, centred differences
// where both neighbours are valid, one-sided where one is, NaN where none;
// a = 6.371e6 m.
const advScript = `
import json, sys
import numpy as np
ny, nx = int(sys.argv[2]), int(sys.argv[3])
raw = np.fromfile(sys.argv[1], dtype="<f8")
T = raw[:ny*nx].reshape(ny, nx)
lat = raw[ny*nx:ny*nx+ny]; lon = raw[ny*nx+ny:]
a = 6.371e6
phi = np.deg2rad(lat)[:, None] * np.ones((1, nx)); lam = np.deg2rad(lon)[None, :] * np.ones((ny, 1))
u = 7*np.cos(phi) - 3 + 2*np.sin(2*lam); v = 3*np.sin(2*phi)*np.cos(lam)
def wrap(d):
    return (d + np.pi) % (2*np.pi) - np.pi
def deriv(Tm, Tp, dm, dp):
    om, op = ~np.isnan(Tm), ~np.isnan(Tp)
    c = (Tp - Tm) / (dm + dp)
    f = (Tp - T) / dp
    b = (T - Tm) / dm
    return np.where(om & op, c, np.where(op, f, np.where(om, b, np.nan)))
Tm, Tp = np.roll(T, 1, axis=1), np.roll(T, -1, axis=1)
dm, dp = wrap(lam - np.roll(lam, 1, axis=1)), wrap(np.roll(lam, -1, axis=1) - lam)
dTdl = deriv(Tm, Tp, dm, dp)
pad = np.full((1, nx), np.nan)
Tm, Tp = np.vstack([pad, T[:-1]]), np.vstack([T[1:], pad])
pm, pp = np.vstack([pad, phi[:-1]]), np.vstack([phi[1:], pad])
with np.errstate(invalid="ignore", divide="ignore"):
    dTdp = deriv(Tm, Tp, phi - pm, pp - phi)
    adv = -(u * dTdl / (a * np.cos(phi)) + v * dTdp / a)
adv[np.cos(phi) < 1e-10] = np.nan
adv[np.isnan(T)] = np.nan
print(json.dumps([None if np.isnan(x) else float(x) for x in adv.ravel()]))
`

// T_adv on a real SST field — Debian's libncarg-data STR 2° SST
// climatology (cdf/sstdata_netcdf.nc, global, filled over land), January
// and July, read through package cf, with land removed by the real 1°
// land–sea mask of the same package (cdf/landsea.nc, LSMASK ≠ 0 at the
// mask cell north-east of each SST point) — against numpy finite
// differences with invented winds, to 1e-6 relative; the grid is global,
// so longitude is periodic, and the coasts exercise the one-sided and NaN
// rules.
func TestAdvectionRealSSTAgainstNumpy(t *testing.T) {
	path := testutil.RealData(t, "cdf/sstdata_netcdf.nc")
	py := testutil.Python(t, "numpy")
	f, err := cf.Open([]string{path}, cf.Spec{Role: cf.RoleSST, Overrides: cf.Overrides{Climatology: true}})
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	lat, lon := f.Layout.Lat, f.Layout.Lon
	if !PeriodicLongitudes(lon) {
		t.Fatalf("the 2° global grid (%d longitudes %v…%v) is not recognised as periodic", len(lon), lon[0], lon[len(lon)-1])
	}
	u, v := windsOf(lat, lon)
	land := landOf(t, testutil.RealData(t, "cdf/landsea.nc"), lat, lon)
	buf := make([]float32, f.Len())
	for _, ts := range []int{0, 6} {
		if err := f.ReadSlab(ts, buf, nil); err != nil {
			t.Fatal(err)
		}
		sst := make([]float64, len(buf))
		for i, x := range buf {
			sst[i] = float64(x)
			if land[i] {
				sst[i] = math.NaN()
			}
		}
		got, err := Advection(sst, u, v, lat, lon, true)
		if err != nil {
			t.Fatal(err)
		}
		raw := append(append(append([]float64(nil), sst...), lat...), lon...)
		bin := filepath.Join(t.TempDir(), "sst.bin")
		b := make([]byte, 8*len(raw))
		for i, x := range raw {
			binary.LittleEndian.PutUint64(b[8*i:], math.Float64bits(x))
		}
		if err := os.WriteFile(bin, b, 0o644); err != nil {
			t.Fatal(err)
		}
		script := filepath.Join(t.TempDir(), "adv.py")
		os.WriteFile(script, []byte(advScript), 0o644)
		out, err := exec.Command(py, script, bin, itoa(len(lat)), itoa(len(lon))).Output()
		if err != nil {
			t.Fatalf("numpy: %v", err)
		}
		var want []*float64
		if err := json.Unmarshal(out, &want); err != nil {
			t.Fatal(err)
		}
		scale := 0.0
		for _, w := range want {
			if w != nil {
				scale = math.Max(scale, math.Abs(*w))
			}
		}
		valid, oneSided, maxRel := 0, 0, 0.0
		for i, w := range want {
			if w == nil {
				if !math.IsNaN(got[i]) {
					t.Errorf("step %d cell %d: got %g, numpy NaN", ts, i, got[i])
				}
				continue
			}
			valid++
			d := math.Abs(got[i] - *w)
			if rel := d / math.Max(math.Abs(*w), 1e-6*scale); rel > maxRel {
				maxRel = rel
			}
			if d > 1e-6*math.Abs(*w)+1e-12*scale || math.IsNaN(got[i]) {
				t.Errorf("step %d cell %d: got %g K s-1, numpy %g", ts, i, got[i], *w)
			}
			j, k := i/len(lon), i%len(lon)
			if !math.IsNaN(sst[i]) && (math.IsNaN(sst[j*len(lon)+(k+1)%len(lon)]) || math.IsNaN(sst[j*len(lon)+(k+len(lon)-1)%len(lon)])) {
				oneSided++
			}
		}
		if valid < 5000 || oneSided < 100 {
			t.Errorf("step %d: only %d valid cells, %d next to land: the check is too weak", ts, valid, oneSided)
		}
		t.Logf("step %d: %d ocean cells (%d beside land), max relative difference %.2g, largest |T_adv| %.3g K s-1", ts, valid, oneSided, maxRel, scale)
	}
}

// landOf reports for each point of the grid lat×lon (degrees, on even
// degrees) whether the 1° mask cell centred half a degree north-east of
// it is anything but ocean (LSMASK 0 = ocean, 1 land, 2 lake, 3 small
// island, 4 ice shelf).
func landOf(t *testing.T, path string, lat, lon []float64) []bool {
	t.Helper()
	m, err := cf.Open([]string{path}, cf.Spec{Role: cf.RoleLandFraction})
	if err != nil {
		t.Fatal(err)
	}
	defer m.Close()
	buf := make([]float32, m.Len())
	if err := m.ReadSlab(0, buf, nil); err != nil {
		t.Fatal(err)
	}
	key := func(la, lo float64) [2]int {
		return [2]int{int(math.Round(la * 2)), int(math.Round(math.Mod(math.Mod(lo, 360)+360, 360) * 2))}
	}
	val := map[[2]int]float32{}
	for j, la := range m.Layout.Lat {
		for i, lo := range m.Layout.Lon {
			val[key(la, lo)] = buf[j*len(m.Layout.Lon)+i]
		}
	}
	out := make([]bool, len(lat)*len(lon))
	for j, la := range lat {
		la = math.Min(la+0.5, 89.5)
		for i, lo := range lon {
			x, ok := val[key(la, lo+0.5)]
			if !ok {
				t.Fatalf("no mask cell at %v°N %v°E", la, lo+0.5)
			}
			out[j*len(lon)+i] = x != 0
		}
	}
	return out
}

func itoa(n int) string { b, _ := json.Marshal(n); return string(b) }

// Hand-worked cases: an SST linear in longitude and latitude (centred and
// one-sided differences are exact), coasts, the dateline and the poles.
func TestAdvectionCases(t *testing.T) {
	nan := math.NaN()
	a := EarthRadius
	rad := math.Pi / 180
	lat := []float64{-10, 0, 10}
	lon := []float64{0, 90, 180, 270}
	lin := func(la, lo float64) float64 { return 290 + 0.5*lo/90 + 0.2*la/10 }
	var sst []float64
	for _, la := range lat {
		for _, lo := range lon {
			sst = append(sst, lin(la, lo))
		}
	}
	ones := func(x float64) []float64 {
		o := make([]float64, 12)
		for i := range o {
			o[i] = x
		}
		return o
	}
	dTdx := func(la float64) float64 { return 0.5 / (90 * rad) / (a * math.Cos(la*rad)) } // K m-1
	dTdy := 0.2 / (10 * rad) / a
	for _, tc := range []struct {
		name     string
		sst      []float64
		u, v     float64
		periodic bool
		cell     int
		want     float64
	}{
		{"interior eastward wind, centred", sst, 5, 0, false, 5, -5 * dTdx(0)},
		{"interior northward wind, centred", sst, 0, 4, false, 5, -4 * dTdy},
		{"south edge row, one-sided", sst, 0, 4, false, 1, -4 * dTdy},
		{"west edge column, not periodic, one-sided", sst, 5, 0, false, 4, -5 * dTdx(0)},
		{"land to the east: one-sided from the west", withNaN(sst, 6), 5, 0, false, 5, -5 * dTdx(0)},
		{"land both sides: NaN", withNaN(withNaN(sst, 6), 4), 5, 0, false, 5, nan},
		{"land cell itself: NaN", withNaN(sst, 5), 5, 0, false, 5, nan},
		// periodic: at λ = 0 the neighbours are 270° (T jumps by −1.5 K over
		// 90°, seen as the west neighbour) and 90°: (T(90) − T(270))/(180°).
		{"dateline neighbours on a periodic grid", sst, 5, 0, true, 4, -5 * (lin(0, 90) - lin(0, 270)) / (180 * rad) / a},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got, err := Advection(tc.sst, ones(tc.u), ones(tc.v), lat, lon, tc.periodic)
			if err != nil {
				t.Fatal(err)
			}
			g := got[tc.cell]
			if math.IsNaN(tc.want) != math.IsNaN(g) || (!math.IsNaN(g) && math.Abs(g-tc.want) > 1e-12*math.Abs(tc.want)) {
				t.Errorf("got %g K s-1, want %g", g, tc.want)
			}
		})
	}
	if got, _ := Advection([]float64{280, 281, 282, 283}, []float64{1, 1, 1, 1}, []float64{1, 1, 1, 1}, []float64{90, 80}, []float64{0, 10}, false); !math.IsNaN(got[0]) || math.IsNaN(got[2]) {
		t.Errorf("pole row must be NaN, the next row finite: %v", got)
	}
	if _, err := Advection(sst[:5], ones(5), ones(5), lat, lon, false); err == nil {
		t.Error("wrong field size accepted")
	}
	if PeriodicLongitudes([]float64{0, 90, 180}) || !PeriodicLongitudes([]float64{-180, -90, 0, 90}) || !PeriodicLongitudes(lon) {
		t.Error("PeriodicLongitudes misjudged a grid")
	}
}

func withNaN(x []float64, i int) []float64 {
	y := append([]float64(nil), x...)
	y[i] = math.NaN()
	return y
}
