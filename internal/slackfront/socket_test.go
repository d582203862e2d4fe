package slackfront

import (
	"encoding/json"
	"runtime"
	"strings"
	"testing"
	"time"
)

func socketFront(t *testing.T, fs *fakeSlack, h Handler, d Dedup) *Front {
	t.Helper()
	cfg := testConfig(fs, h, d)
	cfg.SigningSecret = ""
	cfg.AppToken = testAppToken
	cfg.Users = staticUsers{}
	f, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	if f.Mode() != ModeSocket {
		t.Fatalf("mode %v", f.Mode())
	}
	return f
}

func slashPayload(fs *fakeSlack, text, trigger string) []byte {
	b, _ := json.Marshal(map[string]any{
		"token": "unused", "team_id": "T0TEST", "team_domain": "harbourlane", "channel_id": "C0JUMPS",
		"channel_name": "jumps", "user_id": "U0KAI", "user_name": "kai", "command": "/lath", "text": text,
		"response_url": fs.url() + "hooks/commands/T0TEST/2/" + trigger, "trigger_id": trigger, "api_app_id": "A0TEST",
	})
	return b
}

// TestSocketModeEndToEnd: against slacktest with our own /ws, the bot acks
// an events_api, a slash_commands and an interactive envelope, answers each
// (chat.postMessage, the response_url), reconnects after a disconnect
// frame without losing or repeating a command, and stops without leaving a
// goroutine behind.
func TestSocketModeEndToEnd(t *testing.T) {
	fs := newFakeSlack(t)
	base := runtime.NumGoroutine()
	h := &recHandler{}
	f := socketFront(t, fs, h, newMemDedup())
	stop := running(t, f)
	ws := fs.ws

	c1 := ws.next(t)
	mention := mentionEvent("Ev-s1", "C0JUMPS", "U0KAI", "<@UBOT> log Kai 1.95 o", "1700000050.000100")
	if err := c1.send(envelope("env-1", "events_api", mention, 0)); err != nil {
		t.Fatal(err)
	}
	if err := c1.send(envelope("env-2", "slash_commands", slashPayload(fs, "best Kai", "trig-s2"), 0)); err != nil {
		t.Fatal(err)
	}
	if err := c1.send(envelope("env-3", "interactive", blockActions("U0MIRA", "C0JUMPS", "1700000051.000100", "1700000050.000100", "trig-s3", ActionID+":1", "history Kai 6w"), 0)); err != nil {
		t.Fatal(err)
	}
	for _, id := range []string{"env-1", "env-2", "env-3"} {
		waitFor(t, "ack of "+id, func() bool { return ws.acked(id) == 1 })
	}
	msgs := fs.waitCalls(t, "chat.postMessage", 2)
	hooks := fs.waitCalls(t, "response_url", 1)
	threads := map[string]bool{}
	for _, m := range msgs {
		if m.Form.Get("channel") != "C0JUMPS" {
			t.Fatalf("posted in %q", m.Form.Get("channel"))
		}
		threads[m.Form.Get("thread_ts")] = true
	}
	if !threads["1700000050.000100"] || len(threads) != 1 {
		t.Fatalf("replies in threads %v; both belong in the mention's thread", threads)
	}
	if !strings.Contains(blocksText(t, hooks[0]), "Done: best Kai") {
		t.Fatalf("slash reply %s", hooks[0].Body)
	}

	// A command sent just before Slack asks us to reconnect: its ack may be
	// lost with the old connection; Slack then sends it again on the new one.
	dm := dmEvent("Ev-s4", "D0KAI", "U0KAI", "log me 1.80 o", "1700000052.000100", nil)
	if err := c1.send(envelope("env-4", "events_api", dm, 0)); err != nil {
		t.Fatal(err)
	}
	if err := c1.send(map[string]any{"type": "disconnect", "reason": "refresh_requested", "debug_info": map[string]any{"host": "applink-test"}}); err != nil {
		t.Fatal(err)
	}
	c2 := ws.next(t)
	if ws.acked("env-4") == 0 {
		if err := c2.send(envelope("env-4", "events_api", dm, 1)); err != nil {
			t.Fatal(err)
		}
	}
	// And the same mention as env-1, re-delivered after the reconnect.
	if err := c2.send(envelope("env-1", "events_api", mention, 1)); err != nil {
		t.Fatal(err)
	}
	if err := c2.send(envelope("env-5", "events_api", mentionEvent("Ev-s5", "C0JUMPS", "U0KAI", "<@UBOT> athletes", "1700000053.000100"), 0)); err != nil {
		t.Fatal(err)
	}
	waitFor(t, "acks after reconnect", func() bool { return ws.acked("env-4") >= 1 && ws.acked("env-1") == 2 && ws.acked("env-5") == 1 })
	fs.waitCalls(t, "chat.postMessage", 4)
	if err := stop(); err != nil {
		t.Fatal(err)
	}

	var texts []string
	for _, r := range h.requests() {
		texts = append(texts, r.Text)
	}
	want := map[string]int{"log Kai 1.95 o": 1, "best Kai": 1, "history Kai 6w": 1, "log me 1.80 o": 1, "athletes": 1}
	got := map[string]int{}
	for _, s := range texts {
		got[s]++
	}
	for k, n := range want {
		if got[k] != n {
			t.Fatalf("handled %v; want each of %v once", texts, want)
		}
	}
	if len(texts) != len(want) {
		t.Fatalf("handled %v", texts)
	}
	for _, r := range h.requests() {
		if r.Text == "history Kai 6w" && r.UserID != "U0MIRA" {
			t.Fatalf("button ran as %s, want the presser", r.UserID)
		}
	}
	fs.mu.Lock()
	opens := fs.connections
	fs.mu.Unlock()
	if opens < 2 {
		t.Fatalf("apps.connections.open called %d times; want a reconnect", opens)
	}
	settleGoroutines(t, base)
}

