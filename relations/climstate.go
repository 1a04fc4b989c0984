package relations

import (
	"encoding/gob"
	"fmt"
	"io"

	"lidscope/accumulate"
)

// climFormat tags an encoded Climatology.
const climFormat = "lidscope-climatology/1"

type climState struct {
	Format      string
	Layout      accumulate.Layout
	NV          int
	Slot        []int32
	Cover       []bool
	St          [][]trendStat
	Steps       int
	First, Last string
}

// Encode writes the climatology's complete sufficient statistics (gob),
// so that the climatologies of the pieces of a record can be merged
// (Merge) into the climatology of the whole record and handed to every
// piece's anomaly pass (stage 1 and stage 2 of anomaly mode in pieces).
func (c *Climatology) Encode(w io.Writer) error {
	return gob.NewEncoder(w).Encode(climState{Format: climFormat, Layout: c.l, NV: c.nv, Slot: c.slot, Cover: c.cover, St: c.st, Steps: c.steps, First: c.first, Last: c.last})
}

// DecodeClimatology reads a climatology written by Encode.
func DecodeClimatology(r io.Reader) (*Climatology, error) {
	var s climState
	if err := gob.NewDecoder(r).Decode(&s); err != nil {
		return nil, fmt.Errorf("relations: decoding a climatology: %w", err)
	}
	if s.Format != climFormat {
		return nil, fmt.Errorf("relations: a climatology of format %q, not %s", s.Format, climFormat)
	}
	n := s.Layout.NLat * s.Layout.NLon
	if len(s.Slot) != n || len(s.Cover) != n || s.NV != len(s.Layout.Quantities)+1 {
		return nil, fmt.Errorf("relations: a damaged climatology (%d slots and %d covered cells for %d cells, %d variables for %d quantities)", len(s.Slot), len(s.Cover), n, s.NV, len(s.Layout.Quantities))
	}
	for _, k := range s.Slot {
		if k >= int32(len(s.St)) {
			return nil, fmt.Errorf("relations: a damaged climatology (cell slot %d of %d)", k, len(s.St))
		}
	}
	for _, st := range s.St {
		if len(st) != 12*s.NV {
			return nil, fmt.Errorf("relations: a damaged climatology (%d statistics for a cell, want %d)", len(st), 12*s.NV)
		}
	}
	return &Climatology{l: s.Layout, nv: s.NV, slot: s.Slot, cover: s.Cover, st: s.St, steps: s.Steps, first: s.First, last: s.Last}, nil
}
