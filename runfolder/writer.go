package runfolder

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"
)

// Name parts of the hidden folders beside a target NAME:
// ".NAME.lidscope-staging-*" and ".NAME.lidscope-retired-*".
const (
	stagingTag = ".lidscope-staging-"
	retiredTag = ".lidscope-retired-"
)

// Options control Create.
type Options struct {
	// Replace allows replacing a committed run (the --force flag). The
	// earlier run stays in place, untouched, until Commit.
	Replace bool
	// Known are the names an earlier lidscope could have left in a run
	// folder without a manifest (its result files and figures folder):
	// with Replace, a folder holding only such names may be replaced.
	Known []string
	// Estimate is the estimated size of the outputs, in bytes: Create
	// refuses when the target's file system has less room.
	Estimate int64
	// Version is recorded in the manifest.
	Version string
}

// Stage is a run being written: a hidden staging folder beside the target
// that every writer of the run writes into, and the target's lock.
type Stage struct {
	target, parent, base string
	dir                  string
	lock                 *Lock
	opt                  Options
	committed            bool
	// Cleaned lists the staging folders of interrupted runs that Create
	// removed, and the earlier runs it put back (see Restored).
	Cleaned []string
	// Restored is set when Create put back an earlier run that an
	// interrupted replacement had moved aside.
	Restored string
	// BeforeSwap, when set (by tests), is called just before the staged
	// folder is moved into place; an error stops Commit there.
	BeforeSwap func() error
}

// Create prepares writing a run into target (see the package
// documentation). The caller must Close the Stage.
func Create(target string, opt Options) (_ *Stage, err error) {
	if target == "" {
		return nil, errors.New("the output folder is empty; give a folder name (--out)")
	}
	abs, err := filepath.Abs(target)
	if err != nil {
		return nil, fmt.Errorf("the output folder %s: %w", target, err)
	}
	s := &Stage{target: target, parent: filepath.Dir(abs), base: filepath.Base(abs), opt: opt}
	if s.base == string(filepath.Separator) || s.base == "." || s.base == ".." || abs == s.parent {
		return nil, fmt.Errorf("%s cannot be a run folder: give a folder below it", target)
	}
	if err := os.MkdirAll(s.parent, 0o777); err != nil {
		return nil, fmt.Errorf("cannot create %s for the output folder %s: %w", s.parent, target, err)
	}
	if s.lock, err = lockExclusive(abs); err != nil {
		return nil, err
	}
	defer func() {
		if err != nil {
			s.lock.Release()
		}
	}()
	if err := s.cleanLeftovers(abs); err != nil {
		return nil, err
	}
	if err := s.checkTarget(abs); err != nil {
		return nil, err
	}
	d, err := os.MkdirTemp(s.parent, "."+s.base+stagingTag)
	if err != nil {
		return nil, fmt.Errorf("cannot write the outputs of %s: the folder %s must be writable: %w", target, s.parent, err)
	}
	s.dir = d
	if err := os.Chmod(d, 0o755); err != nil { // MkdirTemp makes it 0700
		os.RemoveAll(d)
		return nil, err
	}
	if opt.Estimate > 0 {
		if free, ok := freeBytes(d); ok && free < opt.Estimate {
			os.RemoveAll(d)
			return nil, fmt.Errorf("no room for the outputs in %s: its file system has %s free and the run needs about %s; free some space or choose another --out", s.parent, mb(free), mb(opt.Estimate))
		}
	}
	return s, nil
}

func mb(n int64) string { return fmt.Sprintf("%.1f MB", float64(n)/1e6) }

