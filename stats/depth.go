package stats

import "math"

// AnticoncentrationDepth returns the smallest depth whose upper confidence
// bound of R = E[Z]/Z_H is at most 1+eps, the anti-concentration rule of
// this project (Z_H = 2/(D+1) the Haar collision probability). depths must be
// strictly ascending and upper[i] is the bound at depths[i]; a NaN bound never
// qualifies. It does not ask later depths to stay below the threshold (for
// the verdict of a scan, which does, see RecommendedDepth). If no
// depth qualifies it returns 0, false. It panics if the lengths differ, the
// depths are not strictly ascending, or eps is negative or NaN.
func AnticoncentrationDepth(depths []int, upper []float64, eps float64) (depth int, ok bool) {
	if len(depths) != len(upper) {
		panic("stats: depths and upper bounds differ in length")
	}
	if !(eps >= 0) {
		panic("stats: eps must be non-negative")
	}
	checkAscending(depths)
	for i, u := range upper {
		if u <= 1+eps {
			return depths[i], true
		}
	}
	return 0, false
}

// PaleyZygmund returns the anti-concentration bound
//
//	Pr_U[p_U(x) ≥ β/D] ≥ α(1−β)²,  α = 1/(D·E[Z]),
//
// for an ensemble with mean collision probability meanCollision = E[Z] in
// dimension dim (Paley–Zygmund inequality; Dalzell, Hunter-Jones, Brandão
// 2022, PRX Quantum 3, 010333). α is clamped to at most 1, which only matters
// for estimates below the minimum E[Z] = 1/D. It panics unless
// meanCollision > 0, dim ≥ 1 and 0 ≤ beta ≤ 1.
func PaleyZygmund(meanCollision, dim, beta float64) float64 {
	checkDim(dim)
	if !(meanCollision > 0) || math.IsInf(meanCollision, 1) {
		panic("stats: mean collision probability must be positive and finite")
	}
	if !(beta >= 0 && beta <= 1) {
		panic("stats: beta must lie in [0, 1]")
	}
	alpha := math.Min(1/(dim*meanCollision), 1)
	return alpha * (1 - beta) * (1 - beta)
}
