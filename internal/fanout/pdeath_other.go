//go:build !linux

package fanout

import (
	"os"
	"os/exec"
)

func setProcAttrs(*exec.Cmd) {}

func terminate(cmd *exec.Cmd) error { return cmd.Process.Signal(os.Interrupt) }
