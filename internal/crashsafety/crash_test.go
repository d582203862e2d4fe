package crashsafety_test

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"math/rand/v2"
	"net"
	"net/http"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/botstore"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// Environment variables of the crash test.
const (
	envChild  = "LATHMARK_CRASH_CHILD"  // set: this process is the child bot; the value is its data file
	envRounds = "LATHMARK_CRASH_ROUNDS" // rounds of the long form
	envSeed   = "LATHMARK_CRASH_SEED"   // repeat an earlier run
)

// Shape of the short form: rounds and concurrent senders.
const (
	defaultRounds = 10
	// maxRounds keeps the round days (one a round, from 2026) well inside
	// the store's key range, which ends in 2262.
	maxRounds = 10000
	senders   = 4
	// maxPerRound bounds how many new lines one sender sends in a round
	// (the kill comes long before in practice).
	maxPerRound = 3000
	// Resends per round: message ids of the previous round sent again.
	resendAcked   = 8
	resendUnacked = 8
	// Kill delay after the child is ready, in milliseconds.
	minKillMs = 20
	maxKillMs = 300
	headCoach = "U_HEAD"
	readyWait = 30 * time.Second
)

// TestMain runs the child bot when envChild is set, and the tests otherwise.
func TestMain(m *testing.M) {
	if path := os.Getenv(envChild); path != "" {
		os.Exit(runChild(path))
	}
	os.Exit(m.Run())
}

// runChild is the bot process that gets killed: the store, the engine and a
// loopback endpoint. It prints "ready ADDR" on standard output once it
// serves, and exits by itself when standard input closes (the parent test
// process is gone).
func runChild(path string) int {
	db, err := store.Open(path, store.Options{Timeout: 10 * time.Second})
	if err != nil {
		fmt.Fprintln(os.Stderr, "child: open store:", err)
		return 2
	}
	e, err := bot.New(bot.Config{Store: botstore.New(db), HeadCoaches: []string{headCoach}})
	if err != nil {
		fmt.Fprintln(os.Stderr, "child: engine:", err)
		return 2
	}
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		fmt.Fprintln(os.Stderr, "child: listen:", err)
		return 2
	}
	mux := http.NewServeMux()
	mux.HandleFunc("POST /handle", func(w http.ResponseWriter, r *http.Request) {
		if err := r.ParseForm(); err != nil {
			http.Error(w, err.Error(), http.StatusBadRequest)
			return
		}
		req := bot.Request{
			UserID:    r.PostForm.Get("user"),
			UserName:  r.PostForm.Get("user"),
			Text:      r.PostForm.Get("text"),
			MessageID: r.PostForm.Get("id"),
		}
		if n, err := strconv.ParseInt(r.PostForm.Get("t"), 10, 64); err == nil && n > 0 {
			req.Time = time.Unix(0, n).UTC()
		}
		// The answer goes out only after Handle has returned: by then a
		// log line is committed.
		rep := e.Handle(context.Background(), req)
		fmt.Fprintf(w, "%s\n%s\n", rep.Kind, rep.Title)
	})
	go func() {
		_, _ = io.Copy(io.Discard, os.Stdin)
		os.Exit(3)
	}()
	fmt.Printf("ready %s\n", ln.Addr())
	err = http.Serve(ln, mux)
	fmt.Fprintln(os.Stderr, "child: serve:", err)
	return 2
}

// readyWriter is the child's standard output: it catches the "ready ADDR"
// line.
type readyWriter struct {
	mu    sync.Mutex
	buf   bytes.Buffer
	addr  string
	ready chan struct{}
}

func (w *readyWriter) Write(p []byte) (int, error) {
	w.mu.Lock()
	defer w.mu.Unlock()
	w.buf.Write(p)
	if w.addr == "" {
		if line, _, ok := strings.Cut(w.buf.String(), "\n"); ok {
			if a, ok := strings.CutPrefix(line, "ready "); ok {
				w.addr = a
				close(w.ready)
			}
		}
	}
	return len(p), nil
}

