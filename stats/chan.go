package stats

// ChanMerge is the pairwise update that merges two weighted samples A and
// B into the sample A∪B, the one copy of it in lidscope: Moments.Merge
// (one variable) and relations.CoMoments.Merge (K variables, element by
// element) both call it, so the scalar case is the K = 1 case of the
// matrix one, operation for operation.
//
// With W = W_A + W_B and δ_j = x̄_B,j − x̄_A,j the difference of the means
// (Chan, Golub & LeVeque 1979, "Updating formulae and a pairwise algorithm
// for computing sample variances", eq. 2.1, in the weighted form of West
// 1979, Commun. ACM 22(9), 532–535):
//
//	x̄_j  = x̄_A,j + δ_j W_B / W
//	C_jk = C_A,jk + C_B,jk + δ_j δ_k W_A W_B / W
//
// where C_jk = Σ w (x_j − x̄_j)(x_k − x̄_k); C_jj is the M2 of one
// variable. Both samples must be non-empty (W_A, W_B > 0); an empty side
// is the caller's case (the merge is then a copy).
type ChanMerge struct {
	WB, W float64 // the weights of B and of the merged sample
	G     float64 // W_A W_B / W
}

// NewChanMerge returns the update for samples of weights wa and wb.
func NewChanMerge(wa, wb float64) ChanMerge {
	w := wa + wb
	return ChanMerge{WB: wb, W: w, G: wa * wb / w}
}

// Mean returns the merged mean of one variable from its means in A and B.
func (p ChanMerge) Mean(ma, mb float64) float64 {
	return ma + (mb-ma)*p.WB/p.W
}

// CoMoment returns the merged co-moment C_jk from its values in A and B
// and the differences of the means dj = x̄_B,j − x̄_A,j, dk likewise (dj =
// dk for an M2).
func (p ChanMerge) CoMoment(ca, cb, dj, dk float64) float64 {
	return ca + (cb + p.G*dj*dk)
}
