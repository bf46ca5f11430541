package stats_test

import (
	"fmt"
	"math"

	"mixdepth/stats"
)

// Z_H = 2/(D+1) for ten qubits (Dalzell, Hunter-Jones, Brandão 2022).
func ExampleHaarCollision() {
	fmt.Printf("%.6f\n", stats.HaarCollision(1024))
	// Output: 0.001951
}

// The uniform vector is far from the Haar law: its statistic is
// 1 − (3/4)³ = 37/64 for D = 4.
func ExampleKSHaar() {
	fmt.Println(stats.KSHaar([]float64{0.25, 0.25, 0.25, 0.25}, nil))
	// Output: 0.578125
}

// Samples needed to see fidelity 0.002 at five standard deviations
// (N = z²(1+2f−f²)/f² for the linear XEB under global depolarization).
func ExampleXEBSamples() {
	fmt.Printf("%.0f\n", stats.XEBSamples(0.002, 5))
	// Output: 6274975
}

// A ratio with its 95% interval from 10 instances. By hand: R = 0.0021·1025/2
// = 1.07625 and the half-width is t_{0.975,9}·0.0003/√10·1025/2 =
// 2.262157·9.4868e-5·512.5 = 0.1100.
func ExampleRatioInterval() {
	s := stats.Summary{N: 10, Mean: 0.0021, StdDev: 0.0003, StdErr: 0.0003 / math.Sqrt(10)}
	r, lo, hi := stats.RatioInterval(s, stats.HaarCollision(1024), 0.95)
	fmt.Printf("R = %.3f [%.3f, %.3f]\n", r, lo, hi)
	d, ok := stats.AnticoncentrationDepth([]int{4, 8, 12}, []float64{1.9, hi, 1.01}, 0.05)
	fmt.Println(d, ok)
	// Output:
	// R = 1.076 [0.966, 1.186]
	// 12 true
}

// The read-out of a state vector in two passes over its amplitudes: here
// the two-qubit state (|00⟩ + |01⟩ + |10⟩ + |11⟩)/2 as (re, im) pairs. Its
// probabilities are all 1/4, so Z = 4·(1/4)² = 0.25, and the KS distance
// to Beta(1, 3) is F(1/4) = 1 − (3/4)³ = 37/64 = 0.578125 (by hand).
func ExampleHaarKS_CountAmplitudes() {
	amps := []float64{0.5, 0, 0.5, 0, 0, 0.5, 0, -0.5}
	pass := func(visit func(w int, a []float64)) { visit(0, amps) }
	h := stats.NewHaarKS(4, 1, 0)
	var z float64
	pass(func(w int, a []float64) { z += h.CountAmplitudes(w, a) })
	ks, _ := h.FinishAmplitudes(pass)
	fmt.Printf("Z = %.6f, KS = %.6f\n", z, ks)
	// Output: Z = 0.250000, KS = 0.578125
}