// lockedBuffer collects the child's standard error.
type lockedBuffer struct {
	mu  sync.Mutex
	buf bytes.Buffer
}

func (b *lockedBuffer) Write(p []byte) (int, error) {
	b.mu.Lock()
	defer b.mu.Unlock()
	return b.buf.Write(p)
}

func (b *lockedBuffer) String() string {
	b.mu.Lock()
	defer b.mu.Unlock()
	return b.buf.String()
}

// child is one running bot process.
type child struct {
	cmd    *exec.Cmd
	stdin  io.Closer
	stderr *lockedBuffer
	addr   string
	exited chan struct{} // closed when Wait has returned
	err    error         // Wait's result, once exited is closed
}

// kill sends SIGKILL and waits for the process to end, returning Wait's
// error (a killed process reports "signal: killed"). It is safe to call
// twice: the test calls it, and its cleanup again.
func (c *child) kill() error {
	_ = c.cmd.Process.Kill() // an error means it has already ended
	_ = c.stdin.Close()
	<-c.exited
	return c.err
}

// startChild runs the test binary as the bot on path and waits until it
// serves. The process is killed at cleanup whatever happens.
func startChild(t *testing.T, path string) *child {
	t.Helper()
	exe, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(exe, "-test.run=^$")
	cmd.Env = append(os.Environ(), envChild+"="+path)
	out := &readyWriter{ready: make(chan struct{})}
	errBuf := &lockedBuffer{}
	cmd.Stdout, cmd.Stderr = out, errBuf
	stdin, err := cmd.StdinPipe()
	if err != nil {
		t.Fatal(err)
	}
	if err := cmd.Start(); err != nil {
		t.Fatalf("start child: %v", err)
	}
	c := &child{cmd: cmd, stdin: stdin, stderr: errBuf, exited: make(chan struct{})}
	go func() {
		c.err = cmd.Wait()
		close(c.exited)
	}()
	t.Cleanup(func() { _ = c.kill() })
	select {
	case <-out.ready:
	case <-c.exited:
		t.Fatalf("child exited before it was ready (%v):\n%s", c.err, errBuf.String())
	case <-time.After(readyWait):
		_ = c.kill()
		t.Fatalf("child not ready after %s:\n%s", readyWait, errBuf.String())
	}
	out.mu.Lock()
	c.addr = out.addr
	out.mu.Unlock()
	if host, _, err := net.SplitHostPort(c.addr); err != nil || !net.ParseIP(host).IsLoopback() {
		_ = c.kill()
		t.Fatalf("child serves on %q, not a loopback address", c.addr)
	}
	return c
}

// message is one log line the parent sent, with what it knows about it.
type message struct {
	id       string
	athlete  string
	text     string
	timeNs   int64
	attempts int  // attempts the line holds
	acked    bool // the bot answered that it logged the line (or that it already had)
	present  bool // the last check found it stored
	checked  bool // present is known
	resentIn int  // the round it was last sent again in
}

// newMessage builds a log line of one to three bars (one to nine attempts)
// whose note is its own message id, so every stored attempt names its line.
func newMessage(rng *rand.Rand, round, sender, n int, day time.Time) *message {
	// The notations a bar picks from: one to three attempts each.
	shapes := [...]string{"o", "xo", "xxo", "xxx", "-", "x-", "xx-", "x"}
	id := fmt.Sprintf("r%d-s%d-n%d", round, sender, n)
	athlete := athleteName(sender)
	var b strings.Builder
	fmt.Fprintf(&b, "log %s", athlete)
	attempts := 0
	bars := 1 + rng.IntN(3)
	for k := range bars {
		shape := shapes[rng.IntN(len(shapes))]
		fmt.Fprintf(&b, " %.2f %s", 1.50+0.05*float64(k)+0.01*float64(rng.IntN(4)), shape)
		attempts += len(shape)
	}
	fmt.Fprintf(&b, " note %s", id)
	return &message{
		id: id, athlete: athlete, text: b.String(), attempts: attempts,
		timeNs: day.Add(time.Duration(sender)*time.Hour + time.Duration(n)*time.Millisecond).UnixNano(),
	}
}

