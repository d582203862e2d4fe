package store

import (
	"context"
	"encoding/binary"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"time"

	bolt "go.etcd.io/bbolt"
)

// The inbox bucket holds chat deliveries that were acknowledged but not yet
// run: key UnixNano(8) + process counter(8), big-endian, so a cursor walks
// them oldest first; value JSON inboxValue. The bucket's sequence is the
// number of entries, kept in step by every put and delete, so the bound is
// checked without a scan. The bucket is created at the first read-write
// open that lacks it (older files simply have no pending deliveries).
const bucketInbox = "inbox"

// ErrInboxFull is matched by the error InboxPut returns when the inbox
// already holds its bound: the caller answers "busy" and nothing is kept.
var ErrInboxFull = errors.New("inbox is full")

// InboxEntry is one acknowledged delivery waiting to be run.
type InboxEntry struct {
	ID      string    // the store's key, hex; give it to DeleteInbox
	Key     string    // the delivery key (the dedupe key of the request)
	At      time.Time // when it was received (UTC)
	Payload []byte    // what the front end needs to run it again
}

type inboxValue struct {
	Key     string    `json:"key"`
	At      time.Time `json:"at"`
	Payload []byte    `json:"payload"`
}

// ensureInbox creates the inbox bucket on a read-write file that lacks it.
func (db *DB) ensureInbox() error {
	if db.readOnly {
		return nil
	}
	return db.bolt.Update(func(tx *bolt.Tx) error {
		_, err := tx.CreateBucketIfNotExists([]byte(bucketInbox))
		return err
	})
}

// NewInboxID returns a fresh inbox key for a delivery received at at:
// ordered by time, unique within the process by a counter.
func (db *DB) NewInboxID(at time.Time) string {
	var k [16]byte
	binary.BigEndian.PutUint64(k[:8], uint64(at.UnixNano()))
	binary.BigEndian.PutUint64(k[8:], db.inboxSeq.Add(1))
	return hex.EncodeToString(k[:])
}

// InboxPut stores e under e.ID (from NewInboxID) through the group commit
// (Batch), so concurrent deliveries share one fsync, and returns once it is
// on disk. With limit > 0 and the inbox already holding limit entries it
// stores nothing and returns ErrInboxFull. Putting the same ID twice keeps
// one entry.
func (db *DB) InboxPut(ctx context.Context, e InboxEntry, limit int) error {
	key, err := hex.DecodeString(e.ID)
	if err != nil || len(key) != 16 {
		return fmt.Errorf("store: inbox put: bad id %q", e.ID)
	}
	data, err := json.Marshal(inboxValue{Key: e.Key, At: e.At.UTC(), Payload: e.Payload})
	if err != nil {
		return fmt.Errorf("store: inbox put: encode: %w", err)
	}
	return db.Batch(ctx, func(t *Tx) error {
		b, err := t.bucket(bucketInbox)
		if err != nil {
			return fmt.Errorf("store: inbox put: %w", err)
		}
		if b.Get(key) != nil {
			return nil
		}
		n := b.Sequence()
		if limit > 0 && n >= uint64(limit) {
			return fmt.Errorf("store: inbox put: %d entries waiting: %w", n, ErrInboxFull)
		}
		if err := putValue(b, key, data); err != nil {
			return fmt.Errorf("store: inbox put: %w", err)
		}
		return b.SetSequence(n + 1)
	})
}

// DeleteInbox removes an inbox entry inside the caller's transaction (the
// one that holds the command's own writes, so that running a delivery and
// forgetting it commit together). A missing id is not an error.
func (t *Tx) DeleteInbox(id string) error {
	key, err := hex.DecodeString(id)
	if err != nil || len(key) != 16 {
		return fmt.Errorf("store: inbox delete: bad id %q", id)
	}
	b, err := t.bucket(bucketInbox)
	if err != nil {
		return fmt.Errorf("store: inbox delete: %w", err)
	}
	if b.Get(key) == nil {
		return nil
	}
	if err := b.Delete(key); err != nil {
		return fmt.Errorf("store: inbox delete: %w", err)
	}
	if n := b.Sequence(); n > 0 {
		return b.SetSequence(n - 1)
	}
	return nil
}

// InboxDelete removes an inbox entry in a transaction of its own (for a
// delivery that wrote nothing). An entry already gone (a writing command
// deleted it in its own transaction) costs one read and no commit.
func (db *DB) InboxDelete(ctx context.Context, id string) error {
	key, err := hex.DecodeString(id)
	if err != nil || len(key) != 16 {
		return fmt.Errorf("store: inbox delete: bad id %q", id)
	}
	var present bool
	err = db.View(ctx, func(t *Tx) error {
		b, err := t.bucket(bucketInbox)
		if err != nil {
			return fmt.Errorf("store: inbox delete: %w", err)
		}
		present = b.Get(key) != nil
		return nil
	})
	if err != nil || !present {
		return err
	}
	return db.Update(ctx, func(t *Tx) error { return t.DeleteInbox(id) })
}

// InboxLen returns how many entries wait.
func (db *DB) InboxLen(ctx context.Context) (int, error) {
	var n int
	err := db.View(ctx, func(t *Tx) error {
		b, err := t.bucket(bucketInbox)
		if err != nil {
			return fmt.Errorf("store: inbox: %w", err)
		}
		n = int(b.Sequence())
		return nil
	})
	return n, err
}

// InboxEntries returns every waiting entry, oldest first.
func (db *DB) InboxEntries(ctx context.Context) ([]InboxEntry, error) {
	var out []InboxEntry
	err := db.View(ctx, func(t *Tx) error {
		b, err := t.bucket(bucketInbox)
		if err != nil {
			return fmt.Errorf("store: inbox: %w", err)
		}
		return b.ForEach(func(k, v []byte) error {
			var iv inboxValue
			if err := decodeJSON(k, v, &iv); err != nil {
				return fmt.Errorf("store: inbox entry %x: %w", k, err)
			}
			out = append(out, InboxEntry{ID: hex.EncodeToString(k), Key: iv.Key, At: iv.At, Payload: iv.Payload})
			return nil
		})
	})
	return out, err
}

// inboxInvariants checks the inbox bucket, when there is one: 16-byte
// keys, values that decode, and a sequence equal to the number of entries
// (the bound is checked against it).
func inboxInvariants(tx *bolt.Tx, p *problemList) {
	b := tx.Bucket([]byte(bucketInbox))
	if b == nil {
		return
	}
	var n uint64
	_ = b.ForEach(func(k, v []byte) error {
		n++
		if len(k) != 16 {
			p.add("inbox key %x is %d bytes, want 16", k, len(k))
		}
		var iv inboxValue
		if err := decodeJSON(k, v, &iv); err != nil {
			p.add("inbox entry %x: %v", k, err)
		}
		return nil
	})
	if seq := b.Sequence(); seq != n {
		p.add("inbox counts %d entries in its sequence but holds %d", seq, n)
	}
}
