package cfwrite_test

import (
	"math"
	"os"
	"path/filepath"
	"testing"

	"lidscope/internal/cfwrite"
)

// benchMaps writes b.N one-degree global maps (180×360, float32) into one
// file, one WriteStep per step; SetBytes counts the float32 bytes stored.
func benchMaps(b *testing.B, level int) {
	lat := make([]float64, 180)
	lon := make([]float64, 360)
	for i := range lat {
		lat[i] = -89.5 + float64(i)
	}
	for i := range lon {
		lon[i] = 0.5 + float64(i)
	}
	slab := make([]float64, len(lat)*len(lon))
	for i := range slab {
		// Smooth synthetic field with 20 % missing, like an ocean mask.
		if i%5 == 0 {
			slab[i] = math.NaN()
		} else {
			slab[i] = 290 + 10*math.Sin(float64(i)/700)
		}
	}
	opts := fixOptions()
	opts.DeflateLevel = level
	w, err := cfwrite.Create(filepath.Join(b.TempDir(), "bench.nc"), opts)
	must(b, err)
	defer w.Abort()
	must(b, w.SetGrid(cfwrite.Grid{Lat: lat, Lon: lon}))
	must(b, w.SetTime(cfwrite.TimeAxis{Units: "days since 1979-01-01", Calendar: "standard"}))
	v, err := w.AddVar(cfwrite.VarSpec{Name: "sst", Dims: []string{"time", "lat", "lon"}, Units: "K", LongName: "sst"})
	must(b, err)
	b.SetBytes(int64(4 * len(slab)))
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		step, err := w.AppendTime(float64(i))
		if err != nil {
			b.Fatal(err)
		}
		if err := v.WriteStep(step, slab); err != nil {
			b.Fatal(err)
		}
	}
	must(b, w.Close())
}

func BenchmarkWriteStepDeflate4(b *testing.B) { benchMaps(b, 0) }
func BenchmarkWriteStepDeflate1(b *testing.B) { benchMaps(b, 1) }
func BenchmarkWriteStepNoDeflate(b *testing.B) {
	benchMaps(b, cfwrite.NoDeflate)
}

// BenchmarkCreateClose measures the fixed cost of a small complete file
// (the map fixture: create, declare, two steps, close with fsync).
func BenchmarkCreateClose(b *testing.B) {
	dir := b.TempDir()
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		p := filepath.Join(dir, "f.nc")
		writeMaps(b, p, "standard")
		b.StopTimer()
		must(b, os.Remove(p))
		b.StartTimer()
	}
}
