package cfwrite_test

import (
	"errors"
	"io/fs"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"lidscope/internal/cfwrite"
	"lidscope/netcdf"
)

// startMaps creates a writer with a grid, a time axis and one map variable.
func startMaps(t *testing.T, path string, opts cfwrite.Options) (*cfwrite.Writer, *cfwrite.Var) {
	t.Helper()
	w, err := cfwrite.Create(path, opts)
	must(t, err)
	must(t, w.SetGrid(cfwrite.Grid{Lat: fixLat, Lon: fixLon}))
	must(t, w.SetTime(cfwrite.TimeAxis{Units: "days since 1979-01-01", Calendar: "standard"}))
	v, err := w.AddVar(cfwrite.VarSpec{Name: "sst", Dims: []string{"time", "lat", "lon"}, Units: "K", StandardName: "sea_surface_temperature"})
	must(t, err)
	return w, v
}

func TestTemporaryNameUntilClose(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "out.nc")
	w, v := startMaps(t, path, fixOptions())
	i, err := w.AppendTime(0)
	must(t, err)
	must(t, v.WriteStep(i, make([]float64, 12)))
	names := dirNames(t, dir)
	if len(names) != 1 || !strings.HasPrefix(names[0], ".out.nc.tmp-") || filepath.Join(dir, names[0]) != w.TempPath() {
		t.Fatalf("while writing the directory holds %v, want only the hidden temporary %s", names, w.TempPath())
	}
	must(t, w.Close())
	if names := dirNames(t, dir); len(names) != 1 || names[0] != "out.nc" {
		t.Fatalf("after Close the directory holds %v, want only out.nc", names)
	}
	st, err := os.Stat(path)
	must(t, err)
	if want := 0o666 &^ currentUmask(t); st.Mode().Perm() != want {
		t.Errorf("mode %v, want %v: a new file's mode under the umask, not a private temporary mode", st.Mode().Perm(), want)
	}
	must(t, w.Close()) // a second Close is a no-op
	w.Abort()          // and so is Abort after Close
	if _, err := os.Stat(path); err != nil {
		t.Fatalf("Abort after Close removed the file: %v", err)
	}
	if _, err := w.AppendTime(1); !errors.Is(err, cfwrite.ErrClosed) {
		t.Errorf("AppendTime after Close: %v, want ErrClosed", err)
	}
}

// currentUmask reads the process umask from /proc (Linux ≥ 4.7).
func currentUmask(t *testing.T) os.FileMode {
	b, err := os.ReadFile("/proc/self/status")
	if err != nil {
		t.Skipf("cannot read the umask: %v", err)
	}
	for _, l := range strings.Split(string(b), "\n") {
		if v, ok := strings.CutPrefix(l, "Umask:"); ok {
			var m uint32
			for _, c := range strings.TrimSpace(v) {
				m = m*8 + uint32(c-'0')
			}
			return os.FileMode(m)
		}
	}
	t.Skip("no Umask line in /proc/self/status")
	return 0
}

// TestFailedWritesLeaveNothing: every failure mode leaves neither the final
// file nor the temporary one, and the error names file and variable.
func TestFailedWritesLeaveNothing(t *testing.T) {
	cases := []struct {
		name string
		run  func(w *cfwrite.Writer, v *cfwrite.Var) error
		want []string // substrings of the error
	}{
		{"short slab", func(w *cfwrite.Writer, v *cfwrite.Var) error {
			i, _ := w.AppendTime(0)
			return v.WriteStep(i, make([]float64, 11))
		}, []string{"out.nc", "variable sst", "slab has 11 values, want 12", "lat×lon = 3×4"}},
		{"step not appended", func(w *cfwrite.Writer, v *cfwrite.Var) error {
			return v.WriteStep(0, make([]float64, 12))
		}, []string{"variable sst", "step 0 is not on the time axis", "AppendTime"}},
		{"infinite value", func(w *cfwrite.Writer, v *cfwrite.Var) error {
			i, _ := w.AppendTime(0)
			d := make([]float64, 12)
			d[7] = math.Inf(1)
			return v.WriteStep(i, d)
		}, []string{"variable sst", "+Inf", "time=0, lat=1, lon=3"}},
		{"value equal to fill", func(w *cfwrite.Writer, v *cfwrite.Var) error {
			i, _ := w.AppendTime(0)
			d := make([]float64, 12)
			d[0] = 1e20
			return v.WriteStep(i, d)
		}, []string{"equals the _FillValue"}},
		{"too large for float32", func(w *cfwrite.Writer, v *cfwrite.Var) error {
			i, _ := w.AppendTime(0)
			d := make([]float64, 12)
			d[0] = 1e39
			return v.WriteStep(i, d)
		}, []string{"cannot be stored as float32"}},
		{"time not increasing", func(w *cfwrite.Writer, v *cfwrite.Var) error {
			w.AppendTime(5)
			_, err := w.AppendTime(5)
			return err
		}, []string{"does not exceed the previous 5"}},
		{"missing step", func(w *cfwrite.Writer, v *cfwrite.Var) error {
			i, _ := w.AppendTime(0)
			v.WriteStep(i, make([]float64, 12))
			w.AppendTime(1)
			return w.Close()
		}, []string{"variable sst", "1 of 2 time steps were not written (steps 1)"}},
		{"no time steps", func(w *cfwrite.Writer, v *cfwrite.Var) error {
			return w.Close()
		}, []string{"the time axis has no values"}},
		{"declare after write", func(w *cfwrite.Writer, v *cfwrite.Var) error {
			w.AppendTime(0)
			_, err := w.AddVar(cfwrite.VarSpec{Name: "x", Units: "1", LongName: "x"})
			return err
		}, []string{"AddVar x after data were written"}},
		{"abort", func(w *cfwrite.Writer, v *cfwrite.Var) error {
			i, _ := w.AppendTime(0)
			v.WriteStep(i, make([]float64, 12))
			w.Abort()
			return w.Close()
		}, []string{"closed or aborted"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			w, v := startMaps(t, filepath.Join(dir, "out.nc"), fixOptions())
			err := c.run(w, v)
			if err == nil {
				t.Fatal("no error")
			}
			for _, s := range c.want {
				if !strings.Contains(err.Error(), s) {
					t.Errorf("error %q lacks %q", err, s)
				}
			}
			// The directory is empty before and after Close.
			if names := dirNames(t, dir); len(names) != 0 {
				t.Errorf("after the error the directory holds %v", names)
			}
			if cerr := w.Close(); cerr == nil || (c.name != "abort" && cerr.Error() != err.Error()) {
				t.Errorf("Close after the error returned %v, want the first error %v", cerr, err)
			}
			if names := dirNames(t, dir); len(names) != 0 {
				t.Errorf("after Close the directory holds %v", names)
			}
		})
	}
}

