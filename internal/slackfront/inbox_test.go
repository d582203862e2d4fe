package slackfront

import (
	"context"
	"fmt"
	"net/http"
	"net/url"
	"sort"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
)

// memInbox is an in-memory Inbox that records the order of events: when a
// delivery was put, and whether it was still there when its command ran.
type memInbox struct {
	mu      sync.Mutex
	seq     int
	entries map[string]Stored
	limit   int
	puts    int
	hold    chan struct{} // when set, Put waits for it to close
}

func newMemInbox() *memInbox { return &memInbox{entries: map[string]Stored{}} }

func (m *memInbox) Put(_ context.Context, key string, at time.Time, payload []byte) (string, error) {
	if m.hold != nil {
		<-m.hold
	}
	m.mu.Lock()
	defer m.mu.Unlock()
	if m.limit > 0 && len(m.entries) >= m.limit {
		return "", fmt.Errorf("%d waiting: %w", len(m.entries), ErrInboxFull)
	}
	m.seq++
	id := fmt.Sprintf("%016d", m.seq)
	m.entries[id] = Stored{ID: id, Key: key, At: at, Payload: append([]byte(nil), payload...)}
	m.puts++
	return id, nil
}

func (m *memInbox) Pending(context.Context) ([]Stored, error) {
	m.mu.Lock()
	defer m.mu.Unlock()
	var out []Stored
	for _, s := range m.entries {
		out = append(out, s)
	}
	sort.Slice(out, func(i, j int) bool {
		if !out[i].At.Equal(out[j].At) {
			return out[i].At.Before(out[j].At)
		}
		return out[i].ID < out[j].ID
	})
	return out, nil
}

func (m *memInbox) Done(_ context.Context, id string) error {
	m.mu.Lock()
	defer m.mu.Unlock()
	delete(m.entries, id)
	return nil
}

func (m *memInbox) has(id string) bool {
	m.mu.Lock()
	defer m.mu.Unlock()
	_, ok := m.entries[id]
	return ok
}

func (m *memInbox) len() int {
	m.mu.Lock()
	defer m.mu.Unlock()
	return len(m.entries)
}

// A slash command is answered 200 only after its delivery is in the inbox;
// the engine gets the inbox id with the request (to delete it in its own
// transaction) while the entry is still there; afterwards it is gone.
func TestInboxStoredBeforeAck(t *testing.T) {
	fs := newFakeSlack(t)
	inbox := newMemInbox()
	inbox.hold = make(chan struct{})
	var stillThere, gotID bool
	h := &recHandler{}
	h.reply = func(req bot.Request) bot.Reply {
		gotID = req.InboxID != ""
		stillThere = inbox.has(req.InboxID)
		return bot.Reply{Title: "Done: " + req.Text}
	}
	_, base, _ := httpFront(t, fs, h, newMemDedup(), func(c *Config) { c.Inbox = inbox })
	client := newClient(t)
	answered := make(chan int, 1)
	go func() {
		res := signedPost(t, client, base+"/slack/commands", formType, slashForm(fs, "log Kai 1.95 o", "trig-in1", "C0JUMPS"), time.Now(), nil)
		answered <- res.StatusCode
	}()
	select {
	case code := <-answered:
		t.Fatalf("answered %d before the delivery was stored", code)
	case <-time.After(100 * time.Millisecond):
	}
	close(inbox.hold)
	if code := <-answered; code != http.StatusOK {
		t.Fatalf("status %d", code)
	}
	fs.waitCalls(t, "response_url", 1)
	waitFor(t, "the inbox emptied", func() bool { return inbox.len() == 0 })
	if !gotID || !stillThere {
		t.Fatalf("engine saw inbox id %v, entry present %v; want both", gotID, stillThere)
	}
	if inbox.puts != 1 {
		t.Fatalf("%d puts, want 1", inbox.puts)
	}
}

