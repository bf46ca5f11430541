package moments

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/bits"
	"strconv"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"

	"mixdepth/circuits"
	"mixdepth/sim"
)

// FrameMaxQubits is the largest qubit count FramePotential2 accepts: its
// transfer matrix over the supports has 4^n entries (128 MiB at n = 12).
const FrameMaxQubits = 12

// ErrFrameTooLarge is wrapped by FramePotential2, with ErrTooLarge, for
// graphs of more than FrameMaxQubits qubits.
var ErrFrameTooLarge = errors.New("the exact frame potential is limited to " + strconv.Itoa(FrameMaxQubits) + " qubits")

// In the symmetrised coordinates x(A) = 3^(−|A|/2) w(A) of the support chain
// (the coefficients on the orthonormal vectors 3^(−|A|/2) Σ_{supp P = A} P⊗P/D)
// the Haar twirl on (a, b) is the orthogonal projector onto the pattern 00 and
// the unit vector u = (1, 1, √3)/√5 on the patterns (01, 10, 11).
var (
	frameU1 = 1 / math.Sqrt(5)     // u on 01 and on 10
	frameU2 = math.Sqrt(3.0 / 5.0) // u on 11
)

// FramePotential2 returns the exact second frame potential
// F^(2) = E|Tr(U†V)|⁴, U and V independent circuits of Haar U(4) gates, after
// each of depths (ascending) steps of s on g. It needs g.Qubits ≤
// FrameMaxQubits; above that the error wraps ErrFrameTooLarge. Depth 0 gives
// 16^n = D⁴; the Haar value is 2! = 2 (Gross, Audenaert, Eisert, "Evenly
// distributed unitaries: on the structure of unitary designs", J. Math. Phys.
// 48, 052104, 2007). Cancelling ctx stops the work. It panics if g or s is
// nil.
//
// F^(2) is the squared Frobenius norm of the averaged two-copy channel
// E[U^⊗2 ⊗ Ū^⊗2]. A layered schedule (*circuits.Layered) evolves the 2^n×2^n
// transfer matrix T of the support chain, one column per starting support,
// gate by gate (Pauli-support chain; Harrow & Low 2009):
//
//	F^(2) = 16^|U| · Σ_{A,B ⊆ V∖U} 3^(|A|−|B|) T(A→B)² = 8^|U| · Σ_{A,B ⊆ V} 3^(|A|−|B|) T(A→B)²,
//
// U the qubits no gate has touched yet: the channel is the identity on each
// one's 16-dimensional two-copy operator space, which contributes 16 to the
// squared norm where the chain's two supports count 2.
//
// For the random-edge schedule (*circuits.RandomEdge) the untouched set is
// random, so the formula above (the X = ∅ term below) is never exact at
// finite depth. Instead: the averaged channel M = mean_e M_e is symmetric,
// so F^(2)(t) = Tr M^(2t), and M splits into blocks. A qubit whose two-copy
// Pauli is off-diagonal (P⊗Q, P ≠ Q: 12 states) or a traceless combination
// of the diagonal letters (2 states) is frozen, killed by every gate on it
// and kept by the others, so
//
//	F^(2)(t) = Σ_{X ⊆ V} 14^|X| Tr K_{V∖X}^(2t),  K_W = |E|⁻¹ Σ_{e ⊆ W} P_e,
//
// P_e the symmetrised chain projector on the supports of W. K_W is a sum of
// commuting terms, one per connected part of the graph induced on W, so its
// eigenvalues are sums of the parts' eigenvalues; each part's spectrum is
// computed once with gonum's dense symmetric eigensolver. This costs a
// 2^m-dimensional eigenproblem for every connected induced subgraph of m
// qubits: about a second at n = 10 (grid:2x5), 1.5 to 5 minutes at n = 12
// (line:12, grid:3x4) on one core.
func FramePotential2(ctx context.Context, g *circuits.Graph, s circuits.Schedule, depths []int) ([]float64, error) {
	if g == nil || s == nil {
		panic("moments: FramePotential2 with a nil graph or schedule")
	}
	n := g.Qubits
	if n > FrameMaxQubits {
		return nil, fmt.Errorf("moments: frame potential of %s (%d qubits): %w (%w)", g.Name, n, ErrFrameTooLarge, ErrTooLarge)
	}
	if err := collisionCheckDepths(depths); err != nil {
		return nil, err
	}
	what := fmt.Sprintf("the %d-qubit frame-potential transfer matrix", n)
	switch s := s.(type) {
	case *circuits.Layered:
		if err := pauliCheckLayered(n, s); err != nil {
			return nil, err
		}
		if err := sim.CheckMemory(8*math.Ldexp(1, 2*n), what); err != nil {
			return nil, err
		}
		return frameLayered(ctx, n, s, depths)
	case *circuits.RandomEdge:
		if err := pauliCheckEdges(n, s.Edges); err != nil {
			return nil, err
		}
		// The largest eigenproblem: its matrix, gonum's copy and workspace.
		if err := sim.CheckMemory(3*8*math.Ldexp(1, 2*n), what); err != nil {
			return nil, err
		}
		return frameRandomEdge(ctx, n, s.Edges, depths)
	default:
		return nil, fmt.Errorf("moments: the frame potential has no method for schedule kind %q (%T)", s.Kind(), s)
	}
}

