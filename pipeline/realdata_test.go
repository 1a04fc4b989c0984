package pipeline

import (
	"context"
	"math"
	"slices"
	"strings"
	"testing"

	"lidscope/cf"
	"lidscope/internal/testutil"
	"lidscope/metrics"
	"lidscope/regimes"
	"lidscope/regrid"
)

// TestRealSSTWithT700 runs SST and 700 hPa temperature without cloud on
// real files nobody here wrote (Debian's libncarg-data, `make realdata`
// → $LIDSCOPE_REALDATA): the STR 2° SST climatology (cdf/sstdata_netcdf.nc,
// its non-CF "Month" axis declared a climatology) and a T42 temperature
// field on 17 pressure levels with one time step, January 2001
// (nug/rectilinear_grid_3D.nc). The run aligns the January of the
// climatology with that month, remaps T700 conservatively to the SST grid
// and adds LTS and EIS, with no cloud quantity. LTS is checked cell by
// cell against its definition, θ700 − θsurface (Klein & Hartmann 1993, J.
// Climate 6, p. 1588), θ = T (p0/p)^κ with p0 = 1000 hPa, κ = Rd/cpd =
// 287.04/1005.7 (common practice), at the conventions' constant surface
// pressure.
func TestRealSSTWithT700(t *testing.T) {
	sst := testutil.RealData(t, "cdf/sstdata_netcdf.nc")
	ta := testutil.RealData(t, "nug/rectilinear_grid_3D.nc")
	conv := metrics.DefaultConventions()
	p := Plan{
		Dataset: "real-sst-t700",
		SST:     Input{Paths: []string{sst}, Spec: cf.Spec{Role: cf.RoleSST, Overrides: cf.Overrides{Climatology: true}}},
		T700:    &Input{Paths: []string{ta}, Spec: cf.Spec{Role: cf.RoleAirTemp, Level: 70000}},
		Ocean:   Ocean{Kind: OceanWhereSST}, Metrics: conv,
		Regimes: regimes.Definition{Delta: 1.5, Band: regimes.Band{South: -30, North: 30}},
		Grid:    GridPlan{Target: "sst", Methods: map[cf.Role]regrid.Method{cf.RoleAirTemp: regrid.Conservative}},
	}
	res, err := Run(context.Background(), p)
	if err != nil {
		t.Fatal(err)
	}
	l := res.Acc.L
	if !slices.Equal(l.Quantities, []string{"sst", "t700", "lts", "eis"}) || l.Cloud != "" {
		t.Fatalf("quantities %v cloud %q", l.Quantities, l.Cloud)
	}
	if len(res.Labels) != 1 || res.Labels[0] != "2001-01" {
		t.Fatalf("labels %v, want the one month of the temperature file", res.Labels)
	}
	if n := strings.Join(res.Notes, "\n"); !strings.Contains(n, "the run follows that month") {
		t.Errorf("no note on the alignment:\n%s", n)
	}
	c := conv.Constants
	kappa := c.Rd / c.Cpd
	theta := func(T, p float64) float64 { return T * math.Pow(c.P0/p, kappa) }
	qi := func(name string) int { return slices.Index(l.Quantities, name) }
	checked := 0
	acc := res.Acc
	for i := range acc.NCells() {
		if acc.ValidSteps(i) == 0 {
			continue
		}
		for r := regimes.Regime(0); r < 3; r++ {
			lts := acc.Moments(qi("lts"), r, i)
			if lts.N == 0 {
				continue
			}
			s, t7 := acc.Moments(qi("sst"), r, i).Mean, acc.Moments(qi("t700"), r, i).Mean
			if want := theta(t7, 70000) - theta(s, conv.SurfacePressure); math.Abs(lts.Mean-want) > 2e-3 {
				t.Fatalf("cell %d: LTS %.5f K, θ700 − θs = %.5f K (T700 %.3f K, SST %.3f K)", i, lts.Mean, want, t7, s)
			}
			if e := acc.Moments(qi("eis"), r, i); e.N != lts.N {
				t.Fatalf("cell %d: %d EIS values for %d LTS values", i, e.N, lts.N)
			}
			checked++
		}
	}
	if checked < 1000 {
		t.Errorf("only %d ocean cells checked", checked)
	}
}
