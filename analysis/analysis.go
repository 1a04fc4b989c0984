// Package analysis runs lidscope's main job for the datasets of a study:
// it turns each dataset into a pipeline plan, streams the record through
// the pipeline, and writes the results with their provenance (package
// output). It is the library behind `lidscope run` and `lidscope demo`.
package analysis

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"log/slog"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"lidscope/accumulate"
	"lidscope/calendar"
	"lidscope/cf"
	"lidscope/config"
	"lidscope/figures"
	"lidscope/output"
	"lidscope/pipeline"
	"lidscope/regimes"
	"lidscope/relations"
)

// Options control a run.
type Options struct {
	Version string   // lidscope version, recorded in every output
	Command []string // the command line, recorded in history
	// OutDir, when set, replaces the dataset's output folder; with several
	// datasets each goes to OutDir/<dataset name>.
	OutDir string
	Force  bool // replace existing outputs
	// NoPlots skips the figures (otherwise drawn when the study's
	// output.plots is true, the default).
	NoPlots bool
	// NoCoastlines leaves Earth's coastlines off the maps (the demo's
	// synthetic worlds have invented continents).
	NoCoastlines bool
	Workers      int
	Log          *slog.Logger
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
}

// Run runs the named datasets of r (all when names is empty), in study order.
func Run(ctx context.Context, r *config.Study, names []string, opt Options) ([]Report, error) {
	var ds []*config.Dataset
	if len(names) == 0 {
		for i := range r.Datasets {
			ds = append(ds, &r.Datasets[i])
		}
	} else {
		for _, n := range names {
			d, err := r.Dataset(n)
			if err != nil {
				return nil, err
			}
			ds = append(ds, d)
		}
	}
	var reps []Report
	for _, d := range ds {
		out := d.OutputDir
		if opt.OutDir != "" {
			out = opt.OutDir
			if len(ds) > 1 {
				out = filepath.Join(opt.OutDir, d.Name)
			}
		}
		rep, err := RunDataset(ctx, r, d, out, opt)
		if err != nil {
			return reps, fmt.Errorf("dataset %s: %w", d.Name, err)
		}
		reps = append(reps, rep)
	}
	return reps, nil
}

