package config

import (
	"bytes"
	"encoding/json"
	"regexp"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"
)

// lineIndex maps dotted key paths (lower case, list elements numbered from
// 0) to the line where the key or element starts, so that problems can
// name a line. It is best effort: a path it does not know falls back to
// its nearest known parent. upper lists keys written with capitals (the
// loader folds case, the study format wants lower case).
type lineIndex struct {
	lines map[string]int
	upper map[string]string // path → key as written
}

func join(path, k string) string {
	if path == "" {
		return k
	}
	return path + "." + k
}

// line returns the line of path or of its nearest known parent (0 if none).
func (ix *lineIndex) line(path string) int {
	for path != "" {
		if n, ok := ix.lines[path]; ok {
			return n
		}
		i := strings.LastIndexByte(path, '.')
		if i < 0 {
			break
		}
		path = path[:i]
	}
	return 0
}

func newIndex() *lineIndex {
	return &lineIndex{lines: map[string]int{}, upper: map[string]string{}}
}

func (ix *lineIndex) add(path, written string, line int) {
	if _, ok := ix.lines[path]; !ok {
		ix.lines[path] = line
	}
	if i := strings.LastIndexByte(written, '.'); i >= 0 {
		written = written[i+1:]
	}
	if written != strings.ToLower(written) {
		ix.upper[path] = written
	}
}

// indexLines builds the line index for src in format (yaml, json, toml).
// It never fails: text it cannot follow simply gives fewer lines.
func indexLines(format string, src []byte) *lineIndex {
	ix := newIndex()
	switch format {
	case "yaml":
		var doc yaml.Node
		if yaml.Unmarshal(src, &doc) == nil {
			ix.yamlNode(&doc, "", 0)
		}
	case "json":
		ix.json(src)
	case "toml":
		ix.toml(src)
	}
	return ix
}

func (ix *lineIndex) yamlNode(n *yaml.Node, path string, depth int) {
	if depth > 64 {
		return
	}
	switch n.Kind {
	case yaml.DocumentNode:
		for _, c := range n.Content {
			ix.yamlNode(c, path, depth+1)
		}
	case yaml.MappingNode:
		for i := 0; i+1 < len(n.Content); i += 2 {
			k, v := n.Content[i], n.Content[i+1]
			p := join(path, strings.ToLower(k.Value))
			ix.add(p, k.Value, k.Line)
			ix.yamlNode(v, p, depth+1)
		}
	case yaml.SequenceNode:
		for i, c := range n.Content {
			p := join(path, strconv.Itoa(i))
			ix.add(p, "", c.Line)
			ix.yamlNode(c, p, depth+1)
		}
	}
}

func lineAt(src []byte, off int64) int {
	if off > int64(len(src)) {
		off = int64(len(src))
	}
	if off < 0 {
		off = 0
	}
	return bytes.Count(src[:off], []byte{'\n'}) + 1
}

func (ix *lineIndex) json(src []byte) {
	dec := json.NewDecoder(bytes.NewReader(src))
	var walk func(path string, depth int) bool
	walk = func(path string, depth int) bool {
		if depth > 64 {
			return false
		}
		tok, err := dec.Token()
		if err != nil {
			return false
		}
		d, ok := tok.(json.Delim)
		if !ok {
			return true
		}
		switch d {
		case '{':
			for dec.More() {
				kt, err := dec.Token()
				if err != nil {
					return false
				}
				k, _ := kt.(string)
				p := join(path, strings.ToLower(k))
				ix.add(p, k, lineAt(src, dec.InputOffset()))
				if !walk(p, depth+1) {
					return false
				}
			}
		case '[':
			for i := 0; dec.More(); i++ {
				off := dec.InputOffset()
				for off < int64(len(src)) && strings.IndexByte(" \t\r\n,[", src[off]) >= 0 {
					off++
				}
				p := join(path, strconv.Itoa(i))
				ix.add(p, "", lineAt(src, off+1))
				if !walk(p, depth+1) {
					return false
				}
			}
		}
		_, err = dec.Token() // closing delimiter
		return err == nil
	}
	walk("", 0)
}

var (
	tomlArrayTable = regexp.MustCompile(`^\s*\[\[\s*([^\]]+?)\s*\]\]`)
	tomlTable      = regexp.MustCompile(`^\s*\[\s*([^\]]+?)\s*\]`)
	tomlKey        = regexp.MustCompile(`^\s*([A-Za-z0-9_."-]+?)\s*=`)
	tomlInlineKey  = regexp.MustCompile(`[{,]\s*([A-Za-z0-9_-]+)\s*=`)
)

// toml follows table headers, arrays of tables and "key =" lines, which is
// how studies are written; keys inside inline tables get the line of the
// table. Multi-line strings and arrays are not followed.
func (ix *lineIndex) toml(src []byte) {
	counts := map[string]int{} // array-of-tables path → elements so far
	// resolve turns a header's dotted name into a path, numbering each
	// array of tables by its latest element.
	resolve := func(name string) string {
		path := ""
		for _, part := range strings.Split(name, ".") {
			part = strings.ToLower(strings.Trim(strings.TrimSpace(part), `"'`))
			path = join(path, part)
			if n, ok := counts[path]; ok {
				path = join(path, strconv.Itoa(n-1))
			}
		}
		return path
	}
	cur := ""
	for i, raw := range strings.Split(string(src), "\n") {
		line := i + 1
		if m := tomlArrayTable.FindStringSubmatch(raw); m != nil {
			parent := resolve(m[1])
			// resolve numbered the array with its previous element; undo that
			if j := strings.LastIndexByte(parent, '.'); j >= 0 {
				if _, err := strconv.Atoi(parent[j+1:]); err == nil {
					if _, ok := counts[parent[:j]]; ok {
						parent = parent[:j]
					}
				}
			}
			n := counts[parent]
			counts[parent] = n + 1
			cur = join(parent, strconv.Itoa(n))
			ix.add(parent, m[1], line)
			ix.add(cur, "", line)
			continue
		}
		if m := tomlTable.FindStringSubmatch(raw); m != nil {
			cur = resolve(m[1])
			ix.add(cur, m[1], line)
			continue
		}
		if m := tomlKey.FindStringSubmatch(raw); m != nil {
			p := cur
			for _, part := range strings.Split(m[1], ".") {
				w := strings.Trim(part, `"'`)
				p = join(p, strings.ToLower(w))
				ix.add(p, w, line)
			}
			for _, im := range tomlInlineKey.FindAllStringSubmatch(raw, -1) {
				ix.add(join(p, strings.ToLower(im[1])), im[1], line)
			}
		}
	}
}
