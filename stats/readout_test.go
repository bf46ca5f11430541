package stats

import (
	"math"
	"math/bits"
	"math/rand/v2"
	"slices"
	"testing"
)

// filterReference is the collect pass's rule written from the ordered keys
// of the refiner (comparisons of keys with the edges of the octaves, not
// the shifted difference of the kernels): a value is kept when it lies
// outside the octaves of the level-0 bins, or in a fine bin marked in act.
func filterReference(r *ksRefiner, a []float64, act []uint8) []float64 {
	var out []float64
	top := r.lo0 + uint64(ksOctaves)<<52
	for i := 1; i < len(a); i += 2 {
		v := float64(a[i-1]*a[i-1]) + float64(a[i]*a[i]) // each square rounded, as the kernel does
		if k := ksKey(v); v != v || k < r.lo0 || k >= top || act[(k-r.lo0)>>r.shift] != 0 {
			out = append(out, v)
		}
	}
	return out
}

// ksKernels lists the collect-pass filters this processor runs: the Go
// loop always, and the AVX2 and AVX-512 kernels where they are selected,
// the latter reading one stream (avx512x1) or four.
func ksKernels() []string {
	k := []string{"go"}
	if ksUseAVX2 {
		k = append(k, "avx2")
	}
	if ksUseAVX512 {
		k = append(k, "avx512x1", "avx512")
	}
	return k
}

// useKernel makes ksFilterPairs take the filter k of ksKernels and returns
// the function that restores the choice before.
func useKernel(k string) (restore func()) {
	a2, a5, st := ksUseAVX2, ksUseAVX512, ksStreams
	ksUseAVX2, ksUseAVX512, ksStreams = k == "avx2", k == "avx512" || k == "avx512x1", 4
	if k == "avx512x1" {
		ksStreams = 1
	}
	return func() { ksUseAVX2, ksUseAVX512, ksStreams = a2, a5, st }
}

// testFilter returns the ksFilter of the act table act of refiner r, its
// runs found by scanning act and the cost of a gap its length in bins
// (markActive uses the values counted in it; any cost gives the same kept
// values, only more or fewer for ksFilterPairs to drop).
func testFilter(r *ksRefiner, act []uint8) *ksFilter {
	var runs [][2]int
	var gaps []int64
	span := [2]int{len(act), -1}
	for j := 0; j < len(act); j++ {
		if act[j] == 0 {
			continue
		}
		e := j
		for e < len(act) && act[e] != 0 {
			e++
		}
		if len(runs) > 0 {
			gaps = append(gaps, int64(j-runs[len(runs)-1][1]))
		}
		runs = append(runs, [2]int{j, e})
		span = [2]int{min(span[0], j), e - 1}
		j = e
	}
	f := new(ksFilter)
	var order []int
	f.set(r.lo0&^(1<<63), r.shift, act, span, runs, gaps, &order)
	return f
}

// inIntervals reports whether fine-bin index j lies in one of f's intervals.
func inIntervals(f *ksFilter, j uint64) bool {
	for k := range ksFilterIntervals {
		if j-f.iv[k] <= f.iv[ksFilterIntervals+k] {
			return true
		}
	}
	return false
}

// filterActs returns act tables of nbf bins for the filter tests: empty,
// sparse at random (hundreds of runs, merged into the intervals), one run,
// full, alternating bins (every bin edge separates a kept and a skipped
// bin), and three runs (exact intervals).
func filterActs(rng *rand.Rand, nbf int) [][]uint8 {
	var acts [][]uint8
	for kind := 0; kind < 6; kind++ {
		act := make([]uint8, nbf, nbf+ksActPad)
		for j := range act {
			on := false
			switch kind {
			case 1:
				on = rng.IntN(30) == 0
			case 2:
				on = j >= nbf/3 && j < nbf/3+nbf/20
			case 3:
				on = true
			case 4:
				on = j%2 == 1
			case 5:
				on = j == 5 || (j >= nbf/2 && j < nbf/2+7) || j == nbf-1
			}
			if on {
				act[j] = 1
			}
		}
		acts = append(acts, act)
	}
	return acts
}

