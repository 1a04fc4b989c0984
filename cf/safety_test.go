package cf

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"lidscope/internal/testutil"
)

// sstMapCDL is a small SST map: time(nt) × lat(3) × lon(4), in K.
func sstMapCDL(nt int, t0 float64) string {
	var times, vals []string
	for i := 0; i < nt; i++ {
		times = append(times, fmt.Sprint(t0+float64(i)))
		for k := 0; k < 12; k++ {
			vals = append(vals, fmt.Sprint(290+k))
		}
	}
	return fmt.Sprintf(`netcdf sst {
dimensions:
  time = UNLIMITED ;
  lat = 3 ;
  lon = 4 ;
variables:
  double time(time) ;
    time:units = "days since 2001-01-01" ;
    time:calendar = "360_day" ;
  float lat(lat) ;
    lat:units = "degrees_north" ;
  float lon(lon) ;
    lon:units = "degrees_east" ;
  float sst(time, lat, lon) ;
    sst:standard_name = "sea_surface_temperature" ;
    sst:units = "K" ;
data:
  time = %s ;
  lat = -10, 0, 10 ;
  lon = 0, 90, 180, 270 ;
  sst = %s ;
}
`, strings.Join(times, ", "), strings.Join(vals, ", "))
}

// TestNotRegularRefused: a FIFO, a directory and a character device given
// as inputs are refused by their kind before anything opens them (opening
// a FIFO without a writer blocks for ever: inspect used to hang).
func TestNotRegularRefused(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "sst.nc")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skipf("cannot make a FIFO here: %v", err)
	}
	sub := filepath.Join(dir, "folder.nc")
	if err := os.Mkdir(sub, 0o755); err != nil {
		t.Fatal(err)
	}
	cases := []struct{ path, what string }{
		{fifo, "a named pipe (FIFO)"},
		{sub, "a directory"},
		{"/dev/zero", "a character device"},
	}
	for _, c := range cases {
		t.Run(c.what, func(t *testing.T) {
			done := make(chan struct{})
			var rep *FileReport
			var err error
			go func() {
				defer close(done)
				rep = Inspect(c.path)
				_, err = Open([]string{c.path}, Spec{Role: RoleSST})
			}()
			select {
			case <-done:
			case <-time.After(30 * time.Second): // a guard against a hang, not a timing
				// Unblock the reader so the test binary can end.
				if w, e := os.OpenFile(fifo, os.O_WRONLY|syscall.O_NONBLOCK, 0); e == nil {
					w.Close()
				}
				t.Fatalf("Inspect/Open of %s did not return: it blocked on the file", c.what)
			}
			if rep.Usable || len(rep.Problems) != 1 || !strings.Contains(rep.Problems[0], c.what) || !strings.Contains(rep.Problems[0], "not a regular file") {
				t.Errorf("inspect report: usable %v, problems %q; want one problem naming %s", rep.Usable, rep.Problems, c.what)
			}
			errHas(t, err, "role sst", c.path, c.what, "not a regular file")
		})
	}
}

// TestClassicHeaderCut: a classic file cut inside its header is reported
// as damaged or truncated, whatever the cut (netCDF-C says only "Invalid
// argument" or "Unknown file format" for most cuts).
func TestClassicHeaderCut(t *testing.T) {
	for _, kind := range []string{"classic", "64-bit offset", "cdf5"} {
		t.Run(strings.ReplaceAll(kind, " ", "_"), func(t *testing.T) {
			p := ncgen(t, sstMapCDL(2, 0), kind, "sst")
			full, err := os.ReadFile(p)
			if err != nil {
				t.Fatal(err)
			}
			// the header ends where the first variable's data begins; cut
			// at several places inside it
			for _, n := range []int{5, 12, 40, 100, 200} {
				cut := filepath.Join(t.TempDir(), "cut.nc")
				if err := os.WriteFile(cut, full[:n], 0o644); err != nil {
					t.Fatal(err)
				}
				rep := Inspect(cut)
				if rep.Usable || len(rep.Problems) == 0 || !strings.Contains(rep.Problems[0], "damaged or truncated") {
					t.Errorf("cut at %d bytes: %q, want \"damaged or truncated\"", n, rep.Problems)
				}
				_, err := Open([]string{cut}, Spec{Role: RoleSST})
				errHas(t, err, cut, "damaged or truncated")
			}
		})
	}
}