func athleteName(sender int) string { return fmt.Sprintf("Crash%d", sender) }

// send posts one command line to the child. ok is false when the child
// gave no complete answer (it was killed).
func send(client *http.Client, addr string, m *message) (kind, title string, ok bool, err error) {
	form := url.Values{"user": {headCoach}, "text": {m.text}, "id": {m.id}, "t": {strconv.FormatInt(m.timeNs, 10)}}
	resp, err := client.PostForm("http://"+addr+"/handle", form)
	if err != nil {
		return "", "", false, nil
	}
	defer resp.Body.Close()
	body, rerr := io.ReadAll(resp.Body)
	if rerr != nil {
		return "", "", false, nil
	}
	if resp.StatusCode != http.StatusOK {
		return "", "", false, fmt.Errorf("%s: HTTP %d: %s", m.id, resp.StatusCode, body)
	}
	kind, title, found := strings.Cut(strings.TrimRight(string(body), "\n"), "\n")
	if !found {
		// The body was cut off by the kill.
		return "", "", false, nil
	}
	return kind, title, true, nil
}

// tally is what the test counted, for the summary line.
type tally struct {
	rounds, sent, acked, found, committedUnacked int
	lost, partial, duplicates, stray             int
	resentAcked, resentStored, resentAbsent      int
}

