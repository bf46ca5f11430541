package sampling

import (
	"math"
	"math/bits"
	"math/rand/v2"
	"sort"
)

// replayMaxShots is the largest number of shots aliasReplay draws without an
// alias table. Its cost per draw is a scan of up to 64 weights (and, when a
// comparison is too close to call, the pairing down to the lowest column
// asked for), so past a few dozen draws the table (Reset, then O(1) draws)
// is as cheap and simpler.
const replayMaxShots = 64

// aliasReplay draws a few outcomes exactly as an Alias of the same weights
// would, without building the table: the trajectories of a noisy run draw
// about ten shots each from a fresh distribution over 2^n outcomes, where
// Alias.Reset (a validating pass, a pass writing three arrays and the
// sequential pairing of Vose's method over them) cost far more than the
// draws. On the noisy target's configuration (2^16 Porter–Thomas weights,
// ten draws) the table and its draws took 1.0–1.1 ms of CPU time and the
// replay 0.22–0.35 ms, alternated on this project's 2-core Sapphire Rapids guest
// under load (2026-12-03).
//
// An Alias draw takes a column i and a threshold u and gives i when u is
// below the column's final probability, else the column's alias. Vose's
// pairing in Alias.Reset visits the columns in a fixed order, the small ones
// (scaled weight p < 1) from the highest index down, a large one (p ≥ 1)
// going from the large stack, highest index first, to the top of the small
// stack as soon as its residual falls below 1; each visit is one subtraction
// on the residual of the current large column. A small column whose
// threshold lies below its scaled weight gives itself whatever the pairing
// does (a small column keeps its weight, or 1 when it is left over). For
// the other draws, estimate proves the outcome from sums of the deficits
// and excesses (one pass over the weights, no sequential chain); when one
// of its comparisons is too close to call, pair repeats the same
// subtractions as Reset in the same order on the same values, so every
// residual, and so every column's final probability and alias, is the same
// bit for bit, skipping the stores and stopping when the columns asked for
// are known.
//
// The zero aliasReplay is ready to use; it keeps its buffers between calls
// and must not be used concurrently.
type aliasReplay struct {
	want  []uint64 // bit set of the columns still to resolve
	small []uint64 // bit set of the small columns (pair, estimate)
	// dblk[k], eblk[k]: the deficits and excesses of the blocks of 64
	// columns from k up (estimate).
	dblk, eblk []float64
	cols       []uint32   // column of each alias draw
	us         []float64  // threshold of each alias draw
	drawn      []uint64   // outcome of each alias draw
	known      []resolved // the resolved columns, in the order of resolution
	// Per shot: whether it is an alias draw (its column in cols) or
	// uniform (its outcome in direct), and its readout uniforms.
	direct  []uint64
	isAlias []bool
	flips   []float64
}

// resolved is the final probability and alias of one column of the table.
type resolved struct {
	col   uint32
	prob  float64
	alias uint32
}

// readoutFixed reports whether nz's readout draws the same number of
// uniforms whatever the outcome: every qubit has both flip rates zero or
// both non-zero (Readout draws for a bit 0 only with Readout01 > 0, for a
// bit 1 only with Readout10 > 0). It returns the number of uniforms per
// shot.
func readoutFixed(nz Noise, qubits int) (perShot int, ok bool) {
	if nz.noReadout() {
		return 0, true
	}
	for q := range qubits {
		p01, p10 := nz.readoutRates(q)
		if (p01 > 0) != (p10 > 0) {
			return 0, false
		}
		perShot += b2i(p01 > 0)
	}
	return perShot, true
}

// drawShots appends to dst the shots DrawShots(dst, rng, a, qubits, shots,
// nz) appends with a the alias table of the weights w, the same outcomes
// from the same draws of rng, leaving a untouched when it can do without
// it. It replays the table (resolve) when shots ≤ replayMaxShots and the
// readout draws as many uniforms whatever the outcome (readoutFixed), so
// that every draw of rng can be taken before any outcome is known: a
// uniform column and threshold, or a uniform outcome, then the readout
// uniforms. Otherwise, or for weights that Alias.Reset refuses, it resets a
// to w and calls DrawShots (which panics as it would).
func (r *aliasReplay) drawShots(dst []uint64, rng *rand.Rand, w []float64, a *Alias, qubits, shots int, nz Noise) []uint64 {
	return r.drawShotsTotals(dst, rng, w, totalsOf(w), a, qubits, shots, nz)
}