// TestWrongRankSaysWhy: a 1-D SST series (a station or an area mean) is
// named with the reason it is not used, instead of only "no variable was
// recognised".
func TestWrongRankSaysWhy(t *testing.T) {
	cdl := `netcdf series {
dimensions:
  time = 3 ;
variables:
  double time(time) ;
    time:units = "days since 2000-01-01" ;
  float sst(time) ;
    sst:standard_name = "sea_surface_temperature" ;
    sst:units = "K" ;
  float tos(time) ;
    tos:units = "K" ;
data:
  time = 0, 31, 59 ;
  sst = 300, 301, 302 ;
  tos = 300, 301, 302 ;
}
`
	p := ncgen(t, cdl, "classic", "series")
	rep := Inspect(p)
	if rep.Usable {
		t.Fatal("a file of 1-D series is usable")
	}
	all := strings.Join(rep.Problems, "\n")
	for _, want := range []string{
		"variable sst (standard_name sea_surface_temperature) looks like role sst but cannot be used: it has 1 dimension (time, length 3)",
		"variable tos (by its name) looks like role sst",
		"needs latitude and longitude dimensions",
	} {
		if !strings.Contains(all, want) {
			t.Errorf("problems lack %q:\n%s", want, all)
		}
	}
}

// TestUsabilityChecksNamed: every verdict of the shared checks carries the
// name of its check, which the study uses to accept it; the names are
// documented and unique.
func TestUsabilityChecksNamed(t *testing.T) {
	names := map[string]bool{}
	for _, n := range CheckNames() {
		if DescribeCheck(n) == "" || names[n] {
			t.Errorf("check %q undocumented or repeated", n)
		}
		names[n] = true
	}
	p := ncgen(t, strings.Replace(sstMapCDL(3, 0), `sst:units = "K"`, `sst:units = "degC"`, 1), "netCDF-4", "sst")
	f := mustOpen(t, p, Spec{Role: RoleSST})
	a, err := Assess(f)
	if err != nil {
		t.Fatal(err)
	}
	if len(a.Problems) != 1 || a.Problems[0].Check != CheckLooksKelvin || !names[a.Problems[0].Check] {
		t.Errorf("problems %+v, want one %s", a.Problems, CheckLooksKelvin)
	}
	if f.NaNCount() != 0 || f.InfCount() != 0 {
		t.Errorf("Assess changed the field's counts")
	}
}

// childEnv is the environment variable that makes a test run its body in
// a child process with resource limits.
const childEnv = "LIDSCOPE_CF_TEST_CHILD"

// runLimited runs test name of this binary again in a child process whose
// resource limit res is set to lim before the body runs, and fails when
// the child fails.
func runLimited(t *testing.T, name string, env ...string) {
	t.Helper()
	cmd := exec.Command(os.Args[0], "-test.run=^"+name+"$", "-test.count=1", "-test.v")
	cmd.Env = append(append(os.Environ(), childEnv+"="+name), env...)
	var out bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &out
	err := cmd.Run()
	t.Logf("child:\n%s", out.String())
	if err != nil {
		t.Fatalf("child %s: %v", name, err)
	}
	if !strings.Contains(out.String(), "--- PASS: "+name) {
		t.Fatalf("child %s did not pass", name)
	}
}

// inChild reports whether this is the child of runLimited for name, after
// setting the resource limit res to lim.
func inChild(t *testing.T, name string, res int, lim uint64) bool {
	if os.Getenv(childEnv) != name {
		return false
	}
	if err := syscall.Setrlimit(res, &syscall.Rlimit{Cur: lim, Max: lim}); err != nil {
		t.Fatalf("setrlimit: %v", err)
	}
	return true
}

