#include "textflag.h"

// RUNS_SETUP loads the arguments of the runs kernels with the signature
// (x *complex128, lo, hi uint, from, to int, c) into DI, R10 (k), R11 (to)
// and SI, sets R8 = ^(2^lo − 1), R9 = ^(2^hi − 1) and the byte offsets R14
// (bit lo), R15 (bit hi) and R12 (both), and jumps to DONE when from ≥ to.
#define RUNS_SETUP(DONE) \
	MOVQ x+0(FP), DI; \
	MOVQ lo+8(FP), CX; \
	MOVQ hi+16(FP), DX; \
	MOVQ from+24(FP), R10; \
	MOVQ to+32(FP), R11; \
	MOVQ c+40(FP), SI; \
	MOVQ $1, AX; \
	SHLXQ CX, AX, R14; \
	MOVQ $1, AX; \
	SHLXQ DX, AX, R15; \
	MOVQ R14, R8; \
	NEGQ R8; \
	MOVQ R15, R9; \
	NEGQ R9; \
	SHLQ $4, R14; \
	SHLQ $4, R15; \
	LEAQ (R14)(R15*1), R12; \
	CMPQ R10, R11; \
	JGE  DONE

// RUNS_STORE stores the four output vectors A, B, C, D of the groups with
// base address R to their members: R, R + 2^lo, R + 2^hi, R + 2^lo + 2^hi
// (byte offsets R14, R15 and R12 of RUNS_SETUP).
#define RUNS_STORE(A, B, C, D, R) \
	VMOVUPD A, (R); \
	VMOVUPD B, (R)(R14*1); \
	VMOVUPD C, (R)(R15*1); \
	VMOVUPD D, (R)(R12*1)

// RUNS_BASE sets R to &x[i] of group k+G (k in R10) after RUNS_SETUP:
// the zero bits are inserted as i = g + (g &^ (2^p − 1)), p = lo then hi.
#define RUNS_BASE(G, R) \
	LEAQ G(R10), R; \
	MOVQ R, CX; \
	ANDQ R8, CX; \
	ADDQ CX, R; \
	MOVQ R, CX; \
	ANDQ R9, CX; \
	ADDQ CX, R; \
	SHLQ $4, R; \
	ADDQ DI, R

// func apply2RunsAVX(x *complex128, lo, hi uint, from, to int, c *coef2)
//
// Applies the canonical 4×4 matrix whose split coefficients are in c to the
// amplitude groups k in [from, to), two groups (k, k+1) per iteration; from
// and to are even and 1 ≤ lo < hi. Group k has base index
// i = insert(insert(k, lo), hi) and members i, i+2^lo, i+2^hi, i+2^lo+2^hi;
// groups k and k+1 are adjacent amplitudes because lo ≥ 1. c holds, for row r
// and column l, the vector [re, re, re, re] at 32·(8r+2l) and
// [−im, im, −im, im] at 32·(8r+2l+1).
TEXT ·apply2RunsAVX(SB), NOSPLIT, $0-48
	MOVQ x+0(FP), DI
	MOVQ lo+8(FP), R8          // lo
	MOVQ hi+16(FP), R9         // hi
	MOVQ from+24(FP), R10      // k
	MOVQ to+32(FP), R11        // end
	MOVQ c+40(FP), SI
	LEAQ 1(R8), R12            // lo+1
	LEAQ 1(R9), R13            // hi+1
	MOVQ $1, AX
	SHLXQ R8, AX, R14          // 2^lo
	MOVQ $1, AX
	SHLXQ R9, AX, R15          // 2^hi
	LEAQ -1(R14), BX           // loMask
	LEAQ -1(R15), DX           // hiMask
	SHLQ $4, R14               // byte offset of bit lo
	SHLQ $4, R15               // byte offset of bit hi
	CMPQ R10, R11
	JGE  runsDone

runsLoop:
	// i = (k>>lo)<<(lo+1) | k&loMask
	SHRXQ R8, R10, AX
	SHLXQ R12, AX, AX
	MOVQ  R10, CX
	ANDQ  BX, CX
	ORQ   CX, AX
	// i = (i>>hi)<<(hi+1) | i&hiMask
	SHRXQ R9, AX, CX
	SHLXQ R13, CX, CX
	ANDQ  DX, AX
	ORQ   CX, AX
	SHLQ  $4, AX
	ADDQ  DI, AX               // &x[i]

	VMOVUPD (AX), Y0
	VMOVUPD (AX)(R14*1), Y1
	VMOVUPD (AX)(R15*1), Y2
	LEAQ    (AX)(R14*1), CX
	VMOVUPD (CX)(R15*1), Y3
	VPERMILPD $5, Y0, Y4
	VPERMILPD $5, Y1, Y5
	VPERMILPD $5, Y2, Y6
	VPERMILPD $5, Y3, Y7

	// row 0
	VMULPD      0(SI), Y0, Y8
	VFMADD231PD 32(SI), Y4, Y8
	VFMADD231PD 64(SI), Y1, Y8
	VFMADD231PD 96(SI), Y5, Y8
	VFMADD231PD 128(SI), Y2, Y8
	VFMADD231PD 160(SI), Y6, Y8
	VFMADD231PD 192(SI), Y3, Y8
	VFMADD231PD 224(SI), Y7, Y8
	// row 1
	VMULPD      256(SI), Y0, Y9
	VFMADD231PD 288(SI), Y4, Y9
	VFMADD231PD 320(SI), Y1, Y9
	VFMADD231PD 352(SI), Y5, Y9
	VFMADD231PD 384(SI), Y2, Y9
	VFMADD231PD 416(SI), Y6, Y9
	VFMADD231PD 448(SI), Y3, Y9
	VFMADD231PD 480(SI), Y7, Y9
	// row 2
	VMULPD      512(SI), Y0, Y10
	VFMADD231PD 544(SI), Y4, Y10
	VFMADD231PD 576(SI), Y1, Y10
	VFMADD231PD 608(SI), Y5, Y10
	VFMADD231PD 640(SI), Y2, Y10
	VFMADD231PD 672(SI), Y6, Y10
	VFMADD231PD 704(SI), Y3, Y10
	VFMADD231PD 736(SI), Y7, Y10
	// row 3
	VMULPD      768(SI), Y0, Y11
	VFMADD231PD 800(SI), Y4, Y11
	VFMADD231PD 832(SI), Y1, Y11
	VFMADD231PD 864(SI), Y5, Y11
	VFMADD231PD 896(SI), Y2, Y11
	VFMADD231PD 928(SI), Y6, Y11
	VFMADD231PD 960(SI), Y3, Y11
	VFMADD231PD 992(SI), Y7, Y11

	VMOVUPD Y8, (AX)
	VMOVUPD Y9, (AX)(R14*1)
	VMOVUPD Y10, (AX)(R15*1)
	VMOVUPD Y11, (CX)(R15*1)

	ADDQ $2, R10
	CMPQ R10, R11
	JLT  runsLoop

runsDone:
	VZEROUPPER
	RET

// func apply2RunsAVX512(x *complex128, lo, hi uint, from, to int, c *coef2z)
//
// The AVX-512 form of apply2RunsAVX: four groups (k…k+3) per iteration, from
// and to multiples of 4 and 2 ≤ lo < hi; c holds 64-byte vectors at twice the
// offsets. Group k has base index
// i = insert(insert(k, lo), hi) and members i, i+2^lo, i+2^hi, i+2^lo+2^hi;
// groups k and k+1 are adjacent amplitudes because lo ≥ 1. c holds, for row r
// and column l, the vector [re, re, re, re] at 32·(8r+2l) and
// [−im, im, −im, im] at 32·(8r+2l+1).
TEXT ·apply2RunsAVX512(SB), NOSPLIT, $0-48
	MOVQ x+0(FP), DI
	MOVQ lo+8(FP), R8          // lo
	MOVQ hi+16(FP), R9         // hi
	MOVQ from+24(FP), R10      // k
	MOVQ to+32(FP), R11        // end
	MOVQ c+40(FP), SI
	LEAQ 1(R8), R12            // lo+1
	LEAQ 1(R9), R13            // hi+1
	MOVQ $1, AX
	SHLXQ R8, AX, R14          // 2^lo
	MOVQ $1, AX
	SHLXQ R9, AX, R15          // 2^hi
	LEAQ -1(R14), BX           // loMask
	LEAQ -1(R15), DX           // hiMask
	SHLQ $4, R14               // byte offset of bit lo
	SHLQ $4, R15               // byte offset of bit hi
	CMPQ R10, R11
	JGE  zrunsDone