// drawShotsTotals is drawShots with the totals t of w (totalsOf) already
// known, as weightsOf gives them in the same pass that writes w.
func (r *aliasReplay) drawShotsTotals(dst []uint64, rng *rand.Rand, w []float64, t weightTotals, a *Alias, qubits, shots int, nz Noise) []uint64 {
	nz.check() // as DrawShots does, before readoutFixed reads the rates
	perShot, fixed := readoutFixed(nz, qubits)
	if shots > replayMaxShots || !fixed || qubits < 1 || qubits > 32 || len(w) != 1<<qubits {
		a.Reset(w)
		return DrawShots(dst, rng, a, qubits, shots, nz)
	}
	dim := uint64(1) << qubits
	f := nz.fidelity()
	r.cols, r.us, r.direct, r.isAlias, r.flips = r.cols[:0], r.us[:0], r.direct[:0], r.isAlias[:0], r.flips[:0]
	for range shots {
		if f == 1 || rng.Float64() < f {
			// Alias.Draw: a column, then a threshold.
			r.cols = append(r.cols, uint32(rng.Uint64N(dim)))
			r.us = append(r.us, rng.Float64())
			r.isAlias = append(r.isAlias, true)
			r.direct = append(r.direct, 0)
		} else {
			r.isAlias = append(r.isAlias, false)
			r.direct = append(r.direct, rng.Uint64N(dim))
		}
		for range perShot {
			r.flips = append(r.flips, rng.Float64())
		}
	}
	first := len(dst)
	dst = append(dst, r.direct...)
	out := dst[first:]
	if len(r.cols) > 0 {
		r.drawn = r.drawn[:0]
		if !r.resolveTotals(w, t, r.cols, r.us, &r.drawn) {
			// Weights resolve does not take: the table's draws from the
			// same columns and thresholds (Reset panics on what it refuses).
			a.Reset(w)
			for j, c := range r.cols {
				r.drawn = append(r.drawn, uint64(a.pick(int(c), r.us[j])))
			}
		}
		j := 0
		for k := range out {
			if r.isAlias[k] {
				out[k] = r.drawn[j]
				j++
			}
		}
	}
	if perShot > 0 {
		flips := r.flips
		for k, x := range out {
			for q := range qubits {
				p01, p10 := nz.readoutRates(q)
				if p01 == 0 { // then p10 == 0 too (readoutFixed)
					continue
				}
				// As Readout, with the uniform drawn for this qubit.
				u, bit := flips[0], uint64(1)<<q
				flips = flips[1:]
				if x&bit == 0 {
					if u < p01 {
						x |= bit
					}
				} else if u < p10 {
					x &^= bit
				}
			}
			out[k] = x
		}
	}
	return dst
}

// resolve appends to *out, for each j, the outcome that Draw on
// NewAlias(w) gives when it takes the column cols[j] and the threshold
// us[j], and returns true. It returns false, appending nothing, for weights
// that Alias.Reset might refuse (it refuses a weight negative, NaN or
// infinite, or a total that is not positive and finite; resolve also
// refuses a weight −0, which no probability is, to test one sign bit): the
// caller then builds the table. The cost is one pass over w for the total,
// the same sequential sum as Reset's, and estimate's pass, or pair's when
// estimate cannot prove every outcome.
func (r *aliasReplay) resolve(w []float64, cols []uint32, us []float64, out *[]uint64) bool {
	return r.resolveTotals(w, totalsOf(w), cols, us, out)
}

// weightTotals are the totals of a weight vector that resolve needs before
// anything else: Reset's sum, in Reset's order, the heaviest weight (0 for
// none above 0) and the OR of the weights' bits (a sign bit set for a
// negative weight or −0).
type weightTotals struct {
	sum, heaviest float64
	signs         uint64
}

