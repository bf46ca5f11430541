//go:build !unix

package sim

import "math"

// cpuSeconds is not measured here: BenchmarkFusedTargets then reports NaN
// for its CPU times and only its wall times count.
func cpuSeconds() float64 { return math.NaN() }
