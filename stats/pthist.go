package stats

import (
	"math"
	"math/bits"
	"slices"
	"sync"
	"sync/atomic"

	"mixdepth/internal/crash"
)

// ProbabilityPass hands every one of D probabilities to visit exactly once
// per call, in blocks p; calls of visit with distinct w in [0, workers) may
// run concurrently, and p may be reused once visit returns. A state-vector
// simulator computes the probabilities from the amplitudes on each call, so
// that no array of D probabilities is needed.
type ProbabilityPass func(visit func(w int, p []float64))

// DefaultKSBudget is the number of probabilities KSHaarPasses holds in
// memory at most for its final sort when the budget argument is 0: 2^22
// values, 32 MiB.
const DefaultKSBudget = 1 << 22

// ksMaxBinBits caps the number of fine bins per octave of probability that
// the count pass counts (2^14, 18·2^14 counters, 1.2 MiB per worker): each
// holds at most about e^−1·2^−14 ≈ 2.2e−5 of the Porter–Thomas mass.
const ksMaxBinBits = 14

// ksMinCollect is the number of candidate values always small enough to
// collect and sort at once.
const ksMinCollect = 1 << 10

// ksMaxLeaves bounds the bins counted in one refinement pass (2^18, 1 MiB
// of counters per worker, which stays in a second-level cache); small
// states take D/32 of them, so that their CDF values cost less than the
// pass.
const ksMaxLeaves = 1 << 18

// KSHaarPasses returns the Kolmogorov–Smirnov statistic of D probabilities
// against the exact Haar law Beta(1, D−1), the value KSHaar returns for
// them, without sorting all of them: a histogram pass, refinement passes
// over the few bins that can hold the supremum, and a sort of the values of
// those bins. It needs O(D) time per pass and O(budget + 2^18) memory
// instead of O(D log D) time and 2·8·D bytes. passes reports how many times
// pass was called (2 for Porter–Thomas-like outputs, rarely 3 or 4). It is
// HaarKS used once: Count in the first pass, then Finish.
//
// The bounds: with the values grouped in bins by value, C_j the number of
// values in bins up to j and F the Haar CDF, the terms of the statistic
// (see KS) of the values in a non-empty bin [t, u] lie between
//
//	L_j = max(C_j/D − F(u), F(t) − C_{j−1}/D)   and
//	U_j = max(C_j/D − F(t), F(u) − C_{j−1}/D),
//
// because F and the ranks are monotone inside the bin. The statistic is at
// least L = max_j L_j, so a bin with U_j < L cannot hold the supremum; the
// others are split and counted again, or their values are collected and
// sorted, and the statistic is the largest of their exact terms. A bin of
// one distinct value is resolved from its bounds, which are then exact. The
// result equals KSHaar to rounding (the same terms, with F evaluated by
// HaarProb.CDF); a NaN probability gives NaN. budget ≤ 0 means
// DefaultKSBudget. It panics if dim < 1 or workers < 1.
func KSHaarPasses(dim, workers, budget int, pass ProbabilityPass) (ks float64, passes int) {
	h := NewHaarKS(dim, workers, budget)
	pass(h.Count)
	ks, passes = h.Finish(pass)
	return ks, passes + 1
}

// HaarKS computes the statistic of KSHaarPasses for one state after
// another of the same dimension, keeping its bins, their CDF values and its
// counters between states. The first pass over a state's probabilities is
// the caller's: it hands every probability to Count once, typically while
// it computes them for another purpose (a collision sum, or the last gates
// of a circuit). Finish then runs the refinement passes and makes the
// HaarKS ready for the next state.
//
// The bins are fixed by D. The count pass counts fine bins, uniform in the
// bits of the float64 value, 2^b per octave of D·p over [2^−12, 2^6), with
// b from 4 to 14 growing with D (at most about e^−1·2^−b of the
// Porter–Thomas mass in a bin), so a value is binned by integer operations
// on its bits. Its counts are then summed into the level-0 bins, which are
// runs of fine bins of about equal mass (ksOctaveBits), and the CDF at
// every level-0 edge is evaluated once, in NewHaarKS.
type HaarKS struct {
	r      *ksRefiner
	counts [][]uint32 // first-pass counters per worker (see fine0), and a spare one
	nans   []bool
	budget int
	bufs   [][]float64 // FinishAmplitudes's probabilities per worker
	// ksums and kouter are each worker's leaf sums and outer values of
	// the AVX-512 count kernel (leavesCount).
	ksums, kouter [][]float64
}

// NewHaarKS returns a HaarKS for states of dim probabilities whose passes
// use worker indices in [0, workers). budget is as for KSHaarPasses (≤ 0
// means DefaultKSBudget). It panics if dim < 1 or workers < 1.
func NewHaarKS(dim, workers, budget int) *HaarKS {
	if dim < 1 {
		panic("stats: Kolmogorov–Smirnov statistic of no values")
	}
	if workers < 1 {
		panic("stats: KSHaarPasses needs at least one worker")
	}
	if budget <= 0 {
		budget = DefaultKSBudget
	}
	r := newKSRefiner(dim, workers)
	h := &HaarKS{r: r, counts: make([][]uint32, workers), nans: make([]bool, workers), budget: budget,
		ksums: make([][]float64, workers), kouter: make([][]float64, workers)}
	for w := range h.counts {
		// The counters of the first pass (see fine0), and a spare one
		// that the AVX-512 kernel increments for the values it hands to
		// countOuter.
		h.counts[w] = make([]uint32, r.nbf+5)
	}
	return h
}

// Count adds the probabilities p to the first-pass histogram; calls with
// distinct w may run concurrently. It panics if w is outside [0, workers).
func (h *HaarKS) Count(w int, p []float64) {
	r, c := h.r, h.counts[w]
	// The usual value falls in a uniform bin: one subtraction, one shift and
	// one comparison on its bits, no call; the others (zeros, tiny or huge
	// values, negatives, NaN) take countOuter. For v ≥ 0 the key is the bits
	// with the sign bit set and lo0 has it set, so the difference of keys is
	// the difference of the bits and pos = lo0 without the sign bit; a
	// negative v or a NaN gives a difference of at least 2^62, beyond the
	// uniform bins.
	pos, shift, u := r.lo0&^(1<<63), r.shift&63, c[3:3+r.nbf]
	for _, v := range p {
		if i := (math.Float64bits(v) - pos) >> (shift & 63); i < uint64(len(u)) {
			u[i]++ // the comparison is the bounds check
			continue
		}
		h.countOuter(w, c, v)
	}
}

// CountAmplitudes adds the probabilities |a|² of the amplitudes a, given
// as (real, imaginary) pairs, to the first-pass histogram, as Count does for
// the probabilities, and returns their collision sum Σ|a|⁴, added in the
// order of Collision: for the same amplitudes it equals Collision of their
// probabilities re·re + im·im bit for bit. One loop squares, sums and bins,
// so a state's first read-out pass is one pass over its amplitudes with no
// buffer of probabilities. Where the processor has AVX-512, blocks of at
// least ksCountGroup leaves of pairwiseBlock pairs take the kernel of
// count_amd64.s (leavesCount), with the same sums and counts bit for bit.
// It panics if len(a) is odd or w is outside [0, workers).
func (h *HaarKS) CountAmplitudes(w int, a []float64) float64 {
	if len(a)%2 != 0 {
		panic("stats: CountAmplitudes of an odd number of floats")
	}
	c := h.counts[w][:h.r.nbf+5]
	n := len(a) / 2
	if !ksCountAVX512On || n < ksCountGroup*pairwiseBlock {
		return h.sumCount(w, c, a)
	}
	nl := (n + pairwiseBlock - 1) / pairwiseBlock
	if cap(h.ksums[w]) < nl {
		h.ksums[w] = make([]float64, nl)
	}
	sums := h.ksums[w][:nl]
	h.leavesCount(w, c, a, sums)
	return leafTree(sums, n)
}

// sumCount mirrors sumSquares over the probabilities of the pairs a.
func (h *HaarKS) sumCount(w int, c []uint32, a []float64) float64 {
	n := len(a) / 2
	if n <= pairwiseBlock {
		return h.leafCount(w, c, a)
	}
	m := (n / 2 / pairwiseBlock) * pairwiseBlock
	if m == 0 {
		m = pairwiseBlock
	}
	return h.sumCount(w, c, a[:2*m]) + h.sumCount(w, c, a[2*m:])
}

