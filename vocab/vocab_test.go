package vocab_test

import (
	"go/ast"
	"go/parser"
	"go/token"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"lidscope/cf"
	"lidscope/internal/testutil"
	"lidscope/units"
	"lidscope/vocab"
)

// One name per thing: no term is in the table twice, except a quantity
// that is read from the input role of the same name (sst, low_cloud, …),
// where the role and the quantity are one thing.
func TestTermsAreUnique(t *testing.T) {
	kinds := map[string][]vocab.Kind{}
	for _, term := range vocab.Terms() {
		if term.Name == "" || strings.TrimSpace(term.Name) != term.Name {
			t.Errorf("term %q (%s) is empty or has spaces around it", term.Name, term.Kind)
		}
		kinds[term.Name] = append(kinds[term.Name], term.Kind)
	}
	for name, ks := range kinds {
		if len(ks) == 1 {
			continue
		}
		q, isQ := vocab.Lookup(name)
		if len(ks) == 2 && isQ && q.Source == vocab.FromInput && q.Roles[0] == name &&
			(ks[0] == vocab.KindRole && ks[1] == vocab.KindQuantity || ks[0] == vocab.KindQuantity && ks[1] == vocab.KindRole) {
			continue
		}
		t.Errorf("term %q is in the table %d times (%v): keep one", name, len(ks), ks)
	}
	seen := map[string]bool{}
	for _, q := range vocab.Quantities() {
		if seen[q.Name] {
			t.Errorf("quantity %q has two rows", q.Name)
		}
		seen[q.Name] = true
	}
}

// Every name package vocab declares (a statistic, a regime-definition
// name, a verdict, a role, a quantity) is made of the table's terms, so
// that an output built from the constants passes Check. The constants
// are read from the package's source, so a new one is checked without
// editing this test.
func TestDeclaredNamesAreInTheTable(t *testing.T) {
	files, err := filepath.Glob("*.go")
	if err != nil {
		t.Fatal(err)
	}
	fset := token.NewFileSet()
	n := 0
	for _, f := range files {
		if strings.HasSuffix(f, "_test.go") {
			continue
		}
		file, err := parser.ParseFile(fset, f, nil, 0)
		if err != nil {
			t.Fatal(err)
		}
		for _, d := range file.Decls {
			g, ok := d.(*ast.GenDecl)
			if !ok || g.Tok != token.CONST {
				continue
			}
			for _, spec := range g.Specs {
				vs := spec.(*ast.ValueSpec)
				for i, id := range vs.Names {
					// Unit strings are not names (they go in units
					// attributes); Kind values are documentation.
					if strings.HasPrefix(id.Name, "Unit") || strings.HasPrefix(id.Name, "Kind") || i >= len(vs.Values) {
						continue
					}
					lit, ok := vs.Values[i].(*ast.BasicLit)
					if !ok || lit.Kind != token.STRING {
						continue
					}
					v, _ := strconv.Unquote(lit.Value)
					n++
					if err := vocab.Check(v); err != nil {
						t.Errorf("%s: const %s: %v", fset.Position(id.Pos()), id.Name, err)
					}
				}
			}
		}
	}
	if n < 50 {
		t.Fatalf("found %d string constants in package vocab; the source walk is broken", n)
	}
	for _, q := range vocab.Quantities() {
		if err := vocab.Check(q.Name); err != nil {
			t.Errorf("quantity: %v", err)
		}
	}
	// Check itself: a made-up word is refused and names the part
	for _, bad := range []string{"eis_meen", "sample_min_si", "subsidence_eis_mean_K"} {
		if err := vocab.Check(bad); err == nil {
			t.Errorf("Check(%q) = nil, want an error", bad)
		}
	}
}

// The units of every quantity are the SI units package units converts
// that kind of input to (the accumulators hold SI values), spelled the one
// way units.Kind.SI spells them, and parse as such with no conversion.
func TestQuantityUnitsParse(t *testing.T) {
	for _, q := range vocab.Quantities() {
		var kind units.Kind
		if q.Name == vocab.TAdv {
			continue // K s-1, a rate of temperature change: no input kind (checked by udunits2 below)
		}
		if q.TemperatureDifference {
			kind = units.Temperature
		} else {
			k, ok := cf.KindOf(cf.Role(q.Roles[0]))
			if !ok {
				t.Errorf("%s: role %q is not a role package cf knows", q.Name, q.Roles[0])
				continue
			}
			kind = k
		}
		c, err := units.Parse(kind, q.Units)
		if err != nil {
			t.Errorf("%s: units %q: %v", q.Name, q.Units, err)
			continue
		}
		if !c.Identity() || q.Units != kind.SI() {
			t.Errorf("%s: units %q are not the SI spelling %q of a %v (conversion %s)", q.Name, q.Units, kind.SI(), kind, c)
		}
	}
}

