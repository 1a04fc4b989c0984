package fanout

import "golang.org/x/sys/unix"

// affinityCPUs counts the CPUs of this process's affinity mask (0 when it
// cannot be read).
func affinityCPUs() int {
	var set unix.CPUSet
	if err := unix.SchedGetaffinity(0, &set); err != nil {
		return 0
	}
	return set.Count()
}
