package analysis

import (
	"errors"
	"fmt"
	"os"
	"sort"
	"sync"
	"time"

	"lidscope/cf"
	"lidscope/config"
	"lidscope/output"
)

// An input that changes while a run reads it (a download or a copy still
// writing it, a model still appending) gives numbers that no version of
// the file holds. A run therefore records the size, modification time,
// status-change time (ctime) and inode of every input of its dataset
// before it opens anything, and checks them all again when the
// computation is done: any difference fails the run, naming the file,
// before anything is written. Every write to a file moves its ctime, and
// so does putting its modification time back (utimes), which no user can
// set back; replacing the file (a rename over it) changes its inode.
// The SHA-256 of every file the run reads data from (known once the
// inputs are open and the steps chosen, pipeline.Plan.BeforeRead) is
// computed once, on a goroutine of its own while the run reads, rather
// than before the first read and again after the last: since no stamp
// moved from before the first read to after the last, it is the checksum
// of the bytes actually read, and the provenance records it. Where the
// system has no ctime (statChange), the checksum is taken again after the
// run and compared, as a change of the bytes alone would otherwise pass.
//
// A piece of a multi-file record reads (and so hashes) only the files
// that hold its steps; the other files of the record were opened for
// their time axes only, and their size and modification time are checked
// all the same (a change there could move the piece's steps).

// ErrInputChanged is wrapped by the error of a run whose input changed
// while it was read.
var ErrInputChanged = errors.New("an input changed while it was read")

// stamp is what a file looked like at one moment.
type stamp struct {
	role   string
	size   int64
	mod    time.Time
	change fileChange // ctime and inode (ok false where the system has none)
	sum    string     // SHA-256, hex ("" for a file whose data is not read)
}

// inputWatch holds the stamps of a run's inputs taken before the run, and
// the checksums of the files read, computed while the run reads.
type inputWatch struct {
	before map[string]stamp
	paths  []string // stamped, sorted

	mu      sync.Mutex
	sums    map[string]string // SHA-256, hex, computed during the run
	hashing chan struct{}     // closed when the hashing is done (nil: none started)
	stop    chan struct{}
}

// datasetPaths lists every input file of a dataset by role, each role's
// files once each.
func datasetPaths(d *config.Dataset) map[cf.Role][]string {
	out := map[cf.Role][]string{}
	for role, fs := range d.Inputs {
		seen := map[string]bool{}
		for _, p := range fs {
			if !seen[p] {
				seen[p] = true
				out[role] = append(out[role], p)
			}
		}
	}
	return out
}

// watchInputs stamps the size and modification time of the files before
// the run opens them. Files that cannot be read are left to the run,
// which reports them.
func watchInputs(paths map[cf.Role][]string) *inputWatch {
	w := &inputWatch{before: map[string]stamp{}}
	for role, ps := range paths {
		for _, p := range ps {
			if _, ok := w.before[p]; ok {
				continue
			}
			if cf.CheckRegular(p) != nil {
				continue // refused by cf.Open, with its reason
			}
			fi, err := os.Stat(p)
			if err != nil {
				continue
			}
			w.before[p] = stamp{role: string(role), size: fi.Size(), mod: fi.ModTime(), change: statChange(fi)}
			w.paths = append(w.paths, p)
		}
	}
	sort.Strings(w.paths)
	return w
}

// hash starts computing the SHA-256 of the files the run will read data
// from (as pipeline.Plan.BeforeRead gives them, before the first read) on
// a goroutine of its own, in name order; sum waits for it. A file whose
// stamp changed since watchInputs fails the run at once.
func (w *inputWatch) hash(read map[cf.Role][]string) error {
	var todo []string
	for role, ps := range read {
		for _, p := range ps {
			b, ok := w.before[p]
			if !ok {
				continue
			}
			fi, err := os.Stat(p)
			if err != nil {
				return err
			}
			if err := b.compare(string(role), p, fi.Size(), fi.ModTime(), statChange(fi), "", ""); err != nil {
				return err
			}
			todo = append(todo, p)
		}
	}
	sort.Strings(todo)
	w.close() // an earlier pass's hashing (anomaly mode runs the pipeline twice)
	w.mu.Lock()
	if w.sums == nil {
		w.sums = map[string]string{}
	}
	w.mu.Unlock()
	w.hashing, w.stop = make(chan struct{}), make(chan struct{})
	go func(done, stop chan struct{}) {
		defer close(done)
		for _, p := range todo {
			select {
			case <-stop:
				return
			default:
			}
			w.mu.Lock()
			_, have := w.sums[p]
			w.mu.Unlock()
			if have {
				continue
			}
			sum, err := fileSHA256(p)
			if err != nil {
				continue // describeInputs reads it again and reports the error
			}
			w.mu.Lock()
			w.sums[p] = sum
			w.mu.Unlock()
		}
	}(w.hashing, w.stop)
	return nil
}

