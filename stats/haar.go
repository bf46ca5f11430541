package stats

import "math"

// checkDim panics unless dim is a valid Hilbert-space dimension (≥ 1).
func checkDim(dim float64) {
	if !(dim >= 1) || math.IsInf(dim, 1) {
		panic("stats: dimension must be finite and at least 1")
	}
}

// HaarCollision returns the collision probability of a Haar-random state of
// dimension dim,
//
//	Z_H = 2/(D+1)
//
// (Dalzell, Hunter-Jones, Brandão 2022, PRX Quantum 3, 010333). It panics if
// dim < 1.
func HaarCollision(dim float64) float64 {
	checkDim(dim)
	return 2 / (dim + 1)
}

// HaarMoment returns the k-th moment of one output probability of a
// Haar-random state of dimension dim,
//
//	E[p^k] = k!/(D(D+1)…(D+k−1)) = Π_{j=0}^{k−1} (j+1)/(D+j)
//
// (moments of Beta(1, D−1)). It is evaluated as the product of the ratios,
// each at most 1, so it neither overflows nor loses digits to cancellation;
// for very large k it underflows gracefully to 0. It panics if k < 0 or
// dim < 1.
func HaarMoment(k int, dim float64) float64 {
	if k < 0 {
		panic("stats: negative moment order")
	}
	checkDim(dim)
	m := 1.0
	for j := 0; j < k; j++ {
		m *= float64(j+1) / (dim + float64(j))
	}
	return m
}

// HaarProb is the exact law Beta(1, D−1) of one output probability of a
// Haar-random state of dimension D (Porter & Thomas 1956; Dalzell,
// Hunter-Jones, Brandão 2022). Dim must be at least 1; Dim = 1 is the point
// mass at 1. The methods do not validate Dim.
type HaarProb struct {
	Dim float64
}

// CDF returns P(p ≤ t) = 1 − (1−t)^(D−1), evaluated as
// −expm1((D−1)·log1p(−t)) so that it keeps full relative precision for small
// t and large D. It is 0 for t < 0 and 1 for t ≥ 1.
func (h HaarProb) CDF(t float64) float64 {
	switch {
	case t < 0:
		return 0
	case t >= 1:
		return 1
	}
	return -math.Expm1((h.Dim - 1) * math.Log1p(-t))
}

// Survival returns P(p > t) = (1−t)^(D−1). It is 1 for t < 0 and 0 for
// t ≥ 1.
func (h HaarProb) Survival(t float64) float64 {
	switch {
	case t < 0:
		return 1
	case t >= 1:
		return 0
	}
	return math.Exp((h.Dim - 1) * math.Log1p(-t))
}

// Prob returns the density (D−1)(1−t)^(D−2) on [0, 1] and 0 outside. At t = 1
// it is +Inf for D < 2, 1 for D = 2 and 0 for D > 2; for D = 1 it is 0 below
// t = 1.
func (h HaarProb) Prob(t float64) float64 {
	if t < 0 || t > 1 {
		return 0
	}
	if h.Dim == 1 {
		if t == 1 {
			return math.Inf(1)
		}
		return 0
	}
	if t == 1 {
		return (h.Dim - 1) * math.Pow(0, h.Dim-2)
	}
	return (h.Dim - 1) * math.Exp((h.Dim-2)*math.Log1p(-t))
}

// LogProb returns the logarithm of the density,
// ln(D−1) + (D−2)·log1p(−t), and −Inf outside [0, 1].
func (h HaarProb) LogProb(t float64) float64 {
	if t < 0 || t > 1 {
		return math.Inf(-1)
	}
	if h.Dim == 1 || t == 1 {
		return math.Log(h.Prob(t))
	}
	return math.Log(h.Dim-1) + (h.Dim-2)*math.Log1p(-t)
}

// Quantile returns the t with CDF(t) = u, t = 1 − (1−u)^(1/(D−1)), evaluated
// as −expm1(log1p(−u)/(D−1)). It panics if u is outside [0, 1].
func (h HaarProb) Quantile(u float64) float64 {
	if !(u >= 0 && u <= 1) {
		panic("stats: quantile probability outside [0, 1]")
	}
	if h.Dim == 1 {
		return 1
	}
	return -math.Expm1(math.Log1p(-u) / (h.Dim - 1))
}

// Mean returns E[p] = 1/D.
func (h HaarProb) Mean() float64 {
	return 1 / h.Dim
}

// Variance returns Var[p] = (D−1)/(D²(D+1)), the Beta(1, D−1) variance.
func (h HaarProb) Variance() float64 {
	d := h.Dim
	return (d - 1) / (d * d * (d + 1))
}

// PorterThomas is the large-D limit of HaarProb for the rescaled probability
// x = D·p, the exponential law Exp(1) (Porter & Thomas 1956, the χ² law with
// two degrees of freedom for complex amplitudes, rescaled).
type PorterThomas struct{}

// CDF returns P(x' ≤ x) = 1 − e^(−x), and 0 for x < 0.
func (PorterThomas) CDF(x float64) float64 {
	if x < 0 {
		return 0
	}
	return -math.Expm1(-x)
}

// Survival returns P(x' > x) = e^(−x), and 1 for x < 0.
func (PorterThomas) Survival(x float64) float64 {
	if x < 0 {
		return 1
	}
	return math.Exp(-x)
}

// Prob returns the density e^(−x), and 0 for x < 0.
func (PorterThomas) Prob(x float64) float64 {
	if x < 0 {
		return 0
	}
	return math.Exp(-x)
}

// LogProb returns −x, and −Inf for x < 0.
func (PorterThomas) LogProb(x float64) float64 {
	if x < 0 {
		return math.Inf(-1)
	}
	return -x
}

// Quantile returns −log1p(−u), the x with CDF(x) = u. It panics if u is
// outside [0, 1].
func (PorterThomas) Quantile(u float64) float64 {
	if !(u >= 0 && u <= 1) {
		panic("stats: quantile probability outside [0, 1]")
	}
	return -math.Log1p(-u)
}

// Mean returns 1.
func (PorterThomas) Mean() float64 { return 1 }

// Variance returns 1.
func (PorterThomas) Variance() float64 { return 1 }

// HaarCollisionVariance returns the variance of the collision probability
// Z = Σ_x p(x)² over Haar-random states of dimension dim,
//
//	Var Z = 4(D − 1)/((D + 1)²(D + 2)(D + 3)),
//
// from the moments of the uniform law on the probability simplex, the
// Dirichlet(1, …, 1) law of a Haar state's output probabilities:
// E[p_x⁴] = 24/(D(D+1)(D+2)(D+3)) and E[p_x² p_y²] = 4/(D(D+1)(D+2)(D+3))
// for x ≠ y (Dirichlet moments; e.g. Kotz, Balakrishnan, Johnson,
// Continuous Multivariate Distributions, 2000, ch. 49), so that
// E[Z²] = (4D + 20)/((D+1)(D+2)(D+3)). For large D it is about 4/D³: the
// floor of the circuit-to-circuit spread of D·Z, about 2/√D. It panics if
// dim < 1.
func HaarCollisionVariance(dim float64) float64 {
	checkDim(dim)
	return 4 * (dim - 1) / ((dim + 1) * (dim + 1) * (dim + 2) * (dim + 3))
}
