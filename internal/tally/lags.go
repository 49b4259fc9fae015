package tally

import (
	"encoding/json"
	"fmt"
	"slices"
)

// LagSpec asks for the lag record: the products Σ x_i x_{i+h} for h = 1..Max.
type LagSpec struct {
	Max int `json:"max"`
}

func init() { registerKind("lags", func() RecordSpec { return new(LagSpec) }) }

const maxLags = 1 << 10 // beyond it a decoded shard is damaged

func (s *LagSpec) Kind() string { return "lags" }

func (s *LagSpec) validate(int) error {
	if s.Max < 1 || s.Max > maxLags {
		return fmt.Errorf("largest lag %d is out of range", s.Max)
	}
	return nil
}

func (s *LagSpec) span() int         { return s.Max + 1 }
func (s *LagSpec) cells(int) float64 { return float64(s.Max) }
func (s *LagSpec) newRecord(sp *Spec, _ int64) record {
	return &Lags{LagSpec: *s, Products: make([]int64, s.Max+1), spec: sp}
}

// Lags is the lag record: Products[h] = Σ x_i x_{i+h} over the pairs inside
// the stretch (Products[0] unused).
type Lags struct {
	LagSpec
	Products []int64

	spec *Spec
}

// Lags returns the lag record, or nil when the tally has none.
func (t *Tally) Lags() *Lags { t.settle(); r, _ := t.find("lags").(*Lags); return r }

func (r *Lags) kind() string    { return "lags" }
func (r *Lags) setSpec(s *Spec) { r.spec = s }

// derived reports whether the products come from the K-windows (K > Max):
// each pair whose first digit starts a K-window inside the stretch is that
// window's first and (h+1)-th digit; the pairs starting in the last K−1
// positions lie in Tail. The values are the same as counting them digit by
// digit (TestDerived).
func (r *Lags) derived() bool { return r.spec.MaxBlock > r.Max }

func (r *Lags) kernels(t *Tally) []kernel {
	if r.derived() {
		return nil
	}
	return []kernel{{name: "lags", cost: 3, run: func(d []byte) { r.add(t.Tail, d) }}}
}

// add adds x_i·x_{i+h} for the pairs that end inside d. Up to 5 lags go
// in one pass over d, the last digits in registers and one sum a lag
// (independent chains); more lags, one pass each.
func (r *Lags) add(tail, d []byte) {
	if r.Max <= 5 && len(d) > r.Max {
		r.add5(tail, d)
		return
	}
	for h := 1; h <= r.Max; h++ {
		var s int64
		for i := 0; i < min(h, len(d)); i++ { // partner in the tail
			if j := len(tail) - h + i; j >= 0 {
				s += int64(tail[j]) * int64(d[i])
			}
		}
		for i := h; i < len(d); i++ {
			s += int64(d[i-h]) * int64(d[i])
		}
		r.Products[h] += s
	}
}

// add5 is add for Max ≤ 5 and len(d) > Max.
func (r *Lags) add5(tail, d []byte) {
	M := r.Max
	var sum [6]int64
	for h := 1; h <= M; h++ { // pairs whose first digit is in the tail
		for i := 0; i < h; i++ {
			if j := len(tail) - h + i; j >= 0 {
				sum[h] += int64(tail[j]) * int64(d[i])
			}
		}
	}
	// Pairs inside d[:M]; from d[M] on every partner lies inside d.
	for h := 1; h <= M; h++ {
		for i := h; i < M; i++ {
			sum[h] += int64(d[i-h]) * int64(d[i])
		}
	}
	s1, s2, s3, s4, s5 := lagPass(d, M)
	sums := [6]int64{0, s1, s2, s3, s4, s5}
	for h := 1; h <= M; h++ {
		r.Products[h] += sum[h] + sums[h]
	}
}