// totalsOf returns the totals of w. The sum is one chain of dependent
// additions (the rounding of each depends on the one before), so its
// latency, not the other work of the loop, sets the pass's time.
func totalsOf(w []float64) weightTotals {
	var t weightTotals
	for _, v := range w {
		t.sum += v
		t.signs |= math.Float64bits(v)
		if v > t.heaviest {
			t.heaviest = v
		}
	}
	return t
}

// weightsOf writes the probabilities |amp|² into dst (allocated when
// short) and returns it with their totals, in one pass: the squares as
// sim.State.Probabilities computes them (each rounded on its own, then
// added), so that w is the same bit for bit, and the totals as totalsOf
// computes them. The squares cost nothing beside the sum's chain of
// additions, which totalsOf would wait on in a pass of its own.
func weightsOf(amp []complex128, dst []float64) ([]float64, weightTotals) {
	if len(dst) < len(amp) {
		dst = make([]float64, len(amp))
	}
	dst = dst[:len(amp)]
	var t weightTotals
	for i, a := range amp {
		v := float64(real(a)*real(a)) + float64(imag(a)*imag(a))
		dst[i] = v
		t.sum += v
		t.signs |= math.Float64bits(v)
		if v > t.heaviest {
			t.heaviest = v
		}
	}
	return dst, t
}

// resolveTotals is resolve with the totals t of w (totalsOf) already known.
func (r *aliasReplay) resolveTotals(w []float64, t weightTotals, cols []uint32, us []float64, out *[]uint64) bool {
	n := len(w)
	if n == 0 || n > MaxAliasOutcomes {
		return false
	}
	// Reset's sum, in the same order. A NaN or +Inf weight makes the sum
	// NaN or +Inf; a negative weight shows in the sign bits.
	sum, heaviest, signs := t.sum, t.heaviest, t.signs
	if signs>>63 != 0 || !(sum > 0) || math.IsInf(sum, 1) {
		return false
	}
	scale := float64(n) / sum
	if math.IsInf(scale, 1) {
		// A subnormal total: a zero weight would scale to NaN, which
		// Reset counts as large and the sign test here as small.
		return false
	}
	words := (n + 63) / 64
	if cap(r.want) < words {
		r.want = make([]uint64, words)
		r.small = make([]uint64, words)
	}
	want := r.want[:words]
	pending := 0
	for j, c := range cols {
		if p := w[c] * scale; p < 1 && us[j] < p {
			continue // a small column below its weight gives itself
		}
		if want[c/64]&(1<<(c%64)) == 0 {
			want[c/64] |= 1 << (c % 64)
			pending++
		}
	}
	if pending > 0 && r.estimate(w, scale, heaviest*scale, cols, us, out) {
		for _, c := range cols {
			want[c/64] = 0
		}
		return true
	}
	r.known = r.known[:0]
	if pending > 0 {
		r.pair(w, scale, want, pending)
	}
	first := -1 // the first heaviest outcome
	for j, c := range cols {
		x := uint64(c)
		if p := w[c] * scale; !(p < 1 && us[j] < p) {
			var left bool
			if x, left = r.outcome(c, us[j]); left && w[c] == 0 {
				// Reset's finish: a left-over column of weight zero gives
				// the first heaviest outcome.
				if first < 0 {
					first = 0
					for i, v := range w {
						if v > w[first] {
							first = i
						}
					}
				}
				x = uint64(first)
			}
		}
		*out = append(*out, x)
	}
	for _, c := range cols { // every bit set is one of theirs
		want[c/64] = 0
	}
	return true
}

// outcome returns the draw of column c with threshold u from the columns
// that pair finished; for a column it did not reach, left over with
// probability 1 (Reset's finish, unless its weight is zero), it returns c
// and left true.
func (r *aliasReplay) outcome(c uint32, u float64) (x uint64, left bool) {
	for _, k := range r.known {
		if k.col == c {
			if u < k.prob {
				return uint64(c), false
			}
			return uint64(k.alias), false
		}
	}
	return uint64(c), true
}

