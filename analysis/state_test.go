package analysis

import (
	"bytes"
	"context"
	"encoding/gob"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"lidscope/config"
	"lidscope/fixtures"
	"lidscope/relations"
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

// A run state of an earlier format (before the relationship accumulator
// was kept) is refused with a request to re-run, by LoadState and Merge.
func TestOldRunStateAsksForRerun(t *testing.T) {
	dir := t.TempDir()
	var old, other bytes.Buffer
	// The shape of format 1: no relationship accumulator.
	type v1 struct {
		Format string
		Acc    []byte
	}
	if err := gob.NewEncoder(&old).Encode(v1{Format: "lidscope-run-state/1"}); err != nil {
		t.Fatal(err)
	}
	if err := gob.NewEncoder(&other).Encode(runState{Format: stateFormat}); err != nil {
		t.Fatal(err)
	}
	a, b := filepath.Join(dir, "a"), filepath.Join(dir, "b")
	for d, data := range map[string][]byte{a: old.Bytes(), b: other.Bytes()} {
		if err := os.MkdirAll(d, 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(d, StateFile), data, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	_, _, err := LoadState(a)
	if err == nil || !strings.Contains(err.Error(), "re-run") || !strings.Contains(err.Error(), "lidscope-run-state/1") {
		t.Errorf("old state: %v", err)
	}
	if _, err := Merge([]string{a, b}, filepath.Join(dir, "m"), Options{}); err == nil || !strings.Contains(err.Error(), "re-run") {
		t.Errorf("merge of an old state: %v", err)
	}
	if _, err := os.Stat(filepath.Join(dir, "m")); err == nil {
		t.Error("a refused merge created its output folder")
	}
}

// Runs whose relationships are anomalies each took their anomalies
// against the climatology of their own period: merging them is refused,
// with the reason and what to do, and nothing is written.
func TestMergeRefusesAnomalyPieces(t *testing.T) {
	dir := t.TempDir()
	data := filepath.Join(dir, "data")
	if _, err := fixtures.Generate(data, *smallWorld()); err != nil {
		t.Fatal(err)
	}
	rp := filepath.Join(data, fixtures.StudyFile)
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
	a := run(filepath.Join(dir, "a"), map[string]string{"datasets.0.time.end": "2002-07"})
	b := run(filepath.Join(dir, "b"), map[string]string{"datasets.0.time.start": "2002-08"})
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
