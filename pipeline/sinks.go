package pipeline

import (
	"lidscope/accumulate"
)

// Stage 6, sinks: every step goes, in time order, to the run's own
// accumulator (band series, regions, step count) and then to the plan's
// sinks (e.g. the relationship statistics).

// sinkSet is the run's accumulator and the further sinks.
type sinkSet struct {
	acc  *accumulate.Acc
	more []StepSink
}

// newSinks builds the run's accumulator on the analysis grid and the plan's
// sinks, the ones made from the layout (Plan.NewSinks) last.
func newSinks(p *Plan, in *inputs, area, bandW []float64) (*sinkSet, error) {
	g := in.grid
	names, cloud := quantities(p, in)
	acc, err := accumulate.New(accumulate.Layout{NLat: g.NLat(), NLon: g.NLon(), Lat: g.Lat, Lon: g.Lon,
		Area: area, BandWeight: bandW, Quantities: names, Cloud: cloud, Regions: p.Regions})
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
