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
