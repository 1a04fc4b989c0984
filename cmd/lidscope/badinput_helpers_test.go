package main

// Helpers of the bad-input tests (badinput_test.go): a small synthetic
// world to start from (package fixtures: invented data, labelled
// synthetic), a NetCDF copier that changes attributes, values or the
// on-disk format on the way, and the checks every failing run must pass.

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"lidscope/analysis"
	"lidscope/fixtures"
	"lidscope/internal/testutil"
	"lidscope/netcdf"
	"lidscope/output"
)

// badOptions is the small world the bad-input tests break: a 5° grid
// (36×72 cells), two years of monthly means from January 2001, one file
// per year and variable, so every time-dependent role is a record of two
// files. Invented data (see package fixtures).
func badOptions() fixtures.Options {
	o := fixtures.DefaultOptions()
	o.Name = "bad-input"
	o.Resolution = 5
	o.Years = 2
	o.YearsPerFile = 1
	o.Command = []string{"lidscope-test", "badinput"}
	return o
}

// badWorld generates the world of opt (badOptions with changes) into a new
// temporary directory and returns the directory; its study is
// dir/study.yaml.
func badWorld(t *testing.T, change func(*fixtures.Options)) string {
	t.Helper()
	if change == nil { // the plain world: generated once, copied for each test
		return testutil.PrivateWorld(t, "bad-input", func(dir string) error {
			_, err := fixtures.Generate(dir, badOptions())
			return err
		})
	}
	o := badOptions()
	change(&o)
	dir := filepath.Join(t.TempDir(), "world")
	if _, err := fixtures.Generate(dir, o); err != nil {
		t.Fatalf("fixtures.Generate: %v", err)
	}
	return dir
}

// badFiles returns the files of a world's role directory (sst,
// air_temperature, low_cloud), sorted, and fails unless there are want.
func badFiles(t *testing.T, dir, sub string, want int) []string {
	t.Helper()
	m, err := filepath.Glob(filepath.Join(dir, sub, "*.nc"))
	if err != nil {
		t.Fatal(err)
	}
	sort.Strings(m)
	if len(m) != want {
		t.Fatalf("%s/%s holds %d files, want %d: %v", dir, sub, len(m), want, m)
	}
	return m
}

