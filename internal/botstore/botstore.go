// Package botstore joins the command engine and the chat front ends to the
// bbolt store: it adapts store.DB, whose transactions are *store.Tx, to the
// bot.Store interface, whose transactions are bot.Tx, and to the front ends'
// record of handled deliveries. It holds no logic of its own. (The durable
// inbox's adapter is internal/inboxstore, apart so that the front end's
// tests can use this package.)
package botstore

import (
	"context"
	"time"

	"github.com/lathmark-team/lathmark/bot"
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
