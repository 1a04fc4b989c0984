package fanout

import (
	"os/exec"
	"syscall"
)

// setProcAttrs puts the child in a process group of its own (so that a
// stop reaches whatever it started too) and makes it get SIGTERM when this
// process dies.
func setProcAttrs(cmd *exec.Cmd) {
	cmd.SysProcAttr = &syscall.SysProcAttr{Pdeathsig: syscall.SIGTERM, Setpgid: true}
}

// terminate sends SIGTERM to the child's process group.
func terminate(cmd *exec.Cmd) error {
	return syscall.Kill(-cmd.Process.Pid, syscall.SIGTERM)
}
