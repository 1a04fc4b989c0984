package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"

	"lidscope/metrics"
)

// calcDefaults are the flag defaults of cmdCalc.
func calcDefaults() calcOptions {
	return calcOptions{SurfacePressure: "1000hPa", SurfaceHumidity: "0.8", SVP: "murphy-koop", LCL: "romps", T850: "mean",
		LapseMoisture: "qs", LapsePressure: "850hPa", ECTEISurface: "air", Beta: metrics.KawaiBeta,
		Constants: metrics.DefaultConstants()}
}

func calcJSON(t *testing.T, o calcOptions) calcReport {
	t.Helper()
	o.JSON = true
	var b bytes.Buffer
	if err := runCalc(o, &b); err != nil {
		t.Fatalf("runCalc: %v", err)
	}
	var rep calcReport
	if err := json.Unmarshal(b.Bytes(), &rep); err != nil {
		t.Fatalf("output is not JSON: %v\n%s", err, b.String())
	}
	return rep
}

func result(t *testing.T, rep calcReport, name string) float64 {
	t.Helper()
	for _, r := range rep.Results {
		if r.Name == name {
			return r.Value
		}
	}
	t.Fatalf("no result %q in %+v", name, rep.Results)
	return 0
}

// `lidscope calc` reproduces the hand-worked columns of
// metrics/stability_test.go (worked independently from the published
// formulas: Klein & Hartmann 1993, Romps 2017, Wood & Bretherton 2006
// eqs. 4–5, Kawai et al. 2017), entered with units the way a user types them.
func TestCalcWorkedExamples(t *testing.T) {
	a := calcDefaults()
	a.SST, a.T700 = "16.85degC", "282K" // 16.85 °C = 290 K
	b := calcDefaults()
	b.SST, b.T700, b.SurfacePressure, b.DewPoint, b.T850, b.Q700 = "300K", "10.85degC", "1015hPa", "295", "290K", "4g/kg"
	for _, tc := range []struct {
		name string
		o    calcOptions
		want map[string]float64
	}{
		{"column A (default conventions)", a, map[string]float64{
			"theta700": 312.219601, "theta_surface": 290, "lts": 22.219601, "lcl": 440.578190,
			"z700": 2985.797710, "gamma_theta": 5.10990322, "lapse_rate_t": 4.64116569, "eis": 9.213775,
		}},
		{"column B (every input, ECTEI)", b, map[string]float64{
			"theta700": 314.433924, "theta_surface": 298.727883, "lts": 15.706041, "rh_surface": 0.741157348,
			"lcl": 644.149426, "z700": 3175.687125, "gamma_theta": 5.50057423, "eis": 1.781130,
			"q_surface": 0.0162211631, "ectei": -5.209006,
		}},
	} {
		rep := calcJSON(t, tc.o)
		for name, want := range tc.want {
			if got := result(t, rep, name); math.Abs(got-want) > 2e-6*math.Max(1, math.Abs(want)) {
				t.Errorf("%s: %s = %.9g, want %.9g", tc.name, name, got, want)
			}
		}
	}
}

// The flags accept the unit spellings of package units; every spelling of
// the same column gives the same numbers.
func TestCalcUnitParsing(t *testing.T) {
	base := calcDefaults()
	base.SST, base.T700, base.SurfacePressure, base.RH = "290K", "282K", "101300Pa", "0.8"
	want := result(t, calcJSON(t, base), "eis")
	for _, change := range []func(*calcOptions){
		func(o *calcOptions) { o.SST = "16.85degC" },
		func(o *calcOptions) { o.SST = "16.85 deg_C" },
		func(o *calcOptions) { o.SST = "290" }, // bare numbers are SI
		func(o *calcOptions) { o.T700 = "8.85Celsius" },
		func(o *calcOptions) { o.SurfacePressure = "1013hPa" },
		func(o *calcOptions) { o.SurfacePressure = "1013 mbar" },
		func(o *calcOptions) { o.SurfacePressure = "101.3kPa" },
		func(o *calcOptions) { o.RH = "80%" },
	} {
		o := base
		change(&o)
		if got := result(t, calcJSON(t, o), "eis"); math.Abs(got-want) > 1e-9 {
			t.Errorf("%+v: EIS %.12g, want %.12g", o, got, want)
		}
	}
	// g/kg and kg/kg for specific humidity
	o1, o2 := base, base
	o1.RH, o2.RH = "", ""
	o1.SpecificHum, o2.SpecificHum = "11g/kg", "0.011"
	if e1, e2 := result(t, calcJSON(t, o1), "eis"), result(t, calcJSON(t, o2), "eis"); e1 != e2 {
		t.Errorf("--specific-humidity 11g/kg gives EIS %v, 0.011 gives %v", e1, e2)
	}
}

