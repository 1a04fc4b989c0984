package cfwrite

import (
	"errors"
	"fmt"
	"io/fs"
	"math/rand/v2"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"sync"
	"time"

	"lidscope/netcdf"
)

// Conventions is the value of the global Conventions attribute.
const Conventions = "CF-1.10"

// DefaultDeflateLevel is the zlib level used when Options.DeflateLevel is 0.
const DefaultDeflateLevel = 4

// NoDeflate, as Options.DeflateLevel, stores every variable uncompressed
// (still chunked along time).
const NoDeflate = -1

// Dimension and variable names the writer creates.
const (
	DimTime   = "time"
	DimLat    = "lat"
	DimLon    = "lon"
	DimPlev   = "plev"
	DimBounds = "bnds" // length 2, the vertex dimension of every bounds variable
)

// ErrClosed is returned by calls on a Writer that was closed or aborted.
var ErrClosed = errors.New("cfwrite: the writer is already closed or aborted")

// Options are the file-wide settings of Create.
type Options struct {
	// Title is the global title attribute (CF-1.10 §2.6.2); required.
	Title string
	// Institution and Source are written as the global attributes of the
	// same names when not empty.
	Institution string
	Source      string
	// Command is the command line recorded in history. Nil means os.Args.
	// Arguments with spaces or shell metacharacters are single-quoted.
	Command []string
	// InputHistory, when not empty, is kept below the new history line, as
	// CF-1.10 §2.6.2 asks of programs that derive a file from another.
	InputHistory string
	// Created is the timestamp of the history line; zero means now.
	Created time.Time
	// Attributes are further global attributes (provenance such as input
	// files, configuration digest, program version), written in key order.
	// Names must start with a letter and use letters, digits and '_'; the
	// names above (Conventions, title, institution, source, history) are
	// reserved. Values are typed as for VarSpec.Attributes: text, numbers
	// (float64, float32, int, int32 and their slices) and booleans (NC_BYTE
	// 1 or 0; netCDF has no boolean type).
	Attributes map[string]any
	// DeflateLevel is the zlib level 1–9; 0 selects DefaultDeflateLevel and
	// NoDeflate turns compression off. Shuffle is on whenever deflate is.
	DeflateLevel int
	// Overwrite allows Close to replace an existing file at the path.
	Overwrite bool
}

// Writer writes one CF NetCDF-4 file. See the package documentation for the
// order of calls and the atomicity rules.
type Writer struct {
	mu       sync.Mutex
	path     string // final path
	tmp      string // temporary path being written
	opts     Options
	level    int // deflate level, 0 = none
	nc       *netcdf.File
	err      error // first error (ErrClosed after Abort); final
	done     bool  // Close succeeded
	defining bool  // still in define mode

	names map[string]string // every dimension and variable name -> what it is
	dims  map[string]*dim   // dimensions by name
	order []string          // coordinate variables in definition order, for writing values

	coords  map[string]*coordVar // coordinate values written on leaving define mode
	bounds  bool                 // the bnds dimension exists
	scalars map[string]bool      // scalar coordinate variables

	time     *timeAxis
	vars     []*Var
	varNames map[string]*Var

	// buf32 and buf64 hold the converted values of one put (under mu),
	// shared by all variables: one buffer per variable kept a fine grid's
	// every map twice over until Close (about 200 MB at 0.25°).
	buf32 []float32
	buf64 []float64
}

// dim is a dimension with the CF axis it stands for.
type dim struct {
	name string
	n    int  // length; 0 for the unlimited time dimension
	axis byte // 'T', 'Z', 'Y', 'X' or 0
}

// coordVar is a coordinate (or bounds or scalar) variable's values.
type coordVar struct {
	v      *netcdf.Var
	values []float64
	shape  []int
}

