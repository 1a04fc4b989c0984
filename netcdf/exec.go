package netcdf

import (
	"runtime"
	"sync"
)

// The netCDF-C library is not thread-safe, not even across different files,
// and the HDF5 library beneath it keeps its "print error stack" switch per OS
// thread (netCDF-C turns printing off only on the thread that initialised
// it). Every call into C therefore runs on a single goroutine locked to a
// single OS thread: the executor. Go code on any goroutine hands it a closure
// and waits for it to finish. The math on the data read is done by the
// callers, in parallel, outside the executor.

var (
	execOnce sync.Once
	execCh   chan func()
)

func startExecutor() {
	execCh = make(chan func())
	ready := make(chan struct{})
	go func() {
		runtime.LockOSThread() // never unlocked: this goroutine owns the thread for the process lifetime
		close(ready)
		for f := range execCh {
			f()
		}
	}()
	<-ready
}

// do runs f on the executor thread and returns when it has finished.
// f must not call do (that would deadlock).
func do(f func()) {
	execOnce.Do(startExecutor)
	done := make(chan struct{})
	execCh <- func() {
		defer close(done)
		f()
	}
	<-done
}
