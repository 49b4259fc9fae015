// Command histogram is the baseline of bench/compare.sh: a bare byte
// histogram over a file, read in 64 KiB chunks — the least work any digit
// frequency count can do. It prints the seconds it took.
package main

import (
	"fmt"
	"io"
	"os"
	"time"
)

func main() {
	if len(os.Args) != 2 {
		fmt.Fprintln(os.Stderr, "usage: histogram FILE")
		os.Exit(2)
	}
	f, err := os.Open(os.Args[1])
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	defer f.Close()
	start := time.Now()
	var counts [256]int64
	buf := make([]byte, 1<<16)
	for {
		n, err := f.Read(buf)
		for _, c := range buf[:n] {
			counts[c]++
		}
		if err == io.EOF {
			break
		}
		if err != nil {
			fmt.Fprintln(os.Stderr, err)
			os.Exit(1)
		}
	}
	var total int64
	for _, c := range counts {
		total += c
	}
	fmt.Printf("%.3f %d\n", time.Since(start).Seconds(), total)
}
