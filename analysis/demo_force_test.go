package analysis

import (
	"context"
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"lidscope/fixtures"
)

// demo --force over an earlier demo world of another size and period
// replaces the world whole: none of the earlier files is left to join the
// new record (it failed with "files of one record must share a grid").
// Without --force the earlier world is refused, and a data folder holding
// a file of the user's is refused even with it.
func TestDemoForceReplacesTheWorld(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	ctx := context.Background()
	first := fixtures.DefaultOptions()
	first.Resolution, first.Years, first.YearsPerFile = 4, 2, 1
	second := first
	second.Resolution, second.Years, second.YearsPerFile = 5, 3, 3
	opt := DemoOptions{Options: Options{NoPlots: true, Version: "test"}, Scenario: &first}
	if _, err := Demo(ctx, dir, opt); err != nil {
		t.Fatal(err)
	}
	opt.Scenario = &second
	if _, err := Demo(ctx, dir, opt); !errors.Is(err, fs.ErrExist) || !strings.Contains(err.Error(), "--force") {
		t.Fatalf("a second demo without force: %v, want a refusal naming --force", err)
	}
	opt.Force = true
	d, err := Demo(ctx, dir, opt)
	if err != nil {
		t.Fatalf("demo --force over a demo of another size: %v", err)
	}
	for _, c := range d.Checks {
		if !c.OK() {
			t.Errorf("%s: got %v, truth %v", c.What, c.Got, c.Want)
		}
	}
	// the data folders hold exactly the new worlds' files
	for _, w := range []struct {
		data  string
		truth *fixtures.Truth
	}{{d.DataDir, d.Truth}, {d.ModelDataDir, d.ModelTruth}} {
		var want, got []string
		seen := map[string]bool{}
		for _, fs := range w.truth.Files {
			for _, f := range fs {
				if !seen[f] { // one file may give two roles (wind: u and v)
					seen[f] = true
					want = append(want, f)
				}
			}
		}
		filepath.WalkDir(w.data, func(p string, e fs.DirEntry, err error) error {
			if err == nil && !e.IsDir() && strings.HasSuffix(p, ".nc") {
				r, _ := filepath.Rel(w.data, p)
				got = append(got, filepath.ToSlash(r))
			}
			return err
		})
		sort.Strings(want)
		sort.Strings(got)
		if strings.Join(got, " ") != strings.Join(want, " ") {
			t.Errorf("%s holds %v, want only the new world's %v", w.data, got, want)
		}
	}
	// a file of the user's in the data folder is never removed
	mine := filepath.Join(d.DataDir, "my-notes.txt")
	if err := os.WriteFile(mine, []byte("mine"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := Demo(ctx, dir, opt); err == nil || !strings.Contains(err.Error(), "my-notes.txt") {
		t.Errorf("demo --force over a data folder with a file of the user's: %v, want a refusal naming it", err)
	}
	if _, err := os.Stat(mine); err != nil {
		t.Errorf("the user's file: %v", err)
	}
}

// The demo's comparison table prints a difference that is rounding noise
// of the two values as 0 (it printed +3.61e-16 between 0.1 and 0.1).
func TestDifferenceText(t *testing.T) {
	for _, c := range []struct {
		d, ref, cand float64
		want         string
	}{
		{3.61e-16, 0.1, 0.1, "0"},
		{-5.69e-16, 0.1, 0.1, "0"},
		{0.0798, 298.2, 298.3, "+0.0798"},
		{-0.0118, 0.2764, 0.2645, "-0.0118"},
		{1e-12, 0, 1e-12, "+1e-12"},
	} {
		if got := differenceText(c.d, c.ref, c.cand); got != c.want {
			t.Errorf("differenceText(%g, %g, %g) = %q, want %q", c.d, c.ref, c.cand, got, c.want)
		}
	}
}
