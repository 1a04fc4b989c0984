package compare

import (
	"fmt"
	"io"
)

// WriteEstimates prints the sensitivities, thresholds and flip fractions of
// every candidate beside the reference's, each line starting with indent:
// the value with its 95 % interval, the difference to the reference with
// the combined half-width (CombinedMethod), and whether the difference
// lies within it. Notes say what could not be compared.
func WriteEstimates(w io.Writer, res *Result, indent string) {
	width := len("reference")
	for _, c := range res.Candidates {
		width = max(width, len(c.Name))
	}
	if len(res.ReferenceEstimates) > 0 {
		fmt.Fprintf(w, "%ssensitivities and thresholds (subsidence regime, tropical band, whole record; 95 %% intervals;\n%s  difference ± combined half-width √(h_ref² + h_cand²), runs taken as independent):\n", indent, indent)
	}
	for _, re := range res.ReferenceEstimates {
		fmt.Fprintf(w, "%s  %s [%s]\n", indent, re.Name, re.Units)
		fmt.Fprintf(w, "%s    %-*s %11.4g  [%.4g, %.4g]\n", indent, width, res.Reference.Name, re.Ref, re.RefCI.Lo, re.RefCI.Hi)
		for _, c := range res.Candidates {
			var e *Estimate
			for i := range c.Estimates {
				if c.Estimates[i].Name == re.Name {
					e = &c.Estimates[i]
				}
			}
			if e == nil {
				fmt.Fprintf(w, "%s    %-*s %11s\n", indent, width, c.Name, "—")
				continue
			}
			verdict := Verdict(*e)
			fmt.Fprintf(w, "%s    %-*s %11.4g  [%.4g, %.4g]  difference %+.4g ± %.4g  %s\n", indent, width, c.Name, e.Cand, e.CandCI.Lo, e.CandCI.Hi, e.Diff, e.Combined, verdict)
		}
	}
	for _, c := range res.Candidates {
		if len(c.Flips) > 0 {
			fmt.Fprintf(w, "%sflip fractions (share of the patch's ocean area × time changing regime), %s vs %s:\n", indent, c.Name, res.Reference.Name)
			for _, f := range c.Flips {
				fmt.Fprintf(w, "%s  %-22s ΔT %+5.2g K: %.4g vs %.4g (%+.3g); convective change %+.4g vs %+.4g\n", indent, f.Patch, f.DeltaT, f.CandChanged, f.RefChanged, f.DiffChanged, f.CandConvChange, f.RefConvChange)
			}
		}
		for _, n := range c.Notes {
			fmt.Fprintf(w, "%snote: %s\n", indent, n)
		}
	}
}
