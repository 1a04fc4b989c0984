// Package testutil holds what lidscope's tests share: finding the reference
// tools they compare against (skipping when one is missing on a
// developer's machine, failing under CI, which installs them all), a
// Python interpreter that has the reference packages, compiling CDL with
// ncgen, the real-data folder, and synthetic worlds built once per test
// binary.
//
// The rule for a missing reference tool is the same everywhere: with the
// environment variable CI unset the test is skipped with a message that
// names the Debian package to install; with CI set (to anything) the test
// fails, because .ci/run installs every tool (make deps).
package testutil

import (
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strings"
	"sync"
	"testing"
)

// HDF5 (1.10 and later) locks the files it opens with flock, and its file
// descriptors are not close-on-exec: a reference tool one test starts
// inherits the descriptor, and so the lock, of a file another test is
// writing at that moment, and when that test then hands the finished file
// to its own reference reader, the open fails with "HDF error". Tests run
// in parallel, so the test binaries that use this package, and the tools
// they start, do without HDF5's file locking (set only when the variable
// is unset). lidscope's own run-folder lock is a separate flock and is
// unaffected.
func init() {
	if _, ok := os.LookupEnv("HDF5_USE_FILE_LOCKING"); !ok {
		os.Setenv("HDF5_USE_FILE_LOCKING", "FALSE")
	}
}

// DebianPython is Debian's interpreter, where the python3-* packages that
// make deps installs live.
const DebianPython = "/usr/bin/python3"

// toolPackages names the Debian package of each reference tool.
var toolPackages = map[string]string{
	"ncgen":    "netcdf-bin",
	"ncdump":   "netcdf-bin",
	"nccopy":   "netcdf-bin",
	"cdo":      "cdo",
	"udunits2": "udunits-bin",
	"ncks":     "nco",
	"ncap2":    "nco",
	"python3":  "python3",
}

// modulePackages names the Debian package of each Python module the tests
// import.
var modulePackages = map[string]string{
	"numpy":         "python3-numpy",
	"scipy":         "python3-scipy",
	"xarray":        "python3-xarray",
	"netCDF4":       "python3-netcdf4",
	"cftime":        "python3-cftime",
	"yaml":          "python3-yaml",
	"colorspacious": "python3-colorspacious",
	"sklearn":       "python3-sklearn",
	"pandas":        "python3-pandas",
}

// CI reports whether the tests run under CI (the variable CI is set), where
// a missing reference tool is a failure.
func CI() bool { return os.Getenv("CI") != "" }

// Missing ends the test because something it needs is missing: it skips
// with the message, or fails with it when CI is set.
func Missing(t testing.TB, format string, args ...any) {
	t.Helper()
	msg := fmt.Sprintf(format, args...)
	if CI() {
		t.Fatalf("%s (required when CI is set: make deps installs it)", msg)
		return
	}
	t.Skipf("%s; skipping (with CI set this is a failure)", msg)
}

// Tool returns the path of a reference tool found on PATH (or the absolute
// path given); when it is missing the test is skipped, or fails under CI.
func Tool(t testing.TB, name string) string {
	t.Helper()
	p, err := exec.LookPath(name)
	if err != nil {
		if pkg := toolPackages[filepath.Base(name)]; pkg != "" {
			Missing(t, "%s not found (Debian package %s): %v", name, pkg, err)
		} else {
			Missing(t, "%s not found: %v", name, err)
		}
		return ""
	}
	return p
}

// Check runs check and, when it returns an error, skips the test (fails
// under CI) saying what is missing.
func Check(t testing.TB, what string, check func() error) {
	t.Helper()
	if err := check(); err != nil {
		Missing(t, "%s is missing: %v", what, err)
	}
}

type pyResult struct {
	path string
	err  error
}

var (
	pyMu    sync.Mutex
	pyFound = map[string]pyResult{}
)

// Python returns a Python 3 interpreter that imports every module given:
// the first python3 on PATH when it does, else Debian's /usr/bin/python3
// (where make deps installs the python3-* packages). When neither does
// the test is skipped, or fails under CI. The answer is remembered for the
// test binary, so the interpreters are probed once per module set.
func Python(t testing.TB, modules ...string) string {
	t.Helper()
	mods := append([]string(nil), modules...)
	sort.Strings(mods)
	key := strings.Join(mods, ",")
	pyMu.Lock()
	r, ok := pyFound[key]
	if !ok {
		r = findPython(mods)
		pyFound[key] = r
	}
	pyMu.Unlock()
	if r.err != nil {
		Missing(t, "%v", r.err)
		return ""
	}
	return r.path
}

func findPython(mods []string) pyResult {
	var candidates []string
	if p, err := exec.LookPath("python3"); err == nil {
		candidates = append(candidates, p)
	}
	if _, err := os.Stat(DebianPython); err == nil {
		candidates = append(candidates, DebianPython)
	}
	if len(candidates) == 0 {
		return pyResult{err: fmt.Errorf("no python3 on PATH nor at %s (Debian package python3)", DebianPython)}
	}
	if len(mods) == 0 {
		return pyResult{path: candidates[0]}
	}
	var last []byte
	for _, py := range candidates {
		out, err := exec.Command(py, "-c", "import "+strings.Join(mods, ", ")).CombinedOutput()
		if err == nil {
			return pyResult{path: py}
		}
		last = out
	}
	var pkgs []string
	for _, m := range mods {
		if p := modulePackages[strings.SplitN(m, ".", 2)[0]]; p != "" {
			pkgs = append(pkgs, p)
		}
	}
	return pyResult{err: fmt.Errorf("no python3 (tried %s) imports %s (Debian packages %s): %s",
		strings.Join(candidates, ", "), strings.Join(mods, ", "), strings.Join(pkgs, " "), strings.TrimSpace(lastLine(last)))}
}

