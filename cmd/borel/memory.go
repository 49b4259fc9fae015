package main

import (
	"bufio"
	"fmt"
	"os"
	"runtime/debug"
	"strconv"
	"strings"

	"borel/stats/expand"
)

// machineMemory returns the machine's physical memory in bytes (Linux:
// MemTotal of /proc/meminfo), or 0 when it cannot be read.
func machineMemory() int64 {
	f, err := os.Open("/proc/meminfo")
	if err != nil {
		return 0
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		fields := strings.Fields(sc.Text())
		if len(fields) >= 2 && fields[0] == "MemTotal:" {
			kb, err := strconv.ParseInt(fields[1], 10, 64)
			if err == nil {
				return kb << 10
			}
		}
	}
	return 0
}

// digitMemory bounds the memory a built-in source may take to make its
// digits, by default (borel digits --memory; audit --source and compare
// use it as is): three quarters of the machine's memory, or 4 GiB where
// that is unknown.
func digitMemory() int64 {
	if m := machineMemory(); m > 0 {
		return m / 4 * 3
	}
	return 4 << 30
}

// sizeString writes a byte count as parseSize reads it, in whole MiB or GiB.
func sizeString(b int64) string {
	if b%(1<<30) == 0 || b >= 16<<30 {
		return fmt.Sprintf("%dGiB", b>>30)
	}
	return fmt.Sprintf("%dMiB", b>>20)
}

// checkedDigits makes the digits of a built-in source with the garbage
// collector's soft memory limit set to the source's memory estimate, so
// that the peak stays near the estimate the request was admitted by (the
// collector would otherwise let dead products of the computation pile up
// to twice the live memory); the limit is restored afterwards.
func checkedDigits(src expand.Source, count, offset, base int) ([]byte, []string, error) {
	need := int64(src.MemoryEstimate(count+offset, base))
	old := debug.SetMemoryLimit(-1)
	debug.SetMemoryLimit(max(need, 64<<20))
	defer debug.SetMemoryLimit(old)
	return src.CheckedDigits(count, offset, base)
}
