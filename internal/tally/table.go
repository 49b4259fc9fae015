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
	data  [][]byte
	spare [][]int64 // tables of a spent tally, overwritten instead of allocated
}

// put adds a table and returns its index.
func (b *blobs) put(t []int64) int {
	buf := make([]byte, 0, len(t)+8)
	for _, v := range t {
		buf = binary.AppendVarint(buf, v)
	}
	b.data = append(b.data, buf)
	return len(b.data) - 1
}

// get decodes table i: one byte a cell for the small counts most cells
// hold (zigzag: 0..63 and −64..−1), binary.Varint for the others.
func (b *blobs) get(i int) ([]int64, error) {
	if b == nil || i < 0 || i >= len(b.data) {
		return nil, fmt.Errorf("a count table refers to table %d, which the shard does not hold", i)
	}
	buf := b.data[i]
	cells := 0
	for _, c := range buf {
		if c < 0x80 {
			cells++ // every varint ends with one byte below 0x80
		}
	}
	var out []int64
	for j, sp := range b.spare {
		if len(sp) == cells {
			out = sp
			b.spare = append(b.spare[:j], b.spare[j+1:]...)
			break
		}
	}
	if out == nil {
		out = make([]int64, cells)
	}
	k := 0
	for j := 0; j < len(buf); k++ {
		if c := buf[j]; c < 0x80 {
			out[k] = int64(c>>1) ^ -int64(c&1)
			j++
			continue
		}
		v, n := binary.Varint(buf[j:])
		if n <= 0 {
			return nil, fmt.Errorf("count table %d is damaged", i)
		}
		out[k] = v
		j += n
	}
	return out, nil
}
