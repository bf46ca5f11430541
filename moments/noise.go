package moments

import (
	"context"
	"fmt"
	"math"

	"mixdepth/circuits"
	"mixdepth/sim"
)

// The expected cross-entropy benchmark under noise is a two-copy average
// with the noise on copy 1 only. For the noisy output law q and the ideal
// one p of the same circuit,
//
//	E[F_lin] + 1 = D·Σ_y E[q(y)·p(y)] = D·Tr(E[ρ_noisy ⊗ ρ_ideal]·M),
//
// M = ⊗_q M_q the readout (below). Both copies see the same random gates,
// so the average is again a combination of identity/swap patterns on the
// touched qubits, and each noise channel on copy 1 maps that span to itself:
//
//   - A two-qubit Pauli channel of rate e after a gate (with probability e a
//     uniform non-identity Pauli on the pair) multiplies every non-identity
//     Pauli P of the pair by λ = 1 − 16e/15, since Σ_{Q≠I} Q P Q = −P when
//     P ≠ I (P commutes with 8 of the 16 Paulis and anticommutes with 8).
//     Writing S = (1/d) Σ_P P⊗P (d = 2 per qubit; common practice),
//
//     II → II, IS → λ·IS + ((1−λ)/2)·II, SI → λ·SI + ((1−λ)/2)·II, SS → λ·SS + ((1−λ)/4)·II.
//
//     I and S carry the same readout weight 2 on a touched qubit, so the
//     matrix is the same in the readout-weighted coordinates u (PairNoise).
//     The channel commutes with every unitary on the pair, hence with the
//     single-qubit twirls that a Transfer places after the gate: the noisy
//     gate is PairNoise(e)·T.
//   - A single-qubit Pauli channel of rate e1 (X, Y or Z with probability
//     e1/3 each) multiplies X, Y, Z by λ1 = 1 − 4e1/3, so on copy 1
//     S → λ1·S + ((1−λ1)/2)·I (SingleNoise). It acts after the Haar
//     single-qubit gates u_a, u_b of a gate set G·(u_a ⊗ u_b), before G, and
//     after every gate of a Finisher's final layer. A fresh qubit
//     F = |0⟩⟨0|^⊗2 meets the twirl of u first: F → (I+S)/6, then the noise,
//     giving ((1 + 2e1/3)·I + λ1·S)/6. The same follows from noise first,
//     N(|0⟩⟨0|) ⊗ |0⟩⟨0| with Tr 1 and Tr(·S) = 1 − 2e1/3, matched by
//     αI + βS (4α + 2β = 1, 2α + 4β = 1 − 2e1/3). In u coordinates the
//     noisy gate is PairNoise(e)·T·(N1_a ⊗ N1_b), and the engines' fresh
//     map (I+S)/3 is applied before N1, as the order of the circuit says.
//   - Readout flips on copy 1 (0 read as 1 with p01, 1 as 0 with p10): per
//     qubit M_q = Σ_{x,y} r(y|x)|x⟩⟨x| ⊗ |y⟩⟨y|, so Tr(I·M_q) = 2,
//     Tr(S·M_q) = r(0|0) + r(1|1) = 2 − p01 − p10 and Tr(F·M_q) = 1 − p01. In
//     u coordinates the readout is Σ_σ u(σ) Π_q w_q(σ_q) with w(I) = 1,
//     w(S) = 1 − (p01+p10)/2 and w = 1 − p01 for an untouched qubit. With a
//     final single-qubit layer every qubit is twirled and then dephased by
//     N1 before readout: w(S) becomes λ1·w(S) + (1−λ1)/2, and an untouched
//     qubit reads ((1+2e1/3) + λ1·w(S))/3 = (w(I) + w'(S))/3.
//   - Global depolarizing f: the sampler draws from f·q' + (1−f)/D and then
//     applies the readout flips (sampling.DrawShots), so
//
//     E[F_lin] = f·X + (1−f)·U − 1,  X = D·Σ_y E[q'(y)p(y)],  U = D·Σ_y E[(R·1/D)(y)·p(y)].
//
//     The uniform copy is I/D ⊗ E[ρ]: a touched (or finally twirled) qubit
//     of E[ρ] is I/2 and reads out 2·Tr((I/2 ⊗ I/2)M_q) = 1 exactly, an
//     untouched one is |0⟩⟨0| and reads Σ_x r(0|x) = 1 − p01 + p10. So U = 1
//     once every qubit is touched and E[F_lin] = f·(X − 1): f scales the
//     benchmark. Before, U is the product over untouched qubits (for
//     random-edge schedules its expectation, see xebUniformRandomEdge).

