package sim

import "unsafe"

// amplitude is the element type of a state vector: complex128 (State) or
// complex64 (State64).
type amplitude interface {
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

// coef2s and coef2sz hold the coefficients of coef2 in single precision,
// each pair of float32 lanes repeated across a 256-bit or 512-bit vector.
type (
	coef2s  [32][8]float32
	coef2sz [32][16]float32
)

// kernel2s is a two-qubit gate ready for the complex64 kernels: the
// canonical matrix rounded to single precision and its vector coefficients.
type kernel2s struct {
	lo, hi int
	m      [16]complex64
	c      coef2s
	cz     coef2sz
}

// newKernel2s prepares gate m on qubits (a, b) for complex64 amplitudes.
func newKernel2s(a, b int, m *[16]complex128) kernel2s {
	c := canonical2(a, b, m)
	k := kernel2s{lo: min(a, b), hi: max(a, b)}
	for i, v := range c {
		k.m[i] = complex64(v)
	}
	if useAVX && (k.lo >= 2 || (k.lo == 0 && k.hi >= 2)) {
		var d coef2
		var m64 [16]complex128
		for i, v := range k.m {
			m64[i] = complex128(v) // the rounded matrix, as the portable kernel uses it
		}
		if k.lo == 0 {
			splitQ0(&m64, &d)
		} else {
			splitRuns(&m64, &d)
		}
		// A 128-bit lane holds two complex64 values as a 256-bit lane holds
		// two complex128 ones: repeat the four lane coefficients.
		for i := range d {
			for j := range 8 {
				k.c[i][j] = float32(d[i][j%4])
			}
			for j := range 16 {
				k.cz[i][j] = k.c[i][j%8]
			}
		}
	}
	return k
}

// apply2Kernel64 applies k to the groups [from, to) of complex64 amplitudes:
// the vector kernels stream four (AVX2) or eight (AVX-512) groups at a time
// when the runs are long enough, take qubit 0 with a qubit above 1 two
// groups at a time, and the portable kernel takes the rest (qubit 1 as the
// lower qubit, and (0, 1)).
func apply2Kernel64(amp []complex64, k *kernel2s, from, to int) {
	if from >= to {
		return
	}
	x := unsafe.SliceData(amp)
	switch {
	case useAVX512 && k.lo >= 3 && from%8 == 0 && to%8 == 0:
		apply2Runs64AVX512(x, uint(k.lo), uint(k.hi), from, to, &k.cz)
	case useAVX && k.lo >= 2 && from%4 == 0 && to%4 == 0:
		apply2Runs64AVX(x, uint(k.lo), uint(k.hi), from, to, &k.c)
	case useAVX && k.lo == 0 && k.hi >= 2 && from%2 == 0 && to%2 == 0:
		apply2Q064AVX(x, uint(k.hi), from, to, &k.c)
	default:
		apply2Single(amp, k.lo, k.hi, &k.m, from, to)
	}
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
		}
		if useAVX512 {
			// Both 256-bit halves of a 512-bit vector take the same
			// coefficients: two runs' pairs, or two groups of qubit 0.
			for i := range k.c {
				copy(k.cz[i][:4], k.c[i][:])
				copy(k.cz[i][4:], k.c[i][:])
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
// the AVX kernels when they are in use: with AVX-512 and useX2 (and
// useX2Low for the pairs (1, q) and (0, 1)), every pair class takes a 512-bit
// x2 kernel when the range is aligned to its eight (runs, (1, q)) or four
// ((0, q), (0, 1)) groups, else a narrower one; the runs pairs take
// apply2RunsAVX512x4 (with useX4) when it is aligned to sixteen, as every
// block of a fused pass and every range of parallelFor is. Group
// boundaries must be even when k.lo ≥ 1 and the AVX kernels run;
// parallelFor keeps them so.
func apply2Kernel(amp []complex128, k *kernel2, from, to int) {
	if from >= to {
		return
	}
	if useAVX {
		x := unsafe.SliceData(amp)
		switch {
		case k.lo == 0 && useAVX512 && useX2 && k.hi >= 2 && from%4 == 0 && to%4 == 0:
			apply2Q0AVX512x2(x, uint(k.hi), from, to, &k.cz)
		case k.lo == 0 && useAVX512 && k.hi >= 2 && from%2 == 0 && to%2 == 0:
			apply2Q0AVX512(x, uint(k.hi), from, to, &k.cz)
		case k.lo == 0 && useAVX512 && useX2 && useX2Low && from%4 == 0 && to%4 == 0:
			apply2Q01AVX512x2(x, from, to, &k.cz) // k.hi == 1
		case k.lo == 0 && useAVX512 && useX2 && from%2 == 0 && to%2 == 0:
			apply2Q0AVXx2(x, uint(k.hi), from, to, &k.c)
		case k.lo == 0:
			apply2Q0AVX(x, uint(k.hi), from, to, &k.c)
		case useAVX512 && useX2 && useX4 && k.lo >= 2 && from%16 == 0 && to%16 == 0:
			apply2RunsAVX512x4(x, uint(k.lo), uint(k.hi), from, to, &k.cz)
		case useAVX512 && useX2 && k.lo >= 2 && from%8 == 0 && to%8 == 0:
			apply2RunsAVX512x2(x, uint(k.lo), uint(k.hi), from, to, &k.cz)
		case useAVX512 && k.lo >= 2 && from%4 == 0 && to%4 == 0:
			apply2RunsAVX512(x, uint(k.lo), uint(k.hi), from, to, &k.cz)
		case useAVX512 && useX2 && useX2Low && k.lo == 1 && from%8 == 0 && to%8 == 0:
			apply2R1AVX512x2(x, uint(k.hi), from, to, &k.cz)
		case useAVX512 && useX2 && from%4 == 0 && to%4 == 0:
			apply2RunsAVXx2(x, uint(k.lo), uint(k.hi), from, to, &k.c)
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
func apply2Scalar[T amplitude](amp []T, lo, hi int, m *[16]T, from, to int) {
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
func apply1Scalar[T amplitude](amp []T, q int, m *[4]T, from, to int) {
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

// apply2Single is apply2Scalar for complex64 written with float32 parts:
// Go multiplies complex64 values through float64 conversions, several times
// slower than this.
func apply2Single(amp []complex64, lo, hi int, m *[16]complex64, from, to int) {
	r0, i0 := real(m[0]), imag(m[0])
	r1, i1 := real(m[1]), imag(m[1])
	r2, i2 := real(m[2]), imag(m[2])
	r3, i3 := real(m[3]), imag(m[3])
	r4, i4 := real(m[4]), imag(m[4])
	r5, i5 := real(m[5]), imag(m[5])
	r6, i6 := real(m[6]), imag(m[6])
	r7, i7 := real(m[7]), imag(m[7])
	r8, i8 := real(m[8]), imag(m[8])
	r9, i9 := real(m[9]), imag(m[9])
	r10, i10 := real(m[10]), imag(m[10])
	r11, i11 := real(m[11]), imag(m[11])
	r12, i12 := real(m[12]), imag(m[12])
	r13, i13 := real(m[13]), imag(m[13])
	r14, i14 := real(m[14]), imag(m[14])
	r15, i15 := real(m[15]), imag(m[15])
	llo, lhi := 1<<lo, 1<<hi
	loMask, hiMask := llo-1, lhi-1
	for k := from; k < to; k++ {
		i := (k>>lo)<<(lo+1) | k&loMask
		i = (i>>hi)<<(hi+1) | i&hiMask
		j1, j2, j3 := i|llo, i|lhi, i|llo|lhi
		a0, b0 := real(amp[i]), imag(amp[i])
		a1, b1 := real(amp[j1]), imag(amp[j1])
		a2, b2 := real(amp[j2]), imag(amp[j2])
		a3, b3 := real(amp[j3]), imag(amp[j3])
		amp[i] = complex(r0*a0-i0*b0+r1*a1-i1*b1+r2*a2-i2*b2+r3*a3-i3*b3,
			r0*b0+i0*a0+r1*b1+i1*a1+r2*b2+i2*a2+r3*b3+i3*a3)
		amp[j1] = complex(r4*a0-i4*b0+r5*a1-i5*b1+r6*a2-i6*b2+r7*a3-i7*b3,
			r4*b0+i4*a0+r5*b1+i5*a1+r6*b2+i6*a2+r7*b3+i7*a3)
		amp[j2] = complex(r8*a0-i8*b0+r9*a1-i9*b1+r10*a2-i10*b2+r11*a3-i11*b3,
			r8*b0+i8*a0+r9*b1+i9*a1+r10*b2+i10*a2+r11*b3+i11*a3)
		amp[j3] = complex(r12*a0-i12*b0+r13*a1-i13*b1+r14*a2-i14*b2+r15*a3-i15*b3,
			r12*b0+i12*a0+r13*b1+i13*a1+r14*b2+i14*a2+r15*b3+i15*a3)
	}
}

// apply1Single is apply1Scalar for complex64 with float32 parts.
func apply1Single(amp []complex64, q int, m *[4]complex64, from, to int) {
	bit, mask := 1<<q, 1<<q-1
	ar, ai, br, bi := real(m[0]), imag(m[0]), real(m[1]), imag(m[1])
	cr, ci, dr, di := real(m[2]), imag(m[2]), real(m[3]), imag(m[3])
	for k := from; k < to; k++ {
		i := (k>>q)<<(q+1) | k&mask
		j := i | bit
		xr, xi, yr, yi := real(amp[i]), imag(amp[i]), real(amp[j]), imag(amp[j])
		amp[i] = complex(ar*xr-ai*xi+br*yr-bi*yi, ar*xi+ai*xr+br*yi+bi*yr)
		amp[j] = complex(cr*xr-ci*xi+dr*yr-di*yi, cr*xi+ci*xr+dr*yi+di*yr)
	}
}

// useX2 selects the x2 kernels (apply2RunsAVX512x2, apply2Q0AVX512x2,
// apply2R1AVX512x2, apply2Q01AVX512x2, apply2RunsAVXx2, apply2Q0AVXx2: two
// iterations' groups per coefficient load) over the one-iteration forms
// where both apply; tests and
// benchmarks switch it off to compare them.
var useX2 = true

// useX2Low selects, when useX2 is on, the 512-bit x2 kernels of the pairs
// with qubit 1 as the lower position and of (0, 1) (apply2R1AVX512x2,
// apply2Q01AVX512x2) over the 256-bit x2 ones (apply2RunsAVXx2,
// apply2Q0AVXx2); benchmarks switch it off to compare them in one run.
var useX2Low = true

// useX4 selects, when useX2 is on, apply2RunsAVX512x4 (sixteen groups per
// iteration, column by column: about 1.35 times faster on the Sapphire
// Rapids guest, see its comment) over apply2RunsAVX512x2 for the runs
// pairs where the range is aligned to sixteen groups; tests and benchmarks
// switch it off to compare them in one run.
var useX4 = true
