// The co-moment regressions of the results: simple lines with effective
// sample sizes and the block bootstrap over years.

package relations

import (
	"math"
	"math/rand/v2"
	"sort"
	"strings"

	"lidscope/regimes"
	"lidscope/vocab"
)

// lag1Or0 is Lag1, with 0 (no reduction) when it cannot be estimated.
func lag1Or0(z []float64, present []bool, note *[]string, what string) float64 {
	r := Lag1(z, present)
	if r != r {
		*note = append(*note, "lag-1 autocorrelation of the "+what+" series not estimable (fewer than 3 steps or no variance); taken as 0")
		return 0
	}
	return r
}

func slopeUnits(resp string) string {
	u, _ := unitsOf(resp)
	return vocab.SlopeUnits(u, vocab.UnitKelvin)
}

func (a *Acc) regressions(res *Results, groups []*group) {
	var boot [][]float64 // per group, per (pred slope, pred r, partial coef 1, 2) replicate values
	if a.cfg.Bootstrap.N > 0 {
		boot = a.bootstrapRegressions(groups)
	}
	np := len(a.preds)
	for gi, gr := range groups {
		if gr.tot.N == 0 {
			continue
		}
		dom, season, resp := a.doms[gr.d].Name, seasonNames[gr.s], a.resp[gr.r]
		ru, _ := unitsOf(resp)
		sz := a.sizes(gr)
		y := gr.means[a.K-1]
		for p := 0; p < np; p++ {
			px := a.predX[p]
			l := gr.tot.Simple(px, a.K-1)
			var notes []string
			reg := Regression{Domain: dom, Season: season, Regime: regimes.Regime(gr.g), Response: resp, Predictor: a.preds[p],
				SlopeUnits: slopeUnits(resp), Units: ru, N: l.N, Steps: gr.steps, Area: l.W,
				Slope: l.Slope, Intercept: l.Intercept, R: l.R, IndependentAreas: sz.independentAreas()}
			x := gr.means[px]
			e := make([]float64, len(x))
			for t := range e {
				e[t] = y[t] - l.Intercept - l.Slope*x[t]
			}
			if l.Degenerate {
				notes = append(notes, "the predictor has no spread (or fewer than 2 samples): no fit")
			}
			reg.R1X = lag1Or0(x, gr.present, &notes, "predictor")
			reg.R1Y = lag1Or0(y, gr.present, &notes, "response")
			reg.R1Resid = lag1Or0(e, gr.present, &notes, "residual")
			reg.NEffSlope = sz.pooled(corrFactor(reg.R1X, reg.R1Resid))
			reg.NEffCorr = sz.pooled(corrFactor(reg.R1X, reg.R1Y))
			reg.SlopeSE = l.SlopeSE(reg.NEffSlope)
			reg.InterceptSE = l.InterceptSE(reg.NEffSlope)
			q := tQuantile(0.975, reg.NEffSlope-2)
			reg.SlopeCI = Interval{reg.Slope - q*reg.SlopeSE, reg.Slope + q*reg.SlopeSE}
			reg.InterceptCI = Interval{reg.Intercept - q*reg.InterceptSE, reg.Intercept + q*reg.InterceptSE}
			reg.RCI.Lo, reg.RCI.Hi = CorrCI(reg.R, reg.NEffCorr, 0.95)
			if !(reg.NEffSlope > 2) {
				notes = append(notes, "effective sample size ≤ 2: no confidence interval")
			}
			if boot != nil {
				bs := boot[gi][2*p*a.cfg.Bootstrap.N : (2*p+1)*a.cfg.Bootstrap.N]
				br := boot[gi][(2*p+1)*a.cfg.Bootstrap.N : (2*p+2)*a.cfg.Bootstrap.N]
				lo, hi, failed := percentiles(bs)
				rlo, rhi, _ := percentiles(br)
				reg.Boot = &Boot{Replicates: a.cfg.Bootstrap.N, Failed: failed, Slope: Interval{lo, hi}, R: Interval{rlo, rhi}}
			}
			reg.Note = strings.Join(notes, "; ")
			res.Regressions = append(res.Regressions, reg)
		}
		// Two-predictor regression.
		var notes []string
		i0, i1 := a.partial[0], a.partial[1]
		pr := Partial{Domain: dom, Season: season, Regime: regimes.Regime(gr.g), Response: resp,
			Predictors: [2]string{a.xs[i0], a.xs[i1]}, CoefUnits: slopeUnits(resp), Units: ru,
			N: gr.tot.N, Steps: gr.steps, Area: gr.tot.W, IndependentAreas: sz.independentAreas()}
		m, err := gr.tot.Multiple(a.K-1, []int{i0, i1})
		if err != nil {
			notes = append(notes, err.Error())
		}
		pr.Coef = [2]float64{m.Coef[0], m.Coef[1]}
		pr.Intercept, pr.R2 = m.Intercept, m.R2
		e := make([]float64, len(y))
		for t := range e {
			e[t] = y[t] - m.Intercept - m.Coef[0]*gr.means[i0][t] - m.Coef[1]*gr.means[i1][t]
		}
		pr.R1X[0] = lag1Or0(gr.means[i0], gr.present, &notes, pr.Predictors[0])
		pr.R1X[1] = lag1Or0(gr.means[i1], gr.present, &notes, pr.Predictors[1])
		pr.R1Resid = lag1Or0(e, gr.present, &notes, "residual")
		prod := math.Max(pr.R1X[0]*pr.R1Resid, pr.R1X[1]*pr.R1Resid)
		pr.NEff = sz.pooled((1 - prod) / (1 + prod))
		q := tQuantile(0.975, pr.NEff-3)
		for k := 0; k < 2; k++ {
			pr.SE[k] = m.SE(k, pr.NEff)
			pr.CI[k] = Interval{pr.Coef[k] - q*pr.SE[k], pr.Coef[k] + q*pr.SE[k]}
		}
		if boot != nil {
			n := a.cfg.Bootstrap.N
			pr.BootReplicates = n
			for k := 0; k < 2; k++ {
				v := boot[gi][(2*np+k)*n : (2*np+k+1)*n]
				lo, hi, failed := percentiles(v)
				pr.Boot = append(pr.Boot, Interval{lo, hi})
				pr.BootFailed = max(pr.BootFailed, failed)
			}
		}
		pr.Note = strings.Join(notes, "; ")
		res.Partials = append(res.Partials, pr)
	}
}

