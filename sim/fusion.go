package sim

import (
	"context"
	"fmt"
	"math/bits"
	"mixdepth/internal/crash"
	"mixdepth/internal/pinned"
	"slices"

	"golang.org/x/sync/errgroup"
)

// Op is one gate of a circuit for Run: the two-qubit gate M on qubits
// (A, B), row-major in the basis |b_A b_B⟩ with index 2·b_A + b_B, or, when
// Single is true, the single-qubit gate U (row-major 2×2) on qubit A.
type Op struct {
	A, B   int
	Single bool
	M      [16]complex128
	U      [4]complex128
}

// BlockQubits returns the size k of the blocks of a fused pass on this
// machine: 2^k amplitudes, chosen at start-up from the second-level cache
// of a core (blockSize), so that a block stays in it while a pass applies
// all of its gates. Run's amplitudes depend on k at rounding level only
// (~1e-16 relative: the gates of a pass are applied in the pass order).
func BlockQubits() int { return blockQubits }

// blockQubits and blockLow are the block size of the fused passes and the
// number of lowest qubits every block of a large state contains, so that a
// block is gathered in runs of at least 2^blockLow consecutive amplitudes.
// Tests change them to check other block shapes.
var blockQubits, blockLow = blockSize(secondLevelCache())

// blockSize returns the block size and the block's low qubits for a core
// with l2 bytes of second-level cache (0: unknown). The block takes at most
// half of it (16·2^k bytes of complex128; the other half holds the lines
// that gather it and write it back), k from 14 (256 KiB, the size every
// current x86 and Arm core holds) to 16; the low qubits leave 10 for gates
// (blockLow = k − 10), so a larger block gathers longer runs rather than
// taking more qubits' gates per pass. Measured on grid:4x6, grid:5x5 and
// line:26 brickworks of 20 layers on 2 MiB-L2 Sapphire Rapids class cores
// (see DEVELOPERS.md): (16, 6) ran 1.19–1.25 times faster than (14, 4),
// because a pass of (14, 4) gathers 2^14-amplitude blocks in runs of 256
// bytes, 1024 runs per block from as many places, which the memory system
// serves at about half its streaming rate.
func blockSize(l2 int64) (k, low int) {
	k = 14
	for k < 16 && int64(16)<<(k+1) <= l2/2 {
		k++
	}
	return k, k - 10
}

// fuseMinQubits is the smallest state that Run splits into block passes:
// 2^21 amplitudes, 32 MiB. Smaller states stay in the last-level cache of
// common processors, where gate-by-gate passes cost no memory traffic and
// gathering blocks only adds copies (measured with BenchmarkRun). Tests lower
// it to check block passes on small states.
var fuseMinQubits = 21

// fusedOp is a gate of a pass on global qubits, after merging.
type fusedOp struct {
	single bool
	a, b   int
	m      [16]complex128 // basis 2·b_a + b_b
	u      [4]complex128
	dead   bool
}

// pass is one sweep over the state: the block qubits (ascending; position i
// of a block is qubit qubits[i]) and the gates applied to every block, on
// block positions.
type pass struct {
	qubits []int
	low    int // qubits[:low] are 0..low−1
	ops    []fusedOp
}

// mask returns the bit mask of the qubits an op acts on.
func (o *Op) mask() uint64 {
	if o.Single {
		return 1 << o.A
	}
	return 1<<o.A | 1<<o.B
}

