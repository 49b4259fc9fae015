package tally

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io"
	"strconv"
	"strings"
)

// ShardVersion is the version of the shard format this borel writes and
// reads. It goes up when a field changes meaning or disappears.
const ShardVersion = 1

// Shard is one stretch's tally as written by `borel tally`: the tally, the
// null it was planned for (which fixes part of its spec), and where its
// digits came from.
type Shard struct {
	Format  string     `json:"format"` // "borel-tally"
	Version int        `json:"version"`
	Null    ShardNull  `json:"null"`
	Source  ShardInput `json:"source"`
	Tally   *Tally     `json:"tally"`
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

// WriteShard writes a shard: the header line
//
//	borel-tally <version> sha256:<hex> bytes:<n>
//
// then n bytes of gzip-compressed JSON whose SHA-256 the header states.
func WriteShard(w io.Writer, s *Shard) error {
	s.Format, s.Version = "borel-tally", ShardVersion
	if s.Tally != nil {
		s.Tally.Settle()
	}
	var payload bytes.Buffer
	zw, _ := gzip.NewWriterLevel(&payload, gzip.BestSpeed)
	if err := json.NewEncoder(zw).Encode(s); err != nil {
		return err
	}
	if err := zw.Close(); err != nil {
		return err
	}
	sum := sha256.Sum256(payload.Bytes())
	if _, err := fmt.Fprintf(w, "borel-tally %d sha256:%s bytes:%d\n", ShardVersion, hex.EncodeToString(sum[:]), payload.Len()); err != nil {
		return err
	}
	_, err := w.Write(payload.Bytes())
	return err
}

// ReadShard reads a shard, checking its version, length and checksum, and
// that the tally inside is well formed. name is used in errors.
func ReadShard(r io.Reader, name string) (*Shard, error) {
	br := bufio.NewReader(r)
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
	if version > ShardVersion {
		return nil, fmt.Errorf("%s: shard format %d was written by a newer borel; this borel reads format %d: upgrade borel", name, version, ShardVersion)
	}
	if version < 1 {
		return nil, fmt.Errorf("%s: unknown shard format %d", name, version)
	}
	wantSum, ok1 := strings.CutPrefix(fields[2], "sha256:")
	nstr, ok2 := strings.CutPrefix(fields[3], "bytes:")
	n, err := strconv.ParseInt(nstr, 10, 64)
	if !ok1 || !ok2 || err != nil || n < 0 || n > 1<<40 {
		return nil, fmt.Errorf("%s: shard header is damaged (%q)", name, strings.TrimSpace(line))
	}
	// Read what is there (never allocate what a damaged header claims).
	payload, err := io.ReadAll(io.LimitReader(br, n))
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
	zr, err := gzip.NewReader(bytes.NewReader(payload))
	if err != nil {
		return nil, fmt.Errorf("%s: shard payload cannot be read: %v", name, err)
	}
	var s Shard
	dec := json.NewDecoder(zr)
	if err := dec.Decode(&s); err != nil {
		return nil, fmt.Errorf("%s: shard payload cannot be read: %v", name, err)
	}
	if s.Format != "borel-tally" || s.Tally == nil {
		return nil, fmt.Errorf("%s: shard payload holds no tally", name)
	}
	if err := s.Tally.wellFormed(); err != nil {
		return nil, fmt.Errorf("%s: %v", name, err)
	}
	return &s, nil
}