func TestCalcDefaultsAreStated(t *testing.T) {
	o := calcDefaults()
	o.SST, o.T700 = "290K", "282K"
	var b bytes.Buffer
	if err := runCalc(o, &b); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	for _, want := range []string{
		"relative humidity 0.8 assumed", "(T_surface + T700)/2", "default", "conventions\n  lidscope-metrics-conventions/1",
		"theta700", "theta_surface", "lts", "lcl", "lapse_rate_t", "gamma_theta", "z700", "eis", "K km-1",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("text output lacks %q:\n%s", want, out)
		}
	}
	rep := calcJSON(t, o)
	for _, r := range rep.Results {
		if r.Name == "ectei" || r.Name == "q_surface" {
			t.Errorf("%s reported without --q700", r.Name)
		}
	}
	if rep.Conventions != metrics.DefaultConventions().Text() {
		t.Errorf("conventions in JSON:\n%s\nwant the default conventions text", rep.Conventions)
	}
}

// The metrics conventions reach the computation and the recorded text.
func TestCalcConventionChoices(t *testing.T) {
	base := calcDefaults()
	base.SST, base.T700 = "290K", "282K"
	ref := calcJSON(t, base)
	for _, tc := range []struct {
		change func(*calcOptions)
		inText string
	}{
		{func(o *calcOptions) { o.SVP = "bolton" }, "svp=bolton"},
		{func(o *calcOptions) { o.LCL = "bolton" }, "lcl=bolton"},
		{func(o *calcOptions) { o.LCL = "linear" }, "lcl=linear"},
		{func(o *calcOptions) { o.LapseMoisture = "rs" }, ", rs,"},
		{func(o *calcOptions) { o.LapsePressure = "800hPa" }, "at 80000 Pa"},
		{func(o *calcOptions) { o.Constants.LvSlope = metrics.BoltonLvSlope }, "LvSlope=2370"},
		{func(o *calcOptions) { o.SurfaceAirTemp, o.SST = o.SST, "" }, "surface-temperature=air"},
		{func(o *calcOptions) { o.SurfaceAirTemp, o.SurfaceTemperature = o.SST, "air" }, "surface-temperature=air"},
	} {
		o := base
		tc.change(&o)
		rep := calcJSON(t, o)
		if !strings.Contains(rep.Conventions, tc.inText) {
			t.Errorf("conventions %q lacks %q", rep.Conventions, tc.inText)
		}
		if tc.inText != "surface-temperature=air" && result(t, rep, "eis") == result(t, ref, "eis") {
			t.Errorf("%q did not change EIS", tc.inText)
		}
	}
}

