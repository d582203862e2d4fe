// Package botstore joins the command engine and the chat front ends to the
// bbolt store: it adapts store.DB, whose transactions are *store.Tx, to the
// bot.Store interface, whose transactions are bot.Tx, and to the front ends'
// record of handled deliveries and durable inbox. It holds no logic of its own.
package botstore

import (
	"context"
	"errors"
	"fmt"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/slackfront"
	"github.com/lathmark-team/lathmark/store"
)

// Adapter presents a store.DB as a bot.Store.
type Adapter struct{ DB *store.DB }

// New returns the adapter for db.
func New(db *store.DB) Adapter { return Adapter{DB: db} }

// View runs fn in one read-only transaction.
func (a Adapter) View(ctx context.Context, fn func(bot.Tx) error) error {
	return a.DB.View(ctx, func(tx *store.Tx) error { return fn(tx) })
}

// Update runs fn in one read-write transaction, committed only if fn returns nil.
func (a Adapter) Update(ctx context.Context, fn func(bot.Tx) error) error {
	return a.DB.Update(ctx, func(tx *store.Tx) error { return fn(tx) })
}

// Batch runs fn in a transaction shared with concurrent callers; fn may
// run more than once.
func (a Adapter) Batch(ctx context.Context, fn func(bot.Tx) error) error {
	return a.DB.Batch(ctx, func(tx *store.Tx) error { return fn(tx) })
}

// Dedup presents the store's record of handled message ids to a chat front
// end, so a delivery repeated after a restart is still recognised.
type Dedup struct {
	DB  *store.DB
	Now func() time.Time // nil means time.Now
}

// Seen reports whether id was handled before.
func (d Dedup) Seen(ctx context.Context, id string) (bool, error) {
	var seen bool
	err := d.DB.View(ctx, func(tx *store.Tx) error {
		var err error
		seen, err = tx.Seen(id)
		return err
	})
	return seen, err
}

// MarkSeen records id as handled. An id already recorded (a writing
// command records its message id in its own transaction) costs one read
// and no commit.
func (d Dedup) MarkSeen(ctx context.Context, id string) error {
	if seen, err := d.Seen(ctx, id); err == nil && seen {
		return nil
	}
	now := time.Now
	if d.Now != nil {
		now = d.Now
	}
	return d.DB.Update(ctx, func(tx *store.Tx) error { return tx.MarkSeen(id, now()) })
}

// Inbox presents the store's inbox bucket to a chat front end: every
// delivery is put there before it is acknowledged, through the group
// commit, and bounded by Limit entries.
type Inbox struct {
	DB    *store.DB
	Limit int // most entries waiting; 0 means no bound
}

// Put stores one delivery and returns its id once it is on disk. A full
// inbox gives an error matching slackfront.ErrInboxFull.
func (i Inbox) Put(ctx context.Context, key string, at time.Time, payload []byte) (string, error) {
	id := i.DB.NewInboxID(at)
	err := i.DB.InboxPut(ctx, store.InboxEntry{ID: id, Key: key, At: at, Payload: payload}, i.Limit)
	if errors.Is(err, store.ErrInboxFull) {
		return "", fmt.Errorf("%w: %w", slackfront.ErrInboxFull, err)
	}
	if err != nil {
		return "", err
	}
	return id, nil
}

// Pending lists the stored deliveries, oldest first.
func (i Inbox) Pending(ctx context.Context) ([]slackfront.Stored, error) {
	es, err := i.DB.InboxEntries(ctx)
	if err != nil {
		return nil, err
	}
	out := make([]slackfront.Stored, len(es))
	for j, e := range es {
		out[j] = slackfront.Stored{ID: e.ID, Key: e.Key, At: e.At, Payload: e.Payload}
	}
	return out, nil
}

// Done forgets a delivery; one already gone costs no commit.
func (i Inbox) Done(ctx context.Context, id string) error {
	return i.DB.InboxDelete(ctx, id)
}
