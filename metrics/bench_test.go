package metrics

import (
	"math/rand/v2"
	"runtime"
	"syscall"
	"testing"
	"time"
)

// threadCPU returns the CPU time used by the calling OS thread (Linux
// RUSAGE_THREAD). Benchmarks report columns per CPU-second as well as per
// wall-second, because on a shared 2-core machine wall time includes time
// the benchmark spent descheduled.
func threadCPU() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(1 /* RUSAGE_THREAD */, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// benchSlab is a synthetic slab (invented values for benchmarking only):
// SST 285–305 K, T700 270–290 K, and, where used, surface pressure
// 990–1030 hPa and RH 0.6–0.95.
func benchSlab(n int) SlabInput {
	rng := rand.New(rand.NewPCG(1, 2))
	in := SlabInput{Ts: make([]float32, n), T700: make([]float32, n)}
	for i := range n {
		in.Ts[i] = float32(285 + 20*rng.Float64())
		in.T700[i] = float32(270 + 20*rng.Float64())
	}
	return in
}

func benchFields(in *SlabInput) {
	n := len(in.Ts)
	rng := rand.New(rand.NewPCG(3, 4))
	in.Ps = make([]float32, n)
	in.Humidity = make([]float32, n)
	for i := range n {
		in.Ps[i] = float32(99000 + 4000*rng.Float64())
		in.Humidity[i] = float32(0.6 + 0.35*rng.Float64())
	}
}

const benchN = 1 << 16 // one 256 x 256 slab

func runSlabBench(b *testing.B, r Conventions, in SlabInput, out SlabOutput) {
	k, err := NewKernel(r)
	if err != nil {
		b.Fatal(err)
	}
	runBench(b, len(in.Ts), func() error { _, err := k.Slab(in, out); return err })
}

// runBench runs one slab computation per iteration and reports columns per
// wall-second and per CPU-second of the benchmark's thread.
func runBench(b *testing.B, columns int, slab func() error) {
	runtime.LockOSThread()
	defer runtime.UnlockOSThread()
	b.ReportAllocs()
	b.ResetTimer()
	c0 := threadCPU()
	for b.Loop() {
		if err := slab(); err != nil {
			b.Fatal(err)
		}
	}
	cpu := threadCPU() - c0
	cols := float64(b.N) * float64(columns)
	b.ReportMetric(cols/b.Elapsed().Seconds()/1e6, "Mcolumns/s")
	if cpu > 0 {
		b.ReportMetric(cols/cpu.Seconds()/1e6, "Mcolumns/cpu-s")
	}
}

// BenchmarkSlabLTSEIS is the headline figure: LTS + EIS with the default
// conventions (Romps LCL, Murphy & Koop, constant 1000 hPa and RH 0.8).
func BenchmarkSlabLTSEIS(b *testing.B) {
	in := benchSlab(benchN)
	out := SlabOutput{LTS: make([]float32, benchN), EIS: make([]float32, benchN)}
	runSlabBench(b, DefaultConventions(), in, out)
}

// BenchmarkSlabLTSEISFields uses surface-pressure and RH fields.
func BenchmarkSlabLTSEISFields(b *testing.B) {
	in := benchSlab(benchN)
	benchFields(&in)
	r := DefaultConventions()
	r.PressureField = true
	r.Humidity = HumidityRH
	out := SlabOutput{LTS: make([]float32, benchN), EIS: make([]float32, benchN)}
	runSlabBench(b, r, in, out)
}

// BenchmarkSlabLTS computes LTS only.
func BenchmarkSlabLTS(b *testing.B) {
	in := benchSlab(benchN)
	out := SlabOutput{LTS: make([]float32, benchN)}
	runSlabBench(b, DefaultConventions(), in, out)
}

// BenchmarkSlabAll64 writes every output as float64, with ECTEI.
func BenchmarkSlabAll64(b *testing.B) {
	in := benchSlab(benchN)
	in.Q700 = make([]float32, benchN)
	for i := range in.Q700 {
		in.Q700[i] = 0.004
	}
	r := DefaultConventions()
	r.ECTEI = true
	k, err := NewKernel(r)
	if err != nil {
		b.Fatal(err)
	}
	out := SlabOutput64{LTS: make([]float64, benchN), EIS: make([]float64, benchN), ECTEI: make([]float64, benchN), LCL: make([]float64, benchN), Z700: make([]float64, benchN)}
	runBench(b, benchN, func() error { _, err := k.Slab64(in, out); return err })
}

// BenchmarkRompsLCL compares the published Lambert-W form with the kernel's
// log-space form, per call.
func BenchmarkRompsLCL(b *testing.B) {
	b.Run("published", func(b *testing.B) {
		s := 0.0
		T := 290.0
		for b.Loop() {
			s += RompsLCL(T, 1e5, 0.8)
			T += 1e-9
		}
		sink = s
	})
	b.Run("kernel", func(b *testing.B) {
		s := 0.0
		T := 290.0
		for b.Loop() {
			s += rompsLCLFast(T, 1/T, 5.67, 1e5, 0.8, -0.22314355131420976)
			T += 1e-9
		}
		sink = s
	})
}

func BenchmarkMurphyKoop(b *testing.B) {
	s := 0.0
	T := 290.0
	for b.Loop() {
		s += MurphyKoopSVP(T)
		T += 1e-9
	}
	sink = s
}

var sink float64
