// Package inboxstore presents the bbolt store's inbox bucket to the Slack
// front end as its durable inbox (slackfront.Inbox). It holds no logic of
// its own.
package inboxstore

import (
	"context"
	"errors"
	"fmt"
	"time"

	"github.com/lathmark-team/lathmark/internal/slackfront"
	"github.com/lathmark-team/lathmark/store"
)

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
