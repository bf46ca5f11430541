#include "textflag.h"

// func ksCountAVX512(a *float64, groups int, leafStride, groupStride uintptr, pos, shift uint64, u *uint32, nb uint64, sums *float64, outer *float64) int
//
// Counts the probabilities p = re·re + im·im of groups·4 leaves of
// pairwiseBlock = 128 (re, im) pairs each, and writes each leaf's collision
// sum, the value leafCount returns for it, to sums: four per group, in the
// group's leaf order. The leaves of a group start at a, a+leafStride,
// a+2·leafStride and a+3·leafStride (bytes); the next group at
// a+groupStride. A probability whose fine bin j = (bits(p) − pos) >> shift
// is below nb increments u[j]; any other (zero, tiny, huge, NaN) increments
// u[nb+1], a spare counter, and is written to outer, whose number the
// kernel returns.
//
// The squares and the sums are those of leafCount, bit for bit: VMULPD
// rounds every square, VPERMILPD and VADDPD add re² and im² of each pair
// (one add, so the order of its operands does not matter), and lane k of a
// leaf's accumulator adds the squares of the leaf's pairs 4i+k in the order
// of i, as leafCount's s_k does; the lanes are combined as
// (s0 + s1) + (s2 + s3). Two leaves share a 512-bit accumulator (even lanes
// one, odd lanes the other; VSHUFPD puts them there), so a group keeps two
// independent chains of additions.
TEXT ·ksCountAVX512(SB), NOSPLIT, $192-88
	// R14: 128 bytes of the frame on a 64-byte boundary, for the bin
	// indices (a store that crosses a cache line is not forwarded to the
	// loads that read it back).
	LEAQ 63(SP), R14
	ANDQ $~63, R14
	MOVQ a+0(FP), SI
	MOVQ leafStride+16(FP), R8
	VPBROADCASTQ pos+32(FP), Z15
	VMOVQ shift+40(FP), X14
	MOVQ u+48(FP), DI
	VPBROADCASTQ nb+56(FP), Z13
	MOVQ nb+56(FP), AX
	INCQ AX
	VPBROADCASTQ AX, Z12
	MOVQ sums+64(FP), R10
	MOVQ outer+72(FP), R11
	XORQ AX, AX
	CMPQ groups+8(FP), $0
	JEQ  done

group:
	LEAQ (SI)(R8*1), BX
	LEAQ (BX)(R8*1), DX
	LEAQ (DX)(R8*1), R12
	VXORPD Z8, Z8, Z8
	VXORPD Z9, Z9, Z9
	XORQ R13, R13

pairs:
	VMOVUPD (SI)(R13*1), Z0
	VMOVUPD (BX)(R13*1), Z1
	VMOVUPD (DX)(R13*1), Z2
	VMOVUPD (R12)(R13*1), Z3
	VMULPD  Z0, Z0, Z0
	VMULPD  Z1, Z1, Z1
	VMULPD  Z2, Z2, Z2
	VMULPD  Z3, Z3, Z3
	VPERMILPD $0x55, Z0, Z4
	VPERMILPD $0x55, Z1, Z5
	VPERMILPD $0x55, Z2, Z6
	VPERMILPD $0x55, Z3, Z7
	VADDPD  Z4, Z0, Z0
	VADDPD  Z5, Z1, Z1
	VADDPD  Z6, Z2, Z2
	VADDPD  Z7, Z3, Z3
	VSHUFPD $0, Z1, Z0, Z0 // p of leaves A (even lanes) and B (odd lanes)
	VSHUFPD $0, Z3, Z2, Z2 // p of leaves C and D
	VMULPD  Z0, Z0, Z4
	VMULPD  Z2, Z2, Z5
	VADDPD  Z4, Z8, Z8
	VADDPD  Z5, Z9, Z9
	VPSUBQ  Z15, Z0, Z6
	VPSUBQ  Z15, Z2, Z7
	VPSRLQ  X14, Z6, Z6
	VPSRLQ  X14, Z7, Z7
	VPCMPUQ $5, Z13, Z6, K1 // j ≥ nb: outside the fine bins
	VPCMPUQ $5, Z13, Z7, K2
	VPMINUQ Z12, Z6, Z6
	VPMINUQ Z12, Z7, Z7
	VMOVDQA64 Z6, 0(R14)
	VMOVDQA64 Z7, 64(R14)
	KORTESTW K1, K2
	JNE     outerlanes

increments:
	MOVQ 0(R14), CX
	MOVQ 8(R14), R9
	INCL (DI)(CX*4)
	INCL (DI)(R9*4)
	MOVQ 16(R14), CX
	MOVQ 24(R14), R9
	INCL (DI)(CX*4)
	INCL (DI)(R9*4)
	MOVQ 32(R14), CX
	MOVQ 40(R14), R9
	INCL (DI)(CX*4)
	INCL (DI)(R9*4)
	MOVQ 48(R14), CX
	MOVQ 56(R14), R9
	INCL (DI)(CX*4)
	INCL (DI)(R9*4)
	MOVQ 64(R14), CX
	MOVQ 72(R14), R9
	INCL (DI)(CX*4)
	INCL (DI)(R9*4)
	MOVQ 80(R14), CX
	MOVQ 88(R14), R9
	INCL (DI)(CX*4)
	INCL (DI)(R9*4)
	MOVQ 96(R14), CX
	MOVQ 104(R14), R9
	INCL (DI)(CX*4)
	INCL (DI)(R9*4)
	MOVQ 112(R14), CX
	MOVQ 120(R14), R9
	INCL (DI)(CX*4)
	INCL (DI)(R9*4)
	ADDQ $64, R13
	CMPQ R13, $2048
	JNE  pairs

	// Lanes of Z8: sA0 sB0 sA1 sB1 sA2 sB2 sA3 sB3 (s_k of leaves A, B).
	VEXTRACTF64X4 $1, Z8, Y4
	VPERM2F128 $0x20, Y4, Y8, Y5 // (sA0 sB0) (sA2 sB2)
	VPERM2F128 $0x31, Y4, Y8, Y6 // (sA1 sB1) (sA3 sB3)
	VADDPD Y6, Y5, Y5            // (sA0+sA1 sB0+sB1) (sA2+sA3 sB2+sB3)
	VEXTRACTF128 $1, Y5, X6
	VADDPD X6, X5, X5
	VMOVUPD X5, 0(R10)
	VEXTRACTF64X4 $1, Z9, Y4
	VPERM2F128 $0x20, Y4, Y9, Y5
	VPERM2F128 $0x31, Y4, Y9, Y6
	VADDPD Y6, Y5, Y5
	VEXTRACTF128 $1, Y5, X6
	VADDPD X6, X5, X5
	VMOVUPD X5, 16(R10)
	ADDQ $32, R10
	ADDQ groupStride+24(FP), SI
	DECQ groups+8(FP)
	JNZ  group

done:
	VZEROUPPER
	MOVQ AX, ret+80(FP)
	RET

outerlanes:
	// Rare for a Porter–Thomas state (about 2^−12 of the values): the
	// values outside the fine bins go to outer, in lane order.
	VCOMPRESSPD Z0, K1, (R11)(AX*8)
	KMOVW K1, CX
	POPCNTL CX, CX
	ADDQ CX, AX
	VCOMPRESSPD Z2, K2, (R11)(AX*8)
	KMOVW K2, CX
	POPCNTL CX, CX
	ADDQ CX, AX
	JMP increments
