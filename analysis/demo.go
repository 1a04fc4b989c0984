package analysis

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"strings"

	"lidscope/compare"
	"lidscope/config"
	"lidscope/constraint"
	"lidscope/fixtures"
	"lidscope/regimes"
	"lidscope/runfolder"
	"lidscope/vocab"
)

// DemoReport is the outcome of the demo: where things went, and how the
// analysis compares with what the synthetic worlds were built to contain.
type DemoReport struct {
	DataDir, StudyPath string
	Reports            []Report
	Truth              *fixtures.Truth
	Checks             []Check
	// The second synthetic world, a "model" with other sensitivities, and
	// its comparison with the first.
	ModelDataDir string
	ModelTruth   *fixtures.Truth
	Comparison   *compare.Result
	CompareDir   string
	// The model's warm twin and the constraint of the model by the
	// reference world (with Options.Factors, as the demo's default).
	WarmDataDir   string
	WarmTruth     *fixtures.Truth
	Constraint    *constraint.Result
	ConstraintDir string
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
	// Scenario sets the synthetic world (fixtures.DefaultOptions() when nil).
	Scenario *fixtures.Options
	// Model sets the second world; nil derives it from Scenario with
	// ModelPhysics.
	Model *fixtures.Options
}

// ModelScenario is the demo's synthetic "model": the same grid, period
// and calendar as obs, with a weaker low-cloud sensitivity to EIS, a
// stronger warm pool and weaker upwelling (invented, to show a model that
// differs from the reference in known ways).
func ModelScenario(obs fixtures.Options) fixtures.Options {
	m := obs
	m.Name = "synthetic-model"
	m.Seed = obs.Seed + 1
	m.Physics.CloudSlope = 0.03
	m.Physics.SensRH700 = 0.1
	m.Physics.WarmPool = obs.Physics.WarmPool + 0.5
	m.Physics.Upwelling = obs.Physics.Upwelling - 1
	return m
}

// Demo generates the synthetic demo world into dir/data and a synthetic
// model into dir/data-model, runs the full analysis of both into
// dir/results, checks each against its known truth, and compares the
// model with the reference world into dir/results/comparison.
func Demo(ctx context.Context, dir string, opt DemoOptions) (*DemoReport, error) {
	so := fixtures.DefaultOptions()
	so.Factors = true
	if opt.Scenario != nil {
		so = *opt.Scenario
	}
	mo := ModelScenario(so)
	if opt.Model != nil {
		mo = *opt.Model
	}
	// Absolute: config resolves a relative output.dir against the study's
	// folder (dir/data), not against the working directory.
	res, err := filepath.Abs(filepath.Join(dir, "results"))
	if err != nil {
		return nil, fmt.Errorf("the demo folder %s: %w", dir, err)
	}
	dr := &DemoReport{}
	worlds := []fixtures.Options{so, mo}
	if so.Factors && mo.Factors {
		worlds = append(worlds, fixtures.WarmTwin(mo, DemoWarming))
	}
	for k, sc := range worlds {
		sc.Command = opt.Command
		data := filepath.Join(dir, []string{"data", "data-model", "data-model-warm"}[k])
		truth, err := generateWorld(ctx, data, sc, opt)
		if err != nil {
			return nil, fmt.Errorf("generating the synthetic world %s: %w", sc.Name, err)
		}
		rp := filepath.Join(data, fixtures.StudyFile)
		if sc.Factors {
			rp = filepath.Join(data, fixtures.FactorStudyFile)
		}
		r, err := config.Load(rp, config.LoadOptions{LookupEnv: config.NoEnvironment, Flags: map[string]string{"output.dir": res}})
		if err != nil {
			return nil, err
		}
		ro := opt.Options
		ro.OutDir = ""
		ro.NoCoastlines = true // invented continents: Earth's coastlines would mislead
		reps, err := Run(ctx, r, nil, ro)
		if err != nil {
			return nil, err
		}
		dr.Reports = append(dr.Reports, reps...)
		for _, c := range demoChecks(reps[0], truth) {
			c.What = sc.Name + ": " + c.What
			dr.Checks = append(dr.Checks, c)
		}
		switch k {
		case 0:
			dr.DataDir, dr.StudyPath, dr.Truth = data, rp, truth
		case 1:
			dr.ModelDataDir, dr.ModelTruth = data, truth
		default:
			dr.WarmDataDir, dr.WarmTruth = data, truth
		}
	}
	dr.CompareDir = filepath.Join(res, "comparison")
	co := CompareOptions{Options: opt.Options}
	co.NoCoastlines = true // the synthetic worlds' continents are invented
	cr, _, err := CompareDirs(dr.Reports[0].OutDir, []string{dr.Reports[1].OutDir}, dr.CompareDir, co)
	if err != nil {
		return nil, fmt.Errorf("comparing the synthetic model with the reference: %w", err)
	}
	dr.Comparison = cr
	if dr.WarmTruth != nil {
		if err := demoConstraint(ctx, dr, res, opt); err != nil {
			return nil, err
		}
	}
	return dr, nil
}

