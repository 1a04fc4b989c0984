package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"lidscope/metrics"
	"lidscope/units"
)

// calcOptions are the options of `lidscope calc`: quantities as typed on
// the command line ("16.85degC", "1013hPa", "80%"; bare numbers are SI) and
// the metrics conventions by name, with the names and values of the study
// keys (calcStudyKeys). Empty strings mean "not given".
type calcOptions struct {
	// the column: values of the input roles
	SST, SurfaceAirTemp, T700 string
	RH, DewPoint, SpecificHum string
	T850, Q700                string
	SurfaceTemperature        string // surface.temperature: sst | air | "" (from which of SST and SurfaceAirTemp is given)
	SurfacePressure           string // surface.pressure: a pressure
	SurfaceHumidity           string // surface.humidity: an assumed RH, "field" or a humidity role
	SVP, LCL, LapseMoisture   string
	LapsePressure             string
	ECTEI                     bool // conventions.ectei; with ECTEISet false, ECTEI is on when Q700 is given
	ECTEISet                  bool
	ECTEISurface              string
	Beta                      float64
	Constants                 metrics.Constants
	JSON                      bool
}

// calcStudyKeys pairs every calc flag that sets a metrics convention with
// the study key (package config, under each dataset) of the same setting.
// The flag is the key with "-" for "_", without "conventions." and
// "constants." and with "surface." as "surface-", and it takes the same
// values: a user can copy one to the other. Values that name a field of a
// file ("field", a humidity role) have their calc counterpart in the flag
// of that input's value.
var calcStudyKeys = []struct{ Flag, Key string }{
	{"surface-temperature", "surface.temperature"},
	{"surface-pressure", "surface.pressure"},
	{"surface-humidity", "surface.humidity"},
	{"svp", "conventions.svp"},
	{"lcl", "conventions.lcl"},
	{"t850", "conventions.t850"},
	{"lapse-pressure", "conventions.lapse_pressure"},
	{"lapse-moisture", "conventions.lapse_moisture"},
	{"ectei", "conventions.ectei"},
	{"ectei-beta", "conventions.ectei_beta"},
	{"ectei-surface", "conventions.ectei_surface"},
	{"rd", "conventions.constants.rd"},
	{"rv", "conventions.constants.rv"},
	{"cpd", "conventions.constants.cpd"},
	{"lv0", "conventions.constants.lv0"},
	{"lv-slope", "conventions.constants.lv_slope"},
	{"g", "conventions.constants.g"},
	{"p0", "conventions.constants.p0"},
}

func init() { addCommand(newCalcCmd) }

