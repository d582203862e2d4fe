package store

import (
	"errors"
	"io"
)

// blockReader serves small reads of a file (the page walk's, one page at a
// time) from aligned blocks read whole and kept for a while: a walk of a
// file whose pages lie near each other makes one read call a block
// instead of one a page. Not safe for concurrent use.
type blockReader struct {
	f      io.ReaderAt
	size   int64         // the file's length: blocks are cut there
	index  map[int64]int // block offset -> slot
	blocks [blockReaderBlocks]struct {
		off  int64 // -1 when empty
		data []byte
	}
	next int // the slot to reuse next (round robin)
}

// blockReaderBlocks blocks of blockReaderSize bytes: 4 MiB held at most.
const (
	blockReaderSize   = 64 << 10
	blockReaderBlocks = 64
)

func newBlockReader(f io.ReaderAt, size int64) *blockReader {
	r := &blockReader{f: f, size: size, index: make(map[int64]int, blockReaderBlocks)}
	for i := range r.blocks {
		r.blocks[i].off = -1
	}
	return r
}

// ReadAt reads len(p) bytes at off from the kept blocks, reading a block
// on a miss; a read across a block boundary goes to the file directly.
func (r *blockReader) ReadAt(p []byte, off int64) (int, error) {
	start := off - off%blockReaderSize
	end := off + int64(len(p))
	if off < 0 || end > start+blockReaderSize {
		return r.f.ReadAt(p, off)
	}
	if i, ok := r.index[start]; ok && end <= start+int64(len(r.blocks[i].data)) {
		return copy(p, r.blocks[i].data[off-start:]), nil
	}
	n := min(int64(blockReaderSize), r.size-start)
	if n <= 0 || end > start+n {
		return r.f.ReadAt(p, off) // at or past the end: the file says what
	}
	i := r.next
	r.next = (r.next + 1) % len(r.blocks)
	b := &r.blocks[i]
	if b.off >= 0 {
		delete(r.index, b.off)
	}
	if b.data == nil {
		b.data = make([]byte, blockReaderSize)
	}
	b.data = b.data[:n]
	if _, err := r.f.ReadAt(b.data, start); err != nil && !errors.Is(err, io.EOF) {
		b.off = -1
		return 0, err
	}
	b.off, r.index[start] = start, i
	return copy(p, b.data[off-start:]), nil
}
