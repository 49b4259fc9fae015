package tally

import (
	"bufio"
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"
)

// ShardVersion is the version of the shard format this borel writes and
// reads. It goes up when an entry changes meaning or disappears.
//
// Format 4: the header line
//
//	borel-tally 4 sha256:<hex> bytes:<n>
//
// then n bytes whose SHA-256 the header states: the length of a JSON
// section (a uvarint), the JSON section, and the table section. The JSON
// section is a stream of values, first the shard header (format, version,
// writer, null, source, the tally's spec with its record list, offset,
// length, head and tail), then one entry per record in the spec's order,
// each {"record": kind, "data": …} in the record's own encoding (small
// count tables inline as base64 varints, table.go; the window and block
// tables as indices into the table section). The table section is a
// uvarint count of tables, then each as a uvarint byte length and its
// cells as zigzag varints. Nothing is compressed: count tables of random
// digits shrink by about a third under gzip, which cost more time than
// the disk it saved. Format 3 had the same entries as gzip-compressed JSON
// with every table inline; format 2's coupon record dropped the segment
// open at each restart (a bias for long segments, CouponRestart); format 1
// (one JSON object that was the Go Tally field by field) was written by
// borel 0.1.0 before the records. All three are refused with that said.
const ShardVersion = 4

// Shard is one stretch's tally as written by `borel tally`: the tally, the
// null it was planned for (which fixes part of its spec), and where its
// digits came from.
type Shard struct {
	Writer string // the program that wrote it, e.g. "borel 0.1.0"
	Null   ShardNull
	Source ShardInput
	Tally  *Tally
}

// ShardNull is the null hypothesis of the audit the shard is for.
type ShardNull struct {
	Kind string    `json:"kind"`
	P    []float64 `json:"p,omitempty"`
}

// ShardInput identifies the input a shard was tallied from.
type ShardInput struct {
	Name   string `json:"name"`
	Bytes  int64  `json:"bytes"`
	SHA256 string `json:"sha256"`
}

// shardHeader is the first JSON value of a shard's payload.
type shardHeader struct {
	Format  string     `json:"format"` // "borel-tally"
	Version int        `json:"version"`
	Writer  string     `json:"writer"`
	Null    ShardNull  `json:"null"`
	Source  ShardInput `json:"source"`
	Spec    Spec       `json:"spec"`
	Offset  int64      `json:"offset"`
	Length  int64      `json:"length"`
	Head    []byte     `json:"head"`
	Tail    []byte     `json:"tail"`
}

// shardEntry is one record's entry.
type shardEntry struct {
	Record string          `json:"record"`
	Data   json.RawMessage `json:"data"`
}

// WriteShard writes a shard in format ShardVersion.
func WriteShard(w io.Writer, s *Shard) error {
	t := s.Tally
	if t == nil {
		return fmt.Errorf("tally: a shard needs a tally")
	}
	t.settle()
	var js bytes.Buffer
	enc := json.NewEncoder(&js)
	h := shardHeader{Format: "borel-tally", Version: ShardVersion, Writer: s.Writer, Null: s.Null, Source: s.Source,
		Spec: t.Spec, Offset: t.Offset, Length: t.N, Head: t.Head, Tail: t.Tail}
	if err := enc.Encode(h); err != nil {
		return err
	}
	tables := &blobs{}
	for _, r := range t.recs {
		data, err := json.Marshal(r.entry(tables))
		if err != nil {
			return err
		}
		if err := enc.Encode(shardEntry{Record: r.kind(), Data: data}); err != nil {
			return err
		}
	}
	// The payload's pieces, hashed and written in turn (never copied into
	// one buffer).
	pieces := [][]byte{binary.AppendUvarint(nil, uint64(js.Len())), js.Bytes(), binary.AppendUvarint(nil, uint64(len(tables.data)))}
	for _, d := range tables.data {
		pieces = append(pieces, binary.AppendUvarint(nil, uint64(len(d))), d)
	}
	h256, size := sha256.New(), 0
	for _, p := range pieces {
		h256.Write(p)
		size += len(p)
	}
	if g, ok := w.(interface{ Grow(int) }); ok { // a bytes.Buffer: one allocation
		g.Grow(size + 128)
	}
	if _, err := fmt.Fprintf(w, "borel-tally %d sha256:%s bytes:%d\n", ShardVersion, hex.EncodeToString(h256.Sum(nil)), size); err != nil {
		return err
	}
	for _, p := range pieces {
		if _, err := w.Write(p); err != nil {
			return err
		}
	}
	return nil
}