// badStudy rewrites the world's study with edit (a text edit of the YAML
// the fixtures package wrote) and returns its path. Edits that do not
// change the text fail the test, so a test cannot pass by editing nothing.
func badStudy(t *testing.T, dir string, edit func(string) string) string {
	t.Helper()
	p := filepath.Join(dir, fixtures.StudyFile)
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	if edit != nil {
		s := edit(string(b))
		if s == string(b) {
			t.Fatalf("the study edit changed nothing:\n%s", b)
		}
		if err := os.WriteFile(p, []byte(s), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return p
}

// replaceOnce replaces old by new in s and panics (a broken test) unless
// old occurs exactly once.
func replaceOnce(s, old, new string) string {
	if n := strings.Count(s, old); n != 1 {
		panic(fmt.Sprintf("study edit: %q occurs %d times", old, n))
	}
	return strings.Replace(s, old, new, 1)
}

// badRun runs `lidscope run ARGS...` through the whole command path and
// returns the exit status and the two streams. The environment may hold
// LIDSCOPE_* overrides of the person running the tests; they are cleared.
func badRun(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	for _, kv := range os.Environ() {
		if k, _, _ := strings.Cut(kv, "="); strings.HasPrefix(k, "LIDSCOPE_") {
			t.Setenv(k, "")
		}
	}
	var stdout, stderr bytes.Buffer
	code := run(append([]string{"run"}, args...), &stdout, &stderr)
	return code, stdout.String(), stderr.String()
}

// badNoOutputs checks that dir holds no output of a run under its final
// name (the outputs of package output and the run state) and no hidden
// staging directory or temporary file of one.
func badNoOutputs(t *testing.T, dir string) {
	t.Helper()
	for _, n := range append(output.OutputNames(), analysis.StateFile) {
		if _, err := os.Lstat(filepath.Join(dir, n)); err == nil {
			t.Errorf("%s exists after a failed run", filepath.Join(dir, n))
		}
	}
	ents, err := os.ReadDir(dir)
	if os.IsNotExist(err) {
		return
	}
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range ents {
		if strings.HasPrefix(e.Name(), ".") {
			t.Errorf("hidden %s left in %s after a failed run", e.Name(), dir)
		}
	}
}

// badFails runs the study into a fresh output folder and checks the
// failure: exit status 1, every wanted text on stderr, nothing on stdout,
// and no output left behind. It returns stderr.
func badFails(t *testing.T, study string, want ...string) string {
	t.Helper()
	out := filepath.Join(t.TempDir(), "results")
	code, stdout, stderr := badRun(t, "--quiet", "--out", out, study)
	if code != 1 {
		t.Errorf("exit status %d, want 1\nstdout:\n%s\nstderr:\n%s", code, stdout, stderr)
	}
	if stdout != "" {
		t.Errorf("a failed run wrote to stdout:\n%s", stdout)
	}
	for _, w := range want {
		if !strings.Contains(stderr, w) {
			t.Errorf("the error lacks %q:\n%s", w, stderr)
		}
	}
	badNoOutputs(t, out)
	return stderr
}

// badSucceeds runs the study into a fresh output folder, checks exit
// status 0 and that every output exists, and returns stdout and the
// folder.
func badSucceeds(t *testing.T, study string, args ...string) (string, string) {
	t.Helper()
	out := filepath.Join(t.TempDir(), "results")
	// No figures: the checks are of the outputs (figures are drawn and
	// checked by the figures package and the documented-commands test).
	code, stdout, stderr := badRun(t, append(append([]string{"--quiet", "--no-plots", "--out", out}, args...), study)...)
	if code != 0 {
		t.Fatalf("exit status %d, want 0\nstdout:\n%s\nstderr:\n%s", code, stdout, stderr)
	}
	for _, n := range output.OutputNames() {
		if _, err := os.Stat(filepath.Join(out, n)); err != nil {
			t.Errorf("output %s missing after a successful run: %v", n, err)
		}
	}
	return stdout, out
}

// ncEdit says what badCopyNC changes on the way.
type ncEdit struct {
	// Attrs: variable name ("" for global attributes) → attribute →
	// value; a nil value removes the attribute.
	Attrs map[string]map[string]any
	// Data, when set, may change a variable's values in place (shape is
	// the variable's shape; values in stored units, row-major).
	Data func(name string, shape []int, vals []float64)
}

// badCopyNC copies the NetCDF file src to dst in the given format,
// applying edit. Every variable of the fixtures' files is numeric; float
// variables are copied as float32 so NaN and ±Inf reach the file as they
// are.
func badCopyNC(t *testing.T, src, dst string, format netcdf.Format, edit ncEdit) {
	t.Helper()
	if err := copyNC(src, dst, format, edit); err != nil {
		t.Fatalf("copying %s to %s: %v", src, dst, err)
	}
}

func copyNC(src, dst string, format netcdf.Format, edit ncEdit) (err error) {
	in, err := netcdf.Open(src)
	if err != nil {
		return err
	}
	defer in.Close()
	tmp := dst + ".copy-tmp"
	out, err := netcdf.CreateFormat(tmp, format)
	if err != nil {
		return err
	}
	defer func() {
		if cerr := out.Close(); err == nil {
			err = cerr
		}
		if err == nil {
			err = os.Rename(tmp, dst)
		} else {
			os.Remove(tmp)
		}
	}()
	dims, err := in.Dims()
	if err != nil {
		return err
	}
	for _, d := range dims {
		n := d.Len
		if d.Unlimited {
			n = netcdf.Unlimited
		}
		if _, err := out.DefDim(d.Name, n); err != nil {
			return err
		}
	}
	putAttrs := func(name string, have []netcdf.Attr, put func(string, any) error) error {
		ed := edit.Attrs[name]
		for _, a := range have {
			v, changed := ed[a.Name]
			if !changed {
				v = a.Value
			}
			if v == nil {
				continue
			}
			if err := put(a.Name, v); err != nil {
				return fmt.Errorf("%s:%s: %w", name, a.Name, err)
			}
		}
		var added []string
		for k, v := range ed {
			if v == nil {
				continue
			}
			found := false
			for _, a := range have {
				found = found || a.Name == k
			}
			if !found {
				added = append(added, k)
			}
		}
		sort.Strings(added)
		for _, k := range added {
			if err := put(k, ed[k]); err != nil {
				return fmt.Errorf("%s:%s: %w", name, k, err)
			}
		}
		return nil
	}
	ga, err := in.Attrs()
	if err != nil {
		return err
	}
	if err := putAttrs("", ga, out.PutAttr); err != nil {
		return err
	}
	vars, err := in.Vars()
	if err != nil {
		return err
	}
	type pair struct{ in, out *netcdf.Var }
	var pairs []pair
	for _, v := range vars {
		var dn []string
		for _, d := range v.Dims {
			dn = append(dn, d.Name)
		}
		ov, err := out.DefVar(v.Name, v.Type, dn)
		if err != nil {
			return err
		}
		as, err := v.Attrs()
		if err != nil {
			return err
		}
		if err := putAttrs(v.Name, as, ov.PutAttr); err != nil {
			return err
		}
		pairs = append(pairs, pair{v, ov})
	}
	if err := out.EndDef(); err != nil {
		return err
	}
	for _, p := range pairs {
		shape := p.in.Shape()
		n := 1
		for _, s := range shape {
			n *= s
		}
		if n == 0 {
			continue
		}
		start := make([]int, len(shape))
		vals := make([]float64, n)
		if err := p.in.ReadFloat64(start, shape, vals); err != nil {
			return err
		}
		if edit.Data != nil {
			edit.Data(p.in.Name, shape, vals)
		}
		if p.in.Type == netcdf.Float {
			f := make([]float32, n)
			for i, x := range vals {
				f[i] = float32(x)
			}
			err = p.out.WriteFloat32(start, shape, f)
		} else {
			err = p.out.WriteFloat64(start, shape, vals)
		}
		if err != nil {
			return fmt.Errorf("writing %s: %w", p.in.Name, err)
		}
	}
	return nil
}

// badTruncate cuts path to frac of its size.
func badTruncate(t *testing.T, path string, frac float64) {
	t.Helper()
	st, err := os.Stat(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.Truncate(path, int64(math.Floor(float64(st.Size())*frac))); err != nil {
		t.Fatal(err)
	}
}

// execCombined runs a reference tool and returns its combined output.
func execCombined(tool string, args ...string) ([]byte, error) {
	return exec.Command(tool, args...).CombinedOutput()
}

// badCopyFile copies a file byte for byte.
func badCopyFile(t *testing.T, src, dst string) {
	t.Helper()
	in, err := os.Open(src)
	if err != nil {
		t.Fatal(err)
	}
	defer in.Close()
	out, err := os.Create(dst)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := io.Copy(out, in); err != nil {
		t.Fatal(err)
	}
	if err := out.Close(); err != nil {
		t.Fatal(err)
	}
}
