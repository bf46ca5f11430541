package moments

import (
	"context"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"

	"mixdepth/circuits"
	"mixdepth/stats"
)

// DefaultExtrapolateQubits is the largest member the extrapolate engine
// computes with the vector engine unless ExactExtrapolateQubits sets
// another: a depth-30 curve of line:24 takes about 10 s on two cores and
// 128 MiB, so a grid fit, which takes up to four members of 24 qubits,
// answers in about a minute.
const DefaultExtrapolateQubits = 24

// ExtrapolateFamilies lists the graph families the extrapolate engine
// accepts: those whose members form a sequence of sizes with the same
// local structure (a line, a ring, and the R×C lattices).
var ExtrapolateFamilies = []string{"line", "grid", "honeycomb", "triangular", "diagonal"}

// extrapolateFitMembers is the number of members of each fit: the largest
// sizes below the target, which carry the least finite-size curvature. One
// more, the next smaller size, enters the previous-window fit of the
// uncertainty.
const extrapolateFitMembers = 3

// ExactExtrapolateQubits sets the largest member, in qubits, that the
// extrapolate engine computes, 4 ≤ n ≤ AutoVectorMaxQubits; the default is
// DefaultExtrapolateQubits. Exact panics for other values.
func ExactExtrapolateQubits(n int) ExactOption {
	return func(c *exactConfig) { c.extrapQubits = n }
}

// extrapMember is one smaller member of the target's family.
type extrapMember struct {
	g        *circuits.Graph
	features []float64
}

