package store

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"hash/fnv"
	"io"
	"os"

	bolterrors "go.etcd.io/bbolt/errors"
)

// This file reads bbolt's page structure with plain file reads, never the
// memory map, so that nothing it meets can fault the process. The quick
// check at open uses the meta pages; the walk at open (walkAtOpen) and
// Check walk every page reachable from the root, Check before bbolt's own
// check (which runs on a goroutine of its own, where a fault cannot be
// caught) is allowed to read the same pages through the map.
//
// Layout of bbolt v1.5 (go.etcd.io/bbolt/internal/common, host byte order):
//
//	page header  id u64 | flags u16 | count u16 | overflow u32      (16 bytes)
//	meta         magic u32 | version u32 | pageSize u32 | flags u32 |
//	             root u64 | sequence u64 | freelist u64 | pgid u64 |
//	             txid u64 | checksum u64 (FNV-64a of the 56 bytes before it)
//	branch elem  pos u32 | ksize u32 | pgid u64                     (16 bytes)
//	leaf elem    flags u32 | pos u32 | ksize u32 | vsize u32        (16 bytes)
//
// pos counts from the element itself. A leaf element with flag 1 is a
// bucket: its value starts with root u64 | sequence u64, and a root of 0
// means the bucket's leaf page is inline in the value after those 16 bytes.
const (
	boltMagic        = 0xED0CDAED
	boltVersion      = 2
	pageHeaderLen    = 16
	elemLen          = 16
	bucketHeaderLen  = 16
	metaChecksumAt   = pageHeaderLen + 56
	flagBranch       = 0x01
	flagLeaf         = 0x02
	flagMeta         = 0x04
	flagFreelist     = 0x10
	leafBucketFlag   = 0x01
	noFreelist       = ^uint64(0)
	maxTreeDepth     = 64
	minPageSize      = 512
	maxPageSize      = 1 << 16
	freelistOverflow = 0xFFFF
)

var hostOrder = binary.NativeEndian

// boltMeta is one meta page's content.
type boltMeta struct {
	pageSize uint32
	root     uint64
	freelist uint64
	pgid     uint64 // high water mark: pages 0..pgid-1 are in use or free
	txid     uint64
}

// parseMeta validates a meta page read from offset page*pageSize.
func parseMeta(buf []byte, page uint64) (boltMeta, error) {
	if len(buf) < metaChecksumAt+8 {
		return boltMeta{}, fmt.Errorf("meta page %d: file too short", page)
	}
	u32 := func(at int) uint32 { return hostOrder.Uint32(buf[at:]) }
	u64 := func(at int) uint64 { return hostOrder.Uint64(buf[at:]) }
	h := fnv.New64a()
	_, _ = h.Write(buf[pageHeaderLen:metaChecksumAt])
	m := boltMeta{pageSize: u32(24), root: u64(32), freelist: u64(48), pgid: u64(56), txid: u64(64)}
	switch {
	case u32(16) != boltMagic:
		return m, fmt.Errorf("meta page %d: no bbolt magic (%08x)", page, u32(16))
	case u32(20) != boltVersion:
		return m, fmt.Errorf("meta page %d: format version %d, want %d", page, u32(20), boltVersion)
	case u64(metaChecksumAt) != h.Sum64():
		return m, fmt.Errorf("meta page %d fails its checksum", page)
	case u64(0) != page || hostOrder.Uint16(buf[8:])&flagMeta == 0:
		return m, fmt.Errorf("meta page %d: header says page %d, flags %#x", page, u64(0), hostOrder.Uint16(buf[8:]))
	case m.pageSize < minPageSize || m.pageSize > maxPageSize || m.pageSize&(m.pageSize-1) != 0:
		return m, fmt.Errorf("meta page %d: page size %d", page, m.pageSize)
	case m.root < 2 || m.root >= m.pgid:
		return m, fmt.Errorf("meta page %d: root page %d outside 2..%d", page, m.root, m.pgid)
	case m.freelist != noFreelist && (m.freelist < 2 || m.freelist >= m.pgid):
		return m, fmt.Errorf("meta page %d: freelist page %d outside 2..%d", page, m.freelist, m.pgid)
	}
	return m, nil
}

