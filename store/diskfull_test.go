package store_test

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// TestDiskFull fills a small file system until a commit fails: the error
// matches ErrDiskFull (ENOSPC from bbolt's write or sync), every write
// acknowledged before it is still there, the refused one left no trace,
// and the file passes its check after reopening. It needs a directory on a
// small file system of its own, named by LATHMARK_SMALL_FS_DIR (as root:
// mount -t tmpfs -o size=256k tmpfs /tmp/lmfull); without one it is skipped.
func TestDiskFull(t *testing.T) {
	dir := os.Getenv("LATHMARK_SMALL_FS_DIR")
	if dir == "" {
		t.Skip("LATHMARK_SMALL_FS_DIR not set: no small file system to fill")
	}
	path := filepath.Join(dir, fmt.Sprintf("full-%d.db", os.Getpid()))
	defer func() { _ = os.Remove(path) }()
	db, err := store.Open(path, store.Options{Timeout: testTimeout, InitialMmapSize: 1 << 20})
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	notes := strings.Repeat("n", 3000)
	var acked []string
	var fullErr error
	for i := 0; i < 10000 && fullErr == nil; i++ {
		name := fmt.Sprintf("Full%04d", i)
		err := db.Update(ctx, func(tx *store.Tx) error {
			return tx.PutAthlete(&record.Athlete{Name: name, Notes: notes, Created: base})
		})
		switch {
		case err == nil:
			acked = append(acked, name)
		case errors.Is(err, store.ErrDiskFull):
			fullErr = err
		default:
			t.Fatalf("write %d: %v, want success or ErrDiskFull", i, err)
		}
	}
	if fullErr == nil {
		t.Fatal("the file system never filled")
	}
	t.Logf("%d writes acknowledged, then: %v", len(acked), fullErr)
	if err := db.Close(); err != nil {
		t.Fatal(err)
	}
	db, err = store.Open(path, store.Options{Timeout: testTimeout, ReadOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	defer func() { _ = db.Close() }()
	if err := db.Check(); err != nil {
		t.Errorf("check after the disk filled: %v", err)
	}
	view(t, db, func(tx *store.Tx) error {
		as, err := tx.Athletes()
		if err != nil {
			return err
		}
		if len(as) != len(acked) {
			t.Errorf("%d athletes stored, %d acknowledged", len(as), len(acked))
		}
		return nil
	})
}
