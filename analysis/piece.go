package analysis

import (
	"os"
	"path/filepath"

	"lidscope/cf"
	"lidscope/config"
	"lidscope/output"
	"lidscope/pipeline"
)

// donePiece reports whether out already holds a complete, committed run of
// piece p of the dataset of plan under the same study (the same study
// hash) with unchanged inputs: every file the earlier run read data from,
// and every file the study listed for the dataset then, has the size and
// modification time it had then, and the study lists the same files now
// (a file added to or removed from a record moves the pieces' steps); in
// anomaly mode its anomalies were taken against the climatology whose
// fingerprint is base (Options.Climatology; "" when none is given, and
// then the earlier piece had none given either). Anything unreadable or different means
// "not done".
func donePiece(out string, r *config.Study, plan pipeline.Plan, p pipeline.Piece, base string) (output.Meta, bool) {
	s, err := loadState(out, false)
	if err != nil {
		return output.Meta{}, false
	}
	m := s.meta
	if m.Piece != p.String() || m.StudyHash != r.Hash() || m.Dataset != plan.Dataset || len(m.Listed) == 0 || m.AnomalyBase != base {
		return m, false
	}
	unchanged := func(f output.InputFile) bool {
		fi, err := os.Stat(f.Path)
		return err == nil && fi.Size() == f.Size && fi.ModTime().Equal(f.ModTime)
	}
	for _, f := range m.Inputs {
		if !unchanged(f) {
			return m, false
		}
	}
	listed := map[string]bool{}
	for _, f := range m.Listed {
		if !unchanged(f) {
			return m, false
		}
		listed[absPath(f.Path)] = true
	}
	var d *config.Dataset
	for i := range r.Datasets {
		if r.Datasets[i].Name == plan.Dataset {
			d = &r.Datasets[i]
		}
	}
	if d == nil {
		return m, false
	}
	now := map[string]bool{}
	for _, ps := range datasetPaths(d) {
		for _, path := range ps {
			if cf.CheckRegular(path) != nil {
				continue // not stamped either (watchInputs)
			}
			now[absPath(path)] = true
			if !listed[absPath(path)] {
				return m, false
			}
		}
	}
	return m, len(now) == len(listed)
}

func absPath(p string) string {
	if a, err := filepath.Abs(p); err == nil {
		return a
	}
	return filepath.Clean(p)
}
