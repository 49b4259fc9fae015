package main

import (
	"bufio"
	"fmt"
	"os"
	"runtime/debug"
	"strconv"
	"strings"

	"github.com/borel-audit/borel/stats/expand"
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
// collector's soft memory limit set to 7/8 of the source's memory estimate,
// so that the peak stays below the estimate the request was admitted by
// (the collector would otherwise let dead products of the computation pile
// up to twice the live memory: 4.8–6.7 GB at 10^8 decimals of π, against
// 4.6 GB with the limit, in the same time); the limit is restored after.
// On a terminal (unless quiet) a computation shows its phase and the
// fraction done on standard error.
func checkedDigits(e env, quiet bool, src expand.Source, count, offset, base int) ([]byte, []string, error) {
	if p := newProgress(e, quiet, -1); p != nil && src.Computed() {
		what := fmt.Sprintf("computing %s: %s digits in base %d", src.Name, human(float64(count+offset)), base)
		src = src.WithMeter(func(phase string, done float64) { p.phase(what, phase, done) })
		defer p.done()
	}
	need := int64(src.MemoryEstimate(count+offset, base))
	old := debug.SetMemoryLimit(-1)
	debug.SetMemoryLimit(max(need/8*7, 64<<20)) // a margin: the heap overshoots the soft limit a little
	defer debug.SetMemoryLimit(old)
	return src.CheckedDigits(count, offset, base)
}
