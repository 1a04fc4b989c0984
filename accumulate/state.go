package accumulate

import (
	"bufio"
	"bytes"
	"encoding/binary"
	"encoding/gob"
	"errors"
	"fmt"
	"io"
	"math"

	"lidscope/regimes"
)

// stateFormat tags the encoding of an accumulator; bump it when Acc changes.
// 2: per-column statistics by slot of the kept (ocean, in-domain) columns,
// as shifted sums (Sum) with int32 counts. 3: the per-column arrays as
// fixed-width little-endian records after the gob of the rest, so that
// encoding needs no more memory than the encoded state.
const stateFormat = "lidscope-accumulator/3"

// ErrFormat is the error (errors.Is) of Decode for a state written by
// another version of the accumulator: a run folder of an earlier lidscope,
// to be run again.
var ErrFormat = errors.New("written by another lidscope version")

// state is the gob part of the encoding: everything but the per-column
// arrays, which follow it (Encode).
type state struct {
	Format  string
	L       Layout
	Steps   int
	Series  []SeriesPoint
	Regions []RegionStats
}

// Record sizes of the per-column arrays.
const (
	sumBytes    = 4 + 4 + 8 + 8
	trackRecord = 4 + 1 + 1 + 4*7 + 8*2 + 1 // the fields of regimes.Track
)

// Encode writes the complete accumulator state, so a run can be merged
// with others later (Decode, Merge): the format tag and a newline, the
// length (8 bytes, little-endian) and gob of the layout, series and
// regions, then per kept column, array
// by array, the valid and regime counts, the relative-SST sums, the sums
// of every quantity and regime, and the crossing tracks as fixed-width
// little-endian records.
func (a *Acc) Encode(w io.Writer) error {
	_, write, err := a.Encoder()
	if err != nil {
		return err
	}
	return write(w)
}

// Encoder prepares Encode: it returns the exact size of the encoding and
// the function that writes it, so that a caller can frame the state
// without holding it in memory.
func (a *Acc) Encoder() (size int64, write func(io.Writer) error, err error) {
	var head bytes.Buffer
	if err := gob.NewEncoder(&head).Encode(state{Format: stateFormat, L: a.L, Steps: a.Cells.Steps, Series: a.Series, Regions: a.Regions}); err != nil {
		return 0, nil, err
	}
	m := int64(a.Index.Len())
	nsums := int64(0)
	for q := range a.Cells.Values {
		for r := 0; r < nreg; r++ {
			nsums += int64(len(a.Cells.Values[q][r]))
		}
	}
	size = int64(len(stateFormat)+1+8+head.Len()) + m*(4+nreg*4+sumBytes+trackRecord) + nsums*sumBytes
	return size, func(w io.Writer) error { return a.encode(w, head.Bytes()) }, nil
}

// encode writes the encoding with the gob part head.
func (a *Acc) encode(w io.Writer, head []byte) error {
	bw := bufio.NewWriterSize(w, 1<<16)
	bw.WriteString(stateFormat + "\n")
	var n [8]byte
	binary.LittleEndian.PutUint64(n[:], uint64(len(head)))
	bw.Write(n[:])
	bw.Write(head)
	c := &a.Cells
	buf := make([]byte, 0, 64)
	le := binary.LittleEndian
	ints := func(x []int32) {
		for _, v := range x {
			buf = le.AppendUint32(buf[:0], uint32(v))
			bw.Write(buf)
		}
	}
	sums := func(x []Sum) {
		for _, s := range x {
			buf = le.AppendUint32(buf[:0], math.Float32bits(s.Shift))
			buf = le.AppendUint32(buf, uint32(s.N))
			buf = le.AppendUint64(buf, math.Float64bits(s.S1))
			buf = le.AppendUint64(buf, math.Float64bits(s.S2))
			bw.Write(buf)
		}
	}
	ints(c.Valid)
	for r := 0; r < nreg; r++ {
		ints(c.Count[r])
	}
	sums(c.Rel)
	for q := range c.Values {
		for r := 0; r < nreg; r++ {
			sums(c.Values[q][r]) // none for a regime not kept
		}
	}
	b32 := func(v bool) byte {
		if v {
			return 1
		}
		return 0
	}
	for _, t := range c.Tracks {
		buf = le.AppendUint32(buf[:0], uint32(t.Steps))
		buf = append(buf, byte(t.First), byte(t.Last))
		for _, v := range []int32{t.FirstAt, t.LastAt, t.RunStart, t.Crossings, t.ConvRuns, t.SubsRuns, t.FirstRunEnd} {
			buf = le.AppendUint32(buf, uint32(v))
		}
		buf = le.AppendUint64(buf, uint64(t.ConvRunSteps))
		buf = le.AppendUint64(buf, uint64(t.SubsRunSteps))
		buf = append(buf, b32(t.FirstRunDone))
		bw.Write(buf)
	}
	return bw.Flush()
}

