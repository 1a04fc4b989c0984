package analysis

import (
	"context"
	"fmt"
	"io"
	"math"
	"path/filepath"

	"lidscope/config"
	"lidscope/fixtures"
	"lidscope/regimes"
)

// DemoReport is the outcome of the demo: where things went, and how the
// analysis compares with what the synthetic world was built to contain.
type DemoReport struct {
	DataDir, RecipePath string
	Reports             []Report
	Truth               *fixtures.Truth
	Checks              []Check
}

// Check compares one recovered number with the construction's truth.
type Check struct {
	What      string
	Got, Want float64
	Tol       float64
	Units     string
}

// OK reports whether the check passed.
func (c Check) OK() bool { return math.Abs(c.Got-c.Want) <= c.Tol }

// DemoOptions control the demo.
type DemoOptions struct {
	Options
	// Scenario sets the synthetic world (fixtures.DefaultOptions() when zero).
	Scenario *fixtures.Options
}

// Demo generates the synthetic demo world into dir/data, runs the full
// analysis of its recipe into dir/results, and checks the results against
// the world's known truth.
func Demo(ctx context.Context, dir string, opt DemoOptions) (*DemoReport, error) {
	so := fixtures.DefaultOptions()
	if opt.Scenario != nil {
		so = *opt.Scenario
	}
	so.Overwrite = opt.Force
	so.Command = opt.Command
	data := filepath.Join(dir, "data")
	truth, err := fixtures.Generate(data, so)
	if err != nil {
		return nil, fmt.Errorf("generating the synthetic demo world: %w", err)
	}
	rp := filepath.Join(data, fixtures.RecipeFile)
	res := filepath.Join(dir, "results")
	r, err := config.Load(rp, config.LoadOptions{LookupEnv: config.NoEnvironment, Flags: map[string]string{"output.dir": res}})
	if err != nil {
		return nil, err
	}
	ro := opt.Options
	ro.OutDir = ""
	reps, err := Run(ctx, r, nil, ro)
	if err != nil {
		return nil, err
	}
	dr := &DemoReport{DataDir: data, RecipePath: rp, Reports: reps, Truth: truth}
	dr.Checks = demoChecks(reps[0], truth)
	return dr, nil
}

func demoChecks(rep Report, t *fixtures.Truth) []Check {
	acc := rep.Result.Acc
	var out []Check
	// Per-cell convective fraction: the largest difference over ocean cells.
	cf := acc.ConvectiveFraction()
	worst := 0.0
	n := 0
	for i, want := range t.Cells.ConvectiveFraction {
		if want != want || i >= len(cf) {
			continue
		}
		n++
		worst = math.Max(worst, math.Abs(cf[i]-want))
	}
	out = append(out, Check{What: fmt.Sprintf("largest per-column difference of the convective fraction (%d ocean columns)", n), Got: worst, Want: 0, Tol: 1e-9, Units: "1"})
	// Band convective area fraction, time mean.
	var sum float64
	for _, p := range acc.Series {
		sum += p.AreaFraction[regimes.Convective]
	}
	out = append(out, Check{What: "band convective area fraction, time mean", Got: sum / float64(len(acc.Series)), Want: t.Convective.AreaFraction, Tol: 1e-6, Units: "1"})
	// Regime means over the band (area-time weighted).
	q := map[string]int{}
	for i, name := range acc.L.Quantities {
		q[name] = i
	}
	mean := func(name string, r regimes.Regime) float64 {
		var sw, swx float64
		vals := acc.Cells.Values[q[name]][r]
		for i, w := range acc.L.BandWeight {
			if w > 0 && vals[i].W > 0 {
				sw += w * vals[i].W
				swx += w * vals[i].W * vals[i].Mean
			}
		}
		return swx / sw
	}
	out = append(out,
		Check{What: "subsidence-regime mean EIS over the band", Got: mean("eis", regimes.Subsidence), Want: t.Subsidence.MeanEIS, Tol: 1e-3, Units: "K"},
		Check{What: "subsidence-regime mean low cloud over the band", Got: mean("cloud", regimes.Subsidence), Want: t.Subsidence.MeanCloud, Tol: 1e-4, Units: "1"},
		Check{What: "convective-regime mean SST over the band", Got: mean("sst", regimes.Convective), Want: t.Convective.MeanSST, Tol: 1e-3, Units: "K"},
	)
	return out
}

// WriteSummary prints a short human summary of the demo.
func (d *DemoReport) WriteSummary(w io.Writer) {
	fmt.Fprintln(w, "lidscope demo — a synthetic world of invented data (not observations)")
	fmt.Fprintf(w, "  input files and recipe: %s\n", d.DataDir)
	for _, r := range d.Reports {
		res := r.Result
		fmt.Fprintf(w, "  dataset %s: %d time steps (%s), grid %s\n", r.Dataset, len(res.Labels), r.Meta.Period, res.Grid)
		fmt.Fprintf(w, "  regimes: %s\n", r.Meta.RegimeDefinition)
		fmt.Fprintf(w, "  results: %s\n", r.OutDir)
		for _, f := range r.Files {
			fmt.Fprintf(w, "    %s\n", filepath.Base(f))
		}
	}
	fmt.Fprintln(w, "  recovered vs built into the world:")
	for _, c := range d.Checks {
		mark := "ok"
		if !c.OK() {
			mark = "MISMATCH"
		}
		fmt.Fprintf(w, "    %-8s %s: %.6g (truth %.6g) %s\n", mark, c.What, c.Got, c.Want, c.Units)
	}
	fmt.Fprintf(w, "  true subsidence cloud–EIS slope: %.4g per K (sample fit %.4g ± %.2g)\n", d.Truth.CloudEIS.TrueSlope, d.Truth.CloudEIS.SampleSlope, d.Truth.CloudEIS.SlopeSEAR1)
}
