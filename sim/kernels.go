package sim

import "unsafe"

// Amplitude is the element type of a state vector: complex128 (State) or
// complex64 (State64).
type Amplitude interface {
	complex64 | complex128
}

// coef2 holds the split coefficients of a two-qubit gate for the AVX
// kernels: 32 vectors of four float64 (layout in kernels_amd64.s).
type coef2 [32][4]float64

// coef2z holds the coefficients of coef2 as 512-bit vectors (each pair of
// lanes repeated).
type coef2z [32][8]float64

// coef1 holds the split coefficients of a single-qubit gate.
type coef1 [8][4]float64

// kernel2 is a two-qubit gate ready for the kernels: positions lo < hi and
// the canonical matrix in the basis 2·b_hi + b_lo, plus its AVX coefficients
// when the AVX kernels are in use.
type kernel2 struct {
	lo, hi int
	m      [16]complex128
	c      coef2
	cz     coef2z
}

// kernel1 is a single-qubit gate ready for the kernels.
type kernel1 struct {
	q int
	m [4]complex128
	c coef1
}

// canonical2 returns the matrix of m on (a, b) in the kernels' basis
// 2·b_hi + b_lo, hi = max(a, b): m itself when a > b, and m with the middle
// two basis states exchanged when a < b.
func canonical2(a, b int, m *[16]complex128) [16]complex128 {
	if a > b {
		return *m
	}
	perm := [4]int{0, 2, 1, 3}
	var c [16]complex128
	for r := range 4 {
		for l := range 4 {
			c[4*r+l] = m[4*perm[r]+perm[l]]
		}
	}
	return c
}

// newKernel2 prepares gate m on qubits (a, b).
func newKernel2(a, b int, m *[16]complex128) kernel2 {
	k := kernel2{lo: min(a, b), hi: max(a, b), m: canonical2(a, b, m)}
	if useAVX {
		if k.lo == 0 {
			splitQ0(&k.m, &k.c)
		} else {
			splitRuns(&k.m, &k.c)
			if useAVX512 {
				for i := range k.c {
					copy(k.cz[i][:4], k.c[i][:])
					copy(k.cz[i][4:], k.c[i][:])
				}
			}
		}
	}
	return k
}

// newKernel1 prepares gate m on qubit q.
func newKernel1(q int, m *[4]complex128) kernel1 {
	k := kernel1{q: q, m: *m}
	if useAVX {
		if q == 0 {
			split1Q0(&k.m, &k.c)
		} else {
			split1(&k.m, &k.c)
		}
	}
	return k
}

// splitPair writes the vectors [re0, re0, re1, re1] and
// [−im0, im0, −im1, im1] of the lane coefficients (c0, c1): multiplying a
// vector [a0, b0, a1, b1] of two amplitudes by the first and its re/im-swapped
// form [b0, a0, b1, a1] by the second, and adding, gives (c0·z0, c1·z1).
func splitPair(c0, c1 complex128, re, im *[4]float64) {
	*re = [4]float64{real(c0), real(c0), real(c1), real(c1)}
	*im = [4]float64{-imag(c0), imag(c0), -imag(c1), imag(c1)}
}

// splitRuns fills c for apply2RunsAVX: entry (r, l) broadcast to both lanes.
func splitRuns(m *[16]complex128, c *coef2) {
	for r := range 4 {
		for l := range 4 {
			splitPair(m[4*r+l], m[4*r+l], &c[8*r+2*l], &c[8*r+2*l+1])
		}
	}
}

// splitQ0 fills c for apply2Q0AVX. Output P' = [out0, out1] takes lane
// coefficients (m00, m11) on P = [v0, v1], (m01, m10) on Ps = [v1, v0],
// (m02, m13) on Q = [v2, v3] and (m03, m12) on Qs = [v3, v2]; Q' = [out2,
// out3] likewise with rows 2 and 3.
func splitQ0(m *[16]complex128, c *coef2) {
	for o := range 2 {
		r0, r1 := 2*o, 2*o+1 // the rows in lanes 0 and 1
		pairs := [4][2]complex128{
			{m[4*r0+0], m[4*r1+1]}, // P
			{m[4*r0+1], m[4*r1+0]}, // Ps
			{m[4*r0+2], m[4*r1+3]}, // Q
			{m[4*r0+3], m[4*r1+2]}, // Qs
		}
		for v, p := range pairs {
			splitPair(p[0], p[1], &c[8*o+2*v], &c[8*o+2*v+1])
		}
	}
}

// split1 fills c for apply1AVX: entry (r, l) broadcast to both lanes.
func split1(m *[4]complex128, c *coef1) {
	for r := range 2 {
		for l := range 2 {
			splitPair(m[2*r+l], m[2*r+l], &c[4*r+2*l], &c[4*r+2*l+1])
		}
	}
}

// split1Q0 fills c for apply1Q0AVX: P' = (m00, m11)⊙P + (m01, m10)⊙Ps.
func split1Q0(m *[4]complex128, c *coef1) {
	splitPair(m[0], m[3], &c[0], &c[1])
	splitPair(m[1], m[2], &c[2], &c[3])
}

