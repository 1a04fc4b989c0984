package pipeline

import (
	"lidscope/accumulate"
)

// Stage 6, sinks: every step goes, in time order, to the run's own
// accumulator (band series, regions, step count) and then to the plan's
// sinks (e.g. the relationship statistics). The sinks run on their own
// goroutine, one step behind: while they take step k, the step compute and
// the blocks work on step k+1. Each sink still sees every step in time
// order, so the results are the same as one step at a time.

// sinkSet is the run's accumulator and the further sinks.
type sinkSet struct {
	acc  *accumulate.Acc
	more []StepSink
}

// newSinks builds the run's accumulator on the analysis grid and the plan's
// sinks, the ones made from the layout (Plan.NewSinks) last. Per-column
// statistics are kept for the analysed columns only (analysedColumns).
func newSinks(p *Plan, in *inputs, area, bandW []float64, ocean []bool) (*sinkSet, error) {
	g := in.grid
	names, cloud := quantities(p, in)
	cols := analysedColumns(p, in, ocean)
	acc, err := accumulate.New(accumulate.Layout{NLat: g.NLat(), NLon: g.NLon(), Lat: g.Lat, Lon: g.Lon,
		Area: area, BandWeight: bandW, Quantities: names, Cloud: cloud, Regions: p.Regions, Columns: cols,
		NoTransition: p.Regimes.HalfWidth == 0})
	if err != nil {
		return nil, err
	}
	s := &sinkSet{acc: acc, more: append([]StepSink{}, p.Sinks...)}
	if p.NewSinks != nil {
		more, err := p.NewSinks(acc.L)
		if err != nil {
			return nil, err
		}
		s.more = append(s.more, more...)
	}
	return s, nil
}

// add gives the step to every sink. The block workers must have added its
// cells to the accumulator already.
func (s *sinkSet) add(step *accumulate.Step) {
	s.acc.AddStep(step)
	for _, sk := range s.more {
		sk.AddStep(step)
	}
}

// sinkLine runs the sinks of a sinkSet on their own goroutine.
type sinkLine struct {
	jobs chan sinkJob
	done chan struct{}
}

// sinkJob is one step for the sinks and what to do once they have it.
type sinkJob struct {
	step  *accumulate.Step
	after func()
}

// start starts the sinks' goroutine.
func (s *sinkSet) start() *sinkLine {
	l := &sinkLine{jobs: make(chan sinkJob, 1), done: make(chan struct{})}
	go func() {
		defer close(l.done)
		for j := range l.jobs {
			s.add(j.step)
			j.after()
		}
	}()
	return l
}

// add queues a step; after runs once every sink has it (then the step's
// slices may be reused).
func (l *sinkLine) add(step *accumulate.Step, after func()) {
	l.jobs <- sinkJob{step, after}
}

// stop waits until the sinks have every queued step, and ends the goroutine.
func (l *sinkLine) stop() {
	close(l.jobs)
	<-l.done
}
