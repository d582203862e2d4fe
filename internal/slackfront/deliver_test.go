package slackfront

import (
	"bytes"
	"encoding/json"
	"errors"
	"image"
	"image/color"
	"image/png"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/slack-go/slack"

	"github.com/lathmark-team/lathmark/bot"
)

// posterFront is a front end that is never Run: PostReply needs no
// connection of its own.
func posterFront(t *testing.T, fs *fakeSlack, mut func(*Config)) *Front {
	t.Helper()
	cfg := testConfig(fs, &recHandler{}, newMemDedup())
	cfg.HTTPAddr = "127.0.0.1:0"
	if mut != nil {
		mut(&cfg)
	}
	f, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	return f
}

func testPNG(t *testing.T) []byte {
	img := image.NewRGBA(image.Rect(0, 0, 4, 3))
	img.Set(1, 1, color.RGBA{R: 200, A: 255})
	var b bytes.Buffer
	if err := png.Encode(&b, img); err != nil {
		t.Fatal(err)
	}
	return b.Bytes()
}

// TestUploadPNG sends a chart through the external upload flow against a
// fake that serves the upload URL itself: files.getUploadURLExternal gets
// the name and size, the bytes arrive intact, and
// files.completeUploadExternal shares the file in the channel and thread.
func TestUploadPNG(t *testing.T) {
	fs := newFakeSlack(t)
	f := posterFront(t, fs, nil)
	data := testPNG(t)
	r := bot.Reply{Title: "Week 48", Files: []bot.File{{Name: "digest-2026-W48.png", MIME: "image/png", Title: "Clearances, week 48", Data: data}}}
	if err := f.PostReply(t.Context(), "C0JUMPS", "1700000060.000100", r); err != nil {
		t.Fatal(err)
	}
	get := fs.callsOf("files.getUploadURLExternal")
	if len(get) != 1 || get[0].Form.Get("filename") != "digest-2026-W48.png" || get[0].Form.Get("length") != strconv.Itoa(len(data)) ||
		get[0].Form.Get("alt_txt") != "Clearances, week 48" {
		t.Fatalf("getUploadURLExternal %v", get)
	}
	up := fs.callsOf("upload")
	if len(up) != 1 || !bytes.Equal(up[0].File, data) {
		t.Fatalf("upload got %d calls, bytes equal: %v", len(up), len(up) == 1 && bytes.Equal(up[0].File, data))
	}
	if _, err := png.Decode(bytes.NewReader(up[0].File)); err != nil {
		t.Fatalf("uploaded bytes are not a PNG: %v", err)
	}
	done := fs.callsOf("files.completeUploadExternal")
	if len(done) != 1 {
		t.Fatalf("%d completeUploadExternal calls", len(done))
	}
	var files []map[string]any
	if err := json.Unmarshal([]byte(done[0].Form.Get("files")), &files); err != nil {
		t.Fatal(err)
	}
	if len(files) != 1 || files[0]["id"] != "F0TEST" || files[0]["title"] != "Clearances, week 48" ||
		done[0].Form.Get("channel_id") != "C0JUMPS" || done[0].Form.Get("thread_ts") != "1700000060.000100" {
		t.Fatalf("completeUploadExternal %v", done[0].Form)
	}
	if n := len(fs.callsOf("chat.postMessage")); n != 1 {
		t.Fatalf("%d messages besides the file", n)
	}
}