zrunsLoop:
	// i = (k>>lo)<<(lo+1) | k&loMask
	SHRXQ R8, R10, AX
	SHLXQ R12, AX, AX
	MOVQ  R10, CX
	ANDQ  BX, CX
	ORQ   CX, AX
	// i = (i>>hi)<<(hi+1) | i&hiMask
	SHRXQ R9, AX, CX
	SHLXQ R13, CX, CX
	ANDQ  DX, AX
	ORQ   CX, AX
	SHLQ  $4, AX
	ADDQ  DI, AX               // &x[i]

	VMOVUPD (AX), Z0
	VMOVUPD (AX)(R14*1), Z1
	VMOVUPD (AX)(R15*1), Z2
	LEAQ    (AX)(R14*1), CX
	VMOVUPD (CX)(R15*1), Z3
	VPERMILPD $0x55, Z0, Z4
	VPERMILPD $0x55, Z1, Z5
	VPERMILPD $0x55, Z2, Z6
	VPERMILPD $0x55, Z3, Z7

	// row 0
	VMULPD      0(SI), Z0, Z8
	VFMADD231PD 64(SI), Z4, Z8
	VFMADD231PD 128(SI), Z1, Z8
	VFMADD231PD 192(SI), Z5, Z8
	VFMADD231PD 256(SI), Z2, Z8
	VFMADD231PD 320(SI), Z6, Z8
	VFMADD231PD 384(SI), Z3, Z8
	VFMADD231PD 448(SI), Z7, Z8
	// row 1
	VMULPD      512(SI), Z0, Z9
	VFMADD231PD 576(SI), Z4, Z9
	VFMADD231PD 640(SI), Z1, Z9
	VFMADD231PD 704(SI), Z5, Z9
	VFMADD231PD 768(SI), Z2, Z9
	VFMADD231PD 832(SI), Z6, Z9
	VFMADD231PD 896(SI), Z3, Z9
	VFMADD231PD 960(SI), Z7, Z9
	// row 2
	VMULPD      1024(SI), Z0, Z10
	VFMADD231PD 1088(SI), Z4, Z10
	VFMADD231PD 1152(SI), Z1, Z10
	VFMADD231PD 1216(SI), Z5, Z10
	VFMADD231PD 1280(SI), Z2, Z10
	VFMADD231PD 1344(SI), Z6, Z10
	VFMADD231PD 1408(SI), Z3, Z10
	VFMADD231PD 1472(SI), Z7, Z10
	// row 3
	VMULPD      1536(SI), Z0, Z11
	VFMADD231PD 1600(SI), Z4, Z11
	VFMADD231PD 1664(SI), Z1, Z11
	VFMADD231PD 1728(SI), Z5, Z11
	VFMADD231PD 1792(SI), Z2, Z11
	VFMADD231PD 1856(SI), Z6, Z11
	VFMADD231PD 1920(SI), Z3, Z11
	VFMADD231PD 1984(SI), Z7, Z11

	VMOVUPD Z8, (AX)
	VMOVUPD Z9, (AX)(R14*1)
	VMOVUPD Z10, (AX)(R15*1)
	VMOVUPD Z11, (CX)(R15*1)

	ADDQ $4, R10
	CMPQ R10, R11
	JLT  zrunsLoop

zrunsDone:
	VZEROUPPER
	RET

// func apply2Q0AVX(x *complex128, hi uint, from, to int, c *coef2)
//
// Applies the canonical 4×4 matrix to the groups k in [from, to) of the pair
// (0, hi), hi ≥ 1: group k has base index i = insert(2k, hi) and the two
// vectors P = [x[i], x[i+1]] and Q = [x[i+2^hi], x[i+2^hi+1]]. With Ps, Qs
// the half-swapped vectors, P' = Σ C(P,V)⊙V and Q' = Σ C(Q,V)⊙V over
// V ∈ {P, Ps, Q, Qs}; c holds the lane-wise split coefficients of output o
// and input v at 32·(8o+2v) (real parts) and 32·(8o+2v+1) (signed
// imaginary parts).
TEXT ·apply2Q0AVX(SB), NOSPLIT, $0-40
	MOVQ x+0(FP), DI
	MOVQ hi+8(FP), R9
	MOVQ from+16(FP), R10
	MOVQ to+24(FP), R11
	MOVQ c+32(FP), SI
	LEAQ 1(R9), R13
	MOVQ $1, AX
	SHLXQ R9, AX, R15
	LEAQ -1(R15), DX           // hiMask
	SHLQ $4, R15               // byte offset of bit hi
	CMPQ R10, R11
	JGE  q0Done

q0Loop:
	LEAQ  (R10)(R10*1), AX     // 2k
	SHRXQ R9, AX, CX
	SHLXQ R13, CX, CX
	ANDQ  DX, AX
	ORQ   CX, AX
	SHLQ  $4, AX
	ADDQ  DI, AX

	VMOVUPD (AX), Y0              // P
	VMOVUPD (AX)(R15*1), Y2       // Q
	VPERM2F128 $1, Y0, Y0, Y1     // Ps
	VPERM2F128 $1, Y2, Y2, Y3     // Qs
	VPERMILPD $5, Y0, Y4
	VPERMILPD $5, Y1, Y5
	VPERMILPD $5, Y2, Y6
	VPERMILPD $5, Y3, Y7

	VMULPD      0(SI), Y0, Y8
	VFMADD231PD 32(SI), Y4, Y8
	VFMADD231PD 64(SI), Y1, Y8
	VFMADD231PD 96(SI), Y5, Y8
	VFMADD231PD 128(SI), Y2, Y8
	VFMADD231PD 160(SI), Y6, Y8
	VFMADD231PD 192(SI), Y3, Y8
	VFMADD231PD 224(SI), Y7, Y8

	VMULPD      256(SI), Y0, Y9
	VFMADD231PD 288(SI), Y4, Y9
	VFMADD231PD 320(SI), Y1, Y9
	VFMADD231PD 352(SI), Y5, Y9
	VFMADD231PD 384(SI), Y2, Y9
	VFMADD231PD 416(SI), Y6, Y9
	VFMADD231PD 448(SI), Y3, Y9
	VFMADD231PD 480(SI), Y7, Y9

	VMOVUPD Y8, (AX)
	VMOVUPD Y9, (AX)(R15*1)

	INCQ R10
	CMPQ R10, R11
	JLT  q0Loop

q0Done:
	VZEROUPPER
	RET

// func apply2Q0AVX512(x *complex128, hi uint, from, to int, c *coef2z)
//
// The AVX-512 form of apply2Q0AVX for hi ≥ 2: groups k and k+1 (from and
// to even) fill one 512-bit vector each of P and Q, the halves of a 256-bit
// lane being exchanged for Ps and Qs; c holds 64-byte vectors at twice the
// offsets.
TEXT ·apply2Q0AVX512(SB), NOSPLIT, $0-40
	MOVQ x+0(FP), DI
	MOVQ hi+8(FP), R9
	MOVQ from+16(FP), R10
	MOVQ to+24(FP), R11
	MOVQ c+32(FP), SI
	LEAQ 1(R9), R13
	MOVQ $1, AX
	SHLXQ R9, AX, R15
	LEAQ -1(R15), DX           // hiMask
	SHLQ $4, R15               // byte offset of bit hi
	CMPQ R10, R11
	JGE  zq0Done

zq0Loop:
	LEAQ  (R10)(R10*1), AX     // 2k
	SHRXQ R9, AX, CX
	SHLXQ R13, CX, CX
	ANDQ  DX, AX
	ORQ   CX, AX
	SHLQ  $4, AX
	ADDQ  DI, AX

	VMOVUPD (AX), Z0              // P
	VMOVUPD (AX)(R15*1), Z2       // Q
	VPERMPD $0x4e, Z0, Z1        // Ps
	VPERMPD $0x4e, Z2, Z3        // Qs
	VPERMILPD $0x55, Z0, Z4
	VPERMILPD $0x55, Z1, Z5
	VPERMILPD $0x55, Z2, Z6
	VPERMILPD $0x55, Z3, Z7

	VMULPD      0(SI), Z0, Z8
	VFMADD231PD 64(SI), Z4, Z8
	VFMADD231PD 128(SI), Z1, Z8
	VFMADD231PD 192(SI), Z5, Z8
	VFMADD231PD 256(SI), Z2, Z8
	VFMADD231PD 320(SI), Z6, Z8
	VFMADD231PD 384(SI), Z3, Z8
	VFMADD231PD 448(SI), Z7, Z8

	VMULPD      512(SI), Z0, Z9
	VFMADD231PD 576(SI), Z4, Z9
	VFMADD231PD 640(SI), Z1, Z9
	VFMADD231PD 704(SI), Z5, Z9
	VFMADD231PD 768(SI), Z2, Z9
	VFMADD231PD 832(SI), Z6, Z9
	VFMADD231PD 896(SI), Z3, Z9
	VFMADD231PD 960(SI), Z7, Z9

	VMOVUPD Z8, (AX)
	VMOVUPD Z9, (AX)(R15*1)

	ADDQ $2, R10
	CMPQ R10, R11
	JLT  zq0Loop

zq0Done:
	VZEROUPPER
	RET

// func apply1AVX(x *complex128, q uint, from, to int, c *coef1)
//
// Applies a 2×2 matrix to qubit q ≥ 1 for the pairs k in [from, to), two
// pairs (k, k+1) per iteration (from and to even): pair k has members
// i = insert(k, q) and i+2^q. c holds, for row r and column l, the vectors
// [re…] at 32·(4r+2l) and [−im, im…] at 32·(4r+2l+1).
TEXT ·apply1AVX(SB), NOSPLIT, $0-40
	MOVQ x+0(FP), DI
	MOVQ q+8(FP), R8
	MOVQ from+16(FP), R10
	MOVQ to+24(FP), R11
	MOVQ c+32(FP), SI
	LEAQ 1(R8), R12
	MOVQ $1, AX
	SHLXQ R8, AX, R14
	LEAQ -1(R14), BX
	SHLQ $4, R14
	CMPQ R10, R11
	JGE  one1Done

