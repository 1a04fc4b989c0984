package output

import (
	"errors"
	"strings"
)

// commandArgs splits Meta.Command into arguments for the NetCDF history
// line, which cfwrite re-quotes. A line that does not split cleanly
// (unbalanced quotes) is kept as one argument, so nothing is lost. An empty
// command is recorded as "lidscope".
func commandArgs(line string) []string {
	if strings.TrimSpace(line) == "" {
		return []string{"lidscope"}
	}
	args, err := splitCommand(line)
	if err != nil || len(args) == 0 {
		return []string{line}
	}
	return args
}

var errQuote = errors.New("unbalanced quote or trailing backslash")

// splitCommand splits a command line into words the way a POSIX shell does
// for quoting (IEEE Std 1003.1-2017, Shell Command Language §2.2, from
// memory): blanks separate words; a backslash outside quotes keeps the next
// character; single quotes keep everything up to the next single quote;
// inside double quotes a backslash escapes only $ ` " \ and newline.
// Expansions, operators and comments are not interpreted.
func splitCommand(s string) ([]string, error) {
	var out []string
	var cur strings.Builder
	inWord := false
	for i := 0; i < len(s); i++ {
		ch := s[i]
		switch {
		case ch == ' ' || ch == '\t' || ch == '\n':
			if inWord {
				out = append(out, cur.String())
				cur.Reset()
				inWord = false
			}
		case ch == '\\':
			if i+1 >= len(s) {
				return nil, errQuote
			}
			i++
			if s[i] != '\n' {
				cur.WriteByte(s[i])
			}
			inWord = true
		case ch == '\'':
			j := strings.IndexByte(s[i+1:], '\'')
			if j < 0 {
				return nil, errQuote
			}
			cur.WriteString(s[i+1 : i+1+j])
			i += j + 1
			inWord = true
		case ch == '"':
			i++
			for ; i < len(s) && s[i] != '"'; i++ {
				if s[i] == '\\' && i+1 < len(s) && strings.IndexByte("$`\"\\\n", s[i+1]) >= 0 {
					i++
					if s[i] == '\n' {
						continue
					}
				}
				cur.WriteByte(s[i])
			}
			if i >= len(s) {
				return nil, errQuote
			}
			inWord = true
		default:
			cur.WriteByte(ch)
			inWord = true
		}
	}
	if inWord {
		out = append(out, cur.String())
	}
	return out, nil
}
