package stats

import (
	"math"
	"math/bits"
	"slices"
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

// ksBinBits sets the number of level-0 bins per octave of probability (2^12):
// each holds at most about e^−1·2^−12 ≈ 9e−5 of the Porter–Thomas mass.
const ksBinBits = 12

// ksMinCollect is the number of candidate values always small enough to
// collect and sort at once.
const ksMinCollect = 1 << 16

// ksMaxLeaves bounds the bins counted in one refinement pass (2^18, 1 MiB
// of counters per worker, which stays in a second-level cache).
const ksMaxLeaves = 1 << 18

// KSHaarPasses returns the Kolmogorov–Smirnov statistic of D probabilities
// against the exact Haar law Beta(1, D−1), the value KSHaar returns for
// them, without sorting all of them: a histogram pass, refinement passes
// over the few bins that can hold the supremum, and a sort of the values of
// those bins. It needs O(D) time per pass and O(budget + 2^18) memory
// instead of O(D log D) time and 2·8·D bytes. passes reports how many times
// pass was called (2 to 4 for Porter–Thomas-like outputs).
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
	r.countLevel0(pass)
	passes = 1
	if r.nan {
		return math.NaN(), passes
	}
	// Sorting m values costs about m·log2(m) comparisons on one core, a pass
	// about D cheap steps on every worker: collect once the candidates are
	// few enough that their sort costs less than another pass.
	limit := int64(min(budget, max(ksMinCollect, dim/256)))
	for {
		cands, total := r.select_()
		switch {
		case len(cands) == 0:
			return r.best, passes
		case total <= limit:
			r.collect(pass, cands)
			return r.best, passes + 1
		}
		r.split(pass, cands)
		passes++
	}
}

// ksKey maps a float64 to a uint64 in the same order (for non-NaN values).
func ksKey(v float64) uint64 {
	b := math.Float64bits(v)
	if b>>63 == 1 {
		return ^b
	}
	return b | 1<<63
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
	// below lo0, 3…3+nb0−1 the uniform bins of width 2^shift from lo0, and
	// the last one everything above.
	lo0, kzero uint64
	shift      uint
	nb0        int
	// lower is L, the running lower bound; best the largest exact term found.
	lower, best float64
	nan         bool
	// active has bit b set when level-0 node b is not idle: a pass rejects
	// most values with this 16 KiB table, before touching any node.
	active []uint64
}

const ksSlack = 1e-12 // candidates keep U_j ≥ L − slack, so rounding in the bounds never drops the supremum's bin

func newKSRefiner(dim, workers int) *ksRefiner {
	h := HaarProb{Dim: float64(dim)}
	r := &ksRefiner{dim: dim, workers: workers, cdf: h.CDF, shift: 52 - ksBinBits}
	// Uniform bins over D·p in [2^−24, 2^8): 32 octaves, 2^12 bins each.
	lo := ksKey(math.Ldexp(1, -24) / float64(dim))
	hi := ksKey(math.Ldexp(1, 8) / float64(dim))
	r.lo0 = lo &^ (1<<r.shift - 1)
	r.nb0 = int((hi-r.lo0)>>r.shift) + 1
	r.kzero = ksKey(0)
	top := r.lo0 + uint64(r.nb0)<<r.shift
	r.nodes = []ksNode{
		{lo: ksKey(math.Inf(-1)), hi: r.kzero},
		{lo: r.kzero, hi: r.kzero + 1},
		{lo: r.kzero + 1, hi: r.lo0},
	}
	for i := 0; i < r.nb0; i++ {
		l := r.lo0 + uint64(i)<<r.shift
		r.nodes = append(r.nodes, ksNode{lo: l, hi: l + 1<<r.shift})
	}
	r.nodes = append(r.nodes, ksNode{lo: top, hi: ksKey(math.Inf(1)) + 1})
	r.state = make([]uint8, len(r.nodes))
	return r
}

// bin0 returns the level-0 node of key k.
func (r *ksRefiner) bin0(k uint64) int {
	if k < r.lo0 {
		switch {
		case k < r.kzero:
			return 0
		case k == r.kzero:
			return 1
		}
		return 2
	}
	return 3 + min(int((k-r.lo0)>>r.shift), r.nb0)
}

// countLevel0 runs the first pass: the level-0 histogram.
func (r *ksRefiner) countLevel0(pass ProbabilityPass) {
	nb := len(r.nodes)
	counts := make([][]uint32, r.workers)
	nans := make([]bool, r.workers)
	pass(func(w int, p []float64) {
		c := counts[w]
		if c == nil {
			c = make([]uint32, nb)
			counts[w] = c
		}
		for _, v := range p {
			if v != v {
				nans[w] = true
				continue
			}
			c[r.bin0(ksKey(v))]++
		}
	})
	for w := range counts {
		r.nan = r.nan || nans[w]
		for i, v := range counts[w] {
			r.nodes[i].count += int64(v)
		}
	}
	var below int64
	for i := range r.nodes {
		r.nodes[i].below = below
		below += r.nodes[i].count
		r.state[i] = ksCount
	}
}

