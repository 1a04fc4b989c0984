// Package analysis runs lidscope's main job for the datasets of a study:
// it turns each dataset into a pipeline plan, streams the record through
// the pipeline, and writes the results with their provenance (package
// output). It is the library behind `lidscope run` and `lidscope demo`.
package analysis

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"log/slog"
	"os"
	"path/filepath"
	"runtime"
	"runtime/debug"
	"sort"
	"strconv"
	"strings"
	"time"

	"lidscope/accumulate"
	"lidscope/calendar"
	"lidscope/cf"
	"lidscope/config"
	"lidscope/factors"
	"lidscope/figures"
	"lidscope/netcdf"
	"lidscope/output"
	"lidscope/pipeline"
	"lidscope/relations"
	"lidscope/runfolder"
	"lidscope/vocab"
)

// Options control a run.
type Options struct {
	Version string   // lidscope version, recorded in every output
	Command []string // the command line, recorded in history
	// OutDir, when set, replaces the dataset's output folder; with several
	// datasets each goes to OutDir/<dataset name>.
	OutDir string
	Force  bool // replace existing outputs
	// AllowGaps lets Merge join pieces that leave gaps in the record (the
	// gaps are recorded in the provenance).
	AllowGaps bool
	// NoPlots skips the figures (otherwise drawn when the study's
	// output.plots is true, the default).
	NoPlots bool
	// NoCoastlines leaves Earth's coastlines off the maps (the demo's
	// synthetic worlds have invented continents).
	NoCoastlines bool
	Workers      int
	// Piece, unless whole, runs only that contiguous piece of each
	// dataset's selected record (pipeline.Piece); a piece whose folder
	// already holds the committed run of the same piece, study and
	// unchanged inputs is skipped (Report.Skipped) unless Force.
	Piece pipeline.Piece
	// Batch describes the batch job running this (recorded in provenance).
	Batch []string
	// Climatology, when set, is the climatology of the whole record that
	// anomaly mode takes its anomalies against (stage 2 of a run in
	// pieces: the merged climatologies of every piece, see
	// ComputeClimatology); otherwise a run in anomaly mode builds it in a
	// first pass over its own record.
	Climatology *relations.Climatology
	Log         *slog.Logger
	// Progress, when set, is told about each dataset's time steps.
	Progress func(dataset string, done, total int)
}

// Report is what one dataset's run produced.
type Report struct {
	Dataset string
	OutDir  string
	Files   []string
	Result  *pipeline.Result
	Meta    output.Meta
	// Relations are the relationship results (of the merged accumulators
	// for a merged run).
	Relations *relations.Results
	// Skipped, when set, says why the run was not done: its folder already
	// holds it (Result and Relations are then nil, Meta is the earlier run's).
	Skipped string
}

// Run runs the named datasets of r (all when names is empty), in study order.
func Run(ctx context.Context, r *config.Study, names []string, opt Options) ([]Report, error) {
	ds, err := Datasets(r, names)
	if err != nil {
		return nil, err
	}
	var reps []Report
	for _, d := range ds {
		rep, err := RunDataset(ctx, r, d, OutDirFor(d, opt.OutDir, len(ds) > 1), opt)
		if err != nil {
			return reps, fmt.Errorf("dataset %s: %w", d.Name, err)
		}
		reps = append(reps, rep)
	}
	return reps, nil
}

// Datasets returns the named datasets of r (all when names is empty), in
// study order.
func Datasets(r *config.Study, names []string) ([]*config.Dataset, error) {
	var ds []*config.Dataset
	if len(names) == 0 {
		for i := range r.Datasets {
			ds = append(ds, &r.Datasets[i])
		}
		return ds, nil
	}
	for _, n := range names {
		d, err := r.Dataset(n)
		if err != nil {
			return nil, err
		}
		ds = append(ds, d)
	}
	return ds, nil
}