// TestSocketModeFatalAuth: a refused app token stops Run with a message
// that names SLACK_APP_TOKEN, both when Slack says invalid_auth and when
// the token is of the wrong kind (which slack-go alone would retry forever).
func TestSocketModeFatalAuth(t *testing.T) {
	for _, code := range []string{"invalid_auth", "not_allowed_token_type"} {
		t.Run(code, func(t *testing.T) {
			fs := newFakeSlack(t)
			fs.failOpen = code
			base := runtime.NumGoroutine()
			f := socketFront(t, fs, &recHandler{}, newMemDedup())
			err := f.Run(t.Context())
			if err == nil || !strings.Contains(err.Error(), "SLACK_APP_TOKEN") || !strings.Contains(err.Error(), code) {
				t.Fatalf("Run = %v; want a fatal error naming SLACK_APP_TOKEN and %s", err, code)
			}
			settleGoroutines(t, base)
		})
	}
}

// TestSocketModeDeadLink: a connection on which Slack sends no ping is
// given up after PingInterval and a new one opened; commands on the new one
// are handled.
func TestSocketModeDeadLink(t *testing.T) {
	fs := newFakeSlack(t)
	fs.ws.mu.Lock()
	fs.ws.silent = true
	fs.ws.mu.Unlock()
	h := &recHandler{}
	f := socketFront(t, fs, h, newMemDedup())
	running(t, f)
	fs.ws.next(t) // silent: the client should drop it
	fs.ws.mu.Lock()
	fs.ws.silent = false
	fs.ws.mu.Unlock()
	c2 := fs.ws.next(t)
	if err := c2.send(envelope("env-d1", "events_api", dmEvent("Ev-d1", "D0KAI", "U0KAI", "best Kai", "1700000070.000100", nil), 0)); err != nil {
		t.Fatal(err)
	}
	fs.waitCalls(t, "chat.postMessage", 1)
	waitFor(t, "the ack", func() bool { return fs.ws.acked("env-d1") == 1 })
	if n := len(h.requests()); n != 1 {
		t.Fatalf("handled %d", n)
	}
}

// TestStartErrors: auth.test problems at start are clear errors, and a
// silent Slack does not hang the start.
func TestStartErrors(t *testing.T) {
	tests := []struct {
		name string
		set  func(*fakeSlack)
		want string
	}{
		{"refused bot token", func(fs *fakeSlack) { fs.authErr = "invalid_auth" }, "SLACK_BOT_TOKEN"},
		{"no answer", func(fs *fakeSlack) { fs.authHang = true }, "did not answer"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			fs := newFakeSlack(t)
			tt.set(fs)
			cfg := testConfig(fs, &recHandler{}, newMemDedup())
			cfg.HTTPAddr = "127.0.0.1:0"
			cfg.StartTimeout = 200 * time.Millisecond
			f, err := New(cfg)
			if err != nil {
				t.Fatal(err)
			}
			err = f.Run(t.Context())
			if err == nil || !strings.Contains(err.Error(), tt.want) {
				t.Fatalf("Run = %v; want an error containing %q", err, tt.want)
			}
		})
	}
}

// TestConfigErrors: New refuses configurations that cannot work, naming
// what to set.
func TestConfigErrors(t *testing.T) {
	h, d := &recHandler{}, newMemDedup()
	tests := []struct {
		name string
		cfg  Config
		want string
	}{
		{"no bot token", Config{AppToken: testAppToken, Handler: h, Dedup: d}, "SLACK_BOT_TOKEN is not set"},
		{"user token", Config{BotToken: "xoxp-1", AppToken: testAppToken, Handler: h, Dedup: d}, "xoxb-"},
		{"no way in", Config{BotToken: testBotToken, Handler: h, Dedup: d}, "SLACK_APP_TOKEN"},
		{"bot token as app token", Config{BotToken: testBotToken, AppToken: testBotToken, Handler: h, Dedup: d}, "xapp-"},
		{"http without secret", Config{BotToken: testBotToken, HTTPAddr: ":0", Handler: h, Dedup: d}, "SLACK_SIGNING_SECRET"},
		{"bad api url", Config{BotToken: testBotToken, AppToken: testAppToken, APIURL: "ftp://x", Handler: h, Dedup: d}, "SLACK_API_URL"},
		{"no handler", Config{BotToken: testBotToken, AppToken: testAppToken, Dedup: d}, "no Handler"},
		{"no dedup", Config{BotToken: testBotToken, AppToken: testAppToken, Handler: h}, "no Dedup"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := New(tt.cfg)
			if err == nil || !strings.Contains(err.Error(), tt.want) {
				t.Fatalf("New = %v; want an error containing %q", err, tt.want)
			}
		})
	}
	// Both set: --http wins.
	f, err := New(Config{BotToken: testBotToken, AppToken: testAppToken, HTTPAddr: ":0", SigningSecret: "s", Handler: h, Dedup: d})
	if err != nil || f.Mode() != ModeHTTP {
		t.Fatalf("mode %v, err %v", f.Mode(), err)
	}
}
