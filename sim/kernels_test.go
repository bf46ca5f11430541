package sim

import (
	"context"
	"flag"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"runtime"
	"slices"
	"testing"
	"time"
	"unsafe"

	"mixdepth/circuits"
)

// TestKernelsPortableMatchVector: the portable Go kernels and the AVX2
// kernels compute the same products (the vector ones with fused
// multiply-adds), so they agree to rounding: 1e-13 on O(1) amplitudes after
// a handful of gates, while an index or coefficient error is O(1). Every
// ordered pair of positions on n = 2..7 qubits and every single-qubit
// position are covered, directly and through fused passes, with the 512-bit
// and with the 256-bit streaming kernel.
func TestKernelsPortableMatchVector(t *testing.T) {
	if !useAVX {
		t.Skip("no AVX2/FMA on this processor: only the portable kernels run")
	}
	has512 := useAVX512
	defer func() { useAVX, useAVX512 = true, has512 }()
	rng := rand.New(rand.NewPCG(61, 62))
	// Each comparison runs the 512-bit streaming kernel (where the processor
	// has it) and the 256-bit one against the portable code.
	var wide bool
	run := func(avx bool, n int, amp []complex128, f func(s *State)) []complex128 {
		useAVX, useAVX512 = avx, avx && wide && has512
		s := &State{Qubits: n, Amp: append([]complex128(nil), amp...)}
		f(s)
		return s.Amp
	}
	for _, wide = range []bool{true, false} {
		kernelsMatch(t, rng, run)
	}
}