one1Loop:
	SHRXQ R8, R10, AX
	SHLXQ R12, AX, AX
	MOVQ  R10, CX
	ANDQ  BX, CX
	ORQ   CX, AX
	SHLQ  $4, AX
	ADDQ  DI, AX

	VMOVUPD (AX), Y0
	VMOVUPD (AX)(R14*1), Y1
	VPERMILPD $5, Y0, Y4
	VPERMILPD $5, Y1, Y5

	VMULPD      0(SI), Y0, Y8
	VFMADD231PD 32(SI), Y4, Y8
	VFMADD231PD 64(SI), Y1, Y8
	VFMADD231PD 96(SI), Y5, Y8
	VMULPD      128(SI), Y0, Y9
	VFMADD231PD 160(SI), Y4, Y9
	VFMADD231PD 192(SI), Y1, Y9
	VFMADD231PD 224(SI), Y5, Y9

	VMOVUPD Y8, (AX)
	VMOVUPD Y9, (AX)(R14*1)

	ADDQ $2, R10
	CMPQ R10, R11
	JLT  one1Loop

one1Done:
	VZEROUPPER
	RET

// func apply1Q0AVX(x *complex128, from, to int, c *coef1)
//
// Applies a 2×2 matrix to qubit 0 for the pairs k in [from, to): pair k is
// the vector P = [x[2k], x[2k+1]] and P' = C(P)⊙P + C(Ps)⊙Ps with Ps the
// half-swapped P; c holds the lane-wise split coefficients of input v at
// 32·2v (real parts) and 32·(2v+1) (signed imaginary parts).
TEXT ·apply1Q0AVX(SB), NOSPLIT, $0-32
	MOVQ x+0(FP), DI
	MOVQ from+8(FP), R10
	MOVQ to+16(FP), R11
	MOVQ c+24(FP), SI
	CMPQ R10, R11
	JGE  one0Done
	MOVQ R10, AX
	SHLQ $5, AX
	ADDQ DI, AX
	SUBQ R10, R11

one0Loop:
	VMOVUPD (AX), Y0
	VPERM2F128 $1, Y0, Y0, Y1
	VPERMILPD $5, Y0, Y4
	VPERMILPD $5, Y1, Y5
	VMULPD      0(SI), Y0, Y8
	VFMADD231PD 32(SI), Y4, Y8
	VFMADD231PD 64(SI), Y1, Y8
	VFMADD231PD 96(SI), Y5, Y8
	VMOVUPD Y8, (AX)
	ADDQ $32, AX
	DECQ R11
	JNZ  one0Loop

one0Done:
	VZEROUPPER
	RET

// func apply2Runs64AVX(x *complex64, lo, hi uint, from, to int, c *coef2s)
//
// The complex64 form of apply2RunsAVX: four groups (k…k+3) per iteration in
// 256-bit vectors of four amplitudes, from and to multiples of 4 and
// 2 ≤ lo < hi; c holds, at the same byte offsets, vectors of eight float32
// ([re…] and [−im, im…]).
TEXT ·apply2Runs64AVX(SB), NOSPLIT, $0-48
	MOVQ x+0(FP), DI
	MOVQ lo+8(FP), R8          // lo
	MOVQ hi+16(FP), R9         // hi
	MOVQ from+24(FP), R10      // k
	MOVQ to+32(FP), R11        // end
	MOVQ c+40(FP), SI
	LEAQ 1(R8), R12            // lo+1
	LEAQ 1(R9), R13            // hi+1
	MOVQ $1, AX
	SHLXQ R8, AX, R14          // 2^lo
	MOVQ $1, AX
	SHLXQ R9, AX, R15          // 2^hi
	LEAQ -1(R14), BX           // loMask
	LEAQ -1(R15), DX           // hiMask
	SHLQ $3, R14               // byte offset of bit lo
	SHLQ $3, R15               // byte offset of bit hi
	CMPQ R10, R11
	JGE  s256Done

s256Loop:
	// i = (k>>lo)<<(lo+1) | k&loMask
	SHRXQ R8, R10, AX
	SHLXQ R12, AX, AX
	MOVQ  R10, CX
	ANDQ  BX, CX
	ORQ   CX, AX
	// i = (i>>hi)<<(hi+1) | i&hiMask
	SHRXQ R9, AX, CX
	SHLXQ R13, CX, CX
	ANDQ  DX, AX
	ORQ   CX, AX
	SHLQ  $3, AX
	ADDQ  DI, AX               // &x[i]

	VMOVUPS (AX), Y0
	VMOVUPS (AX)(R14*1), Y1
	VMOVUPS (AX)(R15*1), Y2
	LEAQ    (AX)(R14*1), CX
	VMOVUPS (CX)(R15*1), Y3
	VPERMILPS $0xb1, Y0, Y4
	VPERMILPS $0xb1, Y1, Y5
	VPERMILPS $0xb1, Y2, Y6
	VPERMILPS $0xb1, Y3, Y7

	// row 0
	VMULPS      0(SI), Y0, Y8
	VFMADD231PS 32(SI), Y4, Y8
	VFMADD231PS 64(SI), Y1, Y8
	VFMADD231PS 96(SI), Y5, Y8
	VFMADD231PS 128(SI), Y2, Y8
	VFMADD231PS 160(SI), Y6, Y8
	VFMADD231PS 192(SI), Y3, Y8
	VFMADD231PS 224(SI), Y7, Y8
	// row 1
	VMULPS      256(SI), Y0, Y9
	VFMADD231PS 288(SI), Y4, Y9
	VFMADD231PS 320(SI), Y1, Y9
	VFMADD231PS 352(SI), Y5, Y9
	VFMADD231PS 384(SI), Y2, Y9
	VFMADD231PS 416(SI), Y6, Y9
	VFMADD231PS 448(SI), Y3, Y9
	VFMADD231PS 480(SI), Y7, Y9
	// row 2
	VMULPS      512(SI), Y0, Y10
	VFMADD231PS 544(SI), Y4, Y10
	VFMADD231PS 576(SI), Y1, Y10
	VFMADD231PS 608(SI), Y5, Y10
	VFMADD231PS 640(SI), Y2, Y10
	VFMADD231PS 672(SI), Y6, Y10
	VFMADD231PS 704(SI), Y3, Y10
	VFMADD231PS 736(SI), Y7, Y10
	// row 3
	VMULPS      768(SI), Y0, Y11
	VFMADD231PS 800(SI), Y4, Y11
	VFMADD231PS 832(SI), Y1, Y11
	VFMADD231PS 864(SI), Y5, Y11
	VFMADD231PS 896(SI), Y2, Y11
	VFMADD231PS 928(SI), Y6, Y11
	VFMADD231PS 960(SI), Y3, Y11
	VFMADD231PS 992(SI), Y7, Y11

	VMOVUPS Y8, (AX)
	VMOVUPS Y9, (AX)(R14*1)
	VMOVUPS Y10, (AX)(R15*1)
	VMOVUPS Y11, (CX)(R15*1)

	ADDQ $4, R10
	CMPQ R10, R11
	JLT  s256Loop

s256Done:
	VZEROUPPER
	RET

// func apply2Runs64AVX512(x *complex64, lo, hi uint, from, to int, c *coef2sz)
//
// The complex64 form of apply2RunsAVX512: eight groups per iteration, from
// and to multiples of 8 and 3 ≤ lo < hi; c holds 64-byte vectors of sixteen
// float32.
TEXT ·apply2Runs64AVX512(SB), NOSPLIT, $0-48
	MOVQ x+0(FP), DI
	MOVQ lo+8(FP), R8          // lo
	MOVQ hi+16(FP), R9         // hi
	MOVQ from+24(FP), R10      // k
	MOVQ to+32(FP), R11        // end
	MOVQ c+40(FP), SI
	LEAQ 1(R8), R12            // lo+1
	LEAQ 1(R9), R13            // hi+1
	MOVQ $1, AX
	SHLXQ R8, AX, R14          // 2^lo
	MOVQ $1, AX
	SHLXQ R9, AX, R15          // 2^hi
	LEAQ -1(R14), BX           // loMask
	LEAQ -1(R15), DX           // hiMask
	SHLQ $3, R14               // byte offset of bit lo
	SHLQ $3, R15               // byte offset of bit hi
	CMPQ R10, R11
	JGE  s512Done