// leafCount is sumSquares's leaf over the probabilities of the pairs a,
// binning each probability as Count does.
func (h *HaarKS) leafCount(w int, c []uint32, a []float64) float64 {
	// An AVX2 form of this loop (vector squares, sums and bin indices, the
	// increments from the vector lanes or from a buffer of indices) was
	// measured slower than this one: 9.9 ms against 7.9 ms for 2^22 pairs
	// on one core of an AMD EPYC Zen 5 (BenchmarkReadoutPasses/count), as
	// the time goes to the random increments of the counters, which this
	// loop overlaps with the arithmetic. So was an assembly loop with
	// VHADDPD squares and the bins found and incremented in general
	// registers, no value on the stack, the outer values out of line: 2.9
	// against 2.5 ns per amplitude at n = 24 and 1.1–1.4 against 0.8–0.9
	// at n = 16 (BenchmarkReadoutCPU/count, CPU time, alternating runs).
	// With the counters in the first-level cache the pass costs about
	// 0.85 ns per amplitude at n = 24 (2^9 bins per octave, 36 KiB),
	// against 1.9 ns with the 2^14 it needs: the increments to the
	// second-level cache are the cost, and a table of the same hot size
	// (the octaves of the mode) costs the same whether it is 0.3 or 1.2 MiB
	// in all (2^12 bins per octave took 2.1 ns).
	//
	// On an Intel Xeon of the Sapphire Rapids class (2 shared cores, one
	// thread pinned, BenchmarkReadoutCPU/count, CPU time, 6 alternating
	// runs) the AVX-512 kernel of count_amd64.s, which leavesCount calls
	// instead of this loop for eight leaves at a time, takes 0.65–0.84 of
	// this loop's time (medians of the pair ratios) from n = 14 to n = 24
	// (n = 16: 1.36 against 2.02 ns per amplitude; n = 22: 2.05 against
	// 2.83; n = 24: 2.54 against 2.95), and the whole read-out 0.86–0.95
	// from n = 16 on; at n = 12, one call per state, the count took 1.29
	// times as long (1.04–2.11) and the read-out the same. The kernel
	// squares, sums and bins in vectors and increments from a buffer of
	// indices: without the increments its four-leaf form took about 0.75
	// ns per amplitude at n = 16 against 1.5 with them, so the increments
	// are still the larger part. 8-bit counters with a carry into these
	// (a hot table a quarter the size) took 0.97 and 0.87 of the time at
	// n = 22 and 24, 16-bit ones 1.09 and 0.92, and both 1.2–1.3 times as
	// long at n = 12 (four-leaf form, ratios of medians of 5–7 runs, each
	// run in one order); not kept.
	r := h.r
	pos, shift, u := r.lo0&^(1<<63), r.shift&63, c[3:3+r.nbf]
	var s0, s1, s2, s3 float64
	i := 0
	for ; i+8 <= len(a); i += 8 {
		q := a[i : i+8 : i+8]
		// Every product is rounded on its own (the conversions forbid the
		// compiler to fuse a multiply and an add, as it may on arm64 or with
		// GOAMD64=v3): the values must equal the AVX2 filter's bit for bit,
		// or a value near a bin edge would be counted in one bin and
		// collected from another.
		p0 := float64(q[0]*q[0]) + float64(q[1]*q[1])
		p1 := float64(q[2]*q[2]) + float64(q[3]*q[3])
		p2 := float64(q[4]*q[4]) + float64(q[5]*q[5])
		p3 := float64(q[6]*q[6]) + float64(q[7]*q[7])
		s0 += float64(p0 * p0)
		s1 += float64(p1 * p1)
		s2 += float64(p2 * p2)
		s3 += float64(p3 * p3)
		if j := (math.Float64bits(p0) - pos) >> (shift & 63); j < uint64(len(u)) {
			u[j]++
		} else {
			h.countOuter(w, c, p0)
		}
		if j := (math.Float64bits(p1) - pos) >> (shift & 63); j < uint64(len(u)) {
			u[j]++
		} else {
			h.countOuter(w, c, p1)
		}
		if j := (math.Float64bits(p2) - pos) >> (shift & 63); j < uint64(len(u)) {
			u[j]++
		} else {
			h.countOuter(w, c, p2)
		}
		if j := (math.Float64bits(p3) - pos) >> (shift & 63); j < uint64(len(u)) {
			u[j]++
		} else {
			h.countOuter(w, c, p3)
		}
	}
	for ; i+2 <= len(a); i += 2 {
		p := float64(a[i]*a[i]) + float64(a[i+1]*a[i+1])
		s0 += float64(p * p)
		if j := (math.Float64bits(p) - pos) >> (shift & 63); j < uint64(len(u)) {
			u[j]++
		} else {
			h.countOuter(w, c, p)
		}
	}
	return (s0 + s1) + (s2 + s3)
}

// ksCountBatch is the number of leaves the AVX-512 count kernel takes in
// one call (4096 pairs, the simulator's chunk).
const ksCountBatch = 32

// ksCountGroup is the number of leaves of a group of the AVX-512 count
// kernel. It takes them an eighth of its batch apart (a leaf of four
// groups: 8 KiB for a full batch), so that it reads eight streams at once:
// one core reads several interleaved streams faster than one. Four leaves
// a quarter of the batch apart took 0.71–0.81 of the time of four side by
// side from n = 16 to 24 (medians of pair ratios over 6 alternating runs)
// and eight leaves 0.75–0.93 of the time of those four from n = 12 to 24
// (the same way; an exploratory copy of BenchmarkReadoutCPU's count on an
// Intel Sapphire Rapids class core, one pinned thread).
const ksCountGroup = 8

// leavesCount counts the probabilities of the pairs a, as leafCount does,
// and writes the collision sum of every leaf of pairwiseBlock pairs (the
// last one possibly shorter) to sums, one per leaf: the AVX-512 kernel
// takes the full leaves in batches of a multiple of ksCountGroup leaves,
// leafCount the others.
func (h *HaarKS) leavesCount(w int, c []uint32, a []float64, sums []float64) {
	r := h.r
	pos, shift := r.lo0&^(1<<63), uint64(r.shift)
	if h.kouter[w] == nil {
		h.kouter[w] = make([]float64, ksCountBatch*pairwiseBlock)
	}
	outer := h.kouter[w]
	var tmp [ksCountBatch]float64
	const leafBytes = 2 * pairwiseBlock * 8
	full := len(a) / (2 * pairwiseBlock)
	l := 0
	for full-l >= ksCountGroup {
		nb := min(ksCountBatch, (full-l)/ksCountGroup*ksCountGroup)
		g := nb / ksCountGroup // groups; leaf j of group i is leaf i + j·g
		k := ksCountAVX512(&a[2*pairwiseBlock*l], g, uintptr(g*leafBytes), leafBytes,
			pos, shift, &c[3], uint64(r.nbf), &tmp[0], &outer[0])
		for _, v := range outer[:k] {
			h.countOuter(w, c, v)
		}
		for i := range g {
			for j := range ksCountGroup {
				sums[l+i+j*g] = tmp[ksCountGroup*i+j]
			}
		}
		l += nb
	}
	for ; l < len(sums); l++ {
		end := min(len(a), 2*pairwiseBlock*(l+1))
		sums[l] = h.leafCount(w, c, a[2*pairwiseBlock*l:end])
	}
}

// leafTree adds the leaf sums of n pairs in the order in which sumCount
// (and sumSquares) adds its leaves.
func leafTree(sums []float64, n int) float64 {
	if n <= pairwiseBlock {
		return sums[0]
	}
	m := (n / 2 / pairwiseBlock) * pairwiseBlock
	if m == 0 {
		m = pairwiseBlock
	}
	return leafTree(sums[:m/pairwiseBlock], m) + leafTree(sums[m/pairwiseBlock:], n-m)
}

// countOuter counts a value outside the uniform level-0 bins.
func (h *HaarKS) countOuter(w int, c []uint32, v float64) {
	if v != v {
		h.nans[w] = true
		return
	}
	c[h.r.fine0(ksKey(v))]++
}

// Finish returns the statistic of the probabilities counted since the last
// Finish, calling pass for the refinement passes (passes reports how
// many: usually one); pass must hand out the same probabilities as the
// counted pass. The HaarKS is then ready for another state.
func (h *HaarKS) Finish(pass ProbabilityPass) (ks float64, passes int) {
	return h.finish(pass, nil)
}

// AmplitudePass is a ProbabilityPass over amplitudes: it hands every one of
// D amplitudes to visit exactly once per call, as (real, imaginary) float64
// pairs in blocks a (len(a) even), with the concurrency of a
// ProbabilityPass; the probabilities are re·re + im·im.
type AmplitudePass func(visit func(w int, a []float64))