func newCalcCmd(e *env) *cobra.Command {
	o := calcOptions{Constants: metrics.DefaultConstants()}
	cmd := &cobra.Command{
		Use:   "calc (--sst TEMP | --surface-air-temperature TEMP) --t700 TEMP [flags]",
		Short: "compute LTS, EIS and their ingredients for one column",
		Long: `Computes LTS, EIS and their ingredients for one column, printing every
intermediate value with its unit and the metrics conventions used. Quantities take a unit
(290K, 16.85degC, 1013hPa, 80%, 12g/kg); a bare number is in SI units
(K, Pa, fraction, kg/kg). Without --relative-humidity, --dew-point-temperature or
--specific-humidity the near-surface relative humidity is assumed to be 0.8
(--surface-humidity), and the output says so.

The flags that choose the metrics conventions have the names and values of the study
keys of the same settings (--svp bolton is conventions.svp: bolton, --surface-pressure
1013hPa is surface.pressure: 1013hPa, --lv-slope 2370 is conventions.constants.lv_slope:
2370), so a column computed here uses what a study with the same keys uses.`,
		Example: `  lidscope calc --sst 16.85degC --t700 282K
  lidscope calc --sst 300K --t700 10.85degC --surface-pressure 1015hPa --dew-point-temperature 295K --t850 290K --q700 4g/kg --json
  lidscope calc --surface-air-temperature 289K --t700 281K --svp bolton --lcl bolton --lv-slope 2370`,
		Args: noArgs("calc takes no arguments, only flags"),
		RunE: func(cmd *cobra.Command, args []string) error {
			o.ECTEISet = cmd.Flags().Changed("ectei")
			return runCalc(o, e.stdout)
		},
	}
	fs := cmd.Flags()
	fs.SortFlags = false
	d := metrics.DefaultConventions()
	textVar(fs, &o.SST, "sst", "", "TEMP", "sea surface temperature (role sst)")
	textVar(fs, &o.SurfaceAirTemp, "surface-air-temperature", "", "TEMP", "near-surface air temperature (role surface_air_temperature), instead of or beside --sst")
	textVar(fs, &o.T700, "t700", "", "TEMP", "temperature at 700 hPa (required)")
	textVar(fs, &o.RH, "relative-humidity", "", "RH", "near-surface relative humidity over liquid water, 0.8 or 80% (role relative_humidity)")
	textVar(fs, &o.DewPoint, "dew-point-temperature", "", "TEMP", "near-surface dew point (role dew_point_temperature)")
	textVar(fs, &o.SpecificHum, "specific-humidity", "", "Q", "near-surface specific humidity, kg/kg or g/kg (role specific_humidity)")
	textVar(fs, &o.Q700, "q700", "", "Q", "specific humidity at 700 hPa; turns --ectei on unless it is given")
	textVar(fs, &o.SurfaceTemperature, "surface-temperature", "", "sst|air", "which temperature is the surface's: sst or air (default: the one given, sst when both are)")
	textVar(fs, &o.SurfacePressure, "surface-pressure", "1000hPa", "PRESSURE", "surface pressure")
	textVar(fs, &o.SurfaceHumidity, "surface-humidity", calcDefaultRH, "RH|ROLE|field", "assumed near-surface relative humidity (0.8 or 80%), or the humidity input to use: relative_humidity, dew_point_temperature, specific_humidity or field")
	textVar(fs, &o.SVP, "svp", d.SVP.String(), metrics.SVPMurphyKoop.String()+"|"+metrics.SVPBolton.String(), "saturation vapour pressure: murphy-koop or bolton")
	textVar(fs, &o.LCL, "lcl", d.LCL.String(), metrics.LCLRomps.String()+"|"+metrics.LCLBolton.String()+"|"+metrics.LCLLinear.String(), "lifting condensation level: romps, bolton or linear")
	textVar(fs, &o.T850, "t850", "mean", "mean|TEMP", "temperature at the lapse-rate level: mean ((T_surface + T700)/2) or its value, e.g. 288K")
	textVar(fs, &o.LapsePressure, "lapse-pressure", "850hPa", "PRESSURE", "pressure where the moist-adiabat θ gradient is evaluated")
	textVar(fs, &o.LapseMoisture, "lapse-moisture", d.LapseMoisture.String(), metrics.LapseQs.String()+"|"+metrics.LapseRs.String(), "saturation humidity in the lapse rate: qs or rs")
	fs.BoolVar(&o.ECTEI, "ectei", false, "compute ECTEI (needs --q700)")
	fs.Float64Var(&o.Beta, "ectei-beta", d.ECTEIBeta, "`β` of ECTEI")
	textVar(fs, &o.ECTEISurface, "ectei-surface", d.ECTEISurface.String(), metrics.ECTEIAir.String()+"|"+metrics.ECTEISaturated.String(), "q_surface of ECTEI: air (from the humidity input) or saturated (qs at the surface)")
	c := &o.Constants
	fs.Float64Var(&c.Rd, "rd", c.Rd, "gas constant of dry air `R_d`, J kg-1 K-1")
	fs.Float64Var(&c.Rv, "rv", c.Rv, "gas constant of water vapour `R_v`, J kg-1 K-1")
	fs.Float64Var(&c.Cpd, "cpd", c.Cpd, "specific heat of dry air at constant pressure `c_pd`, J kg-1 K-1")
	fs.Float64Var(&c.Lv0, "lv0", c.Lv0, "latent heat of vaporisation at 0 °C `L_v0`, J kg-1")
	fs.Float64Var(&c.LvSlope, "lv-slope", c.LvSlope, "fall of the latent heat with temperature `dL_v/dT`, J kg-1 K-1 (2370: Bolton 1980 eq. 2)")
	fs.Float64Var(&c.G, "g", c.G, "gravitational acceleration `g`, m s-2")
	fs.Float64Var(&c.P0, "p0", c.P0, "reference pressure of θ `p_0`, Pa")
	fs.BoolVar(&o.JSON, "json", false, "write the result as JSON")
	for _, k := range calcStudyKeys {
		f := fs.Lookup(k.Flag)
		f.Usage += " [study key " + k.Key + "]"
	}
	return cmd
}

