package runfolder

import (
	"context"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// write stages files (name → content) into a new Stage of target and
// commits them.
func write(t *testing.T, target string, opt Options, files map[string]string) *Manifest {
	t.Helper()
	s, err := Create(target, opt)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	for n, c := range files {
		if err := s.WriteFile(n, []byte(c)); err != nil {
			t.Fatal(err)
		}
	}
	m, err := s.Commit(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func content(t *testing.T, dir string) map[string]string {
	t.Helper()
	out := map[string]string{}
	filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			t.Fatal(err)
		}
		if !d.IsDir() && d.Name() != ManifestFile {
			b, err := os.ReadFile(p)
			if err != nil {
				t.Fatal(err)
			}
			rel, _ := filepath.Rel(dir, p)
			out[filepath.ToSlash(rel)] = string(b)
		}
		return nil
	})
	return out
}

func same(a, b map[string]string) bool { return fmt.Sprint(a) == fmt.Sprint(b) }

func TestCommitWritesTheWholeFolder(t *testing.T) {
	target := filepath.Join(t.TempDir(), "run")
	files := map[string]string{"maps.nc": "m", "summary.json": "{}", "figures/a.png": "png"}
	m := write(t, target, Options{}, files)
	if got := content(t, target); !same(got, files) {
		t.Errorf("folder holds %v, want %v", got, files)
	}
	if len(m.Files) != 2 || len(m.Extras) != 1 || m.Extras[0].Name != "figures/a.png" {
		t.Errorf("manifest files %v extras %v", m.Files, m.Extras)
	}
	f, err := Open(target, "maps.nc")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if err := f.Verify(); err != nil {
		t.Error(err)
	}
	if l := Leftovers(target); len(l) != 0 {
		t.Errorf("left behind: %v", l)
	}
}

// With Replace the earlier run stays as it was until Commit; a stage that
// is closed without Commit changes nothing.
func TestReplaceKeepsTheEarlierRunUntilCommit(t *testing.T) {
	target := filepath.Join(t.TempDir(), "run")
	old := map[string]string{"maps.nc": "old", "run-state.gob": "old-state", "figures/a.png": "old"}
	write(t, target, Options{}, old)
	s, err := Create(target, Options{Replace: true})
	if err != nil {
		t.Fatal(err)
	}
	if err := s.WriteFile("maps.nc", []byte("new")); err != nil {
		t.Fatal(err)
	}
	if got := content(t, target); !same(got, old) {
		t.Errorf("during the new run the folder holds %v", got)
	}
	s.Close()
	if got := content(t, target); !same(got, old) {
		t.Errorf("after an abandoned run the folder holds %v", got)
	}
	if l := Leftovers(target); len(l) != 0 {
		t.Errorf("an abandoned run left %v", l)
	}
	nw := map[string]string{"maps.nc": "new", "run-state.gob": "new-state"}
	write(t, target, Options{Replace: true}, nw)
	if got := content(t, target); !same(got, nw) {
		t.Errorf("after the replacement the folder holds %v, want %v (old figures must go too)", got, nw)
	}
}

func TestCreateRefuses(t *testing.T) {
	dir := t.TempDir()
	committed := filepath.Join(dir, "committed")
	write(t, committed, Options{}, map[string]string{"maps.nc": "x"})
	foreign := filepath.Join(dir, "foreign")
	write(t, foreign, Options{}, map[string]string{"maps.nc": "x"})
	os.WriteFile(filepath.Join(foreign, "my-notes.txt"), []byte("mine"), 0o644)
	old := filepath.Join(dir, "old") // an earlier lidscope's folder: no manifest
	os.MkdirAll(old, 0o755)
	os.WriteFile(filepath.Join(old, "maps.nc"), []byte("x"), 0o644)
	file := filepath.Join(dir, "file")
	os.WriteFile(file, []byte("x"), 0o644)
	link := filepath.Join(dir, "link")
	os.Symlink(committed, link)
	for _, c := range []struct {
		target string
		opt    Options
		want   string // "" succeeds
	}{
		{committed, Options{}, "use --force"},
		{committed, Options{Replace: true}, ""},
		{foreign, Options{Replace: true}, "my-notes.txt"},
		{old, Options{Known: []string{"maps.nc"}}, "never committed"},
		{old, Options{Replace: true}, "maps.nc"}, // unknown without Known
		{old, Options{Replace: true, Known: []string{"maps.nc"}}, ""},
		{file, Options{Replace: true}, "is a file"},
		{link, Options{Replace: true}, "symbolic link"},
		{filepath.Join(dir, "new"), Options{Estimate: 1 << 62}, "no room for the outputs"},
	} {
		s, err := Create(c.target, c.opt)
		if s != nil {
			s.Close()
		}
		switch {
		case c.want == "" && err != nil:
			t.Errorf("%s %+v: %v", c.target, c.opt, err)
		case c.want != "" && (err == nil || !strings.Contains(err.Error(), c.want)):
			t.Errorf("%s %+v: %v, want an error with %q", c.target, c.opt, err, c.want)
		}
	}
	// The refusal to replace is fs.ErrExist for callers, and its message
	// ends with what to do, not with a bare "file already exists".
	_, err := Create(committed, Options{})
	if !errors.Is(err, fs.ErrExist) || strings.HasSuffix(err.Error(), fs.ErrExist.Error()) {
		t.Errorf("Create over a committed run: %v; want fs.ErrExist without its text appended", err)
	}
}

