//go:build !linux

package runfolder

// exchange is not available here: Commit moves the earlier run aside first.
func exchange(a, b string) (bool, error) { return false, nil }

// freeBytes is unknown here: the space check is skipped.
func freeBytes(string) (int64, bool) { return 0, false }

func isReadOnlyFS(error) bool { return false }
