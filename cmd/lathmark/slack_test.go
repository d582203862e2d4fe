package main

import (
	"context"
	"fmt"
	"io"
	"log/slog"
	"net"
	"net/http"
	"net/http/httptest"
	"net/url"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/digest"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/slackfront"
	"github.com/lathmark-team/lathmark/internal/weekly"
)

// fakeSlack serves the few Web API methods the bot calls and records every
// message it is sent, through chat.postMessage or a response_url.
type fakeSlack struct {
	srv  *httptest.Server
	mu   sync.Mutex
	msgs []string
}

func newFakeSlack(t testing.TB) *fakeSlack {
	f := &fakeSlack{}
	f.srv = httptest.NewServer(http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		body, _ := io.ReadAll(r.Body)
		w.Header().Set("Content-Type", "application/json")
		switch {
		case strings.HasSuffix(r.URL.Path, "/auth.test"):
			io.WriteString(w, `{"ok":true,"url":"https://fake.slack/","team":"Harbour","user":"lathmark","team_id":"T1","user_id":"UBOT","bot_id":"B1"}`)
		case strings.HasSuffix(r.URL.Path, "/users.info"):
			io.WriteString(w, `{"ok":true,"user":{"id":"U_COACH","name":"coach","real_name":"Coach","profile":{"display_name":"Coach"}}}`)
		case strings.HasSuffix(r.URL.Path, "/chat.postMessage"), strings.HasSuffix(r.URL.Path, "/chat.postEphemeral"), strings.HasPrefix(r.URL.Path, "/respond/"):
			f.mu.Lock()
			f.msgs = append(f.msgs, string(body))
			f.mu.Unlock()
			io.WriteString(w, `{"ok":true,"channel":"C1","ts":"1700000000.000200"}`)
		default:
			io.WriteString(w, `{"ok":true}`)
		}
	}))
	t.Cleanup(f.srv.Close)
	return f
}

func (f *fakeSlack) all() string {
	f.mu.Lock()
	defer f.mu.Unlock()
	return strings.Join(f.msgs, "\n")
}

func freePort(t *testing.T) string {
	l, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	return l.Addr().String()
}

// In HTTP mode, with SLACK_API_URL pointed at a local fake, signed slash
// commands reach the engine and the answers come back: a profile is added,
// a jump logged, and history shows it.
func TestSlackHTTPEndToEnd(t *testing.T) {
	fake := newFakeSlack(t)
	addr := freePort(t)
	const secret = "test-signing-secret"
	env := map[string]string{
		"SLACK_BOT_TOKEN": "xoxb-test", "SLACK_SIGNING_SECRET": secret, "SLACK_API_URL": fake.srv.URL + "/api/",
		"LATHMARK_HEAD_COACH": "U_COACH", "TMPDIR": t.TempDir(),
	}
	data := filepath.Join(t.TempDir(), "slack.db")
	ctx, cancel := context.WithCancel(context.Background())
	done := make(chan int)
	var out, errb syncBuffer
	go func() {
		done <- run(ctx, []string{"--http", addr, "--data", data}, stdio{strings.NewReader(""), &out, &errb}, func(k string) string { return env[k] })
	}()
	waitFor(t, func() bool {
		resp, err := http.Get("http://" + addr + "/healthz")
		if err == nil {
			resp.Body.Close()
		}
		return err == nil && resp.StatusCode == 200
	})
	send := func(n int, text string) {
		form := url.Values{
			"command": {"/lath"}, "text": {text}, "user_id": {"U_COACH"}, "user_name": {"coach"},
			"channel_id": {"C1"}, "team_id": {"T1"}, "trigger_id": {fmt.Sprintf("trig-%d", n)},
			"response_url": {fake.srv.URL + "/respond/" + strconv.Itoa(n)},
		}
		body := form.Encode()
		ts := strconv.FormatInt(time.Now().Unix(), 10)
		req, _ := http.NewRequest("POST", "http://"+addr+"/slack/commands", strings.NewReader(body))
		req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
		req.Header.Set("X-Slack-Request-Timestamp", ts)
		req.Header.Set("X-Slack-Signature", slackfront.Signature(secret, ts, []byte(body)))
		resp, err := http.DefaultClient.Do(req)
		if err != nil {
			t.Fatal(err)
		}
		resp.Body.Close()
		if resp.StatusCode != 200 {
			t.Fatalf("%q: status %d", text, resp.StatusCode)
		}
	}
	send(1, "athlete add Kai height 1.86")
	waitFor(t, func() bool { return strings.Contains(fake.all(), "Added Kai") })
	send(2, "log Kai 1.95 o 2.00 xo")
	waitFor(t, func() bool { return strings.Contains(fake.all(), "Logged") })
	send(3, "history Kai")
	waitFor(t, func() bool { return strings.Contains(fake.all(), "1.95 o, 2.00 xo") })

	// A forged request is refused and runs nothing.
	req, _ := http.NewRequest("POST", "http://"+addr+"/slack/commands", strings.NewReader("text=athlete+remove+Kai+confirm&user_id=U_COACH"))
	req.Header.Set("X-Slack-Request-Timestamp", strconv.FormatInt(time.Now().Unix(), 10))
	req.Header.Set("X-Slack-Signature", "v0=00")
	resp, err := http.DefaultClient.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	if resp.StatusCode != http.StatusUnauthorized {
		t.Errorf("forged request: status %d, want 401", resp.StatusCode)
	}
	cancel()
	select {
	case code := <-done:
		if code != 0 {
			t.Errorf("exit %d: %s", code, errb.String())
		}
	case <-time.After(15 * time.Second):
		t.Fatal("bot did not shut down")
	}
	if strings.Contains(errb.String(), "xoxb-test") || strings.Contains(errb.String(), secret) {
		t.Error("a secret appeared in the log")
	}
}

