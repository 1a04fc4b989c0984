package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/spf13/cobra"

	"lidscope/metrics"
	"lidscope/units"
)

// calcOptions are the options of `lidscope calc`: quantities as typed on
// the command line ("16.85degC", "1013hPa", "80%"; bare numbers are SI) and
// the metrics conventions by name. Empty strings mean "not given".
type calcOptions struct {
	SST, TSurf, T700, Ps      string
	RH, DewPoint, SpecificHum string
	T850, Q700                string
	SVP, LCL, LapseMoisture   string
	LapsePressure             string
	LatentHeat                string // "constant" or "bolton"
	ECTEISurface              string
	Beta                      float64
	JSON                      bool
}

func init() { addCommand(newCalcCmd) }

func newCalcCmd(e *env) *cobra.Command {
	var o calcOptions
	cmd := &cobra.Command{
		Use:   "calc (--sst T | --tsurf T) --t700 T [flags]",
		Short: "compute LTS, EIS and their ingredients for one column",
		Long: `Computes LTS, EIS and their ingredients for one column, printing every
intermediate value with its unit and the metrics conventions used. Quantities take a unit
(290K, 16.85degC, 1013hPa, 80%, 12g/kg); a bare number is in SI units
(K, Pa, fraction, kg/kg). Without --rh, --dewpoint or --shum the near-surface
relative humidity is assumed to be 0.8, and the output says so.`,
		Example: `  lidscope calc --sst 16.85degC --t700 282K
  lidscope calc --sst 300K --t700 10.85degC --ps 1015hPa --dewpoint 295K --t850 290K --q700 4g/kg --json`,
		Args: noArgs("calc takes no arguments, only flags"),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runCalc(o, e.stdout)
		},
	}
	fs := cmd.Flags()
	fs.SortFlags = false
	fs.StringVar(&o.SST, "sst", "", "sea surface temperature (stands in for the surface air temperature)")
	fs.StringVar(&o.TSurf, "tsurf", "", "near-surface air temperature, instead of --sst")
	fs.StringVar(&o.T700, "t700", "", "temperature at 700 hPa (required)")
	fs.StringVar(&o.Ps, "ps", "1000hPa", "surface pressure")
	fs.StringVar(&o.RH, "rh", "", "near-surface relative humidity over liquid water (0.8 or 80%)")
	fs.StringVar(&o.DewPoint, "dewpoint", "", "near-surface dew point")
	fs.StringVar(&o.SpecificHum, "shum", "", "near-surface specific humidity (kg/kg or g/kg)")
	fs.StringVar(&o.T850, "t850", "", "temperature at the lapse-rate level (default (T_surface + T700)/2)")
	fs.StringVar(&o.Q700, "q700", "", "specific humidity at 700 hPa; adds ECTEI")
	fs.StringVar(&o.SVP, "svp", "murphy-koop", "saturation vapour pressure: murphy-koop or bolton")
	fs.StringVar(&o.LCL, "lcl", "romps", "lifting condensation level: romps, bolton or linear")
	fs.StringVar(&o.LapseMoisture, "lapse-moisture", "qs", "saturation humidity in the lapse rate: qs or rs")
	fs.StringVar(&o.LapsePressure, "lapse-level", "850hPa", "pressure where the moist-adiabat θ gradient is evaluated")
	fs.StringVar(&o.LatentHeat, "latent-heat", "constant", "latent heat: constant (2.501e6 J/kg) or bolton (Bolton 1980 eq. 2, falls with T)")
	fs.StringVar(&o.ECTEISurface, "ectei-qsurf", "air", "q_surface of ECTEI: air (from the humidity input) or saturated (qs at the surface)")
	fs.Float64Var(&o.Beta, "ectei-beta", metrics.KawaiBeta, "β of ECTEI")
	fs.BoolVar(&o.JSON, "json", false, "write the result as JSON")
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

func oneOf(names ...string) (string, int) {
	n, first := 0, ""
	for i := 0; i < len(names); i += 2 {
		if names[i+1] != "" {
			n++
			if first == "" {
				first = names[i]
			}
		}
	}
	return first, n
}

