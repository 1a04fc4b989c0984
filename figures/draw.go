package figures

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"lidscope/figures/internal/ramp"
	"lidscope/output"
	"lidscope/relations"
	"lidscope/runfolder"
)

// Options choose what Draw draws and where.
type Options struct {
	// Format is "png" (default), "svg" or "pdf".
	Format string
	// Only lists figure names to draw (see Names); empty draws every figure
	// the run's files allow.
	Only []string
	// OutDir is where the figures go; default RUN_DIR/figures.
	OutDir string
	// Force allows replacing figures that exist already.
	Force bool
	// Palettes overrides the colour map of a kind of quantity (see
	// PaletteKeys) with a map name (see PaletteNames).
	Palettes map[string]string
	// DPI is the resolution of PNG figures (default 200).
	DPI float64
	// Relations are the run's relationship results (package relations).
	// When nil, Draw reads them from the run's relationships.json (written
	// by relations.Write) if there is one; the relationship,
	// joint-composite, flip and threshold figures are drawn only when there
	// are results.
	Relations *relations.Results
	// NoCoastlines leaves the Earth's coastlines off the maps: for data that
	// are not on Earth's geography, such as the synthetic demo worlds,
	// whose invented continents real coastlines would contradict.
	NoCoastlines bool
}

// Formats are the output formats.
var Formats = []string{"png", "svg", "pdf"}

// DefaultDirName is the subdirectory of the run directory that Draw writes
// into by default.
const DefaultDirName = "figures"

// figure is one figure: its name, what it shows, whether a run has what it
// needs, and how to lay it out.
type figure struct {
	name     string
	describe string
	// needs reports whether the run has the inputs, and if not why not.
	needs func(r *Run) (bool, string, error)
	build func(f *fig) (*page, error)
}

var registry []figure

func register(fs ...figure) { registry = append(registry, fs...) }

// Names lists every figure name, in drawing order.
func Names() []string {
	var out []string
	for _, f := range registry {
		out = append(out, f.name)
	}
	return out
}

// Describe returns what a figure shows.
func Describe(name string) (string, bool) {
	for _, f := range registry {
		if f.name == name {
			return f.describe, true
		}
	}
	return "", false
}

// PaletteNames lists the colour maps Options.Palettes may name; each may
// also be run backwards by appending "-reversed".
func PaletteNames() []string { return ramp.Names() }

// ErrUnavailable marks a figure asked for by name whose inputs the run
// does not have.
var ErrUnavailable = errors.New("figure not available for this run")

func (o Options) normalise(runDir string) (Options, error) {
	if o.Format == "" {
		o.Format = "png"
	}
	o.Format = strings.ToLower(o.Format)
	ok := false
	for _, f := range Formats {
		ok = ok || f == o.Format
	}
	if !ok {
		return o, fmt.Errorf("figures: unknown format %q: use %s", o.Format, strings.Join(Formats, ", "))
	}
	if o.OutDir == "" {
		o.OutDir = filepath.Join(runDir, DefaultDirName)
	}
	if o.DPI == 0 {
		o.DPI = 200
	}
	if o.DPI < 50 || o.DPI > 1200 {
		return o, fmt.Errorf("figures: DPI %g is out of range: use 50…1200", o.DPI)
	}
	for k, v := range o.Palettes {
		if _, ok := paletteDefaults[k]; !ok {
			return o, fmt.Errorf("figures: palette override for %q: unknown kind of quantity; use one of %s", k, strings.Join(PaletteKeys(), ", "))
		}
		if _, err := ramp.ByName(v); err != nil {
			return o, fmt.Errorf("figures: palette override for %q: %w", k, err)
		}
	}
	known := map[string]bool{}
	for _, n := range Names() {
		known[n] = true
	}
	for _, n := range o.Only {
		if !known[n] {
			return o, fmt.Errorf("figures: unknown figure %q: choose from %s", n, strings.Join(Names(), ", "))
		}
	}
	return o, nil
}

// Draw draws the figures of the finished run in runDir and returns the
// paths written. Without Only it draws every figure whose inputs the run
// has and skips the others; a figure named in Only whose inputs are
// missing is an error (errors.Is(err, ErrUnavailable)). Without Force it
// refuses, before drawing anything, when a figure file exists already
// (errors.Is(err, fs.ErrExist)). Each figure is written to a temporary
// name and renamed when complete.
//
// runDir must hold a complete, committed run (runfolder.Open): a folder
// without one is refused, naming the missing files, and nothing is drawn.
// The run folder stays locked for reading while Draw runs, so that no run
// replaces it meanwhile.
func Draw(runDir string, opt Options) ([]string, error) {
	opt, err := opt.normalise(runDir)
	if err != nil {
		return nil, err
	}
	f, err := runfolder.Open(runDir, output.SummaryJSON, output.MapsNC, output.SeriesNC)
	if err != nil {
		return nil, fmt.Errorf("figures: %w", err)
	}
	defer f.Close()
	return drawFrom(runDir, opt)
}