// DemoWarming is the uniform SST warming of the demo model's warm twin, K.
const DemoWarming = 4

// demoConstraint constrains the demo model (its control and warm runs) by
// the reference world and checks the result against the planted answer.
func demoConstraint(ctx context.Context, dr *DemoReport, res string, opt DemoOptions) error {
	dr.ConstraintDir = filepath.Join(res, "constraint")
	co := ConstrainOptions{Options: opt.Options, Constraint: constraint.Options{WarmingFrom: "sst"}}
	cres, _, err := Constrain(ctx, dr.Reports[0].OutDir, dr.Reports[1].OutDir, dr.Reports[2].OutDir, dr.ConstraintDir, co)
	if err != nil {
		return fmt.Errorf("constraining the synthetic model by the reference world: %w", err)
	}
	dr.Constraint = cres
	// The planted answer: the reference world's planted sensitivities
	// times the model's factor changes, over the band's subsidence regime
	// (the last entry of PlantedChange), and the model's own change.
	planted, err := fixtures.PlantedChange(dr.ModelTruth, dr.WarmTruth, dr.Truth.Factors.Planted)
	if err != nil {
		return err
	}
	own, err := fixtures.PlantedChange(dr.ModelTruth, dr.WarmTruth, nil)
	if err != nil {
		return err
	}
	// The planted model is linear only where the cloud stays in the
	// subsidence regime: the four upwelling decks. (Over the band's
	// subsidence regime, cells that cross into the convective regime,
	// whose cloud is a constant, make the domain-mean response nonlinear
	// in SST; see the README's cautions.)
	name := "constraint of " + dr.ModelTruth.Options.Name + " by " + dr.Truth.Options.Name + ": "
	dr.Checks = append(dr.Checks, Check{What: name + "global-mean SST warming from the runs' maps", Got: cres.Warming,
		Want: planted[0].Warming, Tol: 1e-3, Units: "K"})
	for i, p := range planted {
		if !strings.HasPrefix(p.Name, "upwelling_") {
			continue
		}
		d, ok := cres.Domain(p.Name, "all")
		if !ok {
			return fmt.Errorf("the demo constraint has no result for region %s", p.Name)
		}
		dr.Checks = append(dr.Checks,
			Check{What: name + fmt.Sprintf("%s: constrained low-cloud change per K vs the planted answer (within its %g %% interval)", p.Name, 100*cres.Level),
				Got: d.Constrained.Value, Want: p.Planted, Tol: d.Constrained.Hi - d.Constrained.Value, Units: "K-1"},
			Check{What: name + p.Name + ": the model's actual low-cloud change per K", Got: d.Actual.Value, Want: own[i].Cloud, Tol: 1e-6, Units: "K-1"})
	}
	return nil
}

