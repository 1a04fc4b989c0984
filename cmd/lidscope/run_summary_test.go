package main

import (
	"bytes"
	"strings"
	"testing"

	"lidscope/accumulate"
	"lidscope/analysis"
	"lidscope/grid"
	"lidscope/output"
	"lidscope/pipeline"
)

// The console summary of a run without optional inputs lists the
// quantities it has and what it lacks; a full run's summary does not.
func TestRunSummarySaysWhatIsAbsent(t *testing.T) {
	g, err := grid.GlobalRegular(10, 10, -175)
	if err != nil {
		t.Fatal(err)
	}
	rep := func(q []string, absent []string) analysis.Report {
		return analysis.Report{Dataset: "d", OutDir: "out/d",
			Result: &pipeline.Result{Acc: &accumulate.Acc{L: accumulate.Layout{Quantities: q}}, Grid: g},
			Meta:   output.Meta{Period: "2001-01 … 2001-12", Absent: absent}}
	}
	var b bytes.Buffer
	writeRunSummary(&b, rep([]string{"sst"}, []string{"no air_temperature input: no 700 hPa temperature, LTS or EIS"}))
	for _, want := range []string{"  quantities: sst\n", "  without: no air_temperature input: no 700 hPa temperature, LTS or EIS\n"} {
		if !strings.Contains(b.String(), want) {
			t.Errorf("summary lacks %q:\n%s", want, b.String())
		}
	}
	b.Reset()
	writeRunSummary(&b, rep([]string{"sst", "t700", "lts", "eis", "low_cloud"}, nil))
	if strings.Contains(b.String(), "without:") || strings.Contains(b.String(), "quantities:") {
		t.Errorf("a full run's summary lists absent quantities:\n%s", b.String())
	}
}