// quickCheck is the check at open: both meta pages valid, with one page
// size, and the file long enough for every page the newer one counts. It
// reads two pages. A file that fails it cannot be opened safely: bbolt
// would map pages that are not there (a SIGBUS on reading them) or follow
// a damaged meta page. The newer meta page is returned.
func quickCheck(f io.ReaderAt, size int64) (boltMeta, error) {
	buf := make([]byte, metaChecksumAt+8)
	if _, err := f.ReadAt(buf, 0); err != nil {
		return boltMeta{}, fmt.Errorf("read meta page 0: %w", err)
	}
	m0, err := parseMeta(buf, 0)
	if err != nil && !hasMagic(buf) {
		// Not a bbolt file at all (no magic where either meta page of the
		// usual page size would be), rather than a damaged one.
		if _, rerr := f.ReadAt(buf, 4096); rerr != nil || !hasMagic(buf) {
			return boltMeta{}, fmt.Errorf("not a lathmark data file (no bbolt header): %w", errNotBolt)
		}
	}
	if err != nil {
		return boltMeta{}, metaPageError{err}
	}
	if _, err := f.ReadAt(buf, int64(m0.pageSize)); err != nil {
		return boltMeta{}, fmt.Errorf("read meta page 1: %w", err)
	}
	m1, err := parseMeta(buf, 1)
	if err != nil {
		return boltMeta{}, metaPageError{err}
	}
	if m1.pageSize != m0.pageSize {
		return boltMeta{}, fmt.Errorf("meta pages disagree on the page size (%d and %d)", m0.pageSize, m1.pageSize)
	}
	m := m0
	if m1.txid > m0.txid {
		m = m1
	}
	if need := int64(m.pgid) * int64(m.pageSize); need < 0 || size < need {
		return boltMeta{}, fmt.Errorf("file is %d bytes, its %d pages of %d bytes need %d: it was cut short", size, m.pgid, m.pageSize, need)
	}
	return m, nil
}

// ErrMetaDamaged marks a file refused because a meta page fails its
// checks (errors.Is); with the other one sound, MendMeta can mend it.
var ErrMetaDamaged = errors.New("a meta page is damaged")

// metaPageError is a meta page's problem: its own message, matching
// ErrMetaDamaged as well as what it wraps.
type metaPageError struct{ err error }

func (e metaPageError) Error() string   { return e.err.Error() }
func (e metaPageError) Unwrap() []error { return []error{e.err, ErrMetaDamaged} }

// errNotBolt marks a file that is no bbolt file at all; it matches bbolt's
// errors.ErrInvalid, as bbolt's own Open would say.
var errNotBolt = bolterrors.ErrInvalid

func hasMagic(buf []byte) bool {
	return len(buf) >= pageHeaderLen+4 && hostOrder.Uint32(buf[pageHeaderLen:]) == boltMagic
}

// quickCheckFile runs quickCheck on the file at path; a missing or empty
// file (bbolt creates it) passes.
func quickCheckFile(path string) error {
	f, err := os.Open(path)
	if errors.Is(err, os.ErrNotExist) {
		return nil
	}
	if err != nil {
		return err
	}
	defer func() { _ = f.Close() }()
	fi, err := f.Stat()
	if err != nil || fi.Size() == 0 {
		return err
	}
	_, err = quickCheck(f, fi.Size())
	return err
}

// pageWalk walks the page tree of a file with plain reads.
type pageWalk struct {
	f       io.ReaderAt
	meta    boltMeta
	seen    map[uint64]bool
	reached int
	p       *problemList
}

// walkPages checks, with plain reads, every page reachable from the newer
// meta page: ids below the high water mark, no page reached twice, branch
// and leaf pages only, every element, key and value inside its page, keys
// in order across each bucket's tree, a freelist whose ids are in range.
// It reports what it finds in p.
func walkPages(f io.ReaderAt, size int64, p *problemList) {
	m, err := quickCheck(f, size)
	if err != nil {
		p.add("pages: %v", err)
		return
	}
	walkFrom(f, m, p)
}