// PairNoise returns the map of a two-qubit Pauli channel of rate e on copy
// 1 of a pair, on {I, S}² (index 2·σ_a + σ_b, column the input), in the
// coefficients and in the readout-weighted coordinates alike: λ = 1 − 16e/15
// on every non-identity pattern, the rest moved to II (see the comment at
// the top of noise.go).
func PairNoise(e float64) Transfer {
	l := 1 - 16*e/15
	return Transfer{
		{1, (1 - l) / 2, (1 - l) / 2, (1 - l) / 4},
		{0, l, 0, 0},
		{0, 0, l, 0},
		{0, 0, 0, l},
	}
}

// SingleNoise returns the map of a single-qubit Pauli channel of rate e1
// on copy 1 of one qubit, on {I, S} (column the input): I → I,
// S → λ1·S + ((1−λ1)/2)·I, λ1 = 1 − 4e1/3.
func SingleNoise(e1 float64) [2][2]float64 {
	l := 1 - 4*e1/3
	return [2][2]float64{{1, (1 - l) / 2}, {0, l}}
}

// NoisyTransfer returns PairNoise(pair)·t·(SingleNoise(singleA) ⊗
// SingleNoise(singleB)): the transfer of a gate of the ensemble with
// transfer t followed by a Pauli error of rate pair on copy 1, with
// single-qubit errors of rates singleA and singleB on its inputs (pass 0
// for ensembles with no single-qubit gates).
func NoisyTransfer(t *Transfer, pair, singleA, singleB float64) Transfer {
	na, nb := SingleNoise(singleA), SingleNoise(singleB)
	var in Transfer // t·(N_a ⊗ N_b)
	for r := range 4 {
		for c := range 4 {
			var s float64
			for x := range 4 {
				s += t[r][x] * na[x>>1][c>>1] * nb[x&1][c&1]
			}
			in[r][c] = s
		}
	}
	p := PairNoise(pair)
	var out Transfer
	for r := range 4 {
		for c := range 4 {
			var s float64
			for x := range 4 {
				s += p[r][x] * in[x][c]
			}
			out[r][c] = s
		}
	}
	return out
}

// qubitReadout is the readout weight of one qubit in the readout-weighted
// coordinates: i and s for a touched qubit in I or S, f for an untouched
// one (stored at I).
type qubitReadout struct{ i, s, f float64 }

// xebReadout returns the weights of every qubit under the readout flips and,
// with final, the single-qubit errors of the final layer (see the comment
// at the top of noise.go).
func xebReadout(c *circuits.ChipNoise, final bool) []qubitReadout {
	out := make([]qubitReadout, c.Qubits())
	for q := range out {
		ws := 1 - (c.Readout01[q]+c.Readout10[q])/2
		r := qubitReadout{i: 1, s: ws, f: 1 - c.Readout01[q]}
		if final {
			n1 := SingleNoise(c.Single[q])
			r.s = n1[0][1]*r.i + n1[1][1]*ws
			r.f = (r.i + r.s) / 3
		}
		out[q] = r
	}
	return out
}

// xebUntouched returns the factor of the uniform part of global
// depolarizing for an untouched qubit: 1 − p01 + p10, or 1 with a final
// layer, which twirls every qubit.
func xebUntouched(c *circuits.ChipNoise, q int, final bool) float64 {
	if final {
		return 1
	}
	return 1 - c.Readout01[q] + c.Readout10[q]
}

// xebNoise is the noise of one XEB curve as the engines take it.
type xebNoise struct {
	chip    *circuits.ChipNoise
	read    []qubitReadout
	final   bool
	dressed bool // single-qubit errors before the entangler (*circuits.GateSet)
}

// noisyEdgeTransfers returns the transfer of every coupler of g, in both
// orientations, with the noise of nz applied to the transfer of the
// ensemble (t, or et's per coupler when et is not nil).
func noisyEdgeTransfers(g *circuits.Graph, t *Transfer, et *EdgeTransfers, nz *xebNoise) *EdgeTransfers {
	out := &EdgeTransfers{Default: *t, byEdge: make(map[[2]int]*Transfer, 2*len(g.Edges))}
	for i, e := range g.Edges {
		for _, ab := range [2][2]int{{e.A, e.B}, {e.B, e.A}} {
			a, b := ab[0], ab[1]
			base := t
			if et != nil {
				base = et.For(a, b)
			}
			var sa, sb float64
			if nz.dressed {
				sa, sb = nz.chip.Single[a], nz.chip.Single[b]
			}
			tr := NoisyTransfer(base, nz.chip.Pair[i], sa, sb)
			out.byEdge[ab] = &tr
		}
	}
	return out
}

