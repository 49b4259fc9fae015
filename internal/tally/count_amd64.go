//go:build !purego

package tally

// countBytesAsm is countBytesGo with software prefetch (count_amd64.s).
//
//go:noescape
func countBytesAsm(hot []uint8, cold []int64, idx []uint32)

func countBytesFast(hot []uint8, cold []int64, idx []uint32) { countBytesAsm(hot, cold, idx) }
