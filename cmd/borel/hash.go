package main

import (
	"crypto/sha256"
	"hash"
)

// asyncHash computes the SHA-256 of what is written to it on its own
// goroutine, so that hashing the input (for the report's provenance) runs
// beside decoding and counting instead of before them: at 10^8 digits the
// hash alone takes about as long as a bare byte histogram of the file.
// Write copies its argument; Sum waits for the hash to catch up. It is for
// one writer.
type asyncHash struct {
	h    hash.Hash
	work chan []byte
	free chan []byte
	done chan struct{}
}

func newAsyncHash() *asyncHash {
	const buffers = 4
	a := &asyncHash{h: sha256.New(), work: make(chan []byte, buffers), free: make(chan []byte, buffers), done: make(chan struct{})}
	for range buffers {
		a.free <- nil
	}
	go func() {
		defer close(a.done)
		for b := range a.work {
			a.h.Write(b)
			a.free <- b
		}
	}()
	return a
}

func (a *asyncHash) Write(p []byte) (int, error) {
	b := append((<-a.free)[:0], p...)
	a.work <- b
	return len(p), nil
}

// Sum returns the SHA-256 of everything written; no Write may follow.
func (a *asyncHash) Sum() []byte {
	close(a.work)
	<-a.done
	return a.h.Sum(nil)
}
