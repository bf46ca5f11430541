package stats

import (
	"math"
	"slices"
)

// KS returns the Kolmogorov–Smirnov statistic
//
//	sup_t |F_emp(t) − F(t)|
//
// of the values x against the continuous CDF cdf (Kolmogorov 1933; Massey
// 1951, JASA 46, 68). With x sorted, the supremum is attained at a jump of the
// empirical CDF:
//
//	max_i max(i/n − F(x_(i)), F(x_(i)) − (i−1)/n),
//
// which also holds with ties. x is not modified: the values are copied into
// scratch, which must have len(scratch) ≥ len(x) or be nil (then a slice is
// allocated). A NaN in x or from cdf makes the result NaN. It panics if x is
// empty or scratch is too short.
func KS(x, scratch []float64, cdf func(float64) float64) float64 {
	s := ksScratch(x, scratch)
	copy(s, x)
	return ksSorted(s, cdf)
}

// KSHaar returns the Kolmogorov–Smirnov statistic of the probabilities p
// against the exact Haar law HaarProb{Dim: len(p)}: the Porter–Thomas distance
// reported per instance. scratch and panics are as for KS; p is not modified.
// The sort makes it O(D log D).
func KSHaar(p, scratch []float64) float64 {
	h := HaarProb{Dim: float64(len(p))}
	return KS(p, scratch, h.CDF)
}

// KSPorterThomas returns the Kolmogorov–Smirnov statistic of the rescaled
// probabilities D·p_i, D = len(p), against the Porter–Thomas law Exp(1), the
// large-D form of KSHaar. scratch and panics are as for KS; p is not modified.
func KSPorterThomas(p, scratch []float64) float64 {
	s := ksScratch(p, scratch)
	d := float64(len(p))
	for i, v := range p {
		s[i] = d * v
	}
	return ksSorted(s, PorterThomas{}.CDF)
}

func ksScratch(x, scratch []float64) []float64 {
	if len(x) == 0 {
		panic("stats: Kolmogorov–Smirnov statistic of no values")
	}
	if scratch == nil {
		return make([]float64, len(x))
	}
	if len(scratch) < len(x) {
		panic("stats: scratch shorter than the values")
	}
	return scratch[:len(x)]
}

// ksSorted sorts s in place and evaluates the statistic.
func ksSorted(s []float64, cdf func(float64) float64) float64 {
	slices.Sort(s)
	n := float64(len(s))
	var d float64
	for i, v := range s {
		f := cdf(v)
		if math.IsNaN(v) || math.IsNaN(f) {
			return math.NaN()
		}
		d = math.Max(d, math.Max(float64(i+1)/n-f, f-float64(i)/n))
	}
	return d
}
