package cf

import (
	"bufio"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"strconv"
	"strings"
	"unicode"
)

// CheckRegular refuses a path that is not a regular file (after following
// symbolic links) before anything opens it: opening a FIFO blocks until a
// writer appears, a device may never end, and a directory is not a file.
// It uses stat only, which never blocks on such files.
func CheckRegular(path string) error {
	fi, err := os.Stat(path)
	if err != nil {
		return nil // netcdf.Open reports a missing or unreadable file
	}
	if fi.Mode().IsRegular() {
		return nil
	}
	what := "not a regular file"
	switch m := fi.Mode(); {
	case m.IsDir():
		what = "a directory"
	case m&fs.ModeNamedPipe != 0:
		what = "a named pipe (FIFO)"
	case m&fs.ModeSocket != 0:
		what = "a socket"
	case m&fs.ModeCharDevice != 0:
		what = "a character device"
	case m&fs.ModeDevice != 0:
		what = "a block device"
	}
	return fmt.Errorf("%s is %s, not a regular file; give the file itself, not a pipe, a device or a folder", QuotePath(path), what)
}

// QuotePath returns p as it is when it is plain printable text, and
// quoted with Go escapes otherwise, so that a file name holding control
// characters (an escape sequence, a newline) never reaches a terminal or a
// log raw.
func QuotePath(p string) string {
	for _, r := range p {
		if r == unicode.ReplacementChar || !unicode.IsPrint(r) {
			return strconv.Quote(p)
		}
	}
	return p
}

// SafeText replaces the control characters of a message (other than
// newlines and tabs) by Go escapes, for the last line of defence where
// messages leave the program (the console and logs).
func SafeText(s string) string {
	clean := true
	for _, r := range s {
		if isUnsafe(r) {
			clean = false
			break
		}
	}
	if clean {
		return s
	}
	var b strings.Builder
	for _, r := range s {
		if isUnsafe(r) {
			q := strconv.QuoteRune(r)
			b.WriteString(q[1 : len(q)-1])
			continue
		}
		b.WriteRune(r)
	}
	return b.String()
}

func isUnsafe(r rune) bool {
	return r != '\n' && r != '\t' && (unicode.IsControl(r) || r == unicode.ReplacementChar || unicode.Is(unicode.Cf, r))
}

// The memory budget bounds what lidscope allocates for one field's slab
// (and, in package pipeline, for a whole run): a file that declares a grid
// too big for the machine is refused with its dimensions before anything
// is allocated, instead of being killed by the kernel half-way.

// ErrOverBudget is wrapped by the errors of inputs that would need more
// memory than the budget.
var ErrOverBudget = errors.New("over the memory budget")

// fallbackBudget is the default budget when the machine's memory is unknown.
const fallbackBudget = 2 << 30

// maxDefaultBudget caps the default budget: one time step of one field
// larger than this is a mistake far more often than a need.
const maxDefaultBudget = 8 << 30

// DefaultMemoryBudget is a quarter of the machine's physical memory (from
// /proc/meminfo), at most 8 GiB, or 2 GiB when the memory is unknown.
func DefaultMemoryBudget() int64 {
	f, err := os.Open("/proc/meminfo")
	if err != nil {
		return fallbackBudget
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		k, v, ok := strings.Cut(sc.Text(), ":")
		if !ok || k != "MemTotal" {
			continue
		}
		fields := strings.Fields(v)
		if len(fields) != 2 || fields[1] != "kB" {
			break
		}
		kb, err := strconv.ParseInt(fields[0], 10, 64)
		if err != nil || kb <= 0 {
			break
		}
		return min(kb*1024/4, maxDefaultBudget)
	}
	return fallbackBudget
}

// FormatBytes writes a byte count in binary units (e.g. "1.5 GiB").
func FormatBytes(n int64) string {
	const unit = 1024
	if n < unit {
		return fmt.Sprintf("%d B", n)
	}
	div, exp := int64(unit), 0
	for m := n / unit; m >= unit && exp < 4; m /= unit {
		div *= unit
		exp++
	}
	return fmt.Sprintf("%.3g %ciB", float64(n)/float64(div), "KMGTP"[exp])
}

// ParseBytes reads a byte count: a whole number of bytes, or a number with
// one of the units B, KB, MB, GB, TB (powers of 1000) or KiB, MiB, GiB,
// TiB (powers of 1024), e.g. "4GiB", "512 MB".
func ParseBytes(s string) (int64, error) {
	t := strings.TrimSpace(s)
	i := strings.IndexFunc(t, func(r rune) bool { return !(r >= '0' && r <= '9' || r == '.') })
	num, u := t, ""
	if i >= 0 {
		num, u = t[:i], strings.TrimSpace(t[i:])
	}
	x, err := strconv.ParseFloat(num, 64)
	if err != nil || num == "" {
		return 0, fmt.Errorf("%q is not a size: give bytes, or a number with a unit such as 512MiB or 4GiB", s)
	}
	mult := map[string]float64{"": 1, "B": 1, "KB": 1e3, "MB": 1e6, "GB": 1e9, "TB": 1e12,
		"KIB": 1 << 10, "MIB": 1 << 20, "GIB": 1 << 30, "TIB": 1 << 40}[strings.ToUpper(u)]
	if mult == 0 {
		return 0, fmt.Errorf("%q: unknown unit %q (B, KB, MB, GB, TB, KiB, MiB, GiB, TiB)", s, u)
	}
	v := x * mult
	if !(v >= 1 && v < 1<<62) {
		return 0, fmt.Errorf("%q: a size must be at least one byte and less than 4 EiB", s)
	}
	return int64(v), nil
}

// slabBytes is what reading one time step of a field of ny×nx stored cells
// allocates: the index of the canonical layout, two float64 read buffers
// (two levels for interpolation) and the float32 slab.
func slabBytes(ny, nx int) int64 {
	return mulCap(mulCap(int64(ny), int64(nx)), 8+8+8+4)
}

// budgetOf is the budget a spec asks for (the default when unset).
func budgetOf(s Spec) int64 {
	if s.MemoryBudget > 0 {
		return s.MemoryBudget
	}
	return DefaultMemoryBudget()
}

// overBudget is the error for a variable whose slab needs more than the budget.
func overBudget(path, name, dims string, need, budget int64) error {
	return fmt.Errorf("%s: variable %s has a %s grid: reading one time step needs %s, more than the memory budget of %s; "+
		"cut the region or resolution first (e.g. ncks -d lat,MIN,MAX or cdo remapcon), or, if the machine has the memory, raise the budget (--memory-budget, or limits.memory_budget in the study): %w",
		QuotePath(path), name, dims, FormatBytes(need), FormatBytes(budget), ErrOverBudget)
}
