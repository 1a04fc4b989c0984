package analysis

import (
	"fmt"

	"lidscope/config"
	"lidscope/factors"
	"lidscope/pipeline"
	"lidscope/relations"
)

// MemoryEstimate is the memory a run of one dataset is expected to need,
// from the sizes of its inputs (no data is read). The parts:
//
//   - state: the regime accumulator's per-column statistics, per analysed
//     column (the ocean cells of the static mask);
//   - buffers: the pipeline's step buffers and the read buffers;
//   - per step: what the relationship analysis keeps of each time step (its
//     only part that grows with the record);
//   - factors: with a factors section, the per-cell fold co-moments and
//     lag sums of the mapped cells (factors.BytesPerCell, for the blocks
//     of cell_fold_years the record spans) and the per-step domain means;
//   - end of run: what writing adds to the accumulators: one output map
//     at a time (a regime map in float64 and its float32 or int32 copy
//     for netCDF) within the soft memory limit WriteRun sets (an eighth
//     above what is in use, plus 32 MB; counted as an eighth of the
//     state); the run state is written as it is encoded;
//   - fixed: netCDF-C and HDF5 (chunk caches) and the Go runtime, about
//     45 MB as measured by bench/readonly.
//
// The stream's buffers are returned before the results are written, so
// the peak is the fixed part, the state, the relationship analysis, the
// factors and the larger of the buffers and the end of run. Go's collector and
// the C allocator keep some garbage and free pages on top (at 0.25°
// about 140 MB of the stream's measured 565 MB), which the figure
// leaves out.
type MemoryEstimate struct {
	Dataset      string
	Shape        pipeline.Shape
	StatePerCell int64 // bytes per analysed (ocean) column
	State        int64
	Buffers      int64
	Relations    int64 // per-step and binned relationship state (0 when off)
	// FactorsPerCell is the factor state of one mapped cell (0 without a
	// factors section or maps); Factors the whole factor state.
	FactorsPerCell int64
	Factors        int64
	EndOfRun       int64
	Fixed          int64
	Total          int64
}

// fixedBytes is netCDF-C, HDF5 and the Go runtime (bench/readonly's peak RSS).
const fixedBytes = 45 << 20

// EstimateMemory estimates the memory of a run of dataset d of r.
func EstimateMemory(r *config.Study, d *config.Dataset) (MemoryEstimate, error) {
	plan, err := pipeline.PlanFor(r, d)
	if err != nil {
		return MemoryEstimate{}, err
	}
	sh, err := pipeline.ShapeOf(plan)
	if err != nil {
		return MemoryEstimate{}, err
	}
	nq := len(sh.Quantities)
	acc, buf := pipeline.StateBytesPerCell(nq, sh.Regimes, sh.Fields)
	m := MemoryEstimate{Dataset: d.Name, Shape: sh, Fixed: fixedBytes}
	m.StatePerCell = int64(acc)
	m.Buffers = int64(buf)*int64(sh.Cells) + 4*int64(sh.NativeCells)
	if NoRelations(plan) == "" && !r.RelationsOff {
		cloud := ""
		if plan.Cloud != nil {
			cloud = string(plan.Cloud.Spec.Role)
		}
		rb, err := relations.MemoryBytes(r.RelationsFor(d), sh.Quantities, cloud, sh.Cells, sh.BandCells, sh.Steps)
		if err != nil {
			return MemoryEstimate{}, fmt.Errorf("relationship analysis: %w", err)
		}
		m.Relations = rb
	}
	m.State = m.StatePerCell * int64(sh.Columns)
	if r.Factors.On {
		m.FactorsPerCell, m.Factors = factorsBytes(r, sh)
	}
	// one regime map (three regimes) in float64 and its conversion
	// buffer, within the write limit's headroom
	m.EndOfRun = int64(sh.Cells)*3*(8+4) + m.State/8 + 32<<20
	m.Total = m.Fixed + m.State + m.Relations + m.Factors + max(m.Buffers, m.EndOfRun)
	return m, nil
}

// factorsBytes is the factor accumulator's size: per mapped cell (an ocean
// column of the band) the co-moments of each block of cell_fold_years the
// record touches (one more for a record not aligned on the blocks) and the
// lag sums (factors.BytesPerCell), and per step and domain × regime slot
// the weight and the means of the factors and the response (1 + 2K
// numbers).
func factorsBytes(r *config.Study, sh pipeline.Shape) (perCell, total int64) {
	p := len(r.Factors.Use)
	k := int64(p + 1)
	years := (sh.Steps + 11) / 12
	blocks := (years+r.Factors.CellFoldYears-1)/r.Factors.CellFoldYears + 1
	if r.Factors.Maps {
		perCell = int64(factors.BytesPerCell(p, blocks))
	}
	domains := int64(1 + len(r.Analysis.Regions))
	perStep := domains * 3 * (1 + 2*k) * 8
	return perCell, perCell*int64(min(sh.BandCells, sh.Columns)) + perStep*int64(sh.Steps)
}

// String describes the estimate in one line.
func (m MemoryEstimate) String() string {
	mb := func(b int64) string { return fmt.Sprintf("%.0f MB", float64(b)/(1<<20)) }
	fac := ""
	if m.Factors > 0 {
		fac = fmt.Sprintf(", factor regressions %s (%d B per mapped cell)", mb(m.Factors), m.FactorsPerCell)
	}
	return fmt.Sprintf("dataset %s: about %s peak for %d×%d cells and %d time steps (state %d B per analysed column × %d ocean columns = %s, step buffers %s, relationship analysis %s%s, end-of-run writing %s, netCDF and runtime %s)",
		m.Dataset, mb(m.Total), m.Shape.NLat, m.Shape.NLon, m.Shape.Steps, m.StatePerCell, m.Shape.Columns, mb(m.State), mb(m.Buffers), mb(m.Relations), fac, mb(m.EndOfRun), mb(m.Fixed))
}