s512Loop:
	// i = (k>>lo)<<(lo+1) | k&loMask
	SHRXQ R8, R10, AX
	SHLXQ R12, AX, AX
	MOVQ  R10, CX
	ANDQ  BX, CX
	ORQ   CX, AX
	// i = (i>>hi)<<(hi+1) | i&hiMask
	SHRXQ R9, AX, CX
	SHLXQ R13, CX, CX
	ANDQ  DX, AX
	ORQ   CX, AX
	SHLQ  $3, AX
	ADDQ  DI, AX               // &x[i]

	VMOVUPS (AX), Z0
	VMOVUPS (AX)(R14*1), Z1
	VMOVUPS (AX)(R15*1), Z2
	LEAQ    (AX)(R14*1), CX
	VMOVUPS (CX)(R15*1), Z3
	VPERMILPS $0xb1, Z0, Z4
	VPERMILPS $0xb1, Z1, Z5
	VPERMILPS $0xb1, Z2, Z6
	VPERMILPS $0xb1, Z3, Z7

	// row 0
	VMULPS      0(SI), Z0, Z8
	VFMADD231PS 64(SI), Z4, Z8
	VFMADD231PS 128(SI), Z1, Z8
	VFMADD231PS 192(SI), Z5, Z8
	VFMADD231PS 256(SI), Z2, Z8
	VFMADD231PS 320(SI), Z6, Z8
	VFMADD231PS 384(SI), Z3, Z8
	VFMADD231PS 448(SI), Z7, Z8
	// row 1
	VMULPS      512(SI), Z0, Z9
	VFMADD231PS 576(SI), Z4, Z9
	VFMADD231PS 640(SI), Z1, Z9
	VFMADD231PS 704(SI), Z5, Z9
	VFMADD231PS 768(SI), Z2, Z9
	VFMADD231PS 832(SI), Z6, Z9
	VFMADD231PS 896(SI), Z3, Z9
	VFMADD231PS 960(SI), Z7, Z9
	// row 2
	VMULPS      1024(SI), Z0, Z10
	VFMADD231PS 1088(SI), Z4, Z10
	VFMADD231PS 1152(SI), Z1, Z10
	VFMADD231PS 1216(SI), Z5, Z10
	VFMADD231PS 1280(SI), Z2, Z10
	VFMADD231PS 1344(SI), Z6, Z10
	VFMADD231PS 1408(SI), Z3, Z10
	VFMADD231PS 1472(SI), Z7, Z10
	// row 3
	VMULPS      1536(SI), Z0, Z11
	VFMADD231PS 1600(SI), Z4, Z11
	VFMADD231PS 1664(SI), Z1, Z11
	VFMADD231PS 1728(SI), Z5, Z11
	VFMADD231PS 1792(SI), Z2, Z11
	VFMADD231PS 1856(SI), Z6, Z11
	VFMADD231PS 1920(SI), Z3, Z11
	VFMADD231PS 1984(SI), Z7, Z11

	VMOVUPS Z8, (AX)
	VMOVUPS Z9, (AX)(R14*1)
	VMOVUPS Z10, (AX)(R15*1)
	VMOVUPS Z11, (CX)(R15*1)

	ADDQ $8, R10
	CMPQ R10, R11
	JLT  s512Loop

s512Done:
	VZEROUPPER
	RET


// func apply2Q064AVX(x *complex64, hi uint, from, to int, c *coef2s)
//
// The complex64 form of apply2Q0AVX for hi ≥ 2: groups k and k+1 (from and
// to even) fill one 256-bit vector each of P and Q, the pairs of a 128-bit
// lane being exchanged for Ps and Qs; c holds vectors of eight float32 at
// the same byte offsets.
TEXT ·apply2Q064AVX(SB), NOSPLIT, $0-40
	MOVQ x+0(FP), DI
	MOVQ hi+8(FP), R9
	MOVQ from+16(FP), R10
	MOVQ to+24(FP), R11
	MOVQ c+32(FP), SI
	LEAQ 1(R9), R13
	MOVQ $1, AX
	SHLXQ R9, AX, R15
	LEAQ -1(R15), DX           // hiMask
	SHLQ $3, R15               // byte offset of bit hi
	CMPQ R10, R11
	JGE  s0Done

s0Loop:
	LEAQ  (R10)(R10*1), AX     // 2k
	SHRXQ R9, AX, CX
	SHLXQ R13, CX, CX
	ANDQ  DX, AX
	ORQ   CX, AX
	SHLQ  $3, AX
	ADDQ  DI, AX

	VMOVUPS (AX), Y0              // P
	VMOVUPS (AX)(R15*1), Y2       // Q
	VPERMILPS $0x4e, Y0, Y1      // Ps
	VPERMILPS $0x4e, Y2, Y3      // Qs
	VPERMILPS $0xb1, Y0, Y4
	VPERMILPS $0xb1, Y1, Y5
	VPERMILPS $0xb1, Y2, Y6
	VPERMILPS $0xb1, Y3, Y7

	VMULPS      0(SI), Y0, Y8
	VFMADD231PS 32(SI), Y4, Y8
	VFMADD231PS 64(SI), Y1, Y8
	VFMADD231PS 96(SI), Y5, Y8
	VFMADD231PS 128(SI), Y2, Y8
	VFMADD231PS 160(SI), Y6, Y8
	VFMADD231PS 192(SI), Y3, Y8
	VFMADD231PS 224(SI), Y7, Y8

	VMULPS      256(SI), Y0, Y9
	VFMADD231PS 288(SI), Y4, Y9
	VFMADD231PS 320(SI), Y1, Y9
	VFMADD231PS 352(SI), Y5, Y9
	VFMADD231PS 384(SI), Y2, Y9
	VFMADD231PS 416(SI), Y6, Y9
	VFMADD231PS 448(SI), Y3, Y9
	VFMADD231PS 480(SI), Y7, Y9

	VMOVUPS Y8, (AX)
	VMOVUPS Y9, (AX)(R15*1)

	ADDQ $2, R10
	CMPQ R10, R11
	JLT  s0Loop

s0Done:
	VZEROUPPER
	RET



// func apply2RunsAVX512x2(x *complex128, lo, hi uint, from, to int, c *coef2z)
//
// apply2RunsAVX512 on eight groups per iteration, (k…k+3) and (k+4…k+7),
// from and to multiples of 8 and 2 ≤ lo < hi: each coefficient vector is
// loaded once into a register and used for both halves, which halves the
// loads per multiply-add (the single form, with one 64-byte memory operand
// per FMA, is bound by the load ports) and gives eight independent
// accumulation chains. Every lane sees the instructions of apply2RunsAVX512
// in the same order, so the results are bit-identical. The zero bits are
// inserted as i = k + (k &^ (2^p − 1)), p = lo then hi.
TEXT ·apply2RunsAVX512x2(SB), NOSPLIT, $0-48
	RUNS_SETUP(z2runsDone)

z2runsLoop:
	RUNS_BASE(0, AX)              // &x[i] of group k
	RUNS_BASE(4, BX)              // &x[i] of group k+4

	VMOVUPD (AX), Z0
	VMOVUPD (AX)(R14*1), Z1
	VMOVUPD (AX)(R15*1), Z2
	VMOVUPD (AX)(R12*1), Z3
	VMOVUPD (BX), Z12
	VMOVUPD (BX)(R14*1), Z13
	VMOVUPD (BX)(R15*1), Z14
	VMOVUPD (BX)(R12*1), Z15
	VPERMILPD $0x55, Z0, Z4
	VPERMILPD $0x55, Z1, Z5
	VPERMILPD $0x55, Z2, Z6
	VPERMILPD $0x55, Z3, Z7
	VPERMILPD $0x55, Z12, Z16
	VPERMILPD $0x55, Z13, Z17
	VPERMILPD $0x55, Z14, Z18
	VPERMILPD $0x55, Z15, Z19

	// row 0
	VMOVUPD 0(SI), Z24
	VMULPD Z24, Z0, Z8
	VMULPD Z24, Z12, Z20
	VMOVUPD 64(SI), Z25
	VFMADD231PD Z25, Z4, Z8
	VFMADD231PD Z25, Z16, Z20
	VMOVUPD 128(SI), Z24
	VFMADD231PD Z24, Z1, Z8
	VFMADD231PD Z24, Z13, Z20
	VMOVUPD 192(SI), Z25
	VFMADD231PD Z25, Z5, Z8
	VFMADD231PD Z25, Z17, Z20
	VMOVUPD 256(SI), Z24
	VFMADD231PD Z24, Z2, Z8
	VFMADD231PD Z24, Z14, Z20
	VMOVUPD 320(SI), Z25
	VFMADD231PD Z25, Z6, Z8
	VFMADD231PD Z25, Z18, Z20
	VMOVUPD 384(SI), Z24
	VFMADD231PD Z24, Z3, Z8
	VFMADD231PD Z24, Z15, Z20
	VMOVUPD 448(SI), Z25
	VFMADD231PD Z25, Z7, Z8
	VFMADD231PD Z25, Z19, Z20
	// row 1
	VMOVUPD 512(SI), Z24
	VMULPD Z24, Z0, Z9
	VMULPD Z24, Z12, Z21
	VMOVUPD 576(SI), Z25
	VFMADD231PD Z25, Z4, Z9
	VFMADD231PD Z25, Z16, Z21
	VMOVUPD 640(SI), Z24
	VFMADD231PD Z24, Z1, Z9
	VFMADD231PD Z24, Z13, Z21
	VMOVUPD 704(SI), Z25
	VFMADD231PD Z25, Z5, Z9
	VFMADD231PD Z25, Z17, Z21
	VMOVUPD 768(SI), Z24
	VFMADD231PD Z24, Z2, Z9
	VFMADD231PD Z24, Z14, Z21
	VMOVUPD 832(SI), Z25
	VFMADD231PD Z25, Z6, Z9
	VFMADD231PD Z25, Z18, Z21
	VMOVUPD 896(SI), Z24
	VFMADD231PD Z24, Z3, Z9
	VFMADD231PD Z24, Z15, Z21
	VMOVUPD 960(SI), Z25
	VFMADD231PD Z25, Z7, Z9
	VFMADD231PD Z25, Z19, Z21
	// row 2
	VMOVUPD 1024(SI), Z24
	VMULPD Z24, Z0, Z10
	VMULPD Z24, Z12, Z22
	VMOVUPD 1088(SI), Z25
	VFMADD231PD Z25, Z4, Z10
	VFMADD231PD Z25, Z16, Z22
	VMOVUPD 1152(SI), Z24
	VFMADD231PD Z24, Z1, Z10
	VFMADD231PD Z24, Z13, Z22
	VMOVUPD 1216(SI), Z25
	VFMADD231PD Z25, Z5, Z10
	VFMADD231PD Z25, Z17, Z22
	VMOVUPD 1280(SI), Z24
	VFMADD231PD Z24, Z2, Z10
	VFMADD231PD Z24, Z14, Z22
	VMOVUPD 1344(SI), Z25
	VFMADD231PD Z25, Z6, Z10
	VFMADD231PD Z25, Z18, Z22
	VMOVUPD 1408(SI), Z24
	VFMADD231PD Z24, Z3, Z10
	VFMADD231PD Z24, Z15, Z22
	VMOVUPD 1472(SI), Z25
	VFMADD231PD Z25, Z7, Z10
	VFMADD231PD Z25, Z19, Z22
	// row 3
	VMOVUPD 1536(SI), Z24
	VMULPD Z24, Z0, Z11
	VMULPD Z24, Z12, Z23
	VMOVUPD 1600(SI), Z25
	VFMADD231PD Z25, Z4, Z11
	VFMADD231PD Z25, Z16, Z23
	VMOVUPD 1664(SI), Z24
	VFMADD231PD Z24, Z1, Z11
	VFMADD231PD Z24, Z13, Z23
	VMOVUPD 1728(SI), Z25
	VFMADD231PD Z25, Z5, Z11
	VFMADD231PD Z25, Z17, Z23
	VMOVUPD 1792(SI), Z24
	VFMADD231PD Z24, Z2, Z11
	VFMADD231PD Z24, Z14, Z23
	VMOVUPD 1856(SI), Z25
	VFMADD231PD Z25, Z6, Z11
	VFMADD231PD Z25, Z18, Z23
	VMOVUPD 1920(SI), Z24
	VFMADD231PD Z24, Z3, Z11
	VFMADD231PD Z24, Z15, Z23
	VMOVUPD 1984(SI), Z25
	VFMADD231PD Z25, Z7, Z11
	VFMADD231PD Z25, Z19, Z23

	RUNS_STORE(Z8, Z9, Z10, Z11, AX)
	RUNS_STORE(Z20, Z21, Z22, Z23, BX)

	ADDQ $8, R10
	CMPQ R10, R11
	JLT  z2runsLoop

