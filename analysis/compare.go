package analysis

import (
	"context"
	"fmt"
	"path/filepath"

	"lidscope/compare"
	"lidscope/config"
	"lidscope/figures"
	"lidscope/relations"
)

// CompareOptions control a comparison.
type CompareOptions struct {
	Options
	AllowMismatch bool
}

// LoadRun reads a finished run folder for comparison.
func LoadRun(dir string) (compare.Run, error) {
	m, a, err := LoadState(dir)
	if err != nil {
		return compare.Run{}, err
	}
	rel, err := relations.ReadResults(dir)
	if err != nil {
		return compare.Run{}, fmt.Errorf("reading the relationship results of %s: %w", dir, err)
	}
	return compare.Run{Name: m.Dataset, Dir: dir, Meta: m, Acc: a, Relations: rel}, nil
}

// CompareDirs compares finished runs: the first folder is the reference.
// It writes comparison.csv, comparison.json and comparison_maps.nc into
// out and, unless NoPlots, the comparison figures into out/figures.
func CompareDirs(ref string, cands []string, out string, opt CompareOptions) (*compare.Result, []string, error) {
	r, err := LoadRun(ref)
	if err != nil {
		return nil, nil, err
	}
	var cs []compare.Run
	for _, d := range cands {
		c, err := LoadRun(d)
		if err != nil {
			return nil, nil, err
		}
		cs = append(cs, c)
	}
	res, err := compare.Compare(r, cs, compare.Options{AllowMismatch: opt.AllowMismatch})
	if err != nil {
		return nil, nil, err
	}
	files, err := compare.Write(out, res, compare.WriteOptions{Force: opt.Force, Version: opt.Version, Command: opt.Command})
	if err != nil || opt.NoPlots {
		return res, files, err
	}
	figs, err := figures.DrawComparison(res, figures.CompareOptions{OutDir: filepath.Join(out, figures.DefaultDirName), Force: opt.Force, NoCoastlines: opt.NoCoastlines})
	if err != nil {
		return res, files, fmt.Errorf("drawing the comparison figures: %w", err)
	}
	return res, append(files, figs...), nil
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
