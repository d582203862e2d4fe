package store

import (
	"bytes"
	"context"
	"encoding/binary"
	"errors"
	"os"
	"path/filepath"
	"testing"
	"time"

	bolt "go.etcd.io/bbolt"

	"github.com/lathmark-team/lathmark/internal/record"
)

// fillAttempts writes n attempts of one athlete (id 7) straight into the
// attempts bucket.
func fillAttempts(t testing.TB, db *DB, n int) { fillAttemptsFrom(t, db, 0, n) }

// fillAttemptsFrom writes attempts from..from+n-1 (sealBenchRecord), in
// transactions of 5,000.
func fillAttemptsFrom(t testing.TB, db *DB, from, n int) {
	t.Helper()
	for start := from; start < from+n; start += 5000 {
		if err := db.bolt.Update(func(tx *bolt.Tx) error {
			bk := tx.Bucket([]byte(bucketAttempts))
			for i := start; i < min(start+5000, from+n); i++ {
				k, a := sealBenchRecord(i)
				if err := putJSON(bk, k, a); err != nil {
					return err
				}
			}
			return nil
		}); err != nil {
			t.Fatal(err)
		}
	}
}

// branchPageWithKeys finds a branch page of the file whose second element's
// key starts with the athlete id 7 (the attempts bucket's tree) and returns
// the file offset of that key's first byte.
func branchPageWithKeys(t *testing.T, data []byte) int {
	t.Helper()
	const ps = 4096
	for off := 2 * ps; off+ps <= len(data); off += ps {
		page := data[off : off+ps]
		if hostOrder.Uint16(page[8:]) != flagBranch || hostOrder.Uint16(page[10:]) < 3 {
			continue
		}
		e := pageHeaderLen + elemLen // element 1
		pos, ksize := int(hostOrder.Uint32(page[e:])), int(hostOrder.Uint32(page[e+4:]))
		if ksize == attemptLen && binary.BigEndian.Uint64(page[e+pos:]) == 7 {
			return off + e + pos
		}
	}
	t.Fatal("no branch page of the attempts bucket in the file")
	return 0
}

// A damaged key on a branch page (bbolt keeps no page checksums, and the
// records stay sound) makes a range scan leave records out with no error.
// Open walks the page tree and refuses such a file as damaged, read-write
// and read-only, while Check still opens it and names the page; opened
// without the walk, the same file reads short in silence, which is the gap
// the walk closes.
func TestOpenRefusesDamagedBranchPage(t *testing.T) {
	const total = 3000
	path := filepath.Join(t.TempDir(), "branch.db")
	db, err := Open(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if err := db.bolt.Update(func(tx *bolt.Tx) error {
		return putJSON(tx.Bucket([]byte(bucketAthletes)), idKey(7), record.Athlete{ID: 7, Name: "Sol"})
	}); err != nil {
		t.Fatal(err)
	}
	fillAttempts(t, db, total)
	if err := db.Close(); err != nil {
		t.Fatal(err)
	}
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	// Athlete id 7 becomes 0 in the second element's key: it now sorts
	// before the first, and a Seek into the first element's page binary-
	// searches past it into the second.
	data[branchPageWithKeys(t, data)+idLen-1] ^= 0x07
	if err := os.WriteFile(path, data, 0o600); err != nil {
		t.Fatal(err)
	}
	before := bytes.Clone(data)

	for _, ro := range []bool{false, true} {
		db, err := Open(path, Options{ReadOnly: ro})
		if err == nil {
			_ = db.Close()
			t.Fatalf("open (read-only %v) of a file with a damaged branch page succeeded", ro)
		}
		if !errors.Is(err, ErrDamaged) || !errors.Is(err, ErrInconsistent) {
			t.Errorf("open (read-only %v): %v, want ErrDamaged and ErrInconsistent", ro, err)
		}
	}
	if after, _ := os.ReadFile(path); !bytes.Equal(after, before) {
		t.Error("the refused open wrote to the file")
	}
	if err := Check(path); !errors.Is(err, ErrInconsistent) || !bytes.Contains([]byte(err.Error()), []byte("not below")) {
		t.Errorf("check: %v, want the branch key named", err)
	}

	// Without the walk: windows that start early in Sol's attempts read
	// short, and say nothing.
	db, err = Open(path, Options{ReadOnly: true, OpenWalkMaxBytes: -1})
	if err != nil {
		t.Fatalf("open without the walk: %v", err)
	}
	defer func() { _ = db.Close() }()
	short := 0
	for i := range 40 {
		_, from := sealBenchRecord(i)
		n := 0
		err := db.View(context.Background(), func(tx *Tx) error {
			return tx.Attempts(7, from.Time, time.Date(2200, 1, 1, 0, 0, 0, 0, time.UTC), func(record.Attempt) error { n++; return nil })
		})
		if err == nil && n < total-i {
			short++
		}
	}
	t.Logf("without the walk: %d of 40 windows read short with no error", short)
	if short == 0 {
		t.Error("the damaged branch key did not change any scan: the test does not show the gap")
	}
}

// The walk limit: a file with more pages in use than OpenWalkMaxBytes
// opens with only the quick check (here, damage the walk would refuse).
func TestOpenWalkLimit(t *testing.T) {
	path := filepath.Join(t.TempDir(), "limit.db")
	db, err := Open(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	fillAttempts(t, db, 3000)
	var used int64
	if err := db.bolt.View(func(tx *bolt.Tx) error { used = tx.Size(); return nil }); err != nil {
		t.Fatal(err)
	}
	_ = db.Close()
	data, _ := os.ReadFile(path)
	data[branchPageWithKeys(t, data)+idLen-1] ^= 0x07
	if err := os.WriteFile(path, data, 0o600); err != nil {
		t.Fatal(err)
	}
	if db, err := Open(path, Options{ReadOnly: true, OpenWalkMaxBytes: used}); err == nil {
		_ = db.Close()
		t.Error("a file with its pages in use at the limit was not walked")
	}
	db, err = Open(path, Options{ReadOnly: true, OpenWalkMaxBytes: used - 1})
	if err != nil {
		t.Fatalf("a file over the limit was walked: %v", err)
	}
	_ = db.Close()
}
