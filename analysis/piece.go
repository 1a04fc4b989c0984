package analysis

import (
	"os"
	"path/filepath"

	"lidscope/config"
	"lidscope/output"
	"lidscope/pipeline"
)

// donePiece reports whether out already holds a complete, committed run of
// piece p of the dataset of plan under the same study (the same study
// hash) with unchanged inputs: every file the earlier run read has the
// size and modification time it had then, and every input of the plan was
// read by it. Anything unreadable or different means "not done".
func donePiece(out string, r *config.Study, plan pipeline.Plan, p pipeline.Piece) (output.Meta, bool) {
	s, err := loadState(out, false)
	if err != nil {
		return output.Meta{}, false
	}
	m := s.meta
	if m.Piece != p.String() || m.StudyHash != r.Hash() || m.Dataset != plan.Dataset {
		return m, false
	}
	read := map[string]bool{}
	for _, f := range m.Inputs {
		fi, err := os.Stat(f.Path)
		if err != nil || fi.Size() != f.Size || !fi.ModTime().Equal(f.ModTime) {
			return m, false
		}
		read[absPath(f.Path)] = true
	}
	for _, path := range planPaths(plan) {
		if !read[absPath(path)] {
			return m, false
		}
	}
	return m, true
}

func absPath(p string) string {
	if a, err := filepath.Abs(p); err == nil {
		return a
	}
	return filepath.Clean(p)
}

// planPaths lists every input file of a plan.
func planPaths(p pipeline.Plan) []string {
	out := append([]string{}, p.SST.Paths...)
	for _, in := range []*pipeline.Input{p.T700, p.Cloud, p.SurfaceAir, p.SurfacePressure, p.Humidity, p.T850, p.Q700, p.SeaIce, p.Ocean.Input} {
		if in != nil {
			out = append(out, in.Paths...)
		}
	}
	for _, e := range p.Extras {
		out = append(out, e.Paths...)
	}
	return out
}