// A full inbox refuses: a slash command gets "busy, nothing was done" as
// its answer, the sender of an event gets it as a reply only they see (and
// the event is acknowledged, so Slack does not send it again), and nothing
// runs.
func TestInboxFullRefuses(t *testing.T) {
	fs := newFakeSlack(t)
	inbox := newMemInbox()
	inbox.limit = 1
	if _, err := inbox.Put(context.Background(), "other", time.Now(), []byte(`{"via":"event"}`)); err != nil {
		t.Fatal(err)
	}
	// The entry above is replayed at start and dropped (unreadable); fill
	// the inbox again once the front end serves.
	h := &recHandler{}
	_, base, _ := httpFront(t, fs, h, newMemDedup(), func(c *Config) { c.Inbox = inbox })
	if _, err := inbox.Put(context.Background(), "other", time.Now(), []byte(`{}`)); err != nil {
		t.Fatal(err)
	}
	client := newClient(t)
	req, _ := http.NewRequest(http.MethodPost, base+"/slack/commands", strings.NewReader(string(slashForm(fs, "log Kai 1.95 o", "trig-full", "C0JUMPS"))))
	stamp := fmt.Sprint(time.Now().Unix())
	req.Header.Set("Content-Type", formType)
	req.Header.Set(headerTimestamp, stamp)
	req.Header.Set(headerSignature, Signature(testSecret, stamp, slashForm(fs, "log Kai 1.95 o", "trig-full", "C0JUMPS")))
	res, err := client.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	var body strings.Builder
	buf := make([]byte, 512)
	n, _ := res.Body.Read(buf)
	body.Write(buf[:n])
	res.Body.Close()
	if res.StatusCode != http.StatusOK || !strings.Contains(body.String(), "nothing was done") {
		t.Fatalf("slash command on a full inbox: %d %q", res.StatusCode, body.String())
	}
	// An event is acknowledged (Slack must not send again what the sender
	// was told was not done) and the sender told, only them, in the thread.
	ev := signedPost(t, client, base+"/slack/events", "application/json", mentionEvent("Ev-full", "C0JUMPS", "U0KAI", "<@UBOT> log Kai 1.95 o", "1700000060.000100"), time.Now(), nil)
	if ev.StatusCode != http.StatusOK {
		t.Fatalf("event on a full inbox: %d, want 200 and a busy answer", ev.StatusCode)
	}
	told := fs.waitCalls(t, "chat.postEphemeral", 1)[0]
	if got := told.Form.Get("user") + " " + told.Form.Get("channel") + " " + string(told.Body) + told.Form.Encode(); !strings.Contains(got, "U0KAI") || !strings.Contains(got, "C0JUMPS") || !strings.Contains(got, "nothing+was+done") && !strings.Contains(got, "nothing was done") {
		t.Fatalf("busy answer to the sender: %s", got)
	}
	time.Sleep(50 * time.Millisecond)
	if n := len(h.requests()); n != 0 {
		t.Fatalf("%d commands ran on a full inbox", n)
	}
}

// At start, before serving, the front end runs what the inbox holds,
// oldest first, whatever way it came (HTTP slash command, socket-mode slash
// command, event, button); a delivery older than the response window is
// answered in a direct message that says what was run; the inbox is empty
// afterwards.
func TestInboxReplayAtStart(t *testing.T) {
	fs := newFakeSlack(t)
	inbox := newMemInbox()
	clock := &fixedClock{t: time.Now()}
	now := clock.Now()
	put := func(via string, body []byte, age time.Duration) {
		p, err := encodePayload(via, body)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := inbox.Put(context.Background(), "k", now.Add(-age), p); err != nil {
			t.Fatal(err)
		}
	}
	put(viaCommandForm, slashForm(fs, "log Kai 1.90 o", "trig-r1", "C0JUMPS"), 45*time.Minute)
	put(viaEvent, mentionEvent("Ev-r2", "C0JUMPS", "U0MIRA", "<@UBOT> log Mira 1.70 o", "1700000070.000100"), 10*time.Minute)
	put(viaCommandJSON, slashPayload(fs, "best Kai", "trig-r3"), 5*time.Minute)
	put(viaInteractive, blockActions("U0MIRA", "C0JUMPS", "1700000071.000100", "", "trig-r4", ActionID+":1", "history Kai 6w"), time.Minute)

	h := &recHandler{}
	cfg := testConfig(fs, h, newMemDedup())
	cfg.HTTPAddr = "127.0.0.1:0"
	cfg.Users = staticUsers{}
	cfg.Clock = clock
	cfg.Inbox = inbox
	f, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	stop := running(t, f)
	// Ready means serving, and the replay came first.
	var texts []string
	for _, r := range h.requests() {
		texts = append(texts, r.Text)
	}
	want := []string{"log Kai 1.90 o", "log Mira 1.70 o", "best Kai", "history Kai 6w"}
	if strings.Join(texts, "|") != strings.Join(want, "|") {
		t.Fatalf("replayed %q before serving; want %q in that order", texts, want)
	}
	fs.waitCalls(t, "conversations.open", 1)
	waitFor(t, "replies posted", func() bool { return len(fs.posted()) >= 4 })
	waitFor(t, "the inbox emptied", func() bool { return inbox.len() == 0 })
	if err := stop(); err != nil {
		t.Fatal(err)
	}
	var late, hooks int
	for _, c := range fs.posted() {
		switch {
		case c.Method == "chat.postMessage" && c.Form.Get("channel") == "DU0KAI":
			late++
			if txt := blocksText(t, c); !strings.Contains(txt, "restarted") || !strings.Contains(txt, "log Kai 1.90 o") {
				t.Errorf("late answer does not say what was run: %s", txt)
			}
		case c.Method == "response_url":
			hooks++
		}
	}
	if late != 1 || hooks != 1 {
		t.Fatalf("late DMs %d, response_url answers %d; want 1 and 1 (calls %+v)", late, hooks, fs.posted())
	}
}

