package stats

// pairwiseBlock is the leaf size of the pairwise sum: large enough that the
// recursion costs nothing, small enough that a leaf's own rounding error
// (at most pairwiseBlock/4 additions per accumulator) stays negligible.
const pairwiseBlock = 128

// Collision returns the collision probability Z = Σ_i p_i² of the
// distribution p; for the output distribution of a circuit, Z_U = Σ_x p_U(x)².
//
// The squares are added pairwise, so the rounding error grows like
// log2(len(p))·ε rather than len(p)·ε; 2^24 terms keep about 15 significant
// digits. gonum's floats.Dot adds sequentially, hence the own sum here. p is
// not modified, and an empty p gives 0.
func Collision(p []float64) float64 {
	return sumSquares(p)
}

// sumSquares adds the squares of p pairwise with four accumulators per leaf.
func sumSquares(p []float64) float64 {
	if len(p) <= pairwiseBlock {
		var s0, s1, s2, s3 float64
		i := 0
		for ; i+4 <= len(p); i += 4 {
			// float64(…) rounds each product on its own, so no platform
			// fuses it into the add and the sum is the same everywhere
			// (and equal to HaarKS.CountAmplitudes's bit for bit).
			s0 += float64(p[i] * p[i])
			s1 += float64(p[i+1] * p[i+1])
			s2 += float64(p[i+2] * p[i+2])
			s3 += float64(p[i+3] * p[i+3])
		}
		for ; i < len(p); i++ {
			s0 += float64(p[i] * p[i])
		}
		return (s0 + s1) + (s2 + s3)
	}
	// Split on a multiple of the block so that the leaves stay full.
	m := (len(p) / 2 / pairwiseBlock) * pairwiseBlock
	if m == 0 {
		m = pairwiseBlock
	}
	return sumSquares(p[:m]) + sumSquares(p[m:])
}
