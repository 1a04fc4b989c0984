package figures

import "testing"

// Labels used inside a sentence lose their capital, acronyms keep theirs
// (common practice in figure titles: "against relative SST", "on EIS").
func TestLabelCase(t *testing.T) {
	for _, c := range []struct{ in, lower, upper string }{
		{"Relative SST", "relative SST", "Relative SST"},
		{"EIS", "EIS", "EIS"},
		{"LTS", "LTS", "LTS"},
		{"Low-cloud area fraction", "low-cloud area fraction", "Low-cloud area fraction"},
		{"convective", "convective", "Convective"},
		{"", "", ""},
	} {
		if got := lowerFirst(c.in); got != c.lower {
			t.Errorf("lowerFirst(%q) = %q, want %q", c.in, got, c.lower)
		}
		if got := upperFirst(c.in); got != c.upper {
			t.Errorf("upperFirst(%q) = %q, want %q", c.in, got, c.upper)
		}
	}
}