// A delivery replayed after a crash whose command had already committed
// (its dedupe key seen) does not run again, and is forgotten.
func TestInboxReplaySkipsHandled(t *testing.T) {
	fs := newFakeSlack(t)
	inbox := newMemInbox()
	p, _ := encodePayload(viaCommandForm, slashForm(fs, "log Kai 1.90 o", "trig-dup", "C0JUMPS"))
	if _, err := inbox.Put(context.Background(), "cmd:trig-dup", time.Now(), p); err != nil {
		t.Fatal(err)
	}
	d := newMemDedup()
	_ = d.MarkSeen(context.Background(), "cmd:trig-dup")
	h := &recHandler{}
	httpFront(t, fs, h, d, func(c *Config) { c.Inbox = inbox })
	waitFor(t, "the inbox emptied", func() bool { return inbox.len() == 0 })
	if n := len(h.requests()); n != 0 {
		t.Fatalf("a handled delivery ran again (%d)", n)
	}
}

// What HTTP mode stores of each kind of request reads back as the same
// work: a slash command, a mention and a button press, taken from the
// inbox while their commands are still running.
func TestInboxStoredPayloadsReadBack(t *testing.T) {
	fs := newFakeSlack(t)
	inbox := newMemInbox()
	h := &recHandler{block: make(chan struct{})}
	f, base, _ := httpFront(t, fs, h, newMemDedup(), func(c *Config) { c.Inbox = inbox })
	client := newClient(t)
	form := func(payload []byte) []byte { return []byte("payload=" + url.QueryEscape(string(payload))) }
	sends := []struct {
		path, ctype string
		body        []byte
		text        string
	}{
		{"/slack/commands", formType, slashForm(fs, "log Kai 1.95 o", "trig-rb1", "C0JUMPS"), "log Kai 1.95 o"},
		{"/slack/events", "application/json", mentionEvent("Ev-rb2", "C0JUMPS", "U0MIRA", "<@UBOT> best Mira", "1700000080.000100"), "best Mira"},
		{"/slack/interactive", formType, form(blockActions("U0MIRA", "C0JUMPS", "1700000081.000100", "", "trig-rb3", ActionID+":1", "history Kai 6w")), "history Kai 6w"},
	}
	for _, s := range sends {
		if res := signedPost(t, client, base+s.path, s.ctype, s.body, time.Now(), nil); res.StatusCode != http.StatusOK {
			t.Fatalf("%s: status %d", s.path, res.StatusCode)
		}
	}
	pending, _ := inbox.Pending(context.Background())
	got := map[string]bool{}
	for _, p := range pending {
		work, err := f.fromStored(p)
		if err != nil || len(work) != 1 {
			t.Fatalf("stored %s reads back as %d pieces of work: %v", p.Payload, len(work), err)
		}
		if work[0].req.MessageID != p.Key {
			t.Errorf("delivery key %q, message id read back %q", p.Key, work[0].req.MessageID)
		}
		got[work[0].req.Text] = true
	}
	close(h.block)
	for _, s := range sends {
		if !got[s.text] {
			t.Errorf("%s: %q not read back from the inbox (have %v)", s.path, s.text, got)
		}
	}
	waitFor(t, "the inbox emptied", func() bool { return inbox.len() == 0 })
}

// Work still running when the shutdown timeout runs out stays in the inbox
// for the next start, and no "shutting down" answer is posted for it.
func TestInboxKeptAtShutdownTimeout(t *testing.T) {
	fs := newFakeSlack(t)
	inbox := newMemInbox()
	h := HandlerFunc(func(ctx context.Context, req bot.Request) bot.Reply {
		<-ctx.Done()
		return bot.Reply{Kind: bot.KindInternal, Title: "Not done", Lines: []string{"The bot is shutting down; nothing was changed."}}
	})
	_, base, stop := httpFront(t, fs, h, newMemDedup(), func(c *Config) { c.Inbox = inbox; c.ShutdownTimeout = 100 * time.Millisecond })
	client := newClient(t)
	if res := signedPost(t, client, base+"/slack/commands", formType, slashForm(fs, "log Kai 1.95 o", "trig-sd", "C0JUMPS"), time.Now(), nil); res.StatusCode != http.StatusOK {
		t.Fatalf("status %d", res.StatusCode)
	}
	if err := stop(); err != nil {
		t.Fatal(err)
	}
	if inbox.len() != 1 {
		t.Fatalf("inbox holds %d after a stop cut the work short, want 1", inbox.len())
	}
	if n := len(fs.posted()); n != 0 {
		t.Fatalf("%d answers posted for work left for the next start", n)
	}
}
