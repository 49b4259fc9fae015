package tally

// forCrossing calls f for every window of span digits that lies inside x,
// starts before index cut and ends at or after it (so it crosses the cut),
// and starts at a global position that is a multiple of stride; xs is the
// global position of x[0]. Add uses it for windows that begin in the tail
// and end in new digits; Merge for windows across the join of two tallies.
func forCrossing(x []byte, xs int64, cut, stride, span int, f func(w []byte)) {
	first := max(0, cut-span+1)
	if r := (xs + int64(first)) % int64(stride); r != 0 {
		first += stride - int(r)
	}
	for s := first; s < cut && s+span <= len(x); s += stride {
		f(x[s : s+span])
	}
}

// forWindows calls f for every aligned window that ends inside d, the next
// digits of a stretch whose previous digits end with tail; pos0 is the
// global position of d[0]. Windows reaching before the stretch's first digit
// are not its to count (tail then holds every earlier digit of the stretch).
func forWindows(tail, d []byte, pos0 int64, stride, span int, f func(w []byte)) {
	if len(d) == 0 {
		return
	}
	keep := min(len(tail), span-1)
	x := make([]byte, 0, keep+min(len(d), span-1))
	x = append(x, tail[len(tail)-keep:]...)
	x = append(x, d[:min(len(d), span-1)]...)
	forCrossing(x, pos0-int64(keep), keep, stride, span, f)
	s := 0
	if r := pos0 % int64(stride); r != 0 {
		s = stride - int(r)
	}
	for ; s+span <= len(d); s += stride {
		f(d[s : s+span])
	}
}