func kernelsMatch(t *testing.T, rng *rand.Rand, run func(avx bool, n int, amp []complex128, f func(s *State)) []complex128) {
	for n := 2; n <= 7; n++ {
		amp := make([]complex128, 1<<n)
		for i := range amp {
			amp[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
		var m [16]complex128
		var u [4]complex128
		for i := range m {
			m[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
		for i := range u {
			u[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
		for a := range n {
			f1 := func(s *State) { s.Apply1(a, &u, 1) }
			if d := diff(run(true, n, amp, f1), run(false, n, amp, f1)); d > 1e-13 {
				t.Errorf("n=%d Apply1(%d): vector and portable kernels differ by %g", n, a, d)
			}
			for b := range n {
				if a == b {
					continue
				}
				f2 := func(s *State) { s.Apply2(a, b, &m, 1) }
				if d := diff(run(true, n, amp, f2), run(false, n, amp, f2)); d > 1e-13 {
					t.Errorf("n=%d Apply2(%d, %d): vector and portable kernels differ by %g", n, a, b, d)
				}
			}
		}
	}
	// A fused circuit on blocks (n > BlockQubits), normalised amplitudes.
	defer func(v int) { fuseMinQubits = v }(fuseMinQubits)
	fuseMinQubits = blockQubits + 1
	n := blockQubits + 2
	amp := make([]complex128, 1<<n)
	amp[0] = 1
	var ops []Op
	for i := 0; i < 60; i++ {
		op := Op{A: rng.IntN(n)}
		op.B = (op.A + 1 + rng.IntN(n-1)) % n
		for j := range op.M {
			op.M[j] = complex(rng.NormFloat64(), rng.NormFloat64()) / 4
		}
		ops = append(ops, op)
	}
	f := func(s *State) { _ = s.Run(context.Background(), ops, 2) }
	x, y := run(true, n, amp, f), run(false, n, amp, f)
	var scale float64
	for _, v := range y {
		scale = max(scale, cmplx.Abs(v))
	}
	if d := diff(x, y) / scale; d > 1e-12 {
		t.Errorf("fused passes: vector and portable kernels differ by %g (relative)", d)
	}
}

func diff(x, y []complex128) float64 {
	var d float64
	for i := range x {
		d = max(d, cmplx.Abs(x[i]-y[i]))
	}
	return d
}

// TestKernels64PortableMatchVector: the complex64 vector kernels (AVX2 for
// runs of four, AVX-512 for runs of eight) agree with the portable complex64
// code to single-precision rounding: both round each product and sum to
// 2^−24 relative, the vector ones with fused multiply-adds, so on O(1)
// amplitudes they differ by ≲ 1e−6 after one gate; 1e−5 allows for it
// while any index or coefficient error is O(1).
func TestKernels64PortableMatchVector(t *testing.T) {
	if !useAVX {
		t.Skip("no AVX2/FMA on this processor: only the portable kernels run")
	}
	has512 := useAVX512
	defer func() { useAVX, useAVX512 = true, has512 }()
	rng := rand.New(rand.NewPCG(63, 64))
	run := func(avx, wide bool, n int, amp []complex64, f func(s *State64)) []complex64 {
		useAVX, useAVX512 = avx, avx && wide && has512
		s := &State64{Qubits: n, Amp: append([]complex64(nil), amp...)}
		f(s)
		return s.Amp
	}
	diff64 := func(x, y []complex64) float64 {
		var d float64
		for i := range x {
			d = max(d, cmplx.Abs(complex128(x[i]-y[i])))
		}
		return d
	}
	for _, wide := range []bool{true, false} {
		for n := 2; n <= 7; n++ {
			amp := make([]complex64, 1<<n)
			for i := range amp {
				amp[i] = complex(float32(rng.NormFloat64()), float32(rng.NormFloat64()))
			}
			var m [16]complex128
			for i := range m {
				m[i] = complex(rng.NormFloat64(), rng.NormFloat64()) / 2
			}
			for a := range n {
				for b := range n {
					if a == b {
						continue
					}
					f := func(s *State64) { s.Apply2(a, b, &m, 1) }
					if d := diff64(run(true, wide, n, amp, f), run(false, false, n, amp, f)); d > 1e-5 {
						t.Errorf("wide=%v n=%d Apply2(%d, %d): vector and portable complex64 kernels differ by %g", wide, n, a, b, d)
					}
				}
			}
		}
		defer func(v int) { fuseMinQubits = v }(fuseMinQubits)
		fuseMinQubits = blockQubits + 1
		n := blockQubits + 2
		amp := make([]complex64, 1<<n)
		amp[0] = 1
		ops := make([]Op, 0, 40)
		for range 40 {
			op := Op{A: rng.IntN(n)}
			op.B = (op.A + 1 + rng.IntN(n-1)) % n
			for j := range op.M {
				op.M[j] = complex(rng.NormFloat64(), rng.NormFloat64()) / 4
			}
			ops = append(ops, op)
		}
		f := func(s *State64) { _ = s.Run(context.Background(), ops, 2) }
		x, y := run(true, wide, n, amp, f), run(false, false, n, amp, f)
		var scale float64
		for _, v := range y {
			scale = max(scale, cmplx.Abs(complex128(v)))
		}
		if d := diff64(x, y) / scale; d > 1e-4 {
			t.Errorf("wide=%v fused passes: complex64 vector and portable kernels differ by %g (relative)", wide, d)
		}
	}
}

// TestX2BitIdentical: the x2 kernels (apply2RunsAVX512x2, apply2Q0AVX512x2,
// apply2RunsAVXx2, apply2Q0AVXx2, and the shuffling apply2R1AVX512x2 and
// apply2Q01AVX512x2 of the pairs (1, q) and (0, 1), with useX2Low on and
// off) and the column-by-column apply2RunsAVX512x4 (useX4 on and off)
// perform, lane by lane, the arithmetic of
// the one-iteration kernels they replace, and apply2RunsAVX512 and
// apply2Q0AVX512 that of apply2RunsAVX and apply2Q0AVX, in the same order,
// so the amplitudes
// must be equal bit for bit (==, no tolerance: the reference is the existing
// one-gate kernel, and any change of operation order would show as a
// last-bit difference on some of the 2^n random amplitudes). Every ordered
// pair of positions on 5 to 8 qubits, and sub-ranges of groups that
// start and end on multiples of 16 or 8, as parallelFor splits them, or only
// of 4 or 2, where the dispatch falls back to the narrower kernels.
func TestX2BitIdentical(t *testing.T) {
	if !useAVX512 {
		t.Skip("no AVX-512 on this processor: the x2 kernels never run")
	}
	defer func() { useX2, useX2Low, useX4 = true, true, true }()
	rng := rand.New(rand.NewPCG(71, 72))
	for n := 5; n <= 8; n++ {
		amp := make([]complex128, 1<<n)
		for i := range amp {
			amp[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
		groups := 1 << (n - 2)
		for a := 0; a < n; a++ {
			for b := 0; b < n; b++ {
				if a == b {
					continue
				}
				var m [16]complex128
				for i := range m {
					m[i] = complex(rng.NormFloat64(), rng.NormFloat64()) / 2
				}
				k := newKernel2(a, b, &m)
				for _, r := range [][2]int{{0, groups}, {16, groups}, {0, groups - 16}, {8, groups}, {0, groups - 8}, {4, groups - 4}, {2, groups - 2}} {
					if r[0] >= r[1] {
						continue
					}
					want := append([]complex128(nil), amp...)
					useX2 = false
					apply2Kernel(want, &k, r[0], r[1])
					// The 256-bit one-iteration kernels, called directly,
					// must agree with each other too.
					alt := append([]complex128(nil), amp...)
					if k.lo == 0 {
						apply2Q0AVX(unsafe.SliceData(alt), uint(k.hi), r[0], r[1], &k.c)
					} else {
						apply2RunsAVX(unsafe.SliceData(alt), uint(k.lo), uint(k.hi), r[0], r[1], &k.c)
					}
					got := append([]complex128(nil), amp...)
					useX2 = true
					apply2Kernel(got, &k, r[0], r[1])
					// The 256-bit x2 kernels that the new 512-bit ones of
					// qubit 1 and of (0, 1) replace.
					low := append([]complex128(nil), amp...)
					useX2Low = false
					apply2Kernel(low, &k, r[0], r[1])
					useX2Low = true
					// The eight-group runs kernel that apply2RunsAVX512x4
					// replaces on ranges aligned to sixteen groups.
					two := append([]complex128(nil), amp...)
					useX4 = false
					apply2Kernel(two, &k, r[0], r[1])
					useX4 = true
					for i := range got {
						if got[i] != want[i] || alt[i] != want[i] || low[i] != want[i] || two[i] != want[i] {
							t.Fatalf("n=%d gate (%d,%d) groups %v: amplitude %d is %v (x2), %v (x2, 256-bit low pairs), %v (x2, eight-group runs), %v (512), %v (256)",
								n, a, b, r, i, got[i], low[i], two[i], want[i], alt[i])
						}
					}
				}
			}
		}
	}
}

// TestRunBitIdenticalToApply2: a brickwork on a line and a grid-like
// circuit run as fused block passes, with the unrolled kernel
// (apply2RunsAVX512x2) where it applies, give exactly (==) the amplitudes of the same passes' gates applied with
// Apply2 one at a time to the whole state, in the pass order (planPasses
// lets a pass's gates overtake left-out gates on other qubits, so the plain
// circuit order rounds differently, by ~1e-16 relative). Apply2 takes the
// one-gate kernel of the same class (position 0, position 1, or runs), whose
// lanes see the same instructions in the same order, so nothing may change
// in the last bit. The reference always takes the existing one-gate kernels
// (useX2 off); Run takes the new one, the old one, and, with the dispatch
// forced off, the portable Go kernels (against a portable reference).
//
// It runs with blocks of 14 qubits (4 low) and of 16 (6 low), the smallest
// and largest shapes blockSize chooses, whatever this machine's cache.
func TestRunBitIdenticalToApply2(t *testing.T) {
	defer func(k, low int) { blockQubits, blockLow = k, low }(blockQubits, blockLow)
	for _, k := range []int{14, 16} {
		blockQubits, blockLow = k, k-10
		testRunBitIdentical(t)
	}
}

// testRunBitIdentical is TestRunBitIdenticalToApply2 with the block shape
// in blockQubits and blockLow.
func testRunBitIdentical(t *testing.T) {
	defer func(v int) { fuseMinQubits = v }(fuseMinQubits)
	fuseMinQubits = blockQubits + 1
	has, has512 := useAVX, useAVX512
	defer func() { useAVX, useAVX512, useX2, useX2Low = has, has512, true, true }()
	rng := rand.New(rand.NewPCG(73, 74))
	const n = 17
	var line, grid []Op
	for layer := range 12 {
		for a := layer % 2; a+1 < n; a += 2 {
			line = append(line, Op{A: a, B: a + 1})
		}
	}
	// 17 qubits: a 4×4 grid's horizontal and vertical classes, plus qubit 16
	// coupled to a different qubit in each vertical layer.
	const c = 4
	for layer := range 12 {
		switch layer % 4 {
		case 0, 1:
			for r := range 4 {
				for col := layer % 2; col+1 < c; col += 2 {
					grid = append(grid, Op{A: r*c + col, B: r*c + col + 1})
				}
			}
		default:
			for r := layer % 2; r+1 < 4; r += 2 {
				for col := range c {
					grid = append(grid, Op{A: (r+1)*c + col, B: r*c + col})
				}
			}
			grid = append(grid, Op{A: n - 1, B: layer % (n - 1)})
		}
	}
	amp := make([]complex128, 1<<n)
	for i := range amp {
		amp[i] = complex(rng.NormFloat64(), rng.NormFloat64()) / 256
	}
	for _, circ := range []struct {
		name string
		ops  []Op
	}{{"line", line}, {"grid", grid}} {
		for i := range circ.ops {
			circuits.HaarUnitary(rng, 4, circ.ops[i].M[:])
		}
		for _, mode := range []struct {
			name    string
			avx, x2 bool
			low     bool
		}{{"vector x2", true, true, true}, {"vector x2 256-bit low pairs", true, true, false}, {"vector", true, false, true}, {"portable", false, false, true}} {
			useAVX, useAVX512, useX2, useX2Low = mode.avx && has, mode.avx && has512, false, mode.low
			ref := &State{Qubits: n, Amp: append([]complex128(nil), amp...)}
			var gates int
			for _, p := range planPasses(n, circ.ops, blockQubits) {
				for _, o := range p.ops {
					ref.Apply2(o.a, o.b, &o.m, 1)
					gates++
				}
			}
			if gates != len(circ.ops) {
				t.Fatalf("%s: the plan has %d gates, the circuit %d (none may merge here)", circ.name, gates, len(circ.ops))
			}
			useX2 = mode.x2
			for _, workers := range []int{1, 2} {
				s := &State{Qubits: n, Amp: append([]complex128(nil), amp...)}
				if err := s.Run(context.Background(), circ.ops, workers); err != nil {
					t.Fatal(err)
				}
				for i := range s.Amp {
					if s.Amp[i] != ref.Amp[i] {
						t.Fatalf("blocks of %d: %s %s workers=%d: amplitude %d is %v fused, %v gate by gate",
							blockQubits, circ.name, mode.name, workers, i, s.Amp[i], ref.Amp[i])
					}
				}
			}
		}
	}
}

// BenchmarkBlockPass times the kernels of a fused pass on one block of
// 2^BlockQubits amplitudes that stays in cache (applyLocal, one core): a
// 20-layer brickwork on the block's 14 positions, with the unrolled runs
// kernel (x2, apply2RunsAVX512x2) and with the one it replaces (one,
// apply2RunsAVX512); -count alternates them in one run.
// ns/gate-amp is the compute cost per gate per amplitude, the quantity the
// fused speed-up's ceiling is made of.
func BenchmarkBlockPass(b *testing.B) {
	k := blockQubits
	rng := rand.New(rand.NewPCG(81, 82))
	var ops []Op
	for layer := range 20 {
		for a := layer % 2; a+1 < k; a += 2 {
			op := Op{A: a, B: a + 1}
			circuits.HaarUnitary(rng, 4, op.M[:])
			ops = append(ops, op)
		}
	}
	p := newPass(k, allMask(k), ops)
	x := benchBlock(rng, k)
	defer func() { useX2 = true }()
	kops := p.kernels(false)
	for _, mode := range []struct {
		name string
		x2   bool
	}{{"x2", true}, {"one", false}} {
		b.Run(mode.name, func(b *testing.B) {
			useX2 = mode.x2
			for b.Loop() {
				applyLocal(x, k, kops)
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(len(kops)*len(x)), "ns/gate-amp")
		})
	}
}

// BenchmarkFusedTargets measures the fused-brickwork targets of
// scripts/bench (fused_speedup_line:26, fused_speedup_grid:5x5: 20 layers of
// the layered schedule with Haar gates, the target's seed) in one run,
// alternating five timings per round so that load from other processes
// hits them alike: Run with the kernels in use (fused) and with the
// eight-group runs kernel that apply2RunsAVX512x4 replaces (fused-x2, useX4
// off), Apply2 gate by gate with each (one-by-one, one-by-one-x2), and the
// fused passes' data movement alone (moves: each pass's blocks gathered and
// scattered back as Run does, with no gates applied); best of -rounds. It
// reports ms per gate (moves: the passes' time over the circuit's gates),
// the speed-ups one-by-one/fused (the target, ≥ 2) and fused-x2/fused, and
// the CPU time per gate of each (cpu-ms/gate, both workers' time added). A
// 26-qubit state takes 1 GiB; run it with -benchtime 1x.
func BenchmarkFusedTargets(b *testing.B) {
	workers := runtime.NumCPU()
	defer func() { useX4 = true }()
	for _, spec := range []string{"line:26", "grid:5x5"} {
		b.Run(spec, func(b *testing.B) {
			g, err := circuits.ParseGraph(spec)
			if err != nil {
				b.Fatal(err)
			}
			sch, err := circuits.NewSchedule("layered", g)
			if err != nil {
				b.Fatal(err)
			}
			rng := rand.New(rand.NewPCG(4, 5)) // the target's circuit
			var ops []Op
			var edges []circuits.Edge
			for layer := range 20 {
				edges = sch.Step(layer, nil, edges[:0])
				for _, e := range edges {
					op := Op{A: e.A, B: e.B}
					circuits.HaarUnitary(rng, 4, op.M[:])
					ops = append(ops, op)
				}
			}
			s, err := NewState(g.Qubits, 0)
			if err != nil {
				b.Fatal(err)
			}
			// The passes Run makes of ops, for the data movement alone.
			passes := planPasses(g.Qubits, ops, passQubits(g.Qubits))
			bufs := make([][]complex128, workers)
			moves := func() {
				for i := range passes {
					if p := &passes[i]; len(p.ops) > 0 {
						runPass(g.Qubits, s.Amp, p, nil, bufs, nil)
					}
				}
			}
			const (
				run = iota
				oneByOne
				move
			)
			kinds := []struct {
				name string
				x4   bool
				what int
			}{{"fused", true, run}, {"fused-x2", false, run}, {"one-by-one", true, oneByOne}, {"one-by-one-x2", false, oneByOne}, {"moves", true, move}}
			best, bestCPU := make([]float64, len(kinds)), make([]float64, len(kinds))
			for i := range best {
				best[i], bestCPU[i] = math.Inf(1), math.Inf(1)
			}
			for b.Loop() {
				for r := range *fusedRounds {
					for j := range kinds {
						idx := (j + r) % len(kinds) // rotate which goes first
						kk := kinds[idx]
						useX4 = kk.x4
						start, cpu0 := time.Now(), cpuSeconds()
						switch kk.what {
						case oneByOne:
							for i := range ops {
								s.Apply2(ops[i].A, ops[i].B, &ops[i].M, workers)
							}
						case run:
							_ = s.Run(context.Background(), ops, workers)
						default:
							moves()
						}
						t := time.Since(start).Seconds() * 1e3 / float64(len(ops))
						c := (cpuSeconds() - cpu0) * 1e3 / float64(len(ops))
						best[idx] = min(best[idx], t)
						bestCPU[idx] = min(bestCPU[idx], c)
					}
				}
			}
			for i, k := range kinds {
				b.ReportMetric(best[i], k.name+"-ms/gate")
				b.ReportMetric(bestCPU[i], k.name+"-cpu-ms/gate")
			}
			b.ReportMetric(best[2]/best[0], "target-speedup")
			b.ReportMetric(best[3]/best[1], "x2-target-speedup")
			b.ReportMetric(best[1]/best[0], "fused-x2/fused")
			b.ReportMetric(best[4]/best[0], "moves/fused")
		})
	}
}

var fusedRounds = flag.Int("rounds", 3, "rounds of BenchmarkFusedTargets")

// BenchmarkKernelClass times one Haar gate per qubit-pair class on a block
// of 2^BlockQubits amplitudes that stays in cache (one core, apply2Kernel
// as a fused pass calls it), with the kernels in use (x2: for the runs
// pairs apply2RunsAVX512x4), with the eight-group runs kernel it replaces
// (x2-8, useX4 off), with the 256-bit x2 kernels that the pairs with qubit 1
// took before (x2-256, useX2Low off) and with the one-iteration ones (one):
// ns/amp is the time per gate per amplitude. The classes are those
// apply2Kernel tells apart: the pairs (0, 1), (0, q ≥ 2), (1, 2), (1, q ≥ 3)
// and two runs pairs (lo ≥ 2). -count repeats the modes in turn, so the
// runs of x2 and x2-8 alternate.
func BenchmarkKernelClass(b *testing.B) {
	k := blockQubits
	rng := rand.New(rand.NewPCG(83, 84))
	x := benchBlock(rng, k)
	defer func() { useX2, useX2Low, useX4 = true, true, true }()
	for _, pair := range [][2]int{{0, 1}, {0, 5}, {1, 2}, {1, 5}, {2, 3}, {4, 9}} {
		var m [16]complex128
		circuits.HaarUnitary(rng, 4, m[:])
		kn := newKernel2(pair[0], pair[1], &m)
		for _, mode := range []struct {
			name          string
			x2, x2Low, x4 bool
		}{{"x2", true, true, true}, {"x2-8", true, true, false}, {"x2-256", true, false, true}, {"one", false, false, false}} {
			if mode.name == "x2-256" && pair[0] != 1 && pair != [2]int{0, 1} {
				continue // the same kernel as x2
			}
			if mode.name == "x2-8" && pair[0] < 2 {
				continue // the same kernel as x2
			}
			b.Run(fmt.Sprintf("%d-%d/%s", pair[0], pair[1], mode.name), func(b *testing.B) {
				useX2, useX2Low, useX4 = mode.x2, mode.x2Low, mode.x4
				for b.Loop() {
					apply2Kernel(x, &kn, 0, 1<<(k-2))
				}
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(len(x)), "ns/amp")
			})
		}
	}
}

// BenchmarkKernelAB compares, for a few runs pairs, the kernel apply2Kernel
// takes (new: apply2RunsAVX512x4) with the one it replaces (old:
// apply2RunsAVX512x2) on one block of 2^BlockQubits amplitudes in cache,
// alternating them every fraction of a millisecond within one run: each
// round times reps gates with one kernel, then reps with the other (which
// goes first alternates between rounds), so that other load on the shared
// machine hits both alike. It reports the median over rounds of each one's
// ns per gate per amplitude and of the ratio old/new of the same round. Pin
// it to one core (taskset).
func BenchmarkKernelAB(b *testing.B) {
	k := blockQubits
	rng := rand.New(rand.NewPCG(85, 86))
	x := benchBlock(rng, k)
	groups := 1 << (k - 2)
	for _, pair := range [][2]int{{2, 3}, {4, 5}, {4, 9}, {8, 13}} {
		var m [16]complex128
		circuits.HaarUnitary(rng, 4, m[:])
		kn := newKernel2(pair[0], pair[1], &m)
		old := func() {
			apply2RunsAVX512x2(unsafe.SliceData(x), uint(kn.lo), uint(kn.hi), 0, groups, &kn.cz)
		}
		b.Run(fmt.Sprintf("%d-%d", pair[0], pair[1]), func(b *testing.B) {
			const reps = 16
			var tNew, tOld, ratio []float64
			timed := func(isNew bool) float64 {
				start := time.Now()
				for range reps {
					if isNew {
						apply2Kernel(x, &kn, 0, groups)
					} else {
						old()
					}
				}
				return float64(time.Since(start).Nanoseconds()) / reps / float64(len(x))
			}
			for r := 0; b.Loop(); r++ {
				var a, c float64
				if r%2 == 0 {
					a = timed(true)
					c = timed(false)
				} else {
					c = timed(false)
					a = timed(true)
				}
				tNew, tOld, ratio = append(tNew, a), append(tOld, c), append(ratio, c/a)
			}
			b.ReportMetric(median(tNew), "new-ns/amp")
			b.ReportMetric(median(tOld), "old-ns/amp")
			b.ReportMetric(median(ratio), "old/new")
		})
	}
}

// benchBlock returns 2^k random amplitudes of magnitude about 1/128 (no
// subnormal values arise in a few thousand gates on them) for the kernel
// benchmarks.
func benchBlock(rng *rand.Rand, k int) []complex128 {
	x := make([]complex128, 1<<k)
	for i := range x {
		x[i] = complex(rng.NormFloat64(), rng.NormFloat64()) / 128
	}
	return x
}

// median returns the median of v (v is reordered).
func median(v []float64) float64 {
	slices.Sort(v)
	n := len(v)
	if n%2 == 1 {
		return v[n/2]
	}
	return (v[n/2-1] + v[n/2]) / 2
}
