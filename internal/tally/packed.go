package tally

import (
	"encoding/binary"
	"sync"
)

// Packed chunks. A byte stream read as bits, bit pairs or nibbles (base
// 2^s, s = 1, 2, 4) holds m = 8/s digits in each byte, most significant
// first. Spread out one digit a byte, a chunk of 10^8 bytes becomes 8·10^8
// digit bytes, and every kernel walks all of them. AddPacked takes the
// bytes as they are: a kernel with a packed form reads whole bytes (byte
// tables, bit fields, counts of trailing zeros), and one without it reads
// the digits spread out once per chunk. The tally is the same, record for
// record, as Add of the spread-out digits (TestPackedEqualsDigits).

// packWidth returns s when base = 2^s with s = 1, 2 or 4 (the bases whose
// digits a byte holds whole, below a byte), or 0.
func packWidth(base int) int {
	switch base {
	case 2:
		return 1
	case 4:
		return 2
	case 16:
		return 4
	}
	return 0
}

// PackedWidth returns the digit width in bits of the packed chunks
// AddPacked reads in a base (1, 2 or 4 for bases 2, 4 and 16), or 0 when
// the base has none.
func PackedWidth(base int) int { return packWidth(base) }

// spread holds, for each byte value, its 8 bits as 8 digit bytes (most
// significant first, read as a big-endian word), and the same for pairs
// and nibbles in their first 4 and 2 bytes.
var spread = func() (tab [3][256]uint64) {
	for v := range 256 {
		for si, s := range []int{1, 2, 4} {
			m := 8 / s
			var w uint64
			for j := range m {
				w |= uint64(v>>(8-s*(j+1))&(1<<s-1)) << (56 - 8*j)
			}
			tab[si][v] = w
		}
	}
	return tab
}()

// unpack appends the digits of p (s bits each, most significant first) to
// out.
func unpack(out, p []byte, s int) []byte {
	m := 8 / s
	n := len(out)
	out = append(out, make([]byte, len(p)*m)...)
	o := out[n:]
	switch s {
	case 1:
		tab := &spread[0]
		for i, c := range p {
			binary.BigEndian.PutUint64(o[8*i:], tab[c])
		}
	case 2:
		tab := &spread[1]
		for i, c := range p {
			binary.BigEndian.PutUint32(o[4*i:], uint32(tab[c]>>32))
		}
	default:
		for i, c := range p {
			o[2*i], o[2*i+1] = c>>4, c&15
		}
	}
	return out
}

// Unpack returns the digits of p, s bits each (1, 2 or 4), most
// significant first.
func Unpack(p []byte, s int) []byte { return unpack(nil, p, s) }

// bitField returns the w bits (1 ≤ w ≤ 64) of p from bit a on (bit 0 the
// most significant of p[0]) as a number.
func bitField(p []byte, a, w int) uint64 {
	q, off := a>>3, a&7
	if q+9 <= len(p) {
		x := binary.BigEndian.Uint64(p[q:])<<off | uint64(p[q+8])>>(8-off)
		return x >> (64 - w)
	}
	var x uint64 // near the end: bit by bit
	for i := a; i < a+w; i++ {
		x = x<<1 | uint64(p[i>>3]>>(7-i&7)&1)
	}
	return x
}

// digitsOf returns digits [from, to) of the packed chunk p.
func digitsOf(p []byte, s int, from, to int) []byte {
	m := 8 / s
	if from >= to {
		return nil
	}
	d := unpack(nil, p[from/m:(to+m-1)/m], s)
	off := from / m * m
	return d[from-off : to-off]
}

// AddPacked tallies the next digits of the stretch, given packed (see
// above): it is Add(unpack(p)) without the spread-out copy where the
// records can read bytes. The base must be 2, 4 or 16 (PackedWidth); a
// stretch whose next digit does not start a byte of the whole sequence
// (global position not a multiple of 8/s) goes through Add.
func (t *Tally) AddPacked(p []byte) {
	s := t.packedFor(p)
	if s == 0 || len(p) == 0 {
		return
	}
	c := &packedChunk{p: p, s: s, t: t}
	for _, k := range t.kernels() {
		c.run(k)
	}
	t.advancePacked(p, s)
}

// packedFor checks that p can be added packed: it returns the digit width,
// or 0 after adding p the long way (unaligned) or when p is empty.
func (t *Tally) packedFor(p []byte) int {
	if t.finished {
		panic("tally: Add to a finished tally (after CyclicInPlace)")
	}
	s := packWidth(t.Base)
	if s == 0 {
		panic("tally: AddPacked in a base that packs no digits below a byte")
	}
	if len(p) == 0 {
		return 0
	}
	if (t.Offset+t.N)%int64(8/s) != 0 {
		t.Add(unpack(nil, p, s))
		return 0
	}
	return s
}

// spreadOut returns p's digits spread out in the tally's reused buffer.
func (t *Tally) spreadOut(p []byte, s int) []byte {
	t.spreadBuf = unpack(t.spreadBuf[:0], p, s)
	return t.spreadBuf
}

// advancePacked is advance for a packed chunk: only the digits that head
// and tail keep are spread out.
func (t *Tally) advancePacked(p []byte, s int) {
	n := len(p) * (8 / s)
	keep := t.span() - 1
	if n <= 2*keep+16 {
		t.advance(unpack(nil, p, s))
		return
	}
	t.settled = false
	if len(t.Head) < keep {
		t.Head = append(t.Head, digitsOf(p, s, 0, keep-len(t.Head))...)
	}
	t.Tail = append(t.Tail[:0], digitsOf(p, s, n-keep, n)...)
	t.N += int64(n)
}

// packedChunk is a packed chunk being added: run gives each kernel the
// bytes, or, without a packed form, the digits spread out once (by
// whichever kernel needs them first).
type packedChunk struct {
	p    []byte
	s    int
	once sync.Once
	d    []byte
	t    *Tally
}

func (c *packedChunk) digits() []byte {
	c.once.Do(func() { c.d = c.t.spreadOut(c.p, c.s) })
	return c.d
}

func (c *packedChunk) run(k kernel) {
	if k.packed != nil {
		k.packed(c.p)
	} else if k.run != nil {
		k.run(c.digits())
	}
}
