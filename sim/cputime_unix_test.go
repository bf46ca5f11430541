//go:build unix

package sim

import (
	"math"
	"syscall"
)

// cpuSeconds returns the user and system CPU time of the process: under
// load from other processes it counts only the time this one ran, a
// steadier comparison than wall time (all workers' time added).
func cpuSeconds() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return math.NaN()
	}
	return float64(ru.Utime.Nano()+ru.Stime.Nano()) / 1e9
}
