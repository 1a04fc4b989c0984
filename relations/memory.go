package relations

import (
	"unsafe"

	"lidscope/accumulate"
)

// MemoryBytes estimates the relationship accumulator's memory, bytes, for
// a run with the given quantities (cloud: the analysis cloud) on a grid of
// cells cells, bandCells of them in the tropical band, over steps time
// steps: per grid cell (domain membership, patch masks), per step (the
// co-moments and threshold counts kept per step, which the standard errors
// and the bootstrap need), and the binned statistics. In anomaly mode the
// first-pass climatology is added (12 months of a trend statistic per
// quantity for every band and region cell; regions are counted as band
// cells here).
func MemoryBytes(cfg Config, quantities []string, cloud string, cells, bandCells, steps int) (int64, error) {
	// The sizes that depend on the configuration, from an accumulator on a
	// one-cell layout (regions and patches need cells, so they are counted
	// apart).
	nd := 1 + len(cfg.Regions)
	np := len(cfg.Patches)
	small := cfg
	small.Regions, small.Patches = nil, nil
	l := accumulate.Layout{NLat: 1, NLon: 1, Lat: []float64{0}, Lon: []float64{0}, Area: []float64{1}, BandWeight: []float64{1},
		Quantities: quantities, Cloud: cloud}
	a, err := New(small, l, nil)
	if err != nil && cfg.Mode == Anomaly {
		a, err = build(small, l, nil, true)
	}
	if err != nil {
		return 0, err
	}
	nr := len(a.resp)
	cm := int64(unsafe.Sizeof(CoMoments{})) + int64(a.K+a.K*a.K)*8
	perStep := int64(nd*nreg*nr)*cm + int64(unsafe.Sizeof(stepRec{})) + int64(2*a.nthr)*8
	perCell := int64(24 + 8 + np) // cellDom header, cells list, patch masks
	perBand := int64(16 + 8)      // one domain entry, the band cell list
	// the running moments and, beside each, its step's sums (AddStep)
	nm := int64(len(a.binned) + len(a.jointM) + len(a.omegaM))
	binned := int64(len(a.binned))*int64(unsafe.Sizeof(binStat{})) + int64(len(a.jointM)+len(a.omegaM))*32 + nm*int64(unsafe.Sizeof(stepSums{})+4)
	total := perCell*int64(cells) + perBand*int64(bandCells) + perStep*int64(steps) + binned*int64(nd)
	if cfg.Mode == Anomaly {
		total += int64(cells)*(4+1) + int64(bandCells)*12*int64(len(quantities)+1)*int64(unsafe.Sizeof(trendStat{}))
	}
	return total, nil
}
