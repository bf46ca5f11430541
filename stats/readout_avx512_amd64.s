#include "textflag.h"

// ksPermEven and ksPermOdd pick, from two vectors of four (re², im²) pairs
// each, the eight re² and the eight im² in the pairs' order (VPERMT2PD
// indices: 0–7 the first table, 8–15 the second).
DATA ksPermEven<>+0(SB)/8, $0
DATA ksPermEven<>+8(SB)/8, $2
DATA ksPermEven<>+16(SB)/8, $4
DATA ksPermEven<>+24(SB)/8, $6
DATA ksPermEven<>+32(SB)/8, $8
DATA ksPermEven<>+40(SB)/8, $10
DATA ksPermEven<>+48(SB)/8, $12
DATA ksPermEven<>+56(SB)/8, $14
GLOBL ksPermEven<>(SB), RODATA|NOPTR, $64

DATA ksPermOdd<>+0(SB)/8, $1
DATA ksPermOdd<>+8(SB)/8, $3
DATA ksPermOdd<>+16(SB)/8, $5
DATA ksPermOdd<>+24(SB)/8, $7
DATA ksPermOdd<>+32(SB)/8, $9
DATA ksPermOdd<>+40(SB)/8, $11
DATA ksPermOdd<>+48(SB)/8, $13
DATA ksPermOdd<>+56(SB)/8, $15
GLOBL ksPermOdd<>(SB), RODATA|NOPTR, $64

// KSGROUP filters the eight pairs at src into the output at dst, whose
// count is cnt (see ksFilterAVX512): the loop body of both kernels. The
// mask operations are the 16-bit KORW and KMOVW of AVX-512 F (a compare of
// eight lanes leaves the upper mask bits zero), so that no DQ is needed.
#define KSGROUP(src, dst, cnt) \
	VMOVUPD (src), Z0 \
	VMOVUPD 64(src), Z1 \
	VMULPD  Z0, Z0, Z0 \
	VMULPD  Z1, Z1, Z1 \
	VMOVAPD Z0, Z2 \
	VPERMT2PD Z1, Z12, Z0 \
	VPERMT2PD Z1, Z13, Z2 \
	VADDPD  Z2, Z0, Z0 \
	VPSUBQ  Z15, Z0, Z5 \
	VPSRLQ  X14, Z5, Z5 \
	VPSUBQ  Z16, Z5, Z6 \
	VPCMPUQ $2, Z24, Z6, K1 \
	VPSUBQ  Z17, Z5, Z7 \
	VPCMPUQ $2, Z25, Z7, K2 \
	VPSUBQ  Z18, Z5, Z8 \
	VPCMPUQ $2, Z26, Z8, K3 \
	VPSUBQ  Z19, Z5, Z9 \
	VPCMPUQ $2, Z27, Z9, K4 \
	VPSUBQ  Z20, Z5, Z6 \
	VPCMPUQ $2, Z28, Z6, K5 \
	VPSUBQ  Z21, Z5, Z7 \
	VPCMPUQ $2, Z29, Z7, K6 \
	VPSUBQ  Z22, Z5, Z8 \
	VPCMPUQ $2, Z30, Z8, K7 \
	KORW    K2, K1, K1 \
	VPSUBQ  Z23, Z5, Z9 \
	VPCMPUQ $2, Z31, Z9, K2 \
	KORW    K4, K3, K3 \
	KORW    K6, K5, K5 \
	KORW    K2, K7, K7 \
	KORW    K3, K1, K1 \
	KORW    K7, K5, K5 \
	KORW    K5, K1, K1 \
	KMOVW   K1, R8 \
	POPCNTL R8, R8 \
	VCOMPRESSPD Z0, K1, Z10 \
	VMOVUPD Z10, (dst)(cnt*8) \
	ADDQ    R8, cnt

