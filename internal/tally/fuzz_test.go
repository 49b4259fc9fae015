package tally

import (
	"bytes"
	"math/rand/v2"
	"testing"
)

// FuzzReadShard: damaged shards are errors, never panics; a shard that
// reads back is well formed.
func FuzzReadShard(f *testing.F) {
	rng := rand.New(rand.NewPCG(1, 1))
	tl, _ := New(randomSpec(rng, 10, 2), 0)
	tl.Add(randomDigits(rng, 500, 10))
	var buf bytes.Buffer
	WriteShard(&buf, &Shard{Null: ShardNull{Kind: "uniform"}, Tally: tl})
	f.Add(buf.Bytes())
	f.Add([]byte("borel-tally 1 sha256:00 bytes:3\nabc"))
	f.Add([]byte("borel-tally 4 sha256:00 bytes:3\nabc"))
	f.Add([]byte("borel-tally 99 sha256:00 bytes:0\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := ReadShard(bytes.NewReader(data), "fuzz")
		if err != nil {
			return
		}
		if err := s.Tally.wellFormed(); err != nil {
			t.Fatalf("accepted a malformed tally: %v", err)
		}
	})
}
