// Package coast holds a compact world coastline (Natural Earth 1:110m land,
// public domain, via the world-atlas package; see the NOTICE file at the
// top of the repository) and puts it on equirectangular maps: longitudes
// wrapped into the map's window, lines split where they cross the window's
// seam, and clipped to the map's box.
//
// The embedded file coast110.bin is written by figures/internal/coastgen;
// its format (all integers little-endian varints as in encoding/binary):
//
//	magic "LSCL", version byte 1
//	uvarint number of lines
//	per line: uvarint number of points n ≥ 2, then n pairs (lon, lat) in
//	hundredths of a degree, the first absolute and each next one the
//	difference to the previous point, zig-zag signed varints.
package coast

import (
	_ "embed"
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"sync"
)

// Point is a position in degrees east and north.
type Point struct{ Lon, Lat float64 }

//go:embed coast110.bin
var embedded []byte

var (
	once  sync.Once
	lines [][]Point
	lerr  error
)

// Lines returns the embedded coastline, longitudes in −180…180. The result
// is shared: do not modify it.
func Lines() ([][]Point, error) {
	once.Do(func() { lines, lerr = Decode(embedded) })
	return lines, lerr
}

const (
	magic   = "LSCL"
	version = 1
	scale   = 100 // units per degree
)

// Encode writes lines in the compact format, positions rounded to 0.01°.
// Consecutive points that round to the same position are merged and lines
// left with fewer than two points are dropped.
func Encode(ls [][]Point) []byte {
	type q struct{ x, y int64 }
	var kept [][]q
	for _, l := range ls {
		var ql []q
		for _, p := range l {
			c := q{int64(math.Round(p.Lon * scale)), int64(math.Round(p.Lat * scale))}
			if len(ql) > 0 && ql[len(ql)-1] == c {
				continue
			}
			ql = append(ql, c)
		}
		if len(ql) >= 2 {
			kept = append(kept, ql)
		}
	}
	b := append([]byte(magic), version)
	b = binary.AppendUvarint(b, uint64(len(kept)))
	for _, l := range kept {
		b = binary.AppendUvarint(b, uint64(len(l)))
		var px, py int64
		for _, c := range l {
			b = binary.AppendVarint(b, c.x-px)
			b = binary.AppendVarint(b, c.y-py)
			px, py = c.x, c.y
		}
	}
	return b
}

// ErrFormat marks data that is not a coastline file of this format.
var ErrFormat = errors.New("not a lidscope coastline file")

// Decode reads the compact format. It rejects truncated or corrupt data
// and positions outside −180…180 °E, −90…90 °N.
func Decode(b []byte) ([][]Point, error) {
	if len(b) < len(magic)+1 || string(b[:len(magic)]) != magic {
		return nil, fmt.Errorf("coast: %w (missing magic %q)", ErrFormat, magic)
	}
	if b[len(magic)] != version {
		return nil, fmt.Errorf("coast: %w (version %d, this program reads %d)", ErrFormat, b[len(magic)], version)
	}
	b = b[len(magic)+1:]
	uv := func(what string) (uint64, error) {
		v, n := binary.Uvarint(b)
		if n <= 0 {
			return 0, fmt.Errorf("coast: %w (truncated %s)", ErrFormat, what)
		}
		b = b[n:]
		return v, nil
	}
	sv := func(what string) (int64, error) {
		v, n := binary.Varint(b)
		if n <= 0 {
			return 0, fmt.Errorf("coast: %w (truncated %s)", ErrFormat, what)
		}
		b = b[n:]
		return v, nil
	}
	nl, err := uv("line count")
	if err != nil {
		return nil, err
	}
	if nl > uint64(len(b)) { // every line takes at least one byte
		return nil, fmt.Errorf("coast: %w (%d lines in %d bytes)", ErrFormat, nl, len(b))
	}
	out := make([][]Point, 0, nl)
	for i := uint64(0); i < nl; i++ {
		np, err := uv("point count")
		if err != nil {
			return nil, err
		}
		if np < 2 || np > uint64(len(b))/2 {
			return nil, fmt.Errorf("coast: %w (line %d: %d points in %d bytes)", ErrFormat, i, np, len(b))
		}
		l := make([]Point, np)
		var x, y int64
		for k := range l {
			dx, err := sv("longitude")
			if err != nil {
				return nil, err
			}
			dy, err := sv("latitude")
			if err != nil {
				return nil, err
			}
			x, y = x+dx, y+dy
			if x < -180*scale || x > 180*scale || y < -90*scale || y > 90*scale {
				return nil, fmt.Errorf("coast: %w (line %d point %d at %g°E %g°N is off the globe)", ErrFormat, i, k, float64(x)/scale, float64(y)/scale)
			}
			l[k] = Point{float64(x) / scale, float64(y) / scale}
		}
		out = append(out, l)
	}
	if len(b) != 0 {
		return nil, fmt.Errorf("coast: %w (%d bytes after the last line)", ErrFormat, len(b))
	}
	return out, nil
}

