package bot_test

import (
	"context"
	"testing"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/store"
)

// A writing command deletes its stored delivery (Request.InboxID) in its
// own transaction; a refused command and a read-only one leave it for the
// front end to forget after the reply.
func TestCommandForgetsItsDelivery(t *testing.T) {
	e := newTestEngine(t)
	e.must("athlete add Kai height 1.86")
	ctx := context.Background()
	put := func(key string) string {
		id := e.DB.NewInboxID(e.now)
		if err := e.DB.InboxPut(ctx, store.InboxEntry{ID: id, Key: key, At: e.now}, 0); err != nil {
			t.Fatal(err)
		}
		return id
	}
	cases := []struct {
		line string
		gone bool
	}{
		{"log Kai 1.95 o", true},
		{"log Nobody 1.95 o", false}, // refused: nothing written, entry kept
		{"history Kai", false},       // read-only: no transaction of its own writes
	}
	for i, c := range cases {
		id := put(c.line)
		r := e.E.Handle(ctx, bot.Request{UserID: "U_HEAD", Text: c.line, Time: e.now, MessageID: "inbox-" + itoa(i), InboxID: id})
		es, err := e.DB.InboxEntries(ctx)
		if err != nil {
			t.Fatal(err)
		}
		present := false
		for _, en := range es {
			present = present || en.ID == id
		}
		if present == c.gone {
			t.Errorf("%q (%s): entry still there %v, want %v", c.line, r.Kind, present, !c.gone)
		}
		_ = e.DB.InboxDelete(ctx, id)
	}
}
