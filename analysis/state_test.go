package analysis

import (
	"bytes"
	"context"
	"encoding/gob"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"lidscope/config"
	"lidscope/fixtures"
	"lidscope/output"
	"lidscope/relations"
	"lidscope/runfolder"
)

// diffResults lists where two relationship results differ: floats by more
// than tol relative or 1e-12 absolute (NaN equal to NaN), everything else
// exactly. The absolute floor is for spreads that are zero but for
// rounding: the standard deviation of a bin whose values are all equal
// comes out as 1e-19 or 3e-19 depending on the order of the sums.
func diffResults(a, b *relations.Results, tol float64) []string {
	var errs []string
	var walk func(path string, x, y reflect.Value)
	walk = func(path string, x, y reflect.Value) {
		if len(errs) > 20 {
			return
		}
		switch x.Kind() {
		case reflect.Float32, reflect.Float64:
			u, v := x.Float(), y.Float()
			if u == v || (math.IsNaN(u) && math.IsNaN(v)) {
				return
			}
			if d := math.Abs(u - v); d > 1e-12 && d > tol*math.Max(math.Abs(u), math.Abs(v)) {
				errs = append(errs, fmt.Sprintf("%s: %.17g vs %.17g", path, u, v))
			}
		case reflect.Struct:
			for k := 0; k < x.NumField(); k++ {
				walk(path+"."+x.Type().Field(k).Name, x.Field(k), y.Field(k))
			}
		case reflect.Slice, reflect.Array:
			if x.Len() != y.Len() {
				errs = append(errs, fmt.Sprintf("%s: length %d vs %d", path, x.Len(), y.Len()))
				return
			}
			for k := 0; k < x.Len(); k++ {
				walk(fmt.Sprintf("%s[%d]", path, k), x.Index(k), y.Index(k))
			}
		case reflect.Pointer:
			if x.IsNil() != y.IsNil() {
				errs = append(errs, path+": nil vs non-nil")
			} else if !x.IsNil() {
				walk(path, x.Elem(), y.Elem())
			}
		default:
			if !reflect.DeepEqual(x.Interface(), y.Interface()) {
				errs = append(errs, fmt.Sprintf("%s: %v vs %v", path, x.Interface(), y.Interface()))
			}
		}
	}
	if a == nil || b == nil {
		return []string{fmt.Sprintf("results %v vs %v", a != nil, b != nil)}
	}
	walk("Results", reflect.ValueOf(*a), reflect.ValueOf(*b))
	return errs
}

// A run state of an earlier format (a bare gob, before the integrity
// header) is refused as damaged, with a request to re-run, by LoadState
// and Merge; a refused merge writes nothing.
func TestOldRunStateAsksForRerun(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	var old bytes.Buffer
	// The shape of format 2: a bare gob.
	if err := gob.NewEncoder(&old).Encode(runState{Format: "lidscope-run-state/2"}); err != nil {
		t.Fatal(err)
	}
	a, b := filepath.Join(dir, "a"), filepath.Join(dir, "b")
	for _, d := range []string{a, b} {
		st, err := runfolder.Create(d, runfolder.Options{})
		if err != nil {
			t.Fatal(err)
		}
		if err := st.WriteFile(StateFile, old.Bytes()); err != nil {
			t.Fatal(err)
		}
		if _, err := st.Commit(context.Background()); err != nil {
			t.Fatal(err)
		}
		st.Close()
	}
	_, _, err := LoadState(a)
	if !errors.Is(err, ErrDamagedState) || !strings.Contains(err.Error(), "re-run that piece") || !strings.Contains(err.Error(), "another lidscope version") {
		t.Errorf("old state: %v", err)
	}
	if _, err := Merge([]string{a, b}, filepath.Join(dir, "m"), Options{}); err == nil || !strings.Contains(err.Error(), "re-run") {
		t.Errorf("merge of an old state: %v", err)
	}
	if _, err := os.Stat(filepath.Join(dir, "m")); err == nil {
		t.Error("a refused merge created its output folder")
	}
}

// tinyWorld is the smallest synthetic world (invented data) the demo's
// continents allow, three years long, one file a year.
func tinyWorld() fixtures.Options {
	o := fixtures.DefaultOptions()
	o.Resolution = 6
	o.Years = 3
	o.YearsPerFile = 1
	return o
}