// walkFrom is walkPages from the given meta page's root and freelist.
func walkFrom(f io.ReaderAt, m boltMeta, p *problemList) {
	w := &pageWalk{f: f, meta: m, seen: map[uint64]bool{}, p: p}
	w.freelist()
	w.tree(m.root, 0, nil, nil)
}

// read returns page id and its overflow pages, or nil after reporting why
// it cannot. parent says where the page id came from (for a message): the
// text given, or the tree depth when it is "".
func (w *pageWalk) read(id uint64, parent string, depth int) []byte {
	from := func() string {
		if parent != "" {
			return parent
		}
		return fmt.Sprintf("depth %d", depth)
	}
	ps := uint64(w.meta.pageSize)
	if id < 2 || id >= w.meta.pgid {
		w.p.add("pages: %s points to page %d, outside 2..%d", from(), id, w.meta.pgid)
		return nil
	}
	// One read of the first page (its header says how many follow), and a
	// second only for a page with overflow pages.
	buf := make([]byte, ps)
	if _, err := w.f.ReadAt(buf, int64(id*ps)); err != nil {
		w.p.add("pages: page %d: %v", id, err)
		return nil
	}
	if got := hostOrder.Uint64(buf); got != id {
		w.p.add("pages: page %d (from %s) says it is page %d", id, from(), got)
		return nil
	}
	overflow := uint64(hostOrder.Uint32(buf[12:]))
	if id+overflow >= w.meta.pgid {
		w.p.add("pages: page %d: %d overflow pages run past page %d", id, overflow, w.meta.pgid)
		return nil
	}
	for i := id; i <= id+overflow; i++ {
		if w.seen[i] {
			w.p.add("pages: page %d reached twice (from %s)", i, from())
			return nil
		}
		w.seen[i] = true
	}
	if overflow > 0 {
		buf = append(buf, make([]byte, overflow*ps)...)
		if _, err := w.f.ReadAt(buf[ps:], int64((id+1)*ps)); err != nil {
			w.p.add("pages: page %d: %v", id, err)
			return nil
		}
	}
	w.reached++
	return buf
}

func (w *pageWalk) freelist() {
	if w.meta.freelist == noFreelist {
		return
	}
	buf := w.read(w.meta.freelist, "the meta page", 0)
	if buf == nil {
		return
	}
	if hostOrder.Uint16(buf[8:])&flagFreelist == 0 {
		w.p.add("pages: freelist page %d has flags %#x", w.meta.freelist, hostOrder.Uint16(buf[8:]))
		return
	}
	start, n := uint64(pageHeaderLen), uint64(hostOrder.Uint16(buf[10:]))
	if n == freelistOverflow {
		n, start = hostOrder.Uint64(buf[pageHeaderLen:]), start+8
	}
	if n > (uint64(len(buf))-start)/8 {
		w.p.add("pages: freelist page %d counts %d ids, more than it holds", w.meta.freelist, n)
		return
	}
	for i := range n {
		if id := hostOrder.Uint64(buf[start+8*i:]); id < 2 || id >= w.meta.pgid {
			w.p.add("pages: freelist holds page %d, outside 2..%d", id, w.meta.pgid)
			return
		}
	}
}

// tree walks the b-tree rooted at page id, whose keys must lie in
// [lo, hi) (nil: unbounded), and returns the last key found under it (nil
// if none).
func (w *pageWalk) tree(id uint64, depth int, lo, hi []byte) []byte {
	if depth > maxTreeDepth {
		w.p.add("pages: tree deeper than %d at page %d", maxTreeDepth, id)
		return nil
	}
	buf := w.read(id, "", depth)
	if buf == nil {
		return nil
	}
	return w.page(buf, id, depth, lo, hi)
}