// RunDataset runs one dataset and writes its results to out.
func RunDataset(ctx context.Context, r *config.Study, d *config.Dataset, out string, opt Options) (Report, error) {
	log := opt.Log
	if log == nil {
		log = slog.New(slog.DiscardHandler)
	}
	start := time.Now()
	plan, err := pipeline.PlanFor(r, d)
	if err != nil {
		return Report{}, err
	}
	plan.Workers = opt.Workers
	plan.Log = log
	if opt.Progress != nil {
		plan.Progress = func(done, total int) { opt.Progress(d.Name, done, total) }
	}
	// Refuse to overwrite before spending time on the run.
	if !opt.Force {
		for _, n := range append(append(output.OutputNames(), relations.OutputNames()...), StateFile) {
			if _, err := os.Stat(filepath.Join(out, n)); err == nil {
				return Report{}, fmt.Errorf("%s already holds results (%s); use --force to replace them or choose another --out", out, n)
			}
		}
	}
	log.Info("run", "dataset", d.Name, "out", out)
	relCfg := r.RelationsFor(d)
	// The relationship analysis relates cloud to EIS, LTS and relative
	// SST: it needs both optional inputs.
	noRel := NoRelations(plan)
	var clim *relations.Climatology
	if noRel == "" && relCfg.Mode == relations.Anomaly {
		// Pass 1: the climatology of every cell and calendar month.
		p1 := plan
		p1.NewSinks = func(l accumulate.Layout) ([]pipeline.StepSink, error) {
			clim = relations.NewClimatology(l)
			return []pipeline.StepSink{clim}, nil
		}
		log.Info("pass 1 of 2: climatology for anomaly mode", "dataset", d.Name)
		if _, err := pipeline.Run(ctx, p1); err != nil {
			return Report{}, err
		}
	}
	var rel *relations.Acc
	if noRel == "" {
		plan.NewSinks = func(l accumulate.Layout) ([]pipeline.StepSink, error) {
			a, err := relations.New(relCfg, l, clim)
			if err != nil {
				return nil, fmt.Errorf("relationship analysis: %w", err)
			}
			rel = a
			return []pipeline.StepSink{a}, nil
		}
	}
	res, err := pipeline.Run(ctx, plan)
	if err != nil {
		return Report{}, err
	}
	for _, n := range res.Notes {
		log.Info("note", "dataset", d.Name, "text", n)
	}
	meta, err := metaFor(r, d, res, opt, start)
	if err != nil {
		return Report{}, err
	}
	meta.Absent = plan.Lacks()
	var relRes *relations.Results
	if rel != nil {
		if relRes, err = rel.Results(); err != nil {
			return Report{}, fmt.Errorf("relationship analysis: %w", err)
		}
	} else {
		meta.Absent = append(meta.Absent, noRel)
		log.Info("note", "dataset", d.Name, "text", noRel)
	}
	files, err := writeResults(out, res.Acc, meta, relRes, rel, noRel, opt)
	if err != nil {
		return Report{}, err
	}
	if r.Output.Plots && !opt.NoPlots {
		figs, err := figures.Draw(out, figures.Options{Force: opt.Force, Relations: relRes, NoCoastlines: opt.NoCoastlines})
		if err != nil {
			return Report{}, fmt.Errorf("drawing the figures (the results are written; redraw with lidscope plot %s): %w", out, err)
		}
		files = append(files, figs...)
	}
	return Report{Dataset: d.Name, OutDir: out, Files: files, Result: res, Meta: meta, Relations: relRes}, nil
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

// writeResults writes every result file of a run (or of a merge) into
// out: the regime outputs of acc, the relationship outputs of rel (none
// when relAcc is nil: noRel says why), and the run state with both
// accumulators (acc and relAcc). It creates out when needed and removes it
// again if it created it and the write failed.
func writeResults(out string, acc *accumulate.Acc, meta output.Meta, rel *relations.Results, relAcc *relations.Acc, noRel string, opt Options) (files []string, err error) {
	created := false
	if _, err := os.Stat(out); errors.Is(err, fs.ErrNotExist) {
		created = true
	}
	if err := os.MkdirAll(out, 0o755); err != nil {
		return nil, fmt.Errorf("creating the output folder: %w", err)
	}
	defer func() {
		if err != nil && created {
			os.Remove(out) // only succeeds when empty: nothing of ours is left
		}
	}()
	// An earlier run's state must never sit next to new results.
	if opt.Force {
		if err := os.Remove(filepath.Join(out, StateFile)); err != nil && !errors.Is(err, fs.ErrNotExist) {
			return nil, err
		}
	}
	files, err = output.Write(out, acc, meta, output.Options{Force: opt.Force})
	if err != nil {
		return nil, err
	}
	if rel != nil {
		rf, err := relations.Write(out, rel, relations.Meta{Dataset: meta.Dataset, Title: meta.Title, Version: meta.Version,
			Command: opt.Command, StudyHash: meta.StudyHash, Period: meta.Period, Source: "lidscope " + meta.Version}, relations.WriteOptions{Force: opt.Force})
		if err != nil {
			return files, fmt.Errorf("writing the relationship results: %w", err)
		}
		files = append(files, rf...)
	} else if opt.Force {
		// An earlier run's relationship results must not sit next to a
		// run that has none.
		for _, n := range relations.OutputNames() {
			if err := os.Remove(filepath.Join(out, n)); err != nil && !errors.Is(err, fs.ErrNotExist) {
				return files, fmt.Errorf("removing the relationship results of an earlier run: %w", err)
			}
		}
	}
	if err := saveState(out, meta, acc, relAcc, noRel); err != nil {
		return files, fmt.Errorf("writing the run state: %w", err)
	}
	return append(files, filepath.Join(out, StateFile)), nil
}

// timeUnits is the time axis of the series outputs.
const timeUnits = "days since 1850-01-01 00:00:00"

func metaFor(r *config.Study, d *config.Dataset, res *pipeline.Result, opt Options, start time.Time) (output.Meta, error) {
	c := r.Analysis.Classifier()
	b := r.Analysis.Band
	m := output.Meta{
		Dataset:            d.Name,
		Title:              fmt.Sprintf("lidscope regime diagnostics: %s", d.Name),
		Version:            opt.Version,
		Command:            strings.Join(opt.Command, " "),
		Study:              r.Resolved(),
		StudyHash:          r.Hash(),
		MetricsConventions: d.Metrics.Text(),
		RegimeDefinition:   RegimeText(c, b),
		Delta:              c.Delta,
		HalfWidth:          c.HalfWidth,
		BandSouth:          b.South,
		BandNorth:          b.North,
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
	inputs, err := describeInputs(res.Paths)
	if err != nil {
		return m, err
	}
	m.Inputs = inputs
	return m, nil
}

// RegimeText states the regime definition for titles and metadata.
func RegimeText(c regimes.Classifier, b regimes.Band) string {
	return fmt.Sprintf("%s; tropical mean: cell-area-weighted over ocean %s–%s", c, lat(b.South), lat(b.North))
}

func lat(x float64) string {
	switch {
	case x < 0:
		return fmt.Sprintf("%g°S", -x)
	case x > 0:
		return fmt.Sprintf("%g°N", x)
	}
	return "0°"
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

func describeInputs(paths map[cf.Role][]string) ([]output.InputFile, error) {
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
			sum, err := fileSHA256(p)
			if err != nil {
				return nil, err
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