// cleanLeftovers removes the staging folders of interrupted runs (the lock
// is held: no live run owns them) and puts back an earlier run that an
// interrupted replacement moved aside.
func (s *Stage) cleanLeftovers(abs string) error {
	ents, err := os.ReadDir(s.parent)
	if err != nil {
		return fmt.Errorf("cannot read %s: %w", s.parent, err)
	}
	for _, e := range ents {
		n := e.Name()
		p := filepath.Join(s.parent, n)
		switch {
		case strings.HasPrefix(n, "."+s.base+stagingTag):
			if err := os.RemoveAll(p); err != nil {
				return fmt.Errorf("cannot remove %s, left by an interrupted run: %w", p, err)
			}
			s.Cleaned = append(s.Cleaned, p)
		case strings.HasPrefix(n, "."+s.base+retiredTag):
			if _, err := os.Lstat(abs); errors.Is(err, fs.ErrNotExist) {
				if _, ok, _ := readManifest(p); ok {
					if err := os.Rename(p, abs); err != nil {
						return fmt.Errorf("cannot put back the earlier run %s as %s: %w", p, abs, err)
					}
					s.Restored = p
					continue
				}
			}
			if err := os.RemoveAll(p); err != nil {
				return fmt.Errorf("cannot remove %s, left by an interrupted run: %w", p, err)
			}
			s.Cleaned = append(s.Cleaned, p)
		}
	}
	return nil
}

// checkTarget refuses a target that may not be replaced.
func (s *Stage) checkTarget(abs string) error {
	st, err := os.Lstat(abs)
	if errors.Is(err, fs.ErrNotExist) {
		return nil
	}
	if err != nil {
		return err
	}
	if st.Mode()&fs.ModeSymlink != 0 {
		return fmt.Errorf("%s is a symbolic link; give the folder it points to, or another --out", s.target)
	}
	if !st.IsDir() {
		return fmt.Errorf("%s is a file, not a folder; give a folder for the outputs (--out)", s.target)
	}
	foreign, committed, err := s.foreign(abs)
	if err != nil {
		return err
	}
	if len(foreign) > 0 {
		return fmt.Errorf("%s holds files that are not part of a lidscope run (%s); a run replaces its folder whole, so move them or choose another --out", s.target, list(foreign))
	}
	if empty, _ := isEmpty(abs); empty {
		return nil
	}
	if !s.opt.Replace {
		what := "the results of an earlier run"
		if !committed {
			what = "files of an earlier run that was never committed (no " + ManifestFile + ")"
		}
		return existError{fmt.Sprintf("%s already holds %s; use --force to replace them (the earlier run stays untouched until the new one is complete) or choose another --out", s.target, what)}
	}
	return nil
}

// foreign lists the entries of the target folder that are not the run's.
func (s *Stage) foreign(abs string) (names []string, committed bool, err error) {
	ents, err := os.ReadDir(abs)
	if err != nil {
		return nil, false, fmt.Errorf("cannot read %s: %w", s.target, err)
	}
	m, committed, merr := readManifest(abs)
	if merr != nil {
		m = nil // a damaged manifest: fall back on the known names
	}
	known := map[string]bool{ManifestFile: true}
	for _, k := range s.opt.Known {
		known[k] = true
	}
	for _, e := range ents {
		n := e.Name()
		if known[n] || (m != nil && m.owns(n)) {
			continue
		}
		names = append(names, n)
	}
	sort.Strings(names)
	return names, committed && merr == nil, nil
}

func isEmpty(dir string) (bool, error) {
	ents, err := os.ReadDir(dir)
	return len(ents) == 0, err
}

func list(names []string) string {
	if len(names) > 8 {
		return strings.Join(names[:8], ", ") + fmt.Sprintf(" and %d more", len(names)-8)
	}
	return strings.Join(names, ", ")
}

// Dir is the staging folder.
func (s *Stage) Dir() string { return s.dir }

// Target is the run folder the stage commits to, as given to Create.
func (s *Stage) Target() string { return s.target }

// Path is where the file name (slash-separated, relative to the run
// folder) is staged.
func (s *Stage) Path(name string) string { return filepath.Join(s.dir, filepath.FromSlash(name)) }

// FinalPath is where the file name will be once the run is committed.
func (s *Stage) FinalPath(name string) string {
	return filepath.Join(s.target, filepath.FromSlash(name))
}

