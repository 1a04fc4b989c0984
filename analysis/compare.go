package analysis

import (
	"context"
	"fmt"
	"path/filepath"

	"lidscope/compare"
	"lidscope/config"
	"lidscope/figures"
	"lidscope/relations"
	"lidscope/runfolder"
)

// CompareOptions control a comparison.
type CompareOptions struct {
	Options
	AllowMismatch bool
}

// LoadRun reads a finished run folder for comparison: a complete,
// committed run (runfolder.Open) with an intact run state.
func LoadRun(dir string) (compare.Run, error) {
	f, err := runfolder.Open(dir, StateFile)
	if err != nil {
		return compare.Run{}, err
	}
	defer f.Close()
	return loadRun(f)
}

func loadRun(f *runfolder.Folder) (compare.Run, error) {
	s, err := readState(f.Path(StateFile), false)
	if err != nil {
		return compare.Run{}, err
	}
	rel, err := relations.ReadResults(f.Dir)
	if err != nil {
		return compare.Run{}, fmt.Errorf("reading the relationship results of %s: %w", f.Dir, err)
	}
	return compare.Run{Name: s.meta.Dataset, Dir: f.Dir, Meta: s.meta, Acc: s.acc, Relations: rel}, nil
}

// CompareDirs compares finished runs: the first folder is the reference.
// It writes comparison.csv, comparison.json, comparison_maps.nc and,
// unless NoPlots, the comparison figures (out/figures) into out, all as
// one unit: when anything fails, nothing is written. The run folders stay
// locked for reading while they are compared.
func CompareDirs(ref string, cands []string, out string, opt CompareOptions) (*compare.Result, []string, error) {
	var runs []compare.Run
	for _, d := range append([]string{ref}, cands...) {
		f, err := runfolder.Open(d, StateFile)
		if err != nil {
			return nil, nil, err
		}
		defer f.Close()
		r, err := loadRun(f)
		if err != nil {
			return nil, nil, err
		}
		runs = append(runs, r)
	}
	res, err := compare.Compare(runs[0], runs[1:], compare.Options{AllowMismatch: opt.AllowMismatch})
	if err != nil {
		return nil, nil, err
	}
	lock, err := runfolder.LockFolder(out)
	if err != nil {
		return nil, nil, err
	}
	defer lock.Release()
	wo := compare.WriteOptions{Force: opt.Force, Version: opt.Version, Command: opt.Command}
	if !opt.NoPlots {
		wo.Figures = func(dir string) ([]string, error) {
			return figures.DrawComparison(res, figures.CompareOptions{OutDir: dir, NoCoastlines: opt.NoCoastlines})
		}
	}
	files, err := compare.Write(out, res, wo)
	if err != nil {
		return nil, nil, err
	}
	return res, files, nil
}

// CompareStudy runs every dataset of a study into out/<dataset> and
// compares the candidates with the reference dataset (the first when
// reference is empty), writing the comparison into out.
func CompareStudy(ctx context.Context, r *config.Study, reference, out string, opt CompareOptions) (*compare.Result, []string, error) {
	if len(r.Datasets) < 2 {
		return nil, nil, fmt.Errorf("%s has %d dataset(s); a comparison needs a reference and at least one candidate", r.Path, len(r.Datasets))
	}
	if reference == "" {
		reference = r.Datasets[0].Name
	}
	if _, err := r.Dataset(reference); err != nil {
		return nil, nil, err
	}
	ro := opt.Options
	ro.OutDir = out
	// force OutDir/<name> even for one dataset: Run does so for several
	reps, err := Run(ctx, r, nil, ro)
	if err != nil {
		return nil, nil, err
	}
	var refDir string
	var cands []string
	for _, rep := range reps {
		if rep.Dataset == reference {
			refDir = rep.OutDir
		} else {
			cands = append(cands, rep.OutDir)
		}
	}
	return CompareDirs(refDir, cands, filepath.Clean(out), opt)
}
