package netcdf

import (
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// A write that fails because the disk is full is reported as the system
// error with the file, not as the library's "HDF error".
func TestCheckIOReportsTheSystemError(t *testing.T) {
	for _, c := range []struct {
		status int
		errno  error
		want   string
		is     error
	}{
		{int(ErrHDF5.Code), syscall.ENOSPC, "netcdf: nc_close /x/maps.nc: no space left on device", syscall.ENOSPC},
		{int(ErrHDF5.Code), syscall.EDQUOT, "disk quota exceeded", syscall.EDQUOT},
		{int(ErrHDF5.Code), syscall.ENOENT, "HDF error", ErrHDF5}, // an unrelated errno: the library's status
		{int(ErrHDF5.Code), nil, "HDF error", ErrHDF5},
	} {
		err := checkIO(cStatus(c.status), c.errno, "nc_close", "/x/maps.nc", "")
		if err == nil || !strings.Contains(err.Error(), c.want) || !errors.Is(err, c.is) {
			t.Errorf("status %d errno %v: %v, want %q", c.status, c.errno, err, c.want)
		}
	}
}

// On a real full disk (a 256 kB tmpfs, mounted when the test runs as
// root): writing 4 MB of doubles into a NetCDF-4 file fails with "no space
// left on device" and names the file.
func TestFullDiskSaysNoSpace(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "small")
	os.MkdirAll(dir, 0o755)
	if os.Geteuid() != 0 || exec.Command("mount", "-t", "tmpfs", "-o", "size=256k", "tmpfs", dir).Run() != nil {
		t.Skip("needs root to mount a small tmpfs (TestCheckIOReportsTheSystemError covers the mapping)")
	}
	t.Cleanup(func() { exec.Command("umount", dir).Run() })
	p := filepath.Join(dir, "maps.nc")
	f, err := Create(p)
	if err != nil {
		t.Fatal(err)
	}
	var werr error
	if _, werr = f.DefDim("x", 1<<19); werr == nil {
		var v *Var
		if v, werr = f.DefVar("v", Double, []string{"x"}); werr == nil {
			if werr = f.EndDef(); werr == nil {
				werr = v.WriteFloat64([]int{0}, []int{1 << 19}, make([]float64, 1<<19))
			}
		}
	}
	cerr := f.Close()
	err = errors.Join(werr, cerr)
	t.Log(err)
	if !errors.Is(err, syscall.ENOSPC) || !strings.Contains(err.Error(), "no space left on device") || !strings.Contains(err.Error(), p) || strings.Contains(err.Error(), "HDF error") {
		t.Errorf("full disk: %v", err)
	}
}
