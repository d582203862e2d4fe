// Package botstore joins the command engine to the bbolt store: it adapts
// store.DB, whose transactions are *store.Tx, to the bot.Store interface,
// whose transactions are bot.Tx. It holds no logic of its own.
package botstore

import (
	"context"

	"github.com/clearbot-team/clearbot/bot"
	"github.com/clearbot-team/clearbot/store"
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
