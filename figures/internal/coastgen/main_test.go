package main

import (
	"math"
	"testing"

	"lidscope/figures/internal/coast"
)

// A hand-made topology in the TopoJSON specification's quantised form
// (§2.1.5: positions are the running sums of the integer pairs, times scale,
// plus translate). Arc 0 is a coast ending in a cut along +180°; arc 1 is
// shared by two polygons (kept once) and is used reversed (~1 = -2).
const topo = `{"type":"Topology",
 "transform":{"scale":[0.5,0.25],"translate":[170,-10]},
 "arcs":[
  [[0,0],[10,0],[10,4],[0,4]],
  [[0,40],[2,0],[0,2]]
 ],
 "objects":{"land":{"type":"GeometryCollection","geometries":[
  {"type":"Polygon","arcs":[[0]]},
  {"type":"MultiPolygon","arcs":[[[1]],[[-2]]]}
 ]}}}`

func TestConvert(t *testing.T) {
	got, err := convert([]byte(topo), "land")
	if err != nil {
		t.Fatal(err)
	}
	// Arc 0 sums to (0,0) (10,0) (20,4) (20,8) and decodes to (170,−10)
	// (175,−10) (180,−9) (180,−8): the last segment runs along +180° and is
	// dropped. Arc 1 sums to (0,40) (2,40) (2,42): (170,0) (171,0)
	// (171,0.5).
	want := [][]coast.Point{
		{{Lon: 170, Lat: -10}, {Lon: 175, Lat: -10}, {Lon: 180, Lat: -9}},
		{{Lon: 170, Lat: 0}, {Lon: 171, Lat: 0}, {Lon: 171, Lat: 0.5}},
	}
	if len(got) != len(want) {
		t.Fatalf("got %d lines %v, want %d", len(got), got, len(want))
	}
	for i := range want {
		if len(got[i]) != len(want[i]) {
			t.Fatalf("line %d: %v, want %v", i, got[i], want[i])
		}
		for k := range want[i] {
			if math.Abs(got[i][k].Lon-want[i][k].Lon) > 1e-12 || math.Abs(got[i][k].Lat-want[i][k].Lat) > 1e-12 {
				t.Errorf("line %d point %d: %v, want %v", i, k, got[i][k], want[i][k])
			}
		}
	}
	for _, bad := range []string{`{}`, `nope`, `{"type":"Topology","objects":{}}`,
		`{"type":"Topology","arcs":[],"objects":{"land":{"type":"Polygon","arcs":[[5]]}}}`,
		`{"type":"Topology","arcs":[],"objects":{"land":{"type":"LineString","arcs":[0]}}}`} {
		if _, err := convert([]byte(bad), "land"); err == nil {
			t.Errorf("convert(%s) accepted bad input", bad)
		}
	}
}
