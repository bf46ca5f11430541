package stats

import (
	"math"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"
)

// Summary describes an ensemble of N values: their mean, the unbiased
// (n−1) standard deviation and the standard error of the mean,
// StdErr = StdDev/√N. For N = 1 StdDev and StdErr are NaN (the spread is
// unknown); for N = 0 Mean is NaN as well.
type Summary struct {
	N      int
	Mean   float64
	StdDev float64
	StdErr float64
}

// Summarize returns the Summary of x, computed with gonum's stat.MeanStdDev.
func Summarize(x []float64) Summary {
	switch len(x) {
	case 0:
		return Summary{N: 0, Mean: math.NaN(), StdDev: math.NaN(), StdErr: math.NaN()}
	case 1:
		return Summary{N: 1, Mean: x[0], StdDev: math.NaN(), StdErr: math.NaN()}
	}
	mean, sd := stat.MeanStdDev(x, nil)
	n := len(x)
	return Summary{N: n, Mean: mean, StdDev: sd, StdErr: sd / math.Sqrt(float64(n))}
}

// checkConf panics unless 0 < conf < 1.
func checkConf(conf float64) {
	if !(conf > 0 && conf < 1) {
		panic("stats: confidence level must lie in (0, 1)")
	}
}

// MeanInterval returns the two-sided confidence interval at level conf for
// the mean of s,
//
//	Mean ± t_{(1+conf)/2, N−1} · StdErr,
//
// with t the Student's t quantile on N−1 degrees of freedom (Student 1908,
// Biometrika 6, 1; gonum distuv.StudentsT). When N < 2 or StdErr is not
// finite the interval is (−Inf, +Inf). It panics unless 0 < conf < 1.
func MeanInterval(s Summary, conf float64) (lower, upper float64) {
	checkConf(conf)
	if s.N < 2 || math.IsNaN(s.StdErr) || math.IsInf(s.StdErr, 0) {
		return math.Inf(-1), math.Inf(1)
	}
	t := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(s.N - 1)}.Quantile((1 + conf) / 2)
	half := t * s.StdErr
	return s.Mean - half, s.Mean + half
}

// RatioInterval returns R = Mean/zh and the two-sided confidence interval at
// level conf of R, the MeanInterval of s divided by zh (zh = Z_H = 2/(D+1)
// for the collision ratio). When N < 2 the interval is (−Inf, +Inf) while the ratio is
// still returned. It panics unless zh > 0 and 0 < conf < 1.
func RatioInterval(s Summary, zh, conf float64) (ratio, lower, upper float64) {
	if !(zh > 0) || math.IsInf(zh, 1) {
		panic("stats: reference value must be positive and finite")
	}
	lo, hi := MeanInterval(s, conf)
	return s.Mean / zh, lo / zh, hi / zh
}
