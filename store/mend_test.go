package store_test

import (
	"context"
	"encoding/binary"
	"errors"
	"os"
	"path/filepath"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// mendFile writes a data file with five athletes, one commit each, and
// returns its path and page size.
func mendFile(t *testing.T) (string, int64) {
	t.Helper()
	path := tempPath(t)
	db, err := store.Open(path, store.Options{Timeout: testTimeout})
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range []string{"Ada", "Bea", "Cai", "Dov", "Eli"} {
		addAthlete(t, db, n)
	}
	if err := db.Close(); err != nil {
		t.Fatal(err)
	}
	return path, int64(os.Getpagesize())
}

// metaTxID reads the commit id of meta page k: bbolt's meta layout (page
// header 16 bytes, then magic, version, page size, flags, root, sequence,
// freelist, pgid, txid), go.etcd.io/bbolt internal/common/meta.go.
func metaTxID(t *testing.T, path string, pageSize int64, k int64) uint64 {
	t.Helper()
	buf := make([]byte, 8)
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer func() { _ = f.Close() }()
	if _, err := f.ReadAt(buf, k*pageSize+16+48); err != nil {
		t.Fatal(err)
	}
	return binary.NativeEndian.Uint64(buf)
}

// flipMetaChecksum flips one bit of meta page k's checksum, as a torn
// write or a bad block would leave it.
func flipMetaChecksum(t *testing.T, path string, pageSize int64, k int64) {
	t.Helper()
	f, err := os.OpenFile(path, os.O_RDWR, 0)
	if err != nil {
		t.Fatal(err)
	}
	defer func() { _ = f.Close() }()
	b := make([]byte, 1)
	off := k*pageSize + 16 + 56
	if _, err := f.ReadAt(b, off); err != nil {
		t.Fatal(err)
	}
	b[0] ^= 0x10
	if _, err := f.WriteAt(b, off); err != nil {
		t.Fatal(err)
	}
}

func athleteNames(t *testing.T, db *store.DB) []string {
	t.Helper()
	var names []string
	err := db.View(context.Background(), func(tx *store.Tx) error {
		as, err := tx.Athletes()
		for _, a := range as {
			names = append(names, a.Name)
		}
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	return names
}

// One damaged meta page, either one: Open refuses the file; MendMeta keeps
// a byte-for-byte copy, rebuilds the page, and the file opens, passes the
// full check and holds every athlete, or every athlete but the one added
// by the last commit when the damaged page was the newer one (bbolt writes
// the meta pages in turn, commit txid to page txid mod 2: its design
// notes, go.etcd.io/bbolt README "Caveats & Limitations" and db.go).
func TestMendOneDamagedMetaPage(t *testing.T) {
	for _, k := range []int64{0, 1} {
		t.Run("meta "+string(rune('0'+k)), func(t *testing.T) {
			path, ps := mendFile(t)
			newer := metaTxID(t, path, ps, k) > metaTxID(t, path, ps, 1-k)
			t.Logf("meta page %d newer: %v", k, newer)
			flipMetaChecksum(t, path, ps, k)
			if _, err := store.Open(path, store.Options{Timeout: testTimeout}); !errors.Is(err, store.ErrDamaged) {
				t.Fatalf("open of a file with meta page %d damaged: %v, want the damage error", k, err)
			}
			damaged := fileHash(t, path)
			cp := filepath.Join(t.TempDir(), "before-mend.db")
			rep, err := store.MendMeta(path, cp, time.Date(2026, 12, 3, 20, 0, 0, 0, time.UTC))
			if err != nil {
				t.Fatal(err)
			}
			if rep.Damaged != int(k) || rep.CopyPath != cp {
				t.Errorf("report %+v, want meta page %d and the copy %s", rep, k, cp)
			}
			if fileHash(t, cp) != damaged {
				t.Error("the copy is not the file as it was")
			}
			if err := store.Check(path); err != nil {
				t.Fatalf("check after the mend: %v", err)
			}
			db, err := store.Open(path, store.Options{Timeout: testTimeout})
			if err != nil {
				t.Fatalf("open after the mend: %v", err)
			}
			defer func() { _ = db.Close() }()
			want := 5
			if newer {
				want = 4 // the last commit (Eli) is what the damaged page described
			}
			if got := athleteNames(t, db); len(got) != want {
				t.Errorf("athletes after the mend %q, want %d (damaged page newer: %v)", got, want, newer)
			}
			var mends int
			if err := db.View(context.Background(), func(tx *store.Tx) error {
				return tx.AuditEntries(time.Unix(0, 0), func(e record.AuditEntry) error {
					if e.Action == "mend" {
						mends++
					}
					return nil
				})
			}); err != nil {
				t.Fatal(err)
			}
			if mends != 1 {
				t.Errorf("%d mend entries in the audit trail, want 1", mends)
			}
		})
	}
}

// MendMeta changes nothing and keeps no copy when there is nothing it can
// mend: both meta pages sound, or both damaged.
func TestMendRefuses(t *testing.T) {
	for _, tt := range []struct {
		name    string
		damage  []int64
		nothing bool
	}{
		{"both sound", nil, true},
		{"both damaged", []int64{0, 1}, false},
	} {
		t.Run(tt.name, func(t *testing.T) {
			path, ps := mendFile(t)
			for _, k := range tt.damage {
				flipMetaChecksum(t, path, ps, k)
			}
			before := fileHash(t, path)
			cp := filepath.Join(t.TempDir(), "before-mend.db")
			_, err := store.MendMeta(path, cp, time.Now())
			if err == nil {
				t.Fatal("mend succeeded")
			}
			if errors.Is(err, store.ErrNothingToMend) != true {
				t.Errorf("error %v, want ErrNothingToMend", err)
			}
			if !tt.nothing && !errors.Is(err, store.ErrDamaged) {
				t.Errorf("error %v, want the damage error too", err)
			}
			if fileHash(t, path) != before {
				t.Error("a refused mend changed the file")
			}
			if _, err := os.Stat(cp); !errors.Is(err, os.ErrNotExist) {
				t.Errorf("a refused mend left a copy: %v", err)
			}
		})
	}
}
