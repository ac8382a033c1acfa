//go:build amd64 && !purego

#include "textflag.h"

// func mixSums15Vec(rows, wts *float64, n int, out *[20]float64)
//
// Y0..Y4 accumulate columns 0-3, 4-7, 8-11, 12-15 and 16-19 of the rows
// (a row is 17 float64, 136 bytes; the last vector reads three values
// past it). Per row: broadcast wts[i], then for each vector a VMULPD and a
// VADDPD, separately rounded (no FMA), so each lane computes exactly the
// scalar sum += wts[i]*row[c] in the same order.
TEXT ·mixSums15Vec(SB), NOSPLIT, $0-32
	MOVQ rows+0(FP), SI
	MOVQ wts+8(FP), DI
	MOVQ n+16(FP), CX
	MOVQ out+24(FP), DX
	VXORPD Y0, Y0, Y0
	VXORPD Y1, Y1, Y1
	VXORPD Y2, Y2, Y2
	VXORPD Y3, Y3, Y3
	VXORPD Y4, Y4, Y4
	TESTQ CX, CX
	JLE done

loop:
	VBROADCASTSD (DI), Y5
	VMULPD (SI), Y5, Y6
	VADDPD Y6, Y0, Y0
	VMULPD 32(SI), Y5, Y7
	VADDPD Y7, Y1, Y1
	VMULPD 64(SI), Y5, Y8
	VADDPD Y8, Y2, Y2
	VMULPD 96(SI), Y5, Y9
	VADDPD Y9, Y3, Y3
	VMULPD 128(SI), Y5, Y10
	VADDPD Y10, Y4, Y4
	ADDQ $136, SI
	ADDQ $8, DI
	DECQ CX
	JNZ loop

done:
	VMOVUPD Y0, (DX)
	VMOVUPD Y1, 32(DX)
	VMOVUPD Y2, 64(DX)
	VMOVUPD Y3, 96(DX)
	VMOVUPD Y4, 128(DX)
	VZEROUPPER
	RET
