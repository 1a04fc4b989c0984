package factors

import (
	"errors"
	"fmt"
	"math"

	"lidscope/relations"
)

// Folds are the co-moments of a regression's samples split into blocks
// of whole years (or other long blocks), each block its own mergeable
// relations.CoMoments with the p factors first and the response last.
// Blocks of whole years keep the held-out samples apart from the
// autocorrelated samples they were fitted on, which random sample-wise
// folds would not (blocked cross-validation; common practice).
type Folds struct {
	Labels []string // one per piece (e.g. the year), for reports; may be nil
	Pieces []relations.CoMoments
}

// Pooled returns the merge of every fold.
func (fs Folds) Pooled() (relations.CoMoments, error) {
	if len(fs.Pieces) == 0 {
		return relations.CoMoments{}, errors.New("factors: no folds")
	}
	k := fs.Pieces[0].K
	all := relations.NewCoMoments(k)
	for i, p := range fs.Pieces {
		if p.K != k {
			return relations.CoMoments{}, fmt.Errorf("factors: fold %d has %d variables, fold 0 has %d", i, p.K, k)
		}
		all.Merge(p)
	}
	return all, nil
}

// except returns the merge of every fold but i.
func (fs Folds) except(i int) relations.CoMoments {
	c := relations.NewCoMoments(fs.Pieces[0].K)
	for j, p := range fs.Pieces {
		if j != i {
			c.Merge(p)
		}
	}
	return c
}

// DefaultPenalties is the grid of ridge penalties (correlation-matrix
// scale) that CrossValidate tries when given none: 0 (OLS) and 10⁻⁴ to
// 10² in steps of 10^¼.
func DefaultPenalties() []float64 {
	out := []float64{0}
	for e := -16; e <= 8; e++ {
		out = append(out, math.Pow(10, float64(e)/4))
	}
	return out
}

// CV is the outcome of blocked cross-validation over folds.
type CV struct {
	Penalties []float64 // the penalties tried
	SSE       []float64 // Σ over folds of the held-out Σ w e², per penalty; +Inf where some training fit failed
	Best      int       // index of the chosen penalty (least SSE; the smaller penalty on ties)
	Penalty   float64   // the chosen penalty
	R2        float64   // cross-validated R² at the chosen penalty: 1 − SSE/C_yy (pooled)
	Cyy       float64   // pooled Σ w (y − ȳ)²
	Fit       Fit       // the fit of every fold pooled with the chosen penalty
}

// CrossValidate chooses the ridge penalty by leave-one-fold-out
// cross-validation: for each penalty and each fold, the model is fitted
// on the merged moments of the other folds (standardised with their own
// moments) and scored by its held-out Σ w e² on the fold's moments
// (Fit.HeldOutSSE); the penalty with the least total is chosen and the
// model refitted on all folds. The cross-validated R² is 1 − ΣSSE/C_yy,
// with C_yy the pooled Σ w (y − ȳ)². penalties nil means
// DefaultPenalties. At least two folds with samples are needed.
func CrossValidate(fs Folds, penalties []float64) (CV, error) {
	if penalties == nil {
		penalties = DefaultPenalties()
	}
	if len(penalties) == 0 {
		return CV{}, errors.New("factors: no penalties to try")
	}
	all, err := fs.Pooled()
	if err != nil {
		return CV{}, err
	}
	used := 0
	for _, p := range fs.Pieces {
		if p.W > 0 {
			used++
		}
	}
	if used < 2 {
		return CV{}, fmt.Errorf("factors: cross-validation needs at least two folds with samples, have %d", used)
	}
	train := make([]relations.CoMoments, len(fs.Pieces))
	for i := range fs.Pieces {
		train[i] = fs.except(i)
	}
	cv := CV{Penalties: append([]float64(nil), penalties...), SSE: make([]float64, len(penalties)), Best: -1}
	for k, lam := range penalties {
		total := 0.0
		for i, h := range fs.Pieces {
			if h.W == 0 {
				continue
			}
			f, err := FitMoments(train[i], lam)
			if err != nil {
				total = math.Inf(1)
				break
			}
			total += f.HeldOutSSE(h)
		}
		cv.SSE[k] = total
		if !math.IsInf(total, 1) && (cv.Best < 0 || total < cv.SSE[cv.Best] ||
			(total == cv.SSE[cv.Best] && lam < penalties[cv.Best])) {
			cv.Best = k
		}
	}
	if cv.Best < 0 {
		return cv, errors.New("factors: no penalty could be fitted on every training set (too few samples or collinear factors in some folds)")
	}
	cv.Penalty = penalties[cv.Best]
	cv.Fit, err = FitMoments(all, cv.Penalty)
	if err != nil {
		return cv, err
	}
	cv.Cyy = co(&all, all.K-1, all.K-1)
	cv.R2 = cv.R2At(cv.Best)
	return cv, nil
}

// R2At is the cross-validated R² of penalty k: 1 − SSE[k]/Cyy (NaN when
// the response has no spread).
func (cv CV) R2At(k int) float64 {
	if !(cv.Cyy > 0) {
		return math.NaN()
	}
	return 1 - cv.SSE[k]/cv.Cyy
}