// Create starts a new file that will appear at path when Close succeeds.
// It fails when path exists and opts.Overwrite is false, when path is a
// directory, or when the directory cannot be written.
func Create(path string, opts Options) (*Writer, error) {
	if path == "" {
		return nil, errors.New("cfwrite: create: empty path; give the output file name")
	}
	if strings.TrimSpace(opts.Title) == "" {
		return nil, fmt.Errorf("cfwrite: create %s: Options.Title is empty; every lidscope output needs a title (CF-1.10 §2.6.2)", path)
	}
	level := opts.DeflateLevel
	switch {
	case level == 0:
		level = DefaultDeflateLevel
	case level == NoDeflate:
		level = 0
	case level < 1 || level > 9:
		return nil, fmt.Errorf("cfwrite: create %s: Options.DeflateLevel %d is outside 1–9; use 0 for the default (%d) or NoDeflate", path, opts.DeflateLevel, DefaultDeflateLevel)
	}
	for _, k := range sortedKeys(opts.Attributes) {
		if err := checkAttrName(k); err != nil {
			return nil, fmt.Errorf("cfwrite: create %s: global attribute %q: %w", path, k, err)
		}
		if _, err := attrValue(opts.Attributes[k]); err != nil {
			return nil, fmt.Errorf("cfwrite: create %s: global attribute %q: %w", path, k, err)
		}
		switch k {
		case "Conventions", "title", "institution", "source", "history":
			return nil, fmt.Errorf("cfwrite: create %s: global attribute %q is set by the writer; use the Options field for it instead of Options.Attributes", path, k)
		}
	}
	if st, err := os.Stat(path); err == nil {
		if st.IsDir() {
			return nil, fmt.Errorf("cfwrite: create %s: the path is a directory; give a file name", path)
		}
		if !opts.Overwrite {
			return nil, fmt.Errorf("cfwrite: create %s: %w; remove it, choose another output name, or allow overwriting (Options.Overwrite)", path, fs.ErrExist)
		}
	} else if !errors.Is(err, fs.ErrNotExist) {
		return nil, fmt.Errorf("cfwrite: create %s: %w", path, err)
	}
	tmp, err := reserveTemp(path)
	if err != nil {
		return nil, err
	}
	nc, err := netcdf.CreateFormat(tmp, netcdf.FormatNetCDF4Classic)
	if err != nil {
		os.Remove(tmp)
		return nil, fmt.Errorf("cfwrite: create %s: %w", path, err)
	}
	w := &Writer{
		path: path, tmp: tmp, opts: opts, level: level, nc: nc, defining: true,
		names:    map[string]string{},
		dims:     map[string]*dim{},
		coords:   map[string]*coordVar{},
		scalars:  map[string]bool{},
		varNames: map[string]*Var{},
	}
	if err := w.globalAttrs(); err != nil {
		return nil, w.fail(err)
	}
	return w, nil
}

// reserveTemp creates an empty, uniquely named file next to path, with the
// mode a new file gets under the process umask, for the library to overwrite.
func reserveTemp(path string) (string, error) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	var last error
	for range 100 {
		name := filepath.Join(dir, fmt.Sprintf(".%s.tmp-%d-%08x", base, os.Getpid(), rand.Uint32()))
		f, err := os.OpenFile(name, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o666)
		if err == nil {
			if err := f.Close(); err != nil {
				os.Remove(name)
				return "", fmt.Errorf("cfwrite: create %s: temporary file: %w", path, err)
			}
			return name, nil
		}
		if !errors.Is(err, fs.ErrExist) {
			return "", fmt.Errorf("cfwrite: create %s: cannot create a temporary file in %s (the directory must exist and be writable): %w", path, dir, err)
		}
		last = err
	}
	return "", fmt.Errorf("cfwrite: create %s: no free temporary name: %w", path, last)
}

// Path returns the final path of the file.
func (w *Writer) Path() string { return w.path }

// TempPath returns the temporary path being written; it is empty once the
// file was renamed into place or discarded.
func (w *Writer) TempPath() string {
	w.mu.Lock()
	defer w.mu.Unlock()
	return w.tmp
}

// Err returns the writer's first error, if any.
func (w *Writer) Err() error {
	w.mu.Lock()
	defer w.mu.Unlock()
	return w.err
}

