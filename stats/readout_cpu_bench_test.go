//go:build linux

package stats

import (
	"fmt"
	"runtime"
	"strings"
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
// state of 2^n amplitudes on one worker: the count pass alone (count:
// CountAmplitudes over blocks of 4096 amplitudes, as the simulator hands
// them) with its Go loop (count/go) and, where the processor has it, its
// AVX-512 kernel (count/avx512); the whole read-out (readout: the count
// pass, then FinishAmplitudes) and the collect pass's filter alone (filter:
// ksFilterPairs with the state's active bins), these two with each filter
// of ksKernels. All run in the same rounds, so that they can be compared on
// a loaded machine. It reports the thread's CPU time per amplitude
// (cpu-ns/amp) besides the wall time, which a loaded machine inflates.
func BenchmarkReadoutCPU(b *testing.B) {
	counts := []string{"go"}
	if ksCountAVX512On {
		counts = append(counts, "avx512")
	}
	saved := ksCountAVX512On
	defer func() { ksCountAVX512On = saved }()
	for _, n := range []int{12, 14, 16, 18, 20, 22, 24} {
		d := 1 << n
		a, pass := gaussianAmplitudes(d, uint64(n), 9)
		h := NewHaarKS(d, 1, 0)
		count := func(w int, q []float64) { h.CountAmplitudes(w, q) }
		f, out := activeFilter(h, pass), make([]float64, 4096)
		var parts []string
		for _, k := range counts {
			parts = append(parts, "count/"+k)
		}
		for _, k := range ksKernels() {
			parts = append(parts, "readout/"+k, "filter/"+k)
		}
		for _, part := range parts {
			b.Run(fmt.Sprintf("n=%d/%s", n, part), func(b *testing.B) {
				runtime.LockOSThread()
				defer runtime.UnlockOSThread()
				what, k, _ := strings.Cut(part, "/")
				if what == "count" {
					ksCountAVX512On = k == "avx512"
					defer func() { ksCountAVX512On = saved }()
				} else {
					defer useKernel(k)()
				}
				b.SetBytes(16 * int64(d))
				var cpu int64
				kept := 0
				for b.Loop() {
					t0 := threadCPU()
					switch what {
					case "filter":
						kept = filterAll(a, f, out)
					case "count":
						pass(count)
						h.reset()
					default:
						pass(count)
						h.FinishAmplitudes(pass)
					}
					cpu += threadCPU() - t0
				}
				b.ReportMetric(float64(cpu)/float64(b.N)/float64(d), "cpu-ns/amp")
				if kept > 0 {
					b.ReportMetric(float64(kept)/float64(d), "kept/value")
				}
			})
		}
	}
}
