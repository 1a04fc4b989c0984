package output

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"

	"lidscope/accumulate"
)

// Test hooks: called after each file is staged and before each file is
// moved to its final name; a non-nil error makes Write fail there.
var (
	hookStaged func(name string) error
	hookCommit func(name string) error
)

// Write writes a run's results into dir (created if missing): maps.nc,
// series.nc, series.csv, regions.csv, summary.json and provenance.json (see
// the package documentation for their contents). It returns their paths.
//
// Every file is first written into a hidden staging directory inside dir
// and moved to its final name only when all of them are complete. On any
// error nothing of this run is left under a final name: files already moved
// are removed again and, with Force, the outputs they replaced are put back.
// Without Force, Write refuses before writing anything when any output file
// already exists in dir; other files in dir are never touched. A directory
// that Write created is removed again when it fails.
func Write(dir string, acc *accumulate.Acc, meta Meta, opt Options) (_ Files, err error) {
	c, err := check(acc, meta)
	if err != nil {
		return nil, err
	}
	if dir == "" {
		return nil, invalid("the output directory is empty; give a directory name")
	}
	st, err := os.Stat(dir)
	switch {
	case err == nil && !st.IsDir():
		return nil, fmt.Errorf("output: %s is a file, not a directory; give a directory for the outputs", dir)
	case err != nil && !errors.Is(err, fs.ErrNotExist):
		return nil, fmt.Errorf("output: %w", err)
	}
	created := err != nil
	if err := preflight(dir, opt.Force); err != nil {
		return nil, err
	}
	if err := os.MkdirAll(dir, 0o777); err != nil {
		return nil, fmt.Errorf("output: cannot create the output directory: %w", err)
	}
	defer func() {
		if err != nil && created {
			os.Remove(dir) // only if still empty
		}
	}()
	stage, err := os.MkdirTemp(dir, ".lidscope-output-")
	if err != nil {
		return nil, fmt.Errorf("output: cannot write in %s (the directory must be writable): %w", dir, err)
	}
	defer os.RemoveAll(stage)

	notes := c.notes
	if _, _, _, _, note := c.periodAxis(); note != "" {
		notes = append(notes, note)
	}
	var outs []provOutput
	stageFile := func(name string, write func(path string) error) error {
		p := filepath.Join(stage, name)
		if err := write(p); err != nil {
			return fmt.Errorf("output: writing %s in %s: %w", name, dir, err)
		}
		if hookStaged != nil {
			if err := hookStaged(name); err != nil {
				return fmt.Errorf("output: writing %s in %s: %w", name, dir, err)
			}
		}
		if name != ProvenanceJSON {
			po, err := digest(p, name)
			if err != nil {
				return fmt.Errorf("output: writing %s in %s: %w", name, dir, err)
			}
			outs = append(outs, po)
		}
		return nil
	}
	bytesTo := func(get func() ([]byte, error)) func(string) error {
		return func(p string) error {
			b, err := get()
			if err != nil {
				return err
			}
			return writeFileSync(p, b)
		}
	}
	steps := []struct {
		name  string
		write func(string) error
	}{
		{MapsNC, func(p string) error { return c.writeMaps(p, notes) }},
		{SeriesNC, func(p string) error { return c.writeSeriesNC(p, notes) }},
		{SeriesCSV, bytesTo(c.seriesCSV)},
		{RegionsCSV, bytesTo(c.regionsCSV)},
		{SummaryJSON, bytesTo(func() ([]byte, error) { return marshalJSON(c.summary(notes)) })},
		{ProvenanceJSON, bytesTo(func() ([]byte, error) { return marshalJSON(c.provenance(notes, outs)) })},
	}
	for _, s := range steps {
		if err := stageFile(s.name, s.write); err != nil {
			return nil, err
		}
	}
	if err := commit(dir, stage, OutputNames(), opt.Force); err != nil {
		return nil, err
	}
	var files Files
	for _, n := range OutputNames() {
		files = append(files, filepath.Join(dir, n))
	}
	return files, nil
}

