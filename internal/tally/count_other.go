//go:build !amd64 || purego

package tally

func countBytesFast(hot []uint8, cold []int64, idx []uint32) { countBytesGo(hot, cold, idx) }
