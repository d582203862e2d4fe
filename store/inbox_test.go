package store

import (
	"bytes"
	"context"
	"errors"
	"log/slog"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

func openInboxDB(t *testing.T) (*DB, string) {
	t.Helper()
	path := filepath.Join(t.TempDir(), "data.db")
	db, err := Open(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { _ = db.Close() })
	return db, path
}

// The bound: the limit-th entry is kept, the next is refused and nothing
// of it is stored; a delete makes room again.
func TestInboxBound(t *testing.T) {
	ctx := context.Background()
	db, _ := openInboxDB(t)
	t0 := time.Date(2026, 5, 1, 10, 0, 0, 0, time.UTC)
	const limit = 5
	var ids []string
	for i := range limit {
		id := db.NewInboxID(t0.Add(time.Duration(i) * time.Second))
		ids = append(ids, id)
		if err := db.InboxPut(ctx, InboxEntry{ID: id, Key: "k" + id, At: t0, Payload: []byte("p")}, limit); err != nil {
			t.Fatalf("put %d: %v", i, err)
		}
	}
	extra := db.NewInboxID(t0.Add(time.Minute))
	err := db.InboxPut(ctx, InboxEntry{ID: extra, Key: "extra", At: t0}, limit)
	if !errors.Is(err, ErrInboxFull) {
		t.Fatalf("put past the bound: got %v, want ErrInboxFull", err)
	}
	if n, _ := db.InboxLen(ctx); n != limit {
		t.Fatalf("len after refusal = %d, want %d", n, limit)
	}
	// Putting an id already there does not count twice.
	if err := db.InboxPut(ctx, InboxEntry{ID: ids[0], Key: "again", At: t0}, limit); err != nil {
		t.Fatalf("re-put of a stored id: %v", err)
	}
	if err := db.InboxDelete(ctx, ids[2]); err != nil {
		t.Fatal(err)
	}
	if err := db.InboxDelete(ctx, ids[2]); err != nil {
		t.Fatalf("second delete of the same id: %v", err)
	}
	if n, _ := db.InboxLen(ctx); n != limit-1 {
		t.Fatalf("len after delete = %d, want %d", n, limit-1)
	}
	if err := db.InboxPut(ctx, InboxEntry{ID: extra, Key: "extra", At: t0}, limit); err != nil {
		t.Fatalf("put after a delete made room: %v", err)
	}
}

// Entries come back oldest first whatever order they were put in, with
// their payload intact, also after the file is closed and opened again
// (the recovery order at start).
func TestInboxOrderAndRecovery(t *testing.T) {
	ctx := context.Background()
	db, path := openInboxDB(t)
	t0 := time.Date(2026, 5, 1, 10, 0, 0, 0, time.UTC)
	offsets := []int{7, 2, 9, 0, 5}
	for _, s := range offsets {
		at := t0.Add(time.Duration(s) * time.Second)
		id := db.NewInboxID(at)
		if err := db.InboxPut(ctx, InboxEntry{ID: id, Key: at.Format(time.TimeOnly), At: at, Payload: []byte{byte(s)}}, 0); err != nil {
			t.Fatal(err)
		}
	}
	if err := db.Close(); err != nil {
		t.Fatal(err)
	}
	db2, err := Open(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer db2.Close()
	es, err := db2.InboxEntries(ctx)
	if err != nil {
		t.Fatal(err)
	}
	want := []int{0, 2, 5, 7, 9}
	if len(es) != len(want) {
		t.Fatalf("got %d entries, want %d", len(es), len(want))
	}
	for i, e := range es {
		if !bytes.Equal(e.Payload, []byte{byte(want[i])}) || !e.At.Equal(t0.Add(time.Duration(want[i])*time.Second)) {
			t.Errorf("entry %d: payload %v at %s, want %d s", i, e.Payload, e.At, want[i])
		}
	}
	// Entries received in the same nanosecond stay in the order of their ids.
	a, b := db2.NewInboxID(t0), db2.NewInboxID(t0)
	if a >= b {
		t.Errorf("ids of one instant are not increasing: %s, %s", a, b)
	}
}

// DeleteInbox inside a command's transaction commits with the command's
// writes, and a failed command keeps the entry.
func TestInboxDeleteInSameTx(t *testing.T) {
	ctx := context.Background()
	db, _ := openInboxDB(t)
	at := time.Date(2026, 5, 1, 10, 0, 0, 0, time.UTC)
	id := db.NewInboxID(at)
	if err := db.InboxPut(ctx, InboxEntry{ID: id, Key: "cmd:1", At: at}, 0); err != nil {
		t.Fatal(err)
	}
	boom := errors.New("command failed")
	err := db.Update(ctx, func(tx *Tx) error {
		if err := tx.MarkSeen("cmd:1", at); err != nil {
			return err
		}
		if err := tx.DeleteInbox(id); err != nil {
			return err
		}
		return boom
	})
	if !errors.Is(err, boom) {
		t.Fatal(err)
	}
	if n, _ := db.InboxLen(ctx); n != 1 {
		t.Fatalf("rolled-back command removed the entry: len %d", n)
	}
	err = db.Update(ctx, func(tx *Tx) error {
		if err := tx.MarkSeen("cmd:1", at); err != nil {
			return err
		}
		return tx.DeleteInbox(id)
	})
	if err != nil {
		t.Fatal(err)
	}
	var seen bool
	_ = db.View(ctx, func(tx *Tx) error { seen, err = tx.Seen("cmd:1"); return err })
	es, _ := db.InboxEntries(ctx)
	if !seen || len(es) != 0 {
		t.Fatalf("after commit: seen %v, entries %d; want true, 0", seen, len(es))
	}
}

// An existing data file readable by others is set to 0600 at open, with a
// warning.
func TestOpenTightensMode(t *testing.T) {
	path := filepath.Join(t.TempDir(), "data.db")
	db, err := Open(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	db.Close()
	if err := os.Chmod(path, 0o644); err != nil {
		t.Fatal(err)
	}
	var logBuf bytes.Buffer
	db, err = Open(path, Options{Logger: slog.New(slog.NewTextHandler(&logBuf, nil))})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	fi, _ := os.Stat(path)
	if fi.Mode().Perm() != 0o600 {
		t.Errorf("mode after open = %04o, want 0600", fi.Mode().Perm())
	}
	if !strings.Contains(logBuf.String(), "readable by others") {
		t.Errorf("no warning logged: %q", logBuf.String())
	}
}

// Check reports an inbox whose count has drifted from its entries (the
// bound would then refuse too early or too late).
func TestCheckInboxCount(t *testing.T) {
	ctx := context.Background()
	db, _ := openInboxDB(t)
	at := time.Date(2026, 5, 1, 10, 0, 0, 0, time.UTC)
	for range 3 {
		if err := db.InboxPut(ctx, InboxEntry{ID: db.NewInboxID(at), Key: "k", At: at}, 0); err != nil {
			t.Fatal(err)
		}
	}
	if err := db.Check(); err != nil {
		t.Fatalf("a sound inbox: %v", err)
	}
	if err := db.Update(ctx, func(tx *Tx) error {
		b, err := tx.bucket(bucketInbox)
		if err != nil {
			return err
		}
		return b.SetSequence(7)
	}); err != nil {
		t.Fatal(err)
	}
	if err := db.Check(); err == nil || !strings.Contains(err.Error(), "inbox counts 7 entries") {
		t.Fatalf("a drifted count: %v", err)
	}
}
