package stats

import "math"

// EulerGamma is the Euler–Mascheroni constant γ = −ψ(1).
const EulerGamma = 0.57721566490153286060651209008240243104215933593992

// LinearXEB returns the linear cross-entropy benchmark of samples x_i whose
// ideal probabilities are pIdeal[i], in dimension dim,
//
//	F_lin = D·mean_i p(x_i) − 1,  stderr = D·sd_i p(x_i)/√N
//
// (Boixo et al. 2018, Nature Physics 14, 595; Arute et al. 2019, Nature 574,
// 505). An ideal sampler gives E[F_lin] = D·Z − 1, a uniform one 0. With one
// sample stderr is NaN, with none both are NaN. It panics if dim < 1.
func LinearXEB(pIdeal []float64, dim float64) (f, stderr float64) {
	checkDim(dim)
	s := Summarize(pIdeal)
	return dim*s.Mean - 1, dim * s.StdErr
}

// LogXEB returns the logarithmic cross-entropy benchmark
//
//	F_log = ln D + γ + mean_i ln p(x_i),  stderr = sd_i ln p(x_i)/√N
//
// (Boixo et al. 2018, Nature Physics 14, 595). Under Porter–Thomas an ideal
// sampler gives ≈ 1 and a uniform one ≈ 0. A sample with ideal probability 0
// makes F_log = −Inf and stderr NaN: the estimator is unbounded there. With
// one sample stderr is NaN, with none both are NaN. It panics if dim < 1 or
// a probability is negative.
func LogXEB(pIdeal []float64, dim float64) (f, stderr float64) {
	checkDim(dim)
	if len(pIdeal) == 0 {
		return math.NaN(), math.NaN()
	}
	logs := make([]float64, len(pIdeal))
	for i, p := range pIdeal {
		switch {
		case p < 0:
			panic("stats: negative probability")
		case p == 0:
			return math.Inf(-1), math.NaN()
		}
		logs[i] = math.Log(p)
	}
	s := Summarize(logs)
	return math.Log(dim) + EulerGamma + s.Mean, s.StdErr
}

// XEBSampleVariance returns the per-sample variance 1 + 2f − f² of D·p(x)
// for Porter–Thomas outputs sampled with fidelity f under the global
// depolarizing model q = f·p + (1−f)/D. With D·p ~ Exp(1) over outcomes,
// x = D·p(x) is Gamma(2, 1) for an ideal sample (mean 2, E[x²] = 6) and
// Exp(1) for a uniform one (mean 1, E[x²] = 2), so the mixture has variance
// 2 + 4f − (1 + f)² = 1 + 2f − f². It panics unless 0 ≤ f ≤ 1.
func XEBSampleVariance(f float64) float64 {
	if !(f >= 0 && f <= 1) {
		panic("stats: fidelity must lie in [0, 1]")
	}
	return 1 + 2*f - f*f
}

// XEBSamples returns the number of samples N at which the linear
// cross-entropy benchmark tells fidelity f from 0 at z standard deviations,
//
//	N = z²(1 + 2f − f²)/f²
//
// (the mean of N samples has standard error sqrt((1+2f−f²)/N), set to
// f/z). The result is real; round it up with math.Ceil. It is +Inf for f = 0 and panics unless 0 ≤ f ≤ 1 and z > 0.
func XEBSamples(f, z float64) float64 {
	v := XEBSampleVariance(f)
	if !(z > 0) || math.IsInf(z, 1) {
		panic("stats: z must be positive and finite")
	}
	return z * z * v / (f * f)
}

// XEBSamplesRelative returns the number of samples N at which the standard
// error of the linear cross-entropy benchmark is r·f,
//
//	N = (1 + 2f − f²)/(r·f)²
//
// (standard error sqrt((1+2f−f²)/N) set to r·f). The result is real;
// round it up with math.Ceil. It is +Inf for f = 0 and panics unless 0 ≤ f ≤ 1 and r > 0.
func XEBSamplesRelative(f, r float64) float64 {
	v := XEBSampleVariance(f)
	if !(r > 0) || math.IsInf(r, 1) {
		panic("stats: relative precision must be positive and finite")
	}
	return v / ((r * f) * (r * f))
}