z2runsDone:
	VZEROUPPER
	RET

// func apply2Q0AVX512x2(x *complex128, hi uint, from, to int, c *coef2z)
//
// apply2Q0AVX512 on four groups per iteration, (k, k+1) and (k+2, k+3),
// from and to multiples of 4 and hi ≥ 2: as in apply2RunsAVX512x2, each
// coefficient vector is loaded once into a register for both halves, and
// every lane sees the instructions of apply2Q0AVX512 in the same order
// (bit-identical results). The zero bit is inserted as i = j + (j &^
// (2^hi − 1)) with j = 2k.
TEXT ·apply2Q0AVX512x2(SB), NOSPLIT, $0-40
	MOVQ x+0(FP), DI
	MOVQ hi+8(FP), CX
	MOVQ from+16(FP), R10
	MOVQ to+24(FP), R11
	MOVQ c+32(FP), SI
	MOVQ $1, AX
	SHLXQ CX, AX, R15          // 2^hi
	MOVQ R15, R9
	NEGQ R9                    // ^(2^hi − 1)
	SHLQ $4, R15               // byte offset of bit hi
	CMPQ R10, R11
	JGE  zq02Done

zq02Loop:
	LEAQ (R10)(R10*1), AX      // 2k
	MOVQ AX, CX
	ANDQ R9, CX
	ADDQ CX, AX
	SHLQ $4, AX
	ADDQ DI, AX                // &x[i] of group k
	LEAQ 4(R10)(R10*1), BX     // 2(k+2)
	MOVQ BX, CX
	ANDQ R9, CX
	ADDQ CX, BX
	SHLQ $4, BX
	ADDQ DI, BX                // &x[i] of group k+2

	VMOVUPD (AX), Z0              // P
	VMOVUPD (AX)(R15*1), Z2       // Q
	VMOVUPD (BX), Z12
	VMOVUPD (BX)(R15*1), Z14
	VPERMPD $0x4e, Z0, Z1        // Ps
	VPERMPD $0x4e, Z2, Z3        // Qs
	VPERMPD $0x4e, Z12, Z13
	VPERMPD $0x4e, Z14, Z15
	VPERMILPD $0x55, Z0, Z4
	VPERMILPD $0x55, Z1, Z5
	VPERMILPD $0x55, Z2, Z6
	VPERMILPD $0x55, Z3, Z7
	VPERMILPD $0x55, Z12, Z16
	VPERMILPD $0x55, Z13, Z17
	VPERMILPD $0x55, Z14, Z18
	VPERMILPD $0x55, Z15, Z19

	VMOVUPD 0(SI), Z24
	VMULPD Z24, Z0, Z8
	VMULPD Z24, Z12, Z20
	VMOVUPD 64(SI), Z25
	VFMADD231PD Z25, Z4, Z8
	VFMADD231PD Z25, Z16, Z20
	VMOVUPD 128(SI), Z24
	VFMADD231PD Z24, Z1, Z8
	VFMADD231PD Z24, Z13, Z20
	VMOVUPD 192(SI), Z25
	VFMADD231PD Z25, Z5, Z8
	VFMADD231PD Z25, Z17, Z20
	VMOVUPD 256(SI), Z24
	VFMADD231PD Z24, Z2, Z8
	VFMADD231PD Z24, Z14, Z20
	VMOVUPD 320(SI), Z25
	VFMADD231PD Z25, Z6, Z8
	VFMADD231PD Z25, Z18, Z20
	VMOVUPD 384(SI), Z24
	VFMADD231PD Z24, Z3, Z8
	VFMADD231PD Z24, Z15, Z20
	VMOVUPD 448(SI), Z25
	VFMADD231PD Z25, Z7, Z8
	VFMADD231PD Z25, Z19, Z20
	VMOVUPD 512(SI), Z24
	VMULPD Z24, Z0, Z9
	VMULPD Z24, Z12, Z21
	VMOVUPD 576(SI), Z25
	VFMADD231PD Z25, Z4, Z9
	VFMADD231PD Z25, Z16, Z21
	VMOVUPD 640(SI), Z24
	VFMADD231PD Z24, Z1, Z9
	VFMADD231PD Z24, Z13, Z21
	VMOVUPD 704(SI), Z25
	VFMADD231PD Z25, Z5, Z9
	VFMADD231PD Z25, Z17, Z21
	VMOVUPD 768(SI), Z24
	VFMADD231PD Z24, Z2, Z9
	VFMADD231PD Z24, Z14, Z21
	VMOVUPD 832(SI), Z25
	VFMADD231PD Z25, Z6, Z9
	VFMADD231PD Z25, Z18, Z21
	VMOVUPD 896(SI), Z24
	VFMADD231PD Z24, Z3, Z9
	VFMADD231PD Z24, Z15, Z21
	VMOVUPD 960(SI), Z25
	VFMADD231PD Z25, Z7, Z9
	VFMADD231PD Z25, Z19, Z21

	VMOVUPD Z8, (AX)
	VMOVUPD Z9, (AX)(R15*1)
	VMOVUPD Z20, (BX)
	VMOVUPD Z21, (BX)(R15*1)

	ADDQ $4, R10
	CMPQ R10, R11
	JLT  zq02Loop

zq02Done:
	VZEROUPPER
	RET

