package slackfront

import (
	"context"
	"encoding/json"
	"io"
	"net/http"
	"net/url"
	"runtime"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
)

const formType = "application/x-www-form-urlencoded"

// httpFront starts a front end in HTTP mode on 127.0.0.1:0.
func httpFront(t *testing.T, fs *fakeSlack, h Handler, d Dedup, mut func(*Config)) (*Front, string, func() error) {
	t.Helper()
	cfg := testConfig(fs, h, d)
	cfg.HTTPAddr = "127.0.0.1:0"
	cfg.Users = staticUsers{}
	if mut != nil {
		mut(&cfg)
	}
	f, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	stop := running(t, f)
	return f, "http://" + f.Addr(), stop
}

// staticUsers names everyone after their id.
type staticUsers struct{}

func (staticUsers) DisplayName(_ context.Context, id string) (string, error) {
	return "name-" + id, nil
}

func slashForm(fs *fakeSlack, text, trigger, channel string) []byte {
	return []byte(url.Values{
		"token": {"unused"}, "team_id": {"T0TEST"}, "team_domain": {"harbourlane"},
		"channel_id": {channel}, "channel_name": {"jumps"}, "user_id": {"U0KAI"}, "user_name": {"kai"},
		"command": {"/lath"}, "text": {text}, "trigger_id": {trigger},
		"response_url": {fs.url() + "hooks/commands/T0TEST/1/" + trigger},
	}.Encode())
}

func newClient(t *testing.T) *http.Client {
	tr := &http.Transport{}
	t.Cleanup(tr.CloseIdleConnections)
	return &http.Client{Transport: tr, Timeout: 10 * time.Second}
}

// TestHTTPSlashCommandEndToEnd: --http 127.0.0.1:PORT with SLACK_API_URL
// pointed at a fake; a signed slash command reaches the Handler, the reply
// is posted through the response_url, and Run leaves no goroutine behind.
func TestHTTPSlashCommandEndToEnd(t *testing.T) {
	fs := newFakeSlack(t)
	client := newClient(t)
	base := runtime.NumGoroutine()
	h := &recHandler{}
	_, addr, stop := httpFront(t, fs, h, newMemDedup(), nil)

	start := time.Now()
	res := signedPost(t, client, addr+"/slack/commands", formType, slashForm(fs, "margin 2.00 for Kai v 4.4", "trig-1", "C0JUMPS"), time.Now(), nil)
	if res.StatusCode != http.StatusOK {
		t.Fatalf("status %d", res.StatusCode)
	}
	if d := time.Since(start); d > 3*time.Second {
		t.Errorf("ack took %s", d) // Slack's 3 s deadline
	}
	calls := fs.waitCalls(t, "response_url", 1)
	reqs := h.requests()
	if len(reqs) != 1 {
		t.Fatalf("handler ran %d times", len(reqs))
	}
	want := bot.Request{UserID: "U0KAI", UserName: "name-U0KAI", Channel: "C0JUMPS", Text: "margin 2.00 for Kai v 4.4", MessageID: "cmd:trig-1"}
	got := reqs[0]
	got.Time = time.Time{}
	if got != want {
		t.Fatalf("request = %+v\nwant %+v", got, want)
	}
	var body struct {
		ResponseType string `json:"response_type"`
		Text         string `json:"text"`
	}
	if err := json.Unmarshal(calls[0].Body, &body); err != nil {
		t.Fatal(err)
	}
	if body.ResponseType != "in_channel" || !strings.Contains(blocksText(t, calls[0]), "Done: margin 2.00 for Kai v 4.4") {
		t.Fatalf("response_url got %s", calls[0].Body)
	}
	if n := len(fs.callsOf("chat.postMessage")); n != 0 {
		t.Fatalf("%d chat.postMessage calls; the response_url should have carried the reply", n)
	}
	if err := stop(); err != nil {
		t.Fatal(err)
	}
	client.CloseIdleConnections()
	settleGoroutines(t, base)
}

