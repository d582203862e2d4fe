package bot_test

import (
	"bytes"
	"context"
	"flag"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/botstore"
	"github.com/lathmark-team/lathmark/internal/console"
	"github.com/lathmark-team/lathmark/store"
)

// testStoreOptions tune bbolt's group commit as cmd/lathmark does.
var testStoreOptions = store.Options{MaxBatchSize: 100, MaxBatchDelay: 2 * time.Millisecond}

var update = flag.Bool("update", false, "rewrite golden replies under testdata/replies")

// testClockStart is the fixed time tests run at (a Wednesday, 10:00 UTC).
var testClockStart = time.Date(2026, 11, 25, 10, 0, 0, 0, time.UTC)

// testEngine is an engine over a temporary bbolt file, with a clock that
// advances one second per read so every message has its own time.
type testEngine struct {
	t      testing.TB
	E      *bot.Engine
	DB     *store.DB
	now    time.Time
	seq    int
	closed bool
	// idPrefix makes message ids unique across engines that share a file
	// (a copied template already holds the ids it was built with).
	idPrefix string
}

// newTestEngine opens a temporary store; at cleanup it checks the store's
// invariants and closes it. The operator "U_HEAD" is a head coach.
func newTestEngine(t testing.TB) *testEngine {
	t.Helper()
	return newTestEngineAt(t, filepath.Join(t.TempDir(), "lathmark.db"))
}

// newTestEngineAt is newTestEngine on a given file, which may already hold
// data (a copy of a prepared store, say).
func newTestEngineAt(t testing.TB, path string) *testEngine {
	t.Helper()
	db, err := store.Open(path, testStoreOptions)
	if err != nil {
		t.Fatalf("open store: %v", err)
	}
	te := &testEngine{t: t, DB: db, now: testClockStart, idPrefix: "m"}
	t.Cleanup(func() {
		if te.closed {
			return
		}
		if err := db.Check(); err != nil {
			t.Errorf("store invariants after test: %v", err)
		}
		db.Close()
	})
	e, err := bot.New(bot.Config{Store: botstore.New(db), Clock: bot.ClockFunc(te.clock), HeadCoaches: []string{"U_HEAD"}})
	if err != nil {
		t.Fatal(err)
	}
	te.E = e
	return te
}

func (te *testEngine) clock() time.Time { return te.now }

// advance moves the test clock forward.
func (te *testEngine) advance(d time.Duration) { te.now = te.now.Add(d) }

// as runs one line as the given user and returns the reply.
func (te *testEngine) as(user, text string) bot.Reply {
	te.t.Helper()
	te.seq++
	te.advance(time.Second)
	return te.E.Handle(context.Background(), bot.Request{
		UserID: user, UserName: user, Text: text, Time: te.now, MessageID: te.idPrefix + itoa(te.seq), Local: true,
	})
}

// run runs one line as the head coach.
func (te *testEngine) run(text string) bot.Reply { te.t.Helper(); return te.as("U_HEAD", text) }

// must runs a line as the head coach and fails the test if it was refused.
func (te *testEngine) must(text string) bot.Reply {
	te.t.Helper()
	r := te.run(text)
	if !r.OK() {
		te.t.Fatalf("%q refused: %s", text, plain(r))
	}
	return r
}

func itoa(n int) string {
	var b [20]byte
	i := len(b)
	for {
		i--
		b[i] = byte('0' + n%10)
		n /= 10
		if n == 0 {
			return string(b[i:])
		}
	}
}

// plain renders a reply as the terminal would.
func plain(r bot.Reply) string {
	var b bytes.Buffer
	console.Render(&b, r)
	return b.String()
}

// golden compares text with testdata/replies/NAME.golden (repo-level
// testdata), rewriting it under -update.
func golden(t testing.TB, name, got string) {
	t.Helper()
	path := filepath.Join("..", "testdata", "replies", name+".golden")
	if *update {
		if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("read golden %s (run go test ./bot -update to create): %v", path, err)
	}
	if string(want) != got {
		t.Errorf("reply %s differs from %s:\n--- got\n%s\n--- want\n%s", name, path, got, want)
	}
}

// checksum returns the store's content hash, to prove a refusal changed nothing.
func (te *testEngine) checksum() [32]byte {
	te.t.Helper()
	sum, err := te.DB.Checksum()
	if err != nil {
		te.t.Fatal(err)
	}
	return sum
}

// contains fails unless the rendered reply contains every want.
func contains(t testing.TB, r bot.Reply, wants ...string) {
	t.Helper()
	p := plain(r)
	for _, w := range wants {
		if !strings.Contains(p, w) {
			t.Errorf("reply lacks %q:\n%s", w, p)
		}
	}
}

// close closes the store after checking its invariants, as a restart would.
func (te *testEngine) close() {
	te.t.Helper()
	if err := te.DB.Check(); err != nil {
		te.t.Errorf("store invariants: %v", err)
	}
	te.DB.Close()
	te.closed = true
}
