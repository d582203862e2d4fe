package slackfront

import (
	"context"
	"path/filepath"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/botstore"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// lateDir forwards to the front end's directory once it exists (the
// engine is built before the front end, as in cmd/lathmark).
type lateDir struct{ p atomic.Pointer[bot.Directory] }

func (d *lateDir) Members(ctx context.Context) ([]bot.Member, bool, error) {
	if p := d.p.Load(); p != nil {
		return (*p).Members(ctx)
	}
	return nil, false, nil
}

// TestSlackRoleByDisplayName: `role coach sam` typed in Slack resolves
// through users.list to the member whose display name is sam, and
// `role coach <@U0SAM>` (what Slack sends for a typed @sam) ends as the
// same user; bots and deactivated accounts are not candidates, and the
// member list is fetched once for the two name lookups (cached).
func TestSlackRoleByDisplayName(t *testing.T) {
	fs := newFakeSlack(t)
	fs.members = []map[string]any{
		{"id": "U0SAM", "name": "sam.o", "real_name": "Sam Okafor", "profile": map[string]any{"display_name": "sam"}},
		{"id": "U0BOT", "name": "sam", "is_bot": true, "profile": map[string]any{"display_name": "sam"}},
		{"id": "U0GONE", "name": "sam2", "deleted": true, "profile": map[string]any{"display_name": "sam"}},
		{"id": "U0HEAD", "name": "rui", "profile": map[string]any{"display_name": "Rui"}},
	}
	client := newClient(t)
	db, err := store.Open(filepath.Join(t.TempDir(), "lathmark.db"), store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { _ = db.Close() })
	dir := &lateDir{}
	e, err := bot.New(bot.Config{Store: botstore.New(db), HeadCoaches: []string{"U0HEAD"}, Directory: dir})
	if err != nil {
		t.Fatal(err)
	}
	f, addr, _ := httpFront(t, fs, e, botstore.Dedup{DB: db}, func(c *Config) { c.Workers = 1 })
	d := f.Directory()
	dir.p.Store(&d)
	for i, text := range []string{"role coach sam", "role coach <@U0SAM>", "role coach @sam"} {
		body := dmEvent("Ev-r"+string(rune('0'+i)), "D0HEAD", "U0HEAD", text, "17000000"+string(rune('7'+i))+"0.000100", nil)
		if res := signedPost(t, client, addr+"/slack/events", "application/json", body, time.Now(), nil); res.StatusCode != 200 {
			t.Fatalf("status %d", res.StatusCode)
		}
		msgs := fs.waitCalls(t, "chat.postMessage", i+1)
		if got := blocksText(t, msgs[i]); !strings.Contains(got, "U0SAM") || !strings.Contains(got, "is now a coach") {
			t.Errorf("%q answered:\n%s", text, got)
		}
	}
	var coaches []record.User
	if err := db.View(context.Background(), func(tx *store.Tx) error {
		us, err := tx.Users()
		for _, u := range us {
			if u.Role == record.RoleCoach {
				coaches = append(coaches, u)
			}
		}
		return err
	}); err != nil {
		t.Fatal(err)
	}
	if len(coaches) != 1 || coaches[0].ID != "U0SAM" || coaches[0].Name != "sam" {
		t.Errorf("coaches %+v, want the one member U0SAM named sam", coaches)
	}
	if n := len(fs.callsOf("users.list")); n != 1 {
		t.Errorf("users.list called %d times, want 1 (cached)", n)
	}
}
