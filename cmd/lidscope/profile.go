package main

import (
	"errors"
	"fmt"
	"os"
	"runtime"
	"runtime/pprof"
	"runtime/trace"

	"github.com/spf13/pflag"
)

// profileOptions are run's --cpuprofile FILE, --memprofile FILE and
// --trace FILE: a CPU profile and a memory profile (go tool pprof) and an
// execution trace (go tool trace) of the whole command. bench/README.md
// shows how to read them.
type profileOptions struct {
	CPU   string
	Mem   string
	Trace string
}

func (p *profileOptions) register(fs *pflag.FlagSet) {
	fs.StringVar(&p.CPU, "cpuprofile", "", "write a CPU profile of the run to `FILE` (read it with go tool pprof)")
	fs.StringVar(&p.Mem, "memprofile", "", "write a memory profile of the run to `FILE` at its end: every allocation (go tool pprof -sample_index=alloc_space)")
	fs.StringVar(&p.Trace, "trace", "", "write an execution trace of the run to `FILE` (read it with go tool trace)")
}

// start starts what was asked for; stop ends it and closes the files. An
// error of stop means the profile or trace is incomplete.
func (p profileOptions) start() (stop func() error, err error) {
	var closers []func() error
	stop = func() error {
		var errs []error
		for i := len(closers) - 1; i >= 0; i-- {
			errs = append(errs, closers[i]())
		}
		closers = nil
		return errors.Join(errs...)
	}
	if p.CPU != "" {
		f, err := os.Create(p.CPU)
		if err != nil {
			return nil, fmt.Errorf("--cpuprofile: %w", err)
		}
		if err := pprof.StartCPUProfile(f); err != nil {
			f.Close()
			return nil, fmt.Errorf("--cpuprofile %s: %w", p.CPU, err)
		}
		closers = append(closers, func() error {
			pprof.StopCPUProfile()
			if err := f.Close(); err != nil {
				return fmt.Errorf("--cpuprofile %s: %w", p.CPU, err)
			}
			return nil
		})
	}
	if p.Mem != "" {
		f, err := os.Create(p.Mem)
		if err != nil {
			stop()
			return nil, fmt.Errorf("--memprofile: %w", err)
		}
		closers = append(closers, func() error {
			runtime.GC() // the profile holds the allocations up to the last collection
			err := pprof.Lookup("allocs").WriteTo(f, 0)
			if cerr := f.Close(); err == nil {
				err = cerr
			}
			if err != nil {
				return fmt.Errorf("--memprofile %s: %w", p.Mem, err)
			}
			return nil
		})
	}
	if p.Trace != "" {
		f, err := os.Create(p.Trace)
		if err != nil {
			stop()
			return nil, fmt.Errorf("--trace: %w", err)
		}
		if err := trace.Start(f); err != nil {
			f.Close()
			stop()
			return nil, fmt.Errorf("--trace %s: %w", p.Trace, err)
		}
		closers = append(closers, func() error {
			trace.Stop()
			if err := f.Close(); err != nil {
				return fmt.Errorf("--trace %s: %w", p.Trace, err)
			}
			return nil
		})
	}
	return stop, nil
}
