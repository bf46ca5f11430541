package sampling

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"mixdepth/circuits"
)

// The replay must give what the alias table gives, outcome for outcome: the
// requirement is bit-identity with the tables sampled before it (the table
// itself is checked against its law in alias_test.go, by a chi-square test).
// aliasDrawOf is Alias.Draw's mapping of a column and a threshold to an
// outcome, read off the built table.
func aliasDrawOf(a *Alias, col uint32, u float64) uint64 {
	if u < a.prob[col] {
		return uint64(col)
	}
	return uint64(a.alias[col])
}

// replayWeights returns weight vectors that reach every branch of the
// pairing: Porter–Thomas (exponential) weights, equal weights (every column
// scaled exactly to 1, so none is small), one heavy column among tiny
// ones, a Clifford-like output (equal non-zero weights on a subset, zeros
// elsewhere), weights with zeros among exponential ones, one non-zero
// weight, and weights whose scaled values round near 1 (left-over columns).
func replayWeights(rng *rand.Rand) map[string][]float64 {
	out := map[string][]float64{}
	for _, n := range []int{1, 2, 3, 5, 6, 7, 10, 12} {
		d := 1 << n
		pt := make([]float64, d)
		for i := range pt {
			pt[i] = rng.ExpFloat64()
		}
		out[fmt.Sprintf("porter-thomas/n=%d", n)] = pt
		eq := make([]float64, d)
		for i := range eq {
			eq[i] = 1.0 / float64(d)
		}
		out[fmt.Sprintf("equal/n=%d", n)] = eq
		heavy := make([]float64, d)
		for i := range heavy {
			heavy[i] = 1e-9 * rng.Float64()
		}
		heavy[rng.IntN(d)] = 1
		out[fmt.Sprintf("heavy/n=%d", n)] = heavy
		cl := make([]float64, d)
		for i := range cl {
			if rng.IntN(4) == 0 {
				cl[i] = 0.25
			}
		}
		cl[rng.IntN(d)] = 0.25
		out[fmt.Sprintf("clifford/n=%d", n)] = cl
		zeros := slices.Clone(pt)
		for i := range zeros {
			if rng.IntN(3) == 0 {
				zeros[i] = 0
			}
		}
		zeros[rng.IntN(d)] = 1
		out[fmt.Sprintf("zeros/n=%d", n)] = zeros
		one := make([]float64, d)
		one[rng.IntN(d)] = 0.5
		out[fmt.Sprintf("one/n=%d", n)] = one
		near := make([]float64, d)
		for i := range near {
			near[i] = 0.1 * (1 + 1e-15*float64(rng.IntN(9)-4))
		}
		out[fmt.Sprintf("near-one/n=%d", n)] = near
	}
	return out
}

// TestReplayEveryColumn resolves every column of each weight vector, with
// thresholds at the column's final probability, just below it, 0 and just
// below 1 (the edges of Draw's comparison), and with uniform thresholds,
// one query at a time and all together, against the built table.
func TestReplayEveryColumn(t *testing.T) {
	rng := rand.New(rand.NewPCG(16, 4))
	var r aliasReplay
	for name, w := range replayWeights(rng) {
		a := NewAlias(w)
		var cols []uint32
		var us []float64
		for c := range uint32(len(w)) {
			p := a.prob[c]
			for _, u := range []float64{p, math.Nextafter(p, -1), 0, math.Nextafter(1, 0), rng.Float64()} {
				if u < 0 || u >= 1 {
					continue // not a Float64 draw
				}
				cols, us = append(cols, c), append(us, u)
			}
		}
		var all []uint64
		if !r.resolve(w, cols, us, &all) {
			t.Fatalf("%s: resolve refused valid weights", name)
		}
		for j := range cols {
			want := aliasDrawOf(a, cols[j], us[j])
			if all[j] != want {
				t.Fatalf("%s: column %d, threshold %v: all at once %d, table %d", name, cols[j], us[j], all[j], want)
			}
			var one []uint64
			r.resolve(w, cols[j:j+1], us[j:j+1], &one)
			if one[0] != want {
				t.Fatalf("%s: column %d, threshold %v: alone %d, table %d", name, cols[j], us[j], one[0], want)
			}
		}
		for _, bit := range r.want {
			if bit != 0 {
				t.Fatalf("%s: resolve left columns marked", name)
			}
		}
	}
}

// TestReplayRefuses checks that resolve refuses what Alias.Reset panics on.
func TestReplayRefuses(t *testing.T) {
	var r aliasReplay
	for _, w := range [][]float64{{}, {0, 0}, {1, -1}, {1, math.NaN()}, {1, math.Inf(1)}, {math.MaxFloat64, math.MaxFloat64}} {
		var out []uint64
		if r.resolve(w, nil, nil, &out) {
			t.Errorf("resolve took %v", w)
		}
	}
	// Weights of subnormal total, which Reset takes: n/Σw overflows, a
	// zero weight scales to NaN, and Reset counts it as large (a left-over
	// column that gives the first heaviest outcome), so resolve must leave
	// these to the table rather than treat the NaN as small. Found by a
	// review: {0, 5e-324, 5e-324}, column 0, threshold 0 gave 2 against the
	// table's 1.
	for _, w := range [][]float64{{0, 5e-324, 5e-324}, {5e-324, 0, 0, 5e-324}} {
		a := NewAlias(w)
		var out []uint64
		cols, us := []uint32{0, 1}, []float64{0, 0}
		if r.resolve(w, cols, us, &out) {
			for j, c := range cols {
				if want := aliasDrawOf(a, c, us[j]); out[j] != want {
					t.Errorf("weights %v, column %d: resolve gives %d, the table %d", w, c, out[j], want)
				}
			}
		}
	}
}

