package analysis

import (
	"bufio"
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/gob"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strconv"
	"strings"
	"time"

	"lidscope/accumulate"
	"lidscope/factors"
	"lidscope/output"
	"lidscope/pipeline"
	"lidscope/relations"
	"lidscope/runfolder"
)

// StateFile holds a finished run's complete accumulators (regime
// statistics and relationships) and provenance, so that runs over
// consecutive pieces of a record (split by time range or by file set) can
// be merged later into exactly what one run over the whole record gives
// (see Merge).
const StateFile = "run-state.gob"

// stateFormat tags the run state; bump it whenever runState or the file
// layout changes. Version 2 added the relationship accumulator; version 3
// the integrity header, and names the provenance after the study
// (output.Meta.Study, StudyHash, MetricsConventions), which a version-2
// state holds under earlier names that gob would silently drop; version 4
// marks run folders written with the one table of names (package vocab),
// whose files use the new names (see the README's changes); version 5
// keeps the accumulators in frames of their own after the gob of the rest
// (so that writing the state needs no copies of them) and the regime
// accumulator's per-column statistics for the analysed columns only.
const stateFormat = "lidscope-run-state/5"

// compactFormat is the header of the run states written before the
// per-column statistics were kept for the analysed columns only.
const compactFormat = "lidscope-run-state/4"

// renamedFormat is the header of the run states whose folders use names
// since renamed.
const renamedFormat = "lidscope-run-state/3"

// The run state file is a header of three fixed-width lines and the body:
//
//	lidscope-run-state/5
//	length 00000000000000123456      (bytes of the body, 20 digits)
//	sha256 <64 hex digits>           (SHA-256 of the body)
//
// followed by an empty line. A file whose header, length or checksum does
// not match is refused as damaged, never merged. The body is four frames,
// each its length (20 digits) and a newline, then its bytes: the gob of
// runState, the regime accumulator (accumulate.Acc.Encode), the
// relationship accumulator (relations.Acc.Encode; empty without one) and
// the factor accumulator (factors.Acc.Encode; empty without a factors
// section). A further accumulator gets a frame of its own.
const (
	stateLengthDigits = 20
	stateHeaderLen    = len(stateFormat) + 1 + len("length ") + stateLengthDigits + 1 + len("sha256 ") + 64 + 1 + 1
)

type runState struct {
	Format string
	Meta   output.Meta
	// NoRelations, when set, says why the run has no relationship
	// analysis (an optional input absent); its frame is then empty.
	NoRelations string
}

// frameDigits is the width of a frame's length.
const frameDigits = 20

// frames splits a body into its frames.
func frames(body []byte) ([][]byte, error) {
	var out [][]byte
	for len(body) > 0 {
		if len(body) < frameDigits+1 || body[frameDigits] != '\n' {
			return nil, fmt.Errorf("frame %d has no length line", len(out))
		}
		ln := string(body[:frameDigits])
		n, err := strconv.ParseUint(ln, 10, 63)
		body = body[frameDigits+1:]
		if err != nil || n > uint64(len(body)) {
			return nil, fmt.Errorf("frame %d: length %q for %d bytes left", len(out), ln, len(body))
		}
		out = append(out, body[:n])
		body = body[n:]
	}
	return out, nil
}

