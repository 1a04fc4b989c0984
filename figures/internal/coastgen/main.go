// Command coastgen derives lidscope's compact coastline
// (figures/internal/coast/coast110.bin) from the Natural Earth 1:110m land
// polygons as TopoJSON, the file land-110m.json of the world-atlas package
// (version 2.0.2, ISC licence; Natural Earth 4.1.0, public domain):
//
//	cd "$(mktemp -d)" && npm pack world-atlas@2.0.2 && tar xzf world-atlas-2.0.2.tgz
//	go run ./figures/internal/coastgen -in "$OLDPWD/package/land-110m.json" \
//	    -out figures/internal/coast/coast110.bin
//
// It decodes the quantised, delta-encoded arcs of the "land" object
// (TopoJSON specification §2.1.3–2.1.5: position = delta-summed integers ×
// scale + translate), keeps every arc once, drops the edges that are not
// coast (the cuts along the antimeridian) and writes the rest with coast.Encode (0.01°
// resolution).
package main

import (
	"encoding/json"
	"flag"
	"fmt"
	"math"
	"os"
	"sort"

	"lidscope/figures/internal/coast"
)

func main() {
	in := flag.String("in", "", "TopoJSON file (world-atlas land-110m.json)")
	out := flag.String("out", "", "output file (coast110.bin)")
	object := flag.String("object", "land", "TopoJSON object holding the land polygons")
	flag.Parse()
	if *in == "" || *out == "" {
		fmt.Fprintln(os.Stderr, "usage: coastgen -in land-110m.json -out coast110.bin")
		os.Exit(2)
	}
	b, err := os.ReadFile(*in)
	if err != nil {
		fmt.Fprintln(os.Stderr, "coastgen:", err)
		os.Exit(1)
	}
	lines, err := convert(b, *object)
	if err != nil {
		fmt.Fprintf(os.Stderr, "coastgen: %s: %v\n", *in, err)
		os.Exit(1)
	}
	enc := coast.Encode(lines)
	if err := os.WriteFile(*out, enc, 0o644); err != nil {
		fmt.Fprintln(os.Stderr, "coastgen:", err)
		os.Exit(1)
	}
	n := 0
	for _, l := range lines {
		n += len(l)
	}
	fmt.Printf("coastgen: %d lines, %d points, %d bytes written to %s\n", len(lines), n, len(enc), *out)
}

type topology struct {
	Type      string                     `json:"type"`
	Objects   map[string]json.RawMessage `json:"objects"`
	Arcs      [][][]float64              `json:"arcs"`
	Transform *struct {
		Scale     [2]float64 `json:"scale"`
		Translate [2]float64 `json:"translate"`
	} `json:"transform"`
}

type geometry struct {
	Type       string          `json:"type"`
	Arcs       json.RawMessage `json:"arcs"`
	Geometries []geometry      `json:"geometries"`
}

// convert returns the coastline polylines of a TopoJSON topology's object.
func convert(b []byte, object string) ([][]coast.Point, error) {
	var topo topology
	if err := json.Unmarshal(b, &topo); err != nil {
		return nil, fmt.Errorf("not JSON TopoJSON: %w", err)
	}
	if topo.Type != "Topology" {
		return nil, fmt.Errorf("type is %q, want \"Topology\"", topo.Type)
	}
	raw, ok := topo.Objects[object]
	if !ok {
		return nil, fmt.Errorf("no object %q (use -object)", object)
	}
	var g geometry
	if err := json.Unmarshal(raw, &g); err != nil {
		return nil, fmt.Errorf("object %q: %w", object, err)
	}
	used := map[int]bool{}
	if err := collectArcs(g, used); err != nil {
		return nil, fmt.Errorf("object %q: %w", object, err)
	}
	idx := make([]int, 0, len(used))
	for i := range used {
		if i < 0 || i >= len(topo.Arcs) {
			return nil, fmt.Errorf("object %q refers to arc %d of %d", object, i, len(topo.Arcs))
		}
		idx = append(idx, i)
	}
	sort.Ints(idx)
	var out [][]coast.Point
	for _, i := range idx {
		pts := decodeArc(topo.Arcs[i], topo.Transform)
		out = append(out, dropCuts(pts)...)
	}
	return out, nil
}

// collectArcs records the arc indices of polygons and multipolygons; a
// negative index ~i means arc i reversed (TopoJSON §2.2.2).
func collectArcs(g geometry, used map[int]bool) error {
	add := func(rings [][]int) {
		for _, r := range rings {
			for _, a := range r {
				if a < 0 {
					a = ^a
				}
				used[a] = true
			}
		}
	}
	switch g.Type {
	case "GeometryCollection":
		for _, c := range g.Geometries {
			if err := collectArcs(c, used); err != nil {
				return err
			}
		}
	case "Polygon":
		var rings [][]int
		if err := json.Unmarshal(g.Arcs, &rings); err != nil {
			return fmt.Errorf("polygon arcs: %w", err)
		}
		add(rings)
	case "MultiPolygon":
		var polys [][][]int
		if err := json.Unmarshal(g.Arcs, &polys); err != nil {
			return fmt.Errorf("multipolygon arcs: %w", err)
		}
		for _, p := range polys {
			add(p)
		}
	case "", "null":
	default:
		return fmt.Errorf("geometry type %q is not a polygon", g.Type)
	}
	return nil
}

// decodeArc turns a quantised, delta-encoded arc into degrees (TopoJSON
// §2.1.5); without a transform positions are absolute.
func decodeArc(arc [][]float64, tr *struct {
	Scale     [2]float64 `json:"scale"`
	Translate [2]float64 `json:"translate"`
}) []coast.Point {
	pts := make([]coast.Point, 0, len(arc))
	var x, y float64
	for _, p := range arc {
		if len(p) < 2 {
			continue
		}
		if tr == nil {
			pts = append(pts, coast.Point{Lon: p[0], Lat: p[1]})
			continue
		}
		x += p[0]
		y += p[1]
		pts = append(pts, coast.Point{Lon: x*tr.Scale[0] + tr.Translate[0], Lat: y*tr.Scale[1] + tr.Translate[1]})
	}
	return pts
}

// cut reports whether the segment a→b is an edge of the data rather than a
// coast: along the antimeridian, where Natural Earth cuts the polygons that
// cross it (both ends within 0.01° of the same ±180°). The Antarctic
// polygon has no edge along a parallel: its southernmost points (85.6°S)
// are on the grounding line of the Ross Ice Shelf, which is kept.
func cut(a, b coast.Point) bool {
	const tol = 0.01
	return math.Abs(math.Abs(a.Lon)-180) < tol && math.Abs(math.Abs(b.Lon)-180) < tol && (a.Lon > 0) == (b.Lon > 0)
}

// dropCuts splits a line where it runs along a cut.
func dropCuts(pts []coast.Point) [][]coast.Point {
	var out [][]coast.Point
	var cur []coast.Point
	for i, p := range pts {
		if i > 0 && cut(pts[i-1], p) {
			if len(cur) >= 2 {
				out = append(out, cur)
			}
			cur = nil
		}
		cur = append(cur, p)
	}
	if len(cur) >= 2 {
		out = append(out, cur)
	}
	return out
}