// historyLine is "YYYY-MM-DDThh:mm:ssZ: command line".
func historyLine(created time.Time, cmd []string) string {
	if created.IsZero() {
		created = time.Now()
	}
	return created.UTC().Format("2006-01-02T15:04:05Z") + ": " + shellJoin(cmd)
}

// shellJoin joins arguments as a POSIX shell would need them typed.
func shellJoin(args []string) string {
	q := make([]string, len(args))
	for i, a := range args {
		q[i] = shellQuote(a)
	}
	return strings.Join(q, " ")
}

func shellQuote(s string) string {
	if s == "" {
		return "''"
	}
	safe := true
	for _, r := range s {
		if !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || strings.ContainsRune("_-./=:,+@%^", r)) {
			safe = false
			break
		}
	}
	if safe {
		return s
	}
	return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'"
}

func (w *Writer) globalAttrs() error {
	cmd := w.opts.Command
	if cmd == nil {
		cmd = os.Args
	}
	hist := historyLine(w.opts.Created, cmd)
	if h := strings.TrimRight(w.opts.InputHistory, "\n"); h != "" {
		hist += "\n" + h
	}
	put := func(k string, v any) error {
		if err := w.nc.PutAttr(k, v); err != nil {
			return fmt.Errorf("cfwrite: %s: global attribute %s: %w", w.path, k, err)
		}
		return nil
	}
	if err := put("Conventions", Conventions); err != nil {
		return err
	}
	if err := put("title", w.opts.Title); err != nil {
		return err
	}
	if w.opts.Institution != "" {
		if err := put("institution", w.opts.Institution); err != nil {
			return err
		}
	}
	if w.opts.Source != "" {
		if err := put("source", w.opts.Source); err != nil {
			return err
		}
	}
	if err := put("history", hist); err != nil {
		return err
	}
	for _, k := range sortedKeys(w.opts.Attributes) {
		v, _ := attrValue(w.opts.Attributes[k]) // checked by Create
		if err := put(k, v); err != nil {
			return err
		}
	}
	return nil
}

func sortedKeys[V any](m map[string]V) []string {
	ks := make([]string, 0, len(m))
	for k := range m {
		ks = append(ks, k)
	}
	sort.Strings(ks)
	return ks
}

// state reports a final state as an error; the caller holds the lock.
func (w *Writer) state() error {
	if w.done {
		return ErrClosed
	}
	return w.err
}

// fail records err as final, discards the temporary file and returns err.
// The caller holds the lock (or owns w exclusively).
func (w *Writer) fail(err error) error {
	if w.err == nil {
		w.err = err
	}
	w.discard()
	return w.err
}

// discard closes the library handle and removes the temporary file.
func (w *Writer) discard() {
	if w.nc != nil {
		w.nc.Close() // the file is thrown away: its close error does not matter
		w.nc = nil
	}
	if w.tmp != "" {
		os.Remove(w.tmp)
		w.tmp = ""
	}
}

// define checks that declarations are still open.
func (w *Writer) define(what string) error {
	if !w.defining {
		return w.fail(fmt.Errorf("cfwrite: %s: %s after data were written; declare every axis and variable before the first write", w.path, what))
	}
	return nil
}

// claim reserves a dimension or variable name.
func (w *Writer) claim(name, what string) error {
	if err := checkName(name); err != nil {
		return fmt.Errorf("cfwrite: %s: %s %q: %w", w.path, what, name, err)
	}
	if prev, ok := w.names[name]; ok {
		return fmt.Errorf("cfwrite: %s: %s %q: the name is already used by the %s", w.path, what, name, prev)
	}
	w.names[name] = what
	return nil
}

// deflate applies the file's compression to a variable (define mode).
func (w *Writer) deflate(v *netcdf.Var) error {
	if w.level == 0 || len(v.Dims) == 0 {
		return nil
	}
	return v.SetDeflate(true, w.level)
}

