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
	depth, line := 0, 1
	var stack []int // YAML: the indentation of each open block level
	lineStart := true
	keyDots := 0 // TOML: dots in the key being read
	inHeader := false
	fail := func(d int) error {
		return fmt.Errorf("study %s, line %d: tables and lists nest %d levels deep here, more than the %d lidscope reads (a study needs about 5); check the brackets, braces%s", path, line, d, MaxDepth, map[bool]string{true: " and indentation", false: " and dotted keys"}[format == "yaml"])
	}
	for i := 0; i < len(src); i++ {
		c := src[i]
		if lineStart && format == "yaml" {
			// indentation of a block line that holds something
			j := i
			for j < len(src) && src[j] == ' ' {
				j++
			}
			if j < len(src) && src[j] != '\n' && src[j] != '#' && src[j] != '\r' && depth == 0 {
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
				if d := len(stack) + extra; d > MaxDepth {
					return fail(d)
				}
			}
		}
		lineStart = false
		switch {
		case c == '\n':
			line++
			lineStart = true
			keyDots = 0
			inHeader = false
		case c == '#':
			for i+1 < len(src) && src[i+1] != '\n' {
				i++
			}
		case (c == '"' || c == '\'') && (format != "yaml" || i == 0 || strings.IndexByte(" \t\n[{,:-", src[i-1]) >= 0):
			// a quoted string (TOML ''' and """ included): skip to its end
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
					line++
				}
				j++
			}
			i = j + len(q) - 1
		case c == '[' || c == '{':
			if format == "toml" && c == '[' && depth == 0 && lineIsHeader(src, i) {
				inHeader = true
				keyDots = 0
				if i+1 < len(src) && src[i+1] == '[' {
					i++ // [[array of tables]]
				}
				continue
			}
			depth++
			keyDots = 0
			if depth+len(stack) > MaxDepth {
				return fail(depth + len(stack))
			}
		case c == ']' || c == '}':
			if inHeader {
				inHeader = false
				if i+1 < len(src) && src[i+1] == ']' {
					i++
				}
				continue
			}
			if depth > 0 {
				depth--
			}
		case c == ',':
			keyDots = 0
		case c == '.' && format == "toml":
			keyDots++
		case c == '=' && format == "toml":
			if depth+keyDots+1 > MaxDepth {
				return fail(depth + keyDots + 1)
			}
			keyDots = 0
		}
		if inHeader && keyDots+1 > MaxDepth {
			return fail(keyDots + 1)
		}
	}
	return nil
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