// OutDirFor is the run folder of dataset d: the study's output folder of
// d, or outDir when set (outDir/<dataset name> when several datasets run).
func OutDirFor(d *config.Dataset, outDir string, several bool) string {
	switch {
	case outDir == "":
		return d.OutputDir
	case several:
		return filepath.Join(outDir, d.Name)
	}
	return outDir
}

// Outcome is one dataset's finished analysis, not yet written: what
// Compute returns and WriteRun stages.
type Outcome struct {
	Dataset string
	Result  *pipeline.Result // nil for a merge
	Meta    output.Meta
	Acc     *accumulate.Acc
	// Relations are the relationship results of RelAcc.
	Relations *relations.Results
	RelAcc    *relations.Acc
	// NoRel says why the run has no relationship analysis ("" when it has
	// one; Relations and RelAcc are then nil).
	NoRel string
	// Factors are the factor regressions of FacAcc (nil without a
	// factors section).
	Factors *factors.Results
	FacAcc  *factors.Acc
	// Plots says whether the study asks for figures.
	Plots bool
}

// RunDataset runs one dataset and writes its results to out as one run
// folder (package runfolder): out is locked, checked and staged before any
// computation; everything the run writes goes into the staging folder,
// which replaces out in one step at the very end. On any error, a
// cancelled ctx included, out is left as it was.
func RunDataset(ctx context.Context, r *config.Study, d *config.Dataset, out string, opt Options) (Report, error) {
	plan, err := pipeline.PlanFor(r, d)
	if err != nil {
		return Report{}, err
	}
	if !opt.Piece.Whole() && !opt.Force {
		base := ""
		if opt.Climatology != nil {
			base = opt.Climatology.Fingerprint()
		}
		if meta, ok := donePiece(out, r, plan, opt.Piece, base); ok {
			return Report{Dataset: d.Name, OutDir: out, Meta: meta,
				Skipped: fmt.Sprintf("piece %s of dataset %s is already complete in %s (same study and unchanged inputs); skipped", opt.Piece, d.Name, out)}, nil
		}
	}
	st, err := CreateFolder(out, opt, estimateOutputs(plan))
	if err != nil {
		return Report{}, err
	}
	defer st.Close()
	o, err := compute(ctx, r, d, plan, opt)
	if err != nil {
		return Report{}, err
	}
	files, err := WriteRun(ctx, st, o, opt)
	if err != nil {
		return Report{}, err
	}
	if _, err := st.Commit(ctx); err != nil {
		return Report{}, err
	}
	return Report{Dataset: d.Name, OutDir: out, Files: files, Result: o.Result, Meta: o.Meta, Relations: o.Relations}, nil
}

// KnownNames are the names a run folder holds: the result files, the run
// state and the figures folder.
func KnownNames() []string {
	return append(append(append(append(output.OutputNames(), relations.OutputNames()...), factors.OutputNames()...), StateFile), figures.DefaultDirName)
}

// CreateFolder prepares writing a run folder (runfolder.Create): the
// lock, the removal of leftovers of killed runs (logged), and the
// pre-flight checks (a writable place, room for about estimate bytes, no
// earlier results unless opt.Force).
func CreateFolder(out string, opt Options, estimate int64) (*runfolder.Stage, error) {
	st, err := runfolder.Create(out, runfolder.Options{Replace: opt.Force, Known: KnownNames(), Estimate: estimate, Version: opt.Version})
	if err != nil {
		return nil, err
	}
	log := opt.Log
	if log == nil {
		log = slog.New(slog.DiscardHandler)
	}
	for _, c := range st.Cleaned {
		log.Warn("removed the staging folder of an interrupted run", "folder", c)
	}
	if st.Restored != "" {
		log.Warn("put back the earlier run that an interrupted replacement had moved aside", "from", st.Restored, "folder", out)
	}
	return st, nil
}

// Compute runs one dataset's analysis and returns the results without
// writing anything; WriteRun writes them.
func Compute(ctx context.Context, r *config.Study, d *config.Dataset, opt Options) (*Outcome, error) {
	plan, err := pipeline.PlanFor(r, d)
	if err != nil {
		return nil, err
	}
	return compute(ctx, r, d, plan, opt)
}