// planPasses splits ops into passes over blocks of at most k qubits, in
// order: greedily, each pass takes every remaining gate that fits its block
// and is not preceded by a left-out gate on one of its qubits, so the
// gates of a pass commute with the left-out gates they overtake. Within a
// pass, single-qubit gates are folded into the neighbouring two-qubit gate
// on the same qubit and consecutive gates on the same pair are multiplied.
// When n ≤ k there is one pass over the whole state.
//
// Which gates a pass can take depends on the qubits its block starts with:
// in circuit order the first gates of a layer claim the block, scattered
// over the chip, and little of the next layers fits. So each pass tries
// as seeds the qubits of each one or two of the first planSeeds remaining
// gates (and none) and keeps the seed whose pass takes the most gates. On
// 20-layer brickworks with blocks of 16 qubits (6 low) this cut the passes
// from 16 to 10 on line:26, 21 to 13 on grid:5x5, 13 to 11 on grid:4x6, 25
// to 19 on grid:5x6 and 32 to 25 on grid:6x6 (seeds of one gate of the
// first 40: 13, 14, 11, 20, 26).
func planPasses(n int, ops []Op, k int) []pass {
	if n <= k {
		return []pass{newPass(n, allMask(n), ops)}
	}
	var base uint64 = allMask(blockLow)
	var passes []pass
	remaining := ops
	var in, out []Op
	for len(remaining) > 0 {
		seed := base
		most, _ := takeGates(n, remaining, base, k, nil, nil)
		m := min(planSeeds, len(remaining))
		for i := range m {
			for j := i; j < m; j++ {
				s := base | remaining[i].mask() | remaining[j].mask()
				if bits.OnesCount64(s) > k {
					continue
				}
				if c, _ := takeGates(n, remaining, s, k, nil, nil); c > most {
					seed, most = s, c
				}
			}
		}
		in, out = in[:0], out[:0]
		_, sel := takeGates(n, remaining, seed, k, &in, &out)
		// Pad the block with the lowest free qubits: longer contiguous runs
		// cost nothing.
		for q := 0; bits.OnesCount64(sel) < k; q++ {
			sel |= 1 << q
		}
		passes = append(passes, newPass(n, sel, in))
		remaining = append(remaining[:0:0], out...)
	}
	return passes
}

// planSeeds is the number of remaining gates whose qubits, one or two
// gates at a time, planPasses tries as a pass's seed: 210 greedy trials per
// pass, each stopping once every qubit is blocked (takeGates).
const planSeeds = 20

// takeGates runs the greedy selection of a pass on n qubits whose block
// starts with the qubits sel: it returns the number of gates taken and the
// block's qubits, and, when in and out are not nil, appends the gates
// taken to in and the others to out. Once every qubit is blocked no later
// gate can be taken, so a count (in nil) stops there.
func takeGates(n int, remaining []Op, sel uint64, k int, in, out *[]Op) (taken int, block uint64) {
	var blocked uint64
	all := allMask(n)
	for i := range remaining {
		op := &remaining[i]
		q := op.mask()
		if q&blocked == 0 && bits.OnesCount64(sel|q) <= k {
			sel |= q
			taken++
			if in != nil {
				*in = append(*in, *op)
			}
			continue
		}
		blocked |= q
		if out != nil {
			*out = append(*out, *op)
		} else if blocked == all {
			break
		}
	}
	return taken, sel
}

func allMask(n int) uint64 { return 1<<n - 1 }

// newPass builds the pass of ops over the block qubits sel, merging gates.
func newPass(n int, sel uint64, ops []Op) pass {
	p := pass{}
	for q := 0; q < n; q++ {
		if sel>>q&1 == 1 {
			p.qubits = append(p.qubits, q)
		}
	}
	for p.low < len(p.qubits) && p.qubits[p.low] == p.low {
		p.low++
	}
	for i := range ops {
		p.add(&ops[i])
	}
	p.ops = slices.DeleteFunc(p.ops, func(o fusedOp) bool { return o.dead })
	return p
}

// last returns the index of the last live op of p acting on qubit q, or −1.
func (p *pass) last(q int) int {
	for i := len(p.ops) - 1; i >= 0; i-- {
		o := &p.ops[i]
		if !o.dead && (o.a == q || (!o.single && o.b == q)) {
			return i
		}
	}
	return -1
}