// Box is a map's extent: longitudes West…East (East − West ≤ 360, East >
// West; e.g. −180…180 or 0…360 or 100…300) and latitudes South…North.
type Box struct{ West, East, South, North float64 }

// Project puts lines on a map of the box: each line's longitudes are
// carried continuously from its first point, which is wrapped into
// West…West+360; where the line leaves that window it is split, the piece
// ending on the seam and the next piece starting on the opposite edge.
// The pieces are then clipped to the box; a piece that leaves the box and
// comes back becomes two.
func Project(ls [][]Point, box Box) [][]Point {
	var out [][]Point
	for _, l := range ls {
		for _, piece := range wrapSplit(l, box.West) {
			out = append(out, clip(piece, box)...)
		}
	}
	return out
}

// wrap returns lon moved by whole turns into [west, west+360).
func wrap(lon, west float64) float64 {
	return west + math.Mod(math.Mod(lon-west, 360)+360, 360)
}

// wrapSplit unwraps a line into the window [west, west+360], splitting it
// at the window's edges.
func wrapSplit(l []Point, west float64) [][]Point {
	if len(l) == 0 {
		return nil
	}
	east := west + 360
	x := wrap(l[0].Lon, west)
	cur := []Point{{x, l[0].Lat}}
	var out [][]Point
	for i := 1; i < len(l); i++ {
		d := l[i].Lon - l[i-1].Lon
		d -= 360 * math.Round(d/360) // shortest way round
		nx := x + d
		y0, y1 := l[i-1].Lat, l[i].Lat
		switch {
		case nx > east:
			f := (east - x) / d
			yc := y0 + f*(y1-y0)
			cur = append(cur, Point{east, yc})
			out = append(out, cur)
			cur = []Point{{west, yc}}
			nx -= 360
		case nx < west:
			f := (west - x) / d
			yc := y0 + f*(y1-y0)
			cur = append(cur, Point{west, yc})
			out = append(out, cur)
			cur = []Point{{east, yc}}
			nx += 360
		}
		cur = append(cur, Point{nx, y1})
		x = nx
	}
	out = append(out, cur)
	var kept [][]Point
	for _, p := range out {
		if len(p) >= 2 {
			kept = append(kept, p)
		}
	}
	return kept
}

// clip cuts a line to the box (Liang & Barsky 1984, Comm. ACM 27, per
// segment), returning the pieces inside.
func clip(l []Point, b Box) [][]Point {
	var out [][]Point
	var cur []Point
	flush := func() {
		if len(cur) >= 2 {
			out = append(out, cur)
		}
		cur = nil
	}
	for i := 1; i < len(l); i++ {
		p, q := l[i-1], l[i]
		t0, t1, ok := clipSegment(p, q, b)
		if !ok {
			flush()
			continue
		}
		a := Point{p.Lon + t0*(q.Lon-p.Lon), p.Lat + t0*(q.Lat-p.Lat)}
		e := Point{p.Lon + t1*(q.Lon-p.Lon), p.Lat + t1*(q.Lat-p.Lat)}
		if t0 > 0 || len(cur) == 0 {
			flush()
			cur = append(cur, a)
		}
		cur = append(cur, e)
		if t1 < 1 {
			flush()
		}
	}
	flush()
	return out
}

// clipSegment returns the parameter range [t0, t1] of the segment p→q
// inside the box, and false when no part of it is inside.
func clipSegment(p, q Point, b Box) (t0, t1 float64, ok bool) {
	t0, t1 = 0, 1
	dx, dy := q.Lon-p.Lon, q.Lat-p.Lat
	for _, e := range [4][2]float64{
		{-dx, p.Lon - b.West}, {dx, b.East - p.Lon},
		{-dy, p.Lat - b.South}, {dy, b.North - p.Lat},
	} {
		pp, qq := e[0], e[1]
		if pp == 0 {
			if qq < 0 {
				return 0, 0, false
			}
			continue
		}
		r := qq / pp
		if pp < 0 {
			if r > t1 {
				return 0, 0, false
			}
			t0 = math.Max(t0, r)
		} else {
			if r < t0 {
				return 0, 0, false
			}
			t1 = math.Min(t1, r)
		}
	}
	return t0, t1, true
}
