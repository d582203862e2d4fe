package store

import (
	"bytes"
	"math/rand/v2"
	"testing"
)

// blockReader gives the same bytes and the same success as reading the
// file directly (here a bytes.Reader, the reference), for random reads
// inside, across block boundaries and at or past the end.
func TestBlockReaderMatchesDirectReads(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 2026))
	data := make([]byte, 5*blockReaderSize+1234)
	for i := range data {
		data[i] = byte(rng.IntN(256))
	}
	ref := bytes.NewReader(data)
	r := newBlockReader(ref, int64(len(data)))
	for i := range 5000 {
		n := 1 + rng.IntN(3*4096)
		off := rng.Int64N(int64(len(data)) + 8192)
		want, got := make([]byte, n), make([]byte, n)
		wn, werr := ref.ReadAt(want, off)
		gn, gerr := r.ReadAt(got, off)
		if (werr == nil) != (gerr == nil) {
			t.Fatalf("read %d: %d bytes at %d: error %v, want %v", i, n, off, gerr, werr)
		}
		if werr == nil && (gn != wn || !bytes.Equal(got, want)) {
			t.Fatalf("read %d: %d bytes at %d differ from the file's", i, n, off)
		}
	}
}
