package stats

import (
	"fmt"
	"testing"
)

// BenchmarkReadoutPasses times the two read-out passes of HaarKS over the
// amplitudes of a Porter–Thomas state of 2^n outputs, one worker, with
// every filter of ksKernels: count is CountAmplitudes over blocks of 4096
// amplitudes (with the kernel CountAmplitudes picks: AVX-512 where the
// processor has it, see count_amd64.go), filter the collect pass's ksFilterPairs with the
// active bins of that state.
func BenchmarkReadoutPasses(b *testing.B) {
	for _, n := range []int{16, 22} {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) { benchReadoutPasses(b, 1<<n) })
	}
}

func benchReadoutPasses(b *testing.B, d int) {
	a, pass := gaussianAmplitudes(d, 7, 8)
	h := NewHaarKS(d, 1, 0)
	f := activeFilter(h, pass)
	out := make([]float64, 4096)
	b.Run("count", func(b *testing.B) {
		b.SetBytes(16 * int64(d))
		for b.Loop() {
			pass(func(w int, q []float64) { h.CountAmplitudes(w, q) })
			h.reset()
		}
	})
	for _, k := range ksKernels() {
		b.Run("filter/"+k, func(b *testing.B) {
			defer useKernel(k)()
			b.SetBytes(16 * int64(d))
			kept := 0
			for b.Loop() {
				kept = filterAll(a, f, out)
			}
			b.ReportMetric(float64(kept)/float64(d), "kept/value")
		})
	}
}

// activeFilter returns the filter of the collect pass of HaarKS h (of one
// worker) for the state that pass hands out, and leaves h reset.
func activeFilter(h *HaarKS, pass AmplitudePass) *ksFilter {
	pass(func(w int, q []float64) { h.CountAmplitudes(w, q) })
	h.r.gather(h.counts, h.nans)
	cands, _ := h.r.select_()
	for _, ci := range cands {
		h.r.state[ci] = ksCollect
	}
	h.r.markActive()
	f := h.r.filt
	h.reset()
	return &f
}

// filterAll runs ksFilterPairs over the amplitudes a in blocks of 4096
// pairs into out (4096 values) and returns the number kept.
func filterAll(a []float64, f *ksFilter, out []float64) int {
	kept := 0
	for off := 0; off < len(a); off += 8192 {
		kept += ksFilterPairs(a[off:min(off+8192, len(a))], f, out)
	}
	return kept
}

// BenchmarkReadoutStream is the floor of BenchmarkReadoutPasses: Collision
// of the same 2^23 floats, one streaming read with four accumulators.
func BenchmarkReadoutStream(b *testing.B) {
	const d = 1 << 22
	a := make([]float64, 2*d)
	for i := range a {
		a[i] = float64(i)
	}
	b.SetBytes(16 * d)
	for b.Loop() {
		Collision(a)
	}
}
