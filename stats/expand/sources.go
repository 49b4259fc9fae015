package expand

import (
	"fmt"
	"math"
	"math/big"
	"math/rand/v2"
	"strconv"
	"strings"
)

// Source names the sequences borel can make. Constants are computed
// exactly in any base; generators are seeded and reproducible.
type Source struct {
	Name   string // as given: "pi", "sqrt2", "stoneham:2,3", "pcg:7", …
	Detail string // how the digits are made, for a report's provenance
	fixed  fixedFunc
	symbol string                            // the constant's name in messages: "π", "√2", …
	direct func(n, base int) ([]byte, error) // sequences defined digit by digit
	stream func(base int) func(d []byte)     // generators: the next digits into d, chunk after chunk
	base   int                               // a source with a base of its own (iid), else 0
	meter  Meter                             // progress of a constant's computation, or nil
	perBit func(bits float64) float64        // a constant's memory, bytes per bit of precision (MemoryEstimate)
}

// WithMeter returns the source reporting the progress of its computations
// to m: a constant's series, division and conversion, and digit extraction
// (the other sources are immediate).
func (s Source) WithMeter(m Meter) Source {
	s.meter = m
	return s
}

// Computed reports whether the source's digits come from a computation of
// a constant (which WithMeter can follow).
func (s Source) Computed() bool { return s.fixed != nil }

// Names lists the source names, for messages and help.
const Names = "pi, e, sqrtN (e.g. sqrt2), ln2, phi, champernowne, copeland-erdos, stoneham:B,C, rational:P/Q, liouville, iid:p0,p1,..., pcg:SEED, chacha8:SEED, lcg:SEED"

