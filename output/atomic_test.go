package output

import (
	"bytes"
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// leftovers lists what a failed Write left in dir (nil when dir is gone).
func leftovers(t *testing.T, dir string) []string {
	t.Helper()
	if _, err := os.Stat(dir); errors.Is(err, fs.ErrNotExist) {
		return nil
	}
	return dirNames(t, dir)
}

// snapshot reads every file of dir.
func snapshot(t *testing.T, dir string) map[string][]byte {
	t.Helper()
	out := map[string][]byte{}
	for _, n := range dirNames(t, dir) {
		b, err := os.ReadFile(filepath.Join(dir, n))
		if err != nil {
			t.Fatal(err)
		}
		out[n] = b
	}
	return out
}

func sameSnapshot(t *testing.T, what string, a, b map[string][]byte) {
	t.Helper()
	if len(a) != len(b) {
		t.Errorf("%s: directory had %d entries, now %d", what, len(a), len(b))
	}
	for n, x := range a {
		if y, ok := b[n]; !ok || !bytes.Equal(x, y) {
			t.Errorf("%s: %s changed or vanished", what, n)
		}
	}
}

func TestRefuseOverwrite(t *testing.T) {
	f := newFixture(t)
	dir, _ := f.write(t)
	other := filepath.Join(dir, "notes.txt")
	if err := os.WriteFile(other, []byte("mine"), 0o644); err != nil {
		t.Fatal(err)
	}
	before := snapshot(t, dir)
	f.meta.Dataset = "second run"
	_, err := Write(dir, f.acc, f.meta, Options{})
	if !errors.Is(err, fs.ErrExist) || !strings.Contains(err.Error(), "Options.Force") || !strings.Contains(err.Error(), "maps.nc") {
		t.Fatalf("second Write without Force: err = %v; want fs.ErrExist naming the files and Options.Force", err)
	}
	sameSnapshot(t, "refused write", before, snapshot(t, dir))

	// One existing output is enough to refuse.
	dir2 := filepath.Join(t.TempDir(), "out")
	os.MkdirAll(dir2, 0o755)
	os.WriteFile(filepath.Join(dir2, SummaryJSON), []byte("{}"), 0o644)
	if _, err := Write(dir2, f.acc, f.meta, Options{}); !errors.Is(err, fs.ErrExist) {
		t.Fatalf("Write over a lone summary.json: err = %v", err)
	}

	// With Force the outputs are replaced and other files kept.
	if _, err := Write(dir, f.acc, f.meta, Options{Force: true}); err != nil {
		t.Fatal(err)
	}
	after := snapshot(t, dir)
	if !bytes.Contains(after[SummaryJSON], []byte("second run")) {
		t.Error("Force did not replace summary.json")
	}
	if string(after["notes.txt"]) != "mine" || len(after) != 7 {
		t.Errorf("Force touched other files: %v", dirNames(t, dir))
	}
}

func TestOutputNameTakenByDirectory(t *testing.T) {
	f := newFixture(t)
	dir := t.TempDir()
	if err := os.Mkdir(filepath.Join(dir, SeriesCSV), 0o755); err != nil {
		t.Fatal(err)
	}
	_, err := Write(dir, f.acc, f.meta, Options{Force: true})
	if err == nil || !strings.Contains(err.Error(), "not a regular file") {
		t.Fatalf("err = %v", err)
	}
	if got := dirNames(t, dir); len(got) != 1 {
		t.Errorf("directory holds %v", got)
	}
}

// TestFailureWhileStaging makes each file in turn fail after the earlier
// ones were written: no output may appear, and no staging file remain.
func TestFailureWhileStaging(t *testing.T) {
	defer func() { hookStaged = nil }()
	boom := errors.New("injected failure")
	for _, name := range OutputNames() {
		t.Run(name, func(t *testing.T) {
			f := newFixture(t)
			dir := filepath.Join(t.TempDir(), "out")
			hookStaged = func(n string) error {
				if n == name {
					return boom
				}
				return nil
			}
			_, err := Write(dir, f.acc, f.meta, Options{})
			if !errors.Is(err, boom) || !strings.Contains(err.Error(), name) {
				t.Fatalf("err = %v; want the injected failure naming %s", err, name)
			}
			if got := leftovers(t, dir); got != nil {
				t.Errorf("after a failure the new directory is still there, holding %v", got)
			}
		})
	}
}

// TestFailureWhileCommitting fails while the files are being moved in: the
// ones already moved must go again, and with Force the replaced outputs
// must come back unchanged.
func TestFailureWhileCommitting(t *testing.T) {
	defer func() { hookCommit = nil }()
	boom := errors.New("injected failure")
	for _, force := range []bool{false, true} {
		for _, name := range OutputNames()[1:] {
			t.Run(name, func(t *testing.T) {
				f := newFixture(t)
				dir := filepath.Join(t.TempDir(), "out")
				var before map[string][]byte
				if force {
					if _, err := Write(dir, f.acc, f.meta, Options{}); err != nil {
						t.Fatal(err)
					}
					before = snapshot(t, dir)
					f.meta.Dataset = "replacement"
				}
				hookCommit = func(n string) error {
					if n == name {
						return boom
					}
					return nil
				}
				_, err := Write(dir, f.acc, f.meta, Options{Force: force})
				hookCommit = nil
				if !errors.Is(err, boom) {
					t.Fatalf("err = %v", err)
				}
				if force {
					sameSnapshot(t, "failed forced write", before, snapshot(t, dir))
				} else if got := leftovers(t, dir); got != nil {
					t.Errorf("after a failure the new directory is still there, holding %v", got)
				}
			})
		}
	}
}

// TestRealFailureMidway: a time bound that runs backwards at step 2 is
// only found by the NetCDF writer while it writes series.nc, after maps.nc
// is complete; nothing may appear.
func TestRealFailureMidway(t *testing.T) {
	f := newFixture(t)
	f.meta.TimeBounds = append([][2]float64(nil), fixBounds...)
	f.meta.TimeBounds[2] = [2]float64{11413, 11382}
	dir := filepath.Join(t.TempDir(), "out")
	staged := []string{}
	hookStaged = func(n string) error { staged = append(staged, n); return nil }
	defer func() { hookStaged = nil }()
	_, err := Write(dir, f.acc, f.meta, Options{})
	if err == nil || !strings.Contains(err.Error(), SeriesNC) {
		t.Fatalf("err = %v; want a failure writing series.nc", err)
	}
	if len(staged) != 1 || staged[0] != MapsNC {
		t.Errorf("staged %v before the failure, want [maps.nc]", staged)
	}
	if got := leftovers(t, dir); got != nil {
		t.Errorf("after a failure the new directory is still there, holding %v", got)
	}
}

// TestAppearedMeanwhile: an output that appears between the check and the
// move is not replaced without Force.
func TestAppearedMeanwhile(t *testing.T) {
	f := newFixture(t)
	dir := filepath.Join(t.TempDir(), "out")
	hookStaged = func(n string) error {
		if n == ProvenanceJSON {
			return os.WriteFile(filepath.Join(dir, RegionsCSV), []byte("someone else's"), 0o644)
		}
		return nil
	}
	defer func() { hookStaged = nil }()
	_, err := Write(dir, f.acc, f.meta, Options{})
	if !errors.Is(err, fs.ErrExist) {
		t.Fatalf("err = %v, want fs.ErrExist", err)
	}
	got := snapshot(t, dir)
	if len(got) != 1 || string(got[RegionsCSV]) != "someone else's" {
		t.Errorf("directory holds %v", dirNames(t, dir))
	}
}

func TestHistoryTimestampFromMeta(t *testing.T) {
	f := newFixture(t)
	f.meta.End = time.Date(2030, 1, 2, 3, 4, 5, 0, time.UTC)
	dir, _ := f.write(t)
	nc := ncFile(t, filepath.Join(dir, SeriesNC))
	if h := textAttr(t, nc.Attr, "history"); !strings.HasPrefix(h, "2030-01-02T03:04:05Z: ") {
		t.Errorf("history %q", h)
	}
}