// add appends op to p, folding it into earlier gates where possible. The
// products are exact matrix products, so a fused circuit differs from the
// gate-by-gate one only by rounding.
func (p *pass) add(op *Op) {
	if op.Single {
		q := op.A
		if i := p.last(q); i >= 0 {
			o := &p.ops[i]
			if o.single {
				o.u = mul2(&op.U, &o.u)
			} else {
				leftMul(&o.m, &op.U, q == o.a)
			}
			return
		}
		p.ops = append(p.ops, fusedOp{single: true, a: q, u: op.U})
		return
	}
	a, b := op.A, op.B
	ia, ib := p.last(a), p.last(b)
	if ia >= 0 && ia == ib {
		// The previous gate on both qubits acts on the same pair.
		o := &p.ops[ia]
		g := op.M
		if o.a != a {
			g = swapPair(&g)
		}
		o.m = mul4(&g, &o.m)
		return
	}
	m := op.M
	for _, side := range [2]struct {
		q   int
		i   int
		onA bool
	}{{a, ia, true}, {b, ib, false}} {
		if side.i >= 0 && p.ops[side.i].single {
			rightMul(&m, &p.ops[side.i].u, side.onA)
			p.ops[side.i].dead = true
		}
	}
	p.ops = append(p.ops, fusedOp{a: a, b: b, m: m})
}

// mul2 returns x·y for 2×2 matrices.
func mul2(x, y *[4]complex128) [4]complex128 {
	return [4]complex128{
		pinned.Mul(x[0], y[0]) + pinned.Mul(x[1], y[2]), pinned.Mul(x[0], y[1]) + pinned.Mul(x[1], y[3]),
		pinned.Mul(x[2], y[0]) + pinned.Mul(x[3], y[2]), pinned.Mul(x[2], y[1]) + pinned.Mul(x[3], y[3]),
	}
}

// mul4 returns x·y for 4×4 matrices.
func mul4(x, y *[16]complex128) [16]complex128 {
	var z [16]complex128
	for r := range 4 {
		for c := range 4 {
			var s complex128
			for l := range 4 {
				s += pinned.Mul(x[4*r+l], y[4*l+c])
			}
			z[4*r+c] = s
		}
	}
	return z
}

// swapPair returns m on (a, b) rewritten for the qubit order (b, a).
func swapPair(m *[16]complex128) [16]complex128 {
	perm := [4]int{0, 2, 1, 3}
	var c [16]complex128
	for r := range 4 {
		for l := range 4 {
			c[4*r+l] = m[4*perm[r]+perm[l]]
		}
	}
	return c
}

// kronU returns U⊗I (onA) or I⊗U as a 4×4 matrix in the basis 2·b_a + b_b.
func kronU(u *[4]complex128, onA bool) [16]complex128 {
	var k [16]complex128
	for r := range 4 {
		for c := range 4 {
			ra, rb, ca, cb := r>>1, r&1, c>>1, c&1
			if onA && rb == cb {
				k[4*r+c] = u[2*ra+ca]
			} else if !onA && ra == ca {
				k[4*r+c] = u[2*rb+cb]
			}
		}
	}
	return k
}

// leftMul sets m to (U on a or b)·m.
func leftMul(m *[16]complex128, u *[4]complex128, onA bool) {
	k := kronU(u, onA)
	*m = mul4(&k, m)
}

// rightMul sets m to m·(U on a or b).
func rightMul(m *[16]complex128, u *[4]complex128, onA bool) {
	k := kronU(u, onA)
	*m = mul4(m, &k)
}

// Run applies ops in order to s, as the same Apply2 and Apply1 calls would
// up to rounding, in few passes over memory: single-qubit gates are folded
// into neighbouring two-qubit gates and, for states of 21 qubits or more,
// gates are grouped into passes over blocks of 2^BlockQubits() amplitudes that
// stay in cache while every gate of the pass acts on them (planPasses). Blocks are split across
// workers goroutines when s has at least ParallelQubits qubits. ctx is
// checked between passes; when it is cancelled Run returns ctx.Err() and s
// holds a partly applied circuit. It panics if an op's qubits are out of
// range or equal.
func (s *State) Run(ctx context.Context, ops []Op, workers int) error {
	return runOps(ctx, s.Qubits, s.Amp, ops, workers)
}