// TestHTTPSlashEphemeralAndFallback: an ephemeral reply goes back
// ephemeral; without a usable response_url the Web API carries it.
func TestHTTPSlashEphemeralAndFallback(t *testing.T) {
	fs := newFakeSlack(t)
	client := newClient(t)
	h := &recHandler{reply: func(bot.Request) bot.Reply {
		return bot.Reply{Kind: bot.KindUsage, Title: "Not done", Lines: []string{"I don't know the command \"jmp\"."}, Example: "help", Ephemeral: true}
	}}
	_, addr, _ := httpFront(t, fs, h, newMemDedup(), nil)

	signedPost(t, client, addr+"/slack/commands", formType, slashForm(fs, "jmp", "trig-e", "C0JUMPS"), time.Now(), nil)
	calls := fs.waitCalls(t, "response_url", 1)
	if !strings.Contains(string(calls[0].Body), `"response_type":"ephemeral"`) {
		t.Fatalf("want an ephemeral response, got %s", calls[0].Body)
	}

	// A response_url on a foreign host is not used: chat.postEphemeral is.
	form, _ := url.ParseQuery(string(slashForm(fs, "jmp", "trig-f", "C0JUMPS")))
	form.Set("response_url", "https://attacker.example/steal")
	signedPost(t, client, addr+"/slack/commands", formType, []byte(form.Encode()), time.Now(), nil)
	eph := fs.waitCalls(t, "chat.postEphemeral", 1)
	if eph[0].Form.Get("user") != "U0KAI" || eph[0].Form.Get("channel") != "C0JUMPS" {
		t.Fatalf("ephemeral went to %v", eph[0].Form)
	}
}

// TestHTTPURLVerification answers Slack's challenge.
func TestHTTPURLVerification(t *testing.T) {
	fs := newFakeSlack(t)
	client := newClient(t)
	_, addr, _ := httpFront(t, fs, &recHandler{}, newMemDedup(), nil)
	body := []byte(`{"token":"unused","challenge":"3eZbrw1aBm2rZgRNFdxV2595E9CY3gmdALWMmHkvFXO7tYXAYM8P","type":"url_verification"}`)
	req, _ := http.NewRequest(http.MethodPost, addr+"/slack/events", strings.NewReader(string(body)))
	stamp := strconv.FormatInt(time.Now().Unix(), 10)
	req.Header.Set(headerTimestamp, stamp)
	req.Header.Set(headerSignature, Signature(testSecret, stamp, body))
	res, err := client.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	defer res.Body.Close()
	var got map[string]string
	if err := json.NewDecoder(res.Body).Decode(&got); err != nil {
		t.Fatal(err)
	}
	if res.StatusCode != 200 || got["challenge"] != "3eZbrw1aBm2rZgRNFdxV2595E9CY3gmdALWMmHkvFXO7tYXAYM8P" {
		t.Fatalf("status %d, body %v", res.StatusCode, got)
	}
}

