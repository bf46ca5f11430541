package moments

import (
	"context"
	"fmt"
	"math"

	"mixdepth/sim"
)

// completeFlush is the weight, relative to the largest, below which the
// complete-graph reduction drops a class: far below float64 resolution of
// the total, and it keeps the arithmetic out of subnormal numbers.
const completeFlush = 1e-300

// completeSymmetryTol is the relative asymmetry of a Transfer under the
// exchange of its qubits that the reduction treats as rounding; such a
// transfer is symmetrised before use.
const completeSymmetryTol = 1e-12

// CompleteCollisionCurve returns the exact E[Z] after each of depths gates
// (ascending) of the random-edge schedule on the complete graph on n
// qubits, every gate on a uniformly drawn pair of distinct qubits and drawn
// from the ensemble with transfer t. It needs t to be symmetric under the
// exchange of the two qubits of a gate (to a relative 1e-12; every ensemble
// of a fixed gate dressed with single-qubit Haar gates is) and returns an
// error otherwise. Values below the smallest float64 (about 1e-308, reached
// near n = 1020) underflow to 0; CompleteLogCollisionCurve does not.
func CompleteCollisionCurve(ctx context.Context, n int, t *Transfer, depths []int, opts ...CollisionOption) ([]float64, error) {
	logs, err := CompleteLogCollisionCurve(ctx, n, t, depths, opts...)
	if err != nil {
		return nil, err
	}
	for i, v := range logs {
		logs[i] = math.Exp(v)
	}
	return logs, nil
}

// CompleteLogCollisionCurve is CompleteCollisionCurve returning ln E[Z]
// (−Inf or NaN should the weights of a non-physical transfer sum to zero or
// less). It needs 16·(n+1)² bytes, checked first.
//
// The average over the edge commutes with every permutation of the qubits,
// and so does the initial state, so the readout-weighted coefficients u(σ),
// σ ∈ {I, S, F}^n, depend only on the counts (n_I, n_S, n_F) of each local
// state. The state is the class weight W(n_I, n_S, n_F) = Σ_{σ in class} u(σ),
// with E[Z] = Σ W. A gate hits a pair of local states {x, y} with the
// hypergeometric probability
//
//	C(n_x, 2)/C(n, 2) for x = y,  n_x·n_y/C(n, 2) for x ≠ y,
//
// maps F to (I+S)/3 and applies t; the weight of each output pair then moves
// to the class with the counts changed accordingly. The weights are
// rescaled by their largest magnitude after every gate and the scale kept
// as a logarithm, so nothing overflows or underflows for any n.
func CompleteLogCollisionCurve(ctx context.Context, n int, t *Transfer, depths []int, opts ...CollisionOption) ([]float64, error) {
	cfg := collisionConfigure(opts)
	return completeLogCurve(ctx, n, t, depths, &cfg)
}

// completeCurve is CompleteCollisionCurve with its configuration built.
func completeCurve(ctx context.Context, n int, t *Transfer, depths []int, cfg *collisionConfig) ([]float64, error) {
	logs, err := completeLogCurve(ctx, n, t, depths, cfg)
	if err != nil {
		return nil, err
	}
	for i, v := range logs {
		logs[i] = math.Exp(v)
	}
	return logs, nil
}