// readUpTo reads n bytes, or what there is if fewer: one allocation of the
// stated size for any honest shard (io.ReadAll's growth cleared and copied
// 40 MB for a 21 MB shard), at most 256 MiB ahead of the bytes read, so a
// damaged header's claim is never allocated.
func readUpTo(r io.Reader, n int64) ([]byte, error) {
	const step = 256 << 20
	buf := make([]byte, 0, min(n, step))
	for int64(len(buf)) < n {
		if len(buf) == cap(buf) {
			buf = slices.Grow(buf, int(min(n-int64(len(buf)), step)))
		}
		m, err := r.Read(buf[len(buf):int(min(int64(cap(buf)), n))])
		buf = buf[:len(buf)+m]
		if err == io.EOF {
			break
		}
		if err != nil {
			return buf, err
		}
	}
	return buf, nil
}

// readShardLine reads and checks a shard's first line, returning its four
// fields (format name, version, checksum, payload length).
func readShardLine(br *bufio.Reader, name string) ([]string, error) {
	line, err := br.ReadString('\n')
	if err != nil {
		return nil, fmt.Errorf("%s: not a borel shard (no header line)", name)
	}
	fields := strings.Fields(line)
	if len(fields) != 4 || fields[0] != "borel-tally" {
		return nil, fmt.Errorf("%s: not a borel shard (header %q)", name, strings.TrimSpace(line))
	}
	version, err := strconv.Atoi(fields[1])
	if err != nil {
		return nil, fmt.Errorf("%s: shard header has no version", name)
	}
	switch {
	case version > ShardVersion:
		return nil, fmt.Errorf("%s: shard format %d was written by a newer borel; this borel reads format %d: upgrade borel", name, version, ShardVersion)
	case version == 3:
		return nil, fmt.Errorf("%s: shard format 3 was written by an earlier borel (gzip-compressed JSON tables, slow to read); this borel reads format %d: tally that stretch again with this borel", name, ShardVersion)
	case version == 2:
		return nil, fmt.Errorf("%s: shard format 2 counts coupon segments by an earlier rule that biased them short; this borel reads format %d: tally that stretch again with this borel", name, ShardVersion)
	case version == 1:
		return nil, fmt.Errorf("%s: shard format 1 was written by borel 0.1.0 before its tallies were split into records; this borel reads format %d: tally that stretch again with this borel", name, ShardVersion)
	case version < 1:
		return nil, fmt.Errorf("%s: unknown shard format %d", name, version)
	}
	return fields, nil
}

// ShardInfo is what a shard's header says: enough to order shards and
// check that they fit together before any of their tables is read.
type ShardInfo struct {
	Writer         string
	Null           ShardNull
	Source         ShardInput
	Spec           Spec
	Offset, Length int64
}

// ReadShardInfo reads a shard's header line and the header at the start
// of its payload, nothing further. It checks the format, not the
// checksum or the records: ReadShard does, when the shard is read whole.
func ReadShardInfo(r io.Reader, name string) (*ShardInfo, error) {
	br := bufio.NewReader(r)
	if _, err := readShardLine(br, name); err != nil {
		return nil, err
	}
	jsonLen, err := binary.ReadUvarint(br)
	if err != nil {
		return nil, fmt.Errorf("%s: shard is truncated (no JSON section)", name)
	}
	var h shardHeader
	if err := json.NewDecoder(io.LimitReader(br, int64(jsonLen))).Decode(&h); err != nil {
		return nil, fmt.Errorf("%s: shard header cannot be read: %v", name, err)
	}
	if h.Format != "borel-tally" || h.Version != ShardVersion {
		return nil, fmt.Errorf("%s: shard payload holds no tally of format %d", name, ShardVersion)
	}
	return &ShardInfo{Writer: h.Writer, Null: h.Null, Source: h.Source, Spec: h.Spec, Offset: h.Offset, Length: h.Length}, nil
}

// ReadShard reads a shard, checking its version, length and checksum, and
// that the tally inside is well formed, record by record. name is used in
// errors.
func ReadShard(r io.Reader, name string) (*Shard, error) {
	return readShard(r, name, false)
}

// AppendShard reads a shard and appends its stretch to t (as Append does)
// without decoding its window and block tables into tables of their own:
// each cell is decoded straight into t's, after the whole shard has been
// checked as ReadShard checks it. A fold over many shards then holds t
// and one shard's bytes (at K = 7: 170 MB and 21 MB), and reads each
// shard's tables once. The shard is returned without its tally.
func (t *Tally) AppendShard(r io.Reader, name string) (*Shard, error) {
	s, err := readShard(r, name, t.N > 0) // an empty t takes the shard's own tables
	if err != nil {
		return nil, err
	}
	if err := t.Append(s.Tally); err != nil {
		return nil, fmt.Errorf("%s: %v", name, err)
	}
	s.Tally = nil
	return s, nil
}