// ParseSource returns the source with the given name.
func ParseSource(name string) (Source, error) {
	kind, arg, hasArg := strings.Cut(name, ":")
	s := Source{Name: name}
	switch {
	case kind == "pi" && !hasArg:
		s.fixed, s.symbol, s.Detail, s.perBit = piFixed, "π", "π by Chudnovsky's series (binary splitting)", piPerBit
	case kind == "e" && !hasArg:
		s.fixed, s.symbol, s.Detail, s.perBit = eFixed, "e", "e by Σ 1/k! (binary splitting)", rootPerBit
	case kind == "ln2" && !hasArg:
		s.fixed, s.symbol, s.Detail = ln2Fixed, "ln 2", "ln 2 = 18 atanh(1/26) - 2 atanh(1/4801) + 8 atanh(1/8749) (binary splitting)"
	case kind == "phi" && !hasArg:
		s.fixed, s.symbol, s.Detail, s.perBit = phiFixed, "φ", "golden ratio (1+√5)/2, exact integer square root", rootPerBit
	case strings.HasPrefix(kind, "sqrt") && !hasArg:
		n, err := strconv.ParseInt(strings.TrimPrefix(kind, "sqrt"), 10, 64)
		if err != nil || n <= 0 || n > 1<<40 {
			return s, fmt.Errorf("source %q: write sqrtN with a positive integer N, e.g. sqrt2", name)
		}
		if r := int64(math.Sqrt(float64(n))); r*r == n || (r+1)*(r+1) == n {
			return s, fmt.Errorf("source %q: %d is a perfect square, its root has no fractional digits", name, n)
		}
		s.fixed, s.symbol, s.Detail = sqrtFixed(n), fmt.Sprintf("√%d", n), fmt.Sprintf("√%d, exact integer square root", n)
		s.perBit = rootPerBit
	case kind == "stoneham":
		bs, cs, ok := strings.Cut(arg, ",")
		b, err1 := strconv.ParseInt(bs, 10, 64)
		c, err2 := strconv.ParseInt(cs, 10, 64)
		if !ok || err1 != nil || err2 != nil || b < 2 || c < 2 || b > 1<<20 || c > 1<<20 || gcd(b, c) != 1 {
			return s, fmt.Errorf("source %q: write stoneham:B,C with coprime integers B, C ≥ 2 (e.g. stoneham:2,3)", name)
		}
		s.fixed, s.symbol = stonehamFixed(b, c), fmt.Sprintf("α_{%d,%d}", b, c)
		s.Detail = fmt.Sprintf("Stoneham constant α_{%d,%d} = Σ_{k≥1} 1/(%d^k %d^(%d^k)), exact terms", b, c, c, b, c)
	case kind == "rational":
		ps, qs, ok := strings.Cut(arg, "/")
		p, ok1 := new(big.Int).SetString(ps, 10)
		q, ok2 := new(big.Int).SetString(qs, 10)
		if !ok || !ok1 || !ok2 || q.Sign() <= 0 || p.Sign() < 0 {
			return s, fmt.Errorf("source %q: write rational:P/Q with integers P ≥ 0 and Q > 0", name)
		}
		s.direct = func(n, base int) ([]byte, error) { return rationalDigits(p, q, n, base), nil }
		s.Detail = fmt.Sprintf("fractional digits of %s/%s by long division (periodic: a negative control)", ps, qs)
	case kind == "champernowne" && !hasArg:
		s.direct = func(n, base int) ([]byte, error) { return Champernowne(n, base), nil }
		s.Detail = "Champernowne's constant: the numerals 1, 2, 3, … written one after another in the base"
	case kind == "copeland-erdos" && !hasArg:
		s.direct = func(n, base int) ([]byte, error) { return CopelandErdos(n, base), nil }
		s.Detail = "Copeland–Erdős constant: the primes 2, 3, 5, 7, … written one after another in the base"
	case kind == "liouville" && !hasArg:
		s.direct = func(n, base int) ([]byte, error) { return Liouville(n), nil }
		s.Detail = "Liouville-type number Σ_{k≥1} B^(-k!): digit 1 at positions k!, else 0"
	case kind == "iid":
		p, err := parseProbs(arg)
		if err != nil {
			return s, fmt.Errorf("source %q: %v", name, err)
		}
		s.base = len(p)
		s.direct = func(n, base int) ([]byte, error) {
			return IID(n, p, rand.New(rand.NewPCG(1, uint64(len(p))))), nil
		}
		s.stream = func(int) func([]byte) {
			rng := rand.New(rand.NewPCG(1, uint64(len(p))))
			return func(d []byte) { IIDInto(d, p, rng) }
		}
		s.Detail = fmt.Sprintf("independent digits from (%s), PCG(1, %d)", arg, len(p))
	case kind == "pcg" || kind == "chacha8" || kind == "lcg":
		seed, err := strconv.ParseUint(arg, 10, 64)
		if err != nil {
			return s, fmt.Errorf("source %q: write %s:SEED with a non-negative integer seed", name, kind)
		}
		s.direct = generator(kind, seed)
		s.stream = func(base int) func([]byte) { return newGenerator(kind, seed, base) }
		s.Detail = map[string]string{
			"pcg":     fmt.Sprintf("Go's PCG generator, seed %d, uniform digits", seed),
			"chacha8": fmt.Sprintf("Go's ChaCha8 generator, seed %d, uniform digits", seed),
			"lcg":     fmt.Sprintf("RANDU x ← 65539x mod 2^31, seed %d, digits from the low bits: deliberately weak", seed),
		}[kind]
	default:
		return s, fmt.Errorf("unknown source %q; the sources are %s", name, Names)
	}
	return s, nil
}

// Base returns the base a source fixes itself (iid vectors), or 0.
func (s Source) Base() int { return s.base }

// Digits returns digits offset+1 .. offset+n after the point, in base b
// (2..36, or 256).
func (s Source) Digits(n, offset, base int) ([]byte, error) {
	d, _, err := s.CheckedDigits(n, offset, base)
	return d, err
}

