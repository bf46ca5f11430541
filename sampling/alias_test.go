package sampling

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// chiSquareP returns the p-value of Pearson's χ² goodness-of-fit statistic
// of counts against the probabilities want (Pearson 1900, Phil. Mag. 50,
// 157), on k−1 degrees of freedom with gonum's distuv.ChiSquared as the
// reference law. Cells expected to hold fewer than 5 counts are pooled into
// one, the usual condition for the χ² approximation (common practice).
// Counts in cells of probability zero make the p-value 0.
func chiSquareP(t *testing.T, counts []int, want []float64) float64 {
	t.Helper()
	var n, sum float64
	for i, c := range counts {
		n += float64(c)
		sum += want[i]
	}
	var stat, poolObs, poolExp float64
	cells := 0
	for i, c := range counts {
		exp := n * want[i] / sum
		switch {
		case want[i] == 0:
			if c > 0 {
				return 0
			}
		case exp < 5:
			poolObs += float64(c)
			poolExp += exp
		default:
			d := float64(c) - exp
			stat += d * d / exp
			cells++
		}
	}
	if poolExp > 0 {
		d := poolObs - poolExp
		stat += d * d / poolExp
		cells++
	}
	if cells < 2 {
		t.Fatalf("χ² test with %d cell(s): use more samples", cells)
	}
	return distuv.ChiSquared{K: float64(cells - 1)}.Survival(stat)
}

// pThreshold is the p-value below which a χ² test fails: with fixed seeds
// the tests are deterministic, and a correct sampler would fail a given
// check with probability 1e-4.
const pThreshold = 1e-4

// TestAliasChiSquare draws from alias tables of several shapes and compares
// the histograms with the weights by a χ² test (gonum distuv.ChiSquared as
// the reference law).
func TestAliasChiSquare(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	cases := map[string][]float64{
		"one":     {2.5},
		"two":     {1, 3},
		"uniform": {1, 1, 1, 1, 1, 1, 1, 1},
		"zeros":   {0, 5, 0, 0, 1, 0, 2, 0},
		"skewed":  {1e-3, 1, 10, 100, 1000, 1e4},
	}
	random := make([]float64, 64)
	for i := range random {
		random[i] = rng.ExpFloat64() // Porter–Thomas-like weights
	}
	cases["random"] = random
	for name, w := range cases {
		a := NewAlias(w)
		if a.Len() != len(w) {
			t.Fatalf("%s: Len %d, want %d", name, a.Len(), len(w))
		}
		counts := make([]int, len(w))
		for range 200000 {
			counts[a.Draw(rng)]++
		}
		for i, c := range counts {
			if w[i] == 0 && c > 0 {
				t.Errorf("%s: outcome %d of weight 0 drawn %d times", name, i, c)
			}
		}
		if len(w) > 1 {
			if p := chiSquareP(t, counts, w); p < pThreshold {
				t.Errorf("%s: χ² p-value %.3g < %g; counts %v", name, p, pThreshold, counts)
			}
		}
	}
}

// TestAliasZeroWeightsNeverDrawn: outcomes of weight zero are never drawn,
// even when rounding leaves the table's columns a little off (many tiny and
// zero weights next to one huge one).
func TestAliasZeroWeightsNeverDrawn(t *testing.T) {
	w := make([]float64, 1000)
	for i := range w {
		switch i % 3 {
		case 0:
			w[i] = 0
		case 1:
			w[i] = 1e-300
		default:
			w[i] = 1.0 / 3
		}
	}
	w[999] = 1e300
	rng := rand.New(rand.NewPCG(5, 6))
	a := NewAlias(w)
	for range 100000 {
		if x := a.Draw(rng); w[x] == 0 {
			t.Fatalf("drew outcome %d of weight 0", x)
		}
	}
}

// TestAliasReset checks that a table rebuilt for other weights forgets the
// old ones, for a smaller and a larger table.
func TestAliasReset(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	var a Alias
	a.Reset([]float64{1, 1, 1, 1, 1, 1})
	a.Reset([]float64{0, 1, 0})
	for range 1000 {
		if x := a.Draw(rng); x != 1 {
			t.Fatalf("after Reset drew %d, want 1 always", x)
		}
	}
	a.Reset([]float64{0, 0, 0, 0, 0, 0, 0, 1})
	for range 1000 {
		if x := a.Draw(rng); x != 7 {
			t.Fatalf("after Reset drew %d, want 7 always", x)
		}
	}
}

func TestAliasPanics(t *testing.T) {
	for name, w := range map[string][]float64{
		"empty":    {},
		"negative": {1, -1},
		"NaN":      {1, math.NaN()},
		"Inf":      {1, math.Inf(1)},
		"zero sum": {0, 0},
	} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("NewAlias(%s) did not panic", name)
				}
			}()
			NewAlias(w)
		}()
	}
	defer func() {
		if recover() == nil {
			t.Error("Draw from the zero Alias did not panic")
		}
	}()
	var a Alias
	a.Draw(rand.New(rand.NewPCG(1, 1)))
}

// BenchmarkAliasDraw measures the O(1) draw over table sizes: the time per
// draw should not grow with D beyond cache effects.
func BenchmarkAliasDraw(b *testing.B) {
	for _, n := range []int{4, 12, 20} {
		w := make([]float64, 1<<n)
		rng := rand.New(rand.NewPCG(1, 2))
		for i := range w {
			w[i] = rng.ExpFloat64()
		}
		a := NewAlias(w)
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for range b.N {
				a.Draw(rng)
			}
		})
	}
}