// TestHugeGridRefused: a small NetCDF-4 file that declares a 31623×31623
// (10^9-cell) grid is refused before any slab is allocated, with its
// dimensions and the budget in the message. It runs in a child process
// whose address space is limited to 3 GiB, so a regression fails the test
// instead of exhausting the machine (reading one step would need 20 GB).
func TestHugeGridRefused(t *testing.T) {
	const n = 31623
	if !inChild(t, "TestHugeGridRefused", syscall.RLIMIT_AS, 3<<30) {
		var lat, lon strings.Builder
		for i := 0; i < n; i++ {
			if i > 0 {
				lat.WriteString(",")
				lon.WriteString(",")
			}
			fmt.Fprintf(&lat, "%.6f", -90+180*(float64(i)+0.5)/n)
			fmt.Fprintf(&lon, "%.6f", 360*(float64(i)+0.5)/n)
		}
		cdl := fmt.Sprintf(`netcdf huge {
dimensions:
  time = 1 ;
  lat = %d ;
  lon = %d ;
variables:
  double time(time) ;
    time:units = "days since 2001-01-01" ;
  double lat(lat) ;
    lat:units = "degrees_north" ;
  double lon(lon) ;
    lon:units = "degrees_east" ;
  float sst(time, lat, lon) ;
    sst:standard_name = "sea_surface_temperature" ;
    sst:units = "K" ;
    sst:_ChunkSizes = 1, 1024, 1024 ;
data:
  time = 0 ;
  lat = %s ;
  lon = %s ;
}
`, n, n, lat.String(), lon.String())
		p := ncgen(t, cdl, "netCDF-4", "huge")
		fi, err := os.Stat(p)
		if err != nil {
			t.Fatal(err)
		}
		if fi.Size() > 4<<20 {
			t.Fatalf("the fixture has %d bytes, want under 4 MB", fi.Size())
		}
		runLimited(t, "TestHugeGridRefused", "LIDSCOPE_CF_TEST_FILE="+p)
		return
	}
	p := os.Getenv("LIDSCOPE_CF_TEST_FILE")
	rep := Inspect(p)
	if rep.Usable || len(rep.Fields) != 1 {
		t.Fatalf("report: usable %v, %d fields, problems %q", rep.Usable, len(rep.Fields), rep.Problems)
	}
	pr := strings.Join(rep.Fields[0].Problems, "; ")
	for _, want := range []string{"31623×31623 (lat×lon)", "20 GB", "memory budget of", "--memory-budget"} {
		if want == "20 GB" {
			want = FormatBytes(slabBytes(n, n))
		}
		if !strings.Contains(pr, want) {
			t.Errorf("inspect problem lacks %q: %s", want, pr)
		}
	}
	_, err := Open([]string{p}, Spec{Role: RoleSST, MemoryBudget: 1 << 30})
	errHas(t, err, "31623×31623", "1 GiB")
	if !errors.Is(err, ErrOverBudget) {
		t.Errorf("the error does not wrap ErrOverBudget: %v", err)
	}
}

// TestManyFilesFewDescriptors: a record of 120 monthly files opens and
// reads with an open-file limit of 64 (ulimit -n 64): the files are opened
// as reading reaches them, one at a time. Before, Open held every file of
// the record open until all were inspected.
func TestManyFilesFewDescriptors(t *testing.T) {
	const nfiles = 120
	if !inChild(t, "TestManyFilesFewDescriptors", syscall.RLIMIT_NOFILE, 64) {
		dir := t.TempDir()
		tool := testutil.Tool(t, "ncgen")
		for m := 0; m < nfiles; m++ {
			src := filepath.Join(dir, "m.cdl")
			if err := os.WriteFile(src, []byte(sstMapCDL(1, float64(30*m+15))), 0o644); err != nil {
				t.Fatal(err)
			}
			out := filepath.Join(dir, fmt.Sprintf("sst_%03d.nc", m))
			if b, err := exec.Command(tool, "-k", "netCDF-4", "-o", out, src).CombinedOutput(); err != nil {
				t.Fatalf("ncgen: %v\n%s", err, b)
			}
		}
		runLimited(t, "TestManyFilesFewDescriptors", "LIDSCOPE_CF_TEST_DIR="+dir)
		return
	}
	paths, err := filepath.Glob(filepath.Join(os.Getenv("LIDSCOPE_CF_TEST_DIR"), "sst_*.nc"))
	if err != nil || len(paths) != nfiles {
		t.Fatalf("%d files: %v", len(paths), err)
	}
	f, err := Open(paths, Spec{Role: RoleSST})
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if f.NT() != nfiles {
		t.Fatalf("%d steps, want %d", f.NT(), nfiles)
	}
	buf := make([]float32, f.Len())
	for k := 0; k < f.NT(); k++ {
		if err := f.ReadSlab(k, buf, nil); err != nil {
			t.Fatalf("step %d: %v", k, err)
		}
	}
	for _, p := range paths[:3] {
		if r := Inspect(p); !r.Usable {
			t.Errorf("%s: %q", p, r.Problems)
		}
	}
}