// runPieces runs the tiny world's years as separate pieces into dir/<name>.
func runPieces(t *testing.T, dir string, pieces map[string][2]string) map[string]string {
	t.Helper()
	data := filepath.Join(dir, "data")
	if _, err := fixtures.Generate(data, tinyWorld()); err != nil {
		t.Fatal(err)
	}
	out := map[string]string{}
	for name, p := range pieces {
		r, err := config.Load(filepath.Join(data, fixtures.StudyFile), config.LoadOptions{LookupEnv: config.NoEnvironment,
			Flags: map[string]string{"datasets.*.time.start": p[0], "datasets.*.time.end": p[1]}})
		if err != nil {
			t.Fatal(err)
		}
		out[name] = filepath.Join(dir, name)
		if _, err := Run(context.Background(), r, nil, Options{OutDir: out[name], NoPlots: true}); err != nil {
			t.Fatal(err)
		}
	}
	return out
}

// Random bit flips and truncations anywhere in a run state are refused
// with "damaged run state", never decoded into numbers, and a merge with a
// damaged piece writes nothing.
func TestDamagedRunStateIsRefused(t *testing.T) {
	dir := t.TempDir()
	runs := runPieces(t, dir, map[string][2]string{"y1": {"2001-01", "2001-12"}, "y2": {"2002-01", "2002-12"}})
	good, err := os.ReadFile(filepath.Join(runs["y1"], StateFile))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := readState(filepath.Join(runs["y1"], StateFile), true); err != nil {
		t.Fatalf("the intact state: %v", err)
	}
	rng := rand.New(rand.NewPCG(13, 2026))
	p := filepath.Join(dir, "state")
	try := func(what string, b []byte) {
		t.Helper()
		if err := os.WriteFile(p, b, 0o644); err != nil {
			t.Fatal(err)
		}
		_, err := readState(p, true)
		if !errors.Is(err, ErrDamagedState) || !strings.Contains(err.Error(), "damaged run state: "+p) || !strings.Contains(err.Error(), "re-run that piece") {
			t.Errorf("%s: %v", what, err)
		}
	}
	for i := 0; i < 200; i++ {
		b := bytes.Clone(good)
		var where []int
		for k := 0; k <= rng.IntN(3); k++ {
			// a third of the flips in the header, the rest anywhere
			at := rng.IntN(len(b))
			if k == 0 && i%3 == 0 {
				at = rng.IntN(stateHeaderLen)
			}
			b[at] ^= 1 << rng.IntN(8)
			where = append(where, at)
		}
		if bytes.Equal(b, good) {
			continue // two flips of one bit
		}
		try(fmt.Sprintf("bit flips at %v", where), b)
	}
	for i := 0; i < 20; i++ {
		n := rng.IntN(len(good))
		try(fmt.Sprintf("truncated to %d bytes", n), good[:n])
	}
	try("one byte added", append(bytes.Clone(good), 0))
	// In a committed folder (same size, so the folder's manifest check
	// passes): Merge refuses and writes nothing.
	b := bytes.Clone(good)
	b[len(b)/2] ^= 0x10
	if err := os.WriteFile(filepath.Join(runs["y1"], StateFile), b, 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "merged")
	_, err = Merge([]string{runs["y1"], runs["y2"]}, out, Options{})
	if !errors.Is(err, ErrDamagedState) && (err == nil || !strings.Contains(err.Error(), "damaged run state: "+filepath.Join(runs["y1"], StateFile))) {
		t.Errorf("merge with a damaged piece: %v", err)
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("the refused merge created its output folder")
	}
}

// Pieces that leave a year out are refused unless AllowGaps, which the
// provenance records; overlapping pieces are refused either way.
func TestMergeGaps(t *testing.T) {
	dir := t.TempDir()
	runs := runPieces(t, dir, map[string][2]string{"y1": {"2001-01", "2001-12"}, "y3": {"2003-01", "2003-12"}, "y12": {"2001-01", "2002-12"}})
	_, err := Merge([]string{runs["y3"], runs["y1"]}, filepath.Join(dir, "gap"), Options{})
	for _, want := range []string{"gaps in the record", runs["y1"] + " ends at 2001-12", runs["y3"] + " starts at 2003-01", "about 12 time steps missing", "--allow-gaps"} {
		if err == nil || !strings.Contains(err.Error(), want) {
			t.Errorf("merge across a missing year: %v, want %q", err, want)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "gap")); err == nil {
		t.Error("the refused merge created its output folder")
	}
	rep, err := Merge([]string{runs["y3"], runs["y1"]}, filepath.Join(dir, "gap"), Options{AllowGaps: true})
	if err != nil {
		t.Fatal(err)
	}
	prov, err := os.ReadFile(filepath.Join(rep.OutDir, output.ProvenanceJSON))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(prov), "merged across a gap in the record (--allow-gaps)") {
		t.Error("provenance.json does not record the gap")
	}
	if _, err := Merge([]string{runs["y12"], runs["y1"]}, filepath.Join(dir, "overlap"), Options{AllowGaps: true}); err == nil || !strings.Contains(err.Error(), "periods overlap") {
		t.Errorf("overlapping pieces: %v", err)
	}
	// Consecutive pieces have no gap.
	if _, err := Merge([]string{runs["y12"], runs["y3"]}, filepath.Join(dir, "whole"), Options{}); err != nil {
		t.Errorf("consecutive pieces: %v", err)
	}
}

