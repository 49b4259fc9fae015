package stats

import "math"

// maxRunStates bounds the exact chain; beyond it the Poisson approximation
// is used (and said so by the caller's note).
const maxRunStates = 256

// LongestRunLogTails returns ln P(L ≥ l) and ln P(L ≤ l) for the longest run
// L in n i.i.d. digits with probabilities p. With class ≥ 0 it is the
// longest run of that digit; with class < 0 the longest run of identical
// digits (any digit).
//
// Exact law: a Markov chain on the current run length (and, for runs of any
// digit under a non-uniform p, the current digit) with an absorbing state
// "a run of length m has occurred"; after n steps its absorbing mass is
// P(L ≥ m) and the rest P(L < m), both sums of positive terms, so neither
// tail is formed as 1 minus the other. T^n is taken by repeated squaring
// (O(S³ log n) for S states). Under the uniform law the digit is irrelevant
// and the chain has m states. References: Schilling, College Math. J. 21
// (1990) 196–207.
//
// When a tail underflows, or the chain would exceed maxRunStates, it falls
// back on the Poisson approximation (Erdős & Rényi 1970; Gordon, Schilling &
// Waterman 1986), P(L < m) ≈ exp(-n Σ_j (1-p_j) p_j^m), which is accurate
// in the far tails (n p^m small for the upper one); approx reports that.
func LongestRunLogTails(n int64, p []float64, class int, l int64) (upper, lower float64, approx bool) {
	if l <= 0 {
		// L ≥ 0 always. L ≤ 0 means no run at all: for one digit of
		// probability q, that it never occurs, (1 − q)^n; for runs of any
		// digit, that the sequence is empty.
		if class < 0 {
			if n == 0 {
				return 0, 0, false
			}
			return 0, math.Inf(-1), false
		}
		return 0, float64(n) * math.Log1p(-p[class]), false
	}
	_, atLeast, logBelowL, okUp := runChain(n, p, class, l)
	_, _, logBelow, okLo := runChain(n, p, class, l+1)
	upper, lower = math.Log(atLeast), logBelow
	if !okUp || atLeast < 1e-280 {
		// Poisson: P(L ≥ l) = 1 - exp(-λ), λ = n Σ_j (1-p_j) p_j^l, in logs.
		lnLambda := runPoissonLogLambda(n, p, class, l)
		if okUp && logBelowL > math.Log(0.5) && lnLambda > math.Log(1e-300) {
			upper = math.Log(-math.Expm1(logBelowL)) // exact enough: P(L<l) is known in logs
		} else if lnLambda < math.Log(1e-8) {
			upper = lnLambda
		} else {
			upper = math.Log(-math.Expm1(-math.Exp(lnLambda)))
		}
		approx = true
	}
	if !okLo {
		lnLambda := runPoissonLogLambda(n, p, class, l+1)
		lower = -math.Exp(lnLambda)
		approx = true
	}
	return upper, lower, approx
}

// runPoissonLogLambda returns ln λ, λ = n Σ_j (1-p_j) p_j^m: the Poisson
// mean number of runs of length m (Erdős & Rényi 1970; Gordon, Schilling &
// Waterman 1986), by log-sum-exp.
func runPoissonLogLambda(n int64, p []float64, class int, m int64) float64 {
	top := math.Inf(-1)
	var terms []float64
	for j, pj := range p {
		if (class >= 0 && j != class) || pj <= 0 || pj >= 1 {
			continue
		}
		v := math.Log1p(-pj) + float64(m)*math.Log(pj)
		terms = append(terms, v)
		top = math.Max(top, v)
	}
	if math.IsInf(top, -1) {
		return top
	}
	s := 0.0
	for _, v := range terms {
		s += math.Exp(v - top)
	}
	return math.Log(float64(n)) + top + math.Log(s)
}