// X2_HALFSWAP_ROWS01 is the part that apply2RunsAVXx2 and apply2Q0AVXx2
// share once their eight input vectors are loaded (Y0–Y3 and Y12–Y15): the
// half-swaps and the first multiply-adds of the split coefficients at SI,
// for both iterations, in the order both kernels took before it was shared.
#define X2_HALFSWAP_ROWS01 \
	VPERMILPD $5, Y0, Y4; \
	VPERMILPD $5, Y1, Y5; \
	VPERMILPD $5, Y2, Y6; \
	VPERMILPD $5, Y3, Y7; \
	VPERMILPD $5, Y12, Y16; \
	VPERMILPD $5, Y13, Y17; \
	VPERMILPD $5, Y14, Y18; \
	VPERMILPD $5, Y15, Y19; \
	; \
	VMOVUPD 0(SI), Y24; \
	VMULPD Y24, Y0, Y8; \
	VMULPD Y24, Y12, Y20; \
	VMOVUPD 32(SI), Y25; \
	VFMADD231PD Y25, Y4, Y8; \
	VFMADD231PD Y25, Y16, Y20; \
	VMOVUPD 64(SI), Y24; \
	VFMADD231PD Y24, Y1, Y8; \
	VFMADD231PD Y24, Y13, Y20; \
	VMOVUPD 96(SI), Y25; \
	VFMADD231PD Y25, Y5, Y8; \
	VFMADD231PD Y25, Y17, Y20; \
	VMOVUPD 128(SI), Y24; \
	VFMADD231PD Y24, Y2, Y8; \
	VFMADD231PD Y24, Y14, Y20; \
	VMOVUPD 160(SI), Y25; \
	VFMADD231PD Y25, Y6, Y8; \
	VFMADD231PD Y25, Y18, Y20; \
	VMOVUPD 192(SI), Y24; \
	VFMADD231PD Y24, Y3, Y8; \
	VFMADD231PD Y24, Y15, Y20; \
	VMOVUPD 224(SI), Y25; \
	VFMADD231PD Y25, Y7, Y8; \
	VFMADD231PD Y25, Y19, Y20; \
	VMOVUPD 256(SI), Y24; \
	VMULPD Y24, Y0, Y9; \
	VMULPD Y24, Y12, Y21; \
	VMOVUPD 288(SI), Y25; \
	VFMADD231PD Y25, Y4, Y9; \
	VFMADD231PD Y25, Y16, Y21; \
	VMOVUPD 320(SI), Y24; \
	VFMADD231PD Y24, Y1, Y9; \
	VFMADD231PD Y24, Y13, Y21; \
	VMOVUPD 352(SI), Y25; \
	VFMADD231PD Y25, Y5, Y9; \
	VFMADD231PD Y25, Y17, Y21; \
	VMOVUPD 384(SI), Y24; \
	VFMADD231PD Y24, Y2, Y9; \
	VFMADD231PD Y24, Y14, Y21; \
	VMOVUPD 416(SI), Y25; \
	VFMADD231PD Y25, Y6, Y9; \
	VFMADD231PD Y25, Y18, Y21; \
	VMOVUPD 448(SI), Y24; \
	VFMADD231PD Y24, Y3, Y9; \
	VFMADD231PD Y24, Y15, Y21; \
	VMOVUPD 480(SI), Y25; \
	VFMADD231PD Y25, Y7, Y9; \
	VFMADD231PD Y25, Y19, Y21

// func apply2RunsAVXx2(x *complex128, lo, hi uint, from, to int, c *coef2)
//
// apply2RunsAVX on four groups per iteration, (k, k+1) and (k+2, k+3), from
// and to multiples of 4 and 1 ≤ lo < hi, for lo = 1 where the 512-bit
// kernels do not apply: each coefficient vector is loaded once into a
// register for both halves. It needs the sixteen upper vector registers of
// AVX-512 (EVEX encodings of Y16–Y25). Every lane sees the instructions of
// apply2RunsAVX in the same order (bit-identical results).
TEXT ·apply2RunsAVXx2(SB), NOSPLIT, $0-48
	RUNS_SETUP(y2runsDone)

y2runsLoop:
	RUNS_BASE(0, AX)              // &x[i] of group k
	RUNS_BASE(2, BX)              // &x[i] of group k+2

	VMOVUPD (AX), Y0
	VMOVUPD (AX)(R14*1), Y1
	VMOVUPD (AX)(R15*1), Y2
	VMOVUPD (AX)(R12*1), Y3
	VMOVUPD (BX), Y12
	VMOVUPD (BX)(R14*1), Y13
	VMOVUPD (BX)(R15*1), Y14
	VMOVUPD (BX)(R12*1), Y15
	X2_HALFSWAP_ROWS01
	VMOVUPD 512(SI), Y24
	VMULPD Y24, Y0, Y10
	VMULPD Y24, Y12, Y22
	VMOVUPD 544(SI), Y25
	VFMADD231PD Y25, Y4, Y10
	VFMADD231PD Y25, Y16, Y22
	VMOVUPD 576(SI), Y24
	VFMADD231PD Y24, Y1, Y10
	VFMADD231PD Y24, Y13, Y22
	VMOVUPD 608(SI), Y25
	VFMADD231PD Y25, Y5, Y10
	VFMADD231PD Y25, Y17, Y22
	VMOVUPD 640(SI), Y24
	VFMADD231PD Y24, Y2, Y10
	VFMADD231PD Y24, Y14, Y22
	VMOVUPD 672(SI), Y25
	VFMADD231PD Y25, Y6, Y10
	VFMADD231PD Y25, Y18, Y22
	VMOVUPD 704(SI), Y24
	VFMADD231PD Y24, Y3, Y10
	VFMADD231PD Y24, Y15, Y22
	VMOVUPD 736(SI), Y25
	VFMADD231PD Y25, Y7, Y10
	VFMADD231PD Y25, Y19, Y22
	VMOVUPD 768(SI), Y24
	VMULPD Y24, Y0, Y11
	VMULPD Y24, Y12, Y23
	VMOVUPD 800(SI), Y25
	VFMADD231PD Y25, Y4, Y11
	VFMADD231PD Y25, Y16, Y23
	VMOVUPD 832(SI), Y24
	VFMADD231PD Y24, Y1, Y11
	VFMADD231PD Y24, Y13, Y23
	VMOVUPD 864(SI), Y25
	VFMADD231PD Y25, Y5, Y11
	VFMADD231PD Y25, Y17, Y23
	VMOVUPD 896(SI), Y24
	VFMADD231PD Y24, Y2, Y11
	VFMADD231PD Y24, Y14, Y23
	VMOVUPD 928(SI), Y25
	VFMADD231PD Y25, Y6, Y11
	VFMADD231PD Y25, Y18, Y23
	VMOVUPD 960(SI), Y24
	VFMADD231PD Y24, Y3, Y11
	VFMADD231PD Y24, Y15, Y23
	VMOVUPD 992(SI), Y25
	VFMADD231PD Y25, Y7, Y11
	VFMADD231PD Y25, Y19, Y23

	RUNS_STORE(Y8, Y9, Y10, Y11, AX)
	RUNS_STORE(Y20, Y21, Y22, Y23, BX)

	ADDQ $4, R10
	CMPQ R10, R11
	JLT  y2runsLoop

y2runsDone:
	VZEROUPPER
	RET

// func apply2Q0AVXx2(x *complex128, hi uint, from, to int, c *coef2)
//
// apply2Q0AVX on two groups per iteration, k and k+1 (from and to even),
// for hi = 1 where the 512-bit kernel does not apply (it also serves any
// hi ≥ 1): each coefficient vector is loaded once into a register for both
// groups. It needs AVX-512's upper vector registers; the halves of P and Q
// are exchanged with VPERMPD (VPERM2F128 has no EVEX form), a permutation
// with the same result. Every lane sees the arithmetic of apply2Q0AVX in
// the same order (bit-identical results).
TEXT ·apply2Q0AVXx2(SB), NOSPLIT, $0-40
	MOVQ x+0(FP), DI
	MOVQ hi+8(FP), CX
	MOVQ from+16(FP), R10
	MOVQ to+24(FP), R11
	MOVQ c+32(FP), SI
	MOVQ $1, AX
	SHLXQ CX, AX, R15          // 2^hi
	MOVQ R15, R9
	NEGQ R9                    // ^(2^hi − 1)
	SHLQ $4, R15               // byte offset of bit hi
	CMPQ R10, R11
	JGE  yq02Done

yq02Loop:
	LEAQ (R10)(R10*1), AX      // 2k
	MOVQ AX, CX
	ANDQ R9, CX
	ADDQ CX, AX
	SHLQ $4, AX
	ADDQ DI, AX                // &x[i] of group k
	LEAQ 2(R10)(R10*1), BX     // 2(k+1)
	MOVQ BX, CX
	ANDQ R9, CX
	ADDQ CX, BX
	SHLQ $4, BX
	ADDQ DI, BX                // &x[i] of group k+1

	VMOVUPD (AX), Y0              // P
	VMOVUPD (AX)(R15*1), Y2       // Q
	VMOVUPD (BX), Y12
	VMOVUPD (BX)(R15*1), Y14
	VPERMPD $0x4e, Y0, Y1        // Ps
	VPERMPD $0x4e, Y2, Y3        // Qs
	VPERMPD $0x4e, Y12, Y13
	VPERMPD $0x4e, Y14, Y15
	X2_HALFSWAP_ROWS01

	VMOVUPD Y8, (AX)
	VMOVUPD Y9, (AX)(R15*1)
	VMOVUPD Y20, (BX)
	VMOVUPD Y21, (BX)(R15*1)

	ADDQ $2, R10
	CMPQ R10, R11
	JLT  yq02Loop

yq02Done:
	VZEROUPPER
	RET

// Z2_HALFSWAP and Z2_ROWS01 are the arithmetic of apply2Q0AVX512x2 once its
// eight input vectors are in Z0–Z3 and Z12–Z15: the re/im swaps into Z4–Z7
// and Z16–Z19, then the multiply-adds of rows 0–1 (into Z8, Z9 and Z20,
// Z21) with the 64-byte coefficient vectors at SI, in the same order as that
// kernel, for the kernels below that gather their inputs by shuffles.
#define Z2_HALFSWAP \
	VPERMILPD $0x55, Z0, Z4; \
	VPERMILPD $0x55, Z1, Z5; \
	VPERMILPD $0x55, Z2, Z6; \
	VPERMILPD $0x55, Z3, Z7; \
	VPERMILPD $0x55, Z12, Z16; \
	VPERMILPD $0x55, Z13, Z17; \
	VPERMILPD $0x55, Z14, Z18; \
	VPERMILPD $0x55, Z15, Z19

