package pipeline

import (
	"lidscope/accumulate"
)

// Shape is what the size of a run depends on, found by opening the inputs
// (headers and coordinates only) as a run would.
type Shape struct {
	NLat, NLon int
	Cells      int // analysis grid cells
	// Columns are the analysed columns, which keep per-column statistics:
	// the ocean cells of the static mask inside the analysis domain.
	Columns int
	// Regimes is the number of regimes whose per-column sums are kept: 2
	// without a transition band, else 3.
	Regimes   int
	BandCells int // cells with area inside the tropical band
	Steps     int // time steps the run would take
	Fields    int // fields read at every step
	// NativeCells is the sum over those fields of their own grid's size
	// (the read buffers before regridding).
	NativeCells int
	Quantities  []string
}

// ShapeOf opens the plan's inputs, as Run does before its first step,
// and says how large the run is; it reads no time step, only the static
// ocean mask (a mask or fraction field) when the plan has one.
func ShapeOf(p Plan) (Shape, error) {
	in, err := openInputs(&p)
	if err != nil {
		return Shape{}, err
	}
	defer in.close()
	g := in.grid
	s := Shape{NLat: g.NLat(), NLon: g.NLon(), Cells: g.Size(), Steps: len(in.steps), Fields: len(in.timed), Quantities: p.Quantities()}
	ocean, err := staticOcean(in, &p)
	if err != nil {
		return Shape{}, err
	}
	s.Columns = len(analysedColumns(&p, in, ocean))
	s.Regimes = 3
	if p.Regimes.HalfWidth == 0 {
		s.Regimes = 2
	}
	lb := make([][2]float64, g.NLat())
	copy(lb, g.LatBounds)
	for _, w := range p.Regimes.Band.Weights(lb, g.CellAreas()) {
		if w > 0 {
			s.BandCells++
		}
	}
	for _, f := range in.timed {
		s.NativeCells += f.f.Len()
	}
	return s, nil
}

// StateBytesPerCell is the run's own memory: acc per analysed column (an
// ocean column of the static mask, package accumulate: valid and regime
// counts, relative-SST sums, nq × 3 regimes of sums, the crossing track,
// accumulate.BytesPerColumn) and buffers per grid cell, the pipeline's
// step buffers for fields inputs (three reader buffers, two sets of step
// outputs, masks, weights and the column index).
//
// nr is the number of regimes whose sums are kept: 3, or 2 without a
// transition band (Shape.Regimes).
func StateBytesPerCell(nq, nr, fields int) (acc, buffers int) {
	acc = accumulate.BytesPerColumn(nq, nr)
	buffers = nbufs*fields*4 + 2*(4+1+4+4+4) + 1 + 1 + 8 + 8 + 4 + 4
	return acc, buffers
}
