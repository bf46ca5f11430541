package stats

import (
	"math"
	"math/rand/v2"
	"slices"

	"gonum.org/v1/gonum/stat/distuv"
)

// MinIntervalValues is the smallest number of values for which
// MeanIntervalBCa gives an interval. Below it the skewness of the data cannot
// be estimated and a bootstrap interval does not keep its level; callers say
// "too few instances for an interval" instead of printing a number.
const MinIntervalValues = 10

// BootstrapResamples is the number of bootstrap resamples of
// MeanIntervalBCa: 2000, the count Efron & Tibshirani recommend for BCa
// endpoints (An Introduction to the Bootstrap, 1993, §19.3: 1000 or more).
const BootstrapResamples = 2000

// bootstrapSeed fixes the resampling stream, so that the same values give
// the same interval in every command and on every machine.
const bootstrapSeed = 0x6d69786465707468

// MeanIntervalBCa returns the two-sided bias-corrected and accelerated (BCa)
// bootstrap interval at level conf for the mean of x (Efron 1987, JASA 82,
// 171; Efron & Tibshirani 1993, ch. 14), with the nominal level expanded for
// the small-sample narrowness of the bootstrap (Hesterberg 2015, The
// American Statistician 69, 371: the percentile levels use
// z = √(n/(n−1))·t_{(1+conf)/2, n−1} in place of the normal quantile):
//
//	z₀ = Φ⁻¹(#{θ*_b < θ̂}/B),  a = Σ dᵢ³ / (6 (Σ dᵢ²)^{3/2}),  dᵢ = xᵢ − x̄,
//	α₁,₂ = Φ(z₀ + (z₀ ∓ z)/(1 − a(z₀ ∓ z))),
//
// the endpoints being the α₁ and α₂ quantiles of B = BootstrapResamples
// resampled means θ*_b (a is the jackknife acceleration of the mean). The
// endpoints are means of the data, so the interval of positive values stays
// positive, and BCa is second-order accurate for skewed data. The
// resampling stream is fixed, so the result is a function of x and conf.
// ok is false, and the interval (−Inf, +Inf), when len(x) < MinIntervalValues
// or a value is not finite; an x whose values are all equal gives the point
// interval [x̄, x̄]. It panics unless 0 < conf < 1.
func MeanIntervalBCa(x []float64, conf float64) (lower, upper float64, ok bool) {
	checkConf(conf)
	n := len(x)
	if n < MinIntervalValues {
		return math.Inf(-1), math.Inf(1), false
	}
	var mean float64
	for _, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return math.Inf(-1), math.Inf(1), false
		}
		mean += v
	}
	mean /= float64(n)
	var s2, s3 float64
	for _, v := range x {
		d := v - mean
		s2 += d * d
		s3 += d * d * d
	}
	if s2 == 0 {
		return mean, mean, true
	}
	a := s3 / (6 * math.Pow(s2, 1.5))

	rng := rand.New(rand.NewPCG(bootstrapSeed, uint64(n)))
	means := make([]float64, BootstrapResamples)
	below := 0.0
	for b := range means {
		var s float64
		for range n {
			s += x[rng.IntN(n)]
		}
		m := s / float64(n)
		means[b] = m
		switch {
		case m < mean:
			below++
		case m == mean:
			below += 0.5
		}
	}
	slices.Sort(means)
	unit := distuv.UnitNormal
	// A resampling distribution wholly on one side of θ̂ (possible only with
	// very few distinct values) would give z₀ = ±Inf: clamp it to the
	// resolution of B resamples.
	frac := math.Min(math.Max(below/BootstrapResamples, 0.5/BootstrapResamples), 1-0.5/BootstrapResamples)
	z0 := unit.Quantile(frac)
	t := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(n - 1)}.Quantile((1 + conf) / 2)
	z := math.Sqrt(float64(n)/float64(n-1)) * t
	level := func(zq float64) float64 {
		w := z0 + zq
		return unit.CDF(z0 + w/(1-a*w))
	}
	return quantileSorted(means, level(-z)), quantileSorted(means, level(z)), true
}

// quantileSorted returns the p-quantile of the ascending values s by linear
// interpolation between order statistics (Hyndman & Fan 1996, type 7).
func quantileSorted(s []float64, p float64) float64 {
	h := p * float64(len(s)-1)
	i := int(math.Floor(h))
	if i < 0 {
		return s[0]
	}
	if i >= len(s)-1 {
		return s[len(s)-1]
	}
	return s[i] + (h-float64(i))*(s[i+1]-s[i])
}