func compute(ctx context.Context, r *config.Study, d *config.Dataset, plan pipeline.Plan, opt Options) (*Outcome, error) {
	log := opt.Log
	if log == nil {
		log = slog.New(slog.DiscardHandler)
	}
	start := time.Now()
	plan.Workers = opt.Workers
	plan.Piece = opt.Piece
	plan.Log = log
	if opt.Progress != nil {
		plan.Progress = func(done, total int) { opt.Progress(d.Name, done, total) }
	}
	log.Info("run", "dataset", d.Name)
	// Stamp every input before opening it, and hash the files the run
	// reads data from before reading them, to tell at the end whether one
	// changed meanwhile.
	watch := watchInputs(datasetPaths(d))
	plan.BeforeRead = watch.hash
	defer watch.close()
	relCfg := r.RelationsFor(d)
	// The relationship analysis relates cloud to EIS, LTS and relative
	// SST: it needs both optional inputs.
	noRel := NoRelations(plan)
	if r.RelationsOff {
		noRel = "no relationship analysis (relationships.enabled: false in the study)"
	}
	var clim *relations.Climatology
	if noRel == "" && relCfg.Mode == relations.Anomaly && opt.Climatology != nil {
		clim = opt.Climatology // stage 1 was done (and merged) already
	} else if noRel == "" && relCfg.Mode == relations.Anomaly {
		// Pass 1: the climatology of every cell and calendar month.
		p1 := plan
		p1.NewSinks = func(l accumulate.Layout) ([]pipeline.StepSink, error) {
			clim = relations.NewClimatology(l)
			return []pipeline.StepSink{clim}, nil
		}
		log.Info("pass 1 of 2: climatology for anomaly mode", "dataset", d.Name)
		if _, err := pipeline.Run(ctx, p1); err != nil {
			return nil, err
		}
	}
	var rel *relations.Acc
	var fac *factors.Acc
	if noRel == "" {
		plan.NewSinks = func(l accumulate.Layout) ([]pipeline.StepSink, error) {
			a, err := relations.New(relCfg, l, clim)
			if err != nil {
				return nil, fmt.Errorf("relationship analysis: %w", err)
			}
			rel = a
			sinks := []pipeline.StepSink{a}
			if r.Factors.On {
				if fac, err = factors.New(FactorsConfig(r, d), l, clim); err != nil {
					return nil, fmt.Errorf("factor regressions: %w", err)
				}
				sinks = append(sinks, fac)
			}
			return sinks, nil
		}
	} else if r.Factors.On {
		return nil, fmt.Errorf("dataset %s: the factors section needs the relationship analysis for its anomalies, and the run has none: %s", d.Name, noRel)
	}
	res, err := pipeline.Run(ctx, plan)
	if err != nil {
		return nil, err
	}
	for _, n := range res.Notes {
		log.Info("note", "dataset", d.Name, "text", n)
	}
	meta, err := metaFor(r, d, res, opt, start, watch)
	if err != nil {
		return nil, err
	}
	if err := watch.verify(meta.Inputs); err != nil {
		return nil, err
	}
	meta.Listed = watch.listed()
	meta.Absent = plan.Lacks()
	if !opt.Piece.Whole() {
		meta.Piece = opt.Piece.String()
		if opt.Climatology != nil && rel != nil {
			meta.AnomalyBase = opt.Climatology.Fingerprint()
		}
	}
	meta.Batch = opt.Batch
	var relRes *relations.Results
	if rel != nil {
		if relRes, err = rel.Results(); err != nil {
			return nil, fmt.Errorf("relationship analysis: %w", err)
		}
	} else {
		meta.Absent = append(meta.Absent, noRel)
		log.Info("note", "dataset", d.Name, "text", noRel)
	}
	o := &Outcome{Dataset: d.Name, Result: res, Meta: meta, Acc: res.Acc, Relations: relRes, RelAcc: rel, NoRel: noRel, Plots: r.Output.Plots, FacAcc: fac}
	if fac != nil {
		o.Factors = fac.Results(quantityUnits)
	}
	return o, nil
}

