package pipeline

import (
	"fmt"
	"math"
	"strings"

	"lidscope/cf"
	"lidscope/regimes"
)

// Stage 2, masks: the static ocean mask (from SST's presence, a land or
// sea fraction, or a categorical mask) and, per time step, the columns
// that are ocean now (SST present, sea ice below the limit).

// OceanKind says how the ocean mask is made.
type OceanKind string

// The ocean mask kinds.
const (
	OceanWhereSST    OceanKind = "sst"         // ocean wherever SST is present
	OceanFraction    OceanKind = "fraction"    // a land or sea area fraction field
	OceanCategorical OceanKind = "categorical" // a mask whose listed values mean ocean
)

// staticOcean returns the ocean mask on the analysis grid: true everywhere,
// or where the mask field says ocean.
func staticOcean(in *inputs, p *Plan) ([]bool, error) {
	ocean := make([]bool, in.grid.Size())
	for i := range ocean {
		ocean[i] = true
	}
	if in.mask != nil {
		if err := readMask(in.mask, p.Ocean, p.Grid, ocean); err != nil {
			return nil, err
		}
	}
	return ocean, nil
}

// analysedColumns are the grid cells that keep per-column statistics: the
// cells of the static ocean mask (no other cell is ever in a regime) whose
// centres lie inside the plan's analysis domain, in grid order.
func analysedColumns(p *Plan, in *inputs, ocean []bool) []int32 {
	g := in.grid
	nlon := g.NLon()
	cols := []int32{}
	for i, o := range ocean {
		if o && (p.Domain == nil || p.Domain.Contains(g.Lat[i/nlon], g.Lon[i%nlon])) {
			cols = append(cols, int32(i))
		}
	}
	return cols
}

// stepOcean marks the columns that are ocean at this step: ocean in the
// static mask, SST present, and sea ice (when given) at most maxIce.
func stepOcean(dst, ocean []bool, sst, seaIce []float32, maxIce float64) {
	for i := range dst {
		dst[i] = ocean[i] && sst[i] == sst[i]
	}
	for i, x := range seaIce {
		if x == x && float64(x) > maxIce {
			dst[i] = false
		}
	}
}

// noBandSST explains a time step without any valid ocean SST in the band.
func noBandSST(sst *field, vals []float32, bandW []float64, ocean []bool, st stepRef, band regimes.Band) error {
	where := fmt.Sprintf("variable %s in %s, time step %s", sst.f.Var, sst.f.PathAt(st.idx[sst.slot]), st.label)
	present := 0
	for i, x := range vals {
		if x == x && bandW[i] > 0 {
			present++
		}
	}
	if present == 0 {
		return fmt.Errorf("role sst, %s: every SST value in the band %g…%g°N is missing (an all-missing slab); fix or replace the file, or leave that step out with the study's time range (time.start, time.end)", where, band.South, band.North)
	}
	oc := 0
	for i := range ocean {
		if ocean[i] && bandW[i] > 0 {
			oc++
		}
	}
	return fmt.Errorf("role sst, %s: no SST value in the band %g…%g°N is over ocean (%d SST values present, %d ocean cells in the band per the ocean mask, none both, or all excluded as sea ice); check the ocean mask (ocean.mask, ocean.min_fraction) and the sea-ice limit", where, band.South, band.North, present, oc)
}

// readMask fills ocean from the mask field.
func readMask(f *field, o Ocean, gp GridPlan, ocean []bool) error {
	if f.f.NT() != 1 {
		return fmt.Errorf("the ocean mask (%s) has %d time steps; give a file with one", strings.Join(f.f.Paths(), ", "), f.f.NT())
	}
	if err := f.f.ReadSlab(0, f.buf, &f.s); err != nil {
		return err
	}
	// ocean fraction on the native grid
	frac := make([]float64, len(f.buf))
	isLand := f.role == cf.RoleLandFraction
	minFrac := o.MinFraction
	if minFrac == 0 {
		minFrac = 0.5
	}
	for i, x := range f.buf {
		switch {
		case x != x:
			frac[i] = math.NaN()
		case o.Kind == OceanCategorical:
			frac[i] = 0
			for _, v := range o.OceanValues {
				if float64(x) == v {
					frac[i] = 1
				}
			}
		case isLand:
			frac[i] = 1 - float64(x)
		default:
			frac[i] = float64(x)
		}
	}
	if f.w == nil {
		for i, x := range frac {
			ocean[i] = x == x && x >= minFrac-1e-9
		}
		return nil
	}
	// Remap the ocean fraction conservatively, then threshold (masks are
	// remapped as fractions).
	dst := make([]float64, len(ocean))
	if err := f.w.Apply64(dst, frac); err != nil {
		return fmt.Errorf("regridding the ocean mask: %w", err)
	}
	th := gp.MaskThreshold
	if th == 0 {
		th = minFrac
	}
	for i, x := range dst {
		ocean[i] = x == x && x >= th-1e-9
	}
	return nil
}
