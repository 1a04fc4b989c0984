package cf

import (
	"fmt"
	"math"
	"strings"

	"lidscope/netcdf"
	"lidscope/units"
)

// openCollecting opens one file for Inspect, reading on past every problem
// it can (a time axis that cannot be decoded, missing or unknown units, a
// level that cannot be picked, packing attributes that cannot be used), so
// that one pass reports them all; each goes to problems with its fix.
// The field it returns serves only to sample values for the plausibility
// checks: where a problem was read past, its dates, level or decoding are
// stand-ins. Problems it cannot read past (no latitude/longitude, an
// unknown dimension) are returned as the error, as by Open.
func openCollecting(path string, spec Spec, problems *[]string) (*Field, error) {
	spec.collect = problems
	return Open([]string{path}, spec)
}

// notUnpacked is the note of an integer field read on past unusable
// packing attributes: its sampled values (stored integers) are not checked
// for plausibility. A float field's stored values are checked as they are.
const notUnpacked = "stored integers sampled without unpacking (the packing attributes cannot be used), so not checked for plausibility"

// plainMask decodes nothing but NaN (and infinities): the stand-in when a
// variable's packing or missing-value attributes cannot be used.
func plainMask(v *netcdf.Var) Mask {
	return Mask{Fill: math.NaN(), ValidMin: math.Inf(-1), ValidMax: math.Inf(1), Scale: 1,
		isFloatType: v.Type == netcdf.Float || v.Type == netcdf.Double, standIn: true}
}

// roleText puts the role into the placeholder ROLE of a study key in an
// error message (coordinates.ROLE.level_units), keeping the wrapped error.
type roleText struct {
	err  error
	role Role
}

func (e roleText) Error() string {
	return strings.ReplaceAll(e.err.Error(), "coordinates.ROLE.", "coordinates."+string(e.role)+".")
}
func (e roleText) Unwrap() error { return e.err }

// attrProblems are the problems of a variable's units and packing
// attributes alone, for a variable that cannot be opened at all (so that
// its report still lists them beside the reason).
func attrProblems(path string, v *netcdf.Var, r Role, kind units.Kind) []string {
	var out []string
	if u := textAttr(v, "units"); u != "" || kind != units.Fraction {
		if _, err := units.Parse(kind, u); err != nil {
			out = append(out, fmt.Sprintf("%s: variable %s (units attribute): %v; set units.%s in the study if the file is wrong", path, v.Name, err, r))
		}
	}
	if _, err := maskOf(v); err != nil {
		out = append(out, fmt.Sprintf("%s: %v", path, err))
	}
	return out
}

// dedupe drops repeated problems, keeping the first of each.
func dedupe(x []string) []string {
	var out []string
	seen := map[string]bool{}
	for _, s := range x {
		if !seen[s] {
			seen[s] = true
			out = append(out, s)
		}
	}
	return out
}

// HasRole reports whether the files (read as one record) hold a variable
// for spec's role: one the study names (spec.Var), or one found by
// standard_name or name in the first file. When none is found it returns
// false and why, in the words of FindRole (which also names a variable
// that only its long name suggests, to be confirmed in the study). An
// ambiguous role, or a file that cannot be read, is an error.
func HasRole(paths []string, spec Spec) (bool, string, error) {
	if spec.Var != "" {
		return true, "", nil
	}
	if len(paths) == 0 {
		return false, fmt.Sprintf("role %s: no input files", spec.Role), nil
	}
	nf, err := netcdf.Open(paths[0])
	if err != nil {
		return false, "", fmt.Errorf("role %s: %w%s", spec.Role, err, openHint(err))
	}
	defer nf.Close()
	cands, amb, _, err := roleCandidates(nf)
	if err != nil {
		return false, "", err
	}
	if m, ok := cands[spec.Role]; ok && !m.ByLongName {
		return true, "", nil
	}
	for _, a := range amb {
		if strings.HasPrefix(a, "role "+string(spec.Role)+" ") {
			return false, "", fmt.Errorf("%s: %s", nf.Path(), a)
		}
	}
	_, err = FindRole(nf, spec.Role)
	if err == nil {
		return true, "", nil
	}
	return false, err.Error(), nil
}
