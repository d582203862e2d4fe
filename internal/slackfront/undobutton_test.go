package slackfront

import (
	"net/url"
	"strings"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/internal/botstore"
)

// TestSlackUndoButtonActsOnItsLine: the Undo button under a logged line
// carries that line (drop #1); pressed by someone without the right it is
// refused, pressed by the head coach after a later line it removes exactly
// line #1, and the later line stays.
func TestSlackUndoButtonActsOnItsLine(t *testing.T) {
	fs := newFakeSlack(t)
	client := newClient(t)
	e, db := engineFront(t)
	_, addr, _ := httpFront(t, fs, e, botstore.Dedup{DB: db}, func(c *Config) { c.Workers = 1 })
	send := func(id, text, ts string) {
		body := dmEvent(id, "D0HEAD", "U0HEAD", text, ts, nil)
		if res := signedPost(t, client, addr+"/slack/events", "application/json", body, time.Now(), nil); res.StatusCode != 200 {
			t.Fatalf("status %d", res.StatusCode)
		}
	}
	send("Ev-1", "athlete add Ana height 1.70 sex f", "1700000050.000100")
	fs.waitCalls(t, "chat.postMessage", 1)
	send("Ev-2", "log Ana 1.60 o", "1700000051.000100")
	msgs := fs.waitCalls(t, "chat.postMessage", 2)
	if blocks := msgs[1].Form.Get("blocks"); !strings.Contains(blocks, `"value":"drop #1"`) {
		t.Fatalf("the Undo button does not carry its line:\n%s", blocks)
	}
	send("Ev-3", "log Ana 1.65 xo", "1700000052.000100")
	fs.waitCalls(t, "chat.postMessage", 3)
	press := func(user, trigger string) {
		form := url.Values{"payload": {string(blockActions(user, "D0HEAD", "1700000051.000200", "", trigger, ActionID+":0", "drop #1"))}}
		if res := signedPost(t, client, addr+"/slack/interactive", formType, []byte(form.Encode()), time.Now(), nil); res.StatusCode != 200 {
			t.Fatalf("status %d", res.StatusCode)
		}
	}
	press("U0NOBODY", "trig-1")
	time.Sleep(300 * time.Millisecond)
	if n := len(storedAttempts(t, db, "Ana")); n != 3 {
		t.Fatalf("a press without the right changed the log: %d attempts", n)
	}
	refused := false
	for _, c := range fs.posted() {
		if strings.Contains(blocksText(t, c), "needs the role") {
			refused = true
		}
	}
	if !refused {
		t.Error("the presser without the right was not told why")
	}
	press("U0HEAD", "trig-2")
	deadline := time.Now().Add(5 * time.Second)
	for len(storedAttempts(t, db, "Ana")) != 2 && time.Now().Before(deadline) {
		time.Sleep(20 * time.Millisecond)
	}
	as := storedAttempts(t, db, "Ana")
	if len(as) != 2 || as[0].BarM != 1.65 {
		t.Fatalf("after the press: %+v, want the later 1.65 xo only", as)
	}
}