// encodeState is the whole run state file.
// rel is nil exactly when the run has no relationship analysis, and noRel
// then says why.
func encodeState(meta output.Meta, acc *accumulate.Acc, rel *relations.Acc, noRel string, fac *factors.Acc) ([]byte, error) {
	var b bytes.Buffer
	if err := writeState(&b, meta, acc, rel, noRel, fac); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// writeState writes the run state file to w as it is encoded: every
// frame's length is known beforehand (the regime accumulator says its
// size, accumulate.Acc.Encoder; the other frames are small), so the
// header, which holds the body's length and SHA-256, is written last,
// over the room kept for it (w must then be an io.WriterAt, as a file is;
// a bytes.Buffer gets it in place). The accumulators are never copied:
// at a fine grid they are most of the run's memory.
func writeState(w io.Writer, meta output.Meta, acc *accumulate.Acc, rel *relations.Acc, noRel string, fac *factors.Acc) error {
	if rel == nil && noRel == "" {
		return fmt.Errorf("no relationship accumulator to save")
	}
	var head, rb bytes.Buffer
	if err := gob.NewEncoder(&head).Encode(runState{Format: stateFormat, Meta: meta, NoRelations: noRel}); err != nil {
		return fmt.Errorf("encoding the run state: %w", err)
	}
	if rel != nil {
		if err := rel.Encode(&rb); err != nil {
			return err
		}
	}
	var fb []byte
	if fac != nil {
		var err error
		if fb, err = fac.EncodeBytes(); err != nil {
			return err
		}
	}
	accSize, writeAcc, err := acc.Encoder()
	if err != nil {
		return err
	}
	h := sha256.New()
	cw := &countWriter{w: io.MultiWriter(w, h)}
	if _, err := w.Write(make([]byte, stateHeaderLen)); err != nil {
		return err
	}
	frame := func(n int64, write func(io.Writer) error) error {
		if _, err := fmt.Fprintf(cw, "%0*d\n", frameDigits, n); err != nil {
			return err
		}
		start := cw.n
		if err := write(cw); err != nil {
			return err
		}
		if cw.n-start != n {
			return fmt.Errorf("encoding the run state: a frame of %d bytes said %d", cw.n-start, n)
		}
		return nil
	}
	bytesOf := func(b []byte) func(io.Writer) error {
		return func(w io.Writer) error { _, err := w.Write(b); return err }
	}
	if err := frame(int64(head.Len()), bytesOf(head.Bytes())); err != nil {
		return err
	}
	if err := frame(accSize, writeAcc); err != nil {
		return err
	}
	if err := frame(int64(rb.Len()), bytesOf(rb.Bytes())); err != nil {
		return err
	}
	if err := frame(int64(len(fb)), bytesOf(fb)); err != nil {
		return err
	}
	header := fmt.Sprintf("%s\nlength %0*d\nsha256 %s\n\n", stateFormat, stateLengthDigits, cw.n, hex.EncodeToString(h.Sum(nil)))
	switch o := w.(type) {
	case *bytes.Buffer:
		copy(o.Bytes(), header)
	case io.WriterAt:
		if _, err := o.WriteAt([]byte(header), 0); err != nil {
			return err
		}
	default:
		return fmt.Errorf("writing the run state: %T cannot take its header", w)
	}
	return nil
}

// countWriter counts what goes through it.
type countWriter struct {
	w io.Writer
	n int64
}

func (c *countWriter) Write(b []byte) (int, error) {
	n, err := c.w.Write(b)
	c.n += int64(n)
	return n, err
}

// stageState writes the run state into the run's staging folder.
func stageState(st *runfolder.Stage, meta output.Meta, acc *accumulate.Acc, rel *relations.Acc, noRel string, fac *factors.Acc) error {
	p := st.Path(StateFile)
	f, err := os.OpenFile(p, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o666)
	if err == nil {
		err = writeState(f, meta, acc, rel, noRel, fac)
		if cerr := f.Close(); err == nil {
			err = cerr
		}
	}
	if err != nil {
		return fmt.Errorf("writing the run state in %s: %w", st.Target(), err)
	}
	return nil
}

// ErrDamagedState marks a run state whose header, length or checksum does
// not match its contents.
var ErrDamagedState = errors.New("damaged run state")

func damaged(path, why string) error {
	return fmt.Errorf("%w: %s (%s); re-run that piece", ErrDamagedState, path, why)
}

// decodeStateFile checks the header of a run state file and returns its body.
func decodeStateFile(path string, b []byte) ([]byte, error) {
	n, want, err := checkStateHeader(path, b, int64(len(b)))
	if err != nil {
		return nil, err
	}
	body := b[stateHeaderLen:]
	if got := sha256.Sum256(body); !bytes.Equal(got[:], want) {
		return nil, damaged(path, "its SHA-256 does not match its contents")
	}
	return body[:n], nil
}

// checkStateHeader checks the header of a run state file of size bytes
// (b holds at least its first stateHeaderLen bytes, or the whole file when
// shorter) and returns the body's length and SHA-256.
func checkStateHeader(path string, b []byte, size int64) (int64, []byte, error) {
	if size < int64(stateHeaderLen) || len(b) < stateHeaderLen {
		return 0, nil, damaged(path, fmt.Sprintf("%d bytes, shorter than its header", size))
	}
	h := string(b[:stateHeaderLen])
	lines := strings.Split(h, "\n")
	if len(lines) > 0 && lines[0] == compactFormat {
		return 0, nil, fmt.Errorf("%s: run state format %q, this lidscope reads %q: the folder was written by an earlier lidscope, which kept the per-column statistics for every grid cell in another encoding; re-run the analysis of that folder with this version", path, compactFormat, stateFormat)
	}
	if len(lines) > 0 && lines[0] == renamedFormat {
		return 0, nil, fmt.Errorf("%s: run state format %q, this lidscope reads %q: the folder was written by an earlier lidscope whose files use names since renamed (e.g. delta_K, crossings_per_year, n_eff_corr; see the README's changes); re-run the analysis of that folder with this version", path, renamedFormat, stateFormat)
	}
	if len(lines) != 5 || lines[0] != stateFormat || lines[3] != "" || lines[4] != "" {
		return 0, nil, damaged(path, "its header is not "+stateFormat+": the file is damaged, or was written by another lidscope version")
	}
	ls, ok := strings.CutPrefix(lines[1], "length ")
	n, err := strconv.ParseInt(ls, 10, 64)
	if !ok || err != nil || len(ls) != stateLengthDigits {
		return 0, nil, damaged(path, "its length line is damaged")
	}
	hs, ok := strings.CutPrefix(lines[2], "sha256 ")
	want, err := hex.DecodeString(hs)
	if !ok || err != nil || len(want) != sha256.Size {
		return 0, nil, damaged(path, "its checksum line is damaged")
	}
	if body := size - int64(stateHeaderLen); body != n {
		return 0, nil, damaged(path, fmt.Sprintf("the header says %d bytes follow it, the file has %d: truncated or extended", n, body))
	}
	return n, want, nil
}

// loadedState is a decoded run state; rel is nil unless asked for, or
// when the run had no relationship analysis (noRel says why).
type loadedState struct {
	meta  output.Meta
	acc   *accumulate.Acc
	rel   *relations.Acc
	noRel string
	fac   *factors.Acc
}

// readState reads the run state at path, with the relationship
// accumulator when withRel is set. It decodes the frames as it reads the
// file, hashing the body on the way, and returns nothing decoded unless
// the SHA-256 matches at the end: holding the whole file (about the
// accumulators' size) next to what is decoded from it was most of a
// merge's peak memory.
func readState(p string, withRel bool) (loadedState, error) {
	f, err := os.Open(p)
	if err != nil {
		return loadedState{}, err
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return loadedState{}, err
	}
	hdr := make([]byte, stateHeaderLen)
	k, err := io.ReadFull(f, hdr)
	if err != nil && !errors.Is(err, io.ErrUnexpectedEOF) && !errors.Is(err, io.EOF) {
		return loadedState{}, fmt.Errorf("reading %s: %w", p, err)
	}
	_, want, err := checkStateHeader(p, hdr[:k], fi.Size())
	if err != nil {
		return loadedState{}, err
	}
	h := sha256.New()
	body := bufio.NewReaderSize(io.TeeReader(f, h), 1<<20)
	ls, derr := decodeFrames(body, withRel)
	// hash what is left, so a damaged file is named damaged by its
	// checksum whatever the decoding made of it
	if _, err := io.Copy(io.Discard, body); err != nil {
		return loadedState{}, fmt.Errorf("reading %s: %w", p, err)
	}
	if !bytes.Equal(h.Sum(nil), want) {
		return loadedState{}, damaged(p, "its SHA-256 does not match its contents")
	}
	if errors.Is(derr, accumulate.ErrFormat) {
		return loadedState{}, fmt.Errorf("run state %s: %w", p, derr)
	}
	if derr != nil {
		return loadedState{}, damaged(p, derr.Error())
	}
	return ls, nil
}

// decodeFrames decodes the four frames of a run state body (see frames)
// from r, the relationship and factor frames only when withRel is set,
// and checks that nothing follows them.
func decodeFrames(r *bufio.Reader, withRel bool) (loadedState, error) {
	var ls loadedState
	for i := range 4 {
		var ln [frameDigits + 1]byte
		if _, err := io.ReadFull(r, ln[:]); err != nil || ln[frameDigits] != '\n' {
			return ls, fmt.Errorf("%d frames, not 4 (frame %d has no length line)", i, i)
		}
		n, err := strconv.ParseUint(string(ln[:frameDigits]), 10, 63)
		if err != nil {
			return ls, fmt.Errorf("frame %d: length %q", i, ln[:frameDigits])
		}
		fr := &io.LimitedReader{R: r, N: int64(n)}
		switch {
		case i == 0:
			var s runState
			if err := gob.NewDecoder(fr).Decode(&s); err != nil {
				return ls, err
			}
			if s.Format != stateFormat {
				return ls, fmt.Errorf("its body has format %q", s.Format)
			}
			ls.meta, ls.noRel = s.Meta, s.NoRelations
		case i == 1:
			if ls.acc, err = accumulate.Decode(fr); err != nil {
				return ls, err
			}
		case i == 2 && withRel && ls.noRel == "":
			if n == 0 {
				return ls, errors.New("it holds no relationship accumulator")
			}
			if ls.rel, err = relations.DecodeAcc(fr); err != nil {
				return ls, err
			}
		case i == 3 && withRel && ls.noRel == "" && n > 0:
			if ls.fac, err = factors.DecodeAcc(fr); err != nil {
				return ls, err
			}
		}
		if _, err := io.Copy(io.Discard, fr); err != nil {
			return ls, err
		}
		if fr.N != 0 {
			return ls, fmt.Errorf("frame %d: length %d for fewer bytes left", i, n)
		}
	}
	if _, err := r.ReadByte(); err != io.EOF {
		return ls, errors.New("more than 4 frames")
	}
	return ls, nil
}

// loadState reads the state of the committed run in dir (see
// runfolder.Open), with the relationship accumulator when withRel is set.
func loadState(dir string, withRel bool) (loadedState, error) {
	f, err := runfolder.Open(dir, StateFile)
	if err != nil {
		return loadedState{}, err
	}
	defer f.Close()
	return readState(f.Path(StateFile), withRel)
}

// LoadState reads the provenance and the regime accumulator of the state
// a run left in dir.
func LoadState(dir string) (output.Meta, *accumulate.Acc, error) {
	s, err := loadState(dir, false)
	return s.meta, s.acc, err
}

// Merge joins finished runs over consecutive, non-overlapping pieces of one
// dataset's record and writes the merged results to out as one run folder
// (package runfolder): the regime outputs, the relationship outputs and the
// merged run state. The runs must agree on everything but the period:
// dataset, metrics conventions, regime definition, grid, quantities,
// regions, calendar, sampling and the relationship configuration. Every
// piece must be a complete, committed run folder with an intact run state.
// Pieces that leave a gap in the record (a missing year, say) are refused
// unless opt.AllowGaps; the gaps are then recorded in the merged
// provenance. Runs whose relationships are anomalies (relations.Anomaly)
// merge only when every piece took its anomalies against the same
// climatology (that of the whole record, built by ComputeClimatology over
// every piece and merged: run --jobs does that); pieces that each took the
// climatology of their own period are refused.
func Merge(dirs []string, out string, opt Options) (Report, error) {
	return MergeContext(context.Background(), dirs, out, opt)
}

// MergeContext is Merge that stops, writing nothing, when ctx is done
// before the merged run is committed.
func MergeContext(ctx context.Context, dirs []string, out string, opt Options) (Report, error) {
	if len(dirs) < 2 {
		return Report{}, fmt.Errorf("give at least two run folders to merge")
	}
	// The output folder first: locked, and refused when it holds results
	// (without --force), before the pieces are read.
	st, err := CreateFolder(out, opt, 0)
	if err != nil {
		return Report{}, err
	}
	defer st.Close()
	return MergeInto(ctx, st, dirs, opt, nil)
}

// MergeAs makes a merge of the pieces of one run (lidscope run --jobs)
// look like that run: its study and hash, its command, its notes, and
// its figures.
type MergeAs struct {
	Study, StudyHash string
	Plots            bool   // draw the figures (unless opt.NoPlots)
	Note             string // replaces the note naming the merged folders
}

// MergeInto merges the runs in dirs (see Merge) into the staged run
// folder st and commits it. With as, the merged run is presented as one
// run (MergeAs).
func MergeInto(ctx context.Context, st *runfolder.Stage, dirs []string, opt Options, as *MergeAs) (Report, error) {
	out := st.Target()
	runs, err := readMergeRuns(dirs, out)
	if err != nil {
		return Report{}, err
	}
	gaps, err := checkMergeRuns(runs, opt)
	if err != nil {
		return Report{}, err
	}
	first := runs[0]
	acc, rel, fac := first.acc, first.rel, first.fac
	meta := first.meta
	hashes, studies, err := mergeRunStates(runs, acc, rel, fac, &meta)
	if err != nil {
		return Report{}, err
	}
	mergedMeta(&meta, runs, dirs, gaps, hashes, studies, opt, as)
	var relRes *relations.Results
	if rel != nil {
		if n, m := rel.Steps(), len(meta.TimeValues); n != m {
			return Report{}, fmt.Errorf("the merged relationship analysis has %d time steps, the merged record %d: a run state is damaged; re-run the pieces", n, m)
		}
		if relRes, err = rel.Results(); err != nil {
			return Report{}, fmt.Errorf("merged relationship analysis: %w", err)
		}
	}
	o := &Outcome{Dataset: meta.Dataset, Meta: meta, Acc: acc, Relations: relRes, RelAcc: rel, NoRel: first.noRel, Plots: as != nil && as.Plots, FacAcc: fac}
	if fac != nil {
		o.Factors = fac.Results(quantityUnits)
	}
	files, err := WriteRun(ctx, st, o, opt)
	if err != nil {
		return Report{}, err
	}
	if _, err := st.Commit(ctx); err != nil {
		return Report{}, err
	}
	return Report{Dataset: meta.Dataset, OutDir: out, Files: files, Meta: meta, Relations: relRes}, nil
}

// mergeRun is one run folder being merged: its run state.
type mergeRun struct {
	dir  string
	meta output.Meta
	acc  *accumulate.Acc
	rel  *relations.Acc
	// noRel: the run has no relationship analysis, and why
	noRel string
	fac   *factors.Acc
}

// readMergeRuns reads the run state of each folder in dirs (none of them
// out), in time order.
func readMergeRuns(dirs []string, out string) ([]mergeRun, error) {
	var runs []mergeRun
	var problems []string
	for _, d := range dirs {
		if sameFolder(d, out) {
			return nil, fmt.Errorf("cannot merge into %s: it is one of the pieces; choose another --out", d)
		}
		f, err := runfolder.Open(d, StateFile)
		if err != nil {
			problems = append(problems, err.Error())
			continue
		}
		defer f.Close() // no run replaces a piece while it is merged
		s, err := readState(f.Path(StateFile), true)
		if err != nil {
			problems = append(problems, err.Error())
			continue
		}
		if len(s.meta.TimeValues) == 0 {
			problems = append(problems, fmt.Sprintf("%s: the run has no time steps", d))
			continue
		}
		runs = append(runs, mergeRun{d, s.meta, s.acc, s.rel, s.noRel, s.fac})
	}
	if len(problems) > 0 {
		return nil, fmt.Errorf("cannot merge these runs:\n  %s", strings.Join(problems, "\n  "))
	}
	sort.SliceStable(runs, func(i, j int) bool { return runs[i].meta.TimeValues[0] < runs[j].meta.TimeValues[0] })
	return runs, nil
}

// checkMergeRuns checks that the runs can be merged (the same dataset,
// conventions, regime definition, calendar, quantities and analyses, and
// periods that do not overlap) and returns the gaps between them, refused
// unless opt.AllowGaps.
func checkMergeRuns(runs []mergeRun, opt Options) ([]string, error) {
	first := runs[0]
	var problems []string
	for _, r := range runs[1:] {
		a, b := first.meta, r.meta
		check := func(what string, x, y any) {
			if fmt.Sprint(x) != fmt.Sprint(y) {
				problems = append(problems, fmt.Sprintf("%s: %s has %v, %s has %v", what, first.dir, x, r.dir, y))
			}
		}
		check("dataset", a.Dataset, b.Dataset)
		check("metrics conventions", a.MetricsConventions, b.MetricsConventions)
		check("regime definition", a.Regimes.String(), b.Regimes.String())
		check("time steps per year", a.StepsPerYear, b.StepsPerYear)
		check("calendar", a.Calendar, b.Calendar)
		check("time units", a.TimeUnits, b.TimeUnits)
		check("quantities", a.Absent, b.Absent)
		if (first.fac == nil) != (r.fac == nil) {
			problems = append(problems, fmt.Sprintf("factor regressions: only one of %s and %s has them (a factors section in its study)", first.dir, r.dir))
		}
		if (first.rel == nil) != (r.rel == nil) {
			problems = append(problems, fmt.Sprintf("relationship analysis: %s has %s, %s has %s", first.dir, relWord(first.noRel), r.dir, relWord(r.noRel)))
		}
	}
	var gaps []string
	for i := 1; i < len(runs); i++ {
		p, q := runs[i-1], runs[i]
		if q.meta.TimeValues[0] <= p.meta.TimeValues[len(p.meta.TimeValues)-1] {
			problems = append(problems, fmt.Sprintf("periods overlap: %s (%s) and %s (%s)", p.dir, p.meta.Period, q.dir, q.meta.Period))
			continue
		}
		if consecutivePieces(p.meta.Piece, q.meta.Piece) {
			// pieces K and K+1 of one selected record: what lies between
			// them was not selected (e.g. the months outside a season)
			continue
		}
		if missing, ok := gapBetween(p.meta, q.meta); ok {
			gaps = append(gaps, fmt.Sprintf("%s ends at %s and %s starts at %s (about %d time steps missing)",
				p.dir, lastOf(p.meta.Period), q.dir, firstOf(q.meta.Period), missing))
		}
	}
	if len(gaps) > 0 && !opt.AllowGaps {
		problems = append(problems, fmt.Sprintf("the pieces leave gaps in the record: %s; run the missing pieces and merge them too, or merge with --allow-gaps to accept a record with gaps (recorded in the provenance)",
			strings.Join(gaps, "; ")))
	}
	if len(problems) > 0 {
		return nil, fmt.Errorf("cannot merge these runs:\n  %s", strings.Join(problems, "\n  "))
	}
	return gaps, nil
}

// mergeRunStates merges the accumulators of runs[1:] into those of
// runs[0] (acc, rel, fac) and their time axes, inputs and notes into
// meta; it returns each run's study hash and study text.
func mergeRunStates(runs []mergeRun, acc *accumulate.Acc, rel *relations.Acc, fac *factors.Acc, meta *output.Meta) ([]string, []string, error) {
	hashes := []string{}
	studies := []string{}
	for i, r := range runs {
		hashes = append(hashes, r.meta.StudyHash)
		studies = append(studies, fmt.Sprintf("# run %d: %s (%s)\n%s", i+1, r.dir, r.meta.Period, r.meta.Study))
		if i == 0 {
			continue
		}
		if err := acc.Merge(r.acc); err != nil {
			return nil, nil, fmt.Errorf("merging %s: %w", r.dir, err)
		}
		if rel == nil {
			// no relationship analysis in any piece (checked above)
		} else if err := rel.Merge(r.rel); err != nil {
			if rel.Mode() == relations.Anomaly {
				// The pieces took their anomalies against different
				// climatologies; say what to do at the level of runs.
				return nil, nil, fmt.Errorf("cannot merge these runs: their relationship analysis is in anomaly mode (relationships.mode: %s), and %s took its anomalies against the climatology of its own period, not the one the other pieces used, so no merge gives what one run over the whole record gives; "+
					"run the whole record in one run, run it with --jobs (which builds one climatology of the whole record for every piece), or use relationships.mode: %s for runs meant to be merged (%v)", relations.Anomaly, r.dir, relations.Climatological, err)
			}
			return nil, nil, fmt.Errorf("merging the relationship analysis of %s: %w", r.dir, err)
		}
		if fac != nil {
			if err := fac.Merge(r.fac); err != nil {
				return nil, nil, fmt.Errorf("merging the factor regressions of %s: %w", r.dir, err)
			}
		}
		meta.TimeValues = append(meta.TimeValues, r.meta.TimeValues...)
		if meta.TimeBounds != nil && r.meta.TimeBounds != nil {
			meta.TimeBounds = append(meta.TimeBounds, r.meta.TimeBounds...)
		} else {
			meta.TimeBounds = nil
		}
		meta.Inputs = appendNew(meta.Inputs, r.meta.Inputs...)
		meta.Listed = appendNew(meta.Listed, r.meta.Listed...)
		meta.Notes = appendNew(meta.Notes, r.meta.Notes...)
		if r.meta.Start.Before(meta.Start) {
			meta.Start = r.meta.Start
		}
	}
	return hashes, studies, nil
}

// mergedMeta completes the merged run's metadata: inputs by role, notes,
// period, study and its hash, batch jobs, version and command.
func mergedMeta(meta *output.Meta, runs []mergeRun, dirs, gaps, hashes, studies []string, opt Options, as *MergeAs) {
	first := runs[0]
	// by role as one run lists them (describeInputs), each role's files in
	// time order (the runs are)
	byRole := func(a, b output.InputFile) int { return strings.Compare(a.Role, b.Role) }
	slices.SortStableFunc(meta.Inputs, byRole)
	slices.SortStableFunc(meta.Listed, byRole)
	if as != nil && as.Note != "" {
		meta.Notes = append(meta.Notes, as.Note)
	} else {
		meta.Notes = append(meta.Notes, fmt.Sprintf("merged from %d runs: %s", len(runs), strings.Join(dirs, ", ")))
	}
	for _, g := range gaps {
		meta.Notes = append(meta.Notes, "merged across a gap in the record (--allow-gaps): "+g)
	}
	meta.Period = firstOf(first.meta.Period) + " … " + lastOf(runs[len(runs)-1].meta.Period)
	meta.Study = strings.Join(studies, "\n")
	sum := sha256.Sum256([]byte(strings.Join(hashes, "+")))
	meta.StudyHash = hex.EncodeToString(sum[:])
	if as != nil {
		meta.Study, meta.StudyHash = as.Study, as.StudyHash
	} else if allPieces(metasOf(runs, func(r mergeRun) output.Meta { return r.meta })) {
		// Every piece K/N of one study: the merge is that study's run
		// over the whole record.
		meta.Study, meta.StudyHash = first.meta.Study, first.meta.StudyHash
	}
	meta.Piece = ""
	meta.Batch = append([]string{}, opt.Batch...)
	for _, r := range runs {
		meta.Batch = appendNew(meta.Batch, r.meta.Batch...)
	}
	meta.Version = opt.Version
	meta.Command = strings.Join(opt.Command, " ")
	meta.End = time.Now()
}

// allPieces reports whether runs (in time order) are the pieces 1/N … N/N
// of one study.
func allPieces(metas []output.Meta) bool {
	for i, m := range metas {
		p, err := pipeline.ParsePiece(m.Piece)
		if m.Piece == "" || err != nil || p.N != len(metas) || p.K != i+1 || m.StudyHash != metas[0].StudyHash {
			return false
		}
	}
	return len(metas) > 0
}

func metasOf[R any](runs []R, meta func(R) output.Meta) []output.Meta {
	var out []output.Meta
	for _, r := range runs {
		out = append(out, meta(r))
	}
	return out
}

// consecutivePieces reports whether a and b are pieces K/N and K+1/N.
func consecutivePieces(a, b string) bool {
	pa, err1 := pipeline.ParsePiece(a)
	pb, err2 := pipeline.ParsePiece(b)
	return a != "" && b != "" && err1 == nil && err2 == nil && pa.N == pb.N && pa.K > 0 && pb.K == pa.K+1
}

// appendNew appends the elements of add that dst does not hold yet (the
// notes and inputs each piece repeats).
func appendNew[T comparable](dst []T, add ...T) []T {
	for _, x := range add {
		if !slices.Contains(dst, x) {
			dst = append(dst, x)
		}
	}
	return dst
}

// gapBetween reports whether time steps are missing between the end of
// run p and the start of run q, and about how many. With time bounds it
// compares the end of p's last step with the start of q's first
// (a gap when they are more than a quarter of a step apart); without them,
// the distance between the two time stamps with the typical spacing of
// the pieces (a gap when it exceeds 1.5 steps).
func gapBetween(p, q output.Meta) (int, bool) {
	step := typicalStep(p, q)
	if step <= 0 {
		return 0, false
	}
	var d float64
	if len(p.TimeBounds) == len(p.TimeValues) && len(q.TimeBounds) == len(q.TimeValues) && len(p.TimeBounds) > 0 && len(q.TimeBounds) > 0 {
		d = q.TimeBounds[0][0] - p.TimeBounds[len(p.TimeBounds)-1][1]
		if d <= 0.25*step {
			return 0, false
		}
	} else {
		d = q.TimeValues[0] - p.TimeValues[len(p.TimeValues)-1] - step
		if d <= 0.5*step {
			return 0, false
		}
	}
	return int(math.Round(d / step)), true
}

// typicalStep is the median spacing of the time stamps of both pieces (in
// the time units), or a year over the steps per year for one-step pieces.
func typicalStep(p, q output.Meta) float64 {
	var ds []float64
	for _, m := range []output.Meta{p, q} {
		for i := 1; i < len(m.TimeValues); i++ {
			ds = append(ds, m.TimeValues[i]-m.TimeValues[i-1])
		}
	}
	if len(ds) == 0 {
		if p.StepsPerYear > 0 {
			return 365.2425 / p.StepsPerYear // days: the time units are days (timeUnits)
		}
		return 0
	}
	sort.Float64s(ds)
	return ds[len(ds)/2]
}

func sameFolder(a, b string) bool {
	x, err1 := filepath.Abs(a)
	y, err2 := filepath.Abs(b)
	return err1 == nil && err2 == nil && x == y
}

// relWord describes a run's relationship analysis for a merge problem.
func relWord(noRel string) string {
	if noRel == "" {
		return "one"
	}
	return "none (" + noRel + ")"
}

func firstOf(period string) string { return strings.SplitN(period, " … ", 2)[0] }

func lastOf(period string) string {
	parts := strings.Split(period, " … ")
	return parts[len(parts)-1]
}