// generateWorld writes a synthetic world into the folder data as one unit
// (package runfolder): generated into a staging folder beside it and moved
// into place whole, so that --force over an earlier world of another size
// or period leaves none of its files (they would join the new record:
// "files of one record must share a grid"). Without Force an earlier
// world is refused; a folder holding files that are not a demo world's is
// refused even with Force.
func generateWorld(ctx context.Context, data string, sc fixtures.Options, opt DemoOptions) (*fixtures.Truth, error) {
	st, err := runfolder.Create(data, runfolder.Options{Replace: opt.Force, Known: worldNames(data), Version: opt.Version})
	if errors.Is(err, fs.ErrExist) {
		return nil, worldExistsError(data)
	}
	if err != nil {
		return nil, err
	}
	defer st.Close()
	truth, err := fixtures.Generate(st.Dir(), sc)
	if err != nil {
		return nil, err
	}
	if _, err := st.Commit(ctx); err != nil {
		return nil, err
	}
	return truth, nil
}

// worldExistsError refuses to replace an earlier demo world without
// Force (errors.Is fs.ErrExist).
type worldExistsError string

func (e worldExistsError) Error() string {
	return string(e) + " holds an earlier demo world; use --force to replace it whole (it stays untouched until the new one is complete) or choose another --out"
}

func (worldExistsError) Unwrap() error { return fs.ErrExist }

// worldNames are the names an earlier demo world in data may hold: its
// study and truth files and the top-level names of the files its
// truth.json lists (read loosely, so that a world of an older format is
// recognised too).
func worldNames(data string) []string {
	names := []string{fixtures.StudyFile, fixtures.FactorStudyFile, fixtures.TruthFile}
	b, err := os.ReadFile(filepath.Join(data, fixtures.TruthFile))
	if err != nil {
		return names
	}
	var t struct {
		Files map[string][]string `json:"files"`
	}
	if json.Unmarshal(b, &t) != nil {
		return names
	}
	for _, fs := range t.Files {
		for _, f := range fs {
			first, _, _ := strings.Cut(filepath.ToSlash(filepath.Clean(f)), "/")
			if first != "" && first != "." && first != ".." {
				names = append(names, first)
			}
		}
	}
	return names
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
		for i, w := range acc.L.BandWeight {
			if m := acc.Moments(q[name], r, i); w > 0 && m.W > 0 {
				sw += w * m.W
				swx += w * m.W * m.Mean
			}
		}
		return swx / sw
	}
	out = append(out,
		Check{What: "subsidence-regime mean EIS over the band", Got: mean("eis", regimes.Subsidence), Want: t.Subsidence.MeanEIS, Tol: 1e-3, Units: "K"},
		Check{What: "subsidence-regime mean low cloud over the band", Got: mean(acc.L.Cloud, regimes.Subsidence), Want: t.Subsidence.MeanCloud, Tol: 1e-4, Units: "1"},
		Check{What: "convective-regime mean SST over the band", Got: mean("sst", regimes.Convective), Want: t.Convective.MeanSST, Tol: 1e-3, Units: "K"},
	)
	return out
}