// page checks one branch or leaf page held in buf (also an inline bucket's
// page, with id 0), whose keys must lie in [lo, hi), and returns its last
// key (for a branch page, the last key under it).
//
// Key order is checked as bbolt's own check does (tx_check.go,
// recursivelyCheckPageKeyOrder): keys rise strictly within a page, a
// branch element's key is above every key under the element before it, and
// every key under element i lies below element i+1's key. bbolt keeps no
// page checksums, so a damaged key on a branch page would otherwise pass
// here and send a range scan to the wrong page, leaving sound records out
// with no error.
func (w *pageWalk) page(buf []byte, id uint64, depth int, lo, hi []byte) []byte {
	if len(buf) < pageHeaderLen {
		w.p.add("pages: page %d: %d bytes, shorter than its header", id, len(buf))
		return nil
	}
	flags, count := hostOrder.Uint16(buf[8:]), int(hostOrder.Uint16(buf[10:]))
	if flags != flagBranch && flags != flagLeaf {
		w.p.add("pages: page %d has flags %#x, want a branch or leaf page", id, flags)
		return nil
	}
	if pageHeaderLen+count*elemLen > len(buf) {
		w.p.add("pages: page %d counts %d elements, more than it holds", id, count)
		return nil
	}
	kind, at := "branch", 0
	if flags == flagLeaf {
		kind, at = "leaf", 4 // leaf elements start with their flags
	}
	inside := func(e, pos, n int) bool { return pos >= 0 && n >= 0 && e+pos+n <= len(buf) && e+pos >= e }
	keys := make([][]byte, count)
	for i := range count {
		e := pageHeaderLen + i*elemLen
		pos, ksize := int(hostOrder.Uint32(buf[e+at:])), int(hostOrder.Uint32(buf[e+at+4:]))
		if !inside(e, pos, ksize) {
			w.p.add("pages: %s page %d element %d: key outside the page", kind, id, i)
			return nil
		}
		keys[i] = buf[e+pos : e+pos+ksize]
		if flags == flagLeaf && !inside(e, pos+ksize, int(hostOrder.Uint32(buf[e+12:]))) {
			w.p.add("pages: leaf page %d element %d: value outside the page", id, i)
			return nil
		}
	}
	prev := lo
	for i, k := range keys {
		w.keyInOrder(kind, id, i, k, prev, hi)
		e := pageHeaderLen + i*elemLen
		if flags == flagLeaf {
			prev = k
			if hostOrder.Uint32(buf[e:])&leafBucketFlag != 0 {
				pos, vsize := int(hostOrder.Uint32(buf[e+4:])), int(hostOrder.Uint32(buf[e+12:]))
				w.bucket(buf[e+pos+len(k):e+pos+len(k)+vsize], id, depth)
			}
			continue
		}
		next := hi
		if i+1 < len(keys) {
			next = keys[i+1]
		}
		if last := w.tree(hostOrder.Uint64(buf[e+8:]), depth+1, k, next); last != nil {
			prev = last
		} else {
			prev = k
		}
	}
	return prev
}

// keyInOrder reports element i's key k on a page if it is not above prev
// (at or above it for the first element, which may equal the key that
// leads to its page) or not below hi.
func (w *pageWalk) keyInOrder(kind string, id uint64, i int, k, prev, hi []byte) {
	switch c := bytes.Compare(prev, k); {
	case prev == nil:
	case i == 0 && c > 0:
		w.p.add("pages: %s page %d: first key %x below the key %x that leads to it", kind, id, k, prev)
	case i > 0 && c >= 0:
		w.p.add("pages: %s page %d element %d: key %x not above the one before it, %x", kind, id, i, k, prev)
	}
	if hi != nil && bytes.Compare(k, hi) >= 0 {
		w.p.add("pages: %s page %d element %d: key %x not below %x, the next key of its parent", kind, id, i, k, hi)
	}
}

// bucket follows a bucket value: its root page, or its inline page.
func (w *pageWalk) bucket(v []byte, parent uint64, depth int) {
	if len(v) < bucketHeaderLen {
		w.p.add("pages: bucket value on page %d is %d bytes", parent, len(v))
		return
	}
	if root := hostOrder.Uint64(v); root != 0 {
		w.tree(root, depth+1, nil, nil)
		return
	}
	inline := v[bucketHeaderLen:]
	if len(inline) >= pageHeaderLen && hostOrder.Uint16(inline[8:]) != flagLeaf {
		w.p.add("pages: inline bucket on page %d is not a leaf page", parent)
		return
	}
	if len(inline) >= pageHeaderLen {
		w.page(inline, 0, depth+1, nil, nil)
	}
}