// FinishAmplitudes is Finish for a state counted with CountAmplitudes: its
// refinement passes go over the amplitudes, and the usual one, which
// collects the values of the candidate bins, squares and tests them in one
// loop with no buffer of probabilities.
func (h *HaarKS) FinishAmplitudes(pass AmplitudePass) (ks float64, passes int) {
	if h.bufs == nil {
		h.bufs = make([][]float64, len(h.counts))
	}
	probs := func(visit func(w int, p []float64)) {
		pass(func(w int, a []float64) {
			if cap(h.bufs[w]) < len(a)/2 {
				h.bufs[w] = make([]float64, len(a)/2)
			}
			p := h.bufs[w][:len(a)/2]
			for i := range p {
				p[i] = float64(a[2*i]*a[2*i]) + float64(a[2*i+1]*a[2*i+1])
			}
			visit(w, p)
		})
	}
	return h.finish(probs, pass)
}

// finish runs the refinement passes over pass, and the collect pass over
// apass when it is not nil.
func (h *HaarKS) finish(pass ProbabilityPass, apass AmplitudePass) (ks float64, passes int) {
	r := h.r
	defer h.reset()
	r.gather(h.counts, h.nans)
	if r.nan {
		return math.NaN(), 0
	}
	// Sorting m values costs about m·log2(m) comparisons on one core (some
	// 50 ns per value at m = 2^18), a pass a few ns per value: collect once
	// the candidates are few enough that their sort costs less than another
	// pass.
	limit := int64(min(h.budget, max(ksMinCollect, r.dim/16)))
	for {
		cands, total := r.select_()
		switch {
		case len(cands) == 0:
			return r.best, passes
		case total <= limit:
			r.collect(pass, apass, cands)
			return r.best, passes + 1
		}
		r.split(pass, apass, cands)
		passes++
	}
}

// reset returns h to the state before the first pass of a state.
func (h *HaarKS) reset() {
	r := h.r
	for w := range h.counts {
		if !r.gathered {
			clear(h.counts[w])
		}
		h.nans[w] = false
	}
	// gather sets the counts of the level-0 nodes and the values below
	// them, so they need no clearing.
	r.nodes = r.nodes[:r.n0]
	r.state = r.state[:r.n0]
	r.lower, r.best, r.nan, r.gathered = 0, 0, false, false
}

// ksKey maps a float64 to a uint64 in the same order (for non-NaN values):
// the bits of a positive value with the sign bit set, the complement of a
// negative one's, without a branch.
func ksKey(v float64) uint64 {
	b := math.Float64bits(v)
	return b ^ (uint64(int64(b)>>63) | 1<<63)
}

// ksValue is the inverse of ksKey.
func ksValue(k uint64) float64 {
	if k>>63 == 1 {
		return math.Float64frombits(k &^ (1 << 63))
	}
	return math.Float64frombits(^k)
}

// Node states.
const (
	ksIdle    = iota // not a candidate (or resolved)
	ksSplit          // has children
	ksCount          // a leaf counted in the current pass
	ksCollect        // a leaf whose values the current pass collects
)

// ksNode is a bin of keys [lo, hi). Its state is kept apart, in
// ksRefiner.state, so that a pass reads one byte per value it routes.
type ksNode struct {
	lo, hi uint64
	count  int64 // values in the bin
	below  int64 // values in bins before it
	child  int32 // first child (ksSplit)
	nchild int32
	shift  uint8 // a child spans 2^shift keys (ksSplit)
}

type ksRefiner struct {
	dim     int
	workers int
	cdf     func(float64) float64
	nodes   []ksNode
	state   []uint8
	// Level-0 bins: node 0 negative values, 1 exact zeros, 2 positive values
	// below lo0, 3…3+nb0−1 the bins of the ksOctaves octaves from lo0 (see
	// ksOctaveBits), and the last one everything above; n0 = nb0+4 of them.
	// oct[o] holds, for octave o, the index from node 3 of its first bin
	// shifted left by 8, or'ed with the shift that turns the mantissa bits
	// of a key into the bin's place in the octave. The filters see the
	// octaves as nbf fine bins of 2^shift keys, the width of the bins of
	// the finest octave: every level-0 bin is a run of fine bins. f0[i]
	// holds the CDF at the smallest and the largest value of level-0 node i.
	lo0, kzero uint64
	shift      uint
	nb0, n0    int
	nbf        int
	oct        [ksOctaves]uint64
	f0         [][2]float64
	// lower is L, the running lower bound; best the largest exact term found.
	lower, best float64
	nan         bool
	// active has bit b set when level-0 node b is not idle: a pass rejects
	// most values with this table, before touching any node.
	active []uint64
	// act0 holds 1 for each fine bin whose level-0 bin is not idle, the
	// byte the collect pass reads per value.
	act0 []uint8
	// actLo and actHi span the active fine bins (actLo > actHi when there
	// is none): ksFilterAVX2 looks up act0 only inside the span.
	actLo, actHi int
	// filt is the collect pass's filter of the last markActive.
	filt ksFilter
	// ups and sbest are select_'s buffers and best and lower per goroutine.
	ups   [][]ksUpper
	sbest [][2]float64
	// vals, all and offs are the collect pass's buffers, kept for the next
	// state.
	vals [][]float64
	all  []float64
	offs []int64
	slot []int32 // a candidate leaf's position in the collect pass's list
	// vslot holds, per worker, the slot of each value of vals; gcnt and
	// gpos are the grouping's counts and positions per worker and slot.
	vslot      [][]int32
	gcnt, gpos [][]int64
	// srch are the searchers of the candidate leaves, one per worker;
	// floor is the bits of the largest max(best, lower) any has published.
	srch  []ksSearcher
	floor atomic.Uint64
	// gathered is set when gather has cleared the first-pass counters.
	gathered bool
	// kept holds each worker's values kept by ksFilterPairs in a block.
	kept [][]float64
	// runs, gaps and order are markActive's buffers for the filter's
	// intervals (see ksFilter.set).
	runs  [][2]int
	gaps  []int64
	order []int
	// scounts and dcounts are split's counts per worker (dcounts its dense
	// ones), kept for the next split; sused and dused mark those a split's
	// pass has cleared for its use.
	scounts, dcounts [][]uint32
	sused, dused     []bool
}

// ksOctaves is the number of octaves of D·p covered by the level-0 bins,
// from 2^ksOctaveLo; ksMant masks the mantissa bits of a key.
const (
	ksOctaves  = 18
	ksOctaveLo = -12
	ksMant     = 1<<52 - 1
)

// ksOctaveBits returns the number of bits of 2^bits level-0 bins in the
// octave [2^k, 2^(k+1)) of D·p, for b bits of fine bins per octave.
//
// What decides how many values stay candidates after the first pass is a
// bin's probability mass against the statistic (~1/√D), not its width: the
// bounds L_j and U_j differ by about the bin's mass. Under the Porter–Thomas
// law (density e^−x in x = D·p), a fine bin of 2^−b of the octave from 2^k
// holds at most 2^k·e^(−2^k)·2^−b of the mass, e^−1·2^−b at k = 0, far less
// in the low octaves (2^−12 of it at k = −12) and the high ones. Each
// octave gets the fewest level-0 bins that keep their mass at most the
// largest, e^−1·2^−b: b − floor(log2(e^−1/(2^k·e^(−2^k)))), at least one.
// That is 2^b bins in the four octaves from 1/4 to 4, 2^(b−1) from 1/8,
// 2^(b−2) from 1/16 and from 4, …: about 5.3·2^b bins instead of 18·2^b.
//
// The count pass still counts the fine bins: its cost is the random
// increments of the counters, and those follow the mass, which lies in the
// same few octaves whichever layout counts it. Counting into the level-0
// bins themselves (an index from a table per octave) took 2.3 against 1.9
// ns per amplitude at n = 24 and 1.2–1.3 against 0.8–0.9 at n = 16 on one
// core of an AMD EPYC Zen 5 (BenchmarkReadoutCPU/count, CPU time): the
// extra table look-up and variable shift cost more than the 3.4 times
// smaller table saved. The per-bin loops after the pass (gather, select_,
// bounds, markActive, reset: 20% of a read-out at n = 20) are what the
// level-0 layout makes cheaper.
func ksOctaveBits(k int, b uint) uint {
	r := math.Floor((math.Ldexp(1, k)-1)/math.Ln2 - float64(k)) // log2(e^−1/(2^k·e^(−2^k)))
	return uint(max(0, int(b)-int(r)))
}

const ksSlack = 1e-12 // candidates keep U_j ≥ L − slack, so rounding in the bounds never drops the supremum's bin