// CheckedDigits is Digits, and says how the digits of a constant were
// checked: the value by a method independent of its computation, and the
// digits against the value (none for sources defined digit by digit). A
// failed check is an error, and no digits are returned.
func (s Source) CheckedDigits(n, offset, base int) ([]byte, []string, error) {
	if s.base != 0 && base != s.base {
		return nil, nil, fmt.Errorf("source %s has base-%d digits only; base %d was asked", s.Name, s.base, base)
	}
	var d []byte
	var checks []string
	var err error
	if s.fixed != nil {
		d, checks, err = digitsFrom(s.symbol, s.fixed, n+offset, base, newMeter(s.meter))
	} else {
		d, err = s.direct(n+offset, base)
	}
	if err != nil {
		return nil, nil, err
	}
	return d[offset:], checks, nil
}

// MemoryEstimate returns roughly how many bytes computing n digits in base
// b takes. Constants hold a few numbers of the result's size, their
// products and the transforms of up to six operands modulo three primes
// (24 bytes per 64-bit word each), and the transforms' twiddle tables. The
// live heap at its peak, sampled with the collector at GOGC=5 or 10, in
// bytes per bit of precision: π 7.6 at 10^7 decimals, 8.1 at 3·10^7 and
// 11.1 at 10^8; e 5.6 and 3.1 at 10^7 and 3·10^7; √2 5.5 at 10^7; ln 2
// 13.9 at 10^7. The estimate takes perBit bytes a bit (piPerBit, rootPerBit;
// 16 for the others), plus the digits and 32 MiB for the program itself;
// the command makes 7/8 of it the garbage collector's soft limit
// (cmd/borel), so that the peak stays near that and above the live heap.
// Digit-native sources need about the digits themselves when they are
// asked for all at once (the generators also Stream, in constant memory).
func (s Source) MemoryEstimate(n, base int) float64 {
	if s.fixed == nil {
		return 2 * float64(n)
	}
	bits := float64(bitsFor(n, base))
	perBit := 16.0
	if s.perBit != nil {
		perBit = s.perBit(bits)
	}
	return perBit*bits + 2*float64(n) + 32<<20
}

// piPerBit is π's bytes per bit of precision for MemoryEstimate: 9 up to
// 10^7 decimals, then 2.5 more per factor of 10 (the measured live peak
// grows from 7.6 to 11.1 bytes a bit between 10^7 and 10^8 decimals).
func piPerBit(bits float64) float64 {
	return 9 + 2.5*max(0, math.Log10(bits/3.33e7))
}

// rootPerBit is the same for e, φ and square roots.
func rootPerBit(float64) float64 { return 8 }

func gcd(a, b int64) int64 {
	for b != 0 {
		a, b = b, a%b
	}
	return a
}

func parseProbs(s string) ([]float64, error) {
	parts := strings.Split(s, ",")
	if len(parts) < 2 || len(parts) > 36 {
		return nil, fmt.Errorf("give 2 to 36 probabilities")
	}
	p := make([]float64, len(parts))
	sum := 0.0
	for i, part := range parts {
		v, err := strconv.ParseFloat(strings.TrimSpace(part), 64)
		if err != nil || !(v > 0 && v < 1) {
			return nil, fmt.Errorf("entry %d %q is not a probability strictly between 0 and 1", i+1, part)
		}
		p[i] = v
		sum += v
	}
	if math.Abs(sum-1) > 1e-9 {
		return nil, fmt.Errorf("the probabilities sum to %.12g, not 1", sum)
	}
	return p, nil
}

// rationalDigits returns n base-b digits of frac(p/q) by long division.
func rationalDigits(p, q *big.Int, n, base int) []byte {
	r := new(big.Int).Mod(p, q)
	bb := big.NewInt(int64(base))
	d := make([]byte, n)
	digit := new(big.Int)
	for i := range d {
		r.Mul(r, bb)
		digit.QuoRem(r, q, r)
		d[i] = byte(digit.Int64())
	}
	return d
}