// readoutSplit is the number of low index bits whose readout weights are
// tabulated together: the weighted sum runs over blocks of 2^readoutSplit
// coefficients, each with one weight of the high bits.
const readoutSplit = 14

// readoutSum returns Σ_σ u(σ) Π_j w_j(σ_j) for local states σ_j, bit j of
// the index, with w_j(0) = w0[j] and w_j(1) = w1[j], in blocks of
// 2^readoutSplit whose sums are added in order (so the rounding does not
// depend on parallel).
func readoutSum(u, w0, w1 []float64, workers int, parallel bool) float64 {
	n := len(w0)
	lowBits := min(n, readoutSplit)
	table := func(from, to int) []float64 {
		t := []float64{1}
		for j := from; j < to; j++ {
			next := make([]float64, 2*len(t))
			for k, v := range t {
				next[k] = v * w0[j]
				next[k+len(t)] = v * w1[j]
			}
			t = next
		}
		return t
	}
	low, high := table(0, lowBits), table(lowBits, n)
	partial := make([]float64, len(high))
	engineParallel(len(high), workers, parallel, func(lo, hi int) {
		for h := lo; h < hi; h++ {
			blk := u[h<<lowBits : (h+1)<<lowBits]
			blk = blk[:len(low)]
			var s float64
			for l, v := range blk {
				s += low[l] * v
			}
			partial[h] = high[h] * s
		}
	})
	var sum float64
	for _, s := range partial {
		sum += s
	}
	return sum
}

// weightedCollision returns Σ_σ u(σ) Π_q w_q(σ_q) with the weights r of
// every qubit (untouched qubits read r[q].f).
func (e *Engine) weightedCollision(r []qubitReadout) float64 {
	w0, w1 := make([]float64, e.n), make([]float64, e.n)
	for q := range e.n {
		w0[q], w1[q] = r[q].f, r[q].s
		if e.Touched(q) {
			w0[q] = r[q].i
		}
	}
	return readoutSum(e.u, w0, w1, e.workers, e.n >= sim.ParallelQubits)
}

// XEBCurve returns the exact expected linear cross-entropy benchmark
// E[F_lin] = D·Σ_y E[q(y)·p(y)] − 1 after each of depths (ascending) steps
// of the schedule s on g with gates from the ensemble e, q the output law
// under the noise nz and p the ideal one (both for the same random
// circuit; Boixo et al., "Characterizing quantum supremacy in near-term
// devices", Nature Physics 14, 595, 2018). The rules for each kind of noise
// are derived at the top of noise.go. Engines as for CollisionCurve:
// layered schedules on an Engine, random-edge schedules by the exact
// average over edges, each edge with its own noisy transfer, and the
// complete-graph reduction when nz is Uniform. With nz noiseless it equals
// D·E[Z] − 1. Options as for CollisionCurve (CollisionFinalLayer and
// CollisionEdgeTransfers are set from e and must not be given). It returns
// an error wrapping circuits.ErrNoiseRate for invalid rates and
// ErrNoExactMoments for an ensemble with no exact moments. It panics if g,
// s, e or nz is nil.
func XEBCurve(ctx context.Context, g *circuits.Graph, s circuits.Schedule, e circuits.Ensemble, nz *circuits.ChipNoise, depths []int, workers int, opts ...CollisionOption) ([]float64, error) {
	if g == nil || s == nil || e == nil || nz == nil {
		panic("moments: XEBCurve with a nil graph, schedule, ensemble or noise")
	}
	t, final, err := TransferFor(e)
	if err != nil {
		return nil, err
	}
	et, err := EdgeTransfersFor(e)
	if err != nil {
		return nil, err
	}
	if err := nz.Validate(g); err != nil {
		return nil, fmt.Errorf("moments: %w", err)
	}
	if err := xebCheckCouplers(g, nz, s); err != nil {
		return nil, err
	}
	cfg := collisionConfigure(opts)
	cfg.final = final
	x := &xebNoise{chip: nz, read: xebReadout(nz, final), final: final}
	_, x.dressed = e.(*circuits.GateSet)
	cfg.noise = x
	cfg.edges = noisyEdgeTransfers(g, &t, et, x)
	sums, err := CollisionCurve(ctx, g, s, &t, depths, workers, collisionWith(&cfg))
	if err != nil {
		return nil, err
	}
	for i, v := range sums {
		sums[i] = math.Ldexp(v, g.Qubits)
	}
	return xebAssemble(g, s, nz, final, depths, sums), nil
}