// TestFilterIntervals checks the intervals of ksFilter.set against the
// act tables: every active bin and every index past the uniform bins is in
// an interval, and when the filter says it is exact, no idle bin is.
func TestFilterIntervals(t *testing.T) {
	rng := rand.New(rand.NewPCG(55, 56))
	for _, d := range []int{1 << 10, 1 << 16} {
		r := newKSRefiner(d, 1)
		for kind, act := range filterActs(rng, r.nbf) {
			f := testFilter(r, act)
			runs := 0
			for j := range act {
				if act[j] != 0 && (j == 0 || act[j-1] == 0) {
					runs++
				}
			}
			if want := runs < ksFilterIntervals; f.exact != want {
				t.Errorf("D=%d act %d: %d runs, exact %v", d, kind, runs, f.exact)
			}
			for j := range act {
				if in := inIntervals(f, uint64(j)); (act[j] != 0 && !in) || (f.exact && act[j] == 0 && in) {
					t.Errorf("D=%d act %d: bin %d (act %d) in the intervals: %v", d, kind, j, act[j], in)
					break
				}
			}
			for _, j := range []uint64{uint64(r.nbf), uint64(r.nbf) + 1, 1 << 20, math.MaxUint64 >> r.shift} {
				if !inIntervals(f, j) {
					t.Errorf("D=%d act %d: outer index %d not in the intervals", d, kind, j)
				}
			}
		}
	}
}

// edgeAmplitudes returns pairs (re, 0) whose squares re·re lie on a fine
// bin edge of r or one key beside it, for every 97th fine bin: the values a
// kernel that binned a value off by one key would keep or skip wrongly.
func edgeAmplitudes(r *ksRefiner) []float64 {
	var a []float64
	pos := r.lo0 &^ (1 << 63)
	for j := 0; j <= r.nbf; j += 97 {
		e := pos + uint64(j)<<r.shift
		x := math.Sqrt(math.Float64frombits(e))
		for range 8 {
			x = math.Nextafter(x, 0)
		}
		for range 16 {
			if b := math.Float64bits(float64(x * x)); b+1 >= e && b <= e+1 {
				a = append(a, x, 0)
			}
			x = math.Nextafter(x, 1)
		}
	}
	return a
}

// TestFilterPairsPaths checks ksFilterPairs, with every kernel of
// ksKernels, against filterReference bit for bit (the same values in the
// same order): Porter–Thomas amplitudes with zeros, subnormal squares,
// infinities and NaNs mixed in, runs of equal probabilities, values on the
// fine bin edges and one key beside them, lengths that leave every tail of
// 0 to 15 pairs past the kernels' groups of four and eight, and the act
// tables of filterActs.
func TestFilterPairsPaths(t *testing.T) {
	rng := rand.New(rand.NewPCG(51, 52))
	for _, d := range []int{1 << 10, 1 << 16} {
		r := newKSRefiner(d, 1)
		s := math.Sqrt(0.5 / float64(d))
		lengths := []int{0, 1, 3, 4, 7, 64, 1023, 1024}
		for tail := range 16 {
			lengths = append(lengths, 32+tail)
		}
		var inputs [][]float64
		for _, npairs := range lengths {
			a := make([]float64, 2*npairs)
			for i := range a {
				a[i] = s * rng.NormFloat64()
				switch rng.IntN(40) {
				case 0:
					a[i] = 0
				case 1:
					a[i] *= 1e-160
				case 2:
					a[i] = math.Inf(1)
				case 3:
					a[i] = math.NaN()
				case 4:
					a[i] *= 1e5
				case 5:
					a[i] = s // equal probabilities 2·s² or s² with a zero
				}
			}
			inputs = append(inputs, a)
		}
		edges := edgeAmplitudes(r)
		inputs = append(inputs, edges, edges[:len(edges)-6])
		for _, a := range inputs {
			npairs := len(a) / 2
			for kind, act := range filterActs(rng, r.nbf) {
				f := testFilter(r, act)
				want := filterReference(r, a, act)
				for _, k := range ksKernels() {
					restore := useKernel(k)
					out := make([]float64, npairs)
					got := out[:ksFilterPairs(a, f, out)]
					restore()
					if len(got) != len(want) {
						t.Errorf("D=%d pairs=%d act %d %s: kept %d values, want %d", d, npairs, kind, k, len(got), len(want))
						continue
					}
					for i := range got {
						if math.Float64bits(got[i]) != math.Float64bits(want[i]) {
							t.Errorf("D=%d pairs=%d act %d %s: value %d is %g, want %g", d, npairs, kind, k, i, got[i], want[i])
							break
						}
					}
				}
			}
		}
	}
}

