package config

import (
	"fmt"
	"sort"
	"strings"
)

// Problem is one thing wrong with a study: where it is (file, line, key)
// and what to do about it.
type Problem struct {
	// File is the study file.
	File string
	// Line is the line of the key in File (1-based), 0 when unknown or
	// when the value came from a flag or the environment.
	Line int
	// Key is the dotted key path, e.g. "datasets.obs.ocean.mask"; list
	// elements are numbered from 0. Empty for problems of the whole file.
	Key string
	// Origin names a flag or environment variable when the value came
	// from there instead of the file.
	Origin string
	// Msg says what is wrong and what to do.
	Msg string
}

// Error formats the problem as "file:line: key: message".
func (p Problem) Error() string {
	var b strings.Builder
	b.WriteString(p.File)
	if p.Line > 0 {
		fmt.Fprintf(&b, ":%d", p.Line)
	}
	if p.Key != "" {
		b.WriteString(": ")
		b.WriteString(p.Key)
	}
	if p.Origin != "" {
		fmt.Fprintf(&b, " (from %s)", p.Origin)
	}
	b.WriteString(": ")
	b.WriteString(p.Msg)
	return b.String()
}

// Error is every problem found in a study, in file order. Load returns it
// (as error) when any problem was found; errors.As gives the list.
type Error struct {
	File     string
	Problems []Problem
}

// Error lists the problems, one per line.
func (e *Error) Error() string {
	var b strings.Builder
	n := len(e.Problems)
	if n == 1 {
		fmt.Fprintf(&b, "study %s has a problem:\n", e.File)
	} else {
		fmt.Fprintf(&b, "study %s has %d problems:\n", e.File, n)
	}
	for i, p := range e.Problems {
		if i > 0 {
			b.WriteByte('\n')
		}
		b.WriteString("  ")
		b.WriteString(p.Error())
	}
	return b.String()
}

// Unwrap returns the problems as errors, so errors.As finds a Problem.
func (e *Error) Unwrap() []error {
	out := make([]error, len(e.Problems))
	for i, p := range e.Problems {
		out[i] = p
	}
	return out
}

func sortProblems(ps []Problem) {
	sort.SliceStable(ps, func(i, j int) bool {
		a, b := ps[i], ps[j]
		// problems with a line first, by line; then the rest in the order found
		if (a.Line > 0) != (b.Line > 0) {
			return a.Line > 0
		}
		return a.Line < b.Line
	})
}

// distance is the optimal-string-alignment edit distance between a and b:
// the Levenshtein distance (insertions, deletions and substitutions of
// single bytes, each costing 1) extended with transpositions of two
// adjacent bytes, also costing 1 ("ocaen" is one edit from "ocean").
func distance(a, b string) int {
	d := make([][]int, len(a)+1)
	for i := range d {
		d[i] = make([]int, len(b)+1)
		d[i][0] = i
	}
	for j := range d[0] {
		d[0][j] = j
	}
	for i := 1; i <= len(a); i++ {
		for j := 1; j <= len(b); j++ {
			c := 0
			if a[i-1] != b[j-1] {
				c = 1
			}
			d[i][j] = min(d[i-1][j]+1, d[i][j-1]+1, d[i-1][j-1]+c)
			if i > 1 && j > 1 && a[i-1] == b[j-2] && a[i-2] == b[j-1] {
				d[i][j] = min(d[i][j], d[i-2][j-2]+1)
			}
		}
	}
	return d[len(a)][len(b)]
}

// nearest returns the candidate closest to s by edit distance, when it is
// close enough to be a plausible typo (at most 2 edits, or a third of the
// length for long words, and fewer edits than the shorter word has
// letters), and "" otherwise. Ties go to the
// candidate first in sorted order.
func nearest(s string, candidates []string) string {
	best, bestD := "", -1
	sorted := append([]string(nil), candidates...)
	sort.Strings(sorted)
	for _, c := range sorted {
		d := distance(strings.ToLower(s), c)
		if bestD < 0 || d < bestD {
			best, bestD = c, d
		}
	}
	short := min(len(s), len(best))
	if bestD < 0 || bestD > max(2, short/3) || bestD >= short {
		return ""
	}
	return best
}

// suggest says "did you mean X?" or lists the choices.
func suggest(s string, candidates []string) string {
	if n := nearest(s, candidates); n != "" {
		return fmt.Sprintf("did you mean %q?", n)
	}
	sorted := append([]string(nil), candidates...)
	sort.Strings(sorted)
	return "valid: " + strings.Join(sorted, ", ")
}
