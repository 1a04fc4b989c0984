package analysis

// A record of several files keeps only the file being read open (cf
// closes the others, so that HDF5 chunk caches do not add up over a long
// record; see bench/README.md). These tests check that reading back and
// forth across the files gives the same values as reading each file on its
// own, and that a file replaced while a run is reading the record is
// reported, not read as if it were the file that was checked.

import (
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"lidscope/cf"
	"lidscope/fixtures"
)

func TestBadRecordReopen(t *testing.T) {
	t.Parallel()
	dir := badLibWorld(t)
	paths := badLibSST(t, dir)
	rec, err := cf.Open(paths, cf.Spec{Role: cf.RoleSST})
	if err != nil {
		t.Fatal(err)
	}
	defer rec.Close()
	if rec.NT() != 24 {
		t.Fatalf("%d steps, want 24", rec.NT())
	}
	// The reference: each file opened on its own.
	var want [][]float32
	for _, p := range paths {
		f, err := cf.Open([]string{p}, cf.Spec{Role: cf.RoleSST})
		if err != nil {
			t.Fatal(err)
		}
		for k := 0; k < f.NT(); k++ {
			s := make([]float32, f.Len())
			if err := f.ReadSlab(k, s, nil); err != nil {
				t.Fatal(err)
			}
			want = append(want, s)
		}
		f.Close()
	}
	got := make([]float32, rec.Len())
	// forth, back, and across the file boundary in both directions
	for _, k := range []int{0, 13, 1, 23, 11, 12, 11, 0, 23} {
		if err := rec.ReadSlab(k, got, nil); err != nil {
			t.Fatalf("step %d: %v", k, err)
		}
		if !slices.EqualFunc(got, want[k], func(a, b float32) bool { return a == b || a != a && b != b }) {
			t.Errorf("step %d differs from reading %s on its own", k, rec.PathAt(k))
		}
		if wantPath := paths[k/12]; rec.PathAt(k) != wantPath {
			t.Errorf("PathAt(%d) = %s, want %s", k, rec.PathAt(k), wantPath)
		}
	}
}

func TestBadRecordFileReplaced(t *testing.T) {
	t.Parallel()
	dir := badLibWorld(t)
	paths := badLibSST(t, dir)
	rec, err := cf.Open(paths, cf.Spec{Role: cf.RoleSST})
	if err != nil {
		t.Fatal(err)
	}
	defer rec.Close()
	buf := make([]float32, rec.Len())
	if err := rec.ReadSlab(0, buf, nil); err != nil {
		t.Fatal(err)
	}
	// Replace the second file by a six-year one (same variable, longer
	// time axis) while the record is open: the check at reopening sees it.
	o := fixtures.DefaultOptions()
	o.Resolution = 5
	o.StartYear = 2002
	o.Years = 6
	o.YearsPerFile = 6
	other := filepath.Join(t.TempDir(), "other")
	if _, err := fixtures.Generate(other, o); err != nil {
		t.Fatal(err)
	}
	m, err := filepath.Glob(filepath.Join(other, "sst", "*.nc"))
	if err != nil || len(m) != 1 {
		t.Fatalf("%v %v", m, err)
	}
	b, err := os.ReadFile(m[0])
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(paths[1], b, 0o644); err != nil {
		t.Fatal(err)
	}
	err = rec.ReadSlab(12, buf, nil)
	if err == nil {
		t.Fatal("reading a replaced file succeeded")
	}
	for _, w := range []string{"reopening " + paths[1], "the file changed during the run"} {
		if !strings.Contains(err.Error(), w) {
			t.Errorf("the error lacks %q: %v", w, err)
		}
	}
}