// validBits returns the bit set of the columns that exist in word k.
func validBits(n, k int) uint64 {
	if rest := n - 64*k; rest < 64 {
		return 1<<rest - 1
	}
	return ^uint64(0)
}

// pair runs the pairing of Alias.Reset on the weights w scaled by scale,
// recording in r.known the final probability and alias of each column
// marked in want as it is finished, until the pending marked columns are all
// finished or the pairing ends (the rest are left over).
func (r *aliasReplay) pair(w []float64, scale float64, want []uint64, pending int) {
	n := len(w)
	words := len(want)
	small := r.small[:words]
	for k := range small {
		lo := 64 * k
		var m uint64
		for b, v := range w[lo:min(lo+64, n)] {
			m |= (math.Float64bits(v*scale-1) >> 63) << (b & 63)
		}
		small[k] = m
	}
	// Two iterators from the top down: the small columns (sw, sm: the word
	// and its bits still to visit) and the large ones (lw, lm).
	sw, lw := words, words
	var sm, lm uint64
	nextLarge := func() int {
		for lm == 0 {
			if lw == 0 {
				return -1
			}
			lw--
			lm = validBits(n, lw) &^ small[lw]
		}
		b := 63 - bits.LeadingZeros64(lm)
		lm &^= 1 << b
		return 64*lw + b
	}
	l := nextLarge()
	if l < 0 {
		return // no large column: every column is left over
	}
	res := w[l] * scale // the residual of the current large column l
	for {
		for sm == 0 {
			if sw == 0 {
				return // no small column left: the large ones are left over
			}
			sw--
			sm = small[sw]
		}
		b := 63 - bits.LeadingZeros64(sm)
		sm &^= 1 << b
		s := 64*sw + b
		ps := w[s] * scale
		if want[sw]&(1<<b) != 0 {
			r.known = append(r.known, resolved{uint32(s), ps, uint32(l)})
			if pending--; pending == 0 {
				return
			}
		}
		res -= 1 - ps
		for res < 1 {
			// l moves to the top of the small stack and is finished next,
			// against the next large column.
			next := nextLarge()
			if next < 0 {
				return // l is left over
			}
			if want[l/64]&(1<<(l%64)) != 0 {
				r.known = append(r.known, resolved{uint32(l), res, uint32(next)})
				if pending--; pending == 0 {
					return
				}
			}
			res = w[next]*scale - (1 - res)
			l = next
		}
	}
}

