package main

// Paths, names and sizes from the command line (issue 13): file names
// with control characters are quoted in messages, --memory-budget refuses
// what would not fit before anything is allocated, and figures are never
// written through a symbolic link out of the run folder.

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestControlCharactersQuoted: an input whose name holds an escape
// sequence is named with the sequence quoted (\x1b), never raw, in the
// messages of run and inspect.
func TestControlCharactersQuoted(t *testing.T) {
	d := badWorld(t, nil)
	files := badFiles(t, d, "sst", 2)
	evil := filepath.Join(d, "sst", "sst_\x1b[31mred\x07.nc")
	if err := os.Rename(files[1], evil); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(evil, []byte("CDF\x01\x00\x00"), 0o644); err != nil { // cut inside its header
		t.Fatal(err)
	}
	stderr := badFails(t, badStudy(t, d, nil), `sst_\x1b[31mred\a.nc`, "damaged or truncated")
	if strings.ContainsAny(stderr, "\x1b\x07") {
		t.Errorf("run wrote raw control characters: %q", stderr)
	}
	var out, errb bytes.Buffer
	if code := run([]string{"inspect", evil}, &out, &errb); code != 1 {
		t.Errorf("inspect exit status %d, want 1", code)
	}
	if strings.ContainsAny(out.String()+errb.String(), "\x1b\x07") || !strings.Contains(out.String(), `sst_\x1b[31mred\a.nc`) {
		t.Errorf("inspect output %q", out.String()+errb.String())
	}
}

// TestMemoryBudgetFlag: --memory-budget refuses, in inspect and run, an
// input or an analysis grid that needs more, with the grid and the budget
// in the message, and writes nothing.
func TestMemoryBudgetFlag(t *testing.T) {
	d := badWorld(t, nil)
	sst := badFiles(t, d, "sst", 2)[0]
	var out, errb bytes.Buffer
	code := run([]string{"inspect", "--memory-budget", "64KiB", sst}, &out, &errb)
	if code != 1 || !strings.Contains(out.String(), "36×72 (lat×lon) grid") || !strings.Contains(out.String(), "memory budget of 64 KiB") {
		t.Errorf("inspect --memory-budget 64KiB: exit %d\n%s%s", code, out.String(), errb.String())
	}
	out.Reset()
	if code := run([]string{"inspect", "--memory-budget", "1GiB", sst}, &out, &errb); code != 0 {
		t.Errorf("inspect --memory-budget 1GiB: exit %d\n%s", code, out.String())
	}
	res := filepath.Join(t.TempDir(), "results")
	code, stdout, stderr := badRun(t, "--quiet", "--out", res, "--memory-budget", "1MiB", badStudy(t, d, nil))
	if code != 1 || stdout != "" || !strings.Contains(stderr, "analysis grid of 36×72") || !strings.Contains(stderr, "memory budget of 1 MiB") {
		t.Errorf("run --memory-budget 1MiB: exit %d\nstdout %s\nstderr %s", code, stdout, stderr)
	}
	badNoOutputs(t, res)
	code, _, stderr = badRun(t, "--quiet", "--out", res, "--memory-budget", "lots", badStudy(t, d, nil))
	if code != 2 || !strings.Contains(stderr, `"lots" is not a size`) {
		t.Errorf("--memory-budget lots: exit %d, %s", code, stderr)
	}
}

// TestFiguresNotThroughSymlink: a figures folder that is a symbolic link
// out of the run folder is not followed: plot refuses it, and a run that
// replaces the folder writes nothing where it points.
func TestFiguresNotThroughSymlink(t *testing.T) {
	d := badWorld(t, nil)
	study := badStudy(t, d, nil)
	_, res := badSucceeds(t, study)
	elsewhere := filepath.Join(t.TempDir(), "elsewhere")
	if err := os.Mkdir(elsewhere, 0o755); err != nil {
		t.Fatal(err)
	}
	figs := filepath.Join(res, "figures")
	if err := os.RemoveAll(figs); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(elsewhere, figs); err != nil {
		t.Fatal(err)
	}
	var out, errb bytes.Buffer
	code := run([]string{"plot", "--force", res}, &out, &errb)
	if code == 0 {
		t.Errorf("plot through a symlinked figures folder: exit %d\n%s", code, errb.String())
	}
	if ents, _ := os.ReadDir(elsewhere); len(ents) > 0 {
		t.Errorf("plot wrote through the symbolic link into %s: %v", elsewhere, ents)
	}
	// lidscope plot --out LINK: refused as well
	out.Reset()
	errb.Reset()
	code = run([]string{"plot", "--out", figs, res}, &out, &errb)
	if code == 0 {
		t.Errorf("plot --out SYMLINK: exit 0")
	}
	code, _, stderr := badRun(t, "--quiet", "--force", "--out", res, study)
	t.Logf("run --force over it: exit %d %s", code, stderr)
	ents, err := os.ReadDir(elsewhere)
	if err != nil {
		t.Fatal(err)
	}
	if len(ents) > 0 {
		t.Errorf("figures written through the symbolic link into %s: %v", elsewhere, ents)
	}
}
