//go:build amd64 && !purego

#include "textflag.h"

// One step p of the 4×12 micro-kernel: Y0–Y2 = row p of the B panel
// (12 values at bo(DI)), then for each row i of the tile Y3 = a[p][i]
// broadcast and Y(4+3i)…Y(6+3i) += Y3·(Y0, Y1, Y2).
#define STEP(ao, bo) \
	VMOVUPD      bo(DI), Y0           \
	VMOVUPD      bo+32(DI), Y1        \
	VMOVUPD      bo+64(DI), Y2        \
	VBROADCASTSD ao(SI), Y3           \
	VFMADD231PD  Y0, Y3, Y4           \
	VFMADD231PD  Y1, Y3, Y5           \
	VFMADD231PD  Y2, Y3, Y6           \
	VBROADCASTSD ao+8(SI), Y3         \
	VFMADD231PD  Y0, Y3, Y7           \
	VFMADD231PD  Y1, Y3, Y8           \
	VFMADD231PD  Y2, Y3, Y9           \
	VBROADCASTSD ao+16(SI), Y3        \
	VFMADD231PD  Y0, Y3, Y10          \
	VFMADD231PD  Y1, Y3, Y11          \
	VFMADD231PD  Y2, Y3, Y12          \
	VBROADCASTSD ao+24(SI), Y3        \
	VFMADD231PD  Y0, Y3, Y13          \
	VFMADD231PD  Y1, Y3, Y14          \
	VFMADD231PD  Y2, Y3, Y15

// func kernelFMA(kc int, a, b, c *float64, ldc int, add bool)
TEXT ·kernelFMA(SB), NOSPLIT, $0-41
	MOVQ kc+0(FP), CX
	MOVQ a+8(FP), SI
	MOVQ b+16(FP), DI
	MOVQ c+24(FP), DX
	MOVQ ldc+32(FP), R8
	SHLQ $3, R8

	VXORPD Y4, Y4, Y4
	VXORPD Y5, Y5, Y5
	VXORPD Y6, Y6, Y6
	VXORPD Y7, Y7, Y7
	VXORPD Y8, Y8, Y8
	VXORPD Y9, Y9, Y9
	VXORPD Y10, Y10, Y10
	VXORPD Y11, Y11, Y11
	VXORPD Y12, Y12, Y12
	VXORPD Y13, Y13, Y13
	VXORPD Y14, Y14, Y14
	VXORPD Y15, Y15, Y15

	CMPQ CX, $4
	JLT  tail

loop4:
	STEP(0, 0)
	STEP(32, 96)
	STEP(64, 192)
	STEP(96, 288)
	ADDQ $128, SI
	ADDQ $384, DI
	SUBQ $4, CX
	CMPQ CX, $4
	JGE  loop4

tail:
	TESTQ CX, CX
	JEQ   done

loop1:
	STEP(0, 0)
	ADDQ $32, SI
	ADDQ $96, DI
	DECQ CX
	JNE  loop1

done:
	LEAQ    (DX)(R8*1), R9
	LEAQ    (DX)(R8*2), R10
	LEAQ    (R10)(R8*1), R11
	MOVBQZX add+40(FP), AX
	TESTQ   AX, AX
	JEQ     store

	VADDPD 0(DX), Y4, Y4
	VADDPD 32(DX), Y5, Y5
	VADDPD 64(DX), Y6, Y6
	VADDPD 0(R9), Y7, Y7
	VADDPD 32(R9), Y8, Y8
	VADDPD 64(R9), Y9, Y9
	VADDPD 0(R10), Y10, Y10
	VADDPD 32(R10), Y11, Y11
	VADDPD 64(R10), Y12, Y12
	VADDPD 0(R11), Y13, Y13
	VADDPD 32(R11), Y14, Y14
	VADDPD 64(R11), Y15, Y15

store:
	VMOVUPD Y4, 0(DX)
	VMOVUPD Y5, 32(DX)
	VMOVUPD Y6, 64(DX)
	VMOVUPD Y7, 0(R9)
	VMOVUPD Y8, 32(R9)
	VMOVUPD Y9, 64(R9)
	VMOVUPD Y10, 0(R10)
	VMOVUPD Y11, 32(R10)
	VMOVUPD Y12, 64(R10)
	VMOVUPD Y13, 0(R11)
	VMOVUPD Y14, 32(R11)
	VMOVUPD Y15, 64(R11)
	VZEROUPPER
	RET

// func transpose4(dst, src *float64, lds, kk, ldd int)
//
// For p = 0 … kk−1 (kk a multiple of 4), dst[p·ldd + i] = src[i·lds + p]
// for i = 0 … 3: four rows of src become kk groups of four, ldd apart.
// Each 4×4 block goes through registers: unpack pairs of rows, then swap
// 128-bit halves.
TEXT ·transpose4(SB), NOSPLIT, $0-40
	MOVQ dst+0(FP), DI
	MOVQ src+8(FP), SI
	MOVQ lds+16(FP), R8
	SHLQ $3, R8
	MOVQ kk+24(FP), CX
	MOVQ ldd+32(FP), R9
	SHLQ $3, R9
	LEAQ (SI)(R8*1), R10
	LEAQ (SI)(R8*2), R11
	LEAQ (R11)(R8*1), R12
	LEAQ (R9)(R9*2), R13
	SHRQ $2, CX
	JEQ  tdone

tloop:
	VMOVUPD    (SI), Y0
	VMOVUPD    (R10), Y1
	VMOVUPD    (R11), Y2
	VMOVUPD    (R12), Y3
	VUNPCKLPD  Y1, Y0, Y4
	VUNPCKHPD  Y1, Y0, Y5
	VUNPCKLPD  Y3, Y2, Y6
	VUNPCKHPD  Y3, Y2, Y7
	VPERM2F128 $0x20, Y6, Y4, Y0
	VPERM2F128 $0x20, Y7, Y5, Y1
	VPERM2F128 $0x31, Y6, Y4, Y2
	VPERM2F128 $0x31, Y7, Y5, Y3
	VMOVUPD    Y0, (DI)
	VMOVUPD    Y1, (DI)(R9*1)
	VMOVUPD    Y2, (DI)(R9*2)
	VMOVUPD    Y3, (DI)(R13*1)
	ADDQ       $32, SI
	ADDQ       $32, R10
	ADDQ       $32, R11
	ADDQ       $32, R12
	LEAQ       (DI)(R9*4), DI
	DECQ       CX
	JNE        tloop

tdone:
	VZEROUPPER
	RET