// WriteFile writes the new staged file name.
func (s *Stage) WriteFile(name string, b []byte) error {
	p := s.Path(name)
	if err := os.MkdirAll(filepath.Dir(p), 0o777); err != nil {
		return err
	}
	f, err := os.OpenFile(p, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o666)
	if err != nil {
		return err
	}
	if _, err := f.Write(b); err != nil {
		f.Close()
		return fmt.Errorf("writing %s: %w", s.FinalPath(name), err)
	}
	if err := f.Close(); err != nil {
		return fmt.Errorf("writing %s: %w", s.FinalPath(name), err)
	}
	return nil
}

// Commit moves the staged run into place in one step (see the package
// documentation) and returns its manifest. It refuses when ctx is done.
func (s *Stage) Commit(ctx context.Context) (*Manifest, error) {
	if s.committed {
		return nil, errors.New("the run is committed already")
	}
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("not committed (nothing in %s changed): %w", s.target, err)
	}
	abs := filepath.Join(s.parent, s.base)
	m, err := scan(s.dir)
	if err != nil {
		return nil, fmt.Errorf("staging the outputs of %s: %w", s.target, err)
	}
	m.Version = s.opt.Version
	b, err := json.MarshalIndent(m, "", "  ")
	if err != nil {
		return nil, err
	}
	if err := s.WriteFile(ManifestFile, append(b, '\n')); err != nil {
		return nil, err
	}
	if _, err := hashFile(s.Path(ManifestFile), true); err != nil {
		return nil, err
	}
	syncDir(s.dir)
	// Nothing but lidscope may have appeared in the target meanwhile.
	if _, err := os.Lstat(abs); err == nil {
		if err := s.checkTarget(abs); err != nil {
			return nil, fmt.Errorf("not committed: %w", err)
		}
	}
	if s.BeforeSwap != nil {
		if err := s.BeforeSwap(); err != nil {
			return nil, fmt.Errorf("not committed (nothing in %s changed): %w", s.target, err)
		}
	}
	if err := s.swap(abs); err != nil {
		return nil, err
	}
	s.committed = true
	syncDir(s.parent)
	return m, nil
}

// swap moves the staging folder to abs; an earlier folder there ends up
// in the staging folder's place and is removed.
func (s *Stage) swap(abs string) error {
	if _, err := os.Lstat(abs); errors.Is(err, fs.ErrNotExist) {
		if err := os.Rename(s.dir, abs); err != nil {
			return fmt.Errorf("moving the outputs into %s: %w", s.target, err)
		}
		return nil
	}
	ok, err := exchange(s.dir, abs)
	if err != nil {
		return fmt.Errorf("moving the outputs into %s: %w", s.target, err)
	}
	if ok {
		os.RemoveAll(s.dir) // the earlier run
		return nil
	}
	aside, err := os.MkdirTemp(s.parent, "."+s.base+retiredTag)
	if err != nil {
		return fmt.Errorf("cannot move the earlier run in %s aside: %w", s.target, err)
	}
	os.Remove(aside)
	if err := os.Rename(abs, aside); err != nil {
		return fmt.Errorf("cannot move the earlier run in %s aside: %w", s.target, err)
	}
	if err := os.Rename(s.dir, abs); err != nil {
		os.Rename(aside, abs)
		return fmt.Errorf("moving the outputs into %s (the earlier run is back in place): %w", s.target, err)
	}
	os.RemoveAll(aside)
	return nil
}

// Close removes the staging folder unless the run was committed, and
// releases the lock. It may be called more than once.
func (s *Stage) Close() error {
	var err error
	if !s.committed && s.dir != "" {
		err = os.RemoveAll(s.dir)
		s.dir = ""
	}
	if s.lock != nil {
		if e := s.lock.Release(); err == nil {
			err = e
		}
		s.lock = nil
	}
	return err
}

// syncDir flushes a folder's entries (best effort).
func syncDir(dir string) {
	if f, err := os.Open(dir); err == nil {
		f.Sync()
		f.Close()
	}
}

// existError is a refusal to replace an earlier run: errors.Is(err,
// fs.ErrExist) holds, without the bare "file already exists" appended to a
// message that already says what to do.
type existError struct{ msg string }

func (e existError) Error() string { return e.msg }
func (e existError) Unwrap() error { return fs.ErrExist }