// calcQuantity is one input as given and in SI units.
type calcQuantity struct {
	Value float64 `json:"value"`
	Units string  `json:"units"`
	Given string  `json:"given,omitempty"` // as typed, when a unit was converted
	Note  string  `json:"note,omitempty"`
}

type calcValue struct {
	Value float64 `json:"value"`
	Units string  `json:"units"`
	About string  `json:"about"`
}

// calcReport is the JSON form of the output; the text form prints the same.
type calcReport struct {
	Inputs      map[string]calcQuantity `json:"inputs"`
	Assumptions []string                `json:"assumptions"`
	Results     []calcNamed             `json:"results"`
	Conventions string                  `json:"conventions"`
}

type calcNamed struct {
	Name string `json:"name"`
	calcValue
}

// parseQ parses a flag's quantity; flag is the flag's name for messages.
func parseQ(flag string, kind units.Kind, s string) (calcQuantity, error) {
	v, conv, err := units.ParseQuantity(kind, s)
	if err != nil {
		return calcQuantity{}, usageErr("--%s: %v", flag, err)
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return calcQuantity{}, usageErr("--%s %q is not a finite number", flag, s)
	}
	q := calcQuantity{Value: v, Units: kind.SI()}
	if !conv.Identity() {
		q.Given = s
	}
	if kind == units.Temperature && v <= 0 {
		return q, usageErr("--%s %s is %g K, at or below absolute zero: give a unit for °C, e.g. --%s 16.85degC", flag, s, v, flag)
	}
	return q, nil
}

// calcHumidity sets the near-surface humidity of the column: an assumed
// relative humidity (surface.humidity), or the value of one humidity input.
func calcHumidity(o calcOptions, r *metrics.Conventions, in *metrics.ColumnInput, rep *calcReport) error {
	given := []struct {
		flag, role, value string
		kind              units.Kind
		source            metrics.HumiditySource
	}{
		{"relative-humidity", "relative_humidity", o.RH, units.Fraction, metrics.HumidityRH},
		{"dew-point-temperature", "dew_point_temperature", o.DewPoint, units.Temperature, metrics.HumidityDewPoint},
		{"specific-humidity", "specific_humidity", o.SpecificHum, units.MixingRatio, metrics.HumiditySpecific},
	}
	var flags []string
	use := -1
	for i, g := range given {
		if g.value != "" {
			flags = append(flags, "--"+g.flag)
			use = i
		}
	}
	if len(flags) > 1 {
		return usageErr("give one of --relative-humidity, --dew-point-temperature and --specific-humidity, not several (%s)", strings.Join(flags, ", "))
	}
	choice := o.SurfaceHumidity
	named := -1
	for i, g := range given {
		if choice == g.role {
			named = i
		}
	}
	switch {
	case named >= 0:
		if use != named {
			return usageErr("--surface-humidity %s needs its value: give --%s", choice, given[named].flag)
		}
	case choice == "field":
		if use < 0 {
			return usageErr("--surface-humidity field needs a humidity value: give --relative-humidity, --dew-point-temperature or --specific-humidity")
		}
	case use >= 0 && choice != "" && choice != calcDefaultRH:
		return usageErr("--surface-humidity %s assumes a relative humidity, and --%s gives one: give one of them", choice, given[use].flag)
	case use < 0:
		// an assumed relative humidity, as surface.humidity: 0.8 in a study
		if choice == "" {
			choice = calcDefaultRH
		}
		rh, _, err := units.ParseQuantity(units.Fraction, choice)
		if err != nil || !metrics.AssumedRHOK(rh) {
			return usageErr("--surface-humidity %q: give an assumed relative humidity in (0, 1] (0.8 or 80%%), or relative_humidity, dew_point_temperature, specific_humidity or field", choice)
		}
		r.Humidity = metrics.HumidityAssumedRH
		r.AssumedRH = rh
		rep.Assumptions = append(rep.Assumptions, fmt.Sprintf("near-surface relative humidity %g assumed (--surface-humidity; no --relative-humidity, --dew-point-temperature or --specific-humidity given)", rh))
		return nil
	}
	g := given[use]
	q, err := parseQ(g.flag, g.kind, g.value)
	if err != nil {
		return err
	}
	if g.source == metrics.HumidityRH {
		if err := metrics.CheckRelativeHumidity(q.Value); err != nil {
			return usageErr("--relative-humidity %s: %v", g.value, err)
		}
	}
	r.Humidity = g.source
	rep.Inputs[g.role] = q
	in.Humidity = q.Value
	return nil
}

