package accumulate

import (
	"encoding/gob"
	"errors"
	"fmt"
	"io"
)

// stateFormat tags the encoding of an accumulator; bump it when Acc changes.
// 2: per-column statistics by slot of the kept (ocean, in-domain) columns,
// as shifted sums (Sums) with int32 counts.
const stateFormat = "lidscope-accumulator/2"

// ErrFormat is the error (errors.Is) of Decode for a state written by
// another version of the accumulator: a run folder of an earlier lidscope,
// to be run again.
var ErrFormat = errors.New("written by another lidscope version")

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
		return nil, fmt.Errorf("accumulator state format %q, this lidscope reads %q (%w: per-column statistics are kept for ocean columns only, as shifted sums, since %s): run the analysis again with this version to merge or compare it", s.Format, stateFormat, ErrFormat, stateFormat)
	}
	a, err := New(s.L) // rebuilds the region membership
	if err != nil {
		return nil, err
	}
	m := a.Index.Len()
	c := &s.Cells
	ok := len(c.Valid) == m && len(c.Tracks) == m && len(c.Rel) == m && len(c.Values) == len(s.L.Quantities) && len(s.Regions) == len(s.L.Regions)
	for r := 0; r < nreg; r++ {
		ok = ok && len(c.Count[r]) == m
		for _, v := range c.Values {
			ok = ok && len(v[r]) == m
		}
	}
	if !ok {
		return nil, fmt.Errorf("accumulator state is inconsistent (%d columns kept of a %d×%d grid, %d stored); the file is damaged", m, s.L.NLat, s.L.NLon, len(c.Valid))
	}
	a.Cells, a.Series, a.Regions = s.Cells, s.Series, s.Regions
	return a, nil
}