// ksBinBits returns the number of bits b of 2^b fine bins per octave for
// dim = 2^n values (and of level-0 bins in the octaves of the mode):
// b = min(n − 6, n/2 + 2), from 2^4 to 2^14 bins per octave. From n = 20 on, the n/2 + 2 term applies: the mass of a bin near
// the mode of the Porter–Thomas law (≲ e^−1·ln 2·2^−b) then falls like the
// statistic's typical size 1/√D, so that about the same share of the values
// stays in candidate bins after the first pass, while the counters of the
// first pass grow only like √D; the earlier rule, n − 7 (dim/2^7 bins per
// octave), kept 2^14 bins from n = 21 on. Measured on BenchmarkReader (scan,
// two workers, AMD EPYC Zen 5, median of 4 alternating runs per b): n = 20:
// b = 12, 2.3 ms against 3.4 ms at b = 13 (b = 11: 2.4 ms); n = 22: b = 13,
// 9.7 ms against 10.8 ms at b = 14 (b = 12: 8.8 ms); n = 24: b = 14, 42 ms
// against 49 ms at b = 13 and 61 ms at b = 12, where coarser bins leave
// more than D/16 candidate values and need a split pass. Up to n = 18 the
// n − 7 term is kept: at n = 16 a finer b = 10 was faster on
// BenchmarkReader (0.28 against 0.35 ms), but the demo scan (n = 16, one
// worker per read-out) ran 1.37 billion instructions in the per-bin loops
// (select_, finish, bounds, markActive) against 0.73 billion at b = 9
// (callgrind, 40 instances), so it stayed at b = 9. (Tuned first on the demo scan: dim/2^9 and dim/2^5 bins per
// octave were both slower.) Since the level-0 bins follow the mass
// (ksOctaveBits), the per-bin loops go over 3.4 times fewer bins, and the
// rule became n − 6 (b = 10 at n = 16, 8 at n = 14): a read-out on one
// worker (BenchmarkReadoutCPU, CPU time of the thread, 4 alternating runs)
// took 6.6 against 8.7 ns per amplitude at n = 12, 2.8 against 3.3 at
// n = 14 and 2.8 against 3.2 at n = 16 (medians) with n − 6 than with n − 7.
func ksBinBits(dim int) uint {
	n := bits.Len(uint(dim)) - 1
	return uint(min(ksMaxBinBits, max(4, min(n-6, n/2+2))))
}

func newKSRefiner(dim, workers int) *ksRefiner {
	h := HaarProb{Dim: float64(dim)}
	b := ksBinBits(dim)
	r := &ksRefiner{dim: dim, workers: workers, cdf: h.CDF, shift: 52 - b}
	// Bins over D·p in [2^−12, 2^6): ksOctaves = 18 octaves, which hold all
	// but about 2^−12 of the Porter–Thomas mass; the rest falls in the two
	// outer bins, refined like any other when they can hold the supremum.
	// For D a power of two (a state's) 2^−12/D is one too, so lo0 is the
	// key of the first value of an octave and the octave of a key k ≥ lo0
	// is (k − lo0) >> 52. For other D the same arithmetic still cuts the
	// keys into contiguous runs, only off the octaves, and the statistic
	// stays exact (TestKSHaarPassesAnyDim).
	r.lo0 = ksKey(math.Ldexp(1, ksOctaveLo) / float64(dim))
	r.nbf = ksOctaves << b
	r.kzero = ksKey(0)
	top := r.lo0 + uint64(ksOctaves)<<52
	r.nodes = make([]ksNode, 0, 4+r.nbf)
	r.nodes = append(r.nodes,
		ksNode{lo: ksKey(math.Inf(-1)), hi: r.kzero},
		ksNode{lo: r.kzero, hi: r.kzero + 1},
		ksNode{lo: r.kzero + 1, hi: r.lo0},
	)
	for o := range ksOctaves {
		bo := ksOctaveBits(o+ksOctaveLo, b)
		r.oct[o] = uint64(len(r.nodes)-3)<<8 | uint64(52-bo)
		for i := range 1 << bo {
			l := r.lo0 + uint64(o)<<52 + uint64(i)<<(52-bo)
			r.nodes = append(r.nodes, ksNode{lo: l, hi: l + 1<<(52-bo)})
		}
	}
	r.nb0 = len(r.nodes) - 3
	r.n0 = r.nb0 + 4
	r.nodes = append(r.nodes, ksNode{lo: top, hi: ksKey(math.Inf(1)) + 1})
	r.state = make([]uint8, len(r.nodes))
	r.f0 = make([][2]float64, r.n0)
	for i := range r.nodes {
		r.f0[i] = [2]float64{r.cdf(ksValue(r.nodes[i].lo)), r.cdf(ksValue(r.nodes[i].hi - 1))}
	}
	return r
}

// below0 returns the level-0 node (and first-pass counter) of a key below
// the octaves: 0 below zero, 1 for zero, 2 between zero and the octaves.
func (r *ksRefiner) below0(k uint64) int {
	switch {
	case k < r.kzero:
		return 0
	case k == r.kzero:
		return 1
	}
	return 2
}

// fine0 returns the first pass's counter of key k: 0, 1 and 2 those of
// level-0 nodes 0, 1 and 2, 3+j that of fine bin j, and 3+nbf that of the
// last level-0 node.
func (r *ksRefiner) fine0(k uint64) int {
	if k < r.lo0 {
		return r.below0(k)
	}
	return 3 + int(min((k-r.lo0)>>r.shift, uint64(r.nbf)))
}

// bin0 returns the level-0 node of key k.
func (r *ksRefiner) bin0(k uint64) int {
	if k < r.lo0 {
		return r.below0(k)
	}
	d := k - r.lo0
	if d>>52 >= ksOctaves {
		return 3 + r.nb0
	}
	e := r.oct[d>>52]
	return 3 + int(e>>8+(d&ksMant)>>(e&63))
}

// gather sets the counts of the level-0 nodes to the sums of the workers'
// first-pass counters, clears those counters for the next state, and makes
// every level-0 node a counted leaf. From ksParallelBins fine bins on, the
// octaves are shared among one goroutine per worker (ksParallel), which
// also set the counts of values below their nodes once the totals of the
// shares are known: on one core this took about 1 ms at 2^14 bins per
// octave, the reset's clearing of the counters 0.6 ms more.
func (r *ksRefiner) gather(counts [][]uint32, nans []bool) {
	for w := range counts {
		r.nan = r.nan || nans[w]
	}
	b := 52 - r.shift
	goroutines := 1
	if r.nbf >= ksParallelBins {
		goroutines = min(r.workers, ksOctaves)
	}
	// Goroutine g takes the octaves [share(g), share(g+1)), the nodes from
	// 3 + first(share(g)) on.
	share := func(g int) int { return g * ksOctaves / goroutines }
	first := func(o int) int {
		if o == ksOctaves {
			return r.nb0
		}
		return int(r.oct[o] >> 8)
	}
	var totals [ksOctaves + 1]int64
	u := r.nodes[3 : 3+r.nb0]
	ksParallel(goroutines, func(g int) {
		var t int64
		for o := share(g); o < share(g+1); o++ {
			// The fine counters of each octave's bins: a bin of octave o
			// holds 2^(bits of the finest octave − bits of o) of them.
			e := r.oct[o]
			run := 1 << (b - (52 - uint(e&63)))
			uo := u[e>>8 : int(e>>8)+1<<b/run]
			for i := range uo {
				uo[i].count = 0
			}
			for _, c := range counts {
				fo := c[3+o<<b : 3+(o+1)<<b]
				if run == 1 {
					for i, v := range fo {
						uo[i].count += int64(v)
					}
				} else {
					for i := range uo {
						var s int64
						for _, v := range fo[i*run : (i+1)*run] {
							s += int64(v)
						}
						uo[i].count += s
					}
				}
				clear(fo)
			}
			for i := range uo {
				t += uo[i].count
			}
		}
		totals[g+1] = t
	})
	// The outer nodes, and the counter past the last that the AVX-512
	// count kernel increments for the values it hands to countOuter.
	for i := range 3 {
		r.nodes[i].count = 0
	}
	r.nodes[r.n0-1].count = 0
	for _, c := range counts {
		for i := range 3 {
			r.nodes[i].count += int64(c[i])
		}
		r.nodes[r.n0-1].count += int64(c[3+r.nbf])
		clear(c[:3])
		clear(c[3+r.nbf:])
	}
	var below int64
	for i := range 3 {
		r.nodes[i].below = below
		below += r.nodes[i].count
	}
	totals[0] = below
	for g := range goroutines {
		totals[g+1] += totals[g]
	}
	ksParallel(goroutines, func(g int) {
		below := totals[g]
		for i := 3 + first(share(g)); i < 3+first(share(g+1)); i++ {
			r.nodes[i].below = below
			below += r.nodes[i].count
		}
	})
	r.nodes[r.n0-1].below = totals[goroutines]
	for i := range r.state {
		r.state[i] = ksCount
	}
	r.gathered = true
}