// endDefine leaves define mode and writes every coordinate's values.
func (w *Writer) endDefine() error {
	if !w.defining {
		return nil
	}
	w.defining = false
	if err := w.nc.EndDef(); err != nil {
		return fmt.Errorf("cfwrite: %s: %w", w.path, err)
	}
	for _, name := range w.order {
		c := w.coords[name]
		start := make([]int, len(c.shape))
		if err := c.v.WriteFloat64(start, c.shape, c.values); err != nil {
			return fmt.Errorf("cfwrite: %s: variable %s: %w", w.path, name, err)
		}
	}
	return nil
}

// Close finishes the file: it checks that every variable was written in
// full, flushes and syncs the file and renames it onto the final path. On
// any error the temporary file is removed and nothing appears at the path.
// Close after a successful Close returns nil; after a failure or Abort it
// returns that error (ErrClosed for Abort).
func (w *Writer) Close() error {
	w.mu.Lock()
	defer w.mu.Unlock()
	if w.done {
		return nil
	}
	if w.err != nil {
		return w.err
	}
	if err := w.finish(); err != nil {
		return w.fail(err)
	}
	w.done = true
	w.tmp = ""
	return nil
}

func (w *Writer) finish() error {
	if err := w.endDefine(); err != nil {
		return err
	}
	if w.time != nil && w.time.n == 0 {
		return fmt.Errorf("cfwrite: %s: the time axis has no values; append at least one time step (AppendTime) or leave the time axis out", w.path)
	}
	for _, v := range w.vars {
		if err := v.complete(); err != nil {
			return err
		}
	}
	nc := w.nc
	w.nc = nil
	if err := nc.Close(); err != nil {
		return fmt.Errorf("cfwrite: %s: finishing the file: %w", w.path, err)
	}
	if err := syncFile(w.tmp); err != nil {
		return fmt.Errorf("cfwrite: %s: syncing the temporary file %s: %w", w.path, w.tmp, err)
	}
	if err := w.publish(); err != nil {
		return err
	}
	syncDir(filepath.Dir(w.path)) // best effort: the file is complete either way
	return nil
}

// publish moves the temporary file onto the final path.
func (w *Writer) publish() error {
	if w.opts.Overwrite {
		if err := os.Rename(w.tmp, w.path); err != nil {
			return fmt.Errorf("cfwrite: %s: renaming the finished file into place: %w", w.path, err)
		}
		return nil
	}
	// A hard link fails atomically if the final name appeared meanwhile.
	err := os.Link(w.tmp, w.path)
	if err == nil {
		os.Remove(w.tmp)
		return nil
	}
	if errors.Is(err, fs.ErrExist) {
		return fmt.Errorf("cfwrite: %s: %w (created while this file was being written); remove it, choose another output name, or allow overwriting (Options.Overwrite)", w.path, fs.ErrExist)
	}
	// The filesystem may not support hard links: check, then rename.
	if _, serr := os.Lstat(w.path); serr == nil {
		return fmt.Errorf("cfwrite: %s: %w (created while this file was being written); remove it, choose another output name, or allow overwriting (Options.Overwrite)", w.path, fs.ErrExist)
	}
	if err := os.Rename(w.tmp, w.path); err != nil {
		return fmt.Errorf("cfwrite: %s: renaming the finished file into place: %w", w.path, err)
	}
	return nil
}

func syncFile(path string) error {
	f, err := os.Open(path)
	if err != nil {
		return err
	}
	if err := f.Sync(); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

func syncDir(dir string) {
	if d, err := os.Open(dir); err == nil {
		d.Sync()
		d.Close()
	}
}

// Abort discards the file: the temporary file is removed and nothing
// appears at the final path. It does nothing after a successful Close, so it
// can be deferred. Later calls on the writer return ErrClosed (or the error
// that came first).
func (w *Writer) Abort() {
	w.mu.Lock()
	defer w.mu.Unlock()
	if w.done {
		return
	}
	if w.err == nil {
		w.err = ErrClosed
	}
	w.discard()
}