// extrapolatePlan returns the members of g's family that the fit uses
// (extrapolateFitMembers+1 of them, ascending), the fit's features at g,
// and an error wrapping ErrEngine when g is not a family member the engine
// extrapolates from. The model is
//
//	ln R(n, d) ≈ n·μ(d) + β(d)      line:N (n = N)
//	ln R(d) ≈ L·μ_W(d) + β_W(d)     R×C lattices, W = min(R, C) kept fixed,
//	                                L = the other side, members L ≥ W
//
// ln R is a sum of local contributions once the domain walls are dilute and
// their correlation length is below the sizes (common practice in
// finite-size scaling: an extensive free energy plus end terms): along a
// line or a strip of fixed width each unit of length adds μ and the two
// ends add β. A line's members keep its parity, because the brickwork of an
// even and of an odd line end differently (the last coupler falls in the
// other class). We measured and rejected three other forms:
//
//   - the two-dimensional a·R·C + b·R + c·C + e (bulk, edges, corners): on
//     the grids of at most 18 or 24 qubits its leave-one-out spread stayed
//     below its true error (off by 20–150% of R − 1) on grid:4x5, 5x5 and
//     4x4 beyond depth 6, because the walls that survive deep circuits cut
//     across a whole side and their weight falls exponentially with its
//     length, not as a sum of local terms;
//   - strips shorter than their width, for the same reason (the walls across
//     the short side dominate);
//   - rings and tori, where walls come in pairs, so R − 1 grows faster than
//     the size (ring:21 from ring:13..17 missed by twice its spread).
//
// So a lattice runs as a strip with its narrow side up to about
// DefaultExtrapolateQubits/4 wide: grid:5x6 has no member of 24 qubits.
// Nor does a lattice form that combines the members of every shape answer
// it honestly. TestExtrapolateGridWallModels fits, per depth, ln R of all
// grid:RxC of 6..24 qubits (both orientations) by least squares with the
// wall physics of the domain-wall picture (Dalzell, Hunter-Jones, Brandão,
// PRX Quantum 3, 010333, 2022; Hunter-Jones, arXiv:1905.12053, 2019), its
// uncertainty the leave-one-member-out spread as here, against the vector
// engine's exact curves (testdata/extrap-*.json) at the depths where
// R − 1 ≥ 1e-6. No form covers grid:5x6 (largest |error| over R − 1 and
// depths left uncovered, of 28):
//
//	straight cuts (C−1)·v(R) + (R−1)·h(C) + e, v, h free   15.7   22
//	the same with end terms u(R) + w(C)                    3.8    11
//	walls a·(C−1)·e^(−κR) + b·(R−1)·e^(−κC) + e            2.3    25
//	walls plus area and edges m·RC + p·R + q·C             11.9   24
//	separable u(R) + w(C), members with both sides ≥ 4     0.38   28
//
// nor the smaller held-out grid:4x5, 5x5 (from ≤ 16 or ≤ 20 qubits) and
// 4x6 (from ≤ 20): every form misses one of them by its own spread, by up
// to 20 times R − 1, or cannot estimate it. The exact curves say why. From
// depth 18 on, R − 1 of a 4×C lattice falls as C grows (at depth 24 it is
// 3.5e-5, 2.8e-5 and 2.6e-5 for C = 4, 5, 6), and the late decay per layer
// (depths 20 to 28) is 0.67, 0.61, 0.55 on grid:2x12, 3x8, 4x6 but 0.54 on
// grid:5x5, where a straight cut 5 long would decay by about 0.50 on that
// trend: once both sides reach 4, the late weight sits in walls that cut
// off corners, not in straight cuts, and the members with a side of 2 or
// 3, where straight cuts do dominate, carry no information about it. With
// both sides ≥ 4, 24 qubits leave grid:4x4, 4x5, 5x4, 4x6 and 6x4: the
// separable form then predicts grid:5x6 from three of them within −38% to
// +21% of R − 1, but with nothing left over to measure its error, so the
// engine refuses rather than state an uncertainty it cannot check. Two
// forms that respect the parity of the sides (the layered classes of a
// grid make the edge and corner terms depend on whether R and C are even)
// were measured too, on the same stored curves: ln R = a·RC + b·R + c·C + e
// fitted on the members of 5x6's class, 3x4, 3x6, 3x8, 5x2 and 5x4, is off
// by +5% to +77% of R − 1 at depths 2..20 and by −15% to −390% at 21..30,
// and ln R linear in the length of width-5 strips (5x2, 5x4) predicts the
// same: the members of width 2 and 3 are too narrow for the walls of a
// lattice with both sides ≥ 5.
func extrapolatePlan(g *circuits.Graph, maxQubits int) (members []extrapMember, target []float64, err error) {
	fam := g.Family
	refuse := func(why string) error {
		return fmt.Errorf("moments: the extrapolate engine %s: %w; use --engine mps (or vector)", why, ErrEngine)
	}
	if !slices.Contains(ExtrapolateFamilies, fam) || g.Dropped != nil {
		return nil, nil, refuse(fmt.Sprintf("needs a graph of the families %s, whose smaller members it fits; %s is not one", strings.Join(ExtrapolateFamilies, ", "), g.Name))
	}
	add := func(spec string, length int) {
		m, err := circuits.ParseGraph(spec)
		if err != nil || m.Qubits > maxQubits || m.Qubits >= g.Qubits {
			return // a shape the family does not have, or too large
		}
		members = append(members, extrapMember{g: m, features: []float64{float64(length), 1}})
	}
	switch fam {
	case "line", "ring":
		n := g.Qubits
		if g.Name != fam+":"+strconv.Itoa(n) {
			return nil, nil, refuse(fmt.Sprintf("cannot rebuild %s as a member of the %s family", g.Name, fam))
		}
		start := min(n-2, maxQubits)
		if (n-start)%2 != 0 {
			start--
		}
		for m := start; m >= 4 && len(members) <= extrapolateFitMembers; m -= 2 {
			add(fam+":"+strconv.Itoa(m), m)
		}
		target = []float64{float64(n), 1}
	default:
		R, C := g.Rows, g.Cols
		if g.Name != fmt.Sprintf("%s:%dx%d", fam, R, C) {
			return nil, nil, refuse(fmt.Sprintf("cannot rebuild %s as a member of the %s family", g.Name, fam))
		}
		grow, width := C, R
		if R > C {
			grow, width = R, C
		}
		for m := min(grow-1, maxQubits); m >= max(width, 2) && len(members) <= extrapolateFitMembers; m-- {
			if grow == C {
				add(fmt.Sprintf("%s:%dx%d", fam, R, m), m)
			} else {
				add(fmt.Sprintf("%s:%dx%d", fam, m, C), m)
			}
		}
		target = []float64{float64(grow), 1}
	}
	// Ascending size, so that the cost is visible in the progress.
	slices.SortStableFunc(members, func(a, b extrapMember) int { return a.g.Qubits - b.g.Qubits })
	if len(members) < extrapolateFitMembers+1 {
		return nil, nil, fmt.Errorf("moments: the extrapolate engine needs %d smaller members of %s of at most %d qubits (for a lattice, strips at least as long as the narrow side %d); it found %d: %w; use --engine mps, or the vector engine for a graph this small",
			extrapolateFitMembers+1, g.Name, maxQubits, min(g.Rows, g.Cols), len(members), ErrEngine)
	}
	return members, target, nil
}