// DrawStaged draws the figures of a run being written into st (whose
// result files are staged already) into the staged figures folder, to be
// committed with the run (runfolder.Stage.Commit). opt.OutDir and
// opt.Force are ignored. It returns the paths the figures will have once
// the run is committed.
func DrawStaged(st *runfolder.Stage, opt Options) ([]string, error) {
	opt.OutDir = st.Path(DefaultDirName)
	opt.Force = false
	opt, err := opt.normalise(st.Dir())
	if err != nil {
		return nil, err
	}
	paths, err := drawFrom(st.Dir(), opt)
	for i, p := range paths {
		paths[i] = st.FinalPath(DefaultDirName + "/" + filepath.Base(p))
	}
	return paths, err
}

func drawFrom(runDir string, opt Options) ([]string, error) {
	run, err := Load(runDir)
	if err != nil {
		return nil, err
	}
	run.relations = opt.Relations
	if run.relations == nil {
		if run.relations, err = ReadRelations(runDir); err != nil {
			return nil, err
		}
	}
	want := map[string]bool{}
	for _, n := range opt.Only {
		want[n] = true
	}
	var todo []figure
	for _, f := range registry {
		if len(want) > 0 && !want[f.name] {
			continue
		}
		ok, why, err := f.needs(run)
		if err != nil {
			return nil, err
		}
		if !ok {
			if len(want) > 0 {
				return nil, fmt.Errorf("figures: %s: %w: %s", f.name, ErrUnavailable, why)
			}
			continue
		}
		todo = append(todo, f)
	}
	var exist []string
	for _, f := range todo {
		p := filepath.Join(opt.OutDir, f.name+"."+opt.Format)
		if _, err := os.Lstat(p); err == nil {
			exist = append(exist, p)
		}
	}
	if len(exist) > 0 && !opt.Force {
		sort.Strings(exist)
		return nil, fmt.Errorf("figures: %s: %w; nothing was drawn. Allow replacing them (--force) or choose another --out",
			strings.Join(exist, ", "), fs.ErrExist)
	}
	if fi, err := os.Lstat(opt.OutDir); err == nil && fi.Mode()&fs.ModeSymlink != 0 {
		return nil, fmt.Errorf("figures: %s is a symbolic link; lidscope does not write figures through links (they would land outside the run folder): remove the link, or give a real folder (--out)", opt.OutDir)
	}
	if err := os.MkdirAll(opt.OutDir, 0o777); err != nil {
		return nil, fmt.Errorf("figures: cannot create the figure directory: %w", err)
	}
	if opt.Force && len(want) == 0 {
		// A figure of an earlier run in this folder whose inputs this run
		// lacks (e.g. a cloud map after a run without cloud) must not stay
		// beside the new figures.
		drawn := map[string]bool{}
		for _, f := range todo {
			drawn[f.name] = true
		}
		for _, f := range registry {
			if drawn[f.name] {
				continue
			}
			p := filepath.Join(opt.OutDir, f.name+"."+opt.Format)
			if err := os.Remove(p); err != nil && !errors.Is(err, fs.ErrNotExist) {
				return nil, fmt.Errorf("figures: removing %s of an earlier run: %w", p, err)
			}
		}
	}
	var out []string
	for _, f := range todo {
		p, err := drawOne(run, f, opt)
		if err != nil {
			return out, err
		}
		out = append(out, p)
	}
	return out, nil
}

func drawOne(run *Run, f figure, opt Options) (string, error) {
	fg := &fig{run: run, opt: opt, name: f.name, format: opt.Format, dpi: opt.DPI, pdf: opt.Format == "pdf"}
	pg, err := f.build(fg)
	if err != nil {
		return "", fmt.Errorf("figures: %s: %w", f.name, err)
	}
	final := filepath.Join(opt.OutDir, f.name+"."+opt.Format)
	tmp, err := os.CreateTemp(opt.OutDir, ".lidscope-figure-*")
	if err != nil {
		return "", fmt.Errorf("figures: cannot write in %s: %w", opt.OutDir, err)
	}
	defer os.Remove(tmp.Name())
	if err := fg.render(pg, tmp); err != nil {
		tmp.Close()
		return "", err
	}
	if err := tmp.Close(); err != nil {
		return "", fmt.Errorf("figures: writing %s: %w", final, err)
	}
	if err := os.Chmod(tmp.Name(), 0o644); err != nil {
		return "", fmt.Errorf("figures: %w", err)
	}
	if err := os.Rename(tmp.Name(), final); err != nil {
		return "", fmt.Errorf("figures: %w", err)
	}
	return final, nil
}