// quantityUnits are the units of a quantity of the table of names.
func quantityUnits(q string) string {
	if row, ok := vocab.Lookup(q); ok {
		return row.Units
	}
	return ""
}

// FactorsConfig is the factor regressions' configuration of dataset d.
func FactorsConfig(r *config.Study, d *config.Dataset) factors.Config {
	f := r.FactorsFor(d)
	c := factors.Config{Factors: f.Use, Response: f.Response, Method: f.Method, Penalties: f.Penalties, Level: f.Level,
		CellFoldYears: f.CellFoldYears, Maps: f.Maps, Detrend: r.Relations.Detrend,
		Bootstrap: factors.Bootstrap{Replicates: f.Bootstrap.Replicates, BlockYears: f.Bootstrap.BlockYears, Seed: f.Bootstrap.Seed}}
	for _, rg := range r.Analysis.Regions {
		c.Regions = append(c.Regions, accumulate.Region{Name: rg.Name, South: rg.South, North: rg.North, West: rg.West, East: rg.East})
	}
	return c
}

// NoRelations says why a run of plan has no relationship analysis ("" when
// it has one): the analysis relates cloud to EIS, LTS and relative SST, so
// it needs the cloud and the 700 hPa temperature inputs.
func NoRelations(plan pipeline.Plan) string {
	var miss []string
	if plan.T700 == nil {
		miss = append(miss, "air_temperature")
	}
	if plan.Cloud == nil {
		miss = append(miss, "low_cloud or cloud")
	}
	if len(miss) == 0 {
		return ""
	}
	return "no relationship analysis (it needs the " + strings.Join(miss, " and the ") + " input)"
}

