package runfolder

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
)

// Folder is a committed run folder opened for reading.
type Folder struct {
	Dir      string
	Manifest *Manifest
	lock     *Lock
}

// IncompleteError is a folder that holds no complete, committed run.
type IncompleteError struct {
	Dir     string
	Missing []string // files that are not there
	Changed []string // files whose size differs from the manifest
	Reason  string
}

func (e *IncompleteError) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s is not a complete lidscope run", e.Dir)
	if len(e.Missing) > 0 {
		fmt.Fprintf(&b, "; missing: %s", strings.Join(e.Missing, ", "))
	}
	if len(e.Changed) > 0 {
		fmt.Fprintf(&b, "; changed since the run: %s", strings.Join(e.Changed, ", "))
	}
	b.WriteString("; ")
	b.WriteString(e.Reason)
	return b.String()
}

// ErrIncomplete matches every *IncompleteError with errors.Is.
var ErrIncomplete = errors.New("not a complete lidscope run")

// Is makes errors.Is(err, ErrIncomplete) true.
func (e *IncompleteError) Is(target error) bool { return target == ErrIncomplete }

// Open opens the committed run in dir for reading, with a shared lock. It
// refuses a folder without a manifest, one whose listed files are missing
// or changed in size, and one whose run lacks a file in need; the error (an
// *IncompleteError) names the files. Close the Folder when done.
func Open(dir string, need ...string) (_ *Folder, err error) {
	st, err := os.Stat(dir)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			holds := ManifestFile
			if len(need) > 0 {
				holds = strings.Join(need, ", ") + " and " + ManifestFile
			}
			return nil, fmt.Errorf("run folder %s does not exist (give the folder of a finished run; it holds %s): %w", dir, holds, err)
		}
		return nil, err
	}
	if !st.IsDir() {
		return nil, fmt.Errorf("%s is a file, not a run folder", dir)
	}
	lock, err := lockShared(dir)
	if err != nil {
		return nil, err
	}
	defer func() {
		if err != nil {
			lock.Release()
		}
	}()
	m, ok, err := readManifest(dir)
	if err != nil {
		return nil, err
	}
	if !ok {
		e := &IncompleteError{Dir: dir, Missing: []string{ManifestFile},
			Reason: "a run writes " + ManifestFile + " last, when all its files are in place: the run that wrote here did not finish, or the folder was put together by hand or by an older lidscope; run it again"}
		for _, n := range need {
			if _, err := os.Lstat(filepath.Join(dir, n)); err != nil {
				e.Missing = append(e.Missing, n)
			}
		}
		switch {
		case exists(filepath.Join(dir, "comparison.json")):
			// A comparison folder is not a run: "run it again" would mislead.
			e.Reason = "it holds a comparison (comparison.json), not a run: give the folder of a finished run; lidscope compare draws the comparison figures when it writes them"
		case len(need) > 0 && len(e.Missing) == 1+len(need):
			// None of a run's files: a data folder, or a typo.
			e.Reason = "it holds none of a run's files: give the folder a finished lidscope run wrote (its --out, or the study's output.dir/DATASET)"
		}
		return nil, e
	}
	e := &IncompleteError{Dir: dir, Reason: "the folder was changed after its run was committed; run it again"}
	for _, f := range m.Files {
		fi, err := os.Lstat(filepath.Join(dir, filepath.FromSlash(f.Name)))
		switch {
		case err != nil:
			e.Missing = append(e.Missing, f.Name)
		case !fi.Mode().IsRegular() || fi.Size() != f.Size:
			e.Changed = append(e.Changed, fmt.Sprintf("%s (%d bytes, the run wrote %d)", f.Name, fi.Size(), f.Size))
		}
	}
	var notRun []string
	for _, n := range need {
		if !m.Has(n) {
			notRun = append(notRun, n)
		}
	}
	if len(e.Missing)+len(e.Changed) == 0 && len(notRun) > 0 {
		e.Missing = notRun
		e.Reason = "its run did not write them (made by another kind of run, or by another lidscope version)"
	}
	if len(e.Missing)+len(e.Changed) > 0 {
		return nil, e
	}
	return &Folder{Dir: dir, Manifest: m, lock: lock}, nil
}

// Path is the path of the run's file name.
func (f *Folder) Path(name string) string { return filepath.Join(f.Dir, filepath.FromSlash(name)) }

// Has reports whether the run wrote name.
func (f *Folder) Has(name string) bool { return f.Manifest.Has(name) }

// Verify checks every result file's SHA-256 against the manifest.
func (f *Folder) Verify() error {
	e := &IncompleteError{Dir: f.Dir, Reason: "the folder was changed after its run was committed; run it again"}
	for _, want := range f.Manifest.Files {
		got, err := hashFile(f.Path(want.Name), false)
		switch {
		case err != nil:
			e.Missing = append(e.Missing, want.Name)
		case got.Size != want.Size || got.SHA256 != want.SHA256:
			e.Changed = append(e.Changed, want.Name+" (its checksum differs from the run's)")
		}
	}
	if len(e.Missing)+len(e.Changed) > 0 {
		return e
	}
	return nil
}

// Close releases the folder's shared lock.
func (f *Folder) Close() error {
	if f == nil {
		return nil
	}
	err := f.lock.Release()
	f.lock = nil
	return err
}

// Leftovers lists the hidden staging and retired folders beside dir that
// interrupted runs left (the next run into dir removes them).
func Leftovers(dir string) []string {
	abs, err := filepath.Abs(dir)
	if err != nil {
		return nil
	}
	parent, base := filepath.Dir(abs), filepath.Base(abs)
	ents, err := os.ReadDir(parent)
	if err != nil {
		return nil
	}
	var out []string
	for _, e := range ents {
		n := e.Name()
		if strings.HasPrefix(n, "."+base+stagingTag) || strings.HasPrefix(n, "."+base+retiredTag) {
			out = append(out, filepath.Join(parent, n))
		}
	}
	return out
}

// exists reports whether path names something on disk.
func exists(path string) bool {
	_, err := os.Lstat(path)
	return err == nil
}