// stabiliserAmplitudes returns the amplitudes of a random stabiliser-like
// state of n qubits: uniform in modulus over an affine subspace
// {A·y ⊕ b : y ∈ F_2^k} of the basis, with phases in {±1, ±i}; the output
// distribution of a Clifford circuit is uniform over such a subspace
// (Dehaene & De Moor 2003, Phys. Rev. A 68, 042318), so every non-zero
// probability is the same 2^−k and the others are exact zeros.
func stabiliserAmplitudes(rng *rand.Rand, n, k int) []float64 {
	cols := make([]uint64, 0, k) // k independent columns, in echelon form by leading bit
	for len(cols) < k {
		c := rng.Uint64() & (1<<n - 1)
		for _, e := range cols {
			if hb := uint64(1) << (63 - bits.LeadingZeros64(e)); c&hb != 0 {
				c ^= e
			}
		}
		if c != 0 {
			cols = append(cols, c)
			slices.SortFunc(cols, func(x, y uint64) int { return bits.LeadingZeros64(x) - bits.LeadingZeros64(y) })
		}
	}
	b := rng.Uint64() & (1<<n - 1)
	a := make([]float64, 2<<n)
	m := math.Sqrt(math.Ldexp(1, -k))
	for y := 0; y < 1<<k; y++ {
		x := b
		for j, c := range cols {
			if y>>j&1 == 1 {
				x ^= c
			}
		}
		switch rng.IntN(4) {
		case 0:
			a[2*x] = m
		case 1:
			a[2*x] = -m
		case 2:
			a[2*x+1] = m
		default:
			a[2*x+1] = -m
		}
	}
	return a
}

// readoutRun is one state's read-out as the scan does it: CountAmplitudes
// over blocks of 4096 amplitudes alternating between two workers (their
// sums returned per block), then FinishAmplitudes over the same blocks; it
// also returns the values the collect pass kept, sorted.
func readoutRun(h *HaarKS, a []float64) (sums []float64, ks float64, kept []float64) {
	const block = 4096
	for off, w := 0, 0; off < len(a); off, w = off+2*block, 1-w {
		sums = append(sums, h.CountAmplitudes(w, a[off:min(off+2*block, len(a))]))
	}
	calls := 0
	ks, _ = h.FinishAmplitudes(AmplitudePass(blockPass(a, 2*block, 2, &calls)))
	for _, vs := range h.r.vals {
		kept = append(kept, vs...)
	}
	slices.Sort(kept)
	return sums, ks, kept
}

// TestReadoutPaths runs the read-out of HaarKS with every filter of
// ksKernels on the same states and requires the same block sums, the
// same kept values and the same statistic bit for bit; each block sum must
// also equal Collision of its probabilities bit for bit (the order of
// stats.Collision, as the scan tables need), the whole sum Collision of all
// probabilities to 1e−14 relative (pairwise sums of the blocks against the
// pairwise sum of the whole: a few ulps of reassociation, log2(D) ≤ 24
// levels of at most one rounding each), and the statistic the sort-based
// KSHaar to 1e−15 (see TestKSHaarPassesExact). The states: Porter–Thomas
// (Haar) states of 10 to 20 qubits (24 unless -short), stabiliser-like
// states (many equal probabilities and exact zeros), and a Haar state whose
// small amplitudes are scaled to give subnormal or zero probabilities.
// The parallel forms of the steps between the passes (ksParallel) and the
// serial ones, forced on every state, must give the default's statistic
// and kept values bit for bit (common practice: two forms of one
// computation compared).
func TestReadoutPaths(t *testing.T) {
	rng := rand.New(rand.NewPCG(53, 54))
	type state struct {
		name string
		n    int
		a    []float64
	}
	haar := func(n int) []float64 {
		a := make([]float64, 2<<n)
		s := math.Sqrt(0.5 / float64(int(1)<<n))
		for i := range a {
			a[i] = s * rng.NormFloat64()
		}
		return a
	}
	var states []state
	ns := []int{10, 14, 18, 20}
	if !testing.Short() {
		ns = append(ns, 24)
	}
	for _, n := range ns {
		states = append(states, state{"haar", n, haar(n)})
	}
	for _, nk := range [][2]int{{10, 4}, {16, 9}, {20, 17}} {
		states = append(states, state{"stabiliser", nk[0], stabiliserAmplitudes(rng, nk[0], nk[1])})
	}
	under := haar(16)
	for i := 0; i < len(under); i += 2 {
		switch rng.IntN(5) {
		case 0:
			under[i], under[i+1] = under[i]*1e-160, under[i+1]*1e-160
		case 1:
			under[i], under[i+1] = under[i]*1e-170, 0
		}
	}
	states = append(states, state{"underflow", 16, under})
	for _, st := range states {
		d := len(st.a) / 2
		p := make([]float64, d)
		for i := range p {
			p[i] = float64(st.a[2*i]*st.a[2*i]) + float64(st.a[2*i+1]*st.a[2*i+1])
		}
		restore := useKernel("go")
		sumsGo, ksGo, keptGo := readoutRun(NewHaarKS(d, 2, 0), st.a)
		restore()
		sumsAsm, ksAsm := sumsGo, ksGo
		for _, k := range ksKernels()[1:] {
			restore := useKernel(k)
			sums, ks, kept := readoutRun(NewHaarKS(d, 2, 0), st.a)
			restore()
			if math.Float64bits(ksGo) != math.Float64bits(ks) {
				t.Errorf("%s n=%d: statistic %.17g with the %s kernel, %.17g with the Go loop", st.name, st.n, ks, k, ksGo)
			}
			if !slices.Equal(sumsGo, sums) {
				t.Errorf("%s n=%d: block sums differ between the %s kernel and the Go loop", st.name, st.n, k)
			}
			if !slices.Equal(keptGo, kept) {
				t.Errorf("%s n=%d: the collect pass kept %d values with the %s kernel, %d with the Go loop (or other values)", st.name, st.n, len(kept), k, len(keptGo))
			}
			sumsAsm, ksAsm = sums, ks
		}
		// The parallel forms of gather, select_ and collect on every state,
		// and the serial ones, must give the same statistic bit for bit
		// (their terms are the same, whatever the order in which the
		// searchers meet the leaves).
		for _, par := range []bool{false, true} {
			sv, sb := ksParallelValues, ksParallelBins
			if par {
				ksParallelValues, ksParallelBins = 0, 0
			} else {
				ksParallelValues, ksParallelBins = math.MaxInt64, math.MaxInt
			}
			_, ks, kept := readoutRun(NewHaarKS(d, 2, 0), st.a)
			ksParallelValues, ksParallelBins = sv, sb
			if math.Float64bits(ks) != math.Float64bits(ksAsm) {
				t.Errorf("%s n=%d: statistic %.17g with parallel=%v, %.17g by default", st.name, st.n, ks, par, ksAsm)
			}
			if !slices.Equal(keptGo, kept) {
				t.Errorf("%s n=%d: the collect pass kept %d values with parallel=%v, %d by default", st.name, st.n, len(kept), par, len(keptGo))
			}
		}
		const block = 4096
		for k, z := range sumsAsm {
			if want := Collision(p[k*block : min((k+1)*block, d)]); z != want {
				t.Errorf("%s n=%d block %d: sum %.17g, Collision %.17g", st.name, st.n, k, z, want)
				break
			}
		}
		if z, want := pairwiseBlocks(sumsAsm), Collision(p); math.Abs(z-want) > 1e-14*want {
			t.Errorf("%s n=%d: collision %.17g, Collision %.17g", st.name, st.n, z, want)
		}
		if want := KSHaar(p, nil); math.Abs(ksAsm-want) > 1e-15 {
			t.Errorf("%s n=%d: statistic %.17g, KSHaar %.17g", st.name, st.n, ksAsm, want)
		}
	}
}