// RunVisit is Run followed by AmplitudeBlocks(workers, visit), with the
// visit folded into the last pass where it can be: when that pass's blocks
// hold whole chunks in contiguous runs (the lowest probabilityChunkQubits
// (12) qubits are in every block: always for a block of the lowest qubits,
// taken in place), visit(w, off, a) is called on each chunk of a block
// right after the pass has applied its gates to it, while the block is in
// cache, so the read-out of a depth costs no pass of its own. Otherwise
// (no gates, one whole-state pass, or a last pass gathered in shorter runs)
// the chunks are visited by a separate pass after the gates, as
// AmplitudeBlocks visits them.
//
// Either way the amplitudes are those of Run bit for bit, every chunk of
// ProbabilityChunk amplitudes starting at a multiple of ProbabilityChunk
// (the whole state when it is smaller) is visited exactly once with its
// offset off, a holds amp[off:off+len(a)/2] as (real, imaginary) float64
// pairs, and w is in [0, max(workers, 1)); calls with distinct w may run
// concurrently, and the order of the chunks is unspecified. visit must not
// modify a. When ctx is cancelled RunVisit returns ctx.Err(), possibly
// before visiting every chunk.
func (s *State) RunVisit(ctx context.Context, ops []Op, workers int, visit func(w, off int, a []float64)) error {
	return runOpsVisit(ctx, s.Qubits, s.Amp, ops, workers, func(w, off int, x []complex128) {
		visit(w, off, floatPairs(x))
	})
}

// RunVisit is State64.Run followed by State64.ProbabilityBlocks(workers,
// visit), with the visit folded into the last pass where it can be, as
// State.RunVisit folds it: p holds the probabilities |amp[off+i]|² (in
// float64, as ProbabilityBlocks computes them) of one chunk, in a buffer of
// the worker w that is reused once visit returns. The amplitudes are those
// of Run bit for bit, and every chunk is visited exactly once.
func (s *State64) RunVisit(ctx context.Context, ops []Op, workers int, visit func(w, off int, p []float64)) error {
	bufs := make([][]float64, max(workers, 1))
	return runOpsVisit(ctx, s.Qubits, s.Amp, ops, workers, func(w, off int, x []complex64) {
		if bufs[w] == nil {
			bufs[w] = make([]float64, ProbabilityChunk)
		}
		p := bufs[w][:len(x)]
		squares(x, p)
		visit(w, off, p)
	})
}

// Passes returns the number of sweeps over the memory of an n-qubit state
// that Run makes for ops, with the block size of this machine
// (BlockQubits): one per fused pass over blocks, and one per gate (after
// single-qubit gates are folded in) when the state is too small to fuse or
// a pass spans every qubit. It reads no amplitudes, so a planner can count
// the memory traffic of a circuit, or of the same gates cut at read-out
// depths, before running it (each cut ends a pass). It panics as Run does
// on invalid ops.
func Passes(n int, ops []Op) int {
	checkOps(n, ops)
	sweeps := 0
	for _, p := range planPasses(n, ops, passQubits(n)) {
		switch {
		case len(p.ops) == 0:
		case len(p.qubits) == n:
			sweeps += len(p.ops)
		default:
			sweeps++
		}
	}
	return sweeps
}

// visitFolds reports whether runOpsVisit folds a chunk visit into the last pass
// of ops on n qubits (for the tests).
func visitFolds(n int, ops []Op) bool {
	p := lastPass(planPasses(n, ops, passQubits(n)))
	return p != nil && foldable(n, p)
}

// passQubits is the block size of runOps's passes on n qubits.
func passQubits(n int) int {
	if n < fuseMinQubits {
		return n // one whole-state pass: gates one by one, single-qubit ones folded
	}
	return blockQubits
}

// lastPass returns the last pass with gates, or nil.
func lastPass(passes []pass) *pass {
	for i := len(passes) - 1; i >= 0; i-- {
		if len(passes[i].ops) > 0 {
			return &passes[i]
		}
	}
	return nil
}

// foldable reports whether a chunk visit can run inside the block pass p:
// its blocks are gathered in runs of 2^p.low consecutive amplitudes (or
// taken in place when p.low is the block size), which hold whole chunks
// when p.low ≥ probabilityChunkQubits.
func foldable(n int, p *pass) bool {
	return len(p.qubits) < n && p.low >= probabilityChunkQubits
}

