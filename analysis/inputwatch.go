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
// the file holds. A run therefore records the size, modification time and
// SHA-256 of every input before it reads anything, and checks them again
// when the computation is done: any difference fails the run, naming the
// file, before anything is written. The provenance then records a
// checksum that held from before the first read to after the last, so it
// is the checksum of the bytes actually read.

// ErrInputChanged is wrapped by the error of a run whose input changed
// while it was read.
var ErrInputChanged = errors.New("an input changed while it was read")

// stamp is what a file looked like at one moment.
type stamp struct {
	size int64
	mod  time.Time
	sum  string // SHA-256, hex
}

// inputWatch holds the stamps of a run's inputs taken before the run.
type inputWatch struct {
	before map[string]stamp
}

// datasetPaths lists every input file of a dataset, sorted, once each.
func datasetPaths(d *config.Dataset) []string {
	seen := map[string]bool{}
	var out []string
	for _, fs := range d.Inputs {
		for _, p := range fs {
			if !seen[p] {
				seen[p] = true
				out = append(out, p)
			}
		}
	}
	sort.Strings(out)
	return out
}

// watchInputs stamps the files before the run reads them. Files that
// cannot be read are left to the run, which reports them.
func watchInputs(paths []string) *inputWatch {
	w := &inputWatch{before: map[string]stamp{}}
	for _, p := range paths {
		if cf.CheckRegular(p) != nil {
			continue // refused by cf.Open, with its reason
		}
		fi, err := os.Stat(p)
		if err != nil {
			continue
		}
		sum, err := fileSHA256(p)
		if err != nil {
			continue
		}
		w.before[p] = stamp{fi.Size(), fi.ModTime(), sum}
	}
	return w
}

// verify compares the inputs as described after the run (describeInputs:
// size, modification time and SHA-256 read again) with their stamps from
// before it, and fails naming the first file that changed.
func (w *inputWatch) verify(after []output.InputFile) error {
	for _, in := range after {
		b, ok := w.before[in.Path]
		if !ok {
			continue
		}
		var what string
		switch {
		case b.size != in.Size:
			what = fmt.Sprintf("its size went from %d to %d bytes", b.size, in.Size)
		case !b.mod.Equal(in.ModTime):
			what = fmt.Sprintf("its modification time went from %s to %s", b.mod.Format(time.RFC3339Nano), in.ModTime.Format(time.RFC3339Nano))
		case b.sum != in.SHA256:
			what = fmt.Sprintf("its SHA-256 went from %s to %s with size and modification time unchanged", b.sum, in.SHA256)
		default:
			continue
		}
		return fmt.Errorf("input %s (role %s) changed while the run read it: %s; the results would mix two versions of the file, so nothing was written. Run again once nothing writes the file any more (is a download, a copy or a model still writing it?): %w",
			cf.QuotePath(in.Path), in.Role, what, ErrInputChanged)
	}
	return nil
}