// TestHTTPMentionsAndDirectMessages: a channel mention is stripped and
// answered in a thread; a direct message is answered in the DM; ephemeral
// replies to a mention go only to the asker; the bot's own messages, other
// bots, edits and other subtypes are ignored.
func TestHTTPMentionsAndDirectMessages(t *testing.T) {
	fs := newFakeSlack(t)
	client := newClient(t)
	h := &recHandler{reply: func(r bot.Request) bot.Reply {
		if r.Text == "help" {
			return bot.Reply{Title: "Help", Lines: []string{"Type `log`."}, Ephemeral: true}
		}
		return bot.Reply{Title: "Logged", Lines: []string{r.Text}}
	}}
	_, addr, _ := httpFront(t, fs, h, newMemDedup(), func(c *Config) { c.Workers = 1 })
	post := func(body []byte) {
		t.Helper()
		if res := signedPost(t, client, addr+"/slack/events", "application/json", body, time.Now(), nil); res.StatusCode != 200 {
			t.Fatalf("status %d", res.StatusCode)
		}
	}
	// Ignored first: they are refused before queueing, so nothing can run.
	post(dmEvent("Ev-own", "D0KAI", botUser, "log me 1.80 o", "1700000001.000100", nil))
	post(dmEvent("Ev-bot", "D0KAI", "U0OTHER", "log me 1.80 o", "1700000002.000100", map[string]any{"bot_id": "B0OTHER"}))
	post(dmEvent("Ev-edit", "D0KAI", "U0KAI", "log me 1.80 o", "1700000003.000100", map[string]any{"subtype": "message_changed"}))
	post(dmEvent("Ev-chan", "C0JUMPS", "U0KAI", "log me 1.80 o", "1700000004.000100", map[string]any{"channel_type": "channel"}))

	post(mentionEvent("Ev-m1", "C0JUMPS", "U0KAI", "<@UBOT> log Kai 1.95 o 2.00 xo &amp; <@U0MIRA>", "1700000010.000100"))
	msgs := fs.waitCalls(t, "chat.postMessage", 1)
	if got := msgs[0].Form.Get("thread_ts"); got != "1700000010.000100" || msgs[0].Form.Get("channel") != "C0JUMPS" {
		t.Fatalf("mention answered in %q thread %q", msgs[0].Form.Get("channel"), got)
	}
	post(dmEvent("Ev-d1", "D0KAI", "U0KAI", "log me 1.80 o", "1700000011.000100", nil))
	msgs = fs.waitCalls(t, "chat.postMessage", 2)
	if msgs[1].Form.Get("channel") != "D0KAI" || msgs[1].Form.Get("thread_ts") != "" {
		t.Fatalf("DM answered in %v", msgs[1].Form)
	}
	post(mentionEvent("Ev-m2", "C0JUMPS", "U0KAI", "<@UBOT|lathmark> help", "1700000012.000100"))
	eph := fs.waitCalls(t, "chat.postEphemeral", 1)
	if eph[0].Form.Get("user") != "U0KAI" || eph[0].Form.Get("thread_ts") != "1700000012.000100" {
		t.Fatalf("ephemeral help went to %v", eph[0].Form)
	}

	reqs := h.requests()
	if len(reqs) != 3 {
		t.Fatalf("handler ran %d times: %+v", len(reqs), reqs)
	}
	if reqs[0].Text != "log Kai 1.95 o 2.00 xo & <@U0MIRA>" || reqs[0].Channel != "C0JUMPS" || reqs[0].Direct ||
		reqs[0].MessageID != "ev:C0JUMPS:1700000010.000100" {
		t.Fatalf("mention request %+v", reqs[0])
	}
	if reqs[0].Time != time.Unix(1700000010, 100000).UTC() {
		t.Fatalf("mention time %v", reqs[0].Time)
	}
	if !reqs[1].Direct || reqs[1].Channel != "" || reqs[1].Text != "log me 1.80 o" {
		t.Fatalf("DM request %+v", reqs[1])
	}
}

// TestHTTPButtonRunsAsPresser: a press of a lathmark button runs its value
// as the presser, answering in the same channel and thread; a second press
// of the same button by the same person gets a notice and runs nothing.
func TestHTTPButtonRunsAsPresser(t *testing.T) {
	fs := newFakeSlack(t)
	client := newClient(t)
	h := &recHandler{}
	_, addr, _ := httpFront(t, fs, h, newMemDedup(), nil)
	press := func(trigger, action string) {
		form := url.Values{"payload": {string(blockActions("U0MIRA", "C0JUMPS", "1700000020.000100", "1700000010.000100", trigger, action, "undo"))}}
		if res := signedPost(t, client, addr+"/slack/interactive", formType, []byte(form.Encode()), time.Now(), nil); res.StatusCode != 200 {
			t.Fatalf("status %d", res.StatusCode)
		}
	}
	press("trig-b1", ActionID+":0")
	msgs := fs.waitCalls(t, "chat.postMessage", 1)
	if msgs[0].Form.Get("channel") != "C0JUMPS" || msgs[0].Form.Get("thread_ts") != "1700000010.000100" {
		t.Fatalf("button answered in %v", msgs[0].Form)
	}
	reqs := h.requests()
	if len(reqs) != 1 || reqs[0].UserID != "U0MIRA" || reqs[0].Text != "undo" {
		t.Fatalf("requests %+v", reqs)
	}
	press("trig-b2", ActionID+":0") // the same person presses again
	eph := fs.waitCalls(t, "chat.postEphemeral", 1)
	if !strings.Contains(blocksText(t, eph[0]), "already pressed") || eph[0].Form.Get("user") != "U0MIRA" {
		t.Fatalf("notice %v", blocksText(t, eph[0]))
	}
	press("trig-b3", "someone_elses_button")
	time.Sleep(50 * time.Millisecond)
	if n := len(h.requests()); n != 1 {
		t.Fatalf("handler ran %d times", n)
	}
}

