package metrics

import (
	"strings"
	"testing"
)

// The default conventions' text is part of every output's metadata: a change
// here changes what files say about themselves, so it is pinned.
const defaultConventionsText = "lidscope-metrics-conventions/1; constants Rd=287.04 Rv=461.5 cpd=1005.7 Lv0=2.501e+06 LvSlope=0 g=9.80665 p0=100000; " +
	"theta=T*(p0/p)^(Rd/cpd); svp=murphy-koop (Murphy & Koop 2005 eq. 10, over liquid); " +
	"lcl=romps (Romps 2017 exact, Lambert W-1, author's constants); surface-temperature=sst; surface-pressure=100000 Pa; " +
	"humidity=assumed-rh 0.8 (over liquid); lapse=Wood & Bretherton 2006 eq. 5 at 85000 Pa, qs, T=(Ts+T700)/2; " +
	"z700=hypsometric Rd*(Ts+T700)/2/g*ln(ps/70000), no virtual correction; lts=theta700-theta_surface (Klein & Hartmann 1993); " +
	"eis=LTS-Gamma_theta*(z700-z_LCL) (Wood & Bretherton 2006 eq. 4); ectei=off"

func TestDefaultConventionsText(t *testing.T) {
	r := DefaultConventions()
	if err := r.Validate(); err != nil {
		t.Fatal(err)
	}
	if got := r.Text(); got != defaultConventionsText {
		t.Errorf("default conventions text changed:\n got %s\nwant %s", got, defaultConventionsText)
	}
	if r.Text() != DefaultConventions().Text() {
		t.Error("Text is not deterministic")
	}
}

// Every choice that changes a number shows in the text.
func TestConventionsTextRecordsEveryChoice(t *testing.T) {
	base := DefaultConventions().Text()
	for name, change := range map[string]func(*Conventions){
		"Rd":            func(r *Conventions) { r.Constants.Rd = 287.0 },
		"Rv":            func(r *Conventions) { r.Constants.Rv = 461.0 },
		"Cpd":           func(r *Conventions) { r.Constants.Cpd = 1004 },
		"Lv0":           func(r *Conventions) { r.Constants.Lv0 = 2.5e6 },
		"LvSlope":       func(r *Conventions) { r.Constants.LvSlope = BoltonLvSlope },
		"G":             func(r *Conventions) { r.Constants.G = 9.81 },
		"P0":            func(r *Conventions) { r.Constants.P0 = 101325 },
		"SVP":           func(r *Conventions) { r.SVP = SVPBolton },
		"LCL bolton":    func(r *Conventions) { r.LCL = LCLBolton },
		"LCL linear":    func(r *Conventions) { r.LCL = LCLLinear },
		"Surface":       func(r *Conventions) { r.Surface = SurfaceAir },
		"PressureField": func(r *Conventions) { r.PressureField = true },
		"Pressure":      func(r *Conventions) { r.SurfacePressure = 101325 },
		"Humidity":      func(r *Conventions) { r.Humidity = HumidityDewPoint },
		"AssumedRH":     func(r *Conventions) { r.AssumedRH = 0.75 },
		"T850Field":     func(r *Conventions) { r.T850Field = true },
		"LapsePressure": func(r *Conventions) { r.LapsePressure = 80000 },
		"LapseMoisture": func(r *Conventions) { r.LapseMoisture = LapseRs },
		"ECTEI":         func(r *Conventions) { r.ECTEI = true },
	} {
		r := DefaultConventions()
		change(&r)
		if err := r.Validate(); err != nil {
			t.Errorf("%s: %v", name, err)
		}
		if r.Text() == base {
			t.Errorf("changing %s does not change the conventions text", name)
		}
	}
	r := DefaultConventions()
	r.ECTEI = true
	on := r.Text()
	r.ECTEIBeta = 0.3
	if r.Text() == on {
		t.Error("ECTEIBeta not in text")
	}
	r.ECTEIBeta = KawaiBeta
	r.ECTEISurface = ECTEISaturated
	if r.Text() == on {
		t.Error("ECTEISurface not in text")
	}
}

func TestConventionsValidate(t *testing.T) {
	if err := (Conventions{}).Validate(); err == nil || !strings.Contains(err.Error(), "DefaultConstants") {
		t.Errorf("zero Conventions: %v", err)
	}
	for _, tc := range []struct {
		change func(*Conventions)
		want   string
	}{
		{func(r *Conventions) { r.SVP = 0 }, "Conventions.SVP"},
		{func(r *Conventions) { r.LCL = 9 }, "Conventions.LCL"},
		{func(r *Conventions) { r.Surface = 0 }, "Conventions.Surface"},
		{func(r *Conventions) { r.Humidity = 0 }, "Conventions.Humidity"},
		{func(r *Conventions) { r.LapseMoisture = 0 }, "Conventions.LapseMoisture"},
		{func(r *Conventions) { r.ECTEISurface = 0 }, "Conventions.ECTEISurface"},
		{func(r *Conventions) { r.SurfacePressure = 1000 }, "give it in Pa"},
		{func(r *Conventions) { r.AssumedRH = 80 }, "0.8 means 80"},
		{func(r *Conventions) { r.AssumedRH = 0 }, "AssumedRH"},
		{func(r *Conventions) { r.LapsePressure = 850 }, "LapsePressure"},
		{func(r *Conventions) { r.ECTEI, r.ECTEIBeta = true, 23 }, "ECTEIBeta"},
		{func(r *Conventions) { r.Constants.Cpd = 1.0057 }, "Constants.Cpd"},
		{func(r *Conventions) { r.Constants.G = 0 }, "Constants.G"},
	} {
		r := DefaultConventions()
		tc.change(&r)
		err := r.Validate()
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("error %v, want it to mention %q", err, tc.want)
		}
		if _, kerr := NewKernel(r); kerr == nil {
			t.Errorf("NewKernel accepted an invalid conventions (%s)", tc.want)
		}
	}
	// With a pressure field the constant is not used, so it is not checked.
	r := DefaultConventions()
	r.PressureField, r.SurfacePressure = true, 0
	if err := r.Validate(); err != nil {
		t.Errorf("pressure field with unset constant: %v", err)
	}
}

func TestParseNames(t *testing.T) {
	for _, l := range []LapseMoisture{LapseQs, LapseRs} {
		if got, err := ParseLapseMoisture(l.String()); err != nil || got != l {
			t.Errorf("ParseLapseMoisture(%q) = %v, %v", l.String(), got, err)
		}
	}
	for _, e := range []ECTEISurface{ECTEIAir, ECTEISaturated} {
		if got, err := ParseECTEISurface(e.String()); err != nil || got != e {
			t.Errorf("ParseECTEISurface(%q) = %v, %v", e.String(), got, err)
		}
	}
	if _, err := ParseLapseMoisture("q"); err == nil {
		t.Error("ParseLapseMoisture accepted q")
	}
	if _, err := ParseECTEISurface("sea"); err == nil {
		t.Error("ParseECTEISurface accepted sea")
	}
	for _, s := range []interface{ String() string }{SurfaceTemperature(0), HumiditySource(0), LapseMoisture(0), ECTEISurface(0), SVPFormula(0), LCLMethod(0)} {
		if !strings.Contains(s.String(), "(0)") {
			t.Errorf("unset value prints as %q", s.String())
		}
	}
}
