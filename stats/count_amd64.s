#include "textflag.h"

// LEAFSUMS stores the collision sums of the two leaves whose accumulator is
// Z (lanes sA0 sB0 sA1 sB1 sA2 sB2 sA3 sB3, Y its low half) at off(R10):
// (sA0 + sA1) + (sA2 + sA3), then B's.
#define LEAFSUMS(Z, Y, off) \
	VEXTRACTF64X4 $1, Z, Y4 \
	VPERM2F128 $0x20, Y4, Y, Y5 \
	VPERM2F128 $0x31, Y4, Y, Y6 \
	VADDPD Y6, Y5, Y5 \
	VEXTRACTF128 $1, Y5, X6 \
	VADDPD X6, X5, X5 \
	VMOVUPD X5, off(R10)

// INC increments the counter of the bin index at off(R14), through R.
#define INC(off, R) \
	MOVQ off(R14), R \
	INCL (DI)(R*4)

// func ksCountAVX512(a *float64, groups int, leafStride, groupStride uintptr, pos, shift uint64, u *uint32, nb uint64, sums *float64, outer *float64) int
//
// Counts the probabilities p = re·re + im·im of groups·8 leaves of
// pairwiseBlock = 128 (re, im) pairs each, and writes each leaf's collision
// sum, the value leafCount returns for it, to sums: eight per group, in the
// group's leaf order. The leaves of a group start at a + j·leafStride
// (bytes, j = 0…7); the next group at a + groupStride. A probability whose
// fine bin j = (bits(p) − pos) >> shift is below nb increments u[j]; any
// other (zero, tiny, huge, NaN) increments u[nb+1], a spare counter, and is
// written to outer, whose number the kernel returns.
//
// The squares and the sums are those of leafCount, bit for bit: VMULPD
// rounds every square, VPERMILPD and VADDPD add re² and im² of each pair
// (one add, so the order of its operands does not matter), and lane k of a
// leaf's accumulator adds the squares of the leaf's pairs 4i+k in the order
// of i, as leafCount's s_k does; the lanes are combined as
// (s0 + s1) + (s2 + s3). Two leaves share a 512-bit accumulator (even lanes
// one, odd lanes the other; VSHUFPD puts them there), so a group keeps four
// independent chains of additions and reads eight streams at once.
//
// The bin indices go through 256 bytes of the frame (R14, on a 64-byte
// boundary: a store that crosses a cache line is not forwarded to the
// loads that read it back) to the scalar increments.
TEXT ·ksCountAVX512(SB), NOSPLIT, $320-88
	LEAQ 63(SP), R14
	ANDQ $~63, R14
	MOVQ a+0(FP), SI
	MOVQ leafStride+16(FP), R8
	LEAQ (R8)(R8*2), R9
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
	JEQ  l8done
l8group:
	LEAQ (SI)(R8*4), BX
	VXORPD Z8, Z8, Z8
	VXORPD Z9, Z9, Z9
	VXORPD Z10, Z10, Z10
	VXORPD Z11, Z11, Z11
	MOVQ $32, R13
