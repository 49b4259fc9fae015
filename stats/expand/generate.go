package expand

import (
	"math"
	"math/rand/v2"
)

// IID returns n digits drawn independently from the frequency vector p
// (the product measure μ_p), by inversion of the cumulative sums.
func IID(n int, p []float64, rng *rand.Rand) []byte {
	d := make([]byte, n)
	IIDInto(d, p, rng)
	return d
}

// IIDInto fills d with independent digits drawn from p, as IID does: one
// call on a buffer draws what consecutive calls on its parts draw.
func IIDInto(d []byte, p []float64, rng *rand.Rand) {
	cum := make([]float64, len(p))
	s := 0.0
	for i, v := range p {
		s += v
		cum[i] = s
	}
	for i := range d {
		u := rng.Float64() * s
		j := 0
		for j < len(cum)-1 && u >= cum[j] {
			j++
		}
		d[i] = byte(j)
	}
}

// Sticky returns n base-b digits in which each digit repeats the previous
// one with probability stay and is otherwise uniform: a first-order Markov
// chain whose digit frequencies are uniform but whose repeats are too common
// (the chance of a repeat is stay + (1-stay)/b instead of 1/b).
func Sticky(n, b int, stay float64, rng *rand.Rand) []byte {
	d := make([]byte, n)
	for i := range d {
		if i > 0 && rng.Float64() < stay {
			d[i] = d[i-1]
		} else {
			d[i] = byte(rng.IntN(b))
		}
	}
	return d
}

// RandomDeBruijn returns a de Bruijn sequence B(b, k): every k-word occurs
// exactly once in it, read cyclically. It follows a random Eulerian circuit
// of the de Bruijn graph (nodes: (k-1)-words; edges: k-words) by
// Hierholzer's algorithm with shuffled edge order, so it lacks the
// lexicographic structure of the classic Lyndon-word construction.
func RandomDeBruijn(b, k int, rng *rand.Rand) []byte {
	nodes := int(math.Pow(float64(b), float64(k-1)))
	next := make([][]int, nodes) // unused out-edges (the appended digit) per node
	for v := range next {
		next[v] = rng.Perm(b)
	}
	stack := []int{0}
	var circuit []int
	for len(stack) > 0 {
		v := stack[len(stack)-1]
		if out := next[v]; len(out) > 0 {
			a := out[len(out)-1]
			next[v] = out[:len(out)-1]
			stack = append(stack, (v*b+a)%nodes)
		} else {
			circuit = append(circuit, v)
			stack = stack[:len(stack)-1]
		}
	}
	// The circuit comes out reversed; each edge appends its head's last digit.
	d := make([]byte, 0, nodes*b)
	for i := len(circuit) - 2; i >= 0; i-- {
		d = append(d, byte(circuit[i]%b))
	}
	return d
}

// Champernowne returns the first n fractional digits of Champernowne's
// constant in base b: the base-b numerals 1, 2, 3, … written one after
// another (0.123456789101112… in base 10). It is normal in base b
// (Champernowne, J. London Math. Soc. 8 (1933) 254–260), yet its first
// digits are far from looking random.
func Champernowne(n, b int) []byte {
	d := make([]byte, 0, n+16)
	var buf [64]byte
	for k := 1; len(d) < n; k++ {
		i := len(buf)
		for v := k; v > 0; v /= b {
			i--
			buf[i] = byte(v % b)
		}
		d = append(d, buf[i:]...)
	}
	return d[:n]
}
