package analysis

import (
	"path/filepath"
	"strings"
	"testing"

	"lidscope/config"
	"lidscope/fixtures"
	"lidscope/pipeline"
)

// TestEstimateMemory: the estimate of a run of the synthetic world
// (invented data, 4°, 1 year) is made of the shape of its inputs — the
// analysis grid, its steps and fields — and its parts add up (the larger
// of the stream's buffers and the end of run's writing); the
// relationship part is gone with relationships.enabled: false.
func TestEstimateMemory(t *testing.T) {
	data := t.TempDir()
	o := fixtures.DefaultOptions()
	o.Resolution, o.Years, o.YearsPerFile = 4, 1, 1
	if _, err := fixtures.Generate(data, o); err != nil {
		t.Fatal(err)
	}
	load := func(flags map[string]string) *config.Study {
		r, err := config.Load(filepath.Join(data, fixtures.StudyFile), config.LoadOptions{LookupEnv: config.NoEnvironment, Flags: flags})
		if err != nil {
			t.Fatal(err)
		}
		return r
	}
	r := load(nil)
	m, err := EstimateMemory(r, &r.Datasets[0])
	if err != nil {
		t.Fatal(err)
	}
	if s := m.Shape; s.NLat != 45 || s.NLon != 90 || s.Cells != 45*90 || s.Steps != 12 || s.Fields != 3 {
		t.Errorf("shape %+v, want 45×90 cells, 12 steps, 3 fields", s)
	}
	acc, _ := pipeline.StateBytesPerCell(len(m.Shape.Quantities), m.Shape.Regimes, m.Shape.Fields)
	// the world's land fraction makes about a third of the cells land
	if c := m.Shape.Columns; c <= 45*90/2 || c >= 45*90 {
		t.Errorf("%d analysed (ocean) columns of %d cells", c, 45*90)
	}
	if m.StatePerCell != int64(acc) || m.State != int64(acc)*int64(m.Shape.Columns) {
		t.Errorf("state %d B per column, %d B, want %d per column × %d columns", m.StatePerCell, m.State, acc, m.Shape.Columns)
	}
	if acc > 512 {
		t.Errorf("%d B of state per analysed column, more than 512 B", acc)
	}
	if m.Relations <= 0 {
		t.Errorf("relationship part %d B", m.Relations)
	}
	// the stream's buffers are returned before the end of run's writing
	if m.Total != m.Fixed+m.State+m.Relations+m.Factors+max(m.Buffers, m.EndOfRun) {
		t.Errorf("parts do not add up: %+v", m)
	}
	if !strings.Contains(m.String(), "45×90 cells and 12 time steps") {
		t.Errorf("text %q", m.String())
	}
	r = load(map[string]string{"relationships.enabled": "false"})
	off, err := EstimateMemory(r, &r.Datasets[0])
	if err != nil {
		t.Fatal(err)
	}
	if off.Relations != 0 || off.Total != m.Total-m.Relations {
		t.Errorf("relationships off: %d B for relations, total %d (on: %d, relations %d)", off.Relations, off.Total, m.Total, m.Relations)
	}
}
