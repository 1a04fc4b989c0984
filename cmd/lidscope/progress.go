package main

import (
	"io"
	"sync"

	"github.com/vbauerster/mpb/v8"
	"github.com/vbauerster/mpb/v8/decor"
)

// progressBars draws one bar per dataset or piece (mpb), with the steps
// done, the rate and the time left. Used only when stderr is a terminal.
type progressBars struct {
	p     *mpb.Progress
	mu    sync.Mutex
	bars  map[string]*mpb.Bar
	total map[string]int
	keys  []string
}

func newProgressBars(w io.Writer) *progressBars {
	return &progressBars{p: mpb.New(mpb.WithOutput(w), mpb.WithWidth(30)), bars: map[string]*mpb.Bar{}, total: map[string]int{}}
}

// add declares a bar ahead of its first report (so that the bars keep the
// order of the pieces).
func (b *progressBars) add(name string, total int) {
	b.mu.Lock()
	defer b.mu.Unlock()
	b.barLocked(name, total)
}

func (b *progressBars) barLocked(name string, total int) *mpb.Bar {
	bar, ok := b.bars[name]
	if !ok {
		bar = b.p.AddBar(int64(max(total, 1)),
			mpb.PrependDecorators(decor.Name(name, decor.WCSyncSpaceR), decor.CountersNoUnit("%d/%d steps", decor.WCSyncSpace)),
			mpb.AppendDecorators(decor.AverageSpeed(0, "%.1f steps/s", decor.WCSyncSpace), decor.Name(" left "), decor.AverageETA(decor.ET_STYLE_MMSS)))
		b.bars[name] = bar
		b.total[name] = max(total, 1)
		b.keys = append(b.keys, name)
	}
	return bar
}

// set reports done of total steps of name.
func (b *progressBars) set(name string, done, total int) {
	b.mu.Lock()
	bar := b.barLocked(name, total)
	if total > 0 && total != b.total[name] {
		b.total[name] = total
		bar.SetTotal(int64(total), false)
	}
	b.mu.Unlock()
	bar.SetCurrent(int64(done))
}

// stop ends the display: unfinished bars are aborted (left as drawn).
func (b *progressBars) stop() {
	b.mu.Lock()
	for _, k := range b.keys {
		if bar := b.bars[k]; !bar.Completed() {
			bar.Abort(false)
		}
	}
	b.mu.Unlock()
	b.p.Wait()
}
