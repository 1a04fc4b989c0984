package config

import (
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestDatasetNames: a dataset name becomes a folder below the output
// folder (and an argument of --dataset), so names that climb out of it,
// hide it, read as an option or carry control characters are refused;
// before, ".", "..", "-x" and ".x" passed the [A-Za-z0-9_.-] rule.
func TestDatasetNames(t *testing.T) {
	cases := []struct {
		name string
		want string // "" when valid
	}{
		{"era5", ""},
		{"cmip6_model-1", ""},
		{"1979", ""},
		{"_x", "starting with a letter or digit"},
		{"Upper", "lower-case"},
		{"model.r1", "lower-case letters, digits, _ and -"},
		{".", "names a folder itself"},
		{"..", "names a folder itself"},
		{"a/b", "path separator"},
		{`a\b`, "path separator"},
		{"../escape", "path separator"},
		{"-rf", "may not start with -"},
		{".hidden", "may not start with ."},
		{"x\x1b[31m", `"x\x1b[31m"`},
		{"tab\there", "control characters"},
		{"a b", "lower-case letters"},
		{"", "needs a name"},
	}
	for _, c := range cases {
		err := CheckDatasetName(c.name)
		switch {
		case c.want == "" && err != nil:
			t.Errorf("%q refused: %v", c.name, err)
		case c.want != "" && err == nil:
			t.Errorf("%q accepted", c.name)
		case c.want != "" && !strings.Contains(err.Error(), c.want):
			t.Errorf("%q: %v; want it to say %q", c.name, err, c.want)
		}
		if err != nil && strings.ContainsAny(err.Error(), "\x1b\t") {
			t.Errorf("%q: the message holds raw control characters: %q", c.name, err)
		}
	}
	// through Load, with the key and line
	src := "datasets:\n  \"..\":\n    files:\n      sst: sst.nc\n      air_temperature: ta.nc\n      low_cloud: cll.nc\n"
	_, err := load("s.yaml", ".", "yaml", []byte(src), LoadOptions{LookupEnv: NoEnvironment})
	if err == nil || !strings.Contains(err.Error(), "s.yaml:2: datasets...") || !strings.Contains(err.Error(), "names a folder itself") {
		t.Errorf("Load of a dataset named ..: %v", err)
	}
}

// TestMemoryBudgetKey: limits.memory_budget takes bytes or a size with a
// unit, and refuses nonsense.
func TestMemoryBudgetKey(t *testing.T) {
	base := "datasets:\n  x:\n    files:\n      sst: sst.nc\n      air_temperature: ta.nc\n      low_cloud: cll.nc\nlimits:\n  memory_budget: "
	for v, want := range map[string]int64{"4GiB": 4 << 30, "512MB": 512e6, "2147483648": 2 << 30, `"1.5 GiB"`: 3 << 29} {
		tree, err := parse("s.yaml", "yaml", []byte(base+v+"\n"))
		if err != nil {
			t.Fatal(err)
		}
		d := &decoder{where: &where{file: "s.yaml", lines: indexLines("yaml", nil), origins: map[string]string{}}}
		l := d.limits(sub(tree, "limits"))
		if len(d.probs) != 0 || l.MemoryBudget != want {
			t.Errorf("%s: budget %d, problems %v; want %d", v, l.MemoryBudget, d.probs, want)
		}
	}
	for _, v := range []string{"lots", "-1GiB", "4 GiG", "100"} {
		tree, err := parse("s.yaml", "yaml", []byte(base+v+"\n"))
		if err != nil {
			t.Fatal(err)
		}
		d := &decoder{where: &where{file: "s.yaml", lines: indexLines("yaml", nil), origins: map[string]string{}}}
		if d.limits(sub(tree, "limits")); len(d.probs) == 0 {
			t.Errorf("memory_budget %s accepted", v)
		}
	}
}

// TestStudyNotRegular: a study path that is a named pipe is refused by its
// kind instead of blocking in the read.
func TestStudyNotRegular(t *testing.T) {
	p := filepath.Join(t.TempDir(), "study.yaml")
	if err := syscall.Mkfifo(p, 0o644); err != nil {
		t.Skipf("cannot make a FIFO here: %v", err)
	}
	done := make(chan error, 1)
	go func() {
		_, err := Load(p, LoadOptions{LookupEnv: NoEnvironment})
		done <- err
	}()
	select {
	case err := <-done:
		if err == nil || !strings.Contains(err.Error(), "a named pipe (FIFO), not a regular file") {
			t.Errorf("Load of a FIFO: %v", err)
		}
	case <-time.After(30 * time.Second): // a guard against a hang, not a timing
		if w, err := os.OpenFile(p, os.O_WRONLY|syscall.O_NONBLOCK, 0); err == nil {
			w.Close()
		}
		t.Fatal("Load of a FIFO blocked")
	}
}
