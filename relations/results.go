package relations

import (
	"errors"
	"fmt"
	"math"

	"lidscope/regimes"
)

// Interval is a two-sided 95 % confidence interval.
type Interval struct{ Lo, Hi float64 }

func nanInterval() Interval { return Interval{math.NaN(), math.NaN()} }

// Domain is where statistics are pooled: the tropical band (cells with
// band weight, weighted by their area inside the band) or a named region
// (cells whose centres lie in the box, weighted by cell area).
type Domain struct {
	Name                     string
	Band                     bool
	South, North, West, East float64 // the box of a region (zero for the band)
}

// Variable is a predictor or response with its units; Edges are the bin
// edges of a predictor.
type Variable struct {
	Name, Units string
	Edges       []float64
}

// BinStat are the statistics of one bin.
type BinStat struct {
	Lower, Upper float64
	N            int64   // cell-steps
	Steps        int     // distinct time steps contributing
	Area         float64 // Σ weights, m² × steps
	Mean, Std    float64 // area-weighted mean and population standard deviation
	NEff         float64 // effective sample size (see the package documentation)
	StdErr       float64 // Std/√(NEff − 1)
}

// Binned is a binned relationship of one response against one predictor.
type Binned struct {
	Domain, Season       string
	Regime               regimes.Regime
	Predictor, Response  string
	PredUnits, RespUnits string
	Bins                 []BinStat
	OutOfRange           int64   // samples with a valid predictor outside the edges
	R1                   float64 // lag-1 autocorrelation of the domain-mean response series used for NEff
}

// Joint is the 2-D composite of one response over relative SST × EIS bins.
type Joint struct {
	Domain, Season    string
	Response, Units   string
	RelEdges, EISEdge []float64
	// Mean, Frequency, Count and Area are [rel_sst bin][eis bin], flattened
	// row-major. Frequency is the bin's share of the area × time of all
	// samples with both predictors valid (in or out of range).
	Mean, Frequency []float64
	Count           []int64
	Area            []float64
}

// Boot is a block-bootstrap percentile interval.
type Boot struct {
	Replicates, Failed int
	Slope, R           Interval
}

// Regression is a weighted least-squares line of a response on one predictor.
type Regression struct {
	Domain, Season      string
	Regime              regimes.Regime
	Response, Predictor string
	SlopeUnits, Units   string // slope units, response (intercept) units
	N                   int64
	Steps               int
	Area                float64
	Slope, SlopeSE      float64
	SlopeCI             Interval // Student t, NEffSlope − 2 dof
	Intercept           float64
	InterceptSE         float64
	InterceptCI         Interval
	R                   float64
	RCI                 Interval // Fisher z, NEffCorr
	NEffSlope, NEffCorr float64
	R1X, R1Y, R1Resid   float64 // lag-1 autocorrelations of the domain-mean series
	IndependentAreas    float64
	Boot                *Boot
	Note                string
}

// Partial is the two-predictor regression y = a + b1 x1 + b2 x2.
type Partial struct {
	Domain, Season   string
	Regime           regimes.Regime
	Response         string
	Predictors       [2]string
	CoefUnits, Units string
	N                int64
	Steps            int
	Area             float64
	Coef, SE         [2]float64
	CI               [2]Interval // Student t, NEff − 3 dof
	Intercept        float64
	R2               float64
	NEff             float64
	R1X              [2]float64
	R1Resid          float64
	IndependentAreas float64
	Boot             []Interval // per coefficient, when bootstrapped
	BootReplicates   int
	BootFailed       int
	Note             string
}

// FlipRow is the flip statistics of one patch for one ΔT.
type FlipRow struct {
	DeltaT float64 // K
	// Inside the patch (weights: cell area), over ocean area × time.
	Changed, ToConvective, FromConvective float64
	ConvectiveBefore, ConvectiveAfter     float64
	// Outside the patch inside the band (weights: band area).
	OutChanged, OutToConvective, OutFromConvective float64
	OutConvectiveBefore, OutConvectiveAfter        float64
}

// PatchFlips are the flips of one patch.
type PatchFlips struct {
	Patch               Patch
	Cells               int
	AreaTime            float64 // Σ ocean area × steps inside, m²
	OutAreaTime         float64 // Σ band ocean area × steps outside, m²
	FMean, FMin, FMax   float64 // the patch's share of the band ocean area
	Steps               int
	Rows                []FlipRow
	ConvectiveFraction0 float64
}

// YearThreshold is the threshold estimated from one year's steps.
type YearThreshold struct {
	Year          int
	Steps         int
	N             int64
	Rel, Abs      float64 // K
	TropicalMean  float64 // K
	LogisticSlope float64 // K-1
	Note          string
}

