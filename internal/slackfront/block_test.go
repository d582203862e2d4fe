package slackfront

import (
	"context"
	"net/http"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/botstore"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// engineFront is the real engine over a temporary data file, for tests
// that follow a message all the way to the store. U0HEAD is a head coach.
func engineFront(t *testing.T) (*bot.Engine, *store.DB) {
	t.Helper()
	db, err := store.Open(filepath.Join(t.TempDir(), "lathmark.db"), store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() {
		if err := db.Check(); err != nil {
			t.Errorf("store invariants: %v", err)
		}
		_ = db.Close()
	})
	e, err := bot.New(bot.Config{Store: botstore.New(db), HeadCoaches: []string{"U0HEAD"}})
	if err != nil {
		t.Fatal(err)
	}
	return e, db
}

// storedAttempts counts an athlete's stored attempts.
func storedAttempts(t *testing.T, db *store.DB, name string) []record.Attempt {
	t.Helper()
	var out []record.Attempt
	err := db.View(context.Background(), func(tx *store.Tx) error {
		a, ok, err := tx.AthleteByName(name)
		if err != nil || !ok {
			return err
		}
		return tx.Attempts(a.ID, time.Unix(0, 0), time.Now().Add(48*time.Hour), func(at record.Attempt) error {
			out = append(out, at)
			return nil
		})
	})
	if err != nil {
		t.Fatal(err)
	}
	return out
}

// TestSlackPastedBlockFiveLines: a direct message of five lines, the
// third one bad, reaches the engine as one request with its line breaks,
// runs the four good lines (6 attempts by the notation: 1.60 o, 1.65 xo,
// 1.70 xxo) and is answered by one message that names line 3 with an
// example. The same event delivered again runs nothing twice.
func TestSlackPastedBlockFiveLines(t *testing.T) {
	fs := newFakeSlack(t)
	client := newClient(t)
	e, db := engineFront(t)
	_, addr, _ := httpFront(t, fs, e, botstore.Dedup{DB: db}, func(c *Config) { c.Workers = 1 })
	text := "athlete add Ana height 1.70 sex f\n" +
		"log Ana 1.60 o 1.65 xo\n" +
		"log Ana 1.70 q\n" +
		"log Ana 1.70 xxo\n" +
		"history Ana"
	body := dmEvent("Ev-block", "D0HEAD", "U0HEAD", text, "1700000050.000100", nil)
	if res := signedPost(t, client, addr+"/slack/events", "application/json", body, time.Now(), nil); res.StatusCode != 200 {
		t.Fatalf("status %d", res.StatusCode)
	}
	msgs := fs.waitCalls(t, "chat.postMessage", 1)
	got := blocksText(t, msgs[0])
	for _, want := range []string{"5 lines: 4 done, 1 not done", "3 ✗", "log Ana 1.70 q", `"q"`, "e.g.", "1 ✓", "5 ✓"} {
		if !strings.Contains(got, want) {
			t.Errorf("reply lacks %q:\n%s", want, got)
		}
	}
	if n := len(storedAttempts(t, db, "Ana")); n != 6 {
		t.Fatalf("stored %d attempts, want 6", n)
	}
	// Slack's retry of the same event (a new event id, same message).
	body = dmEvent("Ev-block-retry", "D0HEAD", "U0HEAD", text, "1700000050.000100", nil)
	signedPost(t, client, addr+"/slack/events", "application/json", body, time.Now(), http.Header{headerRetryNum: {"1"}, headerRetryWhy: {"http_timeout"}})
	time.Sleep(200 * time.Millisecond)
	if n := len(storedAttempts(t, db, "Ana")); n != 6 {
		t.Fatalf("after a re-delivery %d attempts, want 6", n)
	}
	if n := len(fs.callsOf("chat.postMessage")); n != 1 {
		t.Errorf("%d replies to one message, want 1", n)
	}
}
