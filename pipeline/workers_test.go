package pipeline

import (
	"bytes"
	"context"
	"path/filepath"
	"testing"

	"lidscope/accumulate"
	"lidscope/config"
	"lidscope/fixtures"
	"lidscope/relations"
)

// fingerprint runs the plan with the given worker count and returns the
// complete encoded state of the run's accumulator and of a relationship
// accumulator fed as a sink (every statistic, bit for bit).
func fingerprint(t *testing.T, p Plan, rel relations.Config, workers int) (acc, relAcc []byte) {
	t.Helper()
	var ra *relations.Acc
	p.Workers = workers
	p.NewSinks = func(l accumulate.Layout) ([]StepSink, error) {
		a, err := relations.New(rel, l, nil)
		ra = a
		return []StepSink{a}, err
	}
	res, err := Run(context.Background(), p)
	if err != nil {
		t.Fatal(err)
	}
	var a, b bytes.Buffer
	if err := res.Acc.Encode(&a); err != nil {
		t.Fatal(err)
	}
	if err := ra.Encode(&b); err != nil {
		t.Fatal(err)
	}
	return a.Bytes(), b.Bytes()
}

// TestRunBitIdenticalForAnyWorkerCount: the synthetic world of package
// fixtures (invented data) at 6° (30 rows: 8 row blocks) over two years,
// with the relationship analysis of its study (patches, flips, joint
// composites) as a sink; the encoded accumulators must be the same bytes
// for 1, 2, 3 and 8 workers.
func TestRunBitIdenticalForAnyWorkerCount(t *testing.T) {
	dir := t.TempDir()
	o := fixtures.DefaultOptions()
	o.Resolution, o.Years, o.YearsPerFile = 6, 2, 1
	if _, err := fixtures.Generate(dir, o); err != nil {
		t.Fatal(err)
	}
	st, err := config.Load(filepath.Join(dir, fixtures.StudyFile), config.LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	d := &st.Datasets[0]
	p, err := PlanFor(st, d)
	if err != nil {
		t.Fatal(err)
	}
	rel := st.RelationsFor(d)
	wantAcc, wantRel := fingerprint(t, p, rel, 1)
	for _, w := range []int{2, 3, 8} {
		a, r := fingerprint(t, p, rel, w)
		if !bytes.Equal(a, wantAcc) {
			t.Errorf("%d workers: the regime accumulator differs from 1 worker's", w)
		}
		if !bytes.Equal(r, wantRel) {
			t.Errorf("%d workers: the relationship accumulator differs from 1 worker's", w)
		}
	}
}
