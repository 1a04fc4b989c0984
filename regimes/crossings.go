package regimes

// Threshold crossings and dwell times, column by column.
//
// A crossing is a change between convective and subsidence. Transition
// steps are passed through without ending a run: a column going
// convective → transition → subsidence has crossed once, and one going
// convective → transition → convective has not crossed at all (hysteresis,
// so that noise around δ inside the band is not counted). Missing steps
// (land, sea ice, no data) are skipped the same way.
//
// A run is a maximal sequence of valid steps in one definite regime
// (convective or subsidence), counting the transition and missing steps it
// spans only as far as they lie between steps of the same regime: the
// dwell time of a run is the number of time steps from its first to its
// last step in the regime, inclusive. Mean dwell time = total run length /
// number of runs, runs cut off by the ends of the record included (so the
// mean dwell time of a column that never crosses is its whole span, a lower
// bound).
//
// Tracks are mergeable in time order: a record split into consecutive
// pieces and merged gives exactly the same counts as one pass over it.

// Track is the crossing state of one column.
type Track struct {
	Steps       int32  // time steps seen (valid or not)
	First, Last Regime // first and last definite regime (Missing if none yet)
	FirstAt     int32  // step index (0-based within this track) of the first definite step
	LastAt      int32  // step index of the last definite step
	RunStart    int32  // step index where the current run began
	Crossings   int32
	// Runs and RunSteps per definite regime, completed runs only;
	// the open run at the end is added by Runs()/Dwell().
	ConvRuns, SubsRuns         int32
	ConvRunSteps, SubsRunSteps int64
	// first run (needed to join runs across a merge)
	FirstRunEnd int32 // step index of the last step of the first run (−1 while it is open)
	// FirstRunDone is true once the first run has ended.
	FirstRunDone bool
}

// NewTrack returns an empty track.
func NewTrack() Track { return Track{First: Missing, Last: Missing, FirstRunEnd: -1} }

func definite(r Regime) bool { return r == Convective || r == Subsidence }

// Add appends one time step.
func (t *Track) Add(r Regime) {
	i := t.Steps
	t.Steps++
	if !definite(r) {
		return
	}
	switch {
	case t.Last == Missing:
		t.First, t.FirstAt, t.RunStart = r, i, i
	case r != t.Last:
		t.Crossings++
		t.closeRun(t.Last, t.LastAt-t.RunStart+1)
		if !t.FirstRunDone {
			t.FirstRunEnd, t.FirstRunDone = t.LastAt, true
		}
		t.RunStart = i
	}
	t.Last, t.LastAt = r, i
}

func (t *Track) closeRun(r Regime, n int32) {
	if r == Convective {
		t.ConvRuns++
		t.ConvRunSteps += int64(n)
	} else {
		t.SubsRuns++
		t.SubsRunSteps += int64(n)
	}
}

// Runs returns the number of runs and their total length (steps) in regime
// r, including the open run at the end of the record.
func (t *Track) Runs(r Regime) (runs int64, steps int64) {
	if r == Convective {
		runs, steps = int64(t.ConvRuns), t.ConvRunSteps
	} else {
		runs, steps = int64(t.SubsRuns), t.SubsRunSteps
	}
	if t.Last == r {
		runs++
		steps += int64(t.LastAt - t.RunStart + 1)
	}
	return runs, steps
}

// MeanDwell returns the mean run length in steps in regime r (NaN if none).
func (t *Track) MeanDwell(r Regime) float64 {
	n, s := t.Runs(r)
	if n == 0 {
		return nan()
	}
	return float64(s) / float64(n)
}

// Merge appends track b, which covers the steps immediately after t's.
func (t *Track) Merge(b Track) {
	off := t.Steps
	if b.Last == Missing { // b has no definite step
		t.Steps += b.Steps
		return
	}
	if t.Last == Missing {
		*t = shifted(b, off, t.Steps)
		return
	}
	t.Crossings += b.Crossings
	bFirstEnd := b.FirstRunEnd
	if !b.FirstRunDone {
		bFirstEnd = b.LastAt
	}
	if b.First == t.Last {
		// t's open run continues into b's first run
		if b.FirstRunDone {
			t.closeRun(t.Last, off+bFirstEnd-t.RunStart+1)
			if !t.FirstRunDone {
				t.FirstRunEnd, t.FirstRunDone = off+bFirstEnd, true
			}
			t.RunStart = off + b.RunStart
		}
		// else: b is one open run of the same regime; t's run stays open
	} else {
		t.Crossings++
		t.closeRun(t.Last, t.LastAt-t.RunStart+1)
		if !t.FirstRunDone {
			t.FirstRunEnd, t.FirstRunDone = t.LastAt, true
		}
		if b.FirstRunDone {
			t.closeRun(b.First, bFirstEnd-b.FirstAt+1)
			t.RunStart = off + b.RunStart
		} else {
			t.RunStart = off + b.FirstAt
		}
	}
	// b's completed runs other than its first
	if b.FirstRunDone {
		cr, cs, sr, ss := b.ConvRuns, b.ConvRunSteps, b.SubsRuns, b.SubsRunSteps
		n := int64(bFirstEnd - b.FirstAt + 1)
		if b.First == Convective {
			cr--
			cs -= n
		} else {
			sr--
			ss -= n
		}
		t.ConvRuns += cr
		t.ConvRunSteps += cs
		t.SubsRuns += sr
		t.SubsRunSteps += ss
	}
	t.Last, t.LastAt = b.Last, off+b.LastAt
	t.Steps += b.Steps
}

// shifted returns b with its step indices moved on by off, as a track whose
// first off steps had no definite regime.
func shifted(b Track, off, steps int32) Track {
	b.FirstAt += off
	b.LastAt += off
	b.RunStart += off
	if b.FirstRunDone {
		b.FirstRunEnd += off
	}
	b.Steps += steps
	return b
}

func nan() float64 { var z float64; return z / z }