// TestHTTPSignatureRefusals: bad signatures, stale or missing timestamps and
// replays are refused with 401 and nothing runs.
func TestHTTPSignatureRefusals(t *testing.T) {
	fs := newFakeSlack(t)
	client := newClient(t)
	clock := &fixedClock{t: time.Now()}
	h := &recHandler{}
	_, addr, _ := httpFront(t, fs, h, newMemDedup(), func(c *Config) { c.Clock = clock })
	now := clock.Now()
	body := slashForm(fs, "log Kai 1.95 o", "trig-sig", "C0JUMPS")
	stamp := func(ts time.Time) string { return strconv.FormatInt(ts.Unix(), 10) }
	old := stamp(now.Add(-2 * time.Minute))
	tests := []struct {
		name       string
		ts, sig    string
		body       []byte
		wantStatus int
	}{
		{"wrong signature", stamp(now), Signature("not-the-secret", stamp(now), body), body, 401},
		{"stale timestamp (5 min 1 s)", stamp(now.Add(-301 * time.Second)), Signature(testSecret, stamp(now.Add(-301*time.Second)), body), body, 401},
		{"future timestamp (5 min 1 s)", stamp(now.Add(301 * time.Second)), Signature(testSecret, stamp(now.Add(301*time.Second)), body), body, 401},
		{"missing signature", stamp(now), "", body, 401},
		{"missing timestamp", "", Signature(testSecret, stamp(now), body), body, 401},
		{"replayed body, new timestamp", stamp(now), Signature(testSecret, old, body), body, 401},
		{"tampered body", stamp(now), Signature(testSecret, stamp(now), body), append(append([]byte(nil), body...), "&text=undo"...), 401},
		{"not a number", "yesterday", Signature(testSecret, "yesterday", body), body, 401},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			for _, path := range []string{"/slack/commands", "/slack/events", "/slack/interactive"} {
				req, _ := http.NewRequest(http.MethodPost, addr+path, strings.NewReader(string(tt.body)))
				req.Header.Set("Content-Type", formType)
				if tt.ts != "" {
					req.Header.Set(headerTimestamp, tt.ts)
				}
				if tt.sig != "" {
					req.Header.Set(headerSignature, tt.sig)
				}
				res, err := client.Do(req)
				if err != nil {
					t.Fatal(err)
				}
				_, _ = io.Copy(io.Discard, res.Body)
				res.Body.Close()
				if res.StatusCode != tt.wantStatus {
					t.Fatalf("%s: status %d, want %d", path, res.StatusCode, tt.wantStatus)
				}
			}
		})
	}
	// A fresh, correctly signed copy is accepted: the refusals above were
	// about the signature, not the body.
	res := signedPost(t, client, addr+"/slack/commands", formType, body, now.Add(-299*time.Second), nil)
	if res.StatusCode != 200 {
		t.Fatalf("valid request: status %d", res.StatusCode)
	}
	fs.waitCalls(t, "response_url", 1)
	if n := len(h.requests()); n != 1 {
		t.Fatalf("handler ran %d times; only the valid request may run", n)
	}
	if n := len(fs.posted()); n != 1 {
		t.Fatalf("%d posts; only the valid request may be answered", n)
	}
}

// TestExactlyOnceAcrossRetriesAndRestart: the same event delivered three
// times (twice at once, once as a retry) runs the handler once; a new front
// end with the same Dedup (a restart) also leaves it alone.
func TestExactlyOnceAcrossRetriesAndRestart(t *testing.T) {
	fs := newFakeSlack(t)
	client := newClient(t)
	h := &recHandler{}
	dedup := newMemDedup()
	// A mention in the direct message with the bot: Slack sends it as
	// app_mention and as message.im, with different event ids.
	event := mentionEvent("Ev-once", "D0KAI", "U0KAI", "<@UBOT> log Kai 1.95 o", "1700000030.000100")
	sameAsIM := dmEvent("Ev-once-im", "D0KAI", "U0KAI", "<@UBOT> log Kai 1.95 o", "1700000030.000100", nil)

	_, addr, stop := httpFront(t, fs, h, dedup, func(c *Config) { c.Workers = 4 })
	var wg sync.WaitGroup
	for i := range 2 {
		wg.Go(func() {
			hdr := http.Header{}
			if i > 0 {
				hdr.Set(headerRetryNum, "1")
				hdr.Set(headerRetryWhy, "http_timeout")
			}
			signedPost(t, client, addr+"/slack/events", "application/json", event, time.Now(), hdr)
		})
	}
	wg.Wait()
	fs.waitCalls(t, "chat.postMessage", 1)
	hdr := http.Header{}
	hdr.Set(headerRetryNum, "2")
	signedPost(t, client, addr+"/slack/events", "application/json", event, time.Now(), hdr)
	if err := stop(); err != nil { // drains the queue: the third copy was handled (dropped)
		t.Fatal(err)
	}

	// Restart: a new front end, the same Dedup, Slack tries once more, and
	// the same message also arrives as message.im with another event id.
	_, addr2, stop2 := httpFront(t, fs, h, dedup, nil)
	hdr.Set(headerRetryNum, "3")
	signedPost(t, client, addr2+"/slack/events", "application/json", event, time.Now(), hdr)
	signedPost(t, client, addr2+"/slack/events", "application/json", sameAsIM, time.Now(), nil)
	if err := stop2(); err != nil {
		t.Fatal(err)
	}
	if n := len(h.requests()); n != 1 {
		t.Fatalf("handler ran %d times, want 1", n)
	}
	if n := len(fs.callsOf("chat.postMessage")); n != 1 {
		t.Fatalf("%d replies posted, want 1", n)
	}
}

