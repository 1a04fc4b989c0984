package pipeline

import (
	"context"
	"fmt"
	"strconv"
	"strings"

	"lidscope/cf"
)

// Piece names the K-th (1…N) of N contiguous pieces of a record. The zero
// Piece (and 1/1) is the whole record.
type Piece struct{ K, N int }

// Whole reports whether p is the whole record.
func (p Piece) Whole() bool { return p.N <= 1 }

func (p Piece) String() string {
	if p.Whole() {
		return "1/1"
	}
	return fmt.Sprintf("%d/%d", p.K, p.N)
}

// Validate checks 1 ≤ K ≤ N.
func (p Piece) Validate() error {
	if p.N == 0 && p.K == 0 {
		return nil
	}
	if p.N < 1 || p.K < 1 || p.K > p.N {
		return fmt.Errorf("piece %d/%d: give K/N with 1 ≤ K ≤ N", p.K, p.N)
	}
	return nil
}

// ParsePiece reads "K/N". "/N" (K left out) gives K = 0, for the caller to
// take from the environment.
func ParsePiece(s string) (Piece, error) {
	ks, ns, ok := strings.Cut(strings.TrimSpace(s), "/")
	if !ok {
		return Piece{}, fmt.Errorf("piece %q: give K/N (the K-th of N pieces, e.g. 2/4) or /N", s)
	}
	n, err := strconv.Atoi(ns)
	if err != nil || n < 1 {
		return Piece{}, fmt.Errorf("piece %q: N must be a whole number ≥ 1", s)
	}
	if ks == "" {
		return Piece{N: n}, nil
	}
	k, err := strconv.Atoi(ks)
	if err != nil || k < 1 || k > n {
		return Piece{}, fmt.Errorf("piece %q: K must be a whole number from 1 to %d", s, n)
	}
	return Piece{K: k, N: n}, nil
}

// Bounds returns the half-open range [lo, hi) of the steps of a record of
// n steps that piece p holds: the pieces are contiguous, in time order, and
// their lengths differ by at most one step (balanced by step count).
func (p Piece) Bounds(n int) (lo, hi int) {
	if p.Whole() {
		return 0, n
	}
	return (p.K - 1) * n / p.N, p.K * n / p.N
}

// Record describes the selected record of a plan without running it.
type Record struct {
	Steps       int  // time steps common to every input after the selection
	Climatology bool // SST is a 12-month climatology (its record cannot be split)
}

// Survey opens the plan's inputs and aligns their time steps (as Run does,
// before any computation) and says how long the selected record is. The
// plan's Piece is ignored.
func Survey(ctx context.Context, p Plan) (Record, error) {
	p.Piece = Piece{}
	in, err := openInputs(&p)
	if err != nil {
		return Record{}, err
	}
	defer in.close()
	return Record{Steps: len(in.steps), Climatology: in.axis.f.Time.Step == cf.StepClimatology}, ctx.Err()
}

// pieceOf keeps the steps of the plan's piece.
func pieceOf(in *inputs, p *Plan) error {
	if p.Piece.Whole() {
		return nil
	}
	if err := p.Piece.Validate(); err != nil {
		return err
	}
	if in.axis.f.Time.Step == cf.StepClimatology {
		return fmt.Errorf("piece %s: the record is a 12-month climatology, whose seasonal cycle is one piece; run it without --piece", p.Piece)
	}
	n := len(in.steps)
	if p.Piece.N > n {
		return fmt.Errorf("piece %s: the selected record has %d time steps, fewer than %d pieces; use at most %d pieces", p.Piece, n, p.Piece.N, n)
	}
	lo, hi := p.Piece.Bounds(n)
	in.steps = in.steps[lo:hi]
	return nil
}
