package moments

import (
	"context"
	"fmt"
	"math"
	"mixdepth/internal/crash"
	"sync"

	"golang.org/x/sync/errgroup"

	"mixdepth/circuits"
	"mixdepth/sim"
)

// CollisionRandomEdgeMaxQubits is the largest graph on which CollisionCurve
// averages a random-edge schedule exactly, other than the complete graph.
// The work per gate is about |E|·3^(n−2) four-coefficient updates: at 20
// qubits, tens of seconds per gate on two cores.
const CollisionRandomEdgeMaxQubits = 20

// randomChunks bounds the number of blocks of subsets whose partial sums
// are kept apart, so that the result does not depend on the worker count.
const randomChunks = 4096

// randomEdgeCurve returns the exact E[Z] at each of depths (ascending) for
// the random-edge schedule on edges of an n-qubit graph: each gate acts on
// an edge drawn uniformly from edges (duplicates count twice), drawn from
// the ensemble with transfer t, or with the edge's own transfer
// cfg.edges.For(a, b) (per-coupler gates, or noise: see XEBCurve). The
// average over the edge is then M = (1/|E|) Σ_e M_e with each edge's own
// M_e; the derivation below uses only that every M_e is a gate invariant
// under single-qubit unitaries on its inputs (so it kills Δ) followed by
// maps that keep span{I, S}², which holds for the noisy transfers too (the
// noise acts after the input twirl). With cfg.noise the readout of each
// chain is the weighted sum of XEBCurve, and Δ and the idle qubits read
// out w_F − (w_I+w_S)/3 and (w_I+w_S)/3 instead of 1/3 and 2/3.
//
// The set of untouched qubits is random and correlated with the rest of the
// state, so an untouched qubit cannot simply be put in span{I, S}. Instead
// write its state F = |0⟩⟨0|^⊗2 as
//
//	F = (I+S)/6 + Δ,  Tr Δ = Tr(ΔS) = 0,
//
// (Tr I = 4, Tr S = 2 on one qubit's two copies). Every gate is invariant
// under single-qubit unitaries on its inputs, and the single-qubit twirl of
// Δ is Σ Wg·Tr(Δ V_π)·V_τ = 0 (Collins 2003), so a gate touching a qubit in
// Δ sends that term to zero; at readout Δ gives 1 − 2/3 = 1/3. Expanding
// the initial state F^⊗n over the set A of qubits in Δ,
//
//	E[Z](t) = Σ_A 3^(−|A|) · Σ_σ (M_A^t u_A)(σ),  M_A = (1/|E|) Σ_{e ∩ A = ∅} M_e,
//
// with u_A = ((I+S)/3)^⊗(A^c) in readout-weighted coordinates: for each A
// an ordinary identity/swap chain on the qubits outside A, in which the
// gates touching A are lost. This is exact and needs 2^n coefficients (per
// worker) rather than 3^n for a chain over {I, S, F}^n, at the same
// count of updates, Σ_A |E_A|·2^(n−|A|−2) = |E|·3^(n−2) per gate. A set A
// that every edge touches contributes only at depth 0, and qubits outside A
// on no edge avoiding A stay (I+S)/3, a factor 2/3 each.
func randomEdgeCurve(ctx context.Context, n int, edges []circuits.Edge, t *Transfer, depths []int, workers int, cfg *collisionConfig) ([]float64, error) {
	if n > CollisionRandomEdgeMaxQubits {
		return nil, fmt.Errorf("moments: the exact random-edge average on %d qubits sums %d chains over subsets of the qubits, about %.2g coefficient updates per gate: %w; use at most %d qubits, the complete graph, or Monte Carlo",
			n, uint64(1)<<n, float64(len(edges))*math.Pow(3, float64(n-2)), ErrTooLarge, CollisionRandomEdgeMaxQubits)
	}
	workers = max(workers, 1)
	need := float64(workers) * 2 * EngineBytes(n)
	fix := "use fewer qubits"
	if workers > 1 {
		fix = "use fewer --workers"
	}
	if err := sim.CheckMemoryFix(need, fmt.Sprintf("the exact random-edge average on %d qubits (two %d-qubit vectors per worker, %d workers)", n, n, workers), fix); err != nil {
		return nil, fmt.Errorf("moments: %w", err)
	}
	steps := 0
	if len(depths) > 0 {
		steps = depths[len(depths)-1]
	}
	subsets := 1 << n
	if cfg.final {
		// A final single-qubit twirl removes every chain with an untouched
		// remainder: only the empty subset is left (see CollisionFinalLayer).
		subsets = 1
	}
	chunk := max(1, subsets/randomChunks)
	nchunks := subsets / chunk
	partial := make([]float64, nchunks*len(depths)) // chunk-major
	// Each edge's own transfer (per-coupler gates or noise), divided by |E|.
	scale := 1 / float64(len(edges))
	ms := make([]Transfer, len(edges))
	for i, e := range edges {
		te := t
		if cfg.edges != nil {
			te = cfg.edges.For(e.A, e.B)
		}
		for r := range 4 {
			for c := range 4 {
				ms[i][r][c] = scale * te[r][c]
			}
		}
	}
	read := make([]qubitReadout, n)
	for q := range read {
		read[q] = qubitReadout{1, 1, 1}
	}
	if cfg.noise != nil {
		read = cfg.noise.read
	}

	var mu sync.Mutex
	next, done := 0, 0
	g, gctx := errgroup.WithContext(ctx)
	for range min(workers, nchunks) {
		g.Go(func() (err error) {
			defer crash.Recover(&err)
			w := randomWorker{n: n, edges: edges, m: ms, read: read, noisy: cfg.noise != nil, depths: depths, steps: steps}
			for {
				mu.Lock()
				c := next
				next++
				mu.Unlock()
				if c >= nchunks {
					return nil
				}
				out := partial[c*len(depths) : (c+1)*len(depths)]
				for a := c * chunk; a < (c+1)*chunk; a++ {
					if err := w.run(gctx, uint64(a), out); err != nil {
						return err
					}
				}
				if cfg.progress != nil {
					mu.Lock()
					done += chunk
					cfg.progress(done, subsets)
					mu.Unlock()
				}
			}
		})
	}
	if err := g.Wait(); err != nil {
		return nil, fmt.Errorf("moments: random-edge average stopped: %w", err)
	}
	out := make([]float64, len(depths))
	for c := range nchunks {
		for i := range depths {
			out[i] += partial[c*len(depths)+i]
		}
	}
	return out, nil
}