// calcDefaultRH is the --surface-humidity default as written.
var calcDefaultRH = strconv.FormatFloat(metrics.DefaultAssumedRH, 'g', -1, 64)

// runCalc computes one column from o and writes the report to w. The
// steps fill the conventions, the column's inputs and the report; the
// ranges of the inputs are metrics' (metrics.CheckSurfacePressure and the
// kernel's own checks), the flags' mistakes are usage errors here.
func runCalc(o calcOptions, w io.Writer) error {
	r, err := calcConventions(o)
	if err != nil {
		return err
	}
	rep := calcReport{Inputs: map[string]calcQuantity{}}
	in := metrics.ColumnInput{}
	for _, step := range []func(calcOptions, *metrics.Conventions, *metrics.ColumnInput, *calcReport) error{
		calcSurfaceTemperature, calcT700, calcPressures, calcHumidity, calcLapseLevel, calcECTEI,
	} {
		if err := step(o, &r, &in, &rep); err != nil {
			return err
		}
	}
	k, err := metrics.NewKernel(r)
	if err != nil {
		return usageErr("%v", err)
	}
	res, err := k.Column(in)
	if err != nil {
		if errors.Is(err, metrics.ErrImpossibleInput) {
			return usageErr("%v", err)
		}
		return err
	}
	rep.Conventions = r.Text()
	rep.Results = calcResults(r, res)
	if o.JSON {
		enc := json.NewEncoder(w)
		enc.SetIndent("", "  ")
		return enc.Encode(jsonSafe(rep))
	}
	return writeCalcText(w, rep)
}

// calcConventions are the default conventions with the choices of the
// flags.
func calcConventions(o calcOptions) (metrics.Conventions, error) {
	r := metrics.DefaultConventions()
	var err error
	if r.SVP, err = metrics.ParseSVPFormula(o.SVP); err != nil {
		return r, usageErr("--svp: %v", err)
	}
	if r.LCL, err = metrics.ParseLCLMethod(o.LCL); err != nil {
		return r, usageErr("--lcl: %v", err)
	}
	if r.LapseMoisture, err = metrics.ParseLapseMoisture(o.LapseMoisture); err != nil {
		return r, usageErr("--lapse-moisture: %v", err)
	}
	if r.ECTEISurface, err = metrics.ParseECTEISurface(o.ECTEISurface); err != nil {
		return r, usageErr("--ectei-surface: %v", err)
	}
	r.Constants = o.Constants
	r.ECTEIBeta = o.Beta
	return r, nil
}

// calcSurfaceTemperature sets surface.temperature and its value, from
// --sst or --surface-air-temperature.
func calcSurfaceTemperature(o calcOptions, r *metrics.Conventions, in *metrics.ColumnInput, rep *calcReport) error {
	which := o.SurfaceTemperature
	switch {
	case o.SST == "" && o.SurfaceAirTemp == "":
		return usageErr("give the surface temperature with --sst (sea surface) or --surface-air-temperature (near-surface air)")
	case which == "" && o.SST != "":
		which = metrics.SurfaceSST.String()
	case which == "":
		which = metrics.SurfaceAir.String()
	}
	flag, s := "sst", o.SST
	switch which {
	case metrics.SurfaceSST.String():
		r.Surface = metrics.SurfaceSST
	case metrics.SurfaceAir.String():
		r.Surface = metrics.SurfaceAir
		flag, s = "surface-air-temperature", o.SurfaceAirTemp
	default:
		return usageErr("--surface-temperature: %q is not sst or air", o.SurfaceTemperature)
	}
	if s == "" {
		return usageErr("--surface-temperature %s needs its value: give --%s", which, flag)
	}
	q, err := parseQ(flag, units.Temperature, s)
	if err != nil {
		return err
	}
	q.Note = map[metrics.SurfaceTemperature]string{metrics.SurfaceSST: "sea surface temperature", metrics.SurfaceAir: "near-surface air temperature"}[r.Surface]
	rep.Inputs["surface_temperature"] = q
	in.Ts = q.Value
	return nil
}