// CopelandErdos returns the first n digits of the Copeland–Erdős constant in
// base b: the primes written one after another (0.235711131719… in base 10;
// normal in base 10, Copeland & Erdős, Bull. AMS 52 (1946) 857–860).
func CopelandErdos(n, b int) []byte {
	d := make([]byte, 0, n+32)
	limit := 1024
	for {
		sieve := make([]bool, limit)
		var buf [64]byte
		d = d[:0]
		for k := 2; k < limit && len(d) < n; k++ {
			if sieve[k] {
				continue
			}
			for j := k * k; j < limit; j += k {
				sieve[j] = true
			}
			i := len(buf)
			for v := k; v > 0; v /= b {
				i--
				buf[i] = byte(v % b)
			}
			d = append(d, buf[i:]...)
		}
		if len(d) >= n {
			return d[:n]
		}
		limit *= 4
	}
}

// Liouville returns the first n digits of Σ_{k≥1} B^(-k!): 1 at the
// positions 1, 2, 6, 24, 120, … and 0 elsewhere, in any base B.
func Liouville(n int) []byte {
	d := make([]byte, n)
	f := 1
	for k := 1; f <= n; k++ {
		f *= k
		if f <= n {
			d[f-1] = 1
		}
		if k > 20 {
			break
		}
	}
	return d
}

func generator(kind string, seed uint64) func(n, base int) ([]byte, error) {
	return func(n, base int) ([]byte, error) {
		d := make([]byte, n)
		newGenerator(kind, seed, base)(d)
		return d, nil
	}
}

// newGenerator returns a function that fills each buffer it is given with
// the generator's next digits in base b: called on consecutive buffers, it
// writes the same digits as one call on their concatenation.
func newGenerator(kind string, seed uint64, base int) func(d []byte) {
	switch kind {
	case "lcg":
		x := uint32(seed|1) & (1<<31 - 1)
		return func(d []byte) {
			for i := range d {
				x = (65539 * x) & (1<<31 - 1)
				if base&(base-1) == 0 {
					d[i] = byte(x & uint32(base-1)) // the low bits: short periods
				} else {
					d[i] = byte(uint64(x) * uint64(base) >> 31)
				}
			}
		}
	case "pcg":
		rng := rand.New(rand.NewPCG(seed, 0))
		return func(d []byte) {
			for i := range d {
				d[i] = byte(rng.IntN(base))
			}
		}
	}
	var key [32]byte
	copy(key[:], strconv.FormatUint(seed, 10))
	rng := rand.New(rand.NewChaCha8(key))
	return func(d []byte) {
		for i := range d {
			d[i] = byte(rng.IntN(base))
		}
	}
}

// streamChunk is the size of the buffers Stream hands out: 1 MiB.
const streamChunk = 1 << 20

// Streams reports whether the source's digits can come in chunks, in
// memory that does not grow with their number (the generators and iid
// vectors; constants and the digit-by-digit sequences need them all).
func (s Source) Streams() bool { return s.stream != nil }

// Stream hands digits offset+1 .. offset+n of a source that Streams to
// each, in order, in buffers of at most 1 MiB that each may keep only
// until it returns; it stops at the first error each returns. The digits
// are those CheckedDigits returns.
func (s Source) Stream(n, offset, base int, each func([]byte) error) error {
	if !s.Streams() {
		return fmt.Errorf("source %s does not stream its digits", s.Name)
	}
	if s.base != 0 && base != s.base {
		return fmt.Errorf("source %s has base-%d digits only; base %d was asked", s.Name, s.base, base)
	}
	fill := s.stream(base)
	buf := make([]byte, streamChunk)
	for skip := offset; skip > 0; skip -= min(skip, streamChunk) {
		fill(buf[:min(skip, streamChunk)])
	}
	for left := n; left > 0; left -= min(left, streamChunk) {
		b := buf[:min(left, streamChunk)]
		fill(b)
		if err := each(b); err != nil {
			return err
		}
	}
	return nil
}