// A second writer fails at once and names the process that holds the
// folder; a reader fails too while a writer holds it.
func TestLockNamesTheOtherProcess(t *testing.T) {
	target := filepath.Join(t.TempDir(), "run")
	write(t, target, Options{}, map[string]string{"maps.nc": "old"})
	s, err := Create(target, Options{Replace: true})
	if err != nil {
		t.Fatal(err)
	}
	_, err = Create(target, Options{Replace: true})
	want := fmt.Sprintf("pid %d", os.Getpid())
	if !errors.Is(err, ErrInUse) || !strings.Contains(err.Error(), want) {
		t.Errorf("second writer: %v, want ErrInUse naming %s", err, want)
	}
	if _, err := Open(target); !errors.Is(err, ErrInUse) {
		t.Errorf("reader during a write: %v", err)
	}
	s.WriteFile("maps.nc", []byte("x"))
	if _, err := s.Commit(context.Background()); err != nil {
		t.Fatal(err)
	}
	s.Close()
	f, err := Open(target)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := Create(target, Options{Replace: true}); !errors.Is(err, ErrInUse) || !strings.Contains(err.Error(), "reading it") {
		t.Errorf("writer during a read: %v", err)
	}
	f.Close()
	// Another process (flock(1), util-linux) holding the lock file.
	if flock, err := exec.LookPath("flock"); err == nil {
		cmd := exec.Command(flock, "--exclusive", LockPath(target), "sleep", "5")
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		defer cmd.Process.Kill()
		for i := 0; i < 100; i++ {
			if _, err = Create(target, Options{Replace: true}); err != nil {
				break
			}
		}
		if !errors.Is(err, ErrInUse) {
			t.Errorf("writer while flock(1) holds the lock: %v", err)
		}
	}
}