// TestCrashKill9 kills the bot with SIGKILL while it logs, many times, and
// checks after every round that nothing answered was lost, nothing was
// stored twice and no line was stored in part.
func TestCrashKill9(t *testing.T) {
	rounds := defaultRounds
	if s := os.Getenv(envRounds); s != "" {
		n, err := strconv.Atoi(s)
		if err != nil || n < 1 || n > maxRounds {
			t.Fatalf("%s=%q: give a whole number of rounds from 1 to %d", envRounds, s, maxRounds)
		}
		rounds = n
	}
	seed := uint64(time.Now().UnixNano())
	if s := os.Getenv(envSeed); s != "" {
		n, err := strconv.ParseUint(s, 10, 64)
		if err != nil {
			t.Fatalf("%s=%q: give a whole number", envSeed, s)
		}
		seed = n
	}
	t.Logf("seed %d (repeat with %s=%d)", seed, envSeed, seed)
	rng := rand.New(rand.NewPCG(seed, 0x636c656172626f74))

	path := filepath.Join(t.TempDir(), "lathmark.db")
	seedSquad(t, path)

	var (
		all   []*message
		byID  = map[string]*message{}
		sum   tally
		prev  []*message // the previous round's new lines
		start = time.Date(2026, 1, 5, 8, 0, 0, 0, time.UTC)
	)
	for round := 1; round <= rounds; round++ {
		day := start.AddDate(0, 0, round)
		// Some of the previous round's lines go again, as a chat platform
		// re-delivers a message: answered ones, and ones cut off by the kill.
		resend := make([][]*message, senders)
		var acked, unacked []*message
		for _, m := range prev {
			if m.acked {
				acked = append(acked, m)
			} else {
				unacked = append(unacked, m)
			}
		}
		rng.Shuffle(len(acked), func(i, j int) { acked[i], acked[j] = acked[j], acked[i] })
		rng.Shuffle(len(unacked), func(i, j int) { unacked[i], unacked[j] = unacked[j], unacked[i] })
		again := append(acked[:min(len(acked), resendAcked)], unacked[:min(len(unacked), resendUnacked)]...)
		for i, m := range again {
			m.resentIn = round
			resend[i%senders] = append(resend[i%senders], m)
		}
		// The lines each sender will send, built here so the random
		// stream does not depend on goroutine timing.
		fresh := make([][]*message, senders)
		for s := range senders {
			for n := range maxPerRound {
				fresh[s] = append(fresh[s], newMessage(rng, round, s, n, day))
			}
		}
		delay := time.Duration(minKillMs+rng.IntN(maxKillMs-minKillMs+1)) * time.Millisecond

		c := startChild(t, path)
		tr := &http.Transport{}
		client := &http.Client{Transport: tr, Timeout: 20 * time.Second}
		var (
			wg      sync.WaitGroup
			mu      sync.Mutex
			sentNew = make([][]*message, senders)
		)
		for s := range senders {
			wg.Go(func() {
				for _, m := range resend[s] {
					kind, title, ok, err := send(client, c.addr, m)
					if err != nil {
						t.Errorf("resend %s: %v", m.id, err)
						return
					}
					if !ok {
						return
					}
					mu.Lock()
					switch {
					case kind != "ok":
						t.Errorf("resend %s (%q) refused: %s %s", m.id, m.text, kind, title)
					case m.present && title != "Already done":
						t.Errorf("resend of stored line %s answered %q, want \"Already done\": the line may now be stored twice", m.id, title)
					case !m.present && !strings.HasPrefix(title, "Logged for"):
						t.Errorf("resend of unstored line %s answered %q, want it logged now", m.id, title)
					case m.acked:
						sum.resentAcked++
					case m.present:
						sum.resentStored++
					default:
						sum.resentAbsent++
					}
					m.acked = true
					mu.Unlock()
				}
				for _, m := range fresh[s] {
					mu.Lock()
					sentNew[s] = append(sentNew[s], m)
					mu.Unlock()
					kind, title, ok, err := send(client, c.addr, m)
					if err != nil {
						t.Errorf("send %s: %v", m.id, err)
						return
					}
					if !ok {
						return
					}
					if kind != "ok" || !strings.HasPrefix(title, "Logged for") {
						t.Errorf("line %s (%q) answered %s %q, want it logged", m.id, m.text, kind, title)
						return
					}
					mu.Lock()
					m.acked = true
					mu.Unlock()
				}
			})
		}
		time.Sleep(delay)
		var exitErr *exec.ExitError
		if err := c.kill(); !errors.As(err, &exitErr) || exitErr.ProcessState.Sys().(syscall.WaitStatus).Signal() != syscall.SIGKILL {
			t.Errorf("round %d: the child did not end by SIGKILL (%v):\n%s", round, err, c.stderr.String())
		}
		wg.Wait()
		tr.CloseIdleConnections()
		if t.Failed() {
			t.Fatalf("round %d failed; child's standard error:\n%s", round, c.stderr.String())
		}

		prev = prev[:0]
		n := 0
		for s := range senders {
			for _, m := range sentNew[s] {
				all = append(all, m)
				byID[m.id] = m
				prev = append(prev, m)
				n++
			}
		}
		sum.rounds++
		sum.sent += n
		verify(t, path, all, byID, round, &sum)
		if t.Failed() {
			t.Fatalf("round %d: the data file fails the checks above", round)
		}
		ackedThis := 0
		for _, m := range prev {
			if m.acked {
				ackedThis++
			}
		}
		t.Logf("round %d: killed after %s; %d new lines sent, %d answered; %d resent", round, delay, n, ackedThis, len(again))
	}
	for _, m := range all {
		if m.acked {
			sum.acked++
		}
		if m.present {
			sum.found++
			if !m.acked {
				sum.committedUnacked++
			}
		}
	}
	if sum.acked == 0 {
		t.Errorf("no line was answered in %d rounds: the test proved nothing", rounds)
	}
	t.Logf("crash safety summary: %d rounds, %d senders, %d lines sent, %d acknowledged, %d found stored (%d of them committed but cut off before the answer), "+
		"%d lost, %d partial, %d duplicates, %d stray attempts; resent: %d answered before (Already done), %d stored but unanswered (Already done), %d never stored (logged then)",
		sum.rounds, senders, sum.sent, sum.acked, sum.found, sum.committedUnacked,
		sum.lost, sum.partial, sum.duplicates, sum.stray, sum.resentAcked, sum.resentStored, sum.resentAbsent)
}

