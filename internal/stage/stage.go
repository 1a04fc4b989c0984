// Package stage writes a set of files into a directory as one unit.
//
// Each file is first written into a hidden staging directory inside the
// destination (so the final move is a rename within one file system) and
// the set is moved to its final names only once every file is complete.
// When a move fails part-way, the files already moved are removed again and
// the files they replaced are put back, so the destination either holds the
// whole new set or what it held before.
//
// Messages name the files and directories involved; callers add their
// package name and the option that allows replacing files.
package stage

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
)

// previousPrefix names, inside the staging directory, a file that a
// replacing Commit moved aside.
const previousPrefix = ".previous-"

// Existing returns those of names that already exist in dir, in the order
// of names. A name held by anything other than a regular file (a
// directory, a symbolic link, a device) is an error, replacing or not.
func Existing(dir string, names []string) ([]string, error) {
	var exist []string
	for _, n := range names {
		p := filepath.Join(dir, n)
		st, err := os.Lstat(p)
		if errors.Is(err, fs.ErrNotExist) {
			continue
		}
		if err != nil {
			return nil, err
		}
		if !st.Mode().IsRegular() {
			return nil, fmt.Errorf("%s exists and is not a regular file; remove it or choose another output directory", p)
		}
		exist = append(exist, n)
	}
	return exist, nil
}

// Dir is a hidden staging directory inside a destination directory.
type Dir struct {
	dest, path string

	// BeforeMove, when set, is called with each name just before Commit
	// moves it into place; an error stops Commit there as a failed move
	// would (for tests that inject failures).
	BeforeMove func(name string) error
}

// New creates a staging directory inside dest, which must exist and be
// writable. Its name is pattern followed by a random string (see
// os.MkdirTemp); start pattern with a dot to keep it hidden. Call Remove
// when done, whether Commit was called or not.
func New(dest, pattern string) (*Dir, error) {
	p, err := os.MkdirTemp(dest, pattern)
	if err != nil {
		return nil, err
	}
	return &Dir{dest: dest, path: p}, nil
}

// Path returns where the file name is staged.
func (d *Dir) Path(name string) string { return filepath.Join(d.path, name) }

// WriteFile writes b to the new staged file name and syncs it to disk.
func (d *Dir) WriteFile(name string, b []byte) error {
	f, err := os.OpenFile(d.Path(name), os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o666)
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

// Remove deletes the staging directory and whatever is left in it.
func (d *Dir) Remove() error { return os.RemoveAll(d.path) }

// Commit moves the staged files names, in order, to the same names in the
// destination.
//
// Without replace an existing file is never overwritten, not even one that
// appeared after the caller checked with Existing: each file is hard-linked
// into place, which fails on an existing name (where the file system has no
// hard links, it is renamed after a check). That error wraps fs.ErrExist.
// With replace an existing file is first moved aside into the staging
// directory.
//
// On any error the files moved so far are removed and the ones moved aside
// are put back. On success the destination directory is synced (where the
// file system supports it).
func (d *Dir) Commit(names []string, replace bool) (err error) {
	var moved, aside []string
	defer func() {
		if err == nil {
			return
		}
		for i := len(moved) - 1; i >= 0; i-- {
			os.Remove(filepath.Join(d.dest, moved[i]))
		}
		for _, n := range aside {
			os.Rename(d.Path(previousPrefix+n), filepath.Join(d.dest, n))
		}
	}()
	for _, n := range names {
		if d.BeforeMove != nil {
			if err := d.BeforeMove(n); err != nil {
				return fmt.Errorf("moving %s into %s: %w", n, d.dest, err)
			}
		}
		src, dst := d.Path(n), filepath.Join(d.dest, n)
		if replace {
			if _, err := os.Lstat(dst); err == nil {
				if err := os.Rename(dst, d.Path(previousPrefix+n)); err != nil {
					return fmt.Errorf("cannot move the earlier %s aside: %w", dst, err)
				}
				aside = append(aside, n)
			}
			if err := os.Rename(src, dst); err != nil {
				return err
			}
			moved = append(moved, n)
			continue
		}
		switch lerr := os.Link(src, dst); {
		case lerr == nil:
		case errors.Is(lerr, fs.ErrExist):
			return appeared(dst)
		default: // no hard links here: check, then rename
			if _, serr := os.Lstat(dst); serr == nil {
				return appeared(dst)
			}
			if err := os.Rename(src, dst); err != nil {
				return err
			}
		}
		moved = append(moved, n)
	}
	syncDir(d.dest)
	return nil
}

func appeared(path string) error {
	return fmt.Errorf("%s appeared while the outputs were being written: %w; nothing was written", path, fs.ErrExist)
}

// syncDir flushes a directory's entries (best effort: not every file
// system supports it).
func syncDir(dir string) {
	if f, err := os.Open(dir); err == nil {
		f.Sync()
		f.Close()
	}
}
