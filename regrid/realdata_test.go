package regrid_test

// Comparisons with CDO on real files nobody here wrote: Debian's
// libncarg-data (unpacked by `make realdata`, path in LIDSCOPE_REALDATA):
//   - cdf/sst30e_netcdf.nc, a 2° monthly SST climatology (NCAR ds289.0) whose
//     longitudes run 30…390 (past 360, with the first column repeated at the
//     end), whose latitudes include both poles, and whose land is
//     _FillValue;
//   - cdf/landsea.nc, a 1° land–sea mask (0 = ocean).

import (
	"math"
	"path/filepath"
	"testing"

	"lidscope/grid"
	"lidscope/internal/testutil"
	"lidscope/regrid"
)

// realSST returns the January SST of sst30e_netcdf.nc on its own grid
// (wrap column included) and on the grid without the wrap column.
func realSST(t *testing.T) (full *grid.Grid, fullData []float64, plain *grid.Grid, plainData []float64) {
	t.Helper()
	path := testutil.RealData(t, "cdf/sst30e_netcdf.nc")
	v := readNC(t, path, "lat", "lon", "sst")
	lat, lon := v["lat"], v["lon"]
	full = must(t)(grid.New(lat, lon, nil, nil))
	if !full.WrapColumn || !full.PeriodicLon || full.Kind != grid.Regular {
		t.Fatalf("%s: grid %v: expected a regular periodic grid with a wrap column", path, full)
	}
	n := full.Size()
	fullData = v["sst"][:n] // first time step
	nlon := full.NLon()
	plain = must(t)(grid.New(lat, lon[:nlon-1], nil, nil))
	for j := range lat {
		plainData = append(plainData, fullData[j*nlon:(j+1)*nlon-1]...)
	}
	return full, fullData, plain, plainData
}

func TestRealSSTAgainstCDO(t *testing.T) {
	t.Parallel()
	needCDO(t)
	full, fullData, plain, plainData := realSST(t)
	dir := t.TempDir()
	in := filepath.Join(dir, "sst.nc")
	writeNCTitled(t, in, "January SST from libncarg-data sst30e_netcdf.nc without its wrap column", plain, false, ncField{"sst", plainData})
	for _, c := range []struct {
		op, target string
		opt        regrid.Options
	}{
		{"remapcon", "n32", regrid.Options{}},
		{"remapcon", "r144x72", regrid.Options{}},
		{"remapbil", "n32", regrid.Options{Method: regrid.Bilinear}},
	} {
		t.Run(c.op+"_"+c.target, func(t *testing.T) {
			out := filepath.Join(dir, c.op+c.target+".nc")
			cdo(t, nil, c.op+","+c.target, in, out)
			dst, ref := cdoResult(t, out, "sst")
			got := remapOurs(t, full, dst, c.opt, fullData)
			if c.opt.Method == regrid.Bilinear {
				onLine(t, full, dst, c.opt, fullData, got, ref)
			}
			compare(t, "real SST "+c.op+" "+c.target, got, ref, cdoTol)
		})
	}
}

// TestRealMaskAgainstCDO remaps the real 1° ocean mask to the SST's 2° grid,
// thresholds it at 0.5 and applies it to the SST.
func TestRealMaskAgainstCDO(t *testing.T) {
	t.Parallel()
	needCDO(t)
	_, _, sstGrid, sst := realSST(t)
	path := testutil.RealData(t, "cdf/landsea.nc")
	v := readNC(t, path, "lat", "lon", "LSMASK")
	g1 := must(t)(grid.New(v["lat"], v["lon"], nil, nil))
	ocean := make([]bool, g1.Size())
	for k, x := range v["LSMASK"] {
		ocean[k] = x == 0
	}
	dir := t.TempDir()
	target := gridDescFile(t, dir, "sst2deg.txt", sstGrid)
	fracFile := filepath.Join(dir, "frac.nc")
	cdo(t, nil, "-remapcon,"+target, "-eqc,0", "-selname,LSMASK", path, fracFile)
	dst, refFrac := cdoResult(t, fracFile, "LSMASK")
	if d := grid.Difference(dst, sstGrid, 1e-9); d != "" {
		t.Fatalf("CDO's target grid: %s", d)
	}
	w, err := regrid.NewWeights(g1, dst, regrid.Options{})
	if err != nil {
		t.Fatal(err)
	}
	frac := make([]float64, dst.Size())
	if err := regrid.MaskFraction(w, frac, ocean); err != nil {
		t.Fatal(err)
	}
	compare(t, "real ocean fraction", frac, refFrac, 1e-12)

	keep := make([]bool, dst.Size())
	if err := regrid.RemapMask(w, keep, ocean, regrid.DefaultMaskThreshold); err != nil {
		t.Fatal(err)
	}
	threshFile := filepath.Join(dir, "thresh.nc")
	cdo(t, nil, "-gec,0.5", "-remapcon,"+target, "-eqc,0", "-selname,LSMASK", path, threshFile)
	_, refKeep := cdoResult(t, threshFile, "LSMASK")
	ties, nOcean := 0, 0
	for k := range keep {
		if math.Abs(frac[k]-0.5) < 1e-9 {
			ties++
			continue
		}
		if keep[k] != (refKeep[k] == 1) {
			t.Errorf("cell %d (ocean fraction %.6g): ours %v, CDO %v", k, frac[k], keep[k], refKeep[k])
		}
		if keep[k] {
			nOcean++
		}
	}
	t.Logf("%d of %d 2° cells are ocean by the 0.5 rule (%d exact ties skipped)", nOcean, len(keep), ties)

	// Apply to the SST and compare with CDO doing the same from one file
	// holding the SST and CDO's fraction.
	both := filepath.Join(dir, "sst_and_frac.nc")
	writeNCTitled(t, both, "January SST (libncarg-data) and its ocean fraction from CDO", dst, false, ncField{"sst", sst}, ncField{"m", refFrac})
	applied := filepath.Join(dir, "applied.nc")
	cdo(t, nil, "expr,g=(m>=0.5)?sst:missval(sst)", both, applied)
	_, ref := cdoResult(t, applied, "g")
	f32 := make([]float32, len(sst))
	for k, x := range sst {
		f32[k] = float32(x)
	}
	if err := regrid.MaskOut(f32, keep); err != nil {
		t.Fatal(err)
	}
	got := make([]float64, len(f32))
	for k, x := range f32 {
		got[k] = float64(x)
		if math.Abs(frac[k]-0.5) < 1e-9 {
			got[k], ref[k] = 0, 0
		}
	}
	compare(t, "masked real SST", got, ref, 1e-6)
}