func TestOverwrite(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "out.nc")
	must(t, os.WriteFile(path, []byte("precious"), 0o644))

	_, err := cfwrite.Create(path, fixOptions())
	if !errors.Is(err, fs.ErrExist) {
		t.Fatalf("Create over an existing file without Overwrite: %v, want fs.ErrExist", err)
	}
	for _, s := range []string{path, "Options.Overwrite", "remove it"} {
		if !strings.Contains(err.Error(), s) {
			t.Errorf("error %q lacks %q", err, s)
		}
	}
	if b, _ := os.ReadFile(path); string(b) != "precious" {
		t.Fatalf("the existing file was changed: %q", b)
	}
	if names := dirNames(t, dir); len(names) != 1 {
		t.Fatalf("directory holds %v", names)
	}

	// A file that appears while writing is not replaced either.
	other := filepath.Join(dir, "late.nc")
	w, v := startMaps(t, other, fixOptions())
	i, _ := w.AppendTime(0)
	must(t, v.WriteStep(i, make([]float64, 12)))
	must(t, os.WriteFile(other, []byte("late"), 0o644))
	if err := w.Close(); !errors.Is(err, fs.ErrExist) {
		t.Fatalf("Close onto a file created meanwhile: %v, want fs.ErrExist", err)
	}
	if b, _ := os.ReadFile(other); string(b) != "late" {
		t.Fatalf("the file created meanwhile was replaced: %q", b)
	}

	// With Overwrite the existing file is replaced by a complete one.
	opts := fixOptions()
	opts.Overwrite = true
	w, v = startMaps(t, path, opts)
	i, _ = w.AppendTime(0)
	must(t, v.WriteStep(i, make([]float64, 12)))
	if b, _ := os.ReadFile(path); string(b) != "precious" {
		t.Fatalf("the existing file changed before Close: %q", b)
	}
	must(t, w.Close())
	f, err := netcdf.Open(path)
	must(t, err)
	f.Close()
	if names := dirNames(t, dir); len(names) != 2 {
		t.Fatalf("directory holds %v, want late.nc and out.nc", names)
	}

	// A directory is never a target.
	if _, err := cfwrite.Create(dir, opts); err == nil || !strings.Contains(err.Error(), "is a directory") {
		t.Errorf("Create onto a directory: %v", err)
	}
}

// TestCrashLeavesNoFinalFile kills a writer process part-way (SIGKILL, no
// deferred cleanup runs) and checks that the final name never appears.
func TestCrashLeavesNoFinalFile(t *testing.T) {
	if os.Getenv("CFWRITE_CRASH_DIR") != "" {
		return // the child's own run of this test: see TestCrashHelper
	}
	dir := t.TempDir()
	cmd := exec.Command(os.Args[0], "-test.run=^TestCrashHelper$")
	cmd.Env = append(os.Environ(), "CFWRITE_CRASH_DIR="+dir)
	err := cmd.Run()
	var ee *exec.ExitError
	if !errors.As(err, &ee) || ee.Success() {
		t.Fatalf("the writer process should have been killed, got %v", err)
	}
	names := dirNames(t, dir)
	for _, n := range names {
		if n == "out.nc" {
			t.Fatalf("a killed writer left out.nc behind: %v", names)
		}
		if !strings.HasPrefix(n, ".out.nc.tmp-") {
			t.Errorf("unexpected file %s", n)
		}
	}
}

// TestCrashHelper is the child process of TestCrashLeavesNoFinalFile.
func TestCrashHelper(t *testing.T) {
	dir := os.Getenv("CFWRITE_CRASH_DIR")
	if dir == "" {
		t.Skip("runs only as the child of TestCrashLeavesNoFinalFile")
	}
	w, v := startMaps(t, filepath.Join(dir, "out.nc"), fixOptions())
	for s := range 3 {
		i, _ := w.AppendTime(float64(s))
		must(t, v.WriteStep(i, make([]float64, 12)))
	}
	p, _ := os.FindProcess(os.Getpid())
	p.Kill()
	select {}
}