l8pairs: // four pairs of each of the eight leaves
	VMOVUPD (SI), Z0
	VMOVUPD (SI)(R8*1), Z1
	VMOVUPD (SI)(R8*2), Z2
	VMOVUPD (SI)(R9*1), Z3
	VMOVUPD (BX), Z4
	VMOVUPD (BX)(R8*1), Z5
	VMOVUPD (BX)(R8*2), Z6
	VMOVUPD (BX)(R9*1), Z7
	VMULPD Z0, Z0, Z0
	VMULPD Z1, Z1, Z1
	VMULPD Z2, Z2, Z2
	VMULPD Z3, Z3, Z3
	VMULPD Z4, Z4, Z4
	VMULPD Z5, Z5, Z5
	VMULPD Z6, Z6, Z6
	VMULPD Z7, Z7, Z7
	VPERMILPD $0x55, Z0, Z16
	VPERMILPD $0x55, Z1, Z17
	VPERMILPD $0x55, Z2, Z18
	VPERMILPD $0x55, Z3, Z19
	VPERMILPD $0x55, Z4, Z20
	VPERMILPD $0x55, Z5, Z21
	VPERMILPD $0x55, Z6, Z22
	VPERMILPD $0x55, Z7, Z23
	VADDPD Z16, Z0, Z0
	VADDPD Z17, Z1, Z1
	VADDPD Z18, Z2, Z2
	VADDPD Z19, Z3, Z3
	VADDPD Z20, Z4, Z4
	VADDPD Z21, Z5, Z5
	VADDPD Z22, Z6, Z6
	VADDPD Z23, Z7, Z7
	VSHUFPD $0, Z1, Z0, Z0 // p of leaves 0 (even lanes) and 1 (odd lanes)
	VSHUFPD $0, Z3, Z2, Z2
	VSHUFPD $0, Z5, Z4, Z4
	VSHUFPD $0, Z7, Z6, Z6
	VMULPD Z0, Z0, Z16
	VMULPD Z2, Z2, Z17
	VMULPD Z4, Z4, Z18
	VMULPD Z6, Z6, Z19
	VADDPD Z16, Z8, Z8
	VADDPD Z17, Z9, Z9
	VADDPD Z18, Z10, Z10
	VADDPD Z19, Z11, Z11
	VPSUBQ Z15, Z0, Z24
	VPSUBQ Z15, Z2, Z25
	VPSUBQ Z15, Z4, Z26
	VPSUBQ Z15, Z6, Z27
	VPSRLQ X14, Z24, Z24
	VPSRLQ X14, Z25, Z25
	VPSRLQ X14, Z26, Z26
	VPSRLQ X14, Z27, Z27
	VPCMPUQ $5, Z13, Z24, K1 // j ≥ nb: outside the fine bins
	VPCMPUQ $5, Z13, Z25, K2
	VPCMPUQ $5, Z13, Z26, K3
	VPCMPUQ $5, Z13, Z27, K4
	VPMINUQ Z12, Z24, Z24 // those count in the spare u[nb+1]
	VPMINUQ Z12, Z25, Z25
	VPMINUQ Z12, Z26, Z26
	VPMINUQ Z12, Z27, Z27
	VMOVDQA64 Z24, 0(R14)
	VMOVDQA64 Z25, 64(R14)
	VMOVDQA64 Z26, 128(R14)
	VMOVDQA64 Z27, 192(R14)
	KORW K1, K2, K5
	KORW K3, K4, K6
	KORTESTW K5, K6
	JNE l8outer
l8inc:
	INC(0, CX)
	INC(8, DX)
	INC(16, R12)
	INC(24, CX)
	INC(32, DX)
	INC(40, R12)
	INC(48, CX)
	INC(56, DX)
	INC(64, R12)
	INC(72, CX)
	INC(80, DX)
	INC(88, R12)
	INC(96, CX)
	INC(104, DX)
	INC(112, R12)
	INC(120, CX)
	INC(128, DX)
	INC(136, R12)
	INC(144, CX)
	INC(152, DX)
	INC(160, R12)
	INC(168, CX)
	INC(176, DX)
	INC(184, R12)
	INC(192, CX)
	INC(200, DX)
	INC(208, R12)
	INC(216, CX)
	INC(224, DX)
	INC(232, R12)
	INC(240, CX)
	INC(248, DX)
	ADDQ $64, SI
	ADDQ $64, BX
	DECQ R13
	JNZ l8pairs
	LEAFSUMS(Z8, Y8, 0)
	LEAFSUMS(Z9, Y9, 16)
	LEAFSUMS(Z10, Y10, 32)
	LEAFSUMS(Z11, Y11, 48)
	ADDQ $64, R10
	SUBQ $2048, SI
	ADDQ groupStride+24(FP), SI
	DECQ groups+8(FP)
	JNZ l8group
l8done:
	VZEROUPPER
	MOVQ AX, ret+80(FP)
	RET
l8outer:
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
	VCOMPRESSPD Z4, K3, (R11)(AX*8)
	KMOVW K3, CX
	POPCNTL CX, CX
	ADDQ CX, AX
	VCOMPRESSPD Z6, K4, (R11)(AX*8)
	KMOVW K4, CX
	POPCNTL CX, CX
	ADDQ CX, AX
	JMP l8inc