#define Z2_ROWS01 \
	VMOVUPD 0(SI), Z24; \
	VMULPD Z24, Z0, Z8; \
	VMULPD Z24, Z12, Z20; \
	VMOVUPD 64(SI), Z25; \
	VFMADD231PD Z25, Z4, Z8; \
	VFMADD231PD Z25, Z16, Z20; \
	VMOVUPD 128(SI), Z24; \
	VFMADD231PD Z24, Z1, Z8; \
	VFMADD231PD Z24, Z13, Z20; \
	VMOVUPD 192(SI), Z25; \
	VFMADD231PD Z25, Z5, Z8; \
	VFMADD231PD Z25, Z17, Z20; \
	VMOVUPD 256(SI), Z24; \
	VFMADD231PD Z24, Z2, Z8; \
	VFMADD231PD Z24, Z14, Z20; \
	VMOVUPD 320(SI), Z25; \
	VFMADD231PD Z25, Z6, Z8; \
	VFMADD231PD Z25, Z18, Z20; \
	VMOVUPD 384(SI), Z24; \
	VFMADD231PD Z24, Z3, Z8; \
	VFMADD231PD Z24, Z15, Z20; \
	VMOVUPD 448(SI), Z25; \
	VFMADD231PD Z25, Z7, Z8; \
	VFMADD231PD Z25, Z19, Z20; \
	VMOVUPD 512(SI), Z24; \
	VMULPD Z24, Z0, Z9; \
	VMULPD Z24, Z12, Z21; \
	VMOVUPD 576(SI), Z25; \
	VFMADD231PD Z25, Z4, Z9; \
	VFMADD231PD Z25, Z16, Z21; \
	VMOVUPD 640(SI), Z24; \
	VFMADD231PD Z24, Z1, Z9; \
	VFMADD231PD Z24, Z13, Z21; \
	VMOVUPD 704(SI), Z25; \
	VFMADD231PD Z25, Z5, Z9; \
	VFMADD231PD Z25, Z17, Z21; \
	VMOVUPD 768(SI), Z24; \
	VFMADD231PD Z24, Z2, Z9; \
	VFMADD231PD Z24, Z14, Z21; \
	VMOVUPD 832(SI), Z25; \
	VFMADD231PD Z25, Z6, Z9; \
	VFMADD231PD Z25, Z18, Z21; \
	VMOVUPD 896(SI), Z24; \
	VFMADD231PD Z24, Z3, Z9; \
	VFMADD231PD Z24, Z15, Z21; \
	VMOVUPD 960(SI), Z25; \
	VFMADD231PD Z25, Z7, Z9; \
	VFMADD231PD Z25, Z19, Z21

// COL_COEFS loads the coefficient vectors of one column, rows 0–3 at
// OFF0…OFF3 (SI), into Z24–Z27 for Z2_COL and X4_COL.
#define COL_COEFS(OFF0, OFF1, OFF2, OFF3) \
	VMOVUPD OFF0(SI), Z24; \
	VMOVUPD OFF1(SI), Z25; \
	VMOVUPD OFF2(SI), Z26; \
	VMOVUPD OFF3(SI), Z27

// Z2_COL is one column of the four-row arithmetic of apply2RunsAVX512x2
// taken column by column: the coefficient vectors of rows 0–3 at OFF0…OFF3
// (SI) times the input VA of the first half and VB of the second, by OP
// (VMULPD for column 0, else VFMADD231PD), into the accumulators Z8–Z11 and
// Z20–Z23.
// Consecutive instructions update different accumulators, so each chain
// waits on an instruction eight places back instead of two.
#define Z2_COL(OP, OFF0, OFF1, OFF2, OFF3, VA, VB) \
	COL_COEFS(OFF0, OFF1, OFF2, OFF3); \
	OP Z24, VA, Z8; \
	OP Z24, VB, Z20; \
	OP Z25, VA, Z9; \
	OP Z25, VB, Z21; \
	OP Z26, VA, Z10; \
	OP Z26, VB, Z22; \
	OP Z27, VA, Z11; \
	OP Z27, VB, Z23

// Z2_COLS is the arithmetic of apply2RunsAVX512x2's rows 0–3 (inputs in
// Z0–Z3 and Z12–Z15, their swaps from Z2_HALFSWAP) column by column: every
// lane's chain (a multiply, then seven multiply-adds over v0, v0s, v1, v1s,
// v2, v2s, v3, v3s) is unchanged, so are the results, bit for bit.
#define Z2_COLS \
	Z2_COL(VMULPD, 0, 512, 1024, 1536, Z0, Z12); \
	Z2_COL(VFMADD231PD, 64, 576, 1088, 1600, Z4, Z16); \
	Z2_COL(VFMADD231PD, 128, 640, 1152, 1664, Z1, Z13); \
	Z2_COL(VFMADD231PD, 192, 704, 1216, 1728, Z5, Z17); \
	Z2_COL(VFMADD231PD, 256, 768, 1280, 1792, Z2, Z14); \
	Z2_COL(VFMADD231PD, 320, 832, 1344, 1856, Z6, Z18); \
	Z2_COL(VFMADD231PD, 384, 896, 1408, 1920, Z3, Z15); \
	Z2_COL(VFMADD231PD, 448, 960, 1472, 1984, Z7, Z19)

// func apply2R1AVX512x2(x *complex128, hi uint, from, to int, c *coef2z)
//
// apply2RunsAVX for lo = 1 and hi ≥ 2 on eight groups per iteration, from
// and to multiples of 8, in 512-bit vectors. With lo = 1 a run is two groups
// long: the even group g and g+1 have base index p = insert(2g, hi), and the
// 64 bytes at p hold [v0(g), v0(g+1), v1(g), v1(g+1)] (at p + 2^hi the same
// of v2, v3). VSHUFF64X2 gathers two such runs into the vectors of
// apply2RunsAVX512 ([v0] of four groups, then [v1]), the arithmetic is that
// of apply2RunsAVX512x2 (coefficients loaded once for both halves) taken
// column by column (Z2_COLS, eight independent chains in turn), and the
// outputs are shuffled back. The shuffles only move whole amplitudes and
// every lane sees the instructions of apply2RunsAVX in the same order, so the
// results are bit-identical to it. The column order took 1.08–1.10 times
// less time than the row order (BenchmarkKernelAB's form, pairs (1, 2) and
// (1, 5), one core of the 2-core Xeon Sapphire Rapids guest, 2026-12-03). c
// is the coef2z of splitRuns.
TEXT ·apply2R1AVX512x2(SB), NOSPLIT, $0-40
	MOVQ x+0(FP), DI
	MOVQ hi+8(FP), CX
	MOVQ from+16(FP), R10      // k
	MOVQ to+24(FP), R11        // end
	MOVQ c+32(FP), SI
	MOVQ $1, AX
	SHLXQ CX, AX, R15          // 2^hi
	MOVQ R15, R9
	NEGQ R9                    // ^(2^hi − 1)
	SHLQ $4, R15               // byte offset of bit hi
	CMPQ R10, R11
	JGE  zr12Done

zr12Loop:
	// p(g) = 2g + (2g &^ (2^hi − 1)) for g = k, k+2, k+4, k+6
	LEAQ (R10)(R10*1), AX
	MOVQ AX, CX
	ANDQ R9, CX
	ADDQ CX, AX
	SHLQ $4, AX
	ADDQ DI, AX                // groups k, k+1
	LEAQ 4(R10)(R10*1), BX
	MOVQ BX, CX
	ANDQ R9, CX
	ADDQ CX, BX
	SHLQ $4, BX
	ADDQ DI, BX                // groups k+2, k+3
	LEAQ 8(R10)(R10*1), DX
	MOVQ DX, CX
	ANDQ R9, CX
	ADDQ CX, DX
	SHLQ $4, DX
	ADDQ DI, DX                // groups k+4, k+5
	LEAQ 12(R10)(R10*1), R13
	MOVQ R13, CX
	ANDQ R9, CX
	ADDQ CX, R13
	SHLQ $4, R13
	ADDQ DI, R13               // groups k+6, k+7

	VMOVUPD (AX), Z26
	VMOVUPD (BX), Z27
	VMOVUPD (AX)(R15*1), Z28
	VMOVUPD (BX)(R15*1), Z29
	VSHUFF64X2 $0x44, Z27, Z26, Z0   // v0 of k…k+3
	VSHUFF64X2 $0xee, Z27, Z26, Z1   // v1
	VSHUFF64X2 $0x44, Z29, Z28, Z2   // v2
	VSHUFF64X2 $0xee, Z29, Z28, Z3   // v3
	VMOVUPD (DX), Z26
	VMOVUPD (R13), Z27
	VMOVUPD (DX)(R15*1), Z28
	VMOVUPD (R13)(R15*1), Z29
	VSHUFF64X2 $0x44, Z27, Z26, Z12  // v0 of k+4…k+7
	VSHUFF64X2 $0xee, Z27, Z26, Z13
	VSHUFF64X2 $0x44, Z29, Z28, Z14
	VSHUFF64X2 $0xee, Z29, Z28, Z15
	Z2_HALFSWAP
	Z2_COLS

	VSHUFF64X2 $0x44, Z9, Z8, Z26
	VSHUFF64X2 $0xee, Z9, Z8, Z27
	VSHUFF64X2 $0x44, Z11, Z10, Z28
	VSHUFF64X2 $0xee, Z11, Z10, Z29
	VMOVUPD Z26, (AX)
	VMOVUPD Z27, (BX)
	VMOVUPD Z28, (AX)(R15*1)
	VMOVUPD Z29, (BX)(R15*1)
	VSHUFF64X2 $0x44, Z21, Z20, Z26
	VSHUFF64X2 $0xee, Z21, Z20, Z27
	VSHUFF64X2 $0x44, Z23, Z22, Z28
	VSHUFF64X2 $0xee, Z23, Z22, Z29
	VMOVUPD Z26, (DX)
	VMOVUPD Z27, (R13)
	VMOVUPD Z28, (DX)(R15*1)
	VMOVUPD Z29, (R13)(R15*1)

	ADDQ $8, R10
	CMPQ R10, R11
	JLT  zr12Loop

