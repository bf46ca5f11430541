package stats

import (
	"math"
	"math/rand/v2"
	"slices"
)

// ClusterBootstrap returns the standard error and the two-sided percentile
// interval at level conf of the ratio estimator
//
//	θ = Σ_i num_i / Σ_i den_i
//
// over clusters i (circuit instances, each the sum over its shots: num_i =
// Σ_k (D·p_k − 1), den_i its shot count or shot count times its ideal
// value), from BootstrapResamples resamples of the clusters with
// replacement. Shots of one noise trajectory share its errors and the
// trajectories of one instance share its circuit: all of that variation is
// inside each cluster's totals, so resampling the clusters carries it, and
// resampling the trajectories within the drawn clusters as well would count
// the within-instance variance twice (Davison & Hinkley 1997, Bootstrap
// Methods and their Application, §3.8, the two-stage model: the
// first-stage resample alone matches the variance of the two-stage mean).
// The stream is fixed, so the result is a function of the data and conf.
// With fewer than MinIntervalValues clusters ok is false and the results
// NaN. It panics unless 0 < conf < 1 and len(num) == len(den).
func ClusterBootstrap(num, den []float64, conf float64) (stderr, lower, upper float64, ok bool) {
	checkConf(conf)
	if len(num) != len(den) {
		panic("stats: ClusterBootstrap of slices of different lengths")
	}
	n := len(num)
	if n < MinIntervalValues {
		return math.NaN(), math.NaN(), math.NaN(), false
	}
	rng := rand.New(rand.NewPCG(bootstrapSeed, uint64(n)^0x636c7573746572))
	theta := make([]float64, BootstrapResamples)
	for b := range theta {
		var sn, sd float64
		for range n {
			i := rng.IntN(n)
			sn += num[i]
			sd += den[i]
		}
		theta[b] = sn / sd
	}
	s := Summarize(theta)
	slices.Sort(theta)
	return s.StdDev, quantileSorted(theta, (1-conf)/2), quantileSorted(theta, (1+conf)/2), true
}