// ksParallelBins is the number of fine bins (gather) or nodes (select_)
// from which those share their loops among the workers (a variable, as
// ksParallelValues).
var ksParallelBins = 1 << 16

// bounds returns L_j and U_j of non-empty node i.
func (r *ksRefiner) bounds(i int) (lower, upper float64) {
	nd := &r.nodes[i]
	d := float64(r.dim)
	var ft, fu float64
	if i < r.n0 {
		ft, fu = r.f0[i][0], r.f0[i][1]
	} else {
		ft, fu = r.cdf(ksValue(nd.lo)), r.cdf(ksValue(nd.hi-1))
	}
	after, before := float64(nd.below+nd.count)/d, float64(nd.below)/d
	return max(after-fu, ft-before), max(after-ft, fu-before)
}

// select_ turns the leaves counted in the last pass into candidates or idle
// nodes and returns the candidates with their total count. From
// ksParallelBins nodes on, the nodes are shared among one goroutine per
// worker, each with its own list of bounds (ups[g]); the lists are read in
// node order, so the candidates are those of one loop.
func (r *ksRefiner) select_() (cands []int32, total int64) {
	goroutines := 1
	if len(r.state) >= ksParallelBins {
		goroutines = r.workers
	}
	if len(r.ups) < goroutines {
		r.ups = append(r.ups, make([][]ksUpper, goroutines-len(r.ups))...)
		r.sbest = make([][2]float64, goroutines)
	}
	ksParallel(goroutines, func(g int) {
		// One pass over the nodes takes both bounds of each counted leaf;
		// the second goes over the non-empty ones only.
		ups := r.ups[g][:0]
		best, lower := r.best, r.lower
		for i := g * len(r.state) / goroutines; i < (g+1)*len(r.state)/goroutines; i++ {
			if r.state[i] != ksCount {
				continue
			}
			r.state[i] = ksIdle
			nd := &r.nodes[i]
			if nd.count == 0 {
				continue
			}
			l, u := r.bounds(i)
			if nd.hi-nd.lo == 1 {
				best = max(best, l) // one distinct value: the bound is a term
			} else {
				ups = append(ups, ksUpper{i: int32(i), u: u})
			}
			lower = max(lower, l)
		}
		r.ups[g], r.sbest[g] = ups, [2]float64{best, lower}
	})
	for g := range goroutines {
		r.best, r.lower = max(r.best, r.sbest[g][0]), max(r.lower, r.sbest[g][1])
	}
	for _, ups := range r.ups[:goroutines] {
		for _, e := range ups {
			if e.u >= r.lower-ksSlack {
				cands = append(cands, e.i)
				total += r.nodes[e.i].count
			}
		}
	}
	return cands, total
}

// ksUpper is a counted leaf with its upper bound U_j.
type ksUpper struct {
	i, f int32 // f: refine's index of the sub-bin's CDF values
	u    float64
}

// markActive rebuilds the table of level-0 nodes that are not idle: a
// level-0 node is active when it is a counted or collected leaf, or when it
// was split and one of its descendants is. A split node whose descendants
// are all idle again is left out, so that the passes after a split skip its
// values in the filter instead of walking each to an idle leaf (at 2^24
// values and 2^12 bins per octave, 15% of the values lie in bins split by
// the first refinement, and the collect pass kept them all).
func (r *ksRefiner) markActive() {
	n0 := r.n0
	if r.active == nil {
		r.active = make([]uint64, (n0+63)/64)
	}
	if r.act0 == nil {
		// Zero padding past the table: ksFilterAVX2 reads act[nb] for the
		// lanes outside the active span.
		r.act0 = make([]uint8, r.nbf, r.nbf+ksActPad)
	}
	// act0 holds 1 in the runs of the last call alone: clearing those, not
	// the whole table, and reading the nodes of the active bins alone keeps
	// this loop to one byte of state per level-0 node. In CPU profiles of
	// BenchmarkReadoutCPU/n=16/readout (5000 read-outs, one core of the
	// 2-core Intel Xeon KVM guest this project was measured on), markActive
	// took 12% of the read-out's samples when it rewrote every fine bin and
	// 4% in this form.
	for _, run := range r.runs {
		clear(r.act0[run[0]:run[1]])
	}
	clear(r.active)
	r.actLo, r.actHi = r.nbf, -1
	// The runs of active fine bins for the filter's intervals, and the
	// values between consecutive runs (the cost of merging them): the
	// level-0 nodes tile the fine bins in key order, and below counts the
	// values before a node.
	runs, gaps := r.runs[:0], r.gaps[:0]
	var end int64 // the values up to the end of the last active uniform bin
	for i, st := range r.state[:n0] {
		if st == ksIdle || (st == ksSplit && !r.live(i)) {
			continue
		}
		r.active[i>>6] |= 1 << (i & 63)
		if i < 3 || i >= 3+r.nb0 {
			continue
		}
		// The fine bins of node i.
		nd := &r.nodes[i]
		flo, fhi := int((nd.lo-r.lo0)>>r.shift), int((nd.hi-r.lo0)>>r.shift)
		switch {
		case len(runs) > 0 && runs[len(runs)-1][1] == flo:
			runs[len(runs)-1][1] = fhi
		default:
			if len(runs) > 0 {
				gaps = append(gaps, nd.below-end)
			}
			runs = append(runs, [2]int{flo, fhi})
		}
		end = nd.below + nd.count
		if fhi-flo == 1 {
			r.act0[flo] = 1
		} else {
			act := r.act0[flo:fhi]
			for j := range act {
				act[j] = 1
			}
		}
	}
	if len(runs) > 0 {
		r.actLo, r.actHi = runs[0][0], runs[len(runs)-1][1]-1
	}
	r.runs, r.gaps = runs, gaps
	r.filt.set(r.lo0&^(1<<63), r.shift, r.act0, [2]int{r.actLo, r.actHi}, runs, gaps, &r.order)
}

// live reports whether node i is a counted or collected leaf or has one
// among its descendants.
func (r *ksRefiner) live(i int) bool {
	switch r.state[i] {
	case ksIdle:
		return false
	case ksSplit:
		nd := &r.nodes[i]
		for j := nd.child; j < nd.child+nd.nchild; j++ {
			if r.live(int(j)) {
				return true
			}
		}
		return false
	}
	return true
}

// leaf walks from the level-0 bin of key k down to its leaf and returns the
// leaf's index, or −1 when the level-0 bin is idle.
func (r *ksRefiner) leaf(k uint64) int {
	i := r.bin0(k)
	if r.active[i>>6]>>(i&63)&1 == 0 {
		return -1
	}
	return r.descend(i, k)
}

// descend walks from node i, which holds key k, down to its leaf.
func (r *ksRefiner) descend(i int, k uint64) int {
	for r.state[i] == ksSplit {
		nd := &r.nodes[i]
		i = int(nd.child) + int((k-nd.lo)>>nd.shift)
	}
	return i
}

