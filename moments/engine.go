package moments

import (
	"context"
	"fmt"
	"mixdepth/internal/crash"

	"golang.org/x/sync/errgroup"

	"mixdepth/circuits"
	"mixdepth/sim"
)

// EngineMaxQubits is the largest qubit count NewEngine accepts before its
// memory check; the touched mask is a 64-bit word.
const EngineMaxQubits = 62

// engineSumBlock is the block of coefficients summed on its own by
// Collision: a fixed size, so the rounding does not depend on the worker
// count.
const engineSumBlock = 1 << 14

// Engine holds the readout-weighted identity/swap coefficients u(σ),
// σ ∈ {I, S}^n, of the two-copy average after a fixed sequence of gates
// (see the package documentation). Bit q of the index σ is 1 when qubit q
// is in S. A qubit no gate has touched sits at bit 0 with weight 1, meaning
// |0⟩⟨0|^⊗2; its first gate replaces it by (I+S)/6. The zero Engine is not
// usable; call NewEngine.
type Engine struct {
	n       int
	workers int
	touched uint64
	u       []float64
}

// EngineBytes returns the bytes of an n-qubit Engine: 8·2^n.
func EngineBytes(n int) float64 {
	return 8 * float64(uint64(1)<<min(n, 62)) * float64(uint64(1)<<max(n-62, 0))
}

// NewEngine returns an engine for n qubits in the state |0…0⟩, after
// checking that the machine has the 8·2^n bytes it needs. With workers > 1
// and at least sim.ParallelQubits qubits, each gate is split across that
// many goroutines in contiguous blocks.
func NewEngine(n, workers int) (*Engine, error) {
	if n < 2 {
		return nil, fmt.Errorf("moments: %d qubits: a two-qubit gate needs at least 2", n)
	}
	need := EngineBytes(n)
	what := fmt.Sprintf("the %d-qubit identity/swap vector (2^%d coefficients)", n, n)
	if n > EngineMaxQubits {
		return nil, fmt.Errorf("moments: %s needs %s: %w; use at most %d qubits", what, sim.GiB(need), sim.ErrTooLarge, EngineMaxQubits)
	}
	if err := sim.CheckMemory(need, what); err != nil {
		return nil, fmt.Errorf("moments: %w", err)
	}
	e := &Engine{n: n, workers: max(workers, 1), u: make([]float64, 1<<n)}
	e.u[0] = 1
	return e, nil
}

// Qubits returns n.
func (e *Engine) Qubits() int { return e.n }

// Touched reports whether a gate has acted on qubit q since the last Reset.
func (e *Engine) Touched(q int) bool { return e.touched>>q&1 == 1 }

// Reset returns the engine to |0…0⟩ with no qubit touched.
func (e *Engine) Reset() {
	clear(e.u)
	e.u[0] = 1
	e.touched = 0
}

// Apply averages a gate on the pair (a, b) drawn from the ensemble with
// transfer t. It panics if a == b, either is out of range, or t is nil.
func (e *Engine) Apply(a, b int, t *Transfer) {
	n := e.n
	if a == b || a < 0 || b < 0 || a >= n || b >= n {
		panic(fmt.Sprintf("moments: Apply on qubits (%d, %d) of a %d-qubit engine", a, b, n))
	}
	if t == nil {
		panic("moments: Apply with a nil Transfer")
	}
	m := *t
	freshA, freshB := !e.Touched(a), !e.Touched(b)
	if freshA || freshB {
		m = t.withFresh(freshA, freshB)
	}
	e.touched |= 1<<a | 1<<b
	engineParallel(1<<(n-2), e.workers, n >= sim.ParallelQubits, func(lo, hi int) {
		engineApplyRange(e.u, a, b, &m, lo, hi)
	})
}

