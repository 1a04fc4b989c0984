package pipeline

import (
	"fmt"
	"math"
	"strings"

	"lidscope/cf"
	"lidscope/grid"
)

// GridGroup is a set of fields that share one grid.
type GridGroup struct {
	Grid   *grid.Grid
	Fields []string // "role (path)"
}

// GridReport says whether a set of fields share a grid and, if not, what
// analysis grid to use.
type GridReport struct {
	Groups []GridGroup
	// Suggest is the analysis grid a study should name when the grids
	// differ: the coarsest grid (remapping conservatively from fine to
	// coarse averages; the other way only copies), as a role name.
	Suggest     string
	SuggestGrid *grid.Grid
}

// Match reports whether every field is on one grid.
func (r GridReport) Match() bool { return len(r.Groups) <= 1 }

// String describes the report in plain words.
func (r GridReport) String() string {
	if len(r.Groups) == 0 {
		return "no gridded fields"
	}
	if r.Match() {
		return fmt.Sprintf("all %d fields share one grid: %s", len(r.Groups[0].Fields), r.Groups[0].Grid)
	}
	var b strings.Builder
	fmt.Fprintf(&b, "the fields are on %d different grids:\n", len(r.Groups))
	for _, g := range r.Groups {
		fmt.Fprintf(&b, "  %s: %s\n", g.Grid, strings.Join(g.Fields, ", "))
	}
	fmt.Fprintf(&b, "analysis grid: set analysis.grid.target: %s in the study (the coarsest grid, %s) to remap the others conservatively onto it", r.Suggest, r.SuggestGrid)
	return b.String()
}

// CompareGrids opens each file's recognised fields and groups them by grid.
func CompareGrids(reports []*cf.FileReport) (GridReport, error) {
	var rep GridReport
	best := -1
	for _, fr := range reports {
		for _, vr := range fr.Fields {
			if len(vr.Problems) > 0 {
				continue
			}
			f, err := cf.Open([]string{fr.Path}, vr.Spec)
			if err != nil {
				continue
			}
			g, err := gridOf(f)
			f.Close()
			if err != nil {
				return rep, err
			}
			name := fmt.Sprintf("%s (%s)", vr.Role, fr.Path)
			placed := false
			for k := range rep.Groups {
				if sameCentres(rep.Groups[k].Grid, g, 1e-4) {
					rep.Groups[k].Fields = append(rep.Groups[k].Fields, name)
					placed = true
					break
				}
			}
			if !placed {
				rep.Groups = append(rep.Groups, GridGroup{Grid: g, Fields: []string{name}})
				if best < 0 || g.Size() < rep.Groups[best].Grid.Size() {
					best = len(rep.Groups) - 1
					rep.Suggest, rep.SuggestGrid = string(vr.Role), g
				}
			}
		}
	}
	return rep, nil
}

// sameCentres reports whether two grids have the same cell centres within
// tol degrees (longitudes compared modulo 360). Cell bounds are not
// compared: a file's own bounds and bounds derived from midpoints describe
// the same grid for lidscope's purposes (area weights differ slightly; the
// analysis uses the analysis grid's bounds throughout).
func sameCentres(a, b *grid.Grid, tol float64) bool {
	if len(a.Lat) != len(b.Lat) || len(a.Lon) != len(b.Lon) {
		return false
	}
	for i := range a.Lat {
		if d := a.Lat[i] - b.Lat[i]; d > tol || d < -tol {
			return false
		}
	}
	for i := range a.Lon {
		d := math.Mod(a.Lon[i]-b.Lon[i], 360)
		if d > 180 {
			d -= 360
		} else if d < -180 {
			d += 360
		}
		if d > tol || d < -tol {
			return false
		}
	}
	return true
}
