package analysis

import (
	"errors"
	"fmt"
	"os"
	"sort"
	"time"

	"lidscope/cf"
	"lidscope/config"
	"lidscope/output"
)

// An input that changes while a run reads it (a download or a copy still
// writing it, a model still appending) gives numbers that no version of
// the file holds. A run therefore records the size and modification time
// of every input of its dataset before it opens anything, and the SHA-256
// of every file it will read data from once the inputs are open and the
// steps chosen (pipeline.Plan.BeforeRead), before the first read; it
// checks them all again when the computation is done: any difference
// fails the run, naming the file, before anything is written. The
// provenance then records a checksum that held from before the first
// read to after the last, so it is the checksum of the bytes actually
// read.
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
	role string
	size int64
	mod  time.Time
	sum  string // SHA-256, hex ("" for a file whose data is not read)
}

// inputWatch holds the stamps of a run's inputs taken before the run.
type inputWatch struct {
	before map[string]stamp
	paths  []string // stamped, sorted
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
			w.before[p] = stamp{role: string(role), size: fi.Size(), mod: fi.ModTime()}
			w.paths = append(w.paths, p)
		}
	}
	sort.Strings(w.paths)
	return w
}

// hash adds the SHA-256 of the files the run will read data from (as
// pipeline.Plan.BeforeRead gives them), before the first read. A file
// whose size or modification time changed since watchInputs fails the
// run at once.
func (w *inputWatch) hash(read map[cf.Role][]string) error {
	for role, ps := range read {
		for _, p := range ps {
			b, ok := w.before[p]
			if !ok || b.sum != "" {
				continue
			}
			fi, err := os.Stat(p)
			if err != nil {
				return err
			}
			if err := b.compare(string(role), p, fi.Size(), fi.ModTime(), ""); err != nil {
				return err
			}
			sum, err := fileSHA256(p)
			if err != nil {
				return err
			}
			b.sum = sum
			w.before[p] = b
		}
	}
	return nil
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
		if err := b.compare(in.Role, in.Path, in.Size, in.ModTime, in.SHA256); err != nil {
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
		if err := b.compare(b.role, p, fi.Size(), fi.ModTime(), ""); err != nil {
			return err
		}
	}
	return nil
}

// compare fails when the file at path no longer has stamp b's size,
// modification time or (when both are known) SHA-256.
func (b stamp) compare(role, path string, size int64, mod time.Time, sum string) error {
	var what string
	switch {
	case b.size != size:
		what = fmt.Sprintf("its size went from %d to %d bytes", b.size, size)
	case !b.mod.Equal(mod):
		what = fmt.Sprintf("its modification time went from %s to %s", b.mod.Format(time.RFC3339Nano), mod.Format(time.RFC3339Nano))
	case b.sum != "" && sum != "" && b.sum != sum:
		what = fmt.Sprintf("its SHA-256 went from %s to %s with size and modification time unchanged", b.sum, sum)
	default:
		return nil
	}
	return fmt.Errorf("input %s (role %s) changed while the run read it: %s; the results would mix two versions of the file, so nothing was written. Run again once nothing writes the file any more (is a download, a copy or a model still writing it?): %w",
		cf.QuotePath(path), role, what, ErrInputChanged)
}