// ExactNoise makes Exact also compute the expected cross-entropy benchmark
// under the noise c at every depth (Result.XEBExpected and the fields after
// it), on the same engine as E[Z]; nil (the default) computes none. Exact
// then returns an error wrapping circuits.ErrNoiseRate for rates outside
// [0, 1].
func ExactNoise(c *circuits.ChipNoise) ExactOption {
	return func(cfg *exactConfig) { cfg.noise = c }
}

// exactXEB fills the XEB fields of r, running the noisy curve on the engine
// that computed E[Z] (the MPS at the same order and bond when useMPS).
func exactXEB(ctx context.Context, r *Result, g *circuits.Graph, s circuits.Schedule, e circuits.Ensemble, useMPS bool, t *Transfer, et *EdgeTransfers, cfg *exactConfig, copts []CollisionOption) error {
	nz := cfg.noise
	if err := nz.Validate(g); err != nil {
		return fmt.Errorf("moments: %w", err)
	}
	if err := xebCheckCouplers(g, nz, s); err != nil {
		return err
	}
	depths := r.Depths
	ccfg := collisionConfigure(copts)
	x := &xebNoise{chip: nz, read: xebReadout(nz, ccfg.final), final: ccfg.final}
	_, x.dressed = e.(*circuits.GateSet)
	ccfg.noise = x
	ccfg.edges = noisyEdgeTransfers(g, t, et, x)
	var sums []float64
	r.XEBTruncationError = make([]float64, len(depths))
	if useMPS {
		if len(depths) > 0 {
			var err error
			sums, r.XEBTruncationError, _, err = mpsEstimate(ctx, g.Qubits, s.(*circuits.Layered), t, depths, r.Order, r.BondDim, &ccfg)
			if err != nil {
				return err
			}
		}
	} else {
		var err error
		if sums, err = CollisionCurve(ctx, g, s, t, depths, cfg.workers, collisionWith(&ccfg)); err != nil {
			return exactMemory(err)
		}
		for i, v := range sums {
			sums[i] = math.Ldexp(v, g.Qubits)
		}
	}
	r.XEBExpected = xebAssemble(g, s, nz, ccfg.final, depths, sums)
	if nz.Fidelity != 1 {
		for i := range r.XEBTruncationError {
			r.XEBTruncationError[i] *= nz.Fidelity
		}
	}
	for i, d := range depths {
		ideal := math.Ldexp(r.Collision[i], g.Qubits) - 1
		dig := xebDigital(nz, s, e, d)
		r.XEBIdeal = append(r.XEBIdeal, ideal)
		r.XEBNormalized = append(r.XEBNormalized, r.XEBExpected[i]/ideal)
		r.DigitalFidelity = append(r.DigitalFidelity, dig)
		r.XEBOverDigital = append(r.XEBOverDigital, r.XEBExpected[i]/ideal/dig)
	}
	return nil
}

// xebDigital is nz.DigitalFidelity at depth d ≥ 1; at depth 0, where that
// panics, it is the same product with no gate: f, the readout factors and
// the final layer's single-qubit gates.
func xebDigital(nz *circuits.ChipNoise, s circuits.Schedule, e circuits.Ensemble, d int) float64 {
	if d >= 1 {
		return nz.DigitalFidelity(s, e, d)
	}
	_, final := e.(circuits.Finisher)
	f := nz.Fidelity
	for q := range nz.Qubits() {
		if final {
			f *= 1 - nz.Single[q]
		}
		f *= 1 - (nz.Readout01[q]+nz.Readout10[q])/2
	}
	return f
}

// collisionWith replaces the whole configuration (for XEBCurve, which
// builds it itself).
func collisionWith(c *collisionConfig) CollisionOption {
	return func(dst *collisionConfig) { *dst = *c }
}

// xebAssemble turns the readouts X = D·Σ u·w (one per depth) into E[F_lin]
// = f·X + (1−f)·U − 1 (see the comment at the top of noise.go).
func xebAssemble(g *circuits.Graph, s circuits.Schedule, nz *circuits.ChipNoise, final bool, depths []int, sums []float64) []float64 {
	f := nz.Fidelity
	var uniform []float64
	if f != 1 {
		uniform = xebUniform(g, s, nz, final, depths)
	}
	out := make([]float64, len(depths))
	for i, x := range sums {
		if f == 1 {
			out[i] = x - 1
			continue
		}
		out[i] = f*x + (1-f)*uniform[i] - 1
	}
	return out
}

