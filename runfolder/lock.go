package runfolder

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"time"

	"github.com/gofrs/flock"
)

// lockSuffix ends the name of a folder's lock file (".NAME" + lockSuffix,
// beside the folder: the folder itself is replaced whole by a commit).
const lockSuffix = ".lidscope-lock"

// LockPath is the lock file of the run folder dir.
func LockPath(dir string) string {
	dir = filepath.Clean(dir)
	return filepath.Join(filepath.Dir(dir), "."+filepath.Base(dir)+lockSuffix)
}

// Lock is a held lock on a run folder.
type Lock struct {
	fl        *flock.Flock
	exclusive bool
}

// ErrInUse marks a folder that another process holds.
var ErrInUse = errors.New("in use by another lidscope process")

// lockExclusive takes the exclusive lock of dir without waiting and writes
// this process's id into the lock file. When another process holds it,
// the error names that process (errors.Is(err, ErrInUse)).
func lockExclusive(dir string) (*Lock, error) {
	p := LockPath(dir)
	fl := flock.New(p, flock.SetFlag(os.O_CREATE|os.O_RDWR), flock.SetPermissions(0o644))
	ok, err := fl.TryLock()
	if err != nil {
		if errors.Is(err, fs.ErrPermission) || isReadOnlyFS(err) {
			return nil, fmt.Errorf("cannot write the outputs of %s: the folder %s must be writable: %w", dir, filepath.Dir(p), err)
		}
		return nil, fmt.Errorf("cannot lock %s (lock file %s): %w", dir, p, err)
	}
	if !ok {
		return nil, inUse(dir, p, "wait for it to finish or choose another --out")
	}
	who := fmt.Sprintf("pid %d\nsince %s\ncommand %s\n", os.Getpid(), time.Now().UTC().Format(time.RFC3339), strings.Join(os.Args, " "))
	if err := os.WriteFile(p, []byte(who), 0o644); err != nil {
		fl.Unlock()
		return nil, fmt.Errorf("cannot write the lock file %s: %w", p, err)
	}
	return &Lock{fl: fl, exclusive: true}, nil
}

// LockFolder takes the exclusive lock of a folder that is not a run folder
// but is written by lidscope (a comparison), without waiting; when another
// process holds it the error names that process (errors.Is(err,
// ErrInUse)). Release the lock when done.
func LockFolder(dir string) (*Lock, error) {
	abs, err := filepath.Abs(dir)
	if err != nil {
		return nil, err
	}
	if err := os.MkdirAll(filepath.Dir(abs), 0o777); err != nil {
		return nil, err
	}
	return lockExclusive(abs)
}

// lockShared takes a shared lock of dir without waiting. Where the lock
// file cannot be created (a read-only archive of runs), it returns a nil
// lock and no error: nobody can be writing there either.
func lockShared(dir string) (*Lock, error) {
	p := LockPath(dir)
	fl := flock.New(p)
	ok, err := fl.TryRLock()
	if err != nil {
		if errors.Is(err, fs.ErrPermission) || isReadOnlyFS(err) || errors.Is(err, fs.ErrNotExist) {
			return nil, nil
		}
		return nil, fmt.Errorf("cannot lock %s for reading (lock file %s): %w", dir, p, err)
	}
	if !ok {
		return nil, inUse(dir, p, "wait for it to finish, then read the folder")
	}
	return &Lock{fl: fl}, nil
}

func inUse(dir, lockFile, hint string) error {
	b, _ := os.ReadFile(lockFile)
	info := map[string]string{}
	for _, line := range strings.Split(string(b), "\n") {
		if k, v, ok := strings.Cut(line, " "); ok {
			info[k] = v
		}
	}
	who := "another lidscope process (reading it)"
	if pid := info["pid"]; pid != "" {
		who = "another lidscope process (pid " + pid
		if s := info["since"]; s != "" {
			who += ", since " + s
		}
		if c := info["command"]; c != "" {
			who += ": " + c
		}
		who += ")"
	}
	return &inUseError{fmt.Sprintf("%s is in use by %s; %s (lock file %s)", dir, who, hint, lockFile)}
}

type inUseError struct{ msg string }

func (e *inUseError) Error() string        { return e.msg }
func (e *inUseError) Is(target error) bool { return target == ErrInUse }

// Release releases the lock (a nil lock is a no-op). An exclusive lock's
// file is emptied first, so that it no longer names this process.
func (l *Lock) Release() error {
	if l == nil || l.fl == nil {
		return nil
	}
	if l.exclusive {
		os.Truncate(l.fl.Path(), 0)
	}
	err := l.fl.Unlock()
	l.fl = nil
	return err
}
