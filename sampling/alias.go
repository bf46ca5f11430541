package sampling

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Alias is a Walker alias table over the outcomes 0..Len()−1: after an O(D)
// set-up each draw costs O(1), one uniform column and one uniform threshold
// (Walker, "An efficient method for generating discrete random variables with
// general distributions", ACM Trans. Math. Softw. 3, 253, 1977). The table is
// built with Vose's numerically stable variant (Vose, "A linear algorithm for
// generating random numbers with a given distribution", IEEE Trans. Softw.
// Eng. 17, 972, 1991).
//
// Column i keeps outcome i with probability Prob[i] and gives Alias[i]
// otherwise. An outcome of weight zero is never drawn, whatever the rounding.
// The zero Alias is empty; Reset fills it. An Alias uses 16 bytes per
// outcome. Draw may run concurrently with separate random sources; Reset must
// not run concurrently with anything else on the same table.
type Alias struct {
	prob  []float64
	alias []uint32
	work  []uint32 // Vose's small and large stacks, sharing one array
}

// MaxAliasOutcomes is the largest number of outcomes an Alias holds.
const MaxAliasOutcomes = 1 << 32

// NewAlias returns the alias table of the weights w (not necessarily
// normalised). It panics under the conditions of Reset.
func NewAlias(w []float64) *Alias {
	a := new(Alias)
	a.Reset(w)
	return a
}

// Len returns the number of outcomes.
func (a *Alias) Len() int { return len(a.prob) }

// Reset rebuilds the table for the weights w, reusing its memory when it is
// large enough. It panics if w is empty or longer than MaxAliasOutcomes, if a
// weight is negative, NaN or infinite, or if all weights are zero.
func (a *Alias) Reset(w []float64) {
	n := len(w)
	if n == 0 || n > MaxAliasOutcomes {
		panic(fmt.Sprintf("sampling: alias table of %d outcomes (want 1..2^32)", n))
	}
	var sum float64
	heaviest := 0
	for i, v := range w {
		if !(v >= 0) || math.IsInf(v, 1) {
			panic(fmt.Sprintf("sampling: alias weight %d is %v; weights must be finite and non-negative", i, v))
		}
		sum += v
		if v > w[heaviest] {
			heaviest = i
		}
	}
	if !(sum > 0) || math.IsInf(sum, 1) {
		panic(fmt.Sprintf("sampling: alias weights sum to %v; need a positive finite total", sum))
	}
	if cap(a.prob) < n {
		a.prob = make([]float64, n)
		a.alias = make([]uint32, n)
		a.work = make([]uint32, n)
	}
	a.prob, a.alias, a.work = a.prob[:n], a.alias[:n], a.work[:n]
	// prob[i] holds the scaled weight n·w_i/Σw until column i is finished.
	scale := float64(n) / sum
	prob, alias, work := a.prob, a.alias, a.work
	small, large := 0, n // small grows up from 0, large down from n
	for i, v := range w {
		p := v * scale
		prob[i] = p
		alias[i] = uint32(i)
		// Without a branch (the comparison is a coin flip for Porter–Thomas
		// weights): a small i goes to slot small, a large one to large−1.
		s := 0
		if p < 1 {
			s = 1
		}
		work[large-1+s*(small-large+1)] = uint32(i)
		small += s
		large -= 1 - s
	}
	for small > 0 && large < n {
		small--
		s := work[small]
		l := work[large]
		// Column s is finished: it keeps s with prob[s] and gives l otherwise.
		alias[s] = l
		pl := prob[l] - (1 - prob[s])
		prob[l] = pl
		if pl < 1 {
			// l moves from the large stack to the small one. The slot it
			// leaves is the lowest large slot, so the stacks never meet.
			large++
			work[small] = l
			small++
		}
	}
	// What is left is 1 up to rounding. A leftover of weight zero (only
	// possible through rounding) must still never be drawn: it gives the
	// heaviest outcome instead.
	for _, i := range a.work[:small] {
		a.finish(i, w, heaviest)
	}
	for _, i := range a.work[large:] {
		a.finish(i, w, heaviest)
	}
}

func (a *Alias) finish(i uint32, w []float64, heaviest int) {
	if w[i] > 0 {
		a.prob[i] = 1
		return
	}
	a.prob[i] = 0
	a.alias[i] = uint32(heaviest)
}

// Draw returns an outcome drawn from the table with the random source rng.
// It panics if the table is empty.
func (a *Alias) Draw(rng *rand.Rand) int {
	n := len(a.prob)
	if n == 0 {
		panic("sampling: Draw from an empty alias table")
	}
	i := int(rng.Uint64N(uint64(n)))
	return a.pick(i, rng.Float64())
}

// pick returns the outcome of column i for the threshold u: i when u is
// below the column's probability, else its alias.
func (a *Alias) pick(i int, u float64) int {
	if u < a.prob[i] {
		return i
	}
	return int(a.alias[i])
}
