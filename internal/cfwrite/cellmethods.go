package cfwrite

import (
	"fmt"
	"strings"
)

// cellMethodNames are the methods of CF-1.10 Appendix E.
var cellMethodNames = map[string]bool{
	"point": true, "sum": true, "maximum": true, "maximum_absolute_value": true,
	"median": true, "mid_range": true, "minimum": true, "minimum_absolute_value": true,
	"mean": true, "mean_absolute_value": true, "mean_of_upper_decile": true,
	"mode": true, "range": true, "root_mean_square": true, "standard_deviation": true,
	"sum_of_squares": true, "variance": true,
}

// cellMethod is one entry of a cell_methods attribute.
type cellMethod struct {
	Names      []string // the names before the method, without colons
	Method     string
	Qualifiers []string // e.g. "where", "sea", "over", "years"
	Comment    string   // inside the parentheses, without them
	HasComment bool
}

// parseCellMethods parses a cell_methods attribute (CF-1.10 §7.3):
// a blank-separated list of entries "name: [name: ...] method [where type
// [over type]] [within|over interval] [(comment)]". Methods must be those of
// CF-1.10 Appendix E; names are checked for form only, since CF allows
// dimensions, scalar coordinates, standard names and "area".
func parseCellMethods(s string) ([]cellMethod, error) {
	toks, err := cellTokens(s)
	if err != nil {
		return nil, err
	}
	if len(toks) == 0 {
		return nil, fmt.Errorf("cell_methods %q is empty", s)
	}
	var out []cellMethod
	i := 0
	for i < len(toks) {
		var cm cellMethod
		for i < len(toks) && strings.HasSuffix(toks[i], ":") && !strings.HasPrefix(toks[i], "(") {
			name := strings.TrimSuffix(toks[i], ":")
			if err := checkName(name); err != nil {
				return nil, fmt.Errorf("cell_methods %q: name %q: %w", s, name, err)
			}
			cm.Names = append(cm.Names, name)
			i++
		}
		if len(cm.Names) == 0 {
			return nil, fmt.Errorf("cell_methods %q: expected \"name:\" at %q (entries are \"name: method\", CF-1.10 §7.3)", s, toks[i])
		}
		if i == len(toks) || strings.HasPrefix(toks[i], "(") {
			return nil, fmt.Errorf("cell_methods %q: no method after %q", s, strings.Join(cm.Names, ": ")+":")
		}
		m := toks[i]
		if !cellMethodNames[m] {
			return nil, fmt.Errorf("cell_methods %q: %q is not a CF cell method (CF-1.10 Appendix E: mean, sum, maximum, minimum, point, median, mode, range, mid_range, standard_deviation, variance, root_mean_square, sum_of_squares, ...)", s, m)
		}
		cm.Method = m
		i++
		for i+1 < len(toks) && (toks[i] == "where" || toks[i] == "over" || toks[i] == "within") {
			q, arg := toks[i], toks[i+1]
			if strings.HasSuffix(arg, ":") || strings.HasPrefix(arg, "(") {
				return nil, fmt.Errorf("cell_methods %q: %q must be followed by a word", s, q)
			}
			if err := checkName(arg); err != nil {
				return nil, fmt.Errorf("cell_methods %q: after %q: %w", s, q, err)
			}
			cm.Qualifiers = append(cm.Qualifiers, q, arg)
			i += 2
		}
		if i < len(toks) && strings.HasPrefix(toks[i], "(") {
			cm.Comment = strings.TrimSuffix(strings.TrimPrefix(toks[i], "("), ")")
			cm.HasComment = true
			i++
		}
		if i < len(toks) && !strings.HasSuffix(toks[i], ":") {
			return nil, fmt.Errorf("cell_methods %q: unexpected %q after method %q", s, toks[i], m)
		}
		out = append(out, cm)
	}
	return out, nil
}

// cellTokens splits on blanks, keeping each parenthesised comment as one
// token (with its parentheses).
func cellTokens(s string) ([]string, error) {
	var toks []string
	i := 0
	for i < len(s) {
		c := s[i]
		if c == ' ' || c == '\t' || c == '\n' {
			i++
			continue
		}
		if c == '(' {
			j := strings.IndexByte(s[i:], ')')
			if j < 0 {
				return nil, fmt.Errorf("cell_methods %q: unclosed '('", s)
			}
			if strings.ContainsRune(s[i+1:i+j], '(') {
				return nil, fmt.Errorf("cell_methods %q: nested '(' in a comment", s)
			}
			toks = append(toks, s[i:i+j+1])
			i += j + 1
			continue
		}
		if c == ')' {
			return nil, fmt.Errorf("cell_methods %q: ')' without '('", s)
		}
		j := i
		for j < len(s) && s[j] != ' ' && s[j] != '\t' && s[j] != '\n' && s[j] != '(' && s[j] != ')' {
			j++
		}
		toks = append(toks, s[i:j])
		i = j
	}
	return toks, nil
}

// formatCellMethods writes entries back in canonical spacing.
func formatCellMethods(cms []cellMethod) string {
	var parts []string
	for _, cm := range cms {
		for _, n := range cm.Names {
			parts = append(parts, n+":")
		}
		parts = append(parts, cm.Method)
		parts = append(parts, cm.Qualifiers...)
		if cm.HasComment {
			parts = append(parts, "("+cm.Comment+")")
		}
	}
	return strings.Join(parts, " ")
}
