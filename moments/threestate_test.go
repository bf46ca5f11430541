package moments

import (
	"fmt"
	"math"

	"mixdepth/circuits"
	"mixdepth/sim"
)

// threeStateBytes returns the bytes of the three-state engine on n qubits:
// two buffers of 3^n float64 values.
func threeStateBytes(n int) float64 { return 16 * math.Pow(3, float64(n)) }

// threeStateEngine is the reference method for the random-edge average,
// independent of the subset decomposition used by CollisionCurve: each step
// applies M = (1/|E|) Σ_e M_e to the readout-weighted coefficients u(σ),
// σ ∈ {I, S, F}^n, stored at index Σ_q σ_q 3^q. The untouched set of a
// random-edge circuit is random and correlated with the state of the
// touched qubits, so F is kept as a local state of its own: a gate maps F
// to (I+S)/6 on its qubits, then applies the transfer, and never produces F.
type threeStateEngine struct {
	n       int
	workers int
	pow3    []int // pow3[q] = 3^q, q = 0..n
	edges   []circuits.Edge
	l       [4][9]float64 // Transfer.threeState(1/|E|)
	u, next []float64
}

// newThreeState checks the memory and returns the three-state engine for
// the random-edge schedule on edges of an n-qubit graph, at depth 0.
func newThreeState(n int, edges []circuits.Edge, t *Transfer, workers int) (*threeStateEngine, error) {
	need := threeStateBytes(n)
	what := fmt.Sprintf("the exact random-edge average on %d qubits (two buffers of 3^%d coefficients)", n, n)
	if n > 39 {
		return nil, fmt.Errorf("moments: %s needs %s: %w", what, sim.GiB(need), sim.ErrTooLarge)
	}
	if err := sim.CheckMemory(need, what); err != nil {
		return nil, fmt.Errorf("moments: %w", err)
	}
	pow3 := make([]int, n+1)
	pow3[0] = 1
	for q := 1; q <= n; q++ {
		pow3[q] = 3 * pow3[q-1]
	}
	r := &threeStateEngine{
		n:       n,
		workers: max(workers, 1),
		pow3:    pow3,
		edges:   edges,
		l:       t.threeState(1 / float64(len(edges))),
		u:       make([]float64, pow3[n]),
		next:    make([]float64, pow3[n]),
	}
	r.u[pow3[n]-1] = 1 // every digit F
	return r, nil
}

// step applies one random-edge gate, averaged over the edge.
func (r *threeStateEngine) step() {
	clear(r.next)
	groups := r.pow3[r.n-2]
	for _, e := range r.edges {
		engineParallel(groups, r.workers, len(r.u) >= 1<<16, func(lo, hi int) {
			r.accumulate(e.A, e.B, lo, hi)
		})
	}
	r.u, r.next = r.next, r.u
}

// collision returns E[Z] = Σ_σ u(σ).
func (r *threeStateEngine) collision() float64 {
	nb := (len(r.u) + engineSumBlock - 1) / engineSumBlock
	partial := make([]float64, nb)
	engineParallel(nb, r.workers, len(r.u) >= 1<<16, func(lo, hi int) {
		for blk := lo; blk < hi; blk++ {
			var s float64
			for _, v := range r.u[blk*engineSumBlock : min((blk+1)*engineSumBlock, len(r.u))] {
				s += v
			}
			partial[blk] = s
		}
	})
	var sum float64
	for _, s := range partial {
		sum += s
	}
	return sum
}

// accumulate adds M_e u / |E| for the edge (a, b) into next, over the groups
// k in [from, to): k enumerates the indices whose digits a and b are zero,
// in increasing order. With lo < hi the qubits of the edge, k splits as
// low + 3^lo·(mid + 3^(hi−lo−1)·high) and the group's base index is
// low + 3^(lo+1)·mid + 3^(hi+1)·high; runs of consecutive low share mid and
// high and have consecutive base indices.
func (r *threeStateEngine) accumulate(a, b, from, to int) {
	lo, hi := min(a, b), max(a, b)
	pa, pb := r.pow3[a], r.pow3[b]
	run := r.pow3[lo]
	midLen := r.pow3[hi-lo-1]
	midStep, highStep := r.pow3[lo+1], r.pow3[hi+1]
	var in [9]int // offset of input column 3x + y
	for x := range 3 {
		for y := range 3 {
			in[3*x+y] = x*pa + y*pb
		}
	}
	o1, o2, o3 := pb, pa, pa+pb // outputs IS, SI, SS; II at offset 0
	l := r.l                    // a local copy: no aliasing with next
	u, next := r.u, r.next

	low := from % run
	rest := from / run
	mid, high := rest%midLen, rest/midLen
	for k := from; k < to; {
		w := min(run-low, to-k)
		base := low + midStep*mid + highStep*high
		for i := base; i < base+w; i++ {
			v0, v1, v2 := u[i+in[0]], u[i+in[1]], u[i+in[2]]
			v3, v4, v5 := u[i+in[3]], u[i+in[4]], u[i+in[5]]
			v6, v7, v8 := u[i+in[6]], u[i+in[7]], u[i+in[8]]
			next[i] += l[0][0]*v0 + l[0][1]*v1 + l[0][2]*v2 + l[0][3]*v3 + l[0][4]*v4 + l[0][5]*v5 + l[0][6]*v6 + l[0][7]*v7 + l[0][8]*v8
			next[i+o1] += l[1][0]*v0 + l[1][1]*v1 + l[1][2]*v2 + l[1][3]*v3 + l[1][4]*v4 + l[1][5]*v5 + l[1][6]*v6 + l[1][7]*v7 + l[1][8]*v8
			next[i+o2] += l[2][0]*v0 + l[2][1]*v1 + l[2][2]*v2 + l[2][3]*v3 + l[2][4]*v4 + l[2][5]*v5 + l[2][6]*v6 + l[2][7]*v7 + l[2][8]*v8
			next[i+o3] += l[3][0]*v0 + l[3][1]*v1 + l[3][2]*v2 + l[3][3]*v3 + l[3][4]*v4 + l[3][5]*v5 + l[3][6]*v6 + l[3][7]*v7 + l[3][8]*v8
		}
		k += w
		low = 0
		if mid++; mid == midLen {
			mid = 0
			high++
		}
	}
}