// pairwiseBlocks adds x pairwise by halves.
func pairwiseBlocks(x []float64) float64 {
	if len(x) == 1 {
		return x[0]
	}
	m := len(x) / 2
	return pairwiseBlocks(x[:m]) + pairwiseBlocks(x[m:])
}

// TestMarkActiveReuse reads out states one after another with one HaarKS,
// as the scan does, and after each markActive requires act0 to mark exactly
// the fine bins of the live level-0 nodes (markActive clears only the runs
// of the call before, so a bin left over from an earlier state would show
// here), the span to be that of the marked bins, and the filter's runs to
// be the maximal runs of marked bins.
func TestMarkActiveReuse(t *testing.T) {
	const d = 1 << 14
	h := NewHaarKS(d, 1, 0)
	for seed := range uint64(6) {
		_, pass := gaussianAmplitudes(d, seed, 10)
		pass(func(w int, q []float64) { h.CountAmplitudes(w, q) })
		r := h.r
		r.gather(h.counts, h.nans)
		cands, _ := r.select_()
		for k, ci := range cands {
			if int(seed)%2 == 0 || k%3 != 0 { // some states mark fewer bins
				r.state[ci] = ksCollect
			}
		}
		r.markActive()
		want := make([]uint8, r.nbf)
		for i := 3; i < 3+r.nb0; i++ {
			if r.live(i) {
				nd := &r.nodes[i]
				for j := (nd.lo - r.lo0) >> r.shift; j < (nd.hi-r.lo0)>>r.shift; j++ {
					want[j] = 1
				}
			}
		}
		if !slices.Equal(r.act0, want) {
			t.Errorf("state %d: act0 differs from the live nodes' bins", seed)
		}
		f := testFilter(r, want)
		if f.span != [2]int{r.actLo, r.actHi} || r.filt.exact != f.exact {
			t.Errorf("state %d: span %d..%d exact %v, want %v exact %v", seed, r.actLo, r.actHi, r.filt.exact, f.span, f.exact)
		}
		var runs [][2]int
		for j := 0; j < len(want); j++ {
			if want[j] != 0 && (j == 0 || want[j-1] == 0) {
				e := j
				for e < len(want) && want[e] != 0 {
					e++
				}
				runs = append(runs, [2]int{j, e})
			}
		}
		if !slices.Equal(r.runs, runs) {
			t.Errorf("state %d: runs %v, want %v", seed, r.runs, runs)
		}
		h.reset()
	}
}