// bounds returns L_j and U_j of a non-empty node.
func (r *ksRefiner) bounds(nd *ksNode) (lower, upper float64) {
	d := float64(r.dim)
	ft, fu := r.cdf(ksValue(nd.lo)), r.cdf(ksValue(nd.hi-1))
	after, before := float64(nd.below+nd.count)/d, float64(nd.below)/d
	return max(after-fu, ft-before), max(after-ft, fu-before)
}

// select_ turns the leaves counted in the last pass into candidates or idle
// nodes and returns the candidates with their total count.
func (r *ksRefiner) select_() (cands []int32, total int64) {
	for i := range r.nodes {
		nd := &r.nodes[i]
		if r.state[i] != ksCount || nd.count == 0 {
			continue
		}
		l, _ := r.bounds(nd)
		if nd.hi-nd.lo == 1 {
			r.best = max(r.best, l) // one distinct value: the bound is a term
		}
		r.lower = max(r.lower, l)
	}
	for i := range r.nodes {
		nd := &r.nodes[i]
		if r.state[i] != ksCount {
			continue
		}
		r.state[i] = ksIdle
		if nd.count == 0 || nd.hi-nd.lo == 1 {
			continue
		}
		if _, u := r.bounds(nd); u >= r.lower-ksSlack {
			cands = append(cands, int32(i))
			total += nd.count
		}
	}
	return cands, total
}

// markActive rebuilds the table of level-0 nodes that are not idle.
func (r *ksRefiner) markActive() {
	n0 := r.nb0 + 4
	if r.active == nil {
		r.active = make([]uint64, (n0+63)/64)
	}
	clear(r.active)
	for i := 0; i < n0; i++ {
		if r.state[i] != ksIdle {
			r.active[i>>6] |= 1 << (i & 63)
		}
	}
}

// leaf walks from the level-0 bin of key k down to its leaf and returns the
// leaf's index, or −1 when the level-0 bin is idle.
func (r *ksRefiner) leaf(k uint64) int {
	i := r.bin0(k)
	if r.active[i>>6]>>(i&63)&1 == 0 {
		return -1
	}
	for r.state[i] == ksSplit {
		nd := &r.nodes[i]
		i = int(nd.child) + int((k-nd.lo)>>nd.shift)
	}
	return i
}

// split divides each candidate into at most per children of 2^shift keys
// and counts them in one pass.
func (r *ksRefiner) split(pass ProbabilityPass, cands []int32) {
	per := uint64(max(2, ksMaxLeaves/len(cands)))
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
	counts := make([][]uint32, r.workers)
	pass(func(w int, p []float64) {
		c := counts[w]
		if c == nil {
			c = make([]uint32, slots)
			counts[w] = c
		}
		for _, v := range p {
			if i := r.leaf(ksKey(v)); i >= first {
				c[i-first]++ // the new leaves are the only ksCount nodes
			}
		}
	})
	for _, ci := range cands {
		nd := r.nodes[ci]
		below := nd.below
		for j := nd.child; j < nd.child+nd.nchild; j++ {
			ch := &r.nodes[j]
			for w := range counts {
				if counts[w] != nil {
					ch.count += int64(counts[w][int(j)-first])
				}
			}
			ch.below = below
			below += ch.count
		}
	}
}

// collect gathers the values of the candidate leaves, sorts them and takes
// the exact terms of the statistic from them.
func (r *ksRefiner) collect(pass ProbabilityPass, cands []int32) {
	for _, ci := range cands {
		r.state[ci] = ksCollect
	}
	r.markActive()
	vals := make([][]float64, r.workers) // worker w alone touches vals[w]
	pass(func(w int, p []float64) {
		buf := vals[w]
		for _, v := range p {
			if i := r.leaf(ksKey(v)); i >= 0 && r.state[i] == ksCollect {
				buf = append(buf, v)
			}
		}
		vals[w] = buf
	})
	var all []float64
	for _, v := range vals {
		all = append(all, v...)
	}
	slices.Sort(all)
	// The candidates in key order, with their rank offsets.
	leaves := make([]*ksNode, len(cands))
	for i, ci := range cands {
		leaves[i] = &r.nodes[ci]
	}
	slices.SortFunc(leaves, func(a, b *ksNode) int {
		switch {
		case a.lo < b.lo:
			return -1
		case a.lo > b.lo:
			return 1
		}
		return 0
	})
	d := float64(r.dim)
	j := 0
	var rank int64
	for _, v := range all {
		k := ksKey(v)
		for k >= leaves[j].hi {
			j++
			rank = 0
		}
		i := leaves[j].below + rank
		f := r.cdf(v)
		r.best = max(r.best, max(float64(i+1)/d-f, f-float64(i)/d))
		rank++
	}
}