// apply2Kernel applies k to the groups [from, to) of amp (complex128), with
// the AVX kernels when they are in use. Group boundaries must be even when
// k.lo ≥ 1 and the AVX kernels run; parallelFor keeps them so.
func apply2Kernel(amp []complex128, k *kernel2, from, to int) {
	if from >= to {
		return
	}
	if useAVX {
		x := unsafe.SliceData(amp)
		switch {
		case k.lo == 0:
			apply2Q0AVX(x, uint(k.hi), from, to, &k.c)
		case useAVX512 && k.lo >= 2 && from%4 == 0 && to%4 == 0:
			apply2RunsAVX512(x, uint(k.lo), uint(k.hi), from, to, &k.cz)
		default:
			apply2RunsAVX(x, uint(k.lo), uint(k.hi), from, to, &k.c)
		}
		return
	}
	apply2Scalar(amp, k.lo, k.hi, &k.m, from, to)
}

// apply1Kernel applies k to the pairs [from, to) of amp (complex128).
func apply1Kernel(amp []complex128, k *kernel1, from, to int) {
	if from >= to {
		return
	}
	if useAVX {
		x := unsafe.SliceData(amp)
		if k.q == 0 {
			apply1Q0AVX(x, from, to, &k.c)
		} else {
			apply1AVX(x, uint(k.q), from, to, &k.c)
		}
		return
	}
	apply1Scalar(amp, k.q, &k.m, from, to)
}

// apply2Scalar applies the canonical matrix m on (lo, hi), lo < hi, to the
// groups k in [from, to): group k has base index i with bits lo and hi zero
// and members i, i+2^lo, i+2^hi, i+2^lo+2^hi. When lo ≥ 2 the groups with the
// same bits above lo form runs of consecutive base indices, streamed as four
// slices so that the compiler drops the bounds checks in the inner loop.
func apply2Scalar[T Amplitude](amp []T, lo, hi int, m *[16]T, from, to int) {
	llo, lhi := 1<<lo, 1<<hi
	loMask, hiMask := llo-1, lhi-1
	m00, m01, m02, m03 := m[0], m[1], m[2], m[3]
	m10, m11, m12, m13 := m[4], m[5], m[6], m[7]
	m20, m21, m22, m23 := m[8], m[9], m[10], m[11]
	m30, m31, m32, m33 := m[12], m[13], m[14], m[15]
	insert := func(k int) int {
		i := (k>>lo)<<(lo+1) | k&loMask
		return (i>>hi)<<(hi+1) | i&hiMask
	}
	if lo < 2 {
		for k := from; k < to; k++ {
			i := insert(k)
			i1, i2, i3 := i|llo, i|lhi, i|llo|lhi
			v0, v1, v2, v3 := amp[i], amp[i1], amp[i2], amp[i3]
			amp[i] = m00*v0 + m01*v1 + m02*v2 + m03*v3
			amp[i1] = m10*v0 + m11*v1 + m12*v2 + m13*v3
			amp[i2] = m20*v0 + m21*v1 + m22*v2 + m23*v3
			amp[i3] = m30*v0 + m31*v1 + m32*v2 + m33*v3
		}
		return
	}
	for k := from; k < to; {
		end := min(k&^loMask+llo, to)
		i := insert(k)
		w := end - k
		x0 := amp[i : i+w]
		x1 := amp[i|llo : i|llo+w]
		x2 := amp[i|lhi : i|lhi+w]
		x3 := amp[i|llo|lhi : i|llo|lhi+w]
		x1, x2, x3 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)]
		for j, v0 := range x0 {
			v1, v2, v3 := x1[j], x2[j], x3[j]
			x0[j] = m00*v0 + m01*v1 + m02*v2 + m03*v3
			x1[j] = m10*v0 + m11*v1 + m12*v2 + m13*v3
			x2[j] = m20*v0 + m21*v1 + m22*v2 + m23*v3
			x3[j] = m30*v0 + m31*v1 + m32*v2 + m33*v3
		}
		k = end
	}
}

// apply1Scalar applies m to qubit q for the pairs k in [from, to): pair k
// has members i (bit q zero) and i+2^q, streamed as two slices when q ≥ 2.
func apply1Scalar[T Amplitude](amp []T, q int, m *[4]T, from, to int) {
	bit, mask := 1<<q, 1<<q-1
	m00, m01, m10, m11 := m[0], m[1], m[2], m[3]
	if q < 2 {
		for k := from; k < to; k++ {
			i := (k>>q)<<(q+1) | k&mask
			j := i | bit
			v0, v1 := amp[i], amp[j]
			amp[i] = m00*v0 + m01*v1
			amp[j] = m10*v0 + m11*v1
		}
		return
	}
	for k := from; k < to; {
		end := min(k&^mask+bit, to)
		i := (k>>q)<<(q+1) | k&mask
		w := end - k
		x0 := amp[i : i+w]
		x1 := amp[i|bit : i|bit+w]
		x1 = x1[:len(x0)]
		for j, v0 := range x0 {
			v1 := x1[j]
			x0[j] = m00*v0 + m01*v1
			x1[j] = m10*v0 + m11*v1
		}
		k = end
	}
}