// Runs whose relationships are anomalies each took their anomalies
// against the climatology of their own period: merging them is refused,
// with the reason and what to do, and nothing is written.
func TestMergeRefusesAnomalyPieces(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	rp := filepath.Join(smallData(t), fixtures.StudyFile)
	run := func(out string, flags map[string]string) Report {
		t.Helper()
		flags["relationships.mode"] = "anomaly"
		r, err := config.Load(rp, config.LoadOptions{LookupEnv: config.NoEnvironment, Flags: flags})
		if err != nil {
			t.Fatal(err)
		}
		reps, err := Run(context.Background(), r, nil, Options{OutDir: out, NoPlots: true})
		if err != nil {
			t.Fatal(err)
		}
		if reps[0].Relations.Mode != relations.Anomaly {
			t.Fatalf("the run is in %v mode", reps[0].Relations.Mode)
		}
		return reps[0]
	}
	a := run(filepath.Join(dir, "a"), map[string]string{"datasets.synthetic-demo.time.end": "2002-07"})
	b := run(filepath.Join(dir, "b"), map[string]string{"datasets.synthetic-demo.time.start": "2002-08"})
	out := filepath.Join(dir, "merged")
	_, err := Merge([]string{a.OutDir, b.OutDir}, out, Options{})
	if err == nil || !strings.Contains(err.Error(), "anomaly mode") || !strings.Contains(err.Error(), b.OutDir) || !strings.Contains(err.Error(), "whole record in one run") {
		t.Errorf("merge of anomaly pieces: %v", err)
	}
	if testing.Verbose() {
		t.Log(err)
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("the refused merge created its output folder")
	}
}

// A run state of format 3 (the folder's files use names since renamed) is
// refused with a message that says so.
func TestRenamedRunStateRefused(t *testing.T) {
	p := filepath.Join(t.TempDir(), StateFile)
	b := []byte(renamedFormat + "\nlength " + strings.Repeat("0", stateLengthDigits) + "\nsha256 " + strings.Repeat("0", 64) + "\n\n")
	_, err := decodeStateFile(p, b)
	if err == nil || !strings.Contains(err.Error(), "renamed") || !strings.Contains(err.Error(), "re-run") || !strings.Contains(err.Error(), stateFormat) {
		t.Fatalf("format 3 state: %v; want a refusal naming the renames and asking for a re-run", err)
	}
}

// A run state of format 4 (per-column statistics for every grid cell, in
// the earlier encoding) is refused with a message that asks for a re-run.
func TestFormat4RunStateRefused(t *testing.T) {
	p := filepath.Join(t.TempDir(), StateFile)
	b := []byte(compactFormat + "\nlength " + strings.Repeat("0", stateLengthDigits) + "\nsha256 " + strings.Repeat("0", 64) + "\n\n")
	_, err := decodeStateFile(p, b)
	if err == nil || !strings.Contains(err.Error(), "re-run") || !strings.Contains(err.Error(), stateFormat) || !strings.Contains(err.Error(), p) {
		t.Fatalf("format 4 state: %v; want a refusal naming the file and asking for a re-run", err)
	}
}

// The body's frames: what frames splits is what encodeState framed, and a
// damaged frame length is an error.
func TestStateFrames(t *testing.T) {
	for _, c := range []struct {
		body string
		want []string
		ok   bool
	}{
		{"00000000000000000003\nabc00000000000000000000\n00000000000000000001\nz", []string{"abc", "", "z"}, true},
		{"", nil, true},
		{"00000000000000000009\nabc", nil, false},
		{"0000000000000000000x\nabc", nil, false},
		{"000000000000000000003abc", nil, false},
	} {
		got, err := frames([]byte(c.body))
		if (err == nil) != c.ok {
			t.Errorf("%q: error %v, want ok %v", c.body, err, c.ok)
			continue
		}
		if c.ok && fmt.Sprintf("%q", got) != fmt.Sprintf("%q", c.want) && !(len(got) == 0 && len(c.want) == 0) {
			t.Errorf("%q: frames %q, want %q", c.body, got, c.want)
		}
	}
}