// frameLayered evolves the symmetrised transfer matrix, stored as one 4^n
// vector whose low n bits index the output support and high n bits the
// starting one, so a gate acts on bits (a, b) of the whole vector.
func frameLayered(ctx context.Context, n int, l *circuits.Layered, depths []int) ([]float64, error) {
	dim := 1 << n
	t := make([]float64, dim*dim)
	for a := range dim {
		t[a*dim+a] = 1
	}
	steps := pauliMaxDepth(depths)
	out := make([]float64, 0, len(depths))
	touched := 0
	var layer []circuits.Edge
	for d := 0; ; d++ {
		for len(out) < len(depths) && depths[len(out)] == d {
			sum := frameSquares(t)
			untouched := n - bits.OnesCount(uint(touched))
			out = append(out, sum*math.Pow(8, float64(untouched)))
		}
		if d == steps {
			return out, nil
		}
		layer = l.Step(d, nil, layer[:0])
		for _, e := range layer {
			if err := ctx.Err(); err != nil {
				return nil, fmt.Errorf("moments: frame potential stopped at layer %d of %d: %w", d, steps, err)
			}
			frameProject(t, e.A, e.B)
			touched |= 1<<e.A | 1<<e.B
		}
	}
}

// frameSquares returns Σ x², summed in blocks with Neumaier's compensated
// sum across blocks (Neumaier, ZAMM 54, 39, 1974; from memory): a plain running sum of
// 4^12 terms would lose about 1e-9 of F.
func frameSquares(x []float64) float64 {
	const block = 1 << 10
	var sum, comp float64
	for lo := 0; lo < len(x); lo += block {
		b := x[lo:min(lo+block, len(x))]
		v := floats.Dot(b, b)
		t := sum + v
		if math.Abs(sum) >= math.Abs(v) {
			comp += (sum - t) + v
		} else {
			comp += (v - t) + sum
		}
		sum = t
	}
	return sum + comp
}

// frameProject applies the symmetrised Haar twirl on (a, b) to x in place.
func frameProject(x []float64, a, b int) {
	ma, mb := 1<<a, 1<<b
	lo, hi := min(ma, mb), max(ma, mb)
	for base := 0; base < len(x); base += 2 * hi {
		for mid := base; mid < base+hi; mid += 2 * lo {
			for i := mid; i < mid+lo; i++ {
				d := (x[i|ma]+x[i|mb])*frameU1 + x[i|ma|mb]*frameU2
				x[i|ma] = d * frameU1
				x[i|mb] = d * frameU1
				x[i|ma|mb] = d * frameU2
			}
		}
	}
}

