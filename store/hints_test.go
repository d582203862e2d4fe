package store_test

import (
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// Hint times are kept per user and hint, survive a commit, and go with the
// user when the user is deleted.
func TestHintShown(t *testing.T) {
	db := openTemp(t)
	update(t, db, func(tx *store.Tx) error {
		if err := tx.PutUser(record.User{ID: "U1"}); err != nil {
			return err
		}
		if err := tx.MarkHintShown("U1", "a", base); err != nil {
			return err
		}
		if err := tx.MarkHintShown("U1", "b", base.Add(time.Hour)); err != nil {
			return err
		}
		return tx.MarkHintShown("U10", "a", base.Add(2*time.Hour))
	})
	view(t, db, func(tx *store.Tx) error {
		at, ok, err := tx.HintShown("U1", "a")
		if !ok || !at.Equal(base) || err != nil {
			t.Errorf("U1/a: %v %v %v", at, ok, err)
		}
		if _, ok, _ := tx.HintShown("U1", "c"); ok {
			t.Error("a hint never shown reads as shown")
		}
		return nil
	})
	update(t, db, func(tx *store.Tx) error { return tx.DeleteUser("U1") })
	view(t, db, func(tx *store.Tx) error {
		for _, h := range []string{"a", "b"} {
			if _, ok, _ := tx.HintShown("U1", h); ok {
				t.Errorf("U1/%s kept after the user was deleted", h)
			}
		}
		if _, ok, _ := tx.HintShown("U10", "a"); !ok {
			t.Error("U10's hint went with U1's (prefix match)")
		}
		return nil
	})
	update(t, db, func(tx *store.Tx) error {
		if err := tx.MarkHintShown("U1", "", base); err == nil {
			t.Error("empty hint name accepted")
		}
		return nil
	})
}