// estimate appends the outcomes of the draws (cols[j], us[j]) as resolve
// does and returns true when it can prove them from sums, without the
// pairing's sequential chain; it returns false, appending nothing, when a
// comparison falls too close to call, and resolve then replays the pairing.
//
// With the scaled weights p_i in the order of the pairing, small columns
// s_1, s_2, … (deficits d = 1 − p) and large ones l_1, l_2, … (excesses
// e = p − 1), let D_k = d_{s_1} + … + d_{s_k} and E_m = e_{l_1} + … + e_{l_m}.
// In exact arithmetic the residual of l_m after the small pops up to s_k is
// p_{l_m} − (D_k − E_{m−1}) = 1 + E_m − D_k: so l_m is the current large
// column when s_k is popped for the least m with E_m ≥ D_{k−1} (that is its
// alias), and l_m leaves the large stack, with final probability
// 1 − (D_k − E_m) and alias l_{m+1}, after the first small pop with
// D_k > E_m. The pairing computes the same residuals in floating point, one
// subtraction at a time; each rounding moves a residual by at most u·(|1−x|
// + |result|), u = 2^−53, and the roundings only add up (a subtraction
// passes on the error of its operands unchanged), so after its at most 2n
// steps on values below pmax+2 a residual is within 4n·u·(pmax+2) of its
// exact value; the sums here, over blocks of 64 then across blocks, are
// within n·u·(pmax+2)·(blocks+140) of theirs (the classic bound of recursive
// summation, at most N·u times the sum of the magnitudes, on each level).
// Every comparison that decides an outcome (E_{m−1} < D_{k−1} ≤ E_m,
// D_{k−1} ≤ E_m < D_k and the threshold against the final probability) is
// made with a margin of twice the sum of both bounds, so the pairing's own
// comparisons, on values within that margin of these, come out the same. A
// small column whose threshold is below its weight gives itself (resolve's
// rule); a comparison within the margin, or an outcome at the end of the
// pairing (left-over columns, which rounding decides), returns false.
func (r *aliasReplay) estimate(w []float64, scale, pmax float64, cols []uint32, us []float64, out *[]uint64) bool {
	n := len(w)
	words := (n + 63) / 64
	if cap(r.dblk) < words+1 {
		r.dblk = make([]float64, words+1)
		r.eblk = make([]float64, words+1)
	}
	small := r.small[:words]
	// dblk[k], eblk[k]: the deficits and excesses of blocks k and above,
	// so that those of the blocks above k are dblk[k+1], eblk[k+1].
	dblk, eblk := r.dblk[:words+1], r.eblk[:words+1]
	dblk[words], eblk[words] = 0, 0
	for k := words - 1; k >= 0; k-- {
		lo := 64 * k
		ws := w[lo:min(lo+64, n)]
		var m uint64
		// Four lanes of deficits and excesses, so that the additions do
		// not wait on each other. Each lane takes x or +0 by a mask of
		// x's sign (no branch: small or large is a coin flip here, and no
		// conversion of the sign to a float, which cost more than the
		// sums); adding or subtracting +0 leaves a lane as it is.
		var d0, d1, d2, d3, e0, e1, e2, e3 float64
		b := 0
		for ; b+4 <= len(ws); b += 4 {
			x0, x1, x2, x3 := ws[b]*scale-1, ws[b+1]*scale-1, ws[b+2]*scale-1, ws[b+3]*scale-1
			u0, u1, u2, u3 := math.Float64bits(x0), math.Float64bits(x1), math.Float64bits(x2), math.Float64bits(x3)
			// k: all ones for a small column (x < 0), else zero.
			k0, k1, k2, k3 := uint64(int64(u0)>>63), uint64(int64(u1)>>63), uint64(int64(u2)>>63), uint64(int64(u3)>>63)
			m |= (u0>>63 | u1>>63<<1 | u2>>63<<2 | u3>>63<<3) << (b & 63)
			d0 -= math.Float64frombits(u0 & k0)
			d1 -= math.Float64frombits(u1 & k1)
			d2 -= math.Float64frombits(u2 & k2)
			d3 -= math.Float64frombits(u3 & k3)
			e0 += math.Float64frombits(u0 &^ k0)
			e1 += math.Float64frombits(u1 &^ k1)
			e2 += math.Float64frombits(u2 &^ k2)
			e3 += math.Float64frombits(u3 &^ k3)
		}
		for ; b < len(ws); b++ { // fewer than 4 outcomes
			x := ws[b]*scale - 1
			sb := math.Float64bits(x) >> 63
			m |= sb << (b & 63)
			d0 -= x * float64(sb)
			e0 += x * float64(1-sb)
		}
		small[k] = m
		dblk[k] = dblk[k+1] + ((d0 + d1) + (d2 + d3))
		eblk[k] = eblk[k+1] + ((e0 + e1) + (e2 + e3))
	}
	// margin: twice the two bounds of the comment above.
	const u = 0x1p-53
	margin := 2 * u * (pmax + 2) * float64(n) * (float64(words) + 144)
	start := len(*out)
	fail := func() bool { *out = (*out)[:start]; return false }
	for j, c := range cols {
		i := int(c)
		p := w[i] * scale
		if p < 1 && us[j] < p {
			*out = append(*out, uint64(c))
			continue
		}
		k := i / 64
		if p < 1 {
			// Deficit of the smalls above c, then the least m with
			// E_m ≥ it.
			dprev := dblk[k+1] + r.blockSum(w, scale, k, i+1, true)
			l, ok := r.crossing(w, scale, eblk, dprev, margin)
			if !ok {
				return fail()
			}
			*out = append(*out, uint64(l))
			continue
		}
		// Large: E_m with c = l_m, then the first small pop with D_k > E_m.
		em := eblk[k+1] + r.blockSum(w, scale, k, i+1, false) + (p - 1)
		_, dk, ok := r.crossingAt(w, scale, dblk, em, margin)
		if !ok {
			return fail()
		}
		prob := 1 - (dk - em)
		switch {
		case us[j] < prob-margin:
			*out = append(*out, uint64(c))
		case us[j] > prob+margin:
			next := r.largeBelow(i, n)
			if next < 0 {
				return fail()
			}
			*out = append(*out, uint64(next))
		default:
			return fail()
		}
	}
	return true
}

