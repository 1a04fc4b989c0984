//go:build linux || darwin || freebsd || netbsd || openbsd

package analysis

import (
	"os"
	"syscall"
	"time"
)

// fileChange is a file's status-change time and inode.
type fileChange struct {
	ctime time.Time
	inode uint64
	ok    bool
}

// statChange reads the ctime and inode of a stat result.
func statChange(fi os.FileInfo) fileChange {
	st, ok := fi.Sys().(*syscall.Stat_t)
	if !ok {
		return fileChange{}
	}
	sec, nsec := ctimeOf(st)
	return fileChange{ctime: time.Unix(sec, nsec), inode: uint64(st.Ino), ok: true}
}
