package figures

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/internal/figurestest"
)

// A run over a 12-month climatology (invented data) is drawn with its
// time axis labelled by calendar month, Jan … Dec, not with date ticks
// such as "1-07".
func TestClimatologySeriesAxis(t *testing.T) {
	run := filepath.Join(t.TempDir(), "run")
	if _, err := figurestest.Write(run, figurestest.Spec{Climatology: true}); err != nil {
		t.Fatal(err)
	}
	r, err := Load(run)
	if err != nil {
		t.Fatal(err)
	}
	s, err := r.Series()
	if err != nil {
		t.Fatal(err)
	}
	if !s.Climatology {
		t.Fatal("series.nc of a climatology not recognised as one")
	}
	var labels []string
	for _, tk := range (monthTicks{year: 1}).Ticks(1, 2) {
		if tk.Label != "" {
			labels = append(labels, tk.Label)
		}
	}
	if got := strings.Join(labels, " "); got != "Jan Feb Mar Apr May Jun Jul Aug Sep Oct Nov Dec" {
		t.Errorf("month ticks %q", got)
	}
	files, err := Draw(run, Options{Format: "svg", Only: []string{"series"}})
	if err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(files[0])
	if err != nil {
		t.Fatal(err)
	}
	svg := string(b)
	for _, want := range []string{">Jan<", ">Jul<", ">Dec<", "Calendar month (12-month climatology)"} {
		if !strings.Contains(svg, want) {
			t.Errorf("series figure lacks %q", want)
		}
	}
	for _, bad := range []string{">1-07<", ">1-01<", ">0001"} {
		if strings.Contains(svg, bad) {
			t.Errorf("series figure has the date tick %q", bad)
		}
	}
}