// exactExtrapolate fills the curve of r by fitting the exact ln E[Z]/Z_H
// of the largest extrapolateFitMembers members of g's family (see
// extrapolatePlan) at each depth by linear least squares and evaluating the
// fit at g. TruncationError holds the uncertainty, carried to R as
// R·(e^δ − 1), where δ is the largest change of the predicted ln R
//
//   - when one member is left out of the fit (leave-one-size-out), and
//   - when the fit moves one size down (the previous window: each member
//     replaced by the next smaller one), the trend of the successive
//     estimates, which catches the curvature that leaving one out misses:
//     on line:22 from line:14..18 the leave-one-out spread alone was 20%
//     below the true error at every depth, a bias of the sign of the
//     2^(−n) term of Z_H = 2/(2^n+1), which is not linear in n.
func exactExtrapolate(ctx context.Context, r *Result, g *circuits.Graph, s circuits.Schedule, t *Transfer, depths []int, cfg *exactConfig, final bool) error {
	layered, ok := s.(*circuits.Layered)
	if !ok {
		return fmt.Errorf("moments: the extrapolate engine runs the family's layered schedule, not %s (its members have no common random-edge schedule to compare): %w; use --engine vector", s.Kind(), ErrEngine)
	}
	if !slices.EqualFunc(layered.Classes, circuits.LayeredClasses(g), slices.Equal) {
		return fmt.Errorf("moments: the extrapolate engine runs the family's own layered schedule; a layout file has no smaller members to fit: %w; use --engine mps", ErrEngine)
	}
	maxQ := cfg.extrapQubits
	if maxQ == 0 {
		maxQ = DefaultExtrapolateQubits
	}
	members, target, err := extrapolatePlan(g, maxQ)
	if err != nil {
		return err
	}
	var copts []CollisionOption
	if final {
		copts = append(copts, CollisionFinalLayer())
	}
	// lnR[k][i] is ln R of member k at depth i.
	lnR := make([][]float64, len(members))
	var total int
	for _, m := range members {
		total += m.g.Qubits
	}
	done := 0
	for k, m := range members {
		opts := copts
		if cfg.progress != nil {
			// Progress in qubit-weighted members: coarse but monotone.
			base, w := done, m.g.Qubits
			opts = append(slices.Clip(opts), CollisionProgress(func(d, tot int) {
				cfg.progress(base*tot+d*w, total*tot)
			}))
		}
		ms, err := circuits.NewSchedule(circuits.KindLayered, m.g)
		if err != nil {
			return err
		}
		z, err := CollisionCurve(ctx, m.g, ms, t, depths, cfg.workers, opts...)
		if err != nil {
			return exactMemory(err)
		}
		zh := stats.HaarCollision(math.Ldexp(1, m.g.Qubits))
		lnR[k] = make([]float64, len(depths))
		for i, x := range z {
			lnR[k][i] = math.Log(x / zh)
		}
		r.ExtrapolatedFrom = append(r.ExtrapolatedFrom, m.g.Name)
		done += m.g.Qubits
	}
	r.Engine = EngineExtrapolate
	r.Ratio = make([]float64, len(depths))
	r.TruncationError = make([]float64, len(depths))
	y := make([]float64, len(members))
	for i := range depths {
		for k := range members {
			y[k] = lnR[k][i]
		}
		// members[1:] is the fit, members[:len-1] the previous window.
		fit := make([]int, 0, len(members))
		for k := 1; k < len(members); k++ {
			fit = append(fit, k)
		}
		p, err := extrapolateFit(members, y, target, fit)
		if err != nil {
			return err
		}
		prev := make([]int, len(fit))
		for j, k := range fit {
			prev[j] = k - 1
		}
		q, err := extrapolateFit(members, y, target, prev)
		if err != nil {
			return err
		}
		spread := math.Abs(q - p)
		for leave := range fit {
			sub := slices.Delete(slices.Clone(fit), leave, leave+1)
			q, err := extrapolateFit(members, y, target, sub)
			if err != nil {
				return err
			}
			spread = max(spread, math.Abs(q-p))
		}
		r.Ratio[i] = math.Exp(p)
		r.TruncationError[i] = r.Ratio[i] * math.Expm1(spread)
	}
	for _, x := range r.Ratio {
		r.Collision = append(r.Collision, x*r.HaarCollision)
	}
	return nil
}

// extrapolateFit fits y ≈ X·β by least squares over the members listed in
// use and returns target·β. A fit whose columns are dependent (too few
// distinct sizes) is an error rather than an arbitrary β.
func extrapolateFit(members []extrapMember, y, target []float64, use []int) (float64, error) {
	p := len(target)
	x := mat.NewDense(len(use), p, nil)
	b := mat.NewVecDense(len(use), nil)
	for row, k := range use {
		x.SetRow(row, members[k].features)
		b.SetVec(row, y[k])
	}
	var qr mat.QR
	qr.Factorize(x)
	var beta mat.VecDense
	if err := qr.SolveVecTo(&beta, false, b); err != nil {
		return 0, fmt.Errorf("moments: the extrapolation fit is singular (too few distinct member sizes): %v: %w", err, ErrEngine)
	}
	return mat.Dot(mat.NewVecDense(p, slices.Clone(target)), &beta), nil
}