// TestReplayDrawShots compares drawShots with DrawShots on a fresh table,
// from the same seeds, under the noises whose draws it replays (ideal,
// depolarizing, readout with both rates, a chip with per-qubit readout)
// and those it hands to the table (one-sided readout, more shots than
// replayMaxShots): the same outcomes, and the two streams left at the same
// place.
func TestReplayDrawShots(t *testing.T) {
	g, err := circuits.ParseGraph("ring:6")
	if err != nil {
		t.Fatal(err)
	}
	chip := circuits.UniformNoise(g, 0.01, 0.003, 0.02, 0.04, 0.9)
	chip.Readout10[2] = 0.2
	oneSided := circuits.UniformNoise(g, 0.01, 0.003, 0.02, 0.04, 0.9)
	oneSided.Readout01[3] = 0
	noises := map[string]Noise{
		"ideal":          Ideal,
		"uniform":        {},
		"depolarizing":   {Fidelity: 0.7},
		"readout":        {Fidelity: 0.9, Readout01: 0.03, Readout10: 0.05},
		"one-sided":      {Fidelity: 1, Readout10: 0.05},
		"chip":           {Chip: chip},
		"chip-one-sided": {Chip: oneSided},
	}
	rng := rand.New(rand.NewPCG(6, 6))
	w := make([]float64, 1<<6)
	for i := range w {
		w[i] = rng.ExpFloat64()
	}
	// A weight −0, which resolve refuses and the table takes: drawShots
	// then picks from the table with the draws it took.
	negZero := slices.Clone(w)
	negZero[5] = math.Copysign(0, -1)
	var r aliasReplay
	var a Alias
	for _, w := range [][]float64{w, negZero} {
		for name, nz := range noises {
			for _, shots := range []int{1, 10, replayMaxShots, replayMaxShots + 1} {
				for seed := range uint64(5) {
					s1, s2 := rand.New(rand.NewPCG(seed, 1)), rand.New(rand.NewPCG(seed, 1))
					want := DrawShots([]uint64{7}, s1, NewAlias(w), 6, shots, nz)
					got := r.drawShots([]uint64{7}, s2, w, &a, 6, shots, nz)
					if !slices.Equal(got, want) {
						t.Fatalf("%s, %d shots, seed %d: replay %v, table %v", name, shots, seed, got, want)
					}
					if s1.Uint64() != s2.Uint64() {
						t.Fatalf("%s, %d shots, seed %d: the streams end at different places", name, shots, seed)
					}
				}
			}
		}
	}
}

// BenchmarkTrajectoryShots draws a trajectory's ten shots from 2^16
// Porter–Thomas weights (the noisy target's size) through the table (Reset
// then DrawShots) and through the replay, alternated over three rounds.
func BenchmarkTrajectoryShots(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	w := make([]float64, 1<<16)
	for i := range w {
		w[i] = rng.ExpFloat64()
	}
	var a Alias
	var r aliasReplay
	dst := make([]uint64, 0, 16)
	for range 3 {
		b.Run("table", func(b *testing.B) {
			for b.Loop() {
				a.Reset(w)
				dst = DrawShots(dst[:0], rng, &a, 16, 10, Ideal)
			}
		})
		b.Run("replay", func(b *testing.B) {
			for b.Loop() {
				dst = r.drawShots(dst[:0], rng, w, &a, 16, 10, Ideal)
			}
		})
	}
}

// TestReplayEstimate checks the shortcut of the replay (estimate) on
// Porter–Thomas weights of 2^16 outcomes, the size of the noisy target:
// draws of ten uniform columns and thresholds against the built table, and
// that the shortcut proves nearly all of them (a refusal costs the full
// pairing; the margin, about 1e-7 here, refuses a draw with a probability
// of that order per comparison, so 1% of refusals means a wrong bound).
func TestReplayEstimate(t *testing.T) {
	rng := rand.New(rand.NewPCG(16, 16))
	var r aliasReplay
	w := make([]float64, 1<<16)
	refused := 0
	const trials = 200
	for trial := range trials {
		for i := range w {
			w[i] = rng.ExpFloat64()
		}
		a := NewAlias(w)
		cols, us := make([]uint32, 10), make([]float64, 10)
		for j := range cols {
			cols[j], us[j] = uint32(rng.IntN(len(w))), rng.Float64()
		}
		var sum, heaviest float64
		for _, v := range w {
			sum += v
			heaviest = max(heaviest, v)
		}
		scale := float64(len(w)) / sum
		if cap(r.small) < len(w)/64 {
			r.small = make([]uint64, len(w)/64)
		}
		var got []uint64
		if !r.estimate(w, scale, heaviest*scale, cols, us, &got) {
			refused++
			continue
		}
		for j := range cols {
			if want := aliasDrawOf(a, cols[j], us[j]); got[j] != want {
				t.Fatalf("trial %d: column %d, threshold %v: estimate %d, table %d", trial, cols[j], us[j], got[j], want)
			}
		}
	}
	if refused > trials/100 {
		t.Errorf("estimate refused %d of %d draws of ten", refused, trials)
	}
}