// A digest whose post is rate limited (HTTP 429 with Retry-After) is posted
// after the wait, and exactly once however often the scheduler asks.
func TestDigestRateLimitedPostsOnce(t *testing.T) {
	var (
		mu        sync.Mutex
		posts     int
		limited   bool
		limitedAt time.Time
		postedAt  time.Time
	)
	srv := httptest.NewServer(http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		w.Header().Set("Content-Type", "application/json")
		mu.Lock()
		defer mu.Unlock()
		switch {
		case strings.HasSuffix(r.URL.Path, "/chat.postMessage"):
			if !limited {
				limited, limitedAt = true, time.Now()
				w.Header().Set("Retry-After", "1")
				w.WriteHeader(http.StatusTooManyRequests)
				io.WriteString(w, `{"ok":false,"error":"ratelimited"}`)
				return
			}
			posts++
			postedAt = time.Now()
			io.WriteString(w, `{"ok":true,"channel":"C1","ts":"1.2"}`)
		default:
			io.WriteString(w, `{"ok":true,"file_id":"F1","upload_url":"`+"http://"+r.Host+`/upload"}`)
		}
	}))
	defer srv.Close()
	a := newDigestApp(t)
	front, err := slackfront.New(slackfront.Config{BotToken: "xoxb-test", AppToken: "xapp-test", APIURL: srv.URL + "/", Handler: a.engine, Dedup: nopDedup{}})
	if err != nil {
		t.Fatal(err)
	}
	job := digestJob{engine: a.engine, poster: front, log: a.log, waits: []time.Duration{10 * time.Millisecond}}
	week := digestWeek(t, "2026-W48")
	for i := 0; i < 3; i++ {
		if err := job.PostDigest(context.Background(), week, time.Now(), false); err != nil {
			t.Fatalf("try %d: %v", i, err)
		}
	}
	mu.Lock()
	defer mu.Unlock()
	if posts != 1 {
		t.Errorf("digest posted %d times, want 1", posts)
	}
	if wait := postedAt.Sub(limitedAt); wait < 900*time.Millisecond {
		t.Errorf("retried after %v, before the 1 s Retry-After", wait)
	}
}

// partPoster stands for a front end whose digest reaches the channel while
// a chart or a private message fails.
type partPoster struct {
	mu    sync.Mutex
	posts int
}

func (p *partPoster) PostReply(context.Context, string, string, bot.Reply) error {
	p.mu.Lock()
	defer p.mu.Unlock()
	p.posts++
	return fmt.Errorf("%w: slack conversations.open: user_not_found", slackfront.ErrPartlyPosted)
}

// A digest that went out in part is not posted again: the job neither
// retries it nor lets the engine release the week for a later run.
func TestDigestPartlyPostedIsNotRepeated(t *testing.T) {
	a := newDigestApp(t)
	poster := &partPoster{}
	job := digestJob{engine: a.engine, poster: poster, log: a.log, waits: []time.Duration{time.Millisecond, time.Millisecond}}
	week := digestWeek(t, "2026-W48")
	for i := range 2 {
		if err := job.PostDigest(context.Background(), week, time.Now(), false); err != nil {
			t.Fatalf("run %d: %v", i, err)
		}
	}
	if poster.posts != 1 {
		t.Errorf("digest posted %d times, want 1", poster.posts)
	}
	if posted, err := a.engine.DigestPosted(context.Background(), week); err != nil || !posted {
		t.Errorf("week recorded as posted: %v, %v; want true", posted, err)
	}
}

// countJob counts digest posts for the scheduler.
type countJob struct {
	mu    sync.Mutex
	weeks []digest.Week
}

func (j *countJob) PostDigest(_ context.Context, week digest.Week, _ time.Time, _ bool) error {
	j.mu.Lock()
	defer j.mu.Unlock()
	j.weeks = append(j.weeks, week)
	return nil
}

type noneLedger struct{}

func (noneLedger) Posted(digest.Week) (bool, error) { return false, nil }

type fixedNow time.Time

func (c fixedNow) Now() time.Time { return time.Time(c) }

// `digest on` shortly after the slot posts that week's digest (followTeam
// sets the switch before Reschedule starts its catch-up check; the check
// runs in the background, so the old order was a race, one this test
// rarely loses). A settings change during shutdown, when the scheduler has
// stopped, is not logged as an error (the old code logged ErrStopped).
func TestFollowTeam(t *testing.T) {
	now := time.Date(2026, 11, 30, 7, 30, 0, 0, time.UTC) // Monday, 30 min after the 07:00 slot
	job := &countJob{}
	var logs syncBuffer
	sched, err := weekly.New(weekly.Config{Day: time.Monday, Minute: 420, Off: true, Clock: fixedNow(now), Job: job, Ledger: noneLedger{}})
	if err != nil {
		t.Fatal(err)
	}
	if err := sched.Start(context.Background()); err != nil {
		t.Fatal(err)
	}
	follow := followTeam(sched, slog.New(slog.NewTextHandler(&logs, nil)))
	follow(record.Team{DigestDay: time.Monday, DigestMinute: 420})
	sched.Stop() // waits for the check Reschedule started
	follow(record.Team{DigestDay: time.Monday, DigestMinute: 420})
	job.mu.Lock()
	n := len(job.weeks)
	job.mu.Unlock()
	if n != 1 {
		t.Errorf("%d digests posted after digest on, want 1", n)
	}
	if strings.Contains(logs.String(), "level=ERROR") {
		t.Errorf("logged %s", logs.String())
	}
}
