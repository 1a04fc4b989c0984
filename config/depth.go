package config

import (
	"fmt"
	"strings"
)

// MaxDepth is how deeply tables and lists may nest in a study. The deepest
// key of the schema is five levels down (datasets, a dataset, coordinates,
// a role, lat); the limit leaves room for flow syntax and stays far below
// what would make a parser recurse without end or take quadratic time
// (a TOML inline table nested a thousand deep takes seconds to parse).
const MaxDepth = 32

// checkDepth scans the study text before any parser sees it and refuses
// nesting deeper than MaxDepth: brackets and braces (every format), dotted
// keys and table headers (TOML), and indentation levels (YAML). Quoted
// strings and comments are skipped. The line of the first excess is
// reported.
func checkDepth(path, format string, src []byte) error {
	sc := depthScan{src: src, format: format, line: 1}
	fail := func(d int) error {
		return fmt.Errorf("study %s, line %d: tables and lists nest %d levels deep here, more than the %d lidscope reads (a study needs about 5); check the brackets, braces%s", path, sc.line, d, MaxDepth, map[bool]string{true: " and indentation", false: " and dotted keys"}[format == "yaml"])
	}
	lineStart := true
	for i := 0; i < len(src); i++ {
		if lineStart && format == "yaml" && sc.depth == 0 {
			var d int
			if sc.stack, d = yamlBlockDepth(src, i, sc.stack); d > MaxDepth {
				return fail(d)
			}
		}
		var d int
		i, lineStart, d = sc.step(i)
		if d > MaxDepth {
			return fail(d)
		}
		if sc.inHeader && sc.keyDots+1 > MaxDepth {
			return fail(sc.keyDots + 1)
		}
	}
	return nil
}

// depthScan is the state of checkDepth's scan.
type depthScan struct {
	src      []byte
	format   string
	depth    int   // open brackets and braces
	line     int   // the line being read, from 1
	stack    []int // YAML: the indentation of each open block level
	keyDots  int   // TOML: dots in the key being read
	inHeader bool  // TOML: inside a [table] header
}

// step reads the byte at i (and what it opens: a comment, a quoted
// string, a header) and returns the index of the last byte read, whether
// a new line starts after it, and the nesting to check there (0: none).
func (sc *depthScan) step(i int) (int, bool, int) {
	src, format, c := sc.src, sc.format, sc.src[i]
	switch {
	case c == '\n':
		sc.line++
		sc.keyDots = 0
		sc.inHeader = false
		return i, true, 0
	case c == '#':
		for i+1 < len(src) && src[i+1] != '\n' {
			i++
		}
	case (c == '"' || c == '\'') && (format != "yaml" || i == 0 || strings.IndexByte(" \t\n[{,:-", src[i-1]) >= 0):
		var lines int
		i, lines = skipQuoted(src, i, format)
		sc.line += lines
	case c == '[' || c == '{':
		if format == "toml" && c == '[' && sc.depth == 0 && lineIsHeader(src, i) {
			sc.inHeader = true
			sc.keyDots = 0
			if i+1 < len(src) && src[i+1] == '[' {
				i++ // [[array of tables]]
			}
			return i, false, 0
		}
		sc.depth++
		sc.keyDots = 0
		return i, false, sc.depth + len(sc.stack)
	case c == ']' || c == '}':
		if sc.inHeader {
			sc.inHeader = false
			if i+1 < len(src) && src[i+1] == ']' {
				i++
			}
		} else if sc.depth > 0 {
			sc.depth--
		}
	case c == ',':
		sc.keyDots = 0
	case c == '.' && format == "toml":
		sc.keyDots++
	case c == '=' && format == "toml":
		d := sc.depth + sc.keyDots + 1
		sc.keyDots = 0
		return i, false, d
	}
	return i, false, 0
}

// lineIsHeader reports whether the '[' at i starts a TOML table header
// (only spaces before it on its line).
func lineIsHeader(src []byte, i int) bool {
	for j := i - 1; j >= 0 && src[j] != '\n'; j-- {
		if src[j] != ' ' && src[j] != '\t' {
			return false
		}
	}
	return true
}

// treeDepth is the nesting depth of a parsed value, counted up to limit+1.
func treeDepth(v any, limit int) int {
	if limit < 0 {
		return 0
	}
	best := 0
	switch t := v.(type) {
	case map[string]any:
		for _, x := range t {
			best = max(best, 1+treeDepth(x, limit-1))
		}
		if len(t) == 0 {
			best = 1
		}
	case []any:
		for _, x := range t {
			best = max(best, 1+treeDepth(x, limit-1))
		}
		if len(t) == 0 {
			best = 1
		}
	}
	return best
}

// yamlBlockDepth is the block depth of the YAML line starting at i (a line
// outside any flow collection), given the indentations of the open block
// levels, which it updates: one level per indentation, and one more for
// each list item "- " that starts the line. A blank or comment line leaves
// the levels as they are and has depth 0.
func yamlBlockDepth(src []byte, i int, stack []int) ([]int, int) {
	j := i
	for j < len(src) && src[j] == ' ' {
		j++
	}
	if j >= len(src) || src[j] == '\n' || src[j] == '#' || src[j] == '\r' {
		return stack, 0
	}
	ind := j - i
	for len(stack) > 0 && stack[len(stack)-1] >= ind {
		stack = stack[:len(stack)-1]
	}
	stack = append(stack, ind)
	// a list item "- " opens one more level than its indentation shows
	extra := 0
	for k := j; k+1 < len(src) && src[k] == '-' && src[k+1] == ' '; k += 2 {
		extra++
		for k+2 < len(src) && src[k+2] == ' ' {
			k++
		}
	}
	return stack, len(stack) + extra
}

// skipQuoted skips the quoted string (TOML's triple-quoted ones included) whose
// opening quote is at i; it returns the index of its last byte and the
// number of line breaks inside it. An unclosed single-line string ends at
// its line's end (the parser reports it).
func skipQuoted(src []byte, i int, format string) (int, int) {
	c := src[i]
	lines := 0
	q := string(c)
	if format == "toml" && strings.HasPrefix(string(src[i:min(i+3, len(src))]), strings.Repeat(q, 3)) {
		q = strings.Repeat(q, 3)
	}
	j := i + len(q)
	for j < len(src) {
		if c == '"' && src[j] == '\\' {
			j += 2
			continue
		}
		if strings.HasPrefix(string(src[j:min(j+len(q), len(src))]), q) {
			break
		}
		if src[j] == '\n' {
			if len(q) == 1 && format != "yaml" {
				break // an unclosed string: the parser reports it
			}
			lines++
		}
		j++
	}
	return j + len(q) - 1, lines
}