// WriteRun stages every file of a run (or of a merge) into st: the regime
// outputs, the relationship outputs (none when o.Relations is nil), the run state with both accumulators
// and, when o.Plots and not opt.NoPlots, the figures. It commits nothing
// (st.Commit does) and returns the paths the files will have.
func WriteRun(ctx context.Context, st *runfolder.Stage, o *Outcome, opt Options) ([]string, error) {
	// Writing makes large transient arrays (maps, the run state) next to
	// the accumulators: collect more often meanwhile, so the heap stays
	// near what is live instead of growing to twice it (GOGC's default).
	defer debug.SetGCPercent(debug.SetGCPercent(25))
	// The stream's buffers (step outputs, read slabs: about 200 MB at
	// 0.25°) are garbage now but still resident: collect them and hand the
	// pages back first, or the maps below pile on top of them. Then a soft
	// limit an eighth above what is left (the accumulators) plus 32 MB:
	// near it the collector runs more often and returns freed pages to the
	// system at once, so the transient maps and encoding buffers reuse
	// the same memory instead of adding to the peak (0.25°, 1 year: the
	// end of run 700 → under 590 MB, below the stream).
	// The heap is mostly pointer-free float slices, so each collection is
	// cheap; the limit is soft, work above it only collects more often.
	debug.FreeOSMemory()
	defer debug.SetMemoryLimit(debug.SetMemoryLimit(writeLimit()))
	out := st.Target()
	if err := output.Stage(st, out, o.Acc, o.Meta); err != nil {
		return nil, err
	}
	var names []string
	names = append(names, output.OutputNames()...)
	if o.Relations != nil {
		meta := o.Meta
		err := relations.Stage(st, out, o.Relations, relations.Meta{Dataset: meta.Dataset, Title: meta.Title, Version: meta.Version,
			Command: opt.Command, StudyHash: meta.StudyHash, Period: meta.Period, Source: "lidscope " + meta.Version})
		if err != nil {
			return nil, fmt.Errorf("writing the relationship results: %w", err)
		}
		names = append(names, relations.OutputNames()...)
	}
	if o.Factors != nil {
		meta := o.Meta
		err := factors.Stage(st, out, o.Factors, factors.Meta{Dataset: meta.Dataset, Title: "lidscope cloud-controlling factors: " + meta.Dataset, Version: meta.Version,
			Command: opt.Command, StudyHash: meta.StudyHash, Period: meta.Period, Source: "lidscope " + meta.Version, MetricsConventions: meta.MetricsConventions})
		if err != nil {
			return nil, fmt.Errorf("writing the factor results: %w", err)
		}
		names = append(names, factors.JSONFile, factors.CSVFile)
		if o.Factors.Maps != nil {
			names = append(names, factors.MapsFile)
		}
	}
	// The maps' transient arrays are garbage now: collect them before the
	// run state is written, so the peak is the larger of the two phases,
	// not their sum (a fine grid's end of run is its peak).
	debug.FreeOSMemory()
	if err := stageState(st, o.Meta, o.Acc, o.RelAcc, o.NoRel, o.FacAcc); err != nil {
		return nil, fmt.Errorf("writing the run state: %w", err)
	}
	names = append(names, StateFile)
	var files []string
	for _, n := range names {
		files = append(files, st.FinalPath(n))
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if o.Plots && !opt.NoPlots {
		figs, err := figures.DrawStaged(st, figures.Options{Relations: o.Relations, NoCoastlines: opt.NoCoastlines})
		if err != nil {
			return nil, fmt.Errorf("drawing the figures (nothing was written to %s; run with --no-plots to write the results without them): %w", out, err)
		}
		files = append(files, figs...)
	}
	return files, nil
}

// writeLimit is the soft memory limit while a run's results are written:
// the Go runtime's memory in use now (the accumulators, once the stream's
// buffers are returned), an eighth more, and 32 MB: room for one map of
// the output at a time and its conversion buffers (0.25°: 24 + 36 MB).
func writeLimit() int64 {
	var ms runtime.MemStats
	runtime.ReadMemStats(&ms)
	used := int64(ms.Sys - ms.HeapReleased)
	return used + used/8 + 32<<20
}

// estimateOutputs estimates the bytes a run writes from the number of
// columns of its analysis grid: about 512 bytes per column (maps, the run
// state and the relationship files of the demo world need about 350) and
// 8 MB for the figures and tables. The grid is read from the first SST
// file (its largest two-dimensional slab) or from a target resolution such
// as "2deg".
func estimateOutputs(p pipeline.Plan) int64 {
	cells := int64(0)
	if len(p.SST.Paths) > 0 {
		// only a regular file: the input checks refuse anything else later,
		// and opening a FIFO would wait
		if fi, err := os.Stat(p.SST.Paths[0]); err != nil || !fi.Mode().IsRegular() {
			return 8 << 20
		}
		if f, err := netcdf.Open(p.SST.Paths[0]); err == nil {
			if vs, err := f.Vars(); err == nil {
				for _, v := range vs {
					if sh := v.Shape(); len(sh) >= 2 {
						cells = max(cells, int64(sh[len(sh)-1])*int64(sh[len(sh)-2]))
					}
				}
			}
			f.Close()
		}
	}
	if res, ok := strings.CutSuffix(p.Grid.Target, "deg"); ok {
		if d, err := strconv.ParseFloat(res, 64); err == nil && d > 0 {
			cells = max(cells, int64(180/d)*int64(360/d))
		}
	}
	return 8<<20 + cells*512
}

// timeUnits is the time axis of the series outputs.
const timeUnits = "days since 1850-01-01 00:00:00"

func metaFor(r *config.Study, d *config.Dataset, res *pipeline.Result, opt Options, start time.Time, watch *inputWatch) (output.Meta, error) {
	m := output.Meta{
		Dataset:            d.Name,
		Title:              fmt.Sprintf("lidscope regime diagnostics: %s", d.Name),
		Version:            opt.Version,
		Command:            strings.Join(opt.Command, " "),
		Study:              r.Resolved(),
		StudyHash:          r.Hash(),
		MetricsConventions: d.Metrics.Text(),
		Regimes:            r.Analysis.Regimes(),
		StepsPerYear:       res.StepsPerYear,
		Calendar:           res.Calendar,
		Notes:              res.Notes,
		Grid:               res.Grid,
		Start:              start,
		End:                time.Now(),
	}
	if d.Description != "" {
		m.Title += " — " + d.Description
	}
	if n := len(res.Labels); n > 0 {
		m.Period = res.Labels[0] + " … " + res.Labels[n-1]
	}
	if res.Sampling == cf.StepClimatology {
		m.Climatology = true
		m.Notes = append(m.Notes, "the record is a 12-month climatology: crossings per year and dwell times describe the climatological seasonal cycle, not year-to-year variability")
	}
	cal, err := calendar.ParseCalendar(res.Calendar)
	if err != nil {
		return m, err
	}
	tu, err := calendar.ParseUnits(timeUnits, cal, calendar.Options{})
	if err != nil {
		return m, err
	}
	m.TimeUnits = timeUnits
	for _, dt := range res.Dates {
		v, err := tu.Encode(dt)
		if err != nil {
			return m, fmt.Errorf("encoding time %s: %w", dt, err)
		}
		m.TimeValues = append(m.TimeValues, v)
		if lo, hi, ok := stepBounds(dt, res.Sampling); ok {
			a, err1 := tu.Encode(lo)
			z, err2 := tu.Encode(hi)
			if err1 == nil && err2 == nil {
				m.TimeBounds = append(m.TimeBounds, [2]float64{a, z})
			}
		}
	}
	if len(m.TimeBounds) != len(m.TimeValues) {
		m.TimeBounds = nil
	}
	inputs, err := describeInputs(res.Paths, watch)
	if err != nil {
		return m, err
	}
	m.Inputs = inputs
	return m, nil
}

// stepBounds gives the calendar month (or day) a time stamp stands for.
func stepBounds(d calendar.Date, s cf.Step) (calendar.Date, calendar.Date, bool) {
	switch s {
	case cf.StepMonthly, cf.StepClimatology:
		lo, err := calendar.NewDate(d.Calendar, d.Year, d.Month, 1, 0, 0, 0)
		if err != nil {
			return d, d, false
		}
		ym := d.YearMonth().AddMonths(1)
		hi, err := calendar.NewDate(d.Calendar, ym.Year, ym.Month, 1, 0, 0, 0)
		if err != nil {
			return d, d, false
		}
		return lo, hi, true
	}
	return d, d, false
}

// describeInputs gives the size, modification time and SHA-256 of every
// input now; the checksums computed during the run (watch, nil for none)
// are used where they hold (see inputWatch).
func describeInputs(paths map[cf.Role][]string, watch *inputWatch) ([]output.InputFile, error) {
	var roles []string
	for r := range paths {
		roles = append(roles, string(r))
	}
	sort.Strings(roles)
	var out []output.InputFile
	for _, r := range roles {
		for _, p := range paths[cf.Role(r)] {
			fi, err := os.Stat(p)
			if err != nil {
				return nil, err
			}
			sum, ok := watch.sum(p)
			if !ok {
				if sum, err = fileSHA256(p); err != nil {
					return nil, err
				}
			}
			out = append(out, output.InputFile{Role: r, Path: p, Size: fi.Size(), ModTime: fi.ModTime(), SHA256: sum})
		}
	}
	return out, nil
}

func fileSHA256(path string) (string, error) {
	f, err := os.Open(path)
	if err != nil {
		return "", err
	}
	defer f.Close()
	h := sha256.New()
	if _, err := io.Copy(h, f); err != nil {
		return "", fmt.Errorf("reading %s for its checksum: %w", path, err)
	}
	return hex.EncodeToString(h.Sum(nil)), nil
}
