package expand

import (
	"fmt"
	"math/big"
	"testing"

	"github.com/remyoudompheng/bigfft"
)

// Benchmarks of the digit engine; digits/s via b.ReportMetric. The script
// bench/digits.sh times the command against mpmath and PARI/GP.

func benchDigits(b *testing.B, source string, n, base int) {
	src, err := ParseSource(source)
	if err != nil {
		b.Fatal(err)
	}
	for range b.N {
		if _, err := src.Digits(n, 0, base); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "digits/s")
}

func BenchmarkPi1e5Base10(b *testing.B)   { benchDigits(b, "pi", 100_000, 10) }
func BenchmarkPi1e6Base10(b *testing.B)   { benchDigits(b, "pi", 1_000_000, 10) }
func BenchmarkPi1e6Base3(b *testing.B)    { benchDigits(b, "pi", 1_000_000, 3) }
func BenchmarkE1e6Base10(b *testing.B)    { benchDigits(b, "e", 1_000_000, 10) }
func BenchmarkSqrt2e6Base10(b *testing.B) { benchDigits(b, "sqrt2", 1_000_000, 10) }

func BenchmarkRebase1e6From10To3(b *testing.B) {
	src, _ := ParseSource("pi")
	d, err := src.Digits(1_000_000, 0, 10)
	if err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	for range b.N {
		Rebase(d, 10, 3)
	}
	b.ReportMetric(float64(len(d))*float64(b.N)/b.Elapsed().Seconds(), "digits/s")
}

// BenchmarkMul compares the NTT with bigfft on balanced products (the
// thresholds in fast.go come from it).
func BenchmarkMul(b *testing.B) {
	for _, words := range []int{1000, 2000, 8000, 33000, 100000, 519000} {
		w := make([]big.Word, words)
		for i := range w {
			w[i] = big.Word(uint64(i)*0x9e3779b97f4a7c15 + 1)
		}
		x := new(big.Int).SetBits(w)
		y := new(big.Int).Add(x, big.NewInt(12345))
		b.Run(fmt.Sprintf("ntt/%dwords", words), func(b *testing.B) {
			for range b.N {
				nttMul(x, y)
			}
		})
		b.Run(fmt.Sprintf("bigfft/%dwords", words), func(b *testing.B) {
			for range b.N {
				bigfft.Mul(x, y)
			}
		})
	}
}