// close stops the hashing, if any, and waits for it.
func (w *inputWatch) close() {
	if w == nil || w.hashing == nil {
		return
	}
	select {
	case <-w.stop:
	default:
		close(w.stop)
	}
	<-w.hashing
}

// sum returns the checksum of path computed during the run, once the
// hashing is done; ok is false when there is none, and where the system
// has no ctime (describeInputs then reads the file again, and verify
// compares the two).
func (w *inputWatch) sum(path string) (string, bool) {
	if w == nil || w.hashing == nil {
		return "", false
	}
	<-w.hashing
	w.mu.Lock()
	s, ok := w.sums[path]
	w.mu.Unlock()
	return s, ok && w.before[path].change.ok
}

// during is the checksum computed during the run ("" none).
func (w *inputWatch) during(path string) string {
	w.mu.Lock()
	defer w.mu.Unlock()
	return w.sums[path]
}

// listed is every stamped file (size and modification time, no
// checksum): what output.Meta.Listed records.
func (w *inputWatch) listed() []output.InputFile {
	out := make([]output.InputFile, 0, len(w.paths))
	for _, p := range w.paths {
		b := w.before[p]
		out = append(out, output.InputFile{Role: b.role, Path: p, Size: b.size, ModTime: b.mod})
	}
	return out
}

// verify compares the inputs as described after the run (describeInputs:
// size, modification time and SHA-256 read again) with their stamps from
// before it, then the size and modification time of every other stamped
// file, and fails naming the first file that changed.
func (w *inputWatch) verify(after []output.InputFile) error {
	seen := map[string]bool{}
	for _, in := range after {
		seen[in.Path] = true
		b, ok := w.before[in.Path]
		if !ok {
			continue
		}
		var now fileChange
		if fi, err := os.Stat(in.Path); err == nil {
			now = statChange(fi)
		}
		if err := b.compare(in.Role, in.Path, in.Size, in.ModTime, now, w.during(in.Path), in.SHA256); err != nil {
			return err
		}
	}
	for _, p := range w.paths {
		if seen[p] {
			continue
		}
		b := w.before[p]
		fi, err := os.Stat(p)
		if err != nil {
			return fmt.Errorf("input %s (role %s) went away while the run read the record: %v; nothing was written. Run again once the files are in place: %w", cf.QuotePath(p), b.role, err, ErrInputChanged)
		}
		if err := b.compare(b.role, p, fi.Size(), fi.ModTime(), statChange(fi), "", ""); err != nil {
			return err
		}
	}
	return nil
}

// compare fails when the file at path no longer has stamp b's size,
// modification time, ctime and inode (where known) or, when both are
// known, the checksum it had during the run (sum0) now (sum).
func (b stamp) compare(role, path string, size int64, mod time.Time, now fileChange, sum0, sum string) error {
	var what string
	switch {
	case b.size != size:
		what = fmt.Sprintf("its size went from %d to %d bytes", b.size, size)
	case !b.mod.Equal(mod):
		what = fmt.Sprintf("its modification time went from %s to %s", b.mod.Format(time.RFC3339Nano), mod.Format(time.RFC3339Nano))
	case b.change.ok && now.ok && b.change.inode != now.inode:
		what = fmt.Sprintf("it was replaced by another file (inode %d, then %d)", b.change.inode, now.inode)
	case b.change.ok && now.ok && !b.change.ctime.Equal(now.ctime):
		what = fmt.Sprintf("its status-change time went from %s to %s with size and modification time unchanged (its bytes were rewritten and its time put back, or its attributes changed)", b.change.ctime.Format(time.RFC3339Nano), now.ctime.Format(time.RFC3339Nano))
	case sum0 != "" && sum != "" && sum0 != sum:
		what = fmt.Sprintf("its SHA-256 went from %s to %s with size and modification time unchanged", sum0, sum)
	default:
		return nil
	}
	return fmt.Errorf("input %s (role %s) changed while the run read it: %s; the results would mix two versions of the file, so nothing was written. Run again once nothing writes the file any more (is a download, a copy or a model still writing it?): %w",
		cf.QuotePath(path), role, what, ErrInputChanged)
}
