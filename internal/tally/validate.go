package tally

import "fmt"

// maxPosition bounds positions and lengths in a decoded shard: far beyond
// any sequence, and small enough that no sum of two overflows.
const maxPosition = 1 << 62

// wellFormed checks a decoded tally completely: its spec (each record's
// parameters within the bounds beyond which a shard is taken as damaged),
// the stretch (position, length, head and tail), then each record in
// order against the stretch (its checks may rely on the records before
// it: the digit counts come first). A shard that passes merges and audits
// without a panic; one that fails is a one-line error.
func (t *Tally) wellFormed() error {
	if err := t.Spec.Validate(); err != nil {
		return err
	}
	b, K, N := t.Base, t.MaxBlock, t.N
	if K > 64 || float64(ipow(b, min(K, 8))) <= 0 || pow(float64(b), K) > 1<<40 {
		return fmt.Errorf("tally: block length %d is out of range (damaged shard)", K)
	}
	if N < 0 || t.Offset < 0 || t.Offset > maxPosition-N || N > maxPosition {
		return fmt.Errorf("tally: stretch position %d and length %d are out of range (damaged shard)", t.Offset, N)
	}
	keep := int64(t.span() - 1)
	if int64(len(t.Head)) != min(N, keep) || int64(len(t.Tail)) != min(N, keep) {
		return fmt.Errorf("tally: head or tail of %d and %d digits, want %d (damaged shard)", len(t.Head), len(t.Tail), min(N, keep))
	}
	if err := t.digitsBelowBase("the head", t.Head); err != nil {
		return fmt.Errorf("tally: %v (damaged shard)", err)
	}
	if err := t.digitsBelowBase("the tail", t.Tail); err != nil {
		return fmt.Errorf("tally: %v (damaged shard)", err)
	}
	for _, r := range t.recs {
		if err := r.check(t); err != nil {
			return fmt.Errorf("tally: %s record: %v (damaged shard)", r.kind(), err)
		}
	}
	return nil
}

func pow(b float64, k int) float64 {
	p := 1.0
	for range k {
		p *= b
	}
	return p
}

// aligned returns the number of blocks of length k starting at multiples
// of k that lie inside [off, off+n).
func aligned(off, n int64, k int) int64 {
	kk := int64(k)
	first := (off + kk - 1) / kk
	last := (off + n) / kk // blocks j with j·k + k ≤ off + n: j < last
	return max(0, last-first)
}

func nonNegative(name string, v []int64) (int64, error) {
	var s int64
	for _, x := range v {
		if x < 0 {
			return 0, fmt.Errorf("%s holds a negative count", name)
		}
		if s += x; s < 0 || s > maxPosition {
			return 0, fmt.Errorf("%s counts overflow", name)
		}
	}
	return s, nil
}

func (t *Tally) digitsBelowBase(name string, d []byte) error {
	for _, x := range d {
		if int(x) >= t.Base {
			return fmt.Errorf("%s holds digit %d, not a digit of base %d", name, x, t.Base)
		}
	}
	return nil
}