// percentiles returns the 2.5 and 97.5 % points (linear interpolation
// between order statistics, Hyndman & Fan 1996 type 7) of the finite
// values, and how many were not finite.
func percentiles(v []float64) (lo, hi float64, failed int) {
	f := make([]float64, 0, len(v))
	for _, x := range v {
		if x == x && !math.IsInf(x, 0) {
			f = append(f, x)
		}
	}
	failed = len(v) - len(f)
	if len(f) < 2 {
		return math.NaN(), math.NaN(), failed
	}
	sort.Float64s(f)
	q := func(p float64) float64 {
		h := p * float64(len(f)-1)
		i := int(math.Floor(h))
		if i >= len(f)-1 {
			return f[len(f)-1]
		}
		return f[i] + (h-float64(i))*(f[i+1]-f[i])
	}
	return q(0.025), q(0.975), failed
}

// blockResample returns T step indices drawn as circular blocks of length
// L (the circular block bootstrap of Politis & Romano 1992, "A circular
// block-resampling procedure for stationary data", in Exploring the Limits
// of Bootstrap, Wiley, 263–270): block starts uniform over 0…T−1, each
// block wrapping from the last step to the first, blocks concatenated and
// cut to T. Unlike moving blocks, every step is drawn equally often, so
// the ends of the record are not under-represented.
func blockResample(rng *rand.Rand, T, L int, out []int) []int {
	out = out[:0]
	if L > T {
		L = T
	}
	for len(out) < T {
		s := rng.IntN(T)
		for k := 0; k < L && len(out) < T; k++ {
			out = append(out, (s+k)%T)
		}
	}
	return out
}

// Streams of the bootstrap generator (second PCG word), so that the
// regression and threshold resamples do not share draws.
const (
	streamRegression = 0x72656772 // "regr"
	streamThreshold  = 0x74687265 // "thre"
)

// bootstrapRegressions returns, per group, the replicate values laid out
// [pred slope (N) | pred r (N)] per predictor, then the two partial
// coefficients (N each).
func (a *Acc) bootstrapRegressions(groups []*group) [][]float64 {
	n := a.cfg.Bootstrap.N
	np := len(a.preds)
	T := len(a.steps)
	nr := len(a.resp)
	out := make([][]float64, len(groups))
	for gi := range out {
		out[gi] = make([]float64, (2*np+2)*n)
	}
	// groups are ordered by (domain, season, regime, response).
	pos := func(d, s, g, r int) int { return ((d*a.ns+s)*nreg+g)*nr + r }
	for gi, gr := range groups {
		if pos(gr.d, gr.s, gr.g, gr.r) != gi {
			panic("relations: group order")
		}
	}
	acc := make([]CoMoments, len(groups))
	for gi := range acc {
		acc[gi] = NewCoMoments(a.K)
	}
	rng := rand.New(rand.NewPCG(a.cfg.Bootstrap.Seed, streamRegression))
	idx := make([]int, 0, T)
	for b := 0; b < n; b++ {
		idx = blockResample(rng, T, a.cfg.Bootstrap.BlockLength, idx)
		for gi := range acc {
			acc[gi].N, acc[gi].W = 0, 0
			clear(acc[gi].Mean)
			clear(acc[gi].C)
		}
		for _, t := range idx {
			st := &a.steps[t]
			ss := [2]int{0, seasonOf(st.month)}
			nss := 1
			if a.ns > 1 && ss[1] > 0 {
				nss = 2
			}
			for d := range a.doms {
				for g := 0; g < nreg; g++ {
					for r := 0; r < nr; r++ {
						cm := st.cm[(d*nreg+g)*nr+r]
						if cm.W == 0 {
							continue
						}
						for k := 0; k < nss; k++ {
							acc[pos(d, ss[k], g, r)].Merge(cm)
						}
					}
				}
			}
		}
		for gi := range groups {
			c := &acc[gi]
			for p := 0; p < np; p++ {
				l := c.Simple(a.predX[p], a.K-1)
				out[gi][2*p*n+b] = l.Slope
				out[gi][(2*p+1)*n+b] = l.R
			}
			m, err := c.Multiple(a.K-1, []int{a.partial[0], a.partial[1]})
			for k := 0; k < 2; k++ {
				v := math.NaN()
				if err == nil {
					v = m.Coef[k]
				}
				out[gi][(2*np+k)*n+b] = v
			}
		}
	}
	return out
}