// split divides each candidate into at most per children of 2^shift keys
// and counts them in one pass over the probabilities or, when apass is not
// nil, over the amplitudes. That pass skips the values of idle level-0 bins
// with the collect pass's filter (ksFilterPairs) and routes only the kept
// ones to their leaves, so that it runs near the collect pass's speed
// instead of walking from the level-0 bin of every value.
func (r *ksRefiner) split(pass ProbabilityPass, apass AmplitudePass, cands []int32) {
	per := uint64(max(2, min(ksMaxLeaves, max(256, r.dim/32))/len(cands)))
	first := len(r.nodes)
	for _, ci := range cands {
		lo, hi := r.nodes[ci].lo, r.nodes[ci].hi
		width := hi - lo
		shift := uint8(bits.Len64((width+per-1)/per - 1)) // 2^shift ≥ width/per
		child := int32(len(r.nodes))
		for l := lo; l < hi; {
			h := hi
			if hi-l > 1<<shift {
				h = l + 1<<shift
			}
			r.nodes = append(r.nodes, ksNode{lo: l, hi: h})
			r.state = append(r.state, ksCount)
			l = h
		}
		nd := &r.nodes[ci]
		r.state[ci] = ksSplit
		nd.child, nd.shift, nd.nchild = child, shift, int32(len(r.nodes))-child
	}
	r.markActive()
	slots := len(r.nodes) - first
	// In the first split every candidate is a level-0 node. The counts of
	// the children of those in the octaves are then held in one array of
	// cells of 2^cs keys, cs the smallest shift of their children, indexed
	// by the value's bits from the first such candidate, as the count pass
	// indexes its bins, with no walk down the nodes; the values outside
	// (outer bins) take leaf. A child's count is the sum of its cells (one
	// when the candidates lie in octaves of the same width). Every level-0
	// bin and child starts on a multiple of 2^cs keys from lo0, so the cells
	// tile them. The array also has cells for the idle bins between
	// candidates, which are not read.
	dense := true
	cs, dlo, dhi := uint(64), uint64(math.MaxUint64), uint64(0)
	for _, ci := range cands {
		dense = dense && int(ci) < r.n0
		if ci >= 3 && int(ci) < 3+r.nb0 {
			nd := &r.nodes[ci]
			cs, dlo, dhi = min(cs, uint(nd.shift)), min(dlo, nd.lo), max(dhi, nd.hi)
		}
	}
	var dlen int
	var dpos uint64
	if dense = dense && dlo < dhi; dense {
		dlen = int(min((dhi-dlo)>>cs, ksMaxDense+1))
		dpos = dlo &^ (1 << 63)
		dense = dlen <= ksMaxDense
	}
	if r.scounts == nil {
		r.scounts, r.dcounts = make([][]uint32, r.workers), make([][]uint32, r.workers)
		r.sused, r.dused = make([]bool, r.workers), make([]bool, r.workers)
	}
	counts, dcounts := r.scounts, r.dcounts
	clear(r.sused)
	clear(r.dused)
	route := func(w int, p []float64) {
		c := counts[w]
		if !r.sused[w] {
			c = ksZeros(c, slots)
			counts[w], r.sused[w] = c, true
		}
		if !dense {
			for _, v := range p {
				if i := r.leaf(ksKey(v)); i >= first {
					c[i-first]++ // the new leaves are the only ksCount nodes
				}
			}
			return
		}
		dc := dcounts[w]
		if !r.dused[w] {
			dc = ksZeros(dc, dlen)
			dcounts[w], r.dused[w] = dc, true
		}
		for _, v := range p {
			if j := (math.Float64bits(v) - dpos) >> (cs & 63); j < uint64(len(dc)) {
				dc[j]++
			} else if i := r.leaf(ksKey(v)); i >= first {
				c[i-first]++
			}
		}
	}
	if apass != nil {
		r.filterPass(apass, route)
	} else {
		pass(route)
	}
	for _, ci := range cands {
		nd := r.nodes[ci]
		below := nd.below
		fromDense := dense && int(ci) >= 3 && int(ci) < 3+r.nb0
		for j := nd.child; j < nd.child+nd.nchild; j++ {
			ch := &r.nodes[j]
			for w := range counts {
				switch {
				case fromDense && r.dused[w]:
					for _, c := range dcounts[w][(ch.lo-dlo)>>cs : (ch.hi-dlo)>>cs] {
						ch.count += int64(c)
					}
				case !fromDense && r.sused[w]:
					ch.count += int64(counts[w][int(j)-first])
				}
			}
			ch.below = below
			below += ch.count
		}
	}
}

// ksZeros returns n zeros (counters, positions), in c when it has the
// room.
func ksZeros[T uint32 | int64](c []T, n int) []T {
	if cap(c) < n {
		return make([]T, n)
	}
	c = c[:n]
	clear(c)
	return c
}

// ksMaxDense bounds the dense counts of a first split (4 MiB per worker).
const ksMaxDense = 1 << 20

// collect gathers the values of the candidate leaves and takes the exact
// terms of the statistic from them, in a pass over the probabilities or,
// when apass is not nil, over the amplitudes. The pass rejects most values
// with one byte of a table of the active level-0 bins, and keeps with each
// value its leaf's place in cands. The values are then grouped by leaf
// (their counts are known), and each leaf is sorted and searched by
// bisection only while its bound can exceed the best term found, leaves
// with the largest bounds first: most candidate leaves need no sort and no
// CDF evaluation per value. From ksParallelValues values on, the grouping
// and the search run on one goroutine per worker (ksParallel): at 2^24
// amplitudes they take some 8 ms on one core (about 380 thousand values in
// a thousand leaves), as long as a third of the collect pass on two.
func (r *ksRefiner) collect(pass ProbabilityPass, apass AmplitudePass, cands []int32) {
	for _, ci := range cands {
		r.state[ci] = ksCollect
	}
	r.markActive()
	// The candidates in key order.
	slices.SortFunc(cands, func(a, b int32) int {
		switch la, lb := r.nodes[a].lo, r.nodes[b].lo; {
		case la < lb:
			return -1
		case la > lb:
			return 1
		}
		return 0
	})
	// slot[i] is leaf i's position in cands; off[c] is the first place of
	// the values of cands[c] in all.
	if len(r.slot) < len(r.nodes) {
		r.slot = make([]int32, len(r.nodes))
	}
	var total int64
	off := r.offs[:0]
	for i, ci := range cands {
		r.slot[ci] = int32(i)
		off = append(off, total)
		total += r.nodes[ci].count
	}
	r.offs = off
	if r.vals == nil {
		r.vals = make([][]float64, r.workers) // worker w alone touches vals[w] and vslot[w]
		r.vslot = make([][]int32, r.workers)
	}
	if len(r.gcnt) < r.workers {
		r.gcnt, r.gpos = make([][]int64, r.workers), make([][]int64, r.workers)
	}
	for w := range r.vals {
		r.vals[w], r.vslot[w] = r.vals[w][:0], r.vslot[w][:0]
		r.gcnt[w] = ksZeros(r.gcnt[w], len(cands))
	}
	// A value is kept when its level-0 bin is active (one byte of act0 for
	// the uniform bins, the bitmap for the outer ones) and its leaf is a
	// candidate.
	pos, shift, act := r.lo0&^(1<<63), r.shift, r.act0
	keep := func(w int, v float64) {
		k := ksKey(v)
		if i := r.bin0(k); r.active[i>>6]>>(i&63)&1 != 0 {
			if j := r.descend(i, k); r.state[j] == ksCollect {
				sl := r.slot[j]
				r.vals[w] = append(r.vals[w], v)
				r.vslot[w] = append(r.vslot[w], sl)
				r.gcnt[w][sl]++
			}
		}
	}
	if apass != nil {
		r.filterPass(apass, func(w int, kept []float64) {
			for _, v := range kept {
				keep(w, v)
			}
		})
	} else {
		pass(func(w int, p []float64) {
			for {
				p = p[ksSkip(p, pos, shift, act):]
				if len(p) == 0 {
					break
				}
				keep(w, p[0])
				p = p[1:]
			}
		})
	}
	if int64(cap(r.all)) < total {
		r.all = make([]float64, total)
	}
	all := r.all[:total]
	goroutines := 1
	if total >= ksParallelValues {
		goroutines = r.workers
	}
	r.group(all, len(cands), goroutines)
	// Leaves by decreasing upper bound.
	order := make([]int, len(cands))
	ub := make([]float64, len(cands))
	for i, ci := range cands {
		order[i] = i
		_, ub[i] = r.bounds(int(ci))
	}
	slices.SortFunc(order, func(a, b int) int {
		switch {
		case ub[a] > ub[b]:
			return -1
		case ub[a] < ub[b]:
			return 1
		}
		return 0
	})
	// The searchers take the leaves in that order, each the next one left;
	// a leaf whose bound is below the floor of all that the others found
	// is passed over, and so are all after it. Each term the searchers
	// take is an exact term, and the leaf of the supremum is never passed
	// over, so the largest of their terms is the statistic whatever the
	// order in which they meet the leaves.
	if len(r.srch) < r.workers {
		r.srch = make([]ksSearcher, r.workers)
		for g := range r.srch {
			r.srch[g] = ksSearcher{dim: r.dim, cdf: r.cdf, floor: &r.floor}
		}
	}
	r.floor.Store(math.Float64bits(max(r.best, r.lower)))
	var next atomic.Int64
	ksParallel(goroutines, func(g int) {
		s := &r.srch[g]
		s.best, s.lower = r.best, r.lower
		for {
			k := int(next.Add(1)) - 1
			if k >= len(order) {
				return
			}
			i := order[k]
			if ub[i] < s.cut() {
				return
			}
			nd := &r.nodes[cands[i]]
			vs := all[off[i] : off[i]+nd.count]
			if cap(s.tmp) < len(vs) {
				s.tmp = make([]float64, len(vs))
			}
			ft, fu := r.cdf(ksValue(nd.lo)), r.cdf(ksValue(nd.hi-1))
			if int(cands[i]) < r.n0 {
				ft, fu = r.f0[cands[i]][0], r.f0[cands[i]][1]
			}
			s.refine(vs, s.tmp[:len(vs)], nd.below, nd.lo, nd.hi, ft, fu)
			s.publish()
		}
	})
	for g := range goroutines {
		r.best, r.lower = max(r.best, r.srch[g].best), max(r.lower, r.srch[g].lower)
	}
}