// randomWorker runs the chains of single subsets, reusing its buffers.
type randomWorker struct {
	n       int
	edges   []circuits.Edge
	m       []Transfer // the transfer of each edge divided by |E|
	read    []qubitReadout
	noisy   bool // read differs from 1 somewhere: use the weighted sum
	depths  []int
	steps   int
	u, next []float64
	local   []int // qubit → index among the active qubits, or −1
	avoid   []circuits.Edge
	avoidM  []*Transfer
	w0, w1  []float64 // readout weights of the active qubits
}

// run adds 3^(−|A|)·Σ_σ (M_A^t u_A)(σ) for the subset with mask a to out at
// each depth t.
func (w *randomWorker) run(ctx context.Context, a uint64, out []float64) error {
	n := w.n
	if w.local == nil {
		w.local = make([]int, n)
		w.u = make([]float64, 1<<n)
		w.next = make([]float64, 1<<n)
	}
	// The edges that avoid A, on the qubits they touch, renumbered.
	for q := range w.local {
		w.local[q] = -1
	}
	active := 0
	w.avoid, w.avoidM = w.avoid[:0], w.avoidM[:0]
	w.w0, w.w1 = w.w0[:0], w.w1[:0]
	for i, e := range w.edges {
		if a>>e.A&1 == 1 || a>>e.B&1 == 1 {
			continue
		}
		for _, q := range [2]int{e.A, e.B} {
			if w.local[q] < 0 {
				w.local[q] = active
				active++
				w.w0 = append(w.w0, w.read[q].i)
				w.w1 = append(w.w1, w.read[q].s)
			}
		}
		w.avoid = append(w.avoid, circuits.Edge{A: w.local[e.A], B: w.local[e.B]})
		w.avoidM = append(w.avoidM, &w.m[i])
	}
	// Each qubit of A reads out Δ = F − (I+S)/6: w_F − (w_I + w_S)/3, 1/3
	// without noise; each idle qubit (I+S)/3: (w_I + w_S)/3, 2/3 without
	// noise; and each active qubit starts at (I+S)/3.
	weight := 1.0
	for q := range n {
		r := w.read[q]
		switch {
		case a>>q&1 == 1:
			weight *= r.f - (r.i+r.s)/3
		case w.local[q] < 0:
			weight *= (r.i + r.s) / 3
		}
	}
	if len(w.avoid) == 0 {
		// Every gate touches A: only depth 0 survives, where u_A has
		// readout (2/3)^(n−|A|).
		for i, d := range w.depths {
			if d == 0 {
				out[i] += weight
			}
		}
		return nil
	}
	u := w.u[:1<<active]
	next := w.next[:1<<active]
	v0 := weight * math.Pow(3, -float64(active))
	for i := range u {
		u[i] = v0
	}
	di := 0
	for d := 0; ; d++ {
		for di < len(w.depths) && w.depths[di] == d {
			out[di] += w.sum(u)
			di++
		}
		if d == w.steps {
			return nil
		}
		if err := ctx.Err(); err != nil {
			return err
		}
		clear(next)
		for k, e := range w.avoid {
			engineAccumulateRange(u, next, e.A, e.B, w.avoidM[k], 0, len(u)/4)
		}
		u, next = next, u
	}
}

// sum returns the readout of a chain's vector u: Σ u without noise (as
// randomSum), the weighted sum of the active qubits' weights with it.
func (w *randomWorker) sum(u []float64) float64 {
	if w.noisy {
		return readoutSum(u, w.w0, w.w1, 1, false)
	}
	return randomSum(u)
}

// randomSum returns Σ u in blocks of engineSumBlock, like Engine.Collision.
func randomSum(u []float64) float64 {
	var total float64
	for lo := 0; lo < len(u); lo += engineSumBlock {
		var s float64
		for _, v := range u[lo:min(lo+engineSumBlock, len(u))] {
			s += v
		}
		total += s
	}
	return total
}