// udunits2 (UDUNITS-2, Debian package udunits-bin; a reference tool
// outside the project) knows every unit string lidscope writes, and
// SlopeUnits spells exactly (factor 1) the quotient of a response's and a
// predictor's units.
func TestUnitsWithUDUNITS(t *testing.T) {
	tool := testutil.Tool(t, "udunits2")
	// convert asks udunits2 for the factor from have to want; ok is false
	// when either is not a unit or they do not conform.
	convert := func(have, want string) (float64, bool, string) {
		out, err := exec.Command(tool, "-H", have, "-W", want).CombinedOutput()
		if err != nil {
			return 0, false, string(out)
		}
		// "    1 W m-2 K-1 = 1 (kg s-3 K-1)"
		m := regexp.MustCompile(`=\s*([0-9.eE+-]+)\s`).FindStringSubmatch(string(out) + " ")
		if m == nil {
			return 0, false, string(out)
		}
		f, err := strconv.ParseFloat(m[1], 64)
		return f, err == nil, string(out)
	}
	// every unit string of the table, against its SI base form
	base := map[string]string{
		vocab.UnitKelvin: "K", vocab.UnitOne: "1", vocab.UnitPerKelvin: "K-1", vocab.UnitPerYear: "s-1",
		vocab.UnitSquareMetre: "m2", vocab.UnitDegreesNorth: "rad", vocab.UnitDegreesEast: "rad",
		vocab.UnitPercent: "1", vocab.UnitMonth: "s", vocab.UnitByte: "1", vocab.UnitSecond: "s",
		"W m-2": "kg s-3", "Pa s-1": "kg m-1 s-3", "kg m-2 s-1": "kg m-2 s-1",
		"K s-1": "K s-1", "m s-1": "m s-1",
	}
	for _, q := range vocab.Quantities() {
		if _, ok := base[q.Units]; !ok {
			t.Errorf("%s: units %q have no SI base form in this test; add one", q.Name, q.Units)
		}
	}
	for u, b := range base {
		if _, ok, out := convert(u, b); !ok {
			t.Errorf("udunits2 does not convert %q to %q: %s", u, b, out)
		}
	}
	// slopes of every response on every predictor
	for _, r := range vocab.Quantities() {
		if !r.Response {
			continue
		}
		for _, p := range vocab.Quantities() {
			if !p.Predictor {
				continue
			}
			s := vocab.SlopeUnits(r.Units, p.Units)
			want := "(" + r.Units + ")/(" + p.Units + ")"
			if f, ok, out := convert(s, want); !ok || f != 1 {
				t.Errorf("SlopeUnits(%q, %q) = %q: udunits2 to %s gives %q", r.Units, p.Units, s, want, out)
			}
		}
	}
}

// cfStandardNames are the CF standard names the table uses with their
// canonical units, from the CF Standard Name Table version 84 (2024-01-19),
// from memory: there is no local copy of the table on this machine and
// none in a Debian package, so the spellings were checked by eye, not by a
// tool. A new standard name needs a row here, checked against the table.
var cfStandardNames = map[string]string{
	"sea_surface_temperature":             "K",
	"air_temperature":                     "K",
	"cloud_area_fraction":                 "1",
	"low_type_cloud_area_fraction":        "1",
	"toa_outgoing_shortwave_flux":         "W m-2",
	"toa_outgoing_longwave_flux":          "W m-2",
	"lagrangian_tendency_of_air_pressure": "Pa s-1",
	"precipitation_flux":                  "kg m-2 s-1",
	"relative_humidity":                   "1",
	"wind_speed":                          "m s-1",
}

// Every standard name in the table is spelled as the CF Standard Name
// Table has it, and the quantity's units are its canonical units; LTS,
// EIS, ECTEI and relative SST have no standard name in that table (from
// memory), so they carry none (a made-up standard_name breaks CF).
func TestStandardNames(t *testing.T) {
	none := map[string]bool{vocab.LTS: true, vocab.EIS: true, vocab.ECTEI: true, vocab.RelSST: true, vocab.TAdv: true}
	for _, q := range vocab.Quantities() {
		if q.StandardName == "" {
			if !none[q.Name] {
				t.Errorf("%s has no standard name; the CF table has one for it (add it) or add it to this test's list of quantities without one", q.Name)
			}
			continue
		}
		if none[q.Name] {
			t.Errorf("%s carries standard name %q, which the CF table does not have", q.Name, q.StandardName)
		}
		cu, ok := cfStandardNames[q.StandardName]
		if !ok {
			t.Errorf("%s: standard name %q is not in the CF Standard Name Table (version 84, from memory)", q.Name, q.StandardName)
			continue
		}
		if q.Units != cu {
			t.Errorf("%s: units %q, but the canonical units of %s are %q", q.Name, q.Units, q.StandardName, cu)
		}
		if q.Reference != "" && q.Source == vocab.FromInput {
			t.Errorf("%s: an input quantity cites %q; its definition is its standard name", q.Name, q.Reference)
		}
	}
	// quantities computed by lidscope cite their definition instead
	for _, q := range vocab.Quantities() {
		if q.Source == vocab.FromKernel && q.Reference == "" {
			t.Errorf("%s is computed by lidscope but cites no definition (Reference)", q.Name)
		}
	}
}