zr12Done:
	VZEROUPPER
	RET

// func apply2Q01AVX512x2(x *complex128, from, to int, c *coef2z)
//
// apply2Q0AVX for the pair (0, 1) on four groups per iteration, from and to
// multiples of 4, in 512-bit vectors. Group g is the 64 bytes at 4g,
// [v0, v1, v2, v3]; VSHUFF64X2 gathers two groups into the vectors of
// apply2Q0AVX512 (P = [v0, v1] of both, Q = [v2, v3], and the half-swapped
// Ps, Qs), the arithmetic is that of apply2Q0AVX512x2 (coefficients loaded
// once for both halves), and P', Q' are shuffled back. The shuffles only
// move whole amplitudes and every lane sees the instructions of apply2Q0AVX
// in the same order, so the results are bit-identical to it. c is the
// coef2z of splitQ0.
TEXT ·apply2Q01AVX512x2(SB), NOSPLIT, $0-32
	MOVQ x+0(FP), DI
	MOVQ from+8(FP), R10
	MOVQ to+16(FP), R11
	MOVQ c+24(FP), SI
	CMPQ R10, R11
	JGE  zq012Done
	MOVQ R10, AX
	SHLQ $6, AX
	ADDQ DI, AX                // &x[4k]
	SUBQ R10, R11
	SHRQ $2, R11               // iterations

zq012Loop:
	VMOVUPD 0(AX), Z26         // group k
	VMOVUPD 64(AX), Z27        // group k+1
	VMOVUPD 128(AX), Z28
	VMOVUPD 192(AX), Z29
	VSHUFF64X2 $0x44, Z27, Z26, Z0   // P
	VSHUFF64X2 $0x11, Z27, Z26, Z1   // Ps
	VSHUFF64X2 $0xee, Z27, Z26, Z2   // Q
	VSHUFF64X2 $0xbb, Z27, Z26, Z3   // Qs
	VSHUFF64X2 $0x44, Z29, Z28, Z12
	VSHUFF64X2 $0x11, Z29, Z28, Z13
	VSHUFF64X2 $0xee, Z29, Z28, Z14
	VSHUFF64X2 $0xbb, Z29, Z28, Z15
	Z2_HALFSWAP
	Z2_ROWS01

	VSHUFF64X2 $0x44, Z9, Z8, Z26
	VSHUFF64X2 $0xee, Z9, Z8, Z27
	VSHUFF64X2 $0x44, Z21, Z20, Z28
	VSHUFF64X2 $0xee, Z21, Z20, Z29
	VMOVUPD Z26, 0(AX)
	VMOVUPD Z27, 64(AX)
	VMOVUPD Z28, 128(AX)
	VMOVUPD Z29, 192(AX)

	ADDQ $256, AX
	DECQ R11
	JNZ  zq012Loop

zq012Done:
	VZEROUPPER
	RET

// X4_LOADSWAP loads input vector j of the four quarters of an iteration of
// apply2RunsAVX512x4 (from the operands A, B, C, D) into Z16, Z18, Z20, Z22
// and their re/im-swapped forms into Z17, Z19, Z21, Z23.
#define X4_LOADSWAP(A, B, C, D) \
	VMOVUPD A, Z16; \
	VMOVUPD B, Z18; \
	VMOVUPD C, Z20; \
	VMOVUPD D, Z22; \
	VPERMILPD $0x55, Z16, Z17; \
	VPERMILPD $0x55, Z18, Z19; \
	VPERMILPD $0x55, Z20, Z21; \
	VPERMILPD $0x55, Z22, Z23

// X4_COL is one column of apply2RunsAVX512x4: the coefficient vectors of
// rows 0–3 at OFF, OFF+512, OFF+1024, OFF+1536 (SI) times the input of each
// quarter (VA…VD), by OP (VMULPD for column 0, else VFMADD231PD) into the
// accumulators of rows 0–3 of the quarters: Z0–Z3, Z4–Z7, Z8–Z11, Z12–Z15.
// Consecutive instructions update different accumulators, so each one's
// chain waits on an instruction sixteen places back.
#define X4_COL(OP, OFF0, OFF1, OFF2, OFF3, VA, VB, VC, VD) \
	COL_COEFS(OFF0, OFF1, OFF2, OFF3); \
	OP Z24, VA, Z0; \
	OP Z24, VB, Z4; \
	OP Z24, VC, Z8; \
	OP Z24, VD, Z12; \
	OP Z25, VA, Z1; \
	OP Z25, VB, Z5; \
	OP Z25, VC, Z9; \
	OP Z25, VD, Z13; \
	OP Z26, VA, Z2; \
	OP Z26, VB, Z6; \
	OP Z26, VC, Z10; \
	OP Z26, VD, Z14; \
	OP Z27, VA, Z3; \
	OP Z27, VB, Z7; \
	OP Z27, VC, Z11; \
	OP Z27, VD, Z15

// func apply2RunsAVX512x4(x *complex128, lo, hi uint, from, to int, c *coef2z)
//
// apply2RunsAVX512 on sixteen groups per iteration, four quarters
// (k…k+3), …, (k+12…k+15), from and to multiples of 16 and 2 ≤ lo < hi. The
// multiply-adds go column by column: the coefficient vectors of one input
// (rows 0–3) are loaded once and applied to all four quarters, sixteen
// independent accumulation chains, and consecutive instructions belong to
// different chains. Inputs are loaded (and re/im-swapped) just before their
// two columns, so the 32 vector registers hold the sixteen accumulators,
// the current input of each quarter and its swap, and four coefficients.
// Each lane's chain (a multiply, then seven multiply-adds in the column
// order v0, v0s, v1, v1s, v2, v2s, v3, v3s) is that of apply2RunsAVX512, so
// the results are bit-identical to it.
//
// apply2RunsAVX512x2 issues its chains row after row, two at a time, so the
// out-of-order window must hold all four rows to overlap them; here an
// iteration is bound by its ports instead: 128 multiply-adds and 16 swaps
// (VPERMILPD) for 64 amplitudes, all on the two 512-bit ports (0 and 5),
// 1.125 cycles per amplitude. On one core of the 2-core Xeon Sapphire
// Rapids guest (2026-12-03, BenchmarkKernelAB, alternating every 16 gates)
// it took 0.53–0.58 ns per gate per amplitude against 0.71–0.79 for
// apply2RunsAVX512x2 (ratio 1.29–1.38 over the pairs (2, 3), (4, 5),
// (4, 9), (8, 13), three runs each).
TEXT ·apply2RunsAVX512x4(SB), NOSPLIT, $0-48
	RUNS_SETUP(z4runsDone)

z4runsLoop:
	RUNS_BASE(0, AX)
	RUNS_BASE(4, BX)
	RUNS_BASE(8, DX)
	RUNS_BASE(12, R13)

	X4_LOADSWAP((AX), (BX), (DX), (R13))
	X4_COL(VMULPD, 0, 512, 1024, 1536, Z16, Z18, Z20, Z22)
	X4_COL(VFMADD231PD, 64, 576, 1088, 1600, Z17, Z19, Z21, Z23)
	X4_LOADSWAP((AX)(R14*1), (BX)(R14*1), (DX)(R14*1), (R13)(R14*1))
	X4_COL(VFMADD231PD, 128, 640, 1152, 1664, Z16, Z18, Z20, Z22)
	X4_COL(VFMADD231PD, 192, 704, 1216, 1728, Z17, Z19, Z21, Z23)
	X4_LOADSWAP((AX)(R15*1), (BX)(R15*1), (DX)(R15*1), (R13)(R15*1))
	X4_COL(VFMADD231PD, 256, 768, 1280, 1792, Z16, Z18, Z20, Z22)
	X4_COL(VFMADD231PD, 320, 832, 1344, 1856, Z17, Z19, Z21, Z23)
	X4_LOADSWAP((AX)(R12*1), (BX)(R12*1), (DX)(R12*1), (R13)(R12*1))
	X4_COL(VFMADD231PD, 384, 896, 1408, 1920, Z16, Z18, Z20, Z22)
	X4_COL(VFMADD231PD, 448, 960, 1472, 1984, Z17, Z19, Z21, Z23)

	RUNS_STORE(Z0, Z1, Z2, Z3, AX)
	RUNS_STORE(Z4, Z5, Z6, Z7, BX)
	RUNS_STORE(Z8, Z9, Z10, Z11, DX)
	RUNS_STORE(Z12, Z13, Z14, Z15, R13)

	ADDQ $16, R10
	CMPQ R10, R11
	JLT  z4runsLoop

z4runsDone:
	VZEROUPPER
	RET
