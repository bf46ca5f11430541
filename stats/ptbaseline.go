package stats

import (
	"math"
	"math/rand/v2"
	"sync"
)

// PTBaseline is the Porter–Thomas distance that Haar-random states of one
// dimension give: the mean and standard deviation, over states, of the
// Kolmogorov–Smirnov distance of a state's D output probabilities to
// Beta(1, D−1) (KSHaar). A circuit ensemble can come no closer to the Haar
// law than this, so a measured Porter–Thomas distance is judged against it.
type PTBaseline struct {
	Dim    float64
	Mean   float64
	StdDev float64
	// States is the number of Haar-random states averaged; Scaled is true
	// when Dim is above PTBaselineMaxDim and the values come from that
	// dimension by the 1/√D law.
	States int
	Scaled bool
}

// PTBaselineMaxDim is the largest dimension whose baseline is computed from
// states of that dimension; above it the baseline at PTBaselineMaxDim is
// scaled by √(PTBaselineMaxDim/D). The Kolmogorov–Smirnov distance of D
// draws from their own law scales as 1/√D (Kolmogorov 1933); for the
// probabilities of a Haar state the normalisation Σp = 1 changes the
// constant, not the power, and TestPTBaselineScaling measures the power.
const PTBaselineMaxDim = 1 << 16

// ptBaselineWork bounds states × D, so that a baseline costs about one
// sort of 2^22 values.
const ptBaselineWork = 1 << 22

var ptBaselineCache sync.Map // float64 → PTBaseline

// HaarPTBaseline returns the Porter–Thomas baseline of dimension dim (a
// power of two or any integer ≥ 2). The output probabilities of a
// Haar-random state are uniform on the simplex (Życzkowski & Sommers 2001,
// J. Phys. A 34, 7111), which is the law of e/Σe for D independent Exp(1)
// values e (Devroye 1986, Non-Uniform Random Variate Generation, §V.2): the
// states are drawn that way from a fixed stream, between 64 and 2000 of them
// (about 2^22/D), so the result is a function of dim and is cached. It
// panics unless dim is an integer ≥ 2.
func HaarPTBaseline(dim float64) PTBaseline {
	if !(dim >= 2) || dim != math.Floor(dim) || math.IsInf(dim, 1) {
		panic("stats: Porter–Thomas baseline needs an integer dimension of at least 2")
	}
	if b, ok := ptBaselineCache.Load(dim); ok {
		return b.(PTBaseline)
	}
	var b PTBaseline
	if dim > PTBaselineMaxDim {
		b = HaarPTBaseline(PTBaselineMaxDim)
		f := math.Sqrt(PTBaselineMaxDim / dim)
		b = PTBaseline{Dim: dim, Mean: b.Mean * f, StdDev: b.StdDev * f, States: b.States, Scaled: true}
	} else {
		b = haarPTBaseline(int(dim), min(max(ptBaselineWork/int(dim), 64), 2000))
	}
	ptBaselineCache.Store(dim, b)
	return b
}

// haarPTBaseline averages KSHaar over states Haar-random states of
// dimension d.
func haarPTBaseline(d, states int) PTBaseline {
	rng := rand.New(rand.NewPCG(0x707462617365, uint64(d)))
	p, scratch := make([]float64, d), make([]float64, d)
	ks := make([]float64, states)
	for s := range ks {
		var sum float64
		for i := range p {
			p[i] = rng.ExpFloat64()
			sum += p[i]
		}
		for i := range p {
			p[i] /= sum
		}
		ks[s] = KSHaar(p, scratch)
	}
	sm := Summarize(ks)
	return PTBaseline{Dim: float64(d), Mean: sm.Mean, StdDev: sm.StdDev, States: states}
}