// WriteSummary prints a short human summary of the demo.
func (d *DemoReport) WriteSummary(w io.Writer) {
	fmt.Fprintln(w, "lidscope demo — two synthetic worlds of invented data (not observations)")
	fmt.Fprintf(w, "  reference world: %s\n  synthetic model: %s\n", d.DataDir, d.ModelDataDir)
	for _, r := range d.Reports {
		res := r.Result
		fmt.Fprintf(w, "  dataset %s: %d time steps (%s), grid %s\n", r.Dataset, len(res.Labels), r.Meta.Period, res.Grid)
		fmt.Fprintf(w, "    results: %s\n", r.OutDir)
	}
	if len(d.Reports) > 0 {
		fmt.Fprintf(w, "  regimes: %s\n", d.Reports[0].Meta.Regimes)
	}
	fmt.Fprintln(w, "  recovered vs built into the worlds:")
	for _, c := range d.Checks {
		mark := vocab.Pass
		if !c.OK() {
			mark = vocab.Fail
		}
		fmt.Fprintf(w, "    %-8s %s: %.6g%s (truth %.6g%s)\n", mark, c.What, c.Got, spaceUnits(c.Units), c.Want, spaceUnits(c.Units))
	}
	fmt.Fprintf(w, "  true subsidence cloud–EIS slope: reference %.3g K-1, model %.3g K-1\n", d.Truth.CloudEIS.TrueSlope, d.ModelTruth.CloudEIS.TrueSlope)
	if d.Comparison != nil {
		fmt.Fprintf(w, "  comparison (model − reference): %s\n", d.CompareDir)
		for _, c := range d.Comparison.Candidates {
			for _, m := range c.Maps {
				fmt.Fprintf(w, "    %-22s pattern correlation %.3f, centred RMS difference %.3g%s, bias %+.3g%s\n", m.Name, m.Corr, m.CRMS, spaceUnits(m.Units), m.Bias, spaceUnits(m.Units))
			}
			fmt.Fprintf(w, "    %-34s %10s  %10s\n", "", "reference", "model")
			for _, s := range c.Scalars {
				fmt.Fprintf(w, "    %-34s %10.4g  %10.4g  (%s%s)\n", s.Name, s.Ref, s.Cand, differenceText(s.Diff, s.Ref, s.Cand), spaceUnits(s.Units))
			}
		}
		compare.WriteEstimates(w, d.Comparison, "    ")
	}
	if c := d.Constraint; c != nil {
		fmt.Fprintf(w, "  observational constraint of %s (control and a %g K warmer twin) by %s: %s\n", c.Control.Dataset, float64(DemoWarming), c.Observations.Dataset, d.ConstraintDir)
		if i := Headline(c); i < len(c.Domains) {
			dm := c.Domains[i]
			pc := func(e constraint.Estimate) string {
				return fmt.Sprintf("%+.3g %% per K [%+.3g, %+.3g]", 100*e.Value, 100*e.Lo, 100*e.Hi)
			}
			fmt.Fprintf(w, "    low-cloud change per K of warming, %s %s (warming %.4g K from SST):\n", dm.Domain, dm.Regime, c.Warming)
			fmt.Fprintf(w, "      constrained (observed sensitivities x model's factor changes) %s\n", pc(dm.Constrained))
			fmt.Fprintf(w, "      predicted (model's own sensitivities x its factor changes)   %s\n", pc(dm.Predicted))
			fmt.Fprintf(w, "      the model's actual change                                  %s\n", pc(dm.Actual))
			for _, f := range dm.Factors {
				fmt.Fprintf(w, "      %-9s contribution %+.3g %% per K (observed sensitivity %.3g, model %.3g; model change %.3g%s per K)\n",
					f.Factor, 100*f.Contribution, f.ObsCoef, f.ModelCoef, f.PerKelvin, spaceUnits(f.Units))
			}
		}
	}
}

// differenceText writes a candidate − reference difference with three
// significant digits, and as "0" when it is rounding noise of the two
// values (below 1e-9 of the larger: +3.61e-16 between two runs' 0.1 is
// float arithmetic, not a difference).
func differenceText(d, ref, cand float64) string {
	if math.Abs(d) <= 1e-9*math.Max(math.Abs(ref), math.Abs(cand)) {
		return "0"
	}
	return fmt.Sprintf("%+.3g", d)
}

// spaceUnits is the units text printed after a console number: " K" for
// K, nothing for the dimensionless "1" (a fraction reads better without a
// dangling 1; the files keep their units attribute "1").
func spaceUnits(u string) string {
	if u == "" || u == "1" {
		return ""
	}
	return " " + u
}
