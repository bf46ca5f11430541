package stats

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestCountKernelExact checks the AVX-512 count kernel (ksCountAVX512On) against
// the Go loop: the same counters, NaN flag and collision sum bit for bit
// from CountAmplitudes, on Porter–Thomas amplitudes (complex Gaussian, a
// Haar state's output; Porter & Thomas 1956) and on adversarial ones: many
// equal probabilities (a uniform superposition over a subset, as a
// stabiliser state's output), exact zeros, subnormal squares, squares that
// overflow to +Inf, huge values, NaN, and block lengths that are not
// multiples of the kernel's groups of eight leaves of 128 pairs or of its
// eight lanes.
// The sum is also checked against Collision of the probabilities
// re·re + im·im (each square rounded), the order the kernel must keep.
func TestCountKernelExact(t *testing.T) {
	if !ksCountAVX512On {
		t.Skip("no AVX-512 on this processor")
	}
	defer func() { ksCountAVX512On = true }()
	rng := rand.New(rand.NewPCG(61, 62))
	lengths := []int{511, 512, 1023, 1024, 1025, 1100, 1280, 2047, 4095, 4096, 4097, 4096 + 1024 + 7, 3 * 4096, 33 * 128, 41*128 + 5}
	for _, d := range []int{1 << 12, 1 << 20} {
		for _, n := range lengths {
			for kind := range 6 {
				a := make([]float64, 2*n)
				s := math.Sqrt(0.5 / float64(d))
				for i := range a {
					a[i] = s * rng.NormFloat64()
				}
				for i := 0; i < n; i++ {
					switch kind {
					case 1: // many equal probabilities
						a[2*i], a[2*i+1] = 0, 0
						if i%4 == 0 {
							a[2*i] = math.Sqrt(4 / float64(d))
						}
					case 2: // zeros and subnormal squares
						switch rng.IntN(5) {
						case 0:
							a[2*i], a[2*i+1] = 0, 0
						case 1:
							a[2*i], a[2*i+1] = 1e-160*a[2*i], 0
						}
					case 3: // huge values and squares beyond the float64 range
						switch rng.IntN(9) {
						case 0:
							a[2*i] = 1e5
						case 1:
							a[2*i+1] = 1e200
						case 2:
							a[2*i] = math.Inf(-1)
						}
					case 4: // a few NaN
						if rng.IntN(300) == 0 {
							a[2*i+rng.IntN(2)] = math.NaN()
						}
					case 5: // negative zeros and every value outside the fine bins
						a[2*i], a[2*i+1] = math.Copysign(0, -1), 1e-9*a[2*i+1]
					}
				}
				var sums [2]float64
				var counts [2][]uint32
				var nans [2]bool
				for k, avx := range []bool{false, true} {
					ksCountAVX512On = avx
					h := NewHaarKS(d, 1, 0)
					sums[k] = h.CountAmplitudes(0, a)
					counts[k] = slices.Clone(h.counts[0][:h.r.nbf+4]) // not the kernel's spare counter
					nans[k] = h.nans[0]
				}
				if math.Float64bits(sums[0]) != math.Float64bits(sums[1]) && !(sums[0] != sums[0] && sums[1] != sums[1]) {
					t.Errorf("D=%d n=%d kind %d: kernel sum %.17g, Go loop %.17g", d, n, kind, sums[1], sums[0])
				}
				p := make([]float64, n)
				for i := range p {
					p[i] = float64(a[2*i]*a[2*i]) + float64(a[2*i+1]*a[2*i+1])
				}
				if want := Collision(p); math.Float64bits(sums[1]) != math.Float64bits(want) && !(want != want && sums[1] != sums[1]) {
					t.Errorf("D=%d n=%d kind %d: kernel sum %.17g, Collision %.17g", d, n, kind, sums[1], want)
				}
				if nans[0] != nans[1] {
					t.Errorf("D=%d n=%d kind %d: NaN flag %v from the kernel, %v from the Go loop", d, n, kind, nans[1], nans[0])
				}
				if !slices.Equal(counts[0], counts[1]) {
					for j := range counts[0] {
						if counts[0][j] != counts[1][j] {
							t.Errorf("D=%d n=%d kind %d: counter %d is %d from the kernel, %d from the Go loop", d, n, kind, j, counts[1][j], counts[0][j])
							break
						}
					}
				}
				var total uint64
				for _, c := range counts[1] {
					total += uint64(c)
				}
				if nans[1] {
					continue // a NaN is flagged, not counted
				}
				if total != uint64(n) {
					t.Errorf("D=%d n=%d kind %d: %d values counted, want %d", d, n, kind, total, n)
				}
			}
		}
	}
}