// calcT700 sets the 700-hPa temperature.
func calcT700(o calcOptions, _ *metrics.Conventions, in *metrics.ColumnInput, rep *calcReport) error {
	if o.T700 == "" {
		return usageErr("give the 700-hPa temperature with --t700")
	}
	q, err := parseQ("t700", units.Temperature, o.T700)
	if err != nil {
		return err
	}
	rep.Inputs["t700"] = q
	in.T700 = q.Value
	return nil
}

// calcPressures sets the surface pressure (one column: the constant of
// the conventions) and the lapse-rate level.
func calcPressures(o calcOptions, r *metrics.Conventions, _ *metrics.ColumnInput, rep *calcReport) error {
	if o.SurfacePressure == "field" {
		return usageErr("--surface-pressure field reads a surface_pressure file in a study; for one column give its value, e.g. --surface-pressure 1013hPa")
	}
	q, err := parseQ("surface-pressure", units.Pressure, o.SurfacePressure)
	if err != nil {
		return err
	}
	if o.SurfacePressure == "1000hPa" {
		q.Note = "default"
	}
	rep.Inputs["surface_pressure"] = q
	r.SurfacePressure = q.Value
	if err := metrics.CheckSurfacePressure(q.Value); err != nil {
		return usageErr("--surface-pressure %s: %v", o.SurfacePressure, err)
	}
	if q, err = parseQ("lapse-pressure", units.Pressure, o.LapsePressure); err != nil {
		return err
	}
	r.LapsePressure = q.Value
	return nil
}

// calcLapseLevel sets the temperature at the lapse-rate level: the mean
// of the surface and 700-hPa temperatures, or the value of --t850.
func calcLapseLevel(o calcOptions, r *metrics.Conventions, in *metrics.ColumnInput, rep *calcReport) error {
	switch o.T850 {
	case "", "mean":
		rep.Assumptions = append(rep.Assumptions, "temperature at the lapse-rate level = (T_surface + T700)/2 (Wood & Bretherton 2006; --t850 mean)")
	case "field":
		return usageErr("--t850 field reads the air_temperature file at the lapse-rate level in a study; for one column give its value, e.g. --t850 288K")
	default:
		q, err := parseQ("t850", units.Temperature, o.T850)
		if err != nil {
			return err
		}
		r.T850Field = true
		rep.Inputs["t850"] = q
		in.T850 = q.Value
	}
	return nil
}

// calcECTEI turns ECTEI on (--ectei, or a --q700 without --ectei=false)
// and sets the 700-hPa specific humidity it needs.
func calcECTEI(o calcOptions, r *metrics.Conventions, in *metrics.ColumnInput, rep *calcReport) error {
	r.ECTEI = o.ECTEI || (!o.ECTEISet && o.Q700 != "")
	switch {
	case r.ECTEI && o.Q700 == "":
		return usageErr("--ectei needs the specific humidity at 700 hPa: give --q700, e.g. --q700 4g/kg")
	case r.ECTEI:
		q, err := parseQ("q700", units.MixingRatio, o.Q700)
		if err != nil {
			return err
		}
		rep.Inputs["q700"] = q
		in.Q700 = q.Value
	}
	return nil
}

