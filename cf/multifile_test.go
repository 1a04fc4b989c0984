package cf

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// multiFile compiles testdata/multi.cdl.in for the given time values
// (days since 2000-01-01); every value of step i is 290 + i/10 + the first
// time value/1000, so a slab tells which file and step it came from.
func multiFile(t *testing.T, dir, name, cal, lon string, times []float64) string {
	t.Helper()
	tmpl, err := os.ReadFile(filepath.Join("testdata", "multi.cdl.in"))
	if err != nil {
		t.Fatal(err)
	}
	var ts, vs []string
	for i, x := range times {
		ts = append(ts, fmt.Sprint(x))
		v := fmt.Sprint(290 + float64(i)/10 + times[0]/1000)
		vs = append(vs, v, v, v, v)
	}
	cdl := strings.NewReplacer("@TIMES@", strings.Join(ts, ", "), "@CAL@", cal, "@LON@", lon,
		"@VALUES@", strings.Join(vs, ", ")).Replace(string(tmpl))
	path := ncgen(t, cdl, "classic", name)
	// keep all files of one record side by side
	dst := filepath.Join(dir, name+".nc")
	if err := os.Rename(path, dst); err != nil {
		t.Fatal(err)
	}
	return dst
}

// Mid-month days of 2000 (standard calendar, a leap year).
var mid2000 = []float64{15, 45, 75, 106, 136, 167, 197, 228, 259, 289, 320, 350}

func TestMultiFileRecord(t *testing.T) {
	dir := t.TempDir()
	q1 := multiFile(t, dir, "q1", "standard", "0, 10", mid2000[0:3])
	q2 := multiFile(t, dir, "q2", "standard", "0, 10", mid2000[3:6])
	q3 := multiFile(t, dir, "q3", "standard", "0, 10", mid2000[6:9])

	// given out of order: sorted by first decoded time
	f, err := Open([]string{q3, q1, q2}, Spec{Role: RoleSST})
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if got := f.Paths(); got[0] != q1 || got[1] != q2 || got[2] != q3 {
		t.Errorf("paths %v not in time order", got)
	}
	if f.NT() != 9 || f.Time.Step != StepMonthly {
		t.Errorf("NT %d step %v", f.NT(), f.Time.Step)
	}
	// step 4 is q2's second step: 290 + 0.1 + 106/1000
	sameValues(t, slab(t, f, 4), []float64{290.206, 290.206, 290.206, 290.206}, 1e-4)
	// step 8 is q3's third: 290 + 0.2 + 0.197
	sameValues(t, slab(t, f, 8), []float64{290.397, 290.397, 290.397, 290.397}, 1e-4)
	if err := f.ReadSlab(9, make([]float32, 4), nil); err == nil || !strings.Contains(err.Error(), "out of range (record has 9)") {
		t.Errorf("step 9: %v", err)
	}
	if err := f.ReadSlab(0, make([]float32, 3), nil); err == nil || !strings.Contains(err.Error(), "3 cells") {
		t.Errorf("short buffer: %v", err)
	}

	t.Run("gap is a note with the dates", func(t *testing.T) {
		f, err := Open([]string{q3, q1}, Spec{Role: RoleSST})
		if err != nil {
			t.Fatal(err)
		}
		defer f.Close()
		if !hasNote(f.Notes, "2000-04 … 2000-06 missing (3 months)") {
			t.Errorf("notes %q", f.Notes)
		}
	})
	t.Run("duplicate is an error naming date and files", func(t *testing.T) {
		dup := multiFile(t, dir, "q2copy", "standard", "0, 10", mid2000[3:6])
		_, err := Open([]string{q1, q2, dup}, Spec{Role: RoleSST})
		errHas(t, err, "2000-04-16T00:00:00", "appears twice", "q2.nc", "q2copy.nc")
	})
	t.Run("overlap is an error naming dates and files", func(t *testing.T) {
		ov := multiFile(t, dir, "febapr", "standard", "0, 10", []float64{45, 75, 106, 136})
		_, err := Open([]string{q1, ov}, Spec{Role: RoleSST})
		errHas(t, err, "q1.nc", "febapr.nc", "2000-02-15")
	})
	t.Run("overlap without a common step", func(t *testing.T) {
		ov := multiFile(t, dir, "offset", "standard", "0, 10", []float64{40, 70})
		_, err := Open([]string{ov, q1}, Spec{Role: RoleSST})
		// q1 starts first (2000-01-16); "offset" starts on day 40, 2000-02-10
		errHas(t, err, "files overlap in time", "q1.nc runs to 2000-03-16", "offset.nc starts at 2000-02-10")
	})
	t.Run("grids must be equal", func(t *testing.T) {
		other := multiFile(t, dir, "shifted", "standard", "0, 20", mid2000[3:6])
		_, err := Open([]string{q1, other}, Spec{Role: RoleSST})
		errHas(t, err, "must share a grid", "q1.nc", "shifted.nc", "longitude 1 is 10 vs 20")
	})
	t.Run("calendars must be equal", func(t *testing.T) {
		other := multiFile(t, dir, "noleap", "noleap", "0, 10", mid2000[3:6])
		_, err := Open([]string{q1, other}, Spec{Role: RoleSST})
		errHas(t, err, "must share a calendar", "standard", "noleap")
	})
}
