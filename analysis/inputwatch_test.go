package analysis

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"lidscope/config"
	"lidscope/fixtures"
	"lidscope/output"
)

// TestInputChangedWhileRead: an SST file changed while the run reads the
// record (by its size, its modification time, or only its bytes with size
// and time put back, which moves its ctime; or replaced by a copy with
// the same size and times, a new inode) fails the run naming the file,
// and nothing is written. Before, the run finished and its provenance recorded the
// checksum of the file as it was after the run.
func TestInputChangedWhileRead(t *testing.T) {
	cases := []struct {
		name, want string
		change     func(t *testing.T, p string)
	}{
		{"grown", "its size went from", func(t *testing.T, p string) {
			f, err := os.OpenFile(p, os.O_APPEND|os.O_WRONLY, 0)
			if err != nil {
				t.Error(err)
				return
			}
			f.Write(make([]byte, 512))
			f.Close()
		}},
		{"touched", "its modification time went from", func(t *testing.T, p string) {
			if err := os.Chtimes(p, time.Now(), time.Now().Add(time.Hour)); err != nil {
				t.Error(err)
			}
		}},
		{"bytes changed, size and time put back", "with size and modification time unchanged", func(t *testing.T, p string) {
			fi, err := os.Stat(p)
			if err != nil {
				t.Error(err)
				return
			}
			b, err := os.ReadFile(p)
			if err != nil {
				t.Error(err)
				return
			}
			b[len(b)/2] ^= 0xff
			if err := os.WriteFile(p, b, 0o644); err != nil {
				t.Error(err)
				return
			}
			if err := os.Chtimes(p, fi.ModTime(), fi.ModTime()); err != nil {
				t.Error(err)
			}
		}},
		{"replaced by an identical copy", "it was replaced by another file", func(t *testing.T, p string) {
			fi, err := os.Stat(p)
			if err != nil {
				t.Error(err)
				return
			}
			b, err := os.ReadFile(p)
			if err != nil {
				t.Error(err)
				return
			}
			tmp := p + ".new"
			if err := os.WriteFile(tmp, b, 0o644); err != nil {
				t.Error(err)
				return
			}
			if err := os.Chtimes(tmp, fi.ModTime(), fi.ModTime()); err != nil {
				t.Error(err)
			}
			if err := os.Rename(tmp, p); err != nil {
				t.Error(err)
			}
		}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := badLibWorld(t)
			first := badLibSST(t, dir)[0] // 2001: read by step 12, then no more
			r, err := config.Load(filepath.Join(dir, fixtures.StudyFile), config.LoadOptions{LookupEnv: config.NoEnvironment})
			if err != nil {
				t.Fatal(err)
			}
			out := filepath.Join(t.TempDir(), "out")
			changed := false
			opt := Options{OutDir: out, NoPlots: true, Progress: func(_ string, done, _ int) {
				if done == 20 && !changed {
					changed = true
					c.change(t, first)
				}
			}}
			reps, err := Run(context.Background(), r, nil, opt)
			if !changed {
				t.Fatal("the change was never made")
			}
			if !errors.Is(err, ErrInputChanged) {
				t.Fatalf("error %v, want one wrapping ErrInputChanged", err)
			}
			for _, w := range []string{first, "(role sst) changed while the run read it", c.want, "nothing was written"} {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("the error lacks %q: %v", w, err)
				}
			}
			if len(reps) != 0 {
				t.Errorf("%d reports", len(reps))
			}
			for _, n := range append(output.OutputNames(), StateFile) {
				if _, err := os.Stat(filepath.Join(out, n)); err == nil {
					t.Errorf("%s written", n)
				}
			}
		})
	}
	t.Run("unchanged: provenance holds the checksum of what was read", func(t *testing.T) {
		dir := badLibWorld(t)
		r, err := config.Load(filepath.Join(dir, fixtures.StudyFile), config.LoadOptions{LookupEnv: config.NoEnvironment})
		if err != nil {
			t.Fatal(err)
		}
		before := map[string]string{}
		for _, ps := range datasetPaths(&r.Datasets[0]) {
			for _, p := range ps {
				if before[p], err = fileSHA256(p); err != nil {
					t.Fatal(err)
				}
			}
		}
		reps, err := Run(context.Background(), r, nil, Options{OutDir: filepath.Join(t.TempDir(), "out"), NoPlots: true})
		if err != nil {
			t.Fatal(err)
		}
		if len(reps[0].Meta.Inputs) == 0 {
			t.Fatal("no inputs in the provenance")
		}
		for _, in := range reps[0].Meta.Inputs {
			if b, ok := before[in.Path]; !ok || b != in.SHA256 || len(in.SHA256) != 64 {
				t.Errorf("%s: provenance SHA-256 %q, before the run %q", in.Path, in.SHA256, b)
			}
		}
	})
}