// TestHTTPBackPressure: with the queue full, events get 503 (Slack
// re-delivers them later) and slash commands a "busy" answer; nothing is
// lost silently.
func TestHTTPBackPressure(t *testing.T) {
	fs := newFakeSlack(t)
	client := newClient(t)
	h := &recHandler{block: make(chan struct{})}
	_, addr, _ := httpFront(t, fs, h, newMemDedup(), func(c *Config) { c.Workers = 1; c.QueueSize = 1 })
	var codes []int
	for i := range 3 {
		ev := mentionEvent("Ev-bp"+strconv.Itoa(i), "C0JUMPS", "U0KAI", "<@UBOT> best Kai", "170000004"+strconv.Itoa(i)+".000100")
		codes = append(codes, signedPost(t, client, addr+"/slack/events", "application/json", ev, time.Now(), nil).StatusCode)
		if i == 0 {
			// Let the worker take the first so the queue holds exactly one.
			time.Sleep(50 * time.Millisecond)
		}
	}
	req, _ := http.NewRequest(http.MethodPost, addr+"/slack/commands", strings.NewReader(string(slashForm(fs, "best Kai", "trig-bp", "C0JUMPS"))))
	stamp := strconv.FormatInt(time.Now().Unix(), 10)
	body := slashForm(fs, "best Kai", "trig-bp", "C0JUMPS")
	req.Header.Set(headerTimestamp, stamp)
	req.Header.Set(headerSignature, Signature(testSecret, stamp, body))
	req.Header.Set("Content-Type", formType)
	res, err := client.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	busy, _ := io.ReadAll(res.Body)
	res.Body.Close()
	close(h.block)
	if codes[0] != 200 || codes[1] != 200 || codes[2] != 503 {
		t.Fatalf("event statuses %v, want [200 200 503]", codes)
	}
	if res.StatusCode != 200 || !strings.Contains(string(busy), "busy") || !strings.Contains(string(busy), "ephemeral") {
		t.Fatalf("slash when busy: %d %s", res.StatusCode, busy)
	}
	fs.waitCalls(t, "chat.postMessage", 2)
}

// TestHTTPBodyLimitAndHealth: an oversized body is refused before anything
// runs; /healthz answers.
func TestHTTPBodyLimitAndHealth(t *testing.T) {
	fs := newFakeSlack(t)
	client := newClient(t)
	h := &recHandler{}
	_, addr, _ := httpFront(t, fs, h, newMemDedup(), func(c *Config) { c.MaxBodyBytes = 1024 })
	big := []byte(`{"type":"event_callback","pad":"` + strings.Repeat("x", 2000) + `"}`)
	if res := signedPost(t, client, addr+"/slack/events", "application/json", big, time.Now(), nil); res.StatusCode != http.StatusRequestEntityTooLarge {
		t.Fatalf("oversized: status %d", res.StatusCode)
	}
	res, err := client.Get(addr + "/healthz")
	if err != nil {
		t.Fatal(err)
	}
	b, _ := io.ReadAll(res.Body)
	res.Body.Close()
	if res.StatusCode != 200 || string(b) != "ok\n" {
		t.Fatalf("healthz %d %q", res.StatusCode, b)
	}
	res, err = client.Get(addr + "/slack/events")
	if err != nil {
		t.Fatal(err)
	}
	res.Body.Close()
	if res.StatusCode != http.StatusMethodNotAllowed {
		t.Fatalf("GET /slack/events: %d", res.StatusCode)
	}
	if len(h.requests()) != 0 {
		t.Fatal("handler ran")
	}
}