// Impossible inputs and flag mistakes are usage errors (exit status 2) that
// say what was wrong and what to write instead.
func TestCalcErrors(t *testing.T) {
	for _, tc := range []struct {
		args []string
		want string
	}{
		{[]string{"--sst", "290K", "--t700", "282K", "--relative-humidity", "1.2"}, "[0, 1.05]"},
		{[]string{"--sst", "290K", "--t700", "282K", "--relative-humidity", "120%"}, "[0, 1.05]"},
		{[]string{"--sst", "-5K", "--t700", "282K"}, "absolute zero"},
		{[]string{"--sst", "290K", "--t700", "-3"}, "absolute zero"},
		{[]string{"--sst", "17", "--t700", "282K"}, "°C"},
		{[]string{"--sst", "290K", "--t700", "282K", "--dew-point-temperature", "300K"}, "dew point 300 K is above"},
		{[]string{"--sst", "290K"}, "--t700"},
		{[]string{"--t700", "282K"}, "--sst"},
		{[]string{"--sst", "290K", "--surface-temperature", "air", "--t700", "282K"}, "give --surface-air-temperature"},
		{[]string{"--sst", "290K", "--surface-temperature", "skin", "--t700", "282K"}, "not sst or air"},
		{[]string{"--sst", "290K", "--t700", "282K", "--relative-humidity", "0.8", "--dew-point-temperature", "285K"}, "not several"},
		{[]string{"--sst", "290K", "--t700", "282K", "--surface-humidity", "dew_point_temperature"}, "give --dew-point-temperature"},
		{[]string{"--sst", "290K", "--t700", "282K", "--surface-humidity", "field"}, "needs a humidity value"},
		{[]string{"--sst", "290K", "--t700", "282K", "--surface-humidity", "1.2"}, "(0, 1]"},
		{[]string{"--sst", "290K", "--t700", "282K", "--surface-humidity", "0.7", "--dew-point-temperature", "285K"}, "give one of them"},
		{[]string{"--sst", "290F", "--t700", "282K"}, "not a temperature unit"},
		{[]string{"--sst", "290K", "--t700", "282K", "--surface-pressure", "1013"}, "1013hPa"},
		{[]string{"--sst", "290K", "--t700", "282K", "--surface-pressure", "field"}, "give its value"},
		{[]string{"--sst", "290K", "--t700", "282K", "--t850", "field"}, "give its value"},
		{[]string{"--sst", "290K", "--t700", "282K", "--ectei"}, "give --q700"},
		{[]string{"--sst", "290K", "--t700", "282K", "--svp", "goff-gratch"}, "murphy-koop or bolton"},
		{[]string{"--sst", "290K", "--t700", "282K", "--lcl", "espy"}, "romps, bolton or linear"},
		{[]string{"--sst", "290K", "--t700", "282K", "--lv-slope", "bolton"}, "want a number"},
		{[]string{"--sst", "290K", "--t700", "282K", "extra"}, "no arguments"},
		{[]string{"--nonsense"}, "unknown flag --nonsense"},
	} {
		var out, errb bytes.Buffer
		if code := run(append([]string{"calc"}, tc.args...), &out, &errb); code != 2 {
			t.Errorf("%v: exit %d, want 2 (stderr %q)", tc.args, code, errb.String())
		}
		if !strings.Contains(errb.String(), tc.want) {
			t.Errorf("%v: stderr %q, want it to mention %q", tc.args, errb.String(), tc.want)
		}
	}
	o := calcDefaults()
	o.SST, o.T700, o.RH = "290K", "282K", "2"
	if err := runCalc(o, &bytes.Buffer{}); !errors.Is(err, errUsage) {
		t.Errorf("RH 2: %v is not a usage error", err)
	}
}

func TestCalcViaRun(t *testing.T) {
	var out, errb bytes.Buffer
	if code := run([]string{"calc", "--sst", "290K", "--t700", "282K", "--json"}, &out, &errb); code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	var rep calcReport
	if err := json.Unmarshal(out.Bytes(), &rep); err != nil {
		t.Fatal(err)
	}
	if got := result(t, rep, "eis"); math.Abs(got-9.213775) > 1e-6 {
		t.Errorf("EIS %v, want 9.213775", got)
	}
	out.Reset()
	if code := run([]string{"help"}, &out, &bytes.Buffer{}); code != 0 || !strings.Contains(out.String(), "calc") {
		t.Errorf("help (on stdout) does not list calc: %q", out.String())
	}
}

// FuzzCalc feeds arbitrary flag values to calc: it must never panic, and it
// either fails with an error or writes JSON whose numbers are all finite.
func FuzzCalc(f *testing.F) {
	f.Add("290K", "282K", "1000hPa", "0.8", "")
	f.Add("16.85degC", "8.85 deg_C", "1013 mbar", "80%", "4g/kg")
	f.Add("-5K", "1e400", "0", "1.06", "-1")
	f.Add("nan", "NaN K", "inf", "", "0x1p3")
	f.Fuzz(func(t *testing.T, sst, t700, ps, rh, q700 string) {
		o := calcDefaults()
		o.SST, o.T700, o.SurfacePressure, o.RH, o.Q700, o.JSON = sst, t700, ps, rh, q700, true
		var b bytes.Buffer
		if err := runCalc(o, &b); err != nil {
			return
		}
		var rep calcReport
		if err := json.Unmarshal(b.Bytes(), &rep); err != nil {
			t.Fatalf("invalid JSON for %+v: %v", o, err)
		}
		for _, r := range rep.Results {
			if math.IsNaN(r.Value) || math.IsInf(r.Value, 0) {
				t.Fatalf("non-finite %s for %+v", r.Name, o)
			}
		}
	})
}