// lagPass returns Σ d[i]·d[i−h] over i ≥ M for h = 1 … 5 (h ≤ M ≤ 5 are
// the ones wanted; the others read zeros before d[0]). A loop of its own,
// with the five digits back and the five sums in registers.
//
//go:noinline
func lagPass(d []byte, M int) (s1, s2, s3, s4, s5 int64) {
	var x [5]int64 // x[h−1]: the digit h places before d[M]
	for h := 1; h <= M; h++ {
		x[h-1] = int64(d[M-h])
	}
	x1, x2, x3, x4, x5 := x[0], x[1], x[2], x[3], x[4]
	for _, v := range d[M:] {
		y := int64(v)
		s1 += y * x1
		s2 += y * x2
		s3 += y * x3
		s4 += y * x4
		s5 += y * x5
		x5, x4, x3, x2, x1 = x4, x3, x2, x1, y
	}
	return
}

func (r *Lags) merge(next record, sm *seam) {
	addInto(r.Products, next.(*Lags).Products)
	for h := 1; h <= r.Max; h++ {
		forCrossing(sm.x, sm.xs, sm.cut, 1, h+1, func(w []byte) { r.Products[h] += int64(w[0]) * int64(w[h]) })
	}
}

func (r *Lags) clone() record {
	return &Lags{LagSpec: r.LagSpec, Products: slices.Clone(r.Products), spec: r.spec}
}

// settle derives the products from the window table (settled before), one
// goroutine per lag.
func (r *Lags) settle(t *Tally) {
	if !r.derived() {
		return
	}
	// The window table summed down to its first Max+1 digits.
	heads := lowerOrders(t.win.Counts, t.MaxBlock, t.Base)[r.Max+1]
	var tasks []func()
	for h := 1; h <= r.Max; h++ {
		tasks = append(tasks, func() { r.Products[h] = r.product(t, h, heads) })
	}
	parallel(tasks...)
}

// product returns Σ x_i x_{i+h} over the pairs inside the stretch, from the
// K-windows (first and (h+1)-th digit) and Tail. heads is the window table
// summed over its digits after the (Max+1)-th.
func (r *Lags) product(t *Tally, h int, heads []int64) int64 {
	b, H := t.Base, r.Max
	n, L := t.N, int64(len(t.Tail))
	var sum int64
	inner, mid := ipow(b, H-h), ipow(b, h-1)
	for a := 1; a < b; a++ {
		for m := 0; m < mid; m++ {
			row := ((a*mid + m) * b) * inner
			for c := 1; c < b; c++ {
				var rs int64
				for _, v := range heads[row+c*inner : row+(c+1)*inner] {
					rs += v
				}
				sum += int64(a*c) * rs
			}
		}
	}
	// Pairs whose first digit is past the last K-window's start.
	K := t.MaxBlock
	for i := max(0, n-int64(K)+1); i+int64(h) < n; i++ {
		sum += int64(t.Tail[i-(n-L)]) * int64(t.Tail[i+int64(h)-(n-L)])
	}
	return sum
}

type lagsEntry struct {
	Products table `json:"products"`
}

func (r *Lags) entry(*blobs) any { return lagsEntry{r.Products} }

func (r *Lags) decode(data json.RawMessage, _ *blobs) error {
	var e lagsEntry
	if err := json.Unmarshal(data, &e); err != nil {
		return err
	}
	r.Products = e.Products
	return nil
}

// check: Max+1 products, each at most (b−1)² times the N−h pairs.
func (r *Lags) check(t *Tally) error {
	if len(r.Products) != r.Max+1 {
		return fmt.Errorf("lag table of %d cells for %d lags", len(r.Products), r.Max)
	}
	top := int64(t.Base-1) * int64(t.Base-1)
	for h, v := range r.Products {
		if v < 0 || (h > 0 && v > max(0, t.N-int64(h))*top) || (h == 0 && v != 0) {
			return fmt.Errorf("lag product %d is out of range", h)
		}
	}
	return nil
}