// ksParallelValues is the number of collected values from which collect
// groups and searches them on one goroutine per worker (a variable so that
// the tests can compare both forms on small states).
var ksParallelValues int64 = 1 << 15

// group writes the values of r.vals to all grouped by candidate leaf, the
// values of the leaf of slot c from r.offs[c] on, in the order of the
// workers and, within one, of the pass, on goroutines goroutines, each of
// which places the values of its workers; r.gcnt holds each worker's count
// per slot, taken in the pass.
func (r *ksRefiner) group(all []float64, ncand, goroutines int) {
	for w := range r.workers {
		r.gpos[w] = ksZeros(r.gpos[w], ncand)
	}
	for c, p := range r.offs {
		for w := range r.workers {
			r.gpos[w][c] = p
			p += r.gcnt[w][c]
		}
	}
	ksParallel(goroutines, func(g int) {
		for w := g; w < r.workers; w += goroutines {
			p := r.gpos[w]
			for i, sl := range r.vslot[w] {
				all[p[sl]] = r.vals[w][i]
				p[sl]++
			}
		}
	})
}

// ksParallel runs f(0), …, f(n−1) at once, f(0) on the calling goroutine,
// and returns when all have returned; a panic in any of them is raised
// again here, with its own stack (crash.Carrier). n ≤ 1 runs f(0) alone.
func ksParallel(n int, f func(g int)) {
	if n <= 1 {
		f(0)
		return
	}
	var wg sync.WaitGroup
	var carry crash.Carrier
	for g := 1; g < n; g++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			defer carry.Catch()
			f(g)
		}()
	}
	func() {
		defer carry.Catch()
		f(0)
	}()
	wg.Wait()
	carry.Rethrow()
}

// ksSearcher takes the exact terms of candidate leaves (refine, search)
// on one goroutine of collect, with scratch of its own. best is the
// largest exact term it found, lower its running lower bound L.
type ksSearcher struct {
	dim         int
	cdf         func(float64) float64
	best, lower float64
	// floor holds the bits of the largest max(best, lower) that any
	// searcher of the collect has published (ksRefiner.floor): both are
	// non-negative, so the bits order as the values.
	floor *atomic.Uint64
	tmp   []float64    // refine's scratch
	ints  []int64      // refine's counts, a stack
	subs  []ksUpper    // refine's sub-bins, a stack
	fsub  [][2]float64 // the CDF at their smallest and largest keys
}

// cut returns the bound below which a region cannot hold the supremum:
// the largest of this searcher's best and lower and of the shared floor,
// less ksSlack.
func (r *ksSearcher) cut() float64 {
	return max(r.best, r.lower, math.Float64frombits(r.floor.Load())) - ksSlack
}

// publish raises the shared floor to max(best, lower).
func (r *ksSearcher) publish() {
	v := math.Float64bits(max(r.best, r.lower))
	for {
		old := r.floor.Load()
		if v <= old || r.floor.CompareAndSwap(old, v) {
			return
		}
	}
}

// filterPass runs a pass over the amplitudes apass that hands visit, per
// block of at most ksFilterBlock pairs, the probabilities ksFilterPairs
// keeps with the active level-0 bins of the last markActive: those of the
// active bins, and every value outside the uniform bins. kept is reused
// once visit returns.
func (r *ksRefiner) filterPass(apass AmplitudePass, visit func(w int, kept []float64)) {
	if r.kept == nil {
		r.kept = make([][]float64, r.workers)
	}
	f := &r.filt
	apass(func(w int, a []float64) {
		out := r.kept[w] // worker w alone touches kept[w]
		if len(out) < ksStreams*ksFilterBlock {
			out = make([]float64, ksStreams*ksFilterBlock)
			r.kept[w] = out
		}
		for len(a) >= 2 {
			m := min(len(a), 2*len(out)) &^ 1
			visit(w, out[:ksFilterPairs(a[:m], f, out)])
			a = a[m:]
		}
	})
}

// ksRefineSort is the number of values below which refine sorts them
// instead of splitting their bin again.
const ksRefineSort = 128

// ksRefineBits gives refine's 2^ksRefineBits sub-bins per bin.
const ksRefineBits = 5

// refine raises r.best to the largest term of the values vs, all the
// values with keys in [lo, hi), whose smallest has rank below. It splits
// the bin into sub-bins of equal key width, groups vs by sub-bin through
// tmp (len(tmp) = len(vs); both are in cache, as the collect pass has just
// written them), takes each sub-bin's bounds as select_ takes a node's, and
// recurses into the sub-bins whose upper bound can still reach the
// statistic (at least max(best, lower) − slack), largest bounds first; a
// sub-bin of one distinct value is resolved from its bounds, and a run of
// at most ksRefineSort values is sorted and searched. The terms are those
// of the sort, so the result is the same; it replaces the sort of whole
// candidate bins (up to D/16 values, about 15% of a read-out at 2^24 on one
// core): with 2^5 sub-bins, runs of 128 and the test from the parent's CDF
// values below, a read-out of a Porter–Thomas state of 2^24 amplitudes
// takes 518 million instructions against 776 million with the sort
// (callgrind, BenchmarkReader/n=24); without that test, refine took as many
// as the sort.
//
// pft and pfu are the CDF at the smallest and the largest value of the
// bin's keys: every sub-bin's CDF values lie between them, so a sub-bin
// whose bound from them is already too small is passed over without
// evaluating the CDF at its edges.
func (r *ksSearcher) refine(vs, tmp []float64, below int64, lo, hi uint64, pft, pfu float64) {
	if len(vs) <= ksRefineSort {
		slices.Sort(vs)
		r.search(vs, below, 0, len(vs), r.cdf(vs[0]), r.cdf(vs[len(vs)-1]))
		return
	}
	width := hi - lo
	shift := uint(bits.Len64((width - 1) >> ksRefineBits))
	nsub := int((width-1)>>shift) + 1
	// cnt and fill live on r.ints, used as a stack (the callees' parts lie
	// above this call's and are dropped when they return).
	base := len(r.ints)
	r.ints = slices.Grow(r.ints, 2*nsub+1)[:base+2*nsub+1]
	defer func() { r.ints = r.ints[:base] }()
	cnt, fill := r.ints[base:base+nsub+1], r.ints[base+nsub+1:]
	clear(cnt)
	for _, v := range vs {
		cnt[(ksKey(v)-lo)>>shift+1]++
	}
	for i := 1; i <= nsub; i++ {
		cnt[i] += cnt[i-1]
	}
	// cnt[i] is now the first position of sub-bin i.
	copy(fill, cnt[:nsub])
	for _, v := range vs {
		i := (ksKey(v) - lo) >> shift
		tmp[fill[i]] = v
		fill[i]++
	}
	d := float64(r.dim)
	sbase := len(r.subs)
	defer func() { r.subs, r.fsub = r.subs[:sbase], r.fsub[:sbase] }()
	for i := 0; i < nsub; i++ {
		c := cnt[i+1] - cnt[i]
		if c == 0 {
			continue
		}
		after, before := float64(below+cnt[i+1])/d, float64(below+cnt[i])/d
		if max(after-pft, pfu-before) < r.cut() {
			continue
		}
		klo := lo + uint64(i)<<shift
		khi := min(klo+1<<shift, hi)
		var ft, fu float64
		if khi-klo == 1 {
			ft = r.cdf(ksValue(klo))
			fu = ft
		} else {
			ft, fu = r.cdf(ksValue(klo)), r.cdf(ksValue(khi-1))
		}
		l, u := max(after-fu, ft-before), max(after-ft, fu-before)
		r.lower = max(r.lower, l)
		if khi-klo == 1 {
			r.best = max(r.best, l) // one distinct value: the bound is a term
			continue
		}
		r.subs = append(r.subs, ksUpper{i: int32(i), u: u})
		r.fsub = append(r.fsub, [2]float64{ft, fu})
	}
	subs, fsub := r.subs[sbase:], r.fsub[sbase:]
	for k := range subs {
		subs[k].f = int32(k) // the sub-bin's CDF values, fsub[k]
	}
	slices.SortFunc(subs, func(a, b ksUpper) int {
		switch {
		case a.u > b.u:
			return -1
		case a.u < b.u:
			return 1
		}
		return 0
	})
	for _, sb := range subs {
		if sb.u < r.cut() {
			break
		}
		i := int(sb.i)
		klo := lo + uint64(i)<<shift
		f := fsub[sb.f]
		r.refine(tmp[cnt[i]:cnt[i+1]], vs[cnt[i]:cnt[i+1]], below+cnt[i], klo, min(klo+1<<shift, hi), f[0], f[1])
	}
}

