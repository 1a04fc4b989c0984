package analysis

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"path/filepath"

	"lidscope/accumulate"
	"lidscope/config"
	"lidscope/pipeline"
	"lidscope/relations"
)

// ComputeClimatology is stage 1 of anomaly mode: one pass over the
// dataset's record (or over opt.Piece of it) that accumulates the per-cell
// calendar-month climatology (and its trend terms) and nothing else. The
// climatologies of the pieces merge (relations.Climatology.Merge, in time
// order) into that of the whole record, which stage 2 takes as
// Options.Climatology.
func ComputeClimatology(ctx context.Context, r *config.Study, d *config.Dataset, opt Options) (*relations.Climatology, error) {
	plan, err := pipeline.PlanFor(r, d)
	if err != nil {
		return nil, err
	}
	if why := NoRelations(plan); why != "" {
		return nil, fmt.Errorf("dataset %s: %s", d.Name, why)
	}
	plan.Workers = opt.Workers
	plan.Piece = opt.Piece
	plan.Log = opt.Log
	if opt.Progress != nil {
		plan.Progress = func(done, total int) { opt.Progress(d.Name, done, total) }
	}
	var clim *relations.Climatology
	plan.NewSinks = func(l accumulate.Layout) ([]pipeline.StepSink, error) {
		clim = relations.NewClimatology(l)
		return []pipeline.StepSink{clim}, nil
	}
	if _, err := pipeline.Run(ctx, plan); err != nil {
		return nil, err
	}
	return clim, nil
}

// WriteClimatology writes c to path (a temporary file renamed into place).
func WriteClimatology(path string, c *relations.Climatology) error {
	var b bytes.Buffer
	if err := c.Encode(&b); err != nil {
		return err
	}
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+"-")
	if err != nil {
		return err
	}
	if _, err := tmp.Write(b.Bytes()); err != nil {
		tmp.Close()
		os.Remove(tmp.Name())
		return err
	}
	if err := tmp.Close(); err != nil {
		os.Remove(tmp.Name())
		return err
	}
	return os.Rename(tmp.Name(), path)
}

// ReadClimatology reads a climatology written by WriteClimatology.
func ReadClimatology(path string) (*relations.Climatology, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	c, err := relations.DecodeClimatology(f)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	return c, nil
}

// MergeClimatologies reads the climatologies of the pieces (in time
// order) and merges them into the climatology of the whole record.
func MergeClimatologies(paths []string) (*relations.Climatology, error) {
	var all *relations.Climatology
	for _, p := range paths {
		c, err := ReadClimatology(p)
		if err != nil {
			return nil, err
		}
		if all == nil {
			all = c
			continue
		}
		if err := all.Merge(c); err != nil {
			return nil, fmt.Errorf("%s: %w", p, err)
		}
	}
	if all == nil {
		return nil, fmt.Errorf("no climatology to merge")
	}
	return all, nil
}