// checkOps panics on ops whose qubits are invalid for n qubits.
func checkOps(n int, ops []Op) {
	for i := range ops {
		o := &ops[i]
		if o.A < 0 || o.A >= n || (!o.Single && (o.B < 0 || o.B >= n || o.A == o.B)) {
			panic(fmt.Sprintf("sim: Run: op %d on qubits (%d, %d) of a %d-qubit state", i, o.A, o.B, n))
		}
	}
}

// localKernels converts a pass's ops to kernels on block positions.
type localOp struct {
	single bool
	k2     kernel2
	k1     kernel1
	k2s    kernel2s      // complex64 states
	m64    [16]complex64 // single-qubit gate, complex64 states
}

func (p *pass) kernels(single64 bool) []localOp {
	pos := make(map[int]int, len(p.qubits))
	for i, q := range p.qubits {
		pos[q] = i
	}
	out := make([]localOp, len(p.ops))
	for i := range p.ops {
		o := &p.ops[i]
		if o.single {
			out[i] = localOp{single: true, k1: newKernel1(pos[o.a], &o.u)}
			if single64 {
				for j, v := range o.u {
					out[i].m64[j] = complex64(v)
				}
			}
			continue
		}
		if single64 {
			out[i].k2s = newKernel2s(pos[o.a], pos[o.b], &o.m)
		} else {
			out[i].k2 = newKernel2(pos[o.a], pos[o.b], &o.m)
		}
	}
	return out
}

// applyLocal applies the kernels to the block x of 2^k amplitudes.
func applyLocal[T amplitude](x []T, k int, ops []localOp) {
	switch v := any(x).(type) {
	case []complex128:
		for i := range ops {
			o := &ops[i]
			if o.single {
				apply1Kernel(v, &o.k1, 0, 1<<(k-1))
			} else {
				apply2Kernel(v, &o.k2, 0, 1<<(k-2))
			}
		}
	case []complex64:
		for i := range ops {
			o := &ops[i]
			if o.single {
				m := (*[4]complex64)(o.m64[:4])
				apply1Single(v, o.k1.q, m, 0, 1<<(k-1))
			} else {
				apply2Kernel64(v, &o.k2s, 0, 1<<(k-2))
			}
		}
	}
}

// chunkVisit is called on a chunk amp[off:off+len(x)] of the state (see
// State.RunVisit).
type chunkVisit[T amplitude] func(w, off int, x []T)

// runOps plans and executes ops on the amplitudes amp of n qubits.
func runOps[T amplitude](ctx context.Context, n int, amp []T, ops []Op, workers int) error {
	return runOpsVisit(ctx, n, amp, ops, workers, nil)
}

// runOpsVisit is runOps; when visit is not nil it then visits every chunk
// once, inside the last pass where foldable allows it, else in a pass of
// its own (visitChunks).
func runOpsVisit[T amplitude](ctx context.Context, n int, amp []T, ops []Op, workers int, visit chunkVisit[T]) error {
	checkOps(n, ops)
	var zero T
	_, single64 := any(zero).(complex64)
	var bufs [][]T // one block buffer per worker, kept across passes
	passes := planPasses(n, ops, passQubits(n))
	last := lastPass(passes)
	folded := false
	for i := range passes {
		if err := ctx.Err(); err != nil {
			return err
		}
		p := &passes[i]
		kops := p.kernels(single64)
		if len(kops) == 0 {
			continue
		}
		if len(p.qubits) == n {
			applyWhole(n, amp, kops, workers)
			continue
		}
		if bufs == nil {
			bufs = make([][]T, max(workers, 1))
		}
		var v chunkVisit[T]
		if visit != nil && p == last && foldable(n, p) {
			v, folded = visit, true
		}
		runPass(n, amp, p, kops, bufs, v)
	}
	if visit != nil && !folded {
		if err := ctx.Err(); err != nil {
			return err
		}
		visitChunks(amp, n, workers, visit)
	}
	return nil
}

