package stats

import (
	"math"
	"math/rand/v2"
	"sort"

	"gonum.org/v1/gonum/floats"
)

// haarProbs returns the output probabilities of a Haar-random state of
// dimension d: the normalised squared moduli of d i.i.d. standard complex
// Gaussians. The Gaussian vector is unitarily invariant, so its direction is
// Haar-distributed on the unit sphere (common practice; e.g. Mezzadri 2007,
// Notices AMS 54, 592, for the matrix version).
func haarProbs(rng *rand.Rand, d int) []float64 {
	p := make([]float64, d)
	var s float64
	for i := range p {
		re, im := rng.NormFloat64(), rng.NormFloat64()
		p[i] = float64(re*re) + float64(im*im) // rounded apart, as the read-out does
		s += p[i]
	}
	floats.Scale(1/s, p)
	return p
}

// realGaussianProbs returns the output probabilities of a random real state:
// normalised squares of d i.i.d. real Gaussians. D·p then follows the
// one-degree-of-freedom Porter–Thomas law χ²_1 instead of Exp(1) (Porter &
// Thomas 1956).
func realGaussianProbs(rng *rand.Rand, d int) []float64 {
	p := make([]float64, d)
	var s float64
	for i := range p {
		g := rng.NormFloat64()
		p[i] = g * g
		s += p[i]
	}
	floats.Scale(1/s, p)
	return p
}

// sampleProbs draws n outcomes from the distribution p by inverting its
// cumulative sum and returns the ideal probability of each outcome.
func sampleProbs(rng *rand.Rand, p []float64, n int) []float64 {
	cum := floats.CumSum(make([]float64, len(p)), p)
	total := cum[len(cum)-1]
	out := make([]float64, n)
	for i := range out {
		k := sort.SearchFloat64s(cum, rng.Float64()*total)
		if k == len(p) {
			k--
		}
		out[i] = p[k]
	}
	return out
}

// relDiff returns |got − want|/|want|, or |got| when want is 0.
func relDiff(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got-want) / math.Abs(want)
}

// mustPanic reports whether f panics.
func mustPanic(f func()) (panicked bool) {
	defer func() { panicked = recover() != nil }()
	f()
	return false
}

// gaussianAmplitudes returns the 2d float parts of d amplitudes whose real
// and imaginary parts are i.i.d. normal with variance 1/(2d) (a Haar-like
// state of norm about 1, Porter–Thomas probabilities), drawn from a PCG
// seeded (s1, s2), and the pass that hands them to a read-out in blocks of
// 4096 amplitudes on worker 0, as the simulator does.
func gaussianAmplitudes(d int, s1, s2 uint64) ([]float64, AmplitudePass) {
	rng := rand.New(rand.NewPCG(s1, s2))
	a := make([]float64, 2*d)
	s := math.Sqrt(0.5 / float64(d))
	for i := range a {
		a[i] = s * rng.NormFloat64()
	}
	pass := func(visit func(w int, a []float64)) {
		for off := 0; off < len(a); off += 8192 {
			visit(0, a[off:min(off+8192, len(a))])
		}
	}
	return a, pass
}
