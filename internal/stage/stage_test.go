package stage

import (
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// files reads every entry of dir into name → contents ("<dir>" for a
// directory), so a test can compare whole directories.
func files(t *testing.T, dir string) map[string]string {
	t.Helper()
	es, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	m := map[string]string{}
	for _, e := range es {
		if e.IsDir() {
			m[e.Name()] = "<dir>"
			continue
		}
		b, err := os.ReadFile(filepath.Join(dir, e.Name()))
		if err != nil {
			t.Fatal(err)
		}
		m[e.Name()] = string(b)
	}
	return m
}

func put(t *testing.T, dir string, m map[string]string) {
	t.Helper()
	for n, s := range m {
		if err := os.WriteFile(filepath.Join(dir, n), []byte(s), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

func same(a, b map[string]string) bool {
	if len(a) != len(b) {
		return false
	}
	for k, v := range a {
		if w, ok := b[k]; !ok || w != v {
			return false
		}
	}
	return true
}

var set = []string{"a.nc", "b.csv", "c.json"}

func TestCommit(t *testing.T) {
	boom := errors.New("injected failure")
	cases := []struct {
		name    string
		before  map[string]string // destination before staging
		during  map[string]string // written into the destination after staging, before Commit
		replace bool
		failAt  string // BeforeMove fails for this name
		wantErr error  // errors.Is target; nil: success
		want    map[string]string
	}{
		{name: "empty destination",
			want: map[string]string{"a.nc": "new a.nc", "b.csv": "new b.csv", "c.json": "new c.json"}},
		{name: "other files are kept", before: map[string]string{"notes.txt": "mine"},
			want: map[string]string{"a.nc": "new a.nc", "b.csv": "new b.csv", "c.json": "new c.json", "notes.txt": "mine"}},
		{name: "replace", before: map[string]string{"a.nc": "old a.nc", "c.json": "old c.json", "notes.txt": "mine"}, replace: true,
			want: map[string]string{"a.nc": "new a.nc", "b.csv": "new b.csv", "c.json": "new c.json", "notes.txt": "mine"}},
		{name: "appeared meanwhile is not replaced", during: map[string]string{"b.csv": "someone else's"}, wantErr: fs.ErrExist,
			want: map[string]string{"b.csv": "someone else's"}},
		{name: "appeared meanwhile is replaced on request", during: map[string]string{"b.csv": "someone else's"}, replace: true,
			want: map[string]string{"a.nc": "new a.nc", "b.csv": "new b.csv", "c.json": "new c.json"}},
		{name: "failure at the first move", failAt: "a.nc", wantErr: boom, want: map[string]string{}},
		{name: "failure at the last move", failAt: "c.json", wantErr: boom, want: map[string]string{}},
		{name: "failure while replacing puts the earlier files back",
			before:  map[string]string{"a.nc": "old a.nc", "b.csv": "old b.csv", "c.json": "old c.json", "notes.txt": "mine"},
			replace: true, failAt: "c.json", wantErr: boom,
			want: map[string]string{"a.nc": "old a.nc", "b.csv": "old b.csv", "c.json": "old c.json", "notes.txt": "mine"}},
		{name: "failure while replacing some",
			before:  map[string]string{"b.csv": "old b.csv"},
			replace: true, failAt: "c.json", wantErr: boom,
			want: map[string]string{"b.csv": "old b.csv"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dest := t.TempDir()
			put(t, dest, c.before)
			d, err := New(dest, ".stage-test-")
			if err != nil {
				t.Fatal(err)
			}
			for _, n := range set {
				if err := d.WriteFile(n, []byte("new "+n)); err != nil {
					t.Fatal(err)
				}
			}
			put(t, dest, c.during)
			if c.failAt != "" {
				d.BeforeMove = func(n string) error {
					if n == c.failAt {
						return boom
					}
					return nil
				}
			}
			err = d.Commit(set, c.replace)
			switch {
			case c.wantErr == nil && err != nil:
				t.Fatalf("Commit: %v", err)
			case c.wantErr != nil && !errors.Is(err, c.wantErr):
				t.Fatalf("Commit: err = %v, want %v", err, c.wantErr)
			}
			if err := d.Remove(); err != nil {
				t.Fatal(err)
			}
			if got := files(t, dest); !same(got, c.want) {
				t.Errorf("destination holds %v, want %v", got, c.want)
			}
		})
	}
}

// The messages name the file and say that nothing was written.
func TestCommitMessages(t *testing.T) {
	dest := t.TempDir()
	d, err := New(dest, ".stage-test-")
	if err != nil {
		t.Fatal(err)
	}
	defer d.Remove()
	if err := d.WriteFile("a.nc", []byte("x")); err != nil {
		t.Fatal(err)
	}
	put(t, dest, map[string]string{"a.nc": "y"})
	err = d.Commit([]string{"a.nc"}, false)
	if err == nil || !strings.Contains(err.Error(), filepath.Join(dest, "a.nc")) || !strings.Contains(err.Error(), "nothing was written") {
		t.Errorf("err = %v", err)
	}
	d.BeforeMove = func(string) error { return errors.New("no") }
	err = d.Commit([]string{"a.nc"}, true)
	if err == nil || !strings.Contains(err.Error(), "moving a.nc into "+dest) {
		t.Errorf("err = %v", err)
	}
}

func TestNewHidden(t *testing.T) {
	dest := t.TempDir()
	d, err := New(dest, ".stage-test-")
	if err != nil {
		t.Fatal(err)
	}
	if got := filepath.Dir(d.Path("x")); filepath.Dir(got) != dest || !strings.HasPrefix(filepath.Base(got), ".stage-test-") {
		t.Errorf("staging directory %s, want a hidden one directly in %s", got, dest)
	}
	if err := d.Remove(); err != nil {
		t.Fatal(err)
	}
	if got := files(t, dest); len(got) != 0 {
		t.Errorf("Remove left %v", got)
	}
	if _, err := New(filepath.Join(dest, "missing"), ".x-"); err == nil {
		t.Error("New in a missing directory succeeded")
	}
}

func TestWriteFileRefusesExisting(t *testing.T) {
	d, err := New(t.TempDir(), ".stage-test-")
	if err != nil {
		t.Fatal(err)
	}
	defer d.Remove()
	if err := d.WriteFile("a", []byte("1")); err != nil {
		t.Fatal(err)
	}
	if err := d.WriteFile("a", []byte("2")); !errors.Is(err, fs.ErrExist) {
		t.Errorf("second WriteFile: err = %v, want fs.ErrExist", err)
	}
}

func TestExisting(t *testing.T) {
	dest := t.TempDir()
	put(t, dest, map[string]string{"c.json": "", "a.nc": "", "notes.txt": ""})
	got, err := Existing(dest, set)
	if err != nil || !slices.Equal(got, []string{"a.nc", "c.json"}) {
		t.Errorf("Existing = %v, %v; want [a.nc c.json] in the order given", got, err)
	}
	for _, make := range []func(p string) error{
		func(p string) error { return os.Mkdir(p, 0o755) },
		func(p string) error { return os.Symlink(filepath.Join(dest, "a.nc"), p) },
	} {
		d := t.TempDir()
		p := filepath.Join(d, "b.csv")
		if err := make(p); err != nil {
			t.Fatal(err)
		}
		if _, err := Existing(d, set); err == nil || !strings.Contains(err.Error(), p) || !strings.Contains(err.Error(), "not a regular file") {
			t.Errorf("%s: err = %v", p, err)
		}
	}
	if got, err := Existing(filepath.Join(dest, "missing"), set); err != nil || got != nil {
		t.Errorf("missing directory: %v, %v", got, err)
	}
}

func BenchmarkCommit(b *testing.B) {
	dest := b.TempDir()
	payload := make([]byte, 64<<10)
	for b.Loop() {
		d, err := New(dest, ".stage-bench-")
		if err != nil {
			b.Fatal(err)
		}
		for _, n := range set {
			if err := d.WriteFile(n, payload); err != nil {
				b.Fatal(err)
			}
		}
		if err := d.Commit(set, true); err != nil {
			b.Fatal(err)
		}
		d.Remove()
	}
}
