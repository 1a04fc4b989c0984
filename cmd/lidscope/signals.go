package main

import (
	"context"
	"os"
	"os/signal"
)

// stopSignals are the signals that stop a long command cleanly: the
// command's context is cancelled, the streaming pass ends at the next time
// step and nothing half-written is left under a final name. This list and
// signalContext are the one place that decides how lidscope reacts to
// signals.
var stopSignals = []os.Signal{os.Interrupt}

// signalContext returns a context that is cancelled when one of
// stopSignals arrives; stop restores the default handling. main gives it to
// the commands that watch their context (env.interruptible); the others
// keep the default handling, so Ctrl-C ends them at once.
func signalContext(parent context.Context) (ctx context.Context, stop context.CancelFunc) {
	return signal.NotifyContext(parent, stopSignals...)
}