// TestDirectMessages: Reply.Direct opens a DM with each user and posts
// there; an ephemeral reply's files go to the asker's DM, not the channel.
func TestDirectMessages(t *testing.T) {
	fs := newFakeSlack(t)
	f := posterFront(t, fs, nil)
	r := bot.Reply{Title: "Digest posted", Direct: []bot.Direct{
		{UserID: "U0KAI", Reply: bot.Reply{Title: "Your week", Lines: []string{"Best 2.00 m"}}},
		{UserID: "U0MIRA", Reply: bot.Reply{Title: "Your week", Ephemeral: true}},
	}}
	if err := f.PostReply(t.Context(), "C0JUMPS", "", r); err != nil {
		t.Fatal(err)
	}
	opens := fs.callsOf("conversations.open")
	if len(opens) != 2 || opens[0].Form.Get("users") != "U0KAI" || opens[1].Form.Get("users") != "U0MIRA" {
		t.Fatalf("conversations.open %v", opens)
	}
	var channels []string
	for _, c := range fs.callsOf("chat.postMessage") {
		channels = append(channels, c.Form.Get("channel"))
	}
	if strings.Join(channels, ",") != "C0JUMPS,DU0KAI,DU0MIRA" {
		t.Fatalf("posted in %v", channels)
	}

	// An ephemeral answer to an asker in a channel, with a file.
	err := f.deliver(t.Context(), target{channel: "C0JUMPS", user: "U0KAI"},
		bot.Reply{Title: "Export", Ephemeral: true, Files: []bot.File{{Name: "kai.csv", MIME: "text/csv", Data: []byte("bar,result\n1.95,o\n")}}})
	if err != nil {
		t.Fatal(err)
	}
	if eph := fs.callsOf("chat.postEphemeral"); len(eph) != 1 || eph[0].Form.Get("user") != "U0KAI" {
		t.Fatalf("ephemeral %v", eph)
	}
	done := fs.callsOf("files.completeUploadExternal")
	if len(done) != 1 || done[0].Form.Get("channel_id") != "DU0KAI" {
		t.Fatalf("the private file went to %v", done)
	}
}

// TestRateLimitRetries: a 429 with Retry-After (whole seconds; slack-go
// v0.35 misc.go checkStatusCode turns it into *slack.RateLimitedError) is
// retried and succeeds; a post that stays limited fails after MaxAttempts
// with the RateLimitedError inside; a wait longer than MaxRetryWait is not
// waited for; the wait asked for is honoured.
func TestRateLimitRetries(t *testing.T) {
	t.Run("recovers", func(t *testing.T) {
		fs := newFakeSlack(t)
		fs.limited["chat.postMessage"] = 2
		f := posterFront(t, fs, nil)
		if err := f.PostReply(t.Context(), "C0JUMPS", "", bot.Reply{Title: "Digest"}); err != nil {
			t.Fatal(err)
		}
		if n := len(fs.callsOf("chat.postMessage")); n != 3 {
			t.Fatalf("%d attempts, want 3", n)
		}
	})
	t.Run("gives up", func(t *testing.T) {
		fs := newFakeSlack(t)
		fs.limited["chat.postMessage"] = 100
		f := posterFront(t, fs, func(c *Config) { c.MaxAttempts = 3 })
		err := f.PostReply(t.Context(), "C0JUMPS", "", bot.Reply{Title: "Digest"})
		var rl *slack.RateLimitedError
		if !errors.As(err, &rl) {
			t.Fatalf("err = %v, want a *slack.RateLimitedError inside", err)
		}
		if n := len(fs.callsOf("chat.postMessage")); n != 3 {
			t.Fatalf("%d attempts, want 3", n)
		}
	})
	t.Run("too long a wait", func(t *testing.T) {
		fs := newFakeSlack(t)
		fs.limited["chat.postMessage"] = 1
		fs.retryAfter = "120"
		f := posterFront(t, fs, func(c *Config) { c.MaxRetryWait = time.Second })
		start := time.Now()
		err := f.PostReply(t.Context(), "C0JUMPS", "", bot.Reply{Title: "Digest"})
		if err == nil || !strings.Contains(err.Error(), "longer than") {
			t.Fatalf("err = %v", err)
		}
		if time.Since(start) > 30*time.Second {
			t.Fatal("waited for the Retry-After it should have refused")
		}
		if n := len(fs.callsOf("chat.postMessage")); n != 1 {
			t.Fatalf("%d attempts, want 1", n)
		}
	})
	t.Run("honours Retry-After", func(t *testing.T) {
		fs := newFakeSlack(t)
		fs.limited["chat.postMessage"] = 1
		fs.retryAfter = "1"
		f := posterFront(t, fs, nil)
		start := time.Now()
		if err := f.PostReply(t.Context(), "C0JUMPS", "", bot.Reply{Title: "Digest"}); err != nil {
			t.Fatal(err)
		}
		if d := time.Since(start); d < time.Second {
			t.Fatalf("retried after %s, before the 1 s Slack asked for", d)
		}
	})
}

