package pinned

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// round53 is x rounded to a float64 by math/big (round to nearest even, the
// IEEE 754 default: common practice), the reference each step of Mul must
// equal when every product is rounded on its own.
func round53(x *big.Float) float64 {
	f, _ := x.Float64()
	return f
}

func product(a, b float64) float64 {
	return round53(new(big.Float).SetPrec(200).Mul(big.NewFloat(a), big.NewFloat(b)))
}

// TestMulRoundsEachProduct checks Mul against math/big: each product rounded
// to float64, then the sum rounded. A fused multiply-add would round once and
// differ in the last bit for a share of the inputs, so this test fails in a
// build where the conversions did not stop the fusion (run it with
// GOAMD64=v3 or on arm64, where the compiler fuses).
func TestMulRoundsEachProduct(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for i := 0; i < 20000; i++ {
		x := complex(rng.NormFloat64(), rng.NormFloat64())
		y := complex(rng.NormFloat64(), rng.NormFloat64())
		got := Mul(x, y)
		re := round53(new(big.Float).SetPrec(200).Sub(big.NewFloat(product(real(x), real(y))), big.NewFloat(product(imag(x), imag(y)))))
		im := round53(new(big.Float).SetPrec(200).Add(big.NewFloat(product(real(x), imag(y))), big.NewFloat(product(imag(x), real(y)))))
		if math.Float64bits(real(got)) != math.Float64bits(re) || math.Float64bits(imag(got)) != math.Float64bits(im) {
			t.Fatalf("Mul(%v, %v) = %v, want %v", x, y, got, complex(re, im))
		}
		a := Abs2(x)
		want := round53(new(big.Float).SetPrec(200).Add(big.NewFloat(product(real(x), real(x))), big.NewFloat(product(imag(x), imag(x)))))
		if math.Float64bits(a) != math.Float64bits(want) {
			t.Fatalf("Abs2(%v) = %v, want %v", x, a, want)
		}
	}
}
