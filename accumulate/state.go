package accumulate

import (
	"encoding/gob"
	"fmt"
	"io"
)

// stateFormat tags the encoding of an accumulator; bump it when Acc changes.
const stateFormat = "lidscope-accumulator/1"

type state struct {
	Format  string
	L       Layout
	Cells   Cells
	Series  []SeriesPoint
	Regions []RegionStats
}

// Encode writes the complete accumulator state (Go's encoding/gob), so a
// run can be merged with others later (Decode, Merge).
func (a *Acc) Encode(w io.Writer) error {
	return gob.NewEncoder(w).Encode(state{Format: stateFormat, L: a.L, Cells: a.Cells, Series: a.Series, Regions: a.Regions})
}

// Decode reads an accumulator written by Encode.
func Decode(r io.Reader) (*Acc, error) {
	var s state
	if err := gob.NewDecoder(r).Decode(&s); err != nil {
		return nil, fmt.Errorf("reading accumulator state: %w", err)
	}
	if s.Format != stateFormat {
		return nil, fmt.Errorf("accumulator state format %q, this lidscope reads %q: re-run the analysis with this version", s.Format, stateFormat)
	}
	a, err := New(s.L) // rebuilds the region membership
	if err != nil {
		return nil, err
	}
	n := s.L.NLat * s.L.NLon
	if len(s.Cells.Valid) != n || len(s.Cells.Tracks) != n || len(s.Cells.Values) != len(s.L.Quantities) || len(s.Regions) != len(s.L.Regions) {
		return nil, fmt.Errorf("accumulator state is inconsistent (%d cells for a %d×%d grid); the file is damaged", len(s.Cells.Valid), s.L.NLat, s.L.NLon)
	}
	a.Cells, a.Series, a.Regions = s.Cells, s.Series, s.Regions
	return a, nil
}