// applyWhole applies the kernels of a pass that spans all n qubits gate by
// gate, each split across workers like Apply2.
func applyWhole[T amplitude](n int, amp []T, kops []localOp, workers int) {
	if workers <= 1 || n < ParallelQubits {
		applyLocal(amp, n, kops)
		return
	}
	for i := range kops {
		o := &kops[i]
		count := 1 << (n - 2)
		if o.single {
			count = 1 << (n - 1)
		}
		parallelFor(count, workers, true, func(lo, hi int) {
			switch v := any(amp).(type) {
			case []complex128:
				if o.single {
					apply1Kernel(v, &o.k1, lo, hi)
				} else {
					apply2Kernel(v, &o.k2, lo, hi)
				}
			case []complex64:
				if o.single {
					apply1Single(v, o.k1.q, (*[4]complex64)(o.m64[:4]), lo, hi)
				} else {
					apply2Kernel64(v, &o.k2s, lo, hi)
				}
			}
		})
	}
}

// runPass executes one pass over the blocks of a state larger than a block:
// each block (one setting of the qubits outside p.qubits) is gathered into
// a buffer in 2^(k−low) runs of 2^low consecutive amplitudes, the kernels
// act on the buffer, and it is scattered back; a block of the lowest k
// qubits is contiguous and the kernels act on it in place. Workers take
// contiguous ranges of blocks, so neighbouring blocks share pages. When
// visit is not nil (only where foldable(n, p) holds), each block's chunks
// of ProbabilityChunk amplitudes are visited right after its gates, from
// the block in place or from the buffer before it is scattered back.
func runPass[T amplitude](n int, amp []T, p *pass, kops []localOp, bufs [][]T, visit chunkVisit[T]) {
	workers := len(bufs)
	k := len(p.qubits)
	low := p.low
	high := p.qubits[low:]
	offs := make([]int, 1<<len(high))
	for r := range offs {
		o := 0
		for i, q := range high {
			o |= (r >> i & 1) << q
		}
		offs[r] = o
	}
	var rest []int
	in := 0
	for q := 0; q < n; q++ {
		if in < k && p.qubits[in] == q {
			in++
			continue
		}
		rest = append(rest, q)
	}
	blocks := 1 << len(rest)
	run := 1 << low
	body := func(w, from, to int) {
		if low == k {
			// The block is the lowest k qubits: 2^k consecutive amplitudes,
			// which the kernels take in place. The same operations on the
			// same values as through the buffer, without the two copies:
			// a scan of grid:4x6 reading out every depth 1..20 (2 instances,
			// where half the passes of a layer are of this kind) took 3.51,
			// 3.61, 3.56 s against 3.82, 3.63, 3.81 s with the copies, in
			// alternating runs on a quiet 2-core machine.
			for blk := from; blk < to; blk++ {
				base := blk << k
				applyLocal(amp[base:base+1<<k:base+1<<k], k, kops)
				if visit != nil {
					for c := base; c < base+1<<k; c += ProbabilityChunk {
						visit(w, c, amp[c:c+ProbabilityChunk:c+ProbabilityChunk])
					}
				}
			}
			return
		}
		if len(bufs[w]) < 1<<k {
			bufs[w] = make([]T, 1<<k)
		}
		buf := bufs[w][:1<<k]
		for blk := from; blk < to; blk++ {
			base := 0
			for i, q := range rest {
				base |= (blk >> i & 1) << q
			}
			for r, o := range offs {
				copy(buf[r*run:(r+1)*run], amp[base+o:base+o+run])
			}
			applyLocal(buf, k, kops)
			if visit != nil {
				// Each run holds whole chunks (low ≥ probabilityChunkQubits).
				for r, o := range offs {
					for c := 0; c < run; c += ProbabilityChunk {
						x := r*run + c
						visit(w, base+o+c, buf[x:x+ProbabilityChunk:x+ProbabilityChunk])
					}
				}
			}
			for r, o := range offs {
				copy(amp[base+o:base+o+run], buf[r*run:(r+1)*run])
			}
		}
	}
	if workers <= 1 || n < ParallelQubits || blocks < 2 {
		body(0, 0, blocks)
		return
	}
	var g errgroup.Group
	var carry crash.Carrier
	chunk := (blocks + workers - 1) / workers
	for w := 0; w*chunk < blocks; w++ {
		lo, hi := w*chunk, min((w+1)*chunk, blocks)
		g.Go(func() error { defer carry.Catch(); body(w, lo, hi); return nil })
	}
	_ = g.Wait()
	carry.Rethrow()
}