// Threshold is the logistic-regression estimate of the relative SST at
// which convection (per the indicator) becomes more likely than not.
type Threshold struct {
	Indicator, Condition string
	IndicatorThreshold   float64
	IndicatorUnits       string
	N                    int64
	Area                 float64
	OutOfRange           int64
	B0, B1               float64 // logistic coefficients (B1 in K-1)
	Rel, Abs             float64 // K
	RelCI, AbsCI         Interval
	TropicalMean         float64
	Replicates, Failed   int
	Years                []YearThreshold
	// Tracking is the slope of the yearly absolute threshold on the yearly
	// tropical-mean SST (1 = the threshold tracks the tropical mean),
	// with a Student-t CI over the years (years taken as independent).
	Tracking   float64
	TrackingCI Interval
	Note       string
}

// OmegaBin is one omega500 bin of a composite.
type OmegaBin struct {
	Lower, Upper float64 // hPa d-1
	N            int64
	Area         float64
	Frequency    float64 // share of the area × time of valid omega samples
	PDF          float64 // Frequency / bin width, (hPa d-1)-1
}

// OmegaComposite are the omega-regime composites of one domain and season.
type OmegaComposite struct {
	Domain, Season string
	Bins           []OmegaBin
	OutOfRange     int64
	// Responses: per response, Mean and Std per bin.
	Responses []OmegaResponse
}

// OmegaResponse is one response composited by omega500 bin.
type OmegaResponse struct {
	Response, Units string
	Mean, Std       []float64
	N               []int64
}

// Results are everything the accumulator found.
type Results struct {
	Mode             Mode
	Detrended        bool
	ModeNote         string
	Config           string // Config.Text()
	RegimeDefinition string
	Uncertainty      string
	Steps            int
	First, Last      string
	Years            int
	Domains          []Domain
	Seasons          []string
	Predictors       []Variable
	Responses        []Variable
	Binned           []Binned
	Joint            []Joint
	Regressions      []Regression
	Partials         []Partial
	Flips            []PatchFlips
	Threshold        *Threshold
	Omega            []OmegaComposite
	Notes            []string
}

// ModeNote says what a mode's slopes are and why they are not comparable
// across modes.
func ModeNote(m Mode) string {
	if m == Anomaly {
		return "deseasonalised monthly anomalies (each cell and calendar month minus its climatology of the record): partial sensitivities of the order of 1–2 % per K, not comparable with climatological composite slopes"
	}
	return "climatological composites of the values over space and time: slopes of the order of 6 % per K (Klein & Hartmann 1993; Wood & Bretherton 2006) that mix geographic and seasonal contrasts, not comparable with anomaly partial sensitivities"
}

// UncertaintyText describes how the confidence intervals are made.
func (c Config) uncertaintyText() string {
	s := fmt.Sprintf("95 %% intervals. Effective sample size of pooled cell-steps: N_eff = min(N, M·T·(1 − r1 r2)/(1 + r1 r2)) (Bretherton et al. 1999, J. Climate 12, eq. 31; eq. 30 with one series for a mean), T time steps, r1 r2 lag-1 autocorrelations of the domain-mean series (slope: predictor and residual; correlation: predictor and response; bin means: response), factor capped at 1, M = min(cells per step, max(1, area per step / L²)) with decorrelation length L = %g m. Slopes: Student t with N_eff − 2 dof (N_eff − 3 for the two-predictor fit); correlation: Fisher z with N_eff − 3; bin means: std/√(N_eff − 1).", c.DecorrelationLength)
	if c.Bootstrap.N > 0 {
		s += fmt.Sprintf(" Also circular block bootstrap over time steps (Politis & Romano 1992): %d replicates, blocks of %d steps, seed %d, percentile intervals.", c.Bootstrap.N, c.Bootstrap.BlockLength, c.Bootstrap.Seed)
	}
	if c.Indicator != "" {
		s += fmt.Sprintf(" Threshold: circular block bootstrap, %d replicates, blocks of %d steps, seed %d, percentile intervals.", c.ThresholdReplicates, c.Bootstrap.BlockLength, c.Bootstrap.Seed)
	}
	return s
}