// Staging folders of killed runs are removed by the next run; an earlier
// run moved aside by an interrupted replacement is put back.
func TestLeftoversOfKilledRuns(t *testing.T) {
	dir := t.TempDir()
	target := filepath.Join(dir, "run")
	write(t, target, Options{}, map[string]string{"maps.nc": "old"})
	killed := filepath.Join(dir, ".run"+stagingTag+"12345")
	os.MkdirAll(killed, 0o755)
	os.WriteFile(filepath.Join(killed, "maps.nc"), []byte("half"), 0o644)
	if l := Leftovers(target); len(l) != 1 || l[0] != killed {
		t.Errorf("Leftovers = %v", l)
	}
	// The reader does not mind them.
	if f, err := Open(target); err != nil {
		t.Error(err)
	} else {
		f.Close()
	}
	s, err := Create(target, Options{Replace: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Cleaned) != 1 || s.Cleaned[0] != killed {
		t.Errorf("Cleaned = %v", s.Cleaned)
	}
	s.Close()
	if _, err := os.Stat(killed); err == nil {
		t.Error("the staging folder of the killed run is still there")
	}
	// Retired: target moved aside, new one not yet in place.
	aside := filepath.Join(dir, ".run"+retiredTag+"1")
	if err := os.Rename(target, aside); err != nil {
		t.Fatal(err)
	}
	s, err = Create(target, Options{Replace: true})
	if err != nil {
		t.Fatal(err)
	}
	s.Close()
	if s.Restored != aside {
		t.Errorf("Restored = %q", s.Restored)
	}
	if got := content(t, target); got["maps.nc"] != "old" {
		t.Errorf("the earlier run was not put back: %v", got)
	}
}

func TestOpenRefusesIncompleteFolders(t *testing.T) {
	dir := t.TempDir()
	mk := func(name string, change func(d string)) string {
		d := filepath.Join(dir, name)
		write(t, d, Options{}, map[string]string{"maps.nc": "maps", "summary.json": "{}"})
		change(d)
		return d
	}
	for _, c := range []struct {
		dir  string
		need []string
		want []string
	}{
		{mk("nomanifest", func(d string) { os.Remove(filepath.Join(d, ManifestFile)); os.Remove(filepath.Join(d, "maps.nc")) }),
			[]string{"maps.nc", "summary.json"}, []string{"missing: " + ManifestFile + ", maps.nc", "did not finish"}},
		{mk("deleted", func(d string) { os.Remove(filepath.Join(d, "summary.json")) }), nil, []string{"missing: summary.json"}},
		{mk("truncated", func(d string) { os.WriteFile(filepath.Join(d, "maps.nc"), []byte("ma"), 0o644) }), nil, []string{"changed since the run: maps.nc (2 bytes, the run wrote 4)"}},
		{mk("notrun", func(string) {}), []string{"run-state.gob"}, []string{"missing: run-state.gob", "did not write"}},
		{mk("damaged", func(d string) { os.WriteFile(filepath.Join(d, ManifestFile), []byte("{"), 0o644) }), nil, []string{ManifestFile + " is damaged"}},
		// A data folder or a comparison folder given where a run belongs is
		// told so, not to "run it again".
		{func() string { d := filepath.Join(dir, "data"); os.MkdirAll(d, 0o755); return d }(),
			[]string{"maps.nc", "summary.json"}, []string{"missing: " + ManifestFile + ", maps.nc, summary.json", "none of a run's files"}},
		{func() string {
			d := filepath.Join(dir, "comparison")
			os.MkdirAll(d, 0o755)
			os.WriteFile(filepath.Join(d, "comparison.json"), []byte("{}"), 0o644)
			return d
		}(), []string{"maps.nc"}, []string{"holds a comparison (comparison.json), not a run"}},
	} {
		_, err := Open(c.dir, c.need...)
		for _, w := range c.want {
			if err == nil || !strings.Contains(err.Error(), w) {
				t.Errorf("Open(%s): %v, want %q", filepath.Base(c.dir), err, w)
			}
		}
	}
	// Same size, other bytes: Verify sees it.
	d := mk("flipped", func(d string) { os.WriteFile(filepath.Join(d, "maps.nc"), []byte("mapz"), 0o644) })
	f, err := Open(d)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if err := f.Verify(); !errors.Is(err, ErrIncomplete) || !strings.Contains(err.Error(), "maps.nc") {
		t.Errorf("Verify: %v", err)
	}
}

// A cancelled run, or one whose last step fails, commits nothing.
func TestCommitRefusesACancelledRun(t *testing.T) {
	target := filepath.Join(t.TempDir(), "run")
	old := map[string]string{"maps.nc": "old"}
	write(t, target, Options{}, old)
	s, err := Create(target, Options{Replace: true})
	if err != nil {
		t.Fatal(err)
	}
	s.WriteFile("maps.nc", []byte("new"))
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := s.Commit(ctx); !errors.Is(err, context.Canceled) {
		t.Errorf("Commit after cancel: %v", err)
	}
	s.BeforeSwap = func() error { return errors.New("injected") }
	if _, err := s.Commit(context.Background()); err == nil || !strings.Contains(err.Error(), "nothing in") {
		t.Errorf("Commit with a failing swap: %v", err)
	}
	s.Close()
	if got := content(t, target); !same(got, old) {
		t.Errorf("folder holds %v", got)
	}
	if l := Leftovers(target); len(l) != 0 {
		t.Errorf("left behind: %v", l)
	}
}

// An output folder in a read-only place is refused by Create, before any
// computation.
func TestCreateRefusesAnUnwritableFolder(t *testing.T) {
	dir := t.TempDir()
	ro := filepath.Join(dir, "ro")
	os.MkdirAll(ro, 0o755)
	if os.Geteuid() == 0 {
		if err := exec.Command("mount", "-t", "tmpfs", "-o", "ro,size=1m", "tmpfs", ro).Run(); err != nil {
			t.Skip("root cannot mount a read-only tmpfs here, and permissions do not stop root")
		}
		t.Cleanup(func() { exec.Command("umount", ro).Run() })
	} else if err := os.Chmod(ro, 0o555); err != nil {
		t.Fatal(err)
	}
	_, err := Create(filepath.Join(ro, "run"), Options{})
	if err == nil || !strings.Contains(err.Error(), ro) {
		t.Errorf("Create in a read-only folder: %v", err)
	}
}
