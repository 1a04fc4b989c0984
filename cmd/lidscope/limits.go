package main

import (
	"github.com/spf13/pflag"

	"lidscope/cf"
)

// byteSize is the value of --memory-budget: bytes, or a size with a unit
// (4GiB, 512MB), read by cf.ParseBytes.
type byteSize int64

func (b *byteSize) String() string {
	if *b == 0 {
		return ""
	}
	return cf.FormatBytes(int64(*b))
}

func (b *byteSize) Set(s string) error {
	v, err := cf.ParseBytes(s)
	if err != nil {
		return err
	}
	*b = byteSize(v)
	return nil
}

func (b *byteSize) Type() string { return "SIZE" }

// addMemoryBudget declares --memory-budget (run: a time step or a run's
// per-column arrays; the study's limits.memory_budget is the default).
func addMemoryBudget(fs *pflag.FlagSet, p *byteSize) {
	fs.Var(p, "memory-budget", "refuse an input whose time step, or a run whose per-column arrays, need more memory than SIZE, e.g. 4GiB (default: the study's limits.memory_budget, else a quarter of the machine's memory, at most 8 GiB)")
}

// addInspectMemoryBudget declares inspect's --memory-budget: inspect reads
// no study, so only the time-step bound and the machine default apply.
func addInspectMemoryBudget(fs *pflag.FlagSet, p *byteSize) {
	fs.Var(p, "memory-budget", "report, without reading it, a field whose time step needs more memory than SIZE, e.g. 4GiB (default: a quarter of the machine's memory, at most 8 GiB)")
}