// Results computes the tables, regressions, flips, threshold and omega
// composites from what was accumulated.
func (a *Acc) Results() (*Results, error) {
	if len(a.steps) == 0 {
		return nil, errors.New("relations: no time step was added (call AddStep once per step)")
	}
	c := a.cfg
	res := &Results{Mode: c.Mode, Detrended: c.Detrend, ModeNote: ModeNote(c.Mode), Config: c.Text(),
		RegimeDefinition: c.regimeText(), Uncertainty: c.uncertaintyText(), Steps: len(a.steps),
		First: a.steps[0].label, Last: a.steps[len(a.steps)-1].label}
	years := map[int]bool{}
	for _, s := range a.steps {
		years[s.year] = true
	}
	res.Years = len(years)
	for d, r := range a.doms {
		if d == 0 {
			res.Domains = append(res.Domains, Domain{Name: BandDomain, Band: true})
			continue
		}
		res.Domains = append(res.Domains, Domain{Name: r.Name, South: r.South, North: r.North, West: r.West, East: r.East})
	}
	res.Seasons = seasonNames[:a.ns]
	for p, name := range a.preds {
		res.Predictors = append(res.Predictors, Variable{Name: name, Units: "K", Edges: a.edges[p]})
	}
	for _, name := range a.resp {
		u, _ := unitsOf(name)
		res.Responses = append(res.Responses, Variable{Name: name, Units: u})
	}
	ser := a.series()
	a.regressions(res, ser)
	a.binnedResults(res, ser)
	a.jointResults(res)
	a.omegaResults(res)
	a.flipResults(res)
	if a.indQ >= 0 {
		t, err := a.threshold()
		if err != nil {
			return nil, err
		}
		res.Threshold = t
	}
	return res, nil
}

// group is one (domain, season, regime, response) pool.
type group struct {
	d, s, g, r int
	tot        CoMoments
	present    []bool
	means      [][]float64 // [variable][step] domain means
	steps      int
}

// series merges the per-step co-moments of every group and extracts the
// per-step domain-mean series.
func (a *Acc) series() []*group {
	nd, nr, T := len(a.doms), len(a.resp), len(a.steps)
	out := make([]*group, 0, nd*a.ns*nreg*nr)
	for d := 0; d < nd; d++ {
		for s := 0; s < a.ns; s++ {
			for g := 0; g < nreg; g++ {
				for r := 0; r < nr; r++ {
					gr := &group{d: d, s: s, g: g, r: r, tot: NewCoMoments(a.K), present: make([]bool, T), means: make([][]float64, a.K)}
					for k := range gr.means {
						gr.means[k] = make([]float64, T)
					}
					idx := (d*nreg+g)*nr + r
					for t, st := range a.steps {
						if s > 0 && seasonOf(st.month) != s {
							continue
						}
						cm := &st.cm[idx]
						if cm.W == 0 {
							continue
						}
						gr.tot.Merge(*cm)
						gr.present[t] = true
						gr.steps++
						for k := 0; k < a.K; k++ {
							gr.means[k][t] = cm.Mean[k]
						}
					}
					out = append(out, gr)
				}
			}
		}
	}
	return out
}

func (a *Acc) sizes(gr *group) sizeInputs {
	return sizeInputs{n: float64(gr.tot.N), steps: float64(gr.steps), area: gr.tot.W, l2: a.cfg.DecorrelationLength * a.cfg.DecorrelationLength}
}

// binnedResults fills the binned tables.
func (a *Acc) binnedResults(res *Results, groups []*group) {
	nr, np := len(a.resp), len(a.preds)
	l2 := a.cfg.DecorrelationLength * a.cfg.DecorrelationLength
	for _, gr := range groups {
		var notes []string
		r1 := lag1Or0(gr.means[a.K-1], gr.present, &notes, "response")
		ds := gr.d*a.ns + gr.s
		ru, _ := unitsOf(a.resp[gr.r])
		for p := 0; p < np; p++ {
			bt := Binned{Domain: a.doms[gr.d].Name, Season: seasonNames[gr.s], Regime: regimes.Regime(gr.g),
				Predictor: a.preds[p], Response: a.resp[gr.r], PredUnits: "K", RespUnits: ru,
				OutOfRange: a.outCnt[(ds*nreg+gr.g)*np+p], R1: r1}
			e := a.edges[p]
			base := (ds*nreg+gr.g)*nr*a.nbTot + gr.r*a.nbTot + a.boff[p]
			for b := 0; b+1 < len(e); b++ {
				st := a.binned[base+b]
				bs := BinStat{Lower: e[b], Upper: e[b+1], N: st.m.N, Steps: int(st.steps), Area: st.m.W,
					Mean: st.m.MeanOrNaN(), Std: st.m.Std()}
				sz := sizeInputs{n: float64(st.m.N), steps: float64(st.steps), area: st.m.W, l2: l2}
				bs.NEff = sz.pooled(meanFactor(r1))
				bs.StdErr = math.NaN()
				if bs.NEff > 1 {
					bs.StdErr = bs.Std / math.Sqrt(bs.NEff-1)
				}
				bt.Bins = append(bt.Bins, bs)
			}
			res.Binned = append(res.Binned, bt)
		}
	}
	_ = nr
}