// TestUserCache: users.info answers are kept for the TTL, then asked again;
// the display name wins over the real name.
func TestUserCache(t *testing.T) {
	fs := newFakeSlack(t)
	fs.userNames["U0KAI"] = "Kai"
	clock := &fixedClock{t: time.Date(2026, 5, 2, 9, 0, 0, 0, time.UTC)}
	f := posterFront(t, fs, func(c *Config) { c.Clock = clock; c.UserTTL = time.Hour })
	ctx := t.Context()
	for range 3 {
		name, err := f.users.DisplayName(ctx, "U0KAI")
		if err != nil || name != "Kai" {
			t.Fatalf("name %q, err %v", name, err)
		}
	}
	if n := len(fs.callsOf("users.info")); n != 1 {
		t.Fatalf("%d users.info calls within the TTL", n)
	}
	clock.Add(61 * time.Minute)
	if _, err := f.users.DisplayName(ctx, "U0KAI"); err != nil {
		t.Fatal(err)
	}
	if n := len(fs.callsOf("users.info")); n != 2 {
		t.Fatalf("%d users.info calls after the TTL", n)
	}
	if name, _ := f.users.DisplayName(ctx, "U0MIRA"); name != "Real U0MIRA" {
		t.Fatalf("fallback to the real name: %q", name)
	}
}

// TestPostReplyPartialFailure: PostReply's caller (the digest job) retries
// a failed post, so PostReply must say whether part of the reply already
// went out. A channel post that fails stops the reply before any file or
// direct message (a retry then repeats nothing); a direct message that
// fails after the channel post wraps ErrPartlyPosted, and the other direct
// messages are still sent.
func TestPostReplyPartialFailure(t *testing.T) {
	reply := func() bot.Reply {
		return bot.Reply{
			Title: "Week 48",
			Files: []bot.File{{Name: "w48.csv", MIME: "text/csv", Data: []byte("bar,result\n1.95,o\n")}},
			Direct: []bot.Direct{
				{UserID: "U0KAI", Reply: bot.Reply{Title: "Your week"}},
				{UserID: "U0MIRA", Reply: bot.Reply{Title: "Your week"}},
			},
		}
	}
	noRetry := func(c *Config) { c.MaxAttempts = 1 }

	t.Run("channel post fails", func(t *testing.T) {
		fs := newFakeSlack(t)
		fs.limited["chat.postMessage"] = 1
		f := posterFront(t, fs, noRetry)
		err := f.PostReply(t.Context(), "C0JUMPS", "", reply())
		if err == nil || errors.Is(err, ErrPartlyPosted) {
			t.Fatalf("err = %v, want a plain failure (nothing posted)", err)
		}
		if n := len(fs.callsOf("files.getUploadURLExternal")); n != 0 {
			t.Errorf("%d uploads after the channel post failed", n)
		}
		if n := len(fs.callsOf("conversations.open")); n != 0 {
			t.Errorf("%d direct messages opened after the channel post failed", n)
		}
	})
	t.Run("a direct message fails after the post", func(t *testing.T) {
		fs := newFakeSlack(t)
		fs.limited["conversations.open"] = 1 // the first direct message only
		f := posterFront(t, fs, noRetry)
		err := f.PostReply(t.Context(), "C0JUMPS", "", reply())
		if !errors.Is(err, ErrPartlyPosted) {
			t.Fatalf("err = %v, want ErrPartlyPosted", err)
		}
		var channels []string
		for _, c := range fs.callsOf("chat.postMessage") {
			channels = append(channels, c.Form.Get("channel"))
		}
		if strings.Join(channels, ",") != "C0JUMPS,DU0MIRA" {
			t.Errorf("posted in %v, want the channel and the second direct message", channels)
		}
		if n := len(fs.callsOf("files.completeUploadExternal")); n != 1 {
			t.Errorf("%d files shared, want 1", n)
		}
	})
	t.Run("everything posted", func(t *testing.T) {
		fs := newFakeSlack(t)
		f := posterFront(t, fs, noRetry)
		if err := f.PostReply(t.Context(), "C0JUMPS", "", reply()); err != nil {
			t.Fatal(err)
		}
	})
}
