package tally

import (
	"encoding/binary"
	"encoding/json"
	"fmt"
)

// table is a count table in a shard entry: the cells as zigzag varints
// (encoding/binary), the whole as one base64 string. Counts are small
// integers, so a table takes a byte or two a cell instead of a decimal
// number and a comma, and decodes without parsing numbers one by one.
// Any int64 survives the round trip; the records' checks judge the values.
type table []int64

func (t table) MarshalJSON() ([]byte, error) {
	buf := make([]byte, 0, len(t)+8)
	for _, v := range t {
		buf = binary.AppendVarint(buf, v)
	}
	return json.Marshal(buf)
}

func (t *table) UnmarshalJSON(data []byte) error {
	if string(data) == "null" {
		*t = nil
		return nil
	}
	var buf []byte
	if err := json.Unmarshal(data, &buf); err != nil {
		return err
	}
	out := make([]int64, 0, len(buf)/2)
	for len(buf) > 0 {
		v, n := binary.Varint(buf)
		if n <= 0 {
			return fmt.Errorf("a count table is damaged")
		}
		out = append(out, v)
		buf = buf[n:]
	}
	*t = out
	return nil
}

// blobs is a shard's table section: the large count tables (windows and
// blocks) kept out of the JSON, each as its cells in zigzag varints. A
// table of 10^7 cells then reads in tens of milliseconds, where as a
// base64 string inside JSON it was scanned three times (1.3 s a shard at
// K = 7 in format 3).
type blobs struct {
	data [][]byte
	fold bool // leave the large tables encoded (rawTable)
}

// put adds a table and returns its index.
func (b *blobs) put(t []int64) int {
	buf := make([]byte, len(t)+len(t)/8+binary.MaxVarintLen64)
	j := 0
	for _, v := range t {
		if uint64(v) < 64 { // one byte, the zigzag of a small count
			buf[j] = byte(v << 1)
			j++
			continue
		}
		if len(buf)-j < binary.MaxVarintLen64 {
			buf = append(buf[:j], make([]byte, len(buf)/2+binary.MaxVarintLen64)...)
			buf = buf[:cap(buf)]
		}
		j += binary.PutVarint(buf[j:], v)
	}
	b.data = append(b.data, buf[:j])
	return len(b.data) - 1
}

// get decodes table i: checked by scan (a damaged varint, a negative count
// or an overflowing sum is refused here), then added into a table of zeros
// — the same two loops AppendShard uses, so one decoder serves both.
func (b *blobs) get(i int) ([]int64, error) {
	raw, err := b.raw(i)
	if err != nil {
		return nil, err
	}
	cells, _, err := raw.scan(fmt.Sprintf("count table %d", i))
	if err != nil {
		return nil, err
	}
	out := make([]int64, cells)
	raw.addTo(out)
	return out, nil
}

// rawTable is a count table left in its shard encoding: a shard being
// folded into a tally (Tally.AppendShard) has its cells decoded straight
// into the cells they are added to, never into a table of its own.
type rawTable []byte

// raw returns table i undecoded.
func (b *blobs) raw(i int) (rawTable, error) {
	if b == nil || i < 0 || i >= len(b.data) {
		return nil, fmt.Errorf("a count table refers to table %d, which the shard does not hold", i)
	}
	return rawTable(b.data[i]), nil
}

// scan checks the encoding and returns the number of cells and their sum,
// refusing a negative count or an overflowing sum (as nonNegative does).
func (r rawTable) scan(name string) (cells int, sum int64, err error) {
	const high, low = 0x8080808080808080, 0x0101010101010101
	for j := 0; j < len(r); cells++ {
		// Eight one-byte, non-negative cells at a time (no byte with its
		// top bit, which continues a varint, or its low bit, a negative
		// zigzag value): their values are the bytes halved, summed in
		// 16-bit lanes.
		for j+8 <= len(r) {
			w := binary.LittleEndian.Uint64(r[j:])
			if w&(high|low) != 0 {
				break
			}
			w >>= 1
			w = w&0x00ff00ff00ff00ff + w>>8&0x00ff00ff00ff00ff
			sum += int64(w * 0x0001000100010001 >> 48)
			cells, j = cells+8, j+8
		}
		if j >= len(r) {
			break
		}
		var v int64
		n := 1
		if c := r[j]; c < 0x80 {
			v = int64(c>>1) ^ -int64(c&1)
		} else if j+1 < len(r) && r[j+1] < 0x80 {
			u := uint64(c&0x7f) | uint64(r[j+1])<<7
			v, n = int64(u>>1)^-int64(u&1), 2
		} else if v, n = binary.Varint(r[j:]); n <= 0 {
			return 0, 0, fmt.Errorf("%s is damaged", name)
		}
		if v < 0 {
			return 0, 0, fmt.Errorf("%s holds a negative count", name)
		}
		if sum += v; sum < 0 || sum > maxPosition {
			return 0, 0, fmt.Errorf("%s counts overflow", name)
		}
		j += n
	}
	if sum > maxPosition {
		return 0, 0, fmt.Errorf("%s counts overflow", name)
	}
	return cells, sum, nil
}

// addTo adds the cells to dst, which has as many (scan said so).
func (r rawTable) addTo(dst []int64) {
	k := 0
	for j := 0; j < len(r); k++ {
		if c := r[j]; c < 0x80 { // one byte: non-negative (scan refused the others)
			dst[k] += int64(c >> 1)
			j++
		} else if j+1 < len(r) && r[j+1] < 0x80 { // two bytes
			u := uint64(c&0x7f) | uint64(r[j+1])<<7
			dst[k] += int64(u >> 1)
			j += 2
		} else {
			v, n := binary.Varint(r[j:])
			dst[k] += v
			j += n
		}
	}
}
