package fanout

import (
	"os"
	"runtime"
	"strconv"
	"strings"
)

// CPUs is the number of CPUs this process may use: SLURM_CPUS_PER_TASK
// when the batch scheduler set it, else the CPUs of the process's affinity
// mask (what taskset, cgroups' cpusets and batch schedulers restrict),
// else runtime.NumCPU.
func CPUs() int {
	if v := strings.TrimSpace(os.Getenv("SLURM_CPUS_PER_TASK")); v != "" {
		if n, err := strconv.Atoi(v); err == nil && n > 0 {
			return n
		}
	}
	if n := affinityCPUs(); n > 0 {
		return n
	}
	return runtime.NumCPU()
}
