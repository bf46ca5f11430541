//go:build linux

package stats

import (
	"fmt"
	"runtime"
	"syscall"
	"testing"
	"unsafe"
)

// threadCPU returns the CPU time of the calling OS thread in nanoseconds
// (clock_gettime of CLOCK_THREAD_CPUTIME_ID, 3 on Linux): on a machine
// shared with other jobs it counts the time this thread ran, not the time
// it waited for a core, so that benchmarks taken under load stay
// comparable.
func threadCPU() int64 {
	var ts syscall.Timespec
	if _, _, e := syscall.Syscall(syscall.SYS_CLOCK_GETTIME, 3, uintptr(unsafe.Pointer(&ts)), 0); e != 0 {
		panic(e)
	}
	return ts.Nano()
}

// BenchmarkReadoutCPU times the read-out of HaarKS over a Porter–Thomas
// state of 2^n amplitudes on one worker, the count pass alone (count:
// CountAmplitudes over blocks of 4096 amplitudes, as the simulator hands
// them) and the whole read-out (readout: the count pass, then
// FinishAmplitudes), with the count pass's Go loop (go) and, where the
// processor has it, its AVX-512 kernel (avx512), in the same rounds so that
// the two can be compared on a loaded machine. It reports the thread's CPU
// time per amplitude (cpu-ns/amp) besides the wall time, which a loaded
// machine inflates.
func BenchmarkReadoutCPU(b *testing.B) {
	kernels := []string{"go"}
	if ksUseAVX512 {
		kernels = append(kernels, "avx512")
	}
	saved := ksUseAVX512
	defer func() { ksUseAVX512 = saved }()
	for _, n := range []int{12, 14, 16, 18, 20, 22, 24} {
		d := 1 << n
		_, pass := gaussianAmplitudes(d, uint64(n), 9)
		h := NewHaarKS(d, 1, 0)
		count := func(w int, q []float64) { h.CountAmplitudes(w, q) }
		for _, part := range []string{"count", "readout"} {
			for _, k := range kernels {
				b.Run(fmt.Sprintf("n=%d/%s/%s", n, part, k), func(b *testing.B) {
					ksUseAVX512 = k == "avx512"
					runtime.LockOSThread()
					defer runtime.UnlockOSThread()
					b.SetBytes(16 * int64(d))
					var cpu int64
					for b.Loop() {
						t0 := threadCPU()
						pass(count)
						if part == "readout" {
							h.FinishAmplitudes(pass)
						} else {
							h.reset()
						}
						cpu += threadCPU() - t0
					}
					b.ReportMetric(float64(cpu)/float64(b.N)/float64(d), "cpu-ns/amp")
				})
			}
		}
	}
}