// blockSum returns the deficits (small) or excesses (!small) of the
// columns of block k from index from up, added from the top down.
func (r *aliasReplay) blockSum(w []float64, scale float64, k, from int, small bool) float64 {
	var s float64
	for i := min(64*k+64, len(w)) - 1; i >= from; i-- {
		x := w[i]*scale - 1
		if small && x < 0 {
			s -= x
		} else if !small && x >= 0 {
			s += x
		}
	}
	return s
}

// crossing returns the first large column l_m (from the top) with
// E_m ≥ target, cum[k] holding the excesses of blocks k and above, and
// whether E_m > target + margin and, unless l_m is the first large column
// (current from the start), E_{m−1} < target − margin.
func (r *aliasReplay) crossing(w []float64, scale float64, cum []float64, target, margin float64) (int, bool) {
	words := len(cum) - 1
	// The highest block k whose total from k up reaches target: cum[k] is
	// non-increasing in k.
	k := sort.Search(words, func(k int) bool { return cum[k] < target }) - 1
	if k < 0 {
		return -1, false
	}
	acc := cum[k+1]
	for i := min(64*k+64, len(w)) - 1; i >= 64*k; i-- {
		x := w[i]*scale - 1
		if x < 0 {
			continue
		}
		next := acc + x
		if next >= target {
			return i, next > target+margin && (acc < target-margin || r.firstLarge(i, len(w)))
		}
		acc = next
	}
	return -1, false
}

// crossingAt returns the first small column s_k (from the top) whose
// cumulative deficit D_k exceeds target, and D_k, with D_{k−1} <
// target − margin and D_k > target + margin; cum[k] holds the deficits of
// blocks k and above.
func (r *aliasReplay) crossingAt(w []float64, scale float64, cum []float64, target, margin float64) (int, float64, bool) {
	words := len(cum) - 1
	k := sort.Search(words, func(k int) bool { return cum[k] <= target }) - 1
	if k < 0 {
		return -1, 0, false
	}
	acc := cum[k+1]
	for i := min(64*k+64, len(w)) - 1; i >= 64*k; i-- {
		x := w[i]*scale - 1
		if x >= 0 {
			continue
		}
		next := acc - x
		if next > target {
			return i, next, acc < target-margin && next > target+margin
		}
		acc = next
	}
	return -1, 0, false
}

// firstLarge reports whether no column above i is large.
func (r *aliasReplay) firstLarge(i, n int) bool {
	k := i / 64
	if validBits(n, k)&^r.small[k]&^(1<<(i%64+1)-1) != 0 {
		return false
	}
	for k++; k < (n+63)/64; k++ {
		if validBits(n, k)&^r.small[k] != 0 {
			return false
		}
	}
	return true
}

// largeBelow returns the highest large column below i, −1 for none, from
// the bit sets estimate computed.
func (r *aliasReplay) largeBelow(i, n int) int {
	k := i / 64
	m := (validBits(n, k) &^ r.small[k]) & (1<<(i%64) - 1)
	for m == 0 {
		if k == 0 {
			return -1
		}
		k--
		m = validBits(n, k) &^ r.small[k]
	}
	return 64*k + 63 - bits.LeadingZeros64(m)
}