// xebUniform returns U at each depth: the readout of the uniform part of
// global depolarizing, the expected product over untouched qubits of
// 1 − p01 + p10.
func xebUniform(g *circuits.Graph, s circuits.Schedule, nz *circuits.ChipNoise, final bool, depths []int) []float64 {
	n := g.Qubits
	c := make([]float64, n)
	trivial := true
	for q := range n {
		c[q] = xebUntouched(nz, q, final)
		trivial = trivial && c[q] == 1
	}
	out := make([]float64, len(depths))
	if trivial {
		for i := range out {
			out[i] = 1
		}
		return out
	}
	if re, ok := s.(*circuits.RandomEdge); ok {
		return xebUniformRandomEdge(n, re.Edges, c, depths)
	}
	touched := make([]bool, n)
	var step []circuits.Edge
	d := 0
	for i, depth := range depths {
		for ; d < depth; d++ {
			step = s.Step(d, nil, step[:0])
			for _, e := range step {
				touched[e.A], touched[e.B] = true, true
			}
		}
		u := 1.0
		for q := range n {
			if !touched[q] {
				u *= c[q]
			}
		}
		out[i] = u
	}
	return out
}

// xebUniformRandomEdge returns E[Π_{q untouched} c_q] after each of depths
// random-edge gates by inclusion–exclusion over the sets A of qubits whose
// factor is taken (c_q = 1 + (c_q − 1)):
//
//	E Π_q (1 + (c_q − 1)·[q untouched]) = Σ_A Π_{q∈A} (c_q − 1) · (|E_A|/|E|)^t,
//
// |E_A| the edges that avoid A, since A stays untouched exactly when every
// gate avoids it. Only qubits with c_q ≠ 1 enter A.
func xebUniformRandomEdge(n int, edges []circuits.Edge, c []float64, depths []int) []float64 {
	same := true
	for _, v := range c {
		same = same && v == c[0]
	}
	if same && collisionComplete(n, edges) {
		return xebUniformComplete(n, c[0], depths)
	}
	return xebUniformRandomEdgeSubsets(n, edges, c, depths)
}

// xebUniformRandomEdgeSubsets is xebUniformRandomEdge by the sum over
// subsets, with no shortcut.
func xebUniformRandomEdgeSubsets(n int, edges []circuits.Edge, c []float64, depths []int) []float64 {
	var qs []int
	for q := range n {
		if c[q] != 1 {
			qs = append(qs, q)
		}
	}
	out := make([]float64, len(depths))
	for a := range 1 << len(qs) {
		var mask uint64
		coef := 1.0
		for j, q := range qs {
			if a>>j&1 == 1 {
				mask |= 1 << q
				coef *= c[q] - 1
			}
		}
		avoid := 0
		for _, e := range edges {
			if mask>>e.A&1 == 0 && mask>>e.B&1 == 0 {
				avoid++
			}
		}
		p := float64(avoid) / float64(len(edges))
		for i, d := range depths {
			out[i] += coef * math.Pow(p, float64(d))
		}
	}
	return out
}

// xebCheckCouplers returns an error unless every gate of s acts on a
// coupler of g, which has its rate in nz.
func xebCheckCouplers(g *circuits.Graph, nz *circuits.ChipNoise, s circuits.Schedule) error {
	if e, ok := nz.Uncovered(s); ok {
		return fmt.Errorf("moments: the schedule has a gate on (%d, %d), which is not a coupler of %s, so it has no noise rate; use a schedule on the graph's couplers", e.A, e.B, g.Name)
	}
	return nil
}

// xebUniformComplete is xebUniformRandomEdge on the complete graph with the
// same factor c on every qubit: the sets A of k qubits are alike, so
//
//	U(t) = Σ_k C(n, k)·(c − 1)^k·(C(n−k, 2)/C(n, 2))^t,
//
// each term computed through its logarithm so that large n stays finite.
func xebUniformComplete(n int, c float64, depths []int) []float64 {
	out := make([]float64, len(depths))
	lc := math.Log(math.Abs(c - 1))
	lfact := func(k int) float64 { v, _ := math.Lgamma(float64(k + 1)); return v }
	pairs := float64(n) * float64(n-1) / 2
	for i, d := range depths {
		for k := 0; k <= n; k++ {
			if k > 0 && c == 1 {
				break
			}
			sign := 1.0
			if k%2 == 1 && c < 1 {
				sign = -1
			}
			rest := float64(n-k) * float64(n-k-1) / 2
			if rest == 0 && d > 0 {
				continue
			}
			l := lfact(n) - lfact(k) - lfact(n-k) + float64(k)*lc
			if d > 0 {
				l += float64(d) * math.Log(rest/pairs)
			}
			if k == 0 {
				l = 0 // the empty set (and 0·ln|c−1| would be NaN for c = 1)
			}
			out[i] += sign * math.Exp(l)
		}
	}
	return out
}