// runChain returns P(L < m), P(L ≥ m) and ln P(L < m) from the absorbing
// chain; the logarithm comes from the transient part alone, raised to the
// n-th power with rescaling, so it is exact where P(L < m) underflows.
func runChain(n int64, p []float64, class int, m int64) (below, atLeast, logBelow float64, ok bool) {
	if m <= 1 {
		return 0, 1, math.Inf(-1), n > 0
	}
	uniform := true
	for _, v := range p {
		if math.Abs(v-p[0]) > 1e-15 {
			uniform = false
		}
	}
	var T [][]float64
	var start []float64
	steps := n
	switch {
	case class >= 0: // states 0..m-1 (run length), m: absorbing
		q := p[class]
		S := int(m) + 1
		if S > maxRunStates {
			return 0, 0, 0, false
		}
		T = square(S)
		for j := 0; j < int(m); j++ {
			T[j][0] += 1 - q
			T[j][j+1] += q
		}
		T[m][m] = 1
		start = make([]float64, S)
		start[0] = 1
	case uniform: // states 1..m-1 after the first digit, m: absorbing (index j-1)
		q := p[0]
		S := int(m)
		if S > maxRunStates {
			return 0, 0, 0, false
		}
		T = square(S)
		for j := 1; j < int(m); j++ {
			T[j-1][0] += 1 - q
			T[j-1][j] += q
		}
		T[S-1][S-1] = 1
		start = make([]float64, S)
		start[0] = 1
		steps = n - 1
	default: // states (a, j), j = 1..m-1, index a(m-1)+j-1; last: absorbing
		b := len(p)
		S := b*int(m-1) + 1
		if S > maxRunStates {
			return 0, 0, 0, false
		}
		T = square(S)
		abs := S - 1
		idx := func(a, j int) int { return a*int(m-1) + j - 1 }
		start = make([]float64, S)
		for a := 0; a < b; a++ {
			start[idx(a, 1)] = p[a]
			for j := 1; j < int(m); j++ {
				from := idx(a, j)
				if j+1 == int(m) {
					T[from][abs] += p[a]
				} else {
					T[from][idx(a, j+1)] += p[a]
				}
				for c := 0; c < b; c++ {
					if c != a {
						T[from][idx(c, 1)] += p[c]
					}
				}
			}
		}
		T[abs][abs] = 1
		steps = n - 1
	}
	v := vecMatPow(start, T, steps)
	last := len(v) - 1
	for i := 0; i < last; i++ {
		below += v[i]
	}
	// Transient part: drop the absorbing state and keep a log scale.
	Q := square(last)
	for i := range Q {
		copy(Q[i], T[i][:last])
	}
	w, scale := scaledVecMatPow(start[:last], Q, steps)
	sum := 0.0
	for _, x := range w {
		sum += x
	}
	return below, v[last], math.Log(sum) + scale, true
}

// scaledVecMatPow returns v·Q^e as (w, s) with v·Q^e = w·e^s, rescaling the
// vector and the squared matrices by their largest entries as it goes.
func scaledVecMatPow(v []float64, Q [][]float64, e int64) ([]float64, float64) {
	out := append([]float64(nil), v...)
	scale, qScale := 0.0, 0.0
	Q = matMul(Q, identity(len(Q))) // a copy, rescaled in place below
	for e > 0 {
		if e&1 == 1 {
			out = vecMat(out, Q)
			scale += qScale
			if mx := maxOf(out); mx > 0 {
				for i := range out {
					out[i] /= mx
				}
				scale += math.Log(mx)
			} else {
				return out, math.Inf(-1)
			}
		}
		e >>= 1
		if e > 0 {
			Q = matMul(Q, Q)
			qScale *= 2
			mx := 0.0
			for _, row := range Q {
				mx = math.Max(mx, maxOf(row))
			}
			if mx > 0 {
				for _, row := range Q {
					for j := range row {
						row[j] /= mx
					}
				}
				qScale += math.Log(mx)
			}
		}
	}
	return out, scale
}

func identity(S int) [][]float64 {
	I := square(S)
	for i := range I {
		I[i][i] = 1
	}
	return I
}

func maxOf(x []float64) float64 {
	m := 0.0
	for _, v := range x {
		m = math.Max(m, v)
	}
	return m
}

func square(S int) [][]float64 {
	T := make([][]float64, S)
	for i := range T {
		T[i] = make([]float64, S)
	}
	return T
}

func matMul(a, b [][]float64) [][]float64 {
	S := len(a)
	c := square(S)
	for i := 0; i < S; i++ {
		for k := 0; k < S; k++ {
			if a[i][k] == 0 {
				continue
			}
			aik := a[i][k]
			for j := 0; j < S; j++ {
				c[i][j] += aik * b[k][j]
			}
		}
	}
	return c
}

// vecMat returns the row vector v times the matrix T.
func vecMat(v []float64, T [][]float64) []float64 {
	next := make([]float64, len(v))
	for i, vi := range v {
		if vi == 0 {
			continue
		}
		for j, t := range T[i] {
			next[j] += vi * t
		}
	}
	return next
}

// vecMatPow returns v·T^e by repeated squaring.
func vecMatPow(v []float64, T [][]float64, e int64) []float64 {
	out := append([]float64(nil), v...)
	for e > 0 {
		if e&1 == 1 {
			out = vecMat(out, T)
		}
		e >>= 1
		if e > 0 {
			T = matMul(T, T)
		}
	}
	return out
}
