package figures

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/output"
)

// A run folder written before the study was named so (summary.json
// format_version 1) is refused with a request to re-run, not read with
// its provenance silently missing.
func TestLoadRefusesEarlierSummary(t *testing.T) {
	dir := t.TempDir()
	old := `{"format": "lidscope-summary", "format_version": 1, "dataset": "x"}`
	if err := os.WriteFile(filepath.Join(dir, output.SummaryJSON), []byte(old), 0o644); err != nil {
		t.Fatal(err)
	}
	_, err := Load(dir)
	if err == nil || !strings.Contains(err.Error(), "format_version 1") || !strings.Contains(err.Error(), "re-run") {
		t.Errorf("earlier summary: %v", err)
	}
}
