package figures

import (
	"io"
	"path/filepath"
	"testing"

	"lidscope/internal/figurestest"
)

// benchRun writes an invented global 1° run (180 × 360 cells, 12 months).
func benchRun(b *testing.B) *Run {
	b.Helper()
	dir := filepath.Join(b.TempDir(), "run")
	if _, err := figurestest.Write(dir, figurestest.Spec{DLat: 1, DLon: 1, South: -90, North: 90, Steps: 12}); err != nil {
		b.Fatal(err)
	}
	r, err := Load(dir)
	if err != nil {
		b.Fatal(err)
	}
	return r
}

// BenchmarkMap1Degree draws the mean-EIS map of a global 1° grid: reading
// maps.nc, the raster, coastlines and encoding, per format.
func BenchmarkMap1Degree(b *testing.B) {
	run := benchRun(b)
	var spec mapSpec
	for _, m := range mapSpecs {
		if m.name == "map_eis" {
			spec = m
		}
	}
	for _, format := range []string{"png", "svg", "pdf"} {
		b.Run(format, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				fg := &fig{run: run, name: spec.name, format: format, dpi: 200, pdf: format == "pdf"}
				pg, err := fg.mapPage(spec)
				if err != nil {
					b.Fatal(err)
				}
				if err := fg.render(pg, io.Discard); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkRaster1Degree is the raster alone: a 1° field onto a
// 1225 × 612 pixel image (the data area of a 200 dpi global map).
func BenchmarkRaster1Degree(b *testing.B) {
	run := benchRun(b)
	fl, err := run.QuantityMean("eis")
	if err != nil {
		b.Fatal(err)
	}
	fg := &fig{run: run}
	rs := &raster{field: fl, factor: 1, scale: fg.scale("eis", -10, 10)}
	b.ReportAllocs()
	for b.Loop() {
		rs.image(-180, 180, -90, 90, 1225, 612)
	}
}