// preflight refuses, without Force, when an output exists already, and
// always when an output name is taken by something that is not a file.
func preflight(dir string, force bool) error {
	var exist []string
	for _, n := range OutputNames() {
		st, err := os.Lstat(filepath.Join(dir, n))
		if errors.Is(err, fs.ErrNotExist) {
			continue
		}
		if err != nil {
			return fmt.Errorf("output: %w", err)
		}
		if !st.Mode().IsRegular() {
			return fmt.Errorf("output: %s exists and is not a regular file; remove it or choose another output directory", filepath.Join(dir, n))
		}
		exist = append(exist, n)
	}
	if len(exist) > 0 && !force {
		return fmt.Errorf("output: %s already holds outputs of a run (%s): %w; nothing was written. Choose another directory, remove them, or allow replacing them (Options.Force)",
			dir, strings.Join(exist, ", "), fs.ErrExist)
	}
	return nil
}

// commit moves the staged files to their final names in dir. Without force
// a file that appeared meanwhile is not replaced (hard link, which fails on
// an existing name; rename after a check where links are unsupported). With
// force an existing output is first moved into the staging directory. On
// any error the files moved so far are removed and the replaced ones put
// back.
func commit(dir, stage string, names []string, force bool) (err error) {
	var moved, backedUp []string
	defer func() {
		if err == nil {
			return
		}
		for i := len(moved) - 1; i >= 0; i-- {
			os.Remove(filepath.Join(dir, moved[i]))
		}
		for _, n := range backedUp {
			os.Rename(filepath.Join(stage, ".previous-"+n), filepath.Join(dir, n))
		}
	}()
	for _, n := range names {
		if hookCommit != nil {
			if err := hookCommit(n); err != nil {
				return fmt.Errorf("output: moving %s into %s: %w", n, dir, err)
			}
		}
		src, dst := filepath.Join(stage, n), filepath.Join(dir, n)
		if force {
			if _, err := os.Lstat(dst); err == nil {
				if err := os.Rename(dst, filepath.Join(stage, ".previous-"+n)); err != nil {
					return fmt.Errorf("output: cannot move the earlier %s aside: %w", dst, err)
				}
				backedUp = append(backedUp, n)
			}
			if err := os.Rename(src, dst); err != nil {
				return fmt.Errorf("output: %w", err)
			}
			moved = append(moved, n)
			continue
		}
		switch lerr := os.Link(src, dst); {
		case lerr == nil:
			moved = append(moved, n)
		case errors.Is(lerr, fs.ErrExist):
			return fmt.Errorf("output: %s appeared while the outputs were being written: %w; nothing was written. Allow replacing it (Options.Force) or choose another directory", dst, fs.ErrExist)
		default:
			if _, serr := os.Lstat(dst); serr == nil {
				return fmt.Errorf("output: %s appeared while the outputs were being written: %w; nothing was written", dst, fs.ErrExist)
			}
			if err := os.Rename(src, dst); err != nil {
				return fmt.Errorf("output: %w", err)
			}
			moved = append(moved, n)
		}
	}
	syncDir(dir)
	return nil
}

// writeFileSync writes b to a new file at p and syncs it.
func writeFileSync(p string, b []byte) error {
	f, err := os.OpenFile(p, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o666)
	if err != nil {
		return err
	}
	if _, err := f.Write(b); err != nil {
		f.Close()
		return err
	}
	if err := f.Sync(); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

// syncDir flushes a directory's entries (best effort: not every file
// system supports it).
func syncDir(dir string) {
	if d, err := os.Open(dir); err == nil {
		d.Sync()
		d.Close()
	}
}

// digest returns the size and SHA-256 of a staged file.
func digest(p, name string) (provOutput, error) {
	f, err := os.Open(p)
	if err != nil {
		return provOutput{}, err
	}
	defer f.Close()
	h := sha256.New()
	n, err := io.Copy(h, f)
	if err != nil {
		return provOutput{}, err
	}
	return provOutput{Name: name, Size: num{float64(n), "byte"}, SHA256: hex.EncodeToString(h.Sum(nil))}, nil
}