// completeLogCurve is CompleteLogCollisionCurve with its configuration
// built. With cfg.noise it reads out the noisy weighted sum, which needs the
// same readout weights on every qubit (uniform noise).
func completeLogCurve(ctx context.Context, n int, t *Transfer, depths []int, cfg *collisionConfig) ([]float64, error) {
	if t == nil {
		panic("moments: CompleteLogCollisionCurve with a nil Transfer")
	}
	if n < 2 {
		return nil, fmt.Errorf("moments: complete graph on %d qubits: it needs at least 2", n)
	}
	if err := collisionCheckDepths(depths); err != nil {
		return nil, err
	}
	if !t.symmetric(completeSymmetryTol) {
		return nil, fmt.Errorf("moments: the complete-graph reduction needs a transfer symmetric under exchanging the two qubits of a gate")
	}
	need := 16 * float64(n+1) * float64(n+1)
	if err := sim.CheckMemory(need, fmt.Sprintf("the complete-graph reduction on %d qubits", n)); err != nil {
		return nil, fmt.Errorf("moments: %w", err)
	}
	sym := t.swapped()
	for r := range 4 {
		for c := range 4 {
			sym[r][c] = (t[r][c] + sym[r][c]) / 2
		}
	}
	c := newCompleteChain(n, &sym)
	c.final = cfg.final
	if cfg.noise != nil {
		r := cfg.noise.read[0]
		for _, x := range cfg.noise.read {
			if x != r {
				return nil, fmt.Errorf("moments: the complete-graph reduction needs the same readout errors on every qubit")
			}
		}
		c.read = &r
	}
	out := make([]float64, 0, len(depths))
	steps := 0
	if len(depths) > 0 {
		steps = depths[len(depths)-1]
	}
	for d := 0; ; d++ {
		for len(out) < len(depths) && depths[len(out)] == d {
			out = append(out, c.logCollision())
		}
		if d == steps {
			break
		}
		if err := ctx.Err(); err != nil {
			return nil, fmt.Errorf("moments: complete-graph average stopped at gate %d of %d: %w", d, steps, err)
		}
		c.step()
		cfg.report(d+1, steps)
	}
	return out, nil
}

// completeKind is one unordered pair {x, y} of local states a gate can hit.
type completeKind struct {
	kind       int        // 0..5: II, IS, IF, SS, SF, FF
	nI, nS, nF int        // how many of the pair's two qubits are in I, S, F
	out        [3]float64 // weight sent to output pairs with 0, 1, 2 qubits in S
}

// completeChain holds the class weights W(n_I, n_S, n_F) of the
// complete-graph reduction at index n_F·(n+1) + n_S, scaled by e^logScale.
type completeChain struct {
	n        int
	pairs    float64 // C(n, 2)
	kinds    [6]completeKind
	w, next  []float64
	tmp      []float64 // one row of weights in transit
	logScale float64
	// final: circuits end with a single-qubit Haar layer, so an untouched
	// qubit reads out 2/3 instead of 1 (CollisionFinalLayer).
	final bool
	// read, when not nil, holds the noisy readout weights of every qubit
	// (XEBCurve).
	read *qubitReadout
}

func newCompleteChain(n int, t *Transfer) *completeChain {
	l := t.threeState(1)
	c := &completeChain{
		n:     n,
		pairs: float64(n) * float64(n-1) / 2,
		w:     make([]float64, (n+1)*(n+1)),
		next:  make([]float64, (n+1)*(n+1)),
		tmp:   make([]float64, n+1),
	}
	pairs := [6][2]int{{transferI, transferI}, {transferI, transferS}, {transferI, transferF}, {transferS, transferS}, {transferS, transferF}, {transferF, transferF}}
	for k, p := range pairs {
		col := 3*p[0] + p[1]
		// Output rows 2·p + q: II has no S, IS and SI one, SS two. The
		// transfer is symmetric, so the column (y, x) would bin the same.
		kind := completeKind{kind: k, out: [3]float64{l[0][col], l[1][col] + l[2][col], l[3][col]}}
		for _, x := range p {
			switch x {
			case transferI:
				kind.nI++
			case transferS:
				kind.nS++
			default:
				kind.nF++
			}
		}
		c.kinds[k] = kind
	}
	c.w[n*(n+1)] = 1 // every qubit fresh
	return c
}