// ksSkip returns the number of leading values of p that fall in idle
// uniform level-0 bins (act[j] == 0): the collect pass's loop, a function
// of its own so that its few variables stay in registers. pos is lo0 without
// its sign bit (see Count).
//
//go:noinline
func ksSkip(p []float64, pos uint64, shift uint, act []uint8) int {
	for i, v := range p {
		if j := (math.Float64bits(v) - pos) >> (shift & 63); j >= uint64(len(act)) || act[j] != 0 {
			return i
		}
	}
	return len(p)
}

// ksFilterBlock is the number of pairs ksFilterPairs takes at a time in
// the collect pass (a buffer of 8 KiB per worker, in the first-level cache).
const ksFilterBlock = 1 << 10

// ksStreams is the number of streams the AVX-512 filter reads at once: 4
// (ksFilterAVX512x4, the block split in four quarters, their kept values
// joined in order), or 1 in the tests and benchmarks that compare the two
// (see readout_avx512_amd64.go for the measurements).
var ksStreams = 4

// ksActPad is the zero padding past the act table: ksFilterAVX2 reads the
// byte act[nb] for lanes outside the active span (one byte would do; eight
// keep the table's end on a word).
const ksActPad = 8

// ksFilterIntervals is the number of intervals of fine bins the AVX-512
// kernel tests each value against, one of them always the values outside
// the uniform bins (j ≥ nbf).
const ksFilterIntervals = 8

// ksFilter is the collect pass's filter: the rule of ksFilterPairs (keep a
// value outside the uniform level-0 bins or in a fine bin j with
// act[j] ≠ 0) in the forms its kernels take. pos and shift are as for
// Count; act has capacity len(act)+ksActPad, with zeros past its end; span
// holds the first and the last j with act[j] ≠ 0 (first > last when there
// is none), for the AVX2 kernel. iv holds ksFilterIntervals intervals of
// j for the AVX-512 kernel, their first bins iv[k] and widths iv[8+k] (a
// value is in interval k when j − iv[k] ≤ iv[8+k] as unsigned integers):
// a superset of the active bins and the outer values, equal to them when
// exact.
type ksFilter struct {
	pos   uint64
	shift uint
	act   []uint8
	span  [2]int
	iv    [2 * ksFilterIntervals]uint64
	exact bool
}

// set makes f the filter of the active table act, whose active bins form
// the runs [runs[i][0], runs[i][1]) in increasing order, none adjacent to
// the next, with gaps[i] values (or any cost) between run i and run i+1.
// When there are more runs than the ksFilterIntervals−1 intervals left
// beside the outer one, the runs are merged across all gaps but the
// ksFilterIntervals−2 dearest, which keeps the fewest extra values (the
// cost of merging across one gap does not depend on the others), and f is
// not exact. order is a buffer.
func (f *ksFilter) set(pos uint64, shift uint, act []uint8, span [2]int, runs [][2]int, gaps []int64, order *[]int) {
	f.pos, f.shift, f.act, f.span = pos, shift, act, span
	nbf := uint64(len(act))
	// The outer values, in every unused slot too.
	for k := range ksFilterIntervals {
		f.iv[k], f.iv[ksFilterIntervals+k] = nbf, math.MaxUint64-nbf
	}
	f.exact = len(runs) < ksFilterIntervals
	if len(runs) == 0 {
		return
	}
	// The keep dearest gaps stay; o lists them in order.
	keep := len(runs) - 1
	if !f.exact {
		keep = ksFilterIntervals - 2
	}
	o := (*order)[:0]
	for i := range gaps {
		o = append(o, i)
	}
	if keep < len(gaps) {
		slices.SortStableFunc(o, func(a, b int) int { return cmpDesc(gaps[a], gaps[b]) })
		o = o[:keep]
		slices.Sort(o)
	}
	*order = o
	k, lo := 0, runs[0][0]
	for _, g := range o {
		f.iv[k], f.iv[ksFilterIntervals+k] = uint64(lo), uint64(runs[g][1]-1-lo)
		k, lo = k+1, runs[g+1][0]
	}
	f.iv[k], f.iv[ksFilterIntervals+k] = uint64(lo), uint64(runs[len(runs)-1][1]-1-lo)
}

// cmpDesc orders int64 values from the largest.
func cmpDesc(a, b int64) int {
	switch {
	case a > b:
		return -1
	case a < b:
		return 1
	}
	return 0
}

// keeps reports whether the filter's rule keeps value v.
func (f *ksFilter) keeps(v float64) bool {
	j := (math.Float64bits(v) - f.pos) >> (f.shift & 63)
	return j >= uint64(len(f.act)) || f.act[j] != 0
}

// recheck moves the values of vs that f keeps to its front, in order, and
// returns their number: the exact test after a kernel that kept the values
// of merged intervals.
func (f *ksFilter) recheck(vs []float64) int {
	m := 0
	for _, v := range vs {
		vs[m] = v
		if f.keeps(v) {
			m++
		}
	}
	return m
}

// ksFilterPairs writes to out, in order, the probabilities re·re + im·im of
// the pairs a that f keeps (those outside the uniform level-0 bins or in a
// bin j with act[j] ≠ 0), and returns their number: the collect pass's
// filter, which keeps about one value in 16 of a Porter–Thomas state and
// skips the rest without a branch per value in the assembly kernels. out
// has room for len(a)/2 values. The AVX-512 kernel keeps the values of
// f's intervals; when they are not exact, the values it kept from bins
// between merged runs (few: the merged gaps are the cheapest) are dropped
// here.
func ksFilterPairs(a []float64, f *ksFilter, out []float64) int {
	n := 0
	act := f.act
	if len(out) < len(a)/2 {
		panic("stats: ksFilterPairs buffers too small")
	}
	switch {
	case ksUseAVX512 && len(a) >= 16:
		if ksStreams > 1 && len(a) >= 64 {
			// Four streams of q pairs, each with its region of out.
			q := len(a) / 64 * 8
			var c [4]int
			ksFilterAVX512x4(&a[0], q/8, 16*q, f.pos, uint64(f.shift), &f.iv, &out[0], 8*q, &c)
			n = c[0]
			for s := 1; s < 4; s++ {
				n += copy(out[n:], out[s*q:s*q+c[s]])
			}
			a = a[8*q:]
		}
		if g := len(a) / 16; g > 0 {
			n += ksFilterAVX512(&a[0], g, f.pos, uint64(f.shift), &f.iv, &out[n])
			a = a[16*g:]
		}
		if !f.exact {
			n = f.recheck(out[:n])
		}
	case ksUseAVX2 && len(a) >= 8:
		if cap(act) < len(act)+ksActPad {
			panic("stats: ksFilterPairs buffers too small")
		}
		g := len(a) / 8
		lo, hi := f.span[0], f.span[1]
		if lo > hi {
			lo, hi = 1, 0
		}
		n = ksFilterAVX2(&a[0], g, f.pos, uint64(f.shift), &act[:1][0], uint64(len(act)), uint64(lo), uint64(hi), &out[0])
		a = a[8*g:]
	}
	pos, shift := f.pos, f.shift
	for i := 1; i < len(a); i += 2 {
		v := float64(a[i-1]*a[i-1]) + float64(a[i]*a[i])
		if j := (math.Float64bits(v) - pos) >> (shift & 63); j >= uint64(len(act)) || act[j] != 0 {
			out[n] = v
			n++
		}
	}
	return n
}

// ksSearchLeaf is the run length below which search evaluates every term.
const ksSearchLeaf = 8

// search raises r.best to the largest term of the sorted values vs[a:b],
// whose first has rank below+a; fa and fb are the CDF at vs[a] and vs[b−1].
// The terms (i+1)/D − F(x_(i)) and F(x_(i)) − i/D of the run are at most
// (below+b)/D − fa and fb − (below+a)/D (F and the ranks are monotone), so
// a run whose bound is below the best term is skipped and a long one is
// halved.
func (r *ksSearcher) search(vs []float64, below int64, a, b int, fa, fb float64) {
	d := float64(r.dim)
	if max(float64(below+int64(b))/d-fa, fb-float64(below+int64(a))/d) < max(r.best, math.Float64frombits(r.floor.Load()))-ksSlack {
		return
	}
	if b-a <= ksSearchLeaf {
		for j := a; j < b; j++ {
			var f float64
			switch j {
			case a:
				f = fa
			case b - 1:
				f = fb
			default:
				f = r.cdf(vs[j])
			}
			i := below + int64(j)
			r.best = max(r.best, max(float64(i+1)/d-f, f-float64(i)/d))
		}
		return
	}
	m := (a + b) / 2
	fl, fr := r.cdf(vs[m-1]), r.cdf(vs[m])
	r.search(vs, below, a, m, fa, fl)
	r.search(vs, below, m, b, fr, fb)
}
