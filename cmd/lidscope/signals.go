package main

import (
	"context"
	"os"
	"os/signal"
	"sync/atomic"
	"syscall"
)

// stopSignals are the signals that stop a long command cleanly: Ctrl-C
// (SIGINT), SIGTERM (what batch schedulers and timeout(1) send) and SIGHUP
// (a closed terminal). The command's context is cancelled, the streaming
// pass ends at the next time step, the run's staging folder is removed and
// the output folder is left as it was; the process exits with 128 + the
// signal's number (130, 143, 129). A second signal ends the process at
// once (the next run into the folder removes what it left). This list and
// signalCatcher are the one place that decides how lidscope reacts to
// signals.
var stopSignals = []os.Signal{os.Interrupt, syscall.SIGTERM, syscall.SIGHUP}

// signalCatcher cancels the contexts it makes when a stop signal arrives
// and remembers the signal for the exit status.
type signalCatcher struct {
	got atomic.Value // os.Signal
}

// context returns a context that is cancelled when one of stopSignals
// arrives; stop restores the default handling. main gives it to the
// commands that watch their context (env.interruptible); the others keep
// the default handling.
func (c *signalCatcher) context(parent context.Context) (context.Context, context.CancelFunc) {
	ctx, cancel := context.WithCancel(parent)
	ch := make(chan os.Signal, 1)
	signal.Notify(ch, stopSignals...)
	done := make(chan struct{})
	go func() {
		select {
		case s := <-ch:
			c.got.Store(s)
			signal.Stop(ch) // a second signal takes its default action
			cancel()
		case <-done:
		}
	}()
	return ctx, func() {
		signal.Stop(ch)
		close(done)
		cancel()
	}
}

// caught returns the stop signal that arrived, or nil.
func (c *signalCatcher) caught() os.Signal {
	s, _ := c.got.Load().(os.Signal)
	return s
}

// signalStatus is the exit status of a process stopped by s: 128 + its
// number, as shells report a process killed by it.
func signalStatus(s os.Signal) int {
	if n, ok := s.(syscall.Signal); ok {
		return 128 + int(n)
	}
	return 1
}

// signalName names a stop signal as users know it.
func signalName(s os.Signal) string {
	switch s {
	case os.Interrupt:
		return "SIGINT (Ctrl-C)"
	case syscall.SIGTERM:
		return "SIGTERM"
	case syscall.SIGHUP:
		return "SIGHUP"
	}
	return s.String()
}
