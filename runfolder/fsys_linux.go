package runfolder

import (
	"errors"

	"golang.org/x/sys/unix"
)

// exchange swaps the folders a and b atomically.
func exchange(a, b string) (supported bool, err error) {
	err = unix.Renameat2(unix.AT_FDCWD, a, unix.AT_FDCWD, b, unix.RENAME_EXCHANGE)
	if errors.Is(err, unix.EINVAL) || errors.Is(err, unix.ENOSYS) || errors.Is(err, unix.EOPNOTSUPP) {
		return false, nil
	}
	return true, err
}

// freeBytes is the space an unprivileged user may still use on the file
// system that holds path.
func freeBytes(path string) (int64, bool) {
	var st unix.Statfs_t
	if err := unix.Statfs(path, &st); err != nil {
		return 0, false
	}
	return int64(st.Bavail) * int64(st.Bsize), true
}

func isReadOnlyFS(err error) bool { return errors.Is(err, unix.EROFS) }
