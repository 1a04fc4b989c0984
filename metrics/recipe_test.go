package metrics

import (
	"strings"
	"testing"
)

// The default recipe's text is part of every output's metadata: a change
// here changes what files say about themselves, so it is pinned.
const defaultRecipeText = "lidscope-metrics-recipe/1; constants Rd=287.04 Rv=461.5 cpd=1005.7 Lv0=2.501e+06 LvSlope=0 g=9.80665 p0=100000; " +
	"theta=T*(p0/p)^(Rd/cpd); svp=murphy-koop (Murphy & Koop 2005 eq. 10, over liquid); " +
	"lcl=romps (Romps 2017 exact, Lambert W-1, author's constants); surface-temperature=sst; surface-pressure=100000 Pa; " +
	"humidity=assumed-rh 0.8 (over liquid); lapse=Wood & Bretherton 2006 eq. 5 at 85000 Pa, qs, T=(Ts+T700)/2; " +
	"z700=hypsometric Rd*(Ts+T700)/2/g*ln(ps/70000), no virtual correction; lts=theta700-theta_surface (Klein & Hartmann 1993); " +
	"eis=LTS-Gamma_theta*(z700-z_LCL) (Wood & Bretherton 2006 eq. 4); ectei=off"

func TestDefaultRecipeText(t *testing.T) {
	r := DefaultRecipe()
	if err := r.Validate(); err != nil {
		t.Fatal(err)
	}
	if got := r.Text(); got != defaultRecipeText {
		t.Errorf("default recipe text changed:\n got %s\nwant %s", got, defaultRecipeText)
	}
	if r.Text() != DefaultRecipe().Text() {
		t.Error("Text is not deterministic")
	}
}

// Every choice that changes a number shows in the text.
func TestRecipeTextRecordsEveryChoice(t *testing.T) {
	base := DefaultRecipe().Text()
	for name, change := range map[string]func(*Recipe){
		"Rd":            func(r *Recipe) { r.Constants.Rd = 287.0 },
		"Rv":            func(r *Recipe) { r.Constants.Rv = 461.0 },
		"Cpd":           func(r *Recipe) { r.Constants.Cpd = 1004 },
		"Lv0":           func(r *Recipe) { r.Constants.Lv0 = 2.5e6 },
		"LvSlope":       func(r *Recipe) { r.Constants.LvSlope = BoltonLvSlope },
		"G":             func(r *Recipe) { r.Constants.G = 9.81 },
		"P0":            func(r *Recipe) { r.Constants.P0 = 101325 },
		"SVP":           func(r *Recipe) { r.SVP = SVPBolton },
		"LCL bolton":    func(r *Recipe) { r.LCL = LCLBolton },
		"LCL linear":    func(r *Recipe) { r.LCL = LCLLinear },
		"Surface":       func(r *Recipe) { r.Surface = SurfaceAir },
		"PressureField": func(r *Recipe) { r.PressureField = true },
		"Pressure":      func(r *Recipe) { r.SurfacePressure = 101325 },
		"Humidity":      func(r *Recipe) { r.Humidity = HumidityDewPoint },
		"AssumedRH":     func(r *Recipe) { r.AssumedRH = 0.75 },
		"T850Field":     func(r *Recipe) { r.T850Field = true },
		"LapsePressure": func(r *Recipe) { r.LapsePressure = 80000 },
		"LapseMoisture": func(r *Recipe) { r.LapseMoisture = LapseRs },
		"ECTEI":         func(r *Recipe) { r.ECTEI = true },
	} {
		r := DefaultRecipe()
		change(&r)
		if err := r.Validate(); err != nil {
			t.Errorf("%s: %v", name, err)
		}
		if r.Text() == base {
			t.Errorf("changing %s does not change the recipe text", name)
		}
	}
	r := DefaultRecipe()
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

func TestRecipeValidate(t *testing.T) {
	if err := (Recipe{}).Validate(); err == nil || !strings.Contains(err.Error(), "DefaultConstants") {
		t.Errorf("zero Recipe: %v", err)
	}
	for _, tc := range []struct {
		change func(*Recipe)
		want   string
	}{
		{func(r *Recipe) { r.SVP = 0 }, "Recipe.SVP"},
		{func(r *Recipe) { r.LCL = 9 }, "Recipe.LCL"},
		{func(r *Recipe) { r.Surface = 0 }, "Recipe.Surface"},
		{func(r *Recipe) { r.Humidity = 0 }, "Recipe.Humidity"},
		{func(r *Recipe) { r.LapseMoisture = 0 }, "Recipe.LapseMoisture"},
		{func(r *Recipe) { r.ECTEISurface = 0 }, "Recipe.ECTEISurface"},
		{func(r *Recipe) { r.SurfacePressure = 1000 }, "give it in Pa"},
		{func(r *Recipe) { r.AssumedRH = 80 }, "0.8 means 80"},
		{func(r *Recipe) { r.AssumedRH = 0 }, "AssumedRH"},
		{func(r *Recipe) { r.LapsePressure = 850 }, "LapsePressure"},
		{func(r *Recipe) { r.ECTEI, r.ECTEIBeta = true, 23 }, "ECTEIBeta"},
		{func(r *Recipe) { r.Constants.Cpd = 1.0057 }, "Constants.Cpd"},
		{func(r *Recipe) { r.Constants.G = 0 }, "Constants.G"},
	} {
		r := DefaultRecipe()
		tc.change(&r)
		err := r.Validate()
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("error %v, want it to mention %q", err, tc.want)
		}
		if _, kerr := NewKernel(r); kerr == nil {
			t.Errorf("NewKernel accepted an invalid recipe (%s)", tc.want)
		}
	}
	// With a pressure field the constant is not used, so it is not checked.
	r := DefaultRecipe()
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
