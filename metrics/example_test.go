package metrics_test

import (
	"fmt"
	"log"
	"strings"

	"lidscope/metrics"
)

// One column with the default conventions: SST 290 K, T700 282 K, 1000 hPa,
// RH 0.8 assumed (an invented subtropical column).
func ExampleKernel_Column() {
	k, err := metrics.NewKernel(metrics.DefaultConventions())
	if err != nil {
		log.Fatal(err)
	}
	res, err := k.Column(metrics.ColumnInput{Ts: 290, T700: 282})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("LTS %.3f K, LCL %.1f m, z700 %.1f m, Γθ %.3f K/km, EIS %.3f K\n",
		res.LTS, res.LCL, res.Z700, res.ThetaGradient*1e3, res.EIS)
	// Output: LTS 22.220 K, LCL 440.6 m, z700 2985.8 m, Γθ 5.110 K/km, EIS 9.214 K
}

// A slab with a surface-pressure field and a missing value: the missing
// column gets NaN in every output and is counted.
func ExampleKernel_Slab() {
	r := metrics.DefaultConventions()
	r.PressureField = true
	k, err := metrics.NewKernel(r)
	if err != nil {
		log.Fatal(err)
	}
	nan := float32(0)
	nan /= nan
	in := metrics.SlabInput{
		Ts:   []float32{290, 300, nan},
		T700: []float32{282, 284, 283},
		Ps:   []float32{100000, 101500, 101000},
	}
	out := metrics.SlabOutput{LTS: make([]float32, 3), EIS: make([]float32, 3)}
	st, err := k.Slab(in, out)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("LTS %.2f\nEIS %.2f\n%+v\n", out.LTS, out.EIS, st)
	// Output:
	// LTS [22.22 15.71 NaN]
	// EIS [9.21 0.42 NaN]
	// {Columns:3 Missing:1 Rejected:0}
}

// The conventions text recorded in output metadata names every choice.
func ExampleConventions_Text() {
	r := metrics.DefaultConventions()
	r.SVP = metrics.SVPBolton
	r.LCL = metrics.LCLBolton
	for _, part := range strings.Split(r.Text(), "; ") {
		fmt.Println(part)
	}
	// Output:
	// lidscope-metrics-conventions/1
	// constants Rd=287.04 Rv=461.5 cpd=1005.7 Lv0=2.501e+06 LvSlope=0 g=9.80665 p0=100000
	// theta=T*(p0/p)^(Rd/cpd)
	// svp=bolton (Bolton 1980 eq. 10, over liquid)
	// lcl=bolton (Bolton 1980 eq. 22 T_LCL, dry adiabat cpd/g)
	// surface-temperature=sst
	// surface-pressure=100000 Pa
	// humidity=assumed-rh 0.8 (over liquid)
	// lapse=Wood & Bretherton 2006 eq. 5 at 85000 Pa, qs, T=(Ts+T700)/2
	// z700=hypsometric Rd*(Ts+T700)/2/g*ln(ps/70000), no virtual correction
	// lts=theta700-theta_surface (Klein & Hartmann 1993)
	// eis=LTS-Gamma_theta*(z700-z_LCL) (Wood & Bretherton 2006 eq. 4)
	// ectei=off
}

// The check values of Romps' (2017) published code.
func ExampleRompsLCL() {
	fmt.Printf("%.6f m\n", metrics.RompsLCL(300, 1e5, 0.5))
	fmt.Printf("%.6f m\n", metrics.RompsLCL(200, 1e5, 0.5))
	// Output:
	// 1433.844139 m
	// 542.801771 m
}

func ExampleMurphyKoopSVP() {
	fmt.Printf("%.3f Pa at the triple point\n", metrics.MurphyKoopSVP(273.16))
	fmt.Printf("%.3f hPa at 25 °C (Bolton)\n", metrics.BoltonSVP(298.15)/100)
	// Output:
	// 611.657 Pa at the triple point
	// 31.674 hPa at 25 °C (Bolton)
}

func ExampleLambertWm1() {
	fmt.Printf("%.12f\n", metrics.LambertWm1(-0.5*0.6931471805599453)) // −ln2/2 → −2 ln 2
	// Output: -1.386294361120
}

// Γθ (Wood & Bretherton 2006, eq. 5) and Γ_T (AMS Glossary) at 0 °C,
// 1000 hPa: different quantities whose sum is g/cp.
func ExampleMoistAdiabatThetaGradient() {
	c := metrics.DefaultConstants()
	T := 273.15
	qs := metrics.SVPMurphyKoop.SatSpecificHumidity(T, 100000, c)
	gθ := metrics.MoistAdiabatThetaGradient(T, qs, c)
	gT := metrics.MoistAdiabaticLapseRate(T, qs, c)
	fmt.Printf("Γθ %.3f K/km, Γ_T %.3f K/km, sum %.4f K/km = g/cp %.4f K/km\n", gθ*1e3, gT*1e3, (gθ+gT)*1e3, c.G/c.Cpd*1e3)
	// Output: Γθ 3.273 K/km, Γ_T 6.478 K/km, sum 9.7511 K/km = g/cp 9.7511 K/km
}

func ExampleSVPFormula_DewPoint() {
	td := metrics.SVPMurphyKoop.DewPoint(293.15, 0.5)
	fmt.Printf("%.2f °C\n", td-metrics.ZeroCelsius)
	// Output: 9.27 °C
}