// frameRandomEdge evaluates Σ_X 14^|X| Tr K_{V∖X}^(2t) from the spectra of
// the connected induced subgraphs.
func frameRandomEdge(ctx context.Context, n int, edges []circuits.Edge, depths []int) ([]float64, error) {
	out := make([]float64, len(depths))
	for i := range out {
		out[i] = math.Pow(16, float64(n)) // depth 0: the identity channel, D⁴
	}
	if pauliMaxDepth(depths) == 0 {
		return out, nil
	}
	clear(out[frameZeros(depths):]) // depths ≥ 1 accumulate below
	inv := 1 / float64(len(edges))
	spectra := map[int][]float64{} // connected qubit set → eigenvalues of its K
	fourteen := pauliPowers(n, 14)
	var sums, next []float64
	full := 1<<n - 1
	for w := 0; w <= full; w++ {
		if err := ctx.Err(); err != nil {
			return nil, fmt.Errorf("moments: frame potential stopped at qubit set %d of %d: %w", w, full+1, err)
		}
		parts := frameComponents(w, edges)
		idle := bits.OnesCount(uint(w))
		sums = append(sums[:0], 0)
		for _, c := range parts {
			idle -= bits.OnesCount(uint(c))
			spec, ok := spectra[c]
			if !ok {
				var err error
				if spec, err = frameSpectrum(c, edges, inv); err != nil {
					return nil, err
				}
				spectra[c] = spec
			}
			next = next[:0]
			for _, s := range sums {
				for _, l := range spec {
					next = append(next, s+l)
				}
			}
			sums, next = next, sums
		}
		// An idle qubit of W (on no edge inside W) keeps both of its supports.
		weight := fourteen[n-bits.OnesCount(uint(w))] * math.Ldexp(1, idle)
		for i, d := range depths {
			if d == 0 {
				continue
			}
			var tr float64
			for _, l := range sums {
				tr += math.Pow(l, float64(2*d))
			}
			out[i] += weight * tr
		}
	}
	return out, nil
}

// frameZeros returns the number of leading zero depths.
func frameZeros(depths []int) int {
	k := 0
	for k < len(depths) && depths[k] == 0 {
		k++
	}
	return k
}

// frameComponents returns the qubit sets of the connected parts with at
// least one edge of the graph induced by edges on the qubit set w.
func frameComponents(w int, edges []circuits.Edge) []int {
	var parts []int
	left := w
	for left != 0 {
		part := left & -left
		for grown := true; grown; {
			grown = false
			for _, e := range edges {
				ea, eb := 1<<e.A, 1<<e.B
				if w&ea == 0 || w&eb == 0 {
					continue
				}
				if (part&ea != 0) != (part&eb != 0) {
					part |= ea | eb
					grown = true
				}
			}
		}
		left &^= part
		if bits.OnesCount(uint(part)) > 1 {
			parts = append(parts, part)
		}
	}
	return parts
}

// frameSpectrum returns the eigenvalues of K_C = inv·Σ_{e ⊆ C} P_e on the
// supports of the connected qubit set c, ascending, clamped to [0, 1]: K_C
// is an average of orthogonal projectors, so rounding is all that leaves it.
func frameSpectrum(c int, edges []circuits.Edge, inv float64) ([]float64, error) {
	var local [64]int
	m := 0
	for q := 0; c>>q != 0; q++ {
		if c>>q&1 == 1 {
			local[q] = m
			m++
		}
	}
	dim := 1 << m
	k := mat.NewSymDense(dim, nil)
	u := [3]float64{frameU1, frameU1, frameU2}
	inside := 0
	for _, e := range edges {
		if c>>e.A&1 == 0 || c>>e.B&1 == 0 {
			continue
		}
		inside++
		ma, mb := 1<<local[e.A], 1<<local[e.B]
		for i := range dim {
			if i&(ma|mb) != 0 {
				continue
			}
			k.SetSym(i, i, k.At(i, i)+inv)
			idx := [3]int{i | ma, i | mb, i | ma | mb}
			for p := range 3 {
				for q := p; q < 3; q++ {
					k.SetSym(idx[p], idx[q], k.At(idx[p], idx[q])+inv*u[p]*u[q])
				}
			}
		}
	}
	top := float64(inside) * inv
	var es mat.EigenSym
	if !es.Factorize(k, false) {
		return nil, fmt.Errorf("moments: the eigensolver did not converge on the %d-qubit support chain", m)
	}
	vals := es.Values(nil) // ascending
	for i, v := range vals {
		vals[i] = min(max(v, 0), 1)
	}
	// The top eigenvalue is known exactly, with multiplicity 2: the empty
	// support and π^(1/2) on the non-empty ones (the chain on a connected
	// part is irreducible), both |E(C)|/|E|. Setting it exactly keeps
	// rounding from compounding in λ^(2t) at large t.
	vals[dim-1], vals[dim-2] = top, top
	return vals, nil
}