func (a *Acc) jointResults(res *Results) {
	if !a.jointOn {
		return
	}
	nr := len(a.resp)
	for d := range a.doms {
		for s := 0; s < a.ns; s++ {
			ds := d*a.ns + s
			for r := 0; r < nr; r++ {
				ru, _ := unitsOf(a.resp[r])
				j := Joint{Domain: a.doms[d].Name, Season: seasonNames[s], Response: a.resp[r], Units: ru,
					RelEdges: a.edges[a.jRel], EISEdge: a.edges[a.jEIS]}
				for k := 0; k < a.nJ; k++ {
					m := a.jointM[(ds*nr+r)*a.nJ+k]
					j.Mean = append(j.Mean, m.MeanOrNaN())
					ar := a.jointArea[ds*a.nJ+k]
					f := math.NaN()
					if a.jointTotal[ds] > 0 {
						f = ar / a.jointTotal[ds]
					}
					j.Frequency = append(j.Frequency, f)
					j.Count = append(j.Count, a.jointCount[ds*a.nJ+k])
					j.Area = append(j.Area, ar)
				}
				res.Joint = append(res.Joint, j)
			}
		}
	}
}

func (a *Acc) omegaResults(res *Results) {
	if !a.omegaOn {
		return
	}
	nr := len(a.resp)
	for d := range a.doms {
		for s := 0; s < a.ns; s++ {
			ds := d*a.ns + s
			oc := OmegaComposite{Domain: a.doms[d].Name, Season: seasonNames[s], OutOfRange: a.omegaOut[ds]}
			for b := 0; b < a.nO; b++ {
				ar := a.omegaArea[ds*a.nO+b]
				ob := OmegaBin{Lower: omegaLo + float64(b)*omegaStep, Upper: omegaLo + float64(b+1)*omegaStep,
					N: a.omegaCount[ds*a.nO+b], Area: ar, Frequency: math.NaN(), PDF: math.NaN()}
				if t := a.omegaTotal[ds]; t > 0 {
					ob.Frequency = ar / t
					ob.PDF = ob.Frequency / omegaStep
				}
				oc.Bins = append(oc.Bins, ob)
			}
			for r := 0; r < nr; r++ {
				ru, _ := unitsOf(a.resp[r])
				or := OmegaResponse{Response: a.resp[r], Units: ru}
				for b := 0; b < a.nO; b++ {
					m := a.omegaM[(ds*nr+r)*a.nO+b]
					or.Mean = append(or.Mean, m.MeanOrNaN())
					or.Std = append(or.Std, m.Std())
					or.N = append(or.N, m.N)
				}
				oc.Responses = append(oc.Responses, or)
			}
			res.Omega = append(res.Omega, oc)
		}
	}
}

func ratio(a, b float64) float64 {
	if b > 0 {
		return a / b
	}
	return math.NaN()
}

func (a *Acc) flipResults(res *Results) {
	for _, pa := range a.patches {
		pf := PatchFlips{Patch: pa.p, Cells: len(pa.cells), Steps: pa.fSteps, FMean: math.NaN(), FMin: pa.fMin, FMax: pa.fMax}
		if pa.fSteps > 0 {
			pf.FMean = pa.fSum / float64(pa.fSteps)
		} else {
			pf.FMin, pf.FMax = math.NaN(), math.NaN()
		}
		for k, dt := range a.cfg.DeltaT {
			s := pa.sums[k]
			pf.AreaTime, pf.OutAreaTime = s.inArea, s.outArea
			pf.ConvectiveFraction0 = ratio(s.inConvBefore, s.inArea)
			pf.Rows = append(pf.Rows, FlipRow{DeltaT: dt,
				Changed: ratio(s.inChanged, s.inArea), ToConvective: ratio(s.inToConv, s.inArea), FromConvective: ratio(s.inFromConv, s.inArea),
				ConvectiveBefore: ratio(s.inConvBefore, s.inArea), ConvectiveAfter: ratio(s.inConvAfter, s.inArea),
				OutChanged: ratio(s.outChanged, s.outArea), OutToConvective: ratio(s.outToConv, s.outArea), OutFromConvective: ratio(s.outFromConv, s.outArea),
				OutConvectiveBefore: ratio(s.outConvBefore, s.outArea), OutConvectiveAfter: ratio(s.outConvAfter, s.outArea)})
		}
		res.Flips = append(res.Flips, pf)
	}
}

// ConvectiveChange is the change of the convective area fraction inside
// the patch (After − Before).
func (r FlipRow) ConvectiveChange() float64 { return r.ConvectiveAfter - r.ConvectiveBefore }

// OutConvectiveChange is the change outside the patch, inside the band.
func (r FlipRow) OutConvectiveChange() float64 { return r.OutConvectiveAfter - r.OutConvectiveBefore }

// addNote appends a sentence to a note.
func addNote(note *string, s string) {
	if *note != "" {
		*note += "; "
	}
	*note += s
}