// Decode reads an accumulator written by Encode.
func Decode(r io.Reader) (*Acc, error) {
	br := bufio.NewReaderSize(r, 1<<16)
	tag, _ := br.Peek(len(stateFormat) + 1)
	if string(tag) != stateFormat+"\n" {
		return nil, fmt.Errorf("the accumulator state does not start with %q (%w; per-column statistics are kept for ocean columns only, as shifted sums, since lidscope-accumulator/2): run the analysis again with this version to merge or compare it", stateFormat, ErrFormat)
	}
	br.Discard(len(tag))
	var n [8]byte
	if _, err := io.ReadFull(br, n[:]); err != nil {
		return nil, fmt.Errorf("reading accumulator state: %w", err)
	}
	hl := binary.LittleEndian.Uint64(n[:])
	if hl > 1<<34 {
		return nil, fmt.Errorf("reading accumulator state: a header of %d bytes; the file is damaged", hl)
	}
	head := make([]byte, hl)
	if _, err := io.ReadFull(br, head); err != nil {
		return nil, fmt.Errorf("reading accumulator state: %w", err)
	}
	var s state
	if err := gob.NewDecoder(bytes.NewReader(head)).Decode(&s); err != nil {
		return nil, fmt.Errorf("reading accumulator state: %w", err)
	}
	if s.Format != stateFormat {
		return nil, fmt.Errorf("accumulator state format %q after the tag %q; the file is damaged", s.Format, stateFormat)
	}
	a, err := New(s.L) // rebuilds the region membership and the index
	if err != nil {
		return nil, err
	}
	if len(s.Regions) != len(s.L.Regions) || len(s.Series) != s.Steps {
		return nil, fmt.Errorf("accumulator state is inconsistent (%d regions for %d, %d series points for %d steps); the file is damaged", len(s.Regions), len(s.L.Regions), len(s.Series), s.Steps)
	}
	a.Cells.Steps, a.Series, a.Regions = s.Steps, s.Series, s.Regions
	m := a.Index.Len()
	c := &a.Cells
	rec := make([]byte, trackRecord)
	le := binary.LittleEndian
	var rerr error
	read := func(k int) []byte {
		if rerr == nil {
			_, rerr = io.ReadFull(br, rec[:k])
		}
		return rec[:k]
	}
	ints := func(x []int32) {
		for i := range x {
			x[i] = int32(le.Uint32(read(4)))
		}
	}
	sums := func(x []Sum) {
		for i := range x {
			b := read(sumBytes)
			x[i] = Sum{Shift: math.Float32frombits(le.Uint32(b)), N: int32(le.Uint32(b[4:])),
				S1: math.Float64frombits(le.Uint64(b[8:])), S2: math.Float64frombits(le.Uint64(b[16:]))}
		}
	}
	ints(c.Valid)
	for r := 0; r < nreg; r++ {
		ints(c.Count[r])
	}
	sums(c.Rel)
	for q := range c.Values {
		for r := 0; r < nreg; r++ {
			sums(c.Values[q][r])
		}
	}
	for i := 0; i < m; i++ {
		b := read(trackRecord)
		u := func(k int) int32 { return int32(le.Uint32(b[k:])) }
		c.Tracks[i] = regimes.Track{Steps: u(0), First: regimes.Regime(int8(b[4])), Last: regimes.Regime(int8(b[5])),
			FirstAt: u(6), LastAt: u(10), RunStart: u(14), Crossings: u(18), ConvRuns: u(22), SubsRuns: u(26), FirstRunEnd: u(30),
			ConvRunSteps: int64(le.Uint64(b[34:])), SubsRunSteps: int64(le.Uint64(b[42:])), FirstRunDone: b[50] == 1}
	}
	if rerr != nil {
		return nil, fmt.Errorf("accumulator state is inconsistent (%d columns kept of a %d×%d grid, fewer stored: %v); the file is damaged", m, s.L.NLat, s.L.NLon, rerr)
	}
	if _, err := br.ReadByte(); err != io.EOF {
		return nil, fmt.Errorf("accumulator state is inconsistent (more than the %d columns kept of a %d×%d grid stored); the file is damaged", m, s.L.NLat, s.L.NLon)
	}
	return a, nil
}