// Collision returns E[Z] = Σ_σ u(σ) for the gates applied so far.
func (e *Engine) Collision() float64 {
	nb := (len(e.u) + engineSumBlock - 1) / engineSumBlock
	partial := make([]float64, nb)
	engineParallel(nb, e.workers, e.n >= sim.ParallelQubits, func(lo, hi int) {
		for blk := lo; blk < hi; blk++ {
			var s float64
			for _, v := range e.u[blk*engineSumBlock : min((blk+1)*engineSumBlock, len(e.u))] {
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

// engineApplyRange applies m to the coefficient quadruples with group index
// k in [from, to): k enumerates the indices whose bits a and b are zero, in
// increasing order. Local state 2·σ_a + σ_b of group k sits at base index
// i, i|2^b, i|2^a, i|2^a|2^b.
func engineApplyRange(u []float64, a, b int, m *Transfer, from, to int) {
	lo, hi := min(a, b), max(a, b)
	la, lb := 1<<a, 1<<b
	loMask, hiMask := 1<<lo-1, 1<<hi-1
	m00, m01, m02, m03 := m[0][0], m[0][1], m[0][2], m[0][3]
	m10, m11, m12, m13 := m[1][0], m[1][1], m[1][2], m[1][3]
	m20, m21, m22, m23 := m[2][0], m[2][1], m[2][2], m[2][3]
	m30, m31, m32, m33 := m[3][0], m[3][1], m[3][2], m[3][3]
	insert := func(k int) int {
		i := (k>>lo)<<(lo+1) | k&loMask
		return (i>>hi)<<(hi+1) | i&hiMask
	}
	if lo < 2 {
		// Runs of consecutive indices are shorter than 4: index each group.
		for k := from; k < to; k++ {
			i := insert(k)
			i1, i2, i3 := i|lb, i|la, i|la|lb
			v0, v1, v2, v3 := u[i], u[i1], u[i2], u[i3]
			u[i] = m00*v0 + m01*v1 + m02*v2 + m03*v3
			u[i1] = m10*v0 + m11*v1 + m12*v2 + m13*v3
			u[i2] = m20*v0 + m21*v1 + m22*v2 + m23*v3
			u[i3] = m30*v0 + m31*v1 + m32*v2 + m33*v3
		}
		return
	}
	// Groups k with the same bits above lo have consecutive base indices:
	// stream each such run as four aligned slices.
	run := 1 << lo
	for k := from; k < to; {
		end := min(k&^(run-1)+run, to)
		i := insert(k)
		w := end - k
		x0 := u[i : i+w]
		x1 := u[i|lb : i|lb+w]
		x2 := u[i|la : i|la+w]
		x3 := u[i|la|lb : i|la|lb+w]
		x1, x2, x3 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)]
		for j := range x0 {
			v0, v1, v2, v3 := x0[j], x1[j], x2[j], x3[j]
			x0[j] = m00*v0 + m01*v1 + m02*v2 + m03*v3
			x1[j] = m10*v0 + m11*v1 + m12*v2 + m13*v3
			x2[j] = m20*v0 + m21*v1 + m22*v2 + m23*v3
			x3[j] = m30*v0 + m31*v1 + m32*v2 + m33*v3
		}
		k = end
	}
}

// engineParallel runs body over [0, n) in contiguous blocks, on up to
// workers goroutines when parallel is true.
func engineParallel(n, workers int, parallel bool, body func(lo, hi int)) {
	if workers <= 1 || !parallel || n < 2 {
		body(0, n)
		return
	}
	var g errgroup.Group
	var carry crash.Carrier
	chunk := (n + workers - 1) / workers
	for lo := 0; lo < n; lo += chunk {
		hi := min(lo+chunk, n)
		g.Go(func() error { defer carry.Catch(); body(lo, hi); return nil })
	}
	_ = g.Wait()
	carry.Rethrow()
}

// CollisionOption sets an optional parameter of CollisionCurve and
// CompleteCollisionCurve.
type CollisionOption func(*collisionConfig)

type collisionConfig struct {
	progress func(done, total int)
	final    bool
	edges    *EdgeTransfers // per-coupler transfers, or nil for t everywhere
	// noise, when not nil, makes the curve read out the noisy weighted sum
	// Σ_σ u(σ) Π_q w_q(σ_q) of XEBCurve instead of E[Z]; edges then hold
	// the noisy transfers.
	noise *xebNoise
}

// CollisionFinalLayer declares that the circuits end with a layer of Haar
// single-qubit gates on every qubit before measurement (the "…+haar1"
// gate sets). That twirl projects every qubit onto span{I, S}: a qubit no
// gate touched reads out as (I+S)/6, that is 2/3 (the collision probability
// of a Haar-random qubit, 2/(2+1)), instead of 1 for |0⟩⟨0|^⊗2, and in the
// random-edge average only the chain with no untouched remainder survives
// (the remainder Δ has zero trace against I and S, so the twirl removes it).
func CollisionFinalLayer() CollisionOption {
	return func(c *collisionConfig) { c.final = true }
}

// CollisionProgress makes the curve call f(done, total) as the work goes
// on, never concurrently, with done rising to total: steps (layers, or
// gates) for a layered schedule and the complete-graph reduction, subsets
// of the qubits (total 2^n) for the random-edge sum over subsets. The
// default is no report.
func CollisionProgress(f func(done, total int)) CollisionOption {
	return func(c *collisionConfig) { c.progress = f }
}

func collisionConfigure(opts []CollisionOption) collisionConfig {
	var c collisionConfig
	for _, o := range opts {
		o(&c)
	}
	return c
}

func (c *collisionConfig) report(done, total int) {
	if c.progress != nil {
		c.progress(done, total)
	}
}

// collisionCheckDepths returns an error unless depths are ≥ 0 and
// non-decreasing.
func collisionCheckDepths(depths []int) error {
	for i, d := range depths {
		if d < 0 {
			return fmt.Errorf("moments: depth %d is negative", d)
		}
		if i > 0 && d < depths[i-1] {
			return fmt.Errorf("moments: depths must be in ascending order, but %d follows %d", d, depths[i-1])
		}
	}
	return nil
}

// collisionCheckEdges returns an error unless every edge joins two distinct
// qubits of 0..n−1.
func collisionCheckEdges(n int, edges []circuits.Edge) error {
	for _, e := range edges {
		if e.A == e.B || e.A < 0 || e.B < 0 || e.A >= n || e.B >= n {
			return fmt.Errorf("moments: gate on (%d, %d) is not a pair of distinct qubits of 0..%d", e.A, e.B, n-1)
		}
	}
	return nil
}

// collisionComplete reports whether edges list every pair of distinct
// qubits of 0..n−1 exactly once, in either orientation.
func collisionComplete(n int, edges []circuits.Edge) bool {
	if len(edges) != n*(n-1)/2 {
		return false
	}
	seen := make(map[[2]int]bool, len(edges))
	for _, e := range edges {
		k := [2]int{min(e.A, e.B), max(e.A, e.B)}
		if seen[k] {
			return false
		}
		seen[k] = true
	}
	return true
}

// CollisionCurve returns the exact E[Z] after each of depths (ascending)
// steps of the schedule s on the graph g, every gate drawn from the ensemble
// with transfer t. A layered schedule (*circuits.Layered, including layout
// files) runs on an Engine. A random-edge schedule (*circuits.RandomEdge) is
// averaged exactly over the edge of every gate: by the complete-graph
// reduction when its edges are all pairs of qubits and t is symmetric (see
// CompleteCollisionCurve), and otherwise by a sum of identity/swap chains
// over the subsets of the qubits (see the package documentation), for at
// most CollisionRandomEdgeMaxQubits qubits (more give an error wrapping
// ErrTooLarge). workers bounds the goroutines.
// Cancelling ctx stops the work between steps. Depth 0 gives E[Z] = 1. It
// panics if g, s or t is nil.
func CollisionCurve(ctx context.Context, g *circuits.Graph, s circuits.Schedule, t *Transfer, depths []int, workers int, opts ...CollisionOption) ([]float64, error) {
	if g == nil || t == nil {
		panic("moments: CollisionCurve with a nil graph or transfer")
	}
	if err := collisionCheckDepths(depths); err != nil {
		return nil, err
	}
	if len(depths) == 0 {
		return []float64{}, nil
	}
	n := g.Qubits
	steps := depths[len(depths)-1]
	cfg := collisionConfigure(opts)
	switch s := s.(type) {
	case *circuits.Layered:
		if len(s.Classes) == 0 {
			return nil, fmt.Errorf("moments: the layered schedule has no layers")
		}
		for _, cl := range s.Classes {
			if err := collisionCheckEdges(n, cl); err != nil {
				return nil, err
			}
		}
		e, err := NewEngine(n, workers)
		if err != nil {
			return nil, err
		}
		var layer []circuits.Edge
		collision := e.Collision
		switch {
		case cfg.noise != nil:
			collision = func() float64 { return e.weightedCollision(cfg.noise.read) }
		case cfg.final:
			collision = func() float64 {
				z := e.Collision()
				for q := 0; q < n; q++ {
					if !e.Touched(q) {
						z *= 2.0 / 3
					}
				}
				return z
			}
		}
		return collisionRun(ctx, depths, steps, &cfg, collision, func(d int) {
			layer = s.Step(d, nil, layer[:0])
			for _, edge := range layer {
				if cfg.edges != nil {
					e.Apply(edge.A, edge.B, cfg.edges.For(edge.A, edge.B))
					continue
				}
				e.Apply(edge.A, edge.B, t)
			}
		})
	case *circuits.RandomEdge:
		if len(s.Edges) == 0 {
			return nil, fmt.Errorf("moments: the random-edge schedule has no edges")
		}
		if err := collisionCheckEdges(n, s.Edges); err != nil {
			return nil, err
		}
		if collisionComplete(n, s.Edges) {
			if tc, ok := cfg.sameTransfer(t, s.Edges); ok && tc.symmetric(completeSymmetryTol) {
				return completeCurve(ctx, n, tc, depths, &cfg)
			}
			if n > CollisionRandomEdgeMaxQubits {
				return nil, fmt.Errorf("moments: the complete-graph reduction on %d qubits needs the same transfer, symmetric, on every coupler (uniform noise); per-coupler gates or noise on a complete graph run on the random-edge engine, which handles at most %d qubits: %w", n, CollisionRandomEdgeMaxQubits, ErrTooLarge)
			}
		}
		return randomEdgeCurve(ctx, n, s.Edges, t, depths, workers, &cfg)
	case nil:
		panic("moments: CollisionCurve with a nil schedule")
	default:
		return nil, fmt.Errorf("moments: no exact second-moment method for schedule kind %q (%T)", s.Kind(), s)
	}
}

// sameTransfer returns the transfer every edge takes, and whether they all
// take the same one (always, without per-coupler transfers).
func (c *collisionConfig) sameTransfer(t *Transfer, edges []circuits.Edge) (*Transfer, bool) {
	if c.edges == nil {
		return t, true
	}
	first := c.edges.For(edges[0].A, edges[0].B)
	for _, e := range edges {
		if *c.edges.For(e.A, e.B) != *first || *c.edges.For(e.B, e.A) != *first {
			return nil, false
		}
	}
	return first, true
}

// collisionRun applies steps 0..steps−1 with step and records collision()
// at each of depths.
func collisionRun(ctx context.Context, depths []int, steps int, cfg *collisionConfig, collision func() float64, step func(d int)) ([]float64, error) {
	out := make([]float64, 0, len(depths))
	for d := 0; ; d++ {
		for len(out) < len(depths) && depths[len(out)] == d {
			out = append(out, collision())
		}
		if d == steps {
			return out, nil
		}
		if err := ctx.Err(); err != nil {
			return nil, fmt.Errorf("moments: second moments stopped at step %d of %d: %w", d, steps, err)
		}
		step(d)
		cfg.report(d+1, steps)
	}
}

// engineAccumulateRange adds m applied to the quadruples of u with group
// index k in [from, to) into next (see engineApplyRange).
func engineAccumulateRange(u, next []float64, a, b int, m *Transfer, from, to int) {
	lo, hi := min(a, b), max(a, b)
	la, lb := 1<<a, 1<<b
	loMask, hiMask := 1<<lo-1, 1<<hi-1
	m00, m01, m02, m03 := m[0][0], m[0][1], m[0][2], m[0][3]
	m10, m11, m12, m13 := m[1][0], m[1][1], m[1][2], m[1][3]
	m20, m21, m22, m23 := m[2][0], m[2][1], m[2][2], m[2][3]
	m30, m31, m32, m33 := m[3][0], m[3][1], m[3][2], m[3][3]
	insert := func(k int) int {
		i := (k>>lo)<<(lo+1) | k&loMask
		return (i>>hi)<<(hi+1) | i&hiMask
	}
	if lo < 2 {
		for k := from; k < to; k++ {
			i := insert(k)
			i1, i2, i3 := i|lb, i|la, i|la|lb
			v0, v1, v2, v3 := u[i], u[i1], u[i2], u[i3]
			next[i] += m00*v0 + m01*v1 + m02*v2 + m03*v3
			next[i1] += m10*v0 + m11*v1 + m12*v2 + m13*v3
			next[i2] += m20*v0 + m21*v1 + m22*v2 + m23*v3
			next[i3] += m30*v0 + m31*v1 + m32*v2 + m33*v3
		}
		return
	}
	run := 1 << lo
	for k := from; k < to; {
		end := min(k&^(run-1)+run, to)
		i := insert(k)
		w := end - k
		x0, y0 := u[i:i+w], next[i:i+w]
		x1, y1 := u[i|lb:i|lb+w], next[i|lb:i|lb+w]
		x2, y2 := u[i|la:i|la+w], next[i|la:i|la+w]
		x3, y3 := u[i|la|lb:i|la|lb+w], next[i|la|lb:i|la|lb+w]
		x1, x2, x3 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)]
		y0, y1, y2, y3 = y0[:len(x0)], y1[:len(x0)], y2[:len(x0)], y3[:len(x0)]
		for j := range x0 {
			v0, v1, v2, v3 := x0[j], x1[j], x2[j], x3[j]
			y0[j] += m00*v0 + m01*v1 + m02*v2 + m03*v3
			y1[j] += m10*v0 + m11*v1 + m12*v2 + m13*v3
			y2[j] += m20*v0 + m21*v1 + m22*v2 + m23*v3
			y3[j] += m30*v0 + m31*v1 + m32*v2 + m33*v3
		}
		k = end
	}
}