// readShard is ReadShard; fold leaves the large tables encoded, for
// AppendShard only (such a tally is not usable otherwise).
func readShard(r io.Reader, name string, fold bool) (*Shard, error) {
	br := bufio.NewReader(r)
	fields, err := readShardLine(br, name)
	if err != nil {
		return nil, err
	}
	wantSum, ok1 := strings.CutPrefix(fields[2], "sha256:")
	nstr, ok2 := strings.CutPrefix(fields[3], "bytes:")
	n, err := strconv.ParseInt(nstr, 10, 64)
	if !ok1 || !ok2 || err != nil || n < 0 || n > 1<<40 {
		return nil, fmt.Errorf("%s: shard header is damaged (%q)", name, strings.Join(fields, " "))
	}
	// Read what is there (never allocate what a damaged header claims).
	payload, err := readUpTo(br, n)
	if err != nil || int64(len(payload)) < n {
		return nil, fmt.Errorf("%s: shard is truncated (its payload has fewer than the %d bytes the header states); tally that stretch again", name, n)
	}
	if extra, _ := br.Peek(1); len(extra) > 0 {
		return nil, fmt.Errorf("%s: shard has bytes after its payload; it is damaged", name)
	}
	sum := sha256.Sum256(payload)
	if hex.EncodeToString(sum[:]) != wantSum {
		return nil, fmt.Errorf("%s: shard is corrupted (its checksum does not match); tally that stretch again", name)
	}
	plain := payload
	s, err := decodeShard(plain, fold)
	if err != nil {
		return nil, fmt.Errorf("%s: %v", name, err)
	}
	return s, nil
}

// decodeShard decodes and validates a shard's uncompressed payload.
func decodeShard(plain []byte, fold bool) (*Shard, error) {
	jsonLen, n := binary.Uvarint(plain)
	if n <= 0 || jsonLen > uint64(len(plain)-n) {
		return nil, fmt.Errorf("shard payload is damaged (its JSON section overruns it)")
	}
	js, rest := plain[n:n+int(jsonLen)], plain[n+int(jsonLen):]
	tables := &blobs{fold: fold}
	count, n := binary.Uvarint(rest)
	if n <= 0 || count > uint64(len(rest)) {
		return nil, fmt.Errorf("shard payload is damaged (no table section)")
	}
	rest = rest[n:]
	for i := uint64(0); i < count; i++ {
		size, n := binary.Uvarint(rest)
		if n <= 0 || size > uint64(len(rest)-n) {
			return nil, fmt.Errorf("shard payload is damaged (count table %d overruns it)", i)
		}
		tables.data = append(tables.data, rest[n:n+int(size)])
		rest = rest[n+int(size):]
	}
	if len(rest) > 0 {
		return nil, fmt.Errorf("shard payload is damaged (bytes after its tables)")
	}
	dec := json.NewDecoder(bytes.NewReader(js))
	var h shardHeader
	if err := dec.Decode(&h); err != nil {
		return nil, fmt.Errorf("shard header cannot be read: %v", err)
	}
	if h.Format != "borel-tally" || h.Version != ShardVersion {
		return nil, fmt.Errorf("shard payload holds no tally of format %d", ShardVersion)
	}
	t, err := h.Spec.shell(h.Offset, int64(len(plain)))
	if err != nil {
		return nil, fmt.Errorf("%v (damaged shard)", err)
	}
	t.N, t.Head, t.Tail = h.Length, h.Head, h.Tail
	if t.Head == nil {
		t.Head = []byte{}
	}
	if t.Tail == nil {
		t.Tail = []byte{}
	}
	for _, r := range t.recs {
		var e shardEntry
		if err := dec.Decode(&e); err != nil {
			return nil, fmt.Errorf("shard entry of the %s record cannot be read: %v", r.kind(), err)
		}
		if e.Record != r.kind() {
			return nil, fmt.Errorf("shard holds a %q entry where its record list has %s (damaged shard)", e.Record, r.kind())
		}
		if err := r.decode(e.Data, tables); err != nil {
			return nil, fmt.Errorf("shard entry of the %s record cannot be read: %v (damaged shard)", r.kind(), err)
		}
	}
	if dec.More() {
		return nil, fmt.Errorf("shard holds more entries than its record list (damaged shard)")
	}
	t.bind()
	if err := t.wellFormed(); err != nil {
		return nil, err
	}
	return &Shard{Writer: h.Writer, Null: h.Null, Source: h.Source, Tally: t}, nil
}

// shell returns a tally of the spec whose records are to be decoded: the
// spec is checked first, and its tables must be no larger than the payload
// could hold (every cell takes at least one byte), so a damaged header
// cannot make the decoder allocate more than the shard's size.
func (s Spec) shell(offset, payload int64) (*Tally, error) {
	if err := s.Validate(); err != nil {
		return nil, err
	}
	if s.MaxBlock > 64 || pow(float64(s.Base), s.MaxBlock) > float64(payload) {
		return nil, fmt.Errorf("tally: block length %d in base %d needs tables larger than the shard", s.MaxBlock, s.Base)
	}
	for _, r := range s.Records {
		if r.cells(s.Base) > float64(payload)+float64(CouponRestart) {
			return nil, fmt.Errorf("tally: the %s record needs tables larger than the shard", r.Kind())
		}
	}
	return newTally(s, offset, false)
}
