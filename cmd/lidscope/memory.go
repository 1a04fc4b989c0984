package main

import (
	"fmt"
	"io"

	"lidscope/analysis"
	"lidscope/config"
	"lidscope/pipeline"
)

// writeMemoryEstimates prints, as comment lines, the memory a run of each
// dataset of r is expected to need (or why it cannot be estimated: the
// inputs are opened, headers only).
func writeMemoryEstimates(w io.Writer, r *config.Study) {
	for i := range r.Datasets {
		d := &r.Datasets[i]
		m, err := analysis.EstimateMemory(r, d)
		if err != nil {
			fmt.Fprintf(w, "# memory: dataset %s: no estimate (%v)\n", d.Name, err)
			continue
		}
		fmt.Fprintf(w, "# memory: %s\n", m)
	}
}

// writeGridMemory prints, for inspect, the per-cell state a run on the
// analysis grid of these files would keep (the default quantities: sst,
// t700, lts, eis and a cloud field; four fields read per step) and the
// peak it implies; `lidscope study check` gives the estimate for a study.
func writeGridMemory(w io.Writer, gr pipeline.GridReport) {
	if len(gr.Groups) == 0 {
		return
	}
	g := gr.Groups[0].Grid
	if gr.SuggestGrid != nil && !gr.Match() {
		g = gr.SuggestGrid
	}
	acc, buf := pipeline.StateBytesPerCell(5, 3, 4)
	n := int64(g.Size())
	state := int64(acc) * n
	total := int64(45<<20) + state + int64(buf)*n + 2*state + n*(5*3*8+12*4)
	fmt.Fprintf(w, "memory: a run on %s (%d cells) keeps about %d B of state per analysed (ocean) column (at most %.0f MB, if every cell were ocean) and needs at most about %.0f MB at its peak; lidscope study check estimates it for a study, with its ocean mask\n",
		g, n, acc, float64(state)/(1<<20), float64(total)/(1<<20))
}