// step applies one gate on a uniformly drawn pair. For each row n_F = f
// and each kind of pair, the weights of consecutive n_S move to consecutive
// classes, so the inner loops stream along rows.
func (c *completeChain) step() {
	n := c.n
	row := n + 1
	clear(c.next)
	inv := 1 / c.pairs
	for f := 0; f <= n; f++ {
		w := c.w[f*row : f*row+row-f] // s = 0..n−f
		lo, hi := -1, -1
		for s, v := range w {
			if v != 0 {
				if lo < 0 {
					lo = s
				}
				hi = s
			}
		}
		if lo < 0 {
			continue
		}
		ff := float64(f)
		for _, k := range c.kinds {
			// Counts after removing the pair: n_F drops by the F's in it,
			// n_S by its S's; outputs add 0, 1 or 2 S's.
			dst := (f - k.nF) * row
			sLo, sHi := max(lo, k.nS), min(hi, n-f-k.nI)
			if sLo > sHi || f < k.nF {
				continue
			}
			// p[s] is the weight of class (n−s−f, s, f) that the gate takes
			// through a pair of this kind.
			p := c.tmp[:sHi-sLo+1]
			// The number of such pairs is a quadratic in s, exact in float64.
			m := float64(n - f)
			var ca, cb, cc float64 // ways = ca + cb·s + cc·s²
			switch k.kind {
			case 0: // II: (m−s)(m−s−1)/2
				ca, cb, cc = m*(m-1)/2, -(2*m-1)/2, 0.5
			case 1: // IS: (m−s)s
				ca, cb, cc = 0, m, -1
			case 2: // IF: (m−s)f
				ca, cb, cc = m*ff, -ff, 0
			case 3: // SS: s(s−1)/2
				ca, cb, cc = 0, -0.5, 0.5
			case 4: // SF: s·f
				ca, cb, cc = 0, ff, 0
			default: // FF: f(f−1)/2
				ca, cb, cc = ff*(ff-1)/2, 0, 0
			}
			ws := w[sLo : sHi+1]
			ws = ws[:len(p)]
			for j := range p {
				x := float64(sLo + j)
				p[j] = ws[j] * (ca + x*(cb+x*cc)) * inv
			}
			// Separate passes per output keep the loops free of carried
			// dependencies through next.
			for out, o := range k.out {
				if o == 0 {
					continue
				}
				d := c.next[dst+sLo-k.nS+out:]
				d = d[:len(p)]
				for j, v := range p {
					d[j] += o * v
				}
			}
		}
	}
	c.w, c.next = c.next, c.w
	var big float64
	for _, v := range c.w {
		if a := math.Abs(v); a > big { // not max(): no NaN or signed-zero cases
			big = a
		}
	}
	if big == 0 {
		c.logScale = math.Inf(-1)
		return
	}
	inv = 1 / big
	for i, v := range c.w {
		v *= inv
		if v < completeFlush && v > -completeFlush {
			v = 0
		}
		c.w[i] = v
	}
	c.logScale += math.Log(big)
}

// logCollision returns ln E[Z] = logScale + ln Σ W.
func (c *completeChain) logCollision() float64 {
	var sum float64
	row := c.n + 1
	if c.read != nil {
		// Class (n_I, n_S, n_F) at n_F·(n+1) + n_S reads w_I^n_I·w_S^n_S·w_F^n_F.
		for nF := 0; nF <= c.n; nF++ {
			for nS, v := range c.w[nF*row : (nF+1)*row-nF] {
				if v == 0 {
					continue
				}
				nI := c.n - nS - nF
				sum += v * math.Pow(c.read.i, float64(nI)) * math.Pow(c.read.s, float64(nS)) * math.Pow(c.read.f, float64(nF))
			}
		}
		return c.logScale + math.Log(sum)
	}
	if !c.final {
		for _, v := range c.w {
			sum += v
		}
		return c.logScale + math.Log(sum)
	}
	// Class weights sit at n_F·(n+1) + n_S; each untouched qubit reads 2/3.
	// Factor the largest power out so that 300 untouched qubits stay finite.
	for nF := 0; nF <= c.n; nF++ {
		f := math.Pow(2.0/3, float64(nF))
		for _, v := range c.w[nF*row : (nF+1)*row] {
			sum += f * v
		}
	}
	return c.logScale + math.Log(sum)
}