// runCalc computes one column from o and writes the report to w.
func runCalc(o calcOptions, w io.Writer) error {
	r := metrics.DefaultConventions()
	var err error
	if r.SVP, err = metrics.ParseSVPFormula(o.SVP); err != nil {
		return usageErr("--svp: %v", err)
	}
	if r.LCL, err = metrics.ParseLCLMethod(o.LCL); err != nil {
		return usageErr("--lcl: %v", err)
	}
	if r.LapseMoisture, err = metrics.ParseLapseMoisture(o.LapseMoisture); err != nil {
		return usageErr("--lapse-moisture: %v", err)
	}
	if r.ECTEISurface, err = metrics.ParseECTEISurface(o.ECTEISurface); err != nil {
		return usageErr("--ectei-qsurf: %v", err)
	}
	switch o.LatentHeat {
	case "constant":
	case "bolton":
		r.Constants.LvSlope = metrics.BoltonLvSlope
	default:
		return usageErr("--latent-heat: %q is not constant or bolton", o.LatentHeat)
	}
	r.ECTEIBeta = o.Beta

	rep := calcReport{Inputs: map[string]calcQuantity{}}
	in := metrics.ColumnInput{}

	// surface temperature
	switch {
	case o.SST != "" && o.TSurf != "":
		return usageErr("give either --sst or --tsurf, not both")
	case o.SST == "" && o.TSurf == "":
		return usageErr("give the surface temperature with --sst (sea surface) or --tsurf (near-surface air)")
	}
	flag, s := "sst", o.SST
	r.Surface = metrics.SurfaceSST
	if o.TSurf != "" {
		flag, s = "tsurf", o.TSurf
		r.Surface = metrics.SurfaceAir
	}
	q, err := parseQ(flag, units.Temperature, s)
	if err != nil {
		return err
	}
	q.Note = map[metrics.SurfaceTemperature]string{metrics.SurfaceSST: "sea surface temperature", metrics.SurfaceAir: "near-surface air temperature"}[r.Surface]
	rep.Inputs["surface_temperature"] = q
	in.Ts = q.Value

	if o.T700 == "" {
		return usageErr("give the 700-hPa temperature with --t700")
	}
	if q, err = parseQ("t700", units.Temperature, o.T700); err != nil {
		return err
	}
	rep.Inputs["t700"] = q
	in.T700 = q.Value

	if q, err = parseQ("ps", units.Pressure, o.Ps); err != nil {
		return err
	}
	if o.Ps == "1000hPa" {
		q.Note = "default"
	}
	rep.Inputs["surface_pressure"] = q
	r.SurfacePressure = q.Value // one column: the constant of the conventions
	if !(q.Value > metrics.P700 && q.Value <= 120000) {
		return usageErr("--ps %s is %g Pa: the surface must be below the 700-hPa level (above 70000 Pa) and at most 120000 Pa; give hPa with a unit, e.g. 1013hPa", o.Ps, q.Value)
	}

	if q, err = parseQ("lapse-level", units.Pressure, o.LapsePressure); err != nil {
		return err
	}
	r.LapsePressure = q.Value

	// humidity
	switch first, n := oneOf("rh", o.RH, "dewpoint", o.DewPoint, "shum", o.SpecificHum); {
	case n > 1:
		return usageErr("give one of --rh, --dewpoint and --shum, not several")
	case n == 0:
		r.Humidity = metrics.HumidityAssumedRH
		rep.Assumptions = append(rep.Assumptions, fmt.Sprintf("near-surface relative humidity %g assumed (no --rh, --dewpoint or --shum given)", r.AssumedRH))
	case first == "rh":
		if q, err = parseQ("rh", units.Fraction, o.RH); err != nil {
			return err
		}
		if !(q.Value >= 0 && q.Value <= 1.05) {
			return usageErr("--rh %s is %g: relative humidity must be a fraction in [0, 1.05] (write 0.8 or 80%%)", o.RH, q.Value)
		}
		r.Humidity = metrics.HumidityRH
		rep.Inputs["relative_humidity"] = q
		in.Humidity = q.Value
	case first == "dewpoint":
		if q, err = parseQ("dewpoint", units.Temperature, o.DewPoint); err != nil {
			return err
		}
		r.Humidity = metrics.HumidityDewPoint
		rep.Inputs["dew_point"] = q
		in.Humidity = q.Value
	case first == "shum":
		if q, err = parseQ("shum", units.MixingRatio, o.SpecificHum); err != nil {
			return err
		}
		r.Humidity = metrics.HumiditySpecific
		rep.Inputs["specific_humidity"] = q
		in.Humidity = q.Value
	}

	if o.T850 != "" {
		if q, err = parseQ("t850", units.Temperature, o.T850); err != nil {
			return err
		}
		r.T850Field = true
		rep.Inputs["t850"] = q
		in.T850 = q.Value
	} else {
		rep.Assumptions = append(rep.Assumptions, "temperature at the lapse-rate level = (T_surface + T700)/2 (Wood & Bretherton 2006; no --t850 given)")
	}
	if o.Q700 != "" {
		if q, err = parseQ("q700", units.MixingRatio, o.Q700); err != nil {
			return err
		}
		r.ECTEI = true
		rep.Inputs["q700"] = q
		in.Q700 = q.Value
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
	add := func(name string, v float64, unit, about string) {
		rep.Results = append(rep.Results, calcNamed{name, calcValue{v, unit, about}})
	}
	lp := fmt.Sprintf("%g hPa", r.LapsePressure/100)
	add("theta700", res.Theta700, "K", "potential temperature at 700 hPa")
	add("theta_surface", res.ThetaSurface, "K", fmt.Sprintf("potential temperature at the surface (%v at %g hPa)", r.Surface, res.SurfacePressure/100))
	add("lts", res.LTS, "K", "lower-tropospheric stability θ700 − θ_surface (Klein & Hartmann 1993)")
	add("rh_surface", res.RH, "1", "near-surface relative humidity over liquid water used for the LCL")
	add("dew_point", res.DewPoint, "K", "near-surface dew point")
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
	if o.JSON {
		enc := json.NewEncoder(w)
		enc.SetIndent("", "  ")
		return enc.Encode(jsonSafe(rep))
	}
	return writeCalcText(w, rep)
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
	{"dew_point", "dew point"},
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