// KSSETUP loads the filter's constants: pos in Z15, shift in X14, the
// permutations in Z12 and Z13, the intervals' first bins in Z16–Z23 and
// widths in Z24–Z31 from iv at DI.
#define KSSETUP \
	VMOVDQU64 ksPermEven<>(SB), Z12 \
	VMOVDQU64 ksPermOdd<>(SB), Z13 \
	VPBROADCASTQ 0(DI), Z16 \
	VPBROADCASTQ 8(DI), Z17 \
	VPBROADCASTQ 16(DI), Z18 \
	VPBROADCASTQ 24(DI), Z19 \
	VPBROADCASTQ 32(DI), Z20 \
	VPBROADCASTQ 40(DI), Z21 \
	VPBROADCASTQ 48(DI), Z22 \
	VPBROADCASTQ 56(DI), Z23 \
	VPBROADCASTQ 64(DI), Z24 \
	VPBROADCASTQ 72(DI), Z25 \
	VPBROADCASTQ 80(DI), Z26 \
	VPBROADCASTQ 88(DI), Z27 \
	VPBROADCASTQ 96(DI), Z28 \
	VPBROADCASTQ 104(DI), Z29 \
	VPBROADCASTQ 112(DI), Z30 \
	VPBROADCASTQ 120(DI), Z31

// func ksFilterAVX512(a *float64, groups int, pos, shift uint64, iv *[2 * ksFilterIntervals]uint64, out *float64) int
//
// Writes to out, in order, the probabilities p = re·re + im·im of the
// 8·groups pairs at a whose fine-bin index j = (bits(p) − pos) >> shift
// lies in one of the eight intervals of iv (j − iv[k] ≤ iv[8+k], unsigned),
// and returns their number. The squares are two VMULPD, each rounded on its
// own, and one VADDPD of re² (first operand) and im², as the Go loop
// computes them. The kept lanes are packed by VCOMPRESSPD into a register
// and stored with one unaligned 64-byte store, advancing the output by
// their number: no branch on the data. Group i stores at out[n], n ≤ 8·i,
// so every store stays within the 8·groups values of out.
TEXT ·ksFilterAVX512(SB), NOSPLIT, $0-56
	MOVQ a+0(FP), SI
	MOVQ groups+8(FP), CX
	VPBROADCASTQ pos+16(FP), Z15
	MOVQ shift+24(FP), X14
	MOVQ iv+32(FP), DI
	MOVQ out+40(FP), BX
	KSSETUP
	XORQ AX, AX
	TESTQ CX, CX
	JZ   done

loop:
	KSGROUP(SI, BX, AX)
	ADDQ    $128, SI
	DECQ    CX
	JNZ     loop

done:
	VZEROUPPER
	MOVQ AX, ret+48(FP)
	RET

// func ksFilterAVX512x4(a *float64, groups, stride int, pos, shift uint64, iv *[2 * ksFilterIntervals]uint64, out *float64, ostride int, n *[4]int)
//
// Filters four streams as ksFilterAVX512 does, in one loop that takes a
// group of eight pairs from each in turn: stream s starts stride·s bytes
// from a and writes its kept values from out + ostride·s bytes, their
// number to n[s]; each has groups groups.
TEXT ·ksFilterAVX512x4(SB), NOSPLIT, $0-72
	MOVQ a+0(FP), SI
	MOVQ groups+8(FP), CX
	MOVQ stride+16(FP), DX
	VPBROADCASTQ pos+24(FP), Z15
	MOVQ shift+32(FP), X14
	MOVQ iv+40(FP), DI
	MOVQ out+48(FP), BX
	MOVQ ostride+56(FP), R9
	KSSETUP
	LEAQ (SI)(DX*1), R10
	LEAQ (R10)(DX*1), R11
	LEAQ (R11)(DX*1), R12
	LEAQ (BX)(R9*1), R13
	LEAQ (R13)(R9*1), R14
	LEAQ (R14)(R9*1), R15
	XORQ AX, AX
	XORQ DX, DX
	XORQ DI, DI
	XORQ R9, R9
	TESTQ CX, CX
	JZ   done4

loop4:
	KSGROUP(SI, BX, AX)
	KSGROUP(R10, R13, DX)
	KSGROUP(R11, R14, DI)
	KSGROUP(R12, R15, R9)
	ADDQ    $128, SI
	ADDQ    $128, R10
	ADDQ    $128, R11
	ADDQ    $128, R12
	DECQ    CX
	JNZ     loop4

done4:
	VZEROUPPER
	MOVQ n+64(FP), CX
	MOVQ AX, 0(CX)
	MOVQ DX, 8(CX)
	MOVQ DI, 16(CX)
	MOVQ R9, 24(CX)
	RET
