// Package pinned holds complex arithmetic whose rounding is the same on every
// architecture and build level.
//
// The Go specification lets a compiler fuse x*y + z into one multiply-add
// that rounds once ("Floating-point operators": "An implementation may
// combine multiple floating-point operations into a single fused
// operation, possibly across statements"), and the compiler does so on
// arm64 and, on amd64, under GOAMD64=v3 and above, inside complex products
// too. The gates of an instance would then differ in their last bits from
// one build to the next, and a table made on one machine would not replay
// on another. An explicit conversion to float64 rounds ("an explicit
// floating-point type conversion rounds to the precision of the target
// type"), so every product here is rounded on its own, as the amd64 default
// build computes it.
//
// This makes the arithmetic that builds a gate from its random draws the
// same in every build, not the draws themselves: math/rand/v2's
// NormFloat64 is compiled with the same freedom, and its ziggurat's
// rejection test (a float32 multiply-add) can then decide a rare draw the
// other way. Measured with a GOAMD64=v3 build against the default one: of
// 6000 Haar gates (30 from each of the demo's 200 instance streams) one
// differs, in its last bits; before this package the digests of 2000 gates
// of every ensemble with Haar factors differed.
package pinned

// Mul returns x·y rounded as the definition reads: real part
// xr·yr − xi·yi, imaginary part xr·yi + xi·yr, each product rounded before
// the sum.
func Mul(x, y complex128) complex128 {
	xr, xi, yr, yi := real(x), imag(x), real(y), imag(y)
	return complex(float64(xr*yr)-float64(xi*yi), float64(xr*yi)+float64(xi*yr))
}

// Abs2 returns |x|² = re² + im², each square rounded before the sum.
func Abs2(x complex128) float64 {
	return float64(real(x)*real(x)) + float64(imag(x)*imag(x))
}