// calcResults are the column's results in the report's order, each with
// its units and what it is.
func calcResults(r metrics.Conventions, res metrics.ColumnResult) []calcNamed {
	var out []calcNamed
	add := func(name string, v float64, unit, about string) {
		out = append(out, calcNamed{name, calcValue{v, unit, about}})
	}
	lp := fmt.Sprintf("%g hPa", r.LapsePressure/100)
	add("theta700", res.Theta700, "K", "potential temperature at 700 hPa")
	add("theta_surface", res.ThetaSurface, "K", fmt.Sprintf("potential temperature at the surface (%v at %g hPa)", r.Surface, res.SurfacePressure/100))
	add("lts", res.LTS, "K", "lower-tropospheric stability θ700 − θ_surface (Klein & Hartmann 1993)")
	add("rh_surface", res.RH, "1", "near-surface relative humidity over liquid water used for the LCL")
	add("dew_point_temperature", res.DewPoint, "K", "near-surface dew point")
	add("lcl", res.LCL, "m", fmt.Sprintf("lifting condensation level above the surface (%v)", r.LCL))
	add("z700", res.Z700, "m", "height of 700 hPa above the surface (hypsometric)")
	add("t850", res.T850, "K", "temperature where the lapse rates are evaluated, at "+lp)
	add("wsat850", res.WSat850, "kg kg-1", fmt.Sprintf("saturation humidity (%v) at %s", r.LapseMoisture, lp))
	add("lapse_rate_t", res.LapseRate850*1e3, "K km-1", "moist-adiabatic temperature lapse rate −dT/dz at "+lp+" (AMS Glossary)")
	add("gamma_theta", res.ThetaGradient*1e3, "K km-1", "θ gradient along the moist adiabat at "+lp+" (Wood & Bretherton 2006 eq. 5); the EIS coefficient")
	add("eis", res.EIS, "K", "estimated inversion strength LTS − Γθ (z700 − z_LCL) (Wood & Bretherton 2006 eq. 4)")
	if r.ECTEI {
		add("q_surface", res.QSurface, "kg kg-1", fmt.Sprintf("q_surface of ECTEI (%v)", r.ECTEISurface))
		add("ectei", res.ECTEI, "K", fmt.Sprintf("EIS − β (Lv/cp)(q_surface − q700), β = %g (Kawai, Koshiro & Webb 2017)", r.ECTEIBeta))
	}
	return out
}

// jsonSafe leaves out results that are NaN (the dew point of perfectly dry
// air), which JSON cannot hold, and says so in the assumptions.
func jsonSafe(rep calcReport) calcReport {
	kept := rep.Results[:0:0]
	for _, r := range rep.Results {
		if math.IsNaN(r.Value) {
			rep.Assumptions = append(rep.Assumptions, r.Name+" is undefined for this column and is omitted")
			continue
		}
		kept = append(kept, r)
	}
	rep.Results = kept
	return rep
}

var calcInputOrder = []struct{ key, label string }{
	{"surface_temperature", "surface temperature"},
	{"t700", "T700"},
	{"surface_pressure", "surface pressure"},
	{"relative_humidity", "relative humidity"},
	{"dew_point_temperature", "dew point"},
	{"specific_humidity", "specific humidity"},
	{"t850", "T at lapse level"},
	{"q700", "q700"},
}

func writeCalcText(w io.Writer, rep calcReport) error {
	var b strings.Builder
	b.WriteString("inputs (SI)\n")
	for _, k := range calcInputOrder {
		q, ok := rep.Inputs[k.key]
		if !ok {
			continue
		}
		fmt.Fprintf(&b, "  %-20s %12.6g %-8s", k.label, q.Value, q.Units)
		var notes []string
		if q.Given != "" {
			notes = append(notes, fmt.Sprintf("given as %q", q.Given))
		}
		if q.Note != "" {
			notes = append(notes, q.Note)
		}
		if len(notes) > 0 {
			fmt.Fprintf(&b, " (%s)", strings.Join(notes, "; "))
		}
		b.WriteString("\n")
	}
	if len(rep.Assumptions) > 0 {
		b.WriteString("assumed\n")
		for _, a := range rep.Assumptions {
			fmt.Fprintf(&b, "  %s\n", a)
		}
	}
	b.WriteString("results\n")
	for _, r := range rep.Results {
		fmt.Fprintf(&b, "  %-14s %14s %-8s %s\n", r.Name, formatCalc(r.Value, r.Units), r.Units, r.About)
	}
	b.WriteString("conventions\n  ")
	b.WriteString(rep.Conventions)
	b.WriteString("\n")
	_, err := io.WriteString(w, b.String())
	return err
}

// formatCalc prints a result with precision suited to its unit.
func formatCalc(v float64, unit string) string {
	switch {
	case math.IsNaN(v):
		return "undefined"
	case unit == "m":
		return fmt.Sprintf("%.2f", v)
	case unit == "kg kg-1":
		return fmt.Sprintf("%.6f", v)
	case unit == "1":
		return fmt.Sprintf("%.4f", v)
	}
	return fmt.Sprintf("%.4f", v)
}
