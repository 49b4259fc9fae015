//go:build !purego

#include "textflag.h"

// func countBytesAsm(hot []uint8, cold []int64, idx []uint32)
//
// For each w in idx: hot[w]++, and cold[w] += 256 when the byte wraps to
// zero. The cache line of hot[idx[i+prefetchAhead]] is requested while
// hot[idx[i]] is incremented (PREFETCHT0), so that many misses are in
// flight at once. Indices are not checked here: countBytes (count.go)
// checks them before the call. Keep the 64 below equal to prefetchAhead.
TEXT ·countBytesAsm(SB), NOSPLIT, $0-72
	MOVQ hot_base+0(FP), DI
	MOVQ cold_base+24(FP), SI
	MOVQ idx_base+48(FP), BX
	MOVQ idx_len+56(FP), CX
	XORQ AX, AX
	MOVQ CX, R8
	SUBQ $64, R8
	JLE tail

loop:
	MOVL 256(BX)(AX*4), DX
	PREFETCHT0 (DI)(DX*1)
	MOVL (BX)(AX*4), DX
	ADDB $1, (DI)(DX*1)
	JEQ wrap
next:
	INCQ AX
	CMPQ AX, R8
	JLT loop

tail:
	CMPQ AX, CX
	JGE done
	MOVL (BX)(AX*4), DX
	ADDB $1, (DI)(DX*1)
	JNE tailnext
	ADDQ $256, (SI)(DX*8)
tailnext:
	INCQ AX
	JMP tail

done:
	RET

wrap:
	ADDQ $256, (SI)(DX*8)
	JMP next