// seedSquad adds one athlete per sender (round 0), in this process.
func seedSquad(t *testing.T, path string) {
	t.Helper()
	db, err := store.Open(path, store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	e, err := bot.New(bot.Config{Store: botstore.New(db), HeadCoaches: []string{headCoach}})
	if err != nil {
		t.Fatal(err)
	}
	for s := range senders {
		line := fmt.Sprintf("athlete add %s height 1.8%d mass 7%d sex m", athleteName(s), s, s)
		r := e.Handle(context.Background(), bot.Request{UserID: headCoach, Text: line, MessageID: "seed-" + strconv.Itoa(s)})
		if !r.OK() || !strings.HasPrefix(r.Title, "Added") {
			t.Fatalf("seed %q: %s %s %v", line, r.Kind, r.Title, r.Lines)
		}
	}
}

// verify reopens the data file, checks it, and checks every line sent so far
// against what is stored.
func verify(t *testing.T, path string, all []*message, byID map[string]*message, round int, sum *tally) {
	t.Helper()
	db, err := store.Open(path, store.Options{Timeout: 10 * time.Second})
	if err != nil {
		t.Fatalf("round %d: reopen after the kill: %v", round, err)
	}
	defer db.Close()
	if err := db.Check(); err != nil {
		t.Fatalf("round %d: consistency check after the kill: %v", round, err)
	}
	stored := map[string][]record.Attempt{}
	seen := map[string]bool{}
	names := map[uint64]string{}
	err = db.View(context.Background(), func(tx *store.Tx) error {
		as, err := tx.Athletes()
		if err != nil {
			return err
		}
		for _, a := range as {
			names[a.ID] = a.Name
			err := tx.Attempts(a.ID, time.Unix(0, 0), time.Date(2262, 1, 1, 0, 0, 0, 0, time.UTC), func(at record.Attempt) error {
				stored[at.MessageID] = append(stored[at.MessageID], at)
				return nil
			})
			if err != nil {
				return err
			}
		}
		for _, m := range all {
			ok, err := tx.Seen(m.id)
			if err != nil {
				return err
			}
			seen[m.id] = ok
		}
		return nil
	})
	if err != nil {
		t.Fatalf("round %d: read back: %v", round, err)
	}
	for id, as := range stored {
		if _, ok := byID[id]; !ok {
			sum.stray += len(as)
			t.Errorf("round %d: %d stored attempts carry message id %q, which the test never sent", round, len(as), id)
		}
	}
	for _, m := range all {
		as := stored[m.id]
		notes := 0
		for _, a := range as {
			if a.Note == m.id {
				notes++
			}
			if names[a.AthleteID] != m.athlete {
				t.Errorf("round %d: an attempt of line %s is filed under %q, want %s", round, m.id, names[a.AthleteID], m.athlete)
			}
		}
		present := len(as) > 0
		switch {
		case len(as) > m.attempts || notes > 1:
			sum.duplicates++
			t.Errorf("round %d: line %s (%q) is stored more than once: %d attempts (the line has %d), %d with its note", round, m.id, m.text, len(as), m.attempts, notes)
		case present && (len(as) != m.attempts || notes != 1):
			sum.partial++
			t.Errorf("round %d: line %s (%q) is stored in part: %d of %d attempts, %d with its note", round, m.id, m.text, len(as), m.attempts, notes)
		case m.acked && !present:
			sum.lost++
			t.Errorf("round %d: line %s (%q) was answered as logged but is not stored", round, m.id, m.text)
		case m.checked && m.present && !present:
			sum.lost++
			t.Errorf("round %d: line %s (%q) was stored at the last check and is gone now", round, m.id, m.text)
		case m.checked && !m.present && present && m.resentIn != round:
			t.Errorf("round %d: line %s (%q) was not stored at the last check and was not sent again, yet it is stored now", round, m.id, m.text)
		}
		if seen[m.id] != present {
			t.Errorf("round %d: line %s: message id marked seen = %v but line stored = %v; they must commit together", round, m.id, seen[m.id], present)
		}
		m.present, m.checked = present, true
	}
}
