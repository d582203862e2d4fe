package slackfront

import (
	"context"
	"strings"
	"testing"
	"time"
)

// With the inbox full, socket mode acknowledges an event, a direct message
// and a button press and tells each sender "busy, nothing was done" where
// Slack lets the bot answer them (ephemeral in the channel, in the direct
// message, through the button's response_url); nothing runs.
func TestSocketInboxFullTellsSender(t *testing.T) {
	fs := newFakeSlack(t)
	h := &recHandler{}
	cfg := testConfig(fs, h, newMemDedup())
	cfg.SigningSecret = ""
	cfg.AppToken = testAppToken
	cfg.Users = staticUsers{}
	inbox := newMemInbox()
	inbox.limit = 1
	cfg.Inbox = inbox
	f, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	stop := running(t, f)
	defer stop()
	if _, err := inbox.Put(context.Background(), "other", time.Now(), []byte(`{}`)); err != nil {
		t.Fatal(err)
	}
	c := fs.ws.next(t)
	for _, e := range []map[string]any{
		envelope("env-b1", "events_api", mentionEvent("Ev-b1", "C0JUMPS", "U0KAI", "<@UBOT> log Kai 1.95 o", "1700000070.000100"), 0),
		envelope("env-b2", "events_api", dmEvent("Ev-b2", "D0KAI", "U0KAI", "best Kai", "1700000071.000100", nil), 0),
		envelope("env-b3", "interactive", blockActions("U0MIRA", "C0JUMPS", "1700000072.000100", "", "trig-b3", ActionID+":0", "history Kai 6w"), 0),
	} {
		if err := c.send(e); err != nil {
			t.Fatal(err)
		}
	}
	for _, id := range []string{"env-b1", "env-b2", "env-b3"} {
		waitFor(t, "ack of "+id, func() bool { return fs.ws.acked(id) == 1 })
	}
	// The button's response_url is Slack's own host, out of reach here, so
	// its answer falls back to an ephemeral message as every reply does.
	eph := fs.waitCalls(t, "chat.postEphemeral", 2)
	dm := fs.waitCalls(t, "chat.postMessage", 1)
	to := map[string]bool{}
	for _, call := range append(eph, dm...) {
		if text := blocksText(t, call); !strings.Contains(text, "nothing was done") {
			t.Errorf("the sender was not told: %s", call.Body)
		}
		to[call.Form.Get("channel")+"/"+call.Form.Get("user")] = true
	}
	for _, want := range []string{"C0JUMPS/U0KAI", "C0JUMPS/U0MIRA", "D0KAI/"} {
		if !to[want] {
			t.Errorf("no busy answer to %s; answers went to %v", want, to)
		}
	}
	if n := len(h.requests()); n != 0 {
		t.Fatalf("%d commands ran on a full inbox", n)
	}
}
