package stats

import "math"

// CollisionLaw returns P(C = c) for c = 0, 1, …: the law of the number of
// collisions C = m − (occupied urns) when m balls fall independently and
// uniformly into n urns, by the recurrence of Knuth's Algorithm S (TAOCP
// vol. 2, 3rd ed., §3.3.2 I): the (k+1)-th ball collides with probability
// (k − c)/n given c collisions among the first k. The support is cut where
// the probabilities fall below 1e-300.
func CollisionLaw(m int, n float64) []float64 {
	p, q := []float64{1}, []float64{}
	for k := 0; k < m; k++ {
		q = append(q[:0], make([]float64, len(p)+1)...)
		for c, v := range p {
			hit := float64(k-c) / n
			q[c] += v * (1 - hit)
			q[c+1] += v * hit
		}
		for len(q) > 1 && q[len(q)-1] < 1e-300 {
			q = q[:len(q)-1]
		}
		p, q = q, p
	}
	return p
}

// sparseLaw is a probability mass function on the integers off, off+1, ….
type sparseLaw struct {
	off int64
	p   []float64
}

// convolve returns the law of the sum of independent a and b, with the
// masses below 1e-300 of the largest cut from both ends.
func convolve(a, b sparseLaw) sparseLaw {
	out := make([]float64, len(a.p)+len(b.p)-1)
	for i, x := range a.p {
		if x == 0 {
			continue
		}
		for j, y := range b.p {
			out[i+j] += x * y
		}
	}
	top := 0.0
	for _, v := range out {
		top = math.Max(top, v)
	}
	lo, hi := 0, len(out)
	for lo < hi-1 && out[lo] < 1e-300*top {
		lo++
	}
	for hi > lo+1 && out[hi-1] < 1e-300*top {
		hi--
	}
	return sparseLaw{off: a.off + b.off + int64(lo), p: out[lo:hi]}
}

// CollisionSumLaw returns the exact law of the total number of collisions
// in B independent blocks of m balls in n urns (the B-fold convolution of
// CollisionLaw, by repeated squaring), as a DiscreteLaw; masses below
// 1e-300 of the mode are left out, so an observed total outside the kept
// support reads a tail of 0 (the caller then falls back to a limit law).
func CollisionSumLaw(m int, n float64, B int64) *DiscreteLaw {
	base := sparseLaw{p: CollisionLaw(m, n)}
	acc := sparseLaw{p: []float64{1}}
	for e := B; e > 0; e >>= 1 {
		if e&1 == 1 {
			acc = convolve(acc, base)
		}
		if e > 1 {
			base = convolve(base, base)
		}
	}
	vals := make([]float64, len(acc.p))
	logp := make([]float64, len(acc.p))
	for i, v := range acc.p {
		vals[i] = float64(acc.off + int64(i))
		logp[i] = math.Log(v)
	}
	return newDiscreteLaw(vals, logp, 1e-9)
}