func lastLine(b []byte) string {
	s := strings.TrimSpace(string(b))
	if i := strings.LastIndexByte(s, '\n'); i >= 0 {
		return s[i+1:]
	}
	return s
}

// CompileCDL compiles the CDL file src into the NetCDF-4 file out with
// ncgen (netcdf-bin) and returns out.
func CompileCDL(t testing.TB, src, out string) string {
	t.Helper()
	ncgen := Tool(t, "ncgen")
	if b, err := exec.Command(ncgen, "-k", "nc4", "-o", out, src).CombinedOutput(); err != nil {
		t.Fatalf("ncgen %s: %v\n%s", src, err, b)
	}
	return out
}

// CDL writes the CDL text to a file beside out, compiles it with ncgen
// (NetCDF-4) into out and returns out.
func CDL(t testing.TB, text, out string) string {
	t.Helper()
	src := strings.TrimSuffix(out, filepath.Ext(out)) + ".cdl"
	if err := os.WriteFile(src, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return CompileCDL(t, src, out)
}

// RealDataEnv is the variable naming the folder of real data (Debian's
// libncarg-data, unpacked by make realdata).
const RealDataEnv = "LIDSCOPE_REALDATA"

// RealData returns the path of rel inside the real-data folder; when the
// variable is unset the test is skipped (fails under CI, where make test
// sets it), and a missing file fails the test.
func RealData(t testing.TB, rel string) string {
	t.Helper()
	dir := os.Getenv(RealDataEnv)
	if dir == "" {
		Missing(t, "%s is not set (run make realdata and set it to the folder, e.g. %s=/tmp/lidscope-realdata)", RealDataEnv, RealDataEnv)
		return ""
	}
	p := filepath.Join(dir, rel)
	if _, err := os.Stat(p); err != nil {
		t.Fatalf("real data file missing (rerun make realdata): %v", err)
	}
	return p
}

type world struct {
	once sync.Once
	dir  string
	err  error
}

var (
	worldMu   sync.Mutex
	worlds    = map[string]*world{}
	worldBase string
	mainRan   bool
)

// Main runs the tests of a package that shares worlds (World) and then
// removes them; call it from TestMain:
//
//	func TestMain(m *testing.M) { testutil.Main(m) }
func Main(m *testing.M) {
	worldMu.Lock()
	mainRan = true
	worldMu.Unlock()
	code := m.Run()
	worldMu.Lock()
	if worldBase != "" {
		os.RemoveAll(worldBase)
	}
	worldMu.Unlock()
	os.Exit(code)
}

// World returns a folder holding what build wrote into it, built once per
// test binary for each key and shared by every test asking for that key,
// so that a synthetic world several tests read is generated once. The
// tests must only read it (write into t.TempDir()); Main removes it at the
// end. A failed build fails every test that asks for it.
func World(t testing.TB, key string, build func(dir string) error) string {
	t.Helper()
	worldMu.Lock()
	if !mainRan {
		worldMu.Unlock()
		t.Fatal("testutil.World needs the package's TestMain to call testutil.Main (it removes the shared worlds)")
		return ""
	}
	if worldBase == "" {
		b, err := os.MkdirTemp("", "lidscope-test-worlds-")
		if err != nil {
			worldMu.Unlock()
			t.Fatal(err)
			return ""
		}
		worldBase = b
	}
	w := worlds[key]
	if w == nil {
		w = &world{dir: filepath.Join(worldBase, fmt.Sprintf("w%02d", len(worlds)))}
		worlds[key] = w
	}
	worldMu.Unlock()
	w.once.Do(func() {
		if err := os.MkdirAll(w.dir, 0o755); err != nil {
			w.err = err
			return
		}
		w.err = build(w.dir)
	})
	if w.err != nil {
		t.Fatalf("building the shared world %q: %v", key, w.err)
	}
	return w.dir
}

// PrivateWorld returns a copy, in a folder of the test's own, of the
// shared world World(t, key, build): for tests that change or break the
// files (copying is far cheaper than generating again).
func PrivateWorld(t testing.TB, key string, build func(dir string) error) string {
	t.Helper()
	src := World(t, key, build)
	dst := filepath.Join(t.TempDir(), "world")
	if err := CopyDir(src, dst); err != nil {
		t.Fatalf("copying the shared world %q: %v", key, err)
	}
	return dst
}

// CopyDir copies the regular files and folders under src into dst (made
// as needed), keeping file modes; symbolic links and other special files
// are refused.
func CopyDir(src, dst string) error {
	return filepath.WalkDir(src, func(p string, d os.DirEntry, err error) error {
		if err != nil {
			return err
		}
		rel, err := filepath.Rel(src, p)
		if err != nil {
			return err
		}
		target := filepath.Join(dst, rel)
		info, err := d.Info()
		if err != nil {
			return err
		}
		switch {
		case d.IsDir():
			return os.MkdirAll(target, info.Mode().Perm()|0o700)
		case info.Mode().IsRegular():
			b, err := os.ReadFile(p)
			if err != nil {
				return err
			}
			return os.WriteFile(target, b, info.Mode().Perm())
		default:
			return fmt.Errorf("%s: not a regular file or folder", p)
		}
	})
}
