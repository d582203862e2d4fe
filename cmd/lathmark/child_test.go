package main

import (
	"encoding/json"
	"fmt"
	"io"
	"net/http"
	"net/http/httptest"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"github.com/gorilla/websocket"
)

// builtBot is the bot compiled once for the tests that run it as a child
// process, without the race detector even under -race: a child is killed
// and measured from outside, and an instrumented one would start slowly and
// carry the detector's shadow memory into the resident-memory test.
type builtBot struct {
	once sync.Once
	dir  string
	path string
	err  error
}

var testBot builtBot

func TestMain(m *testing.M) {
	code := m.Run()
	if testBot.dir != "" {
		_ = os.RemoveAll(testBot.dir)
	}
	os.Exit(code)
}

// botBinary builds the bot (once per test binary) and returns its path.
func botBinary(t *testing.T) string {
	t.Helper()
	testBot.once.Do(func() {
		gobin, err := exec.LookPath("go")
		if err != nil {
			gobin = filepath.Join(runtime.GOROOT(), "bin", "go")
		}
		testBot.dir, testBot.err = os.MkdirTemp("", "lathmark-bot-")
		if testBot.err != nil {
			return
		}
		testBot.path = filepath.Join(testBot.dir, "lathmark")
		out, err := exec.Command(gobin, "build", "-o", testBot.path, ".").CombinedOutput()
		if err != nil {
			testBot.err = fmt.Errorf("go build: %w\n%s", err, out)
		}
	})
	if testBot.err != nil {
		t.Fatal(testBot.err)
	}
	return testBot.path
}

// child is a bot process started by a test.
type child struct {
	cmd  *exec.Cmd
	logs *syncBuffer
	done chan struct{}
	err  error
}

// startChild runs the bot (botBinary) with args and the given environment
// (nothing else of the test's environment but PATH and HOME). It dies with
// the test process.
func startChild(t *testing.T, env map[string]string, args ...string) *child {
	t.Helper()
	cmd := exec.Command(botBinary(t), args...)
	cmd.Env = []string{"PATH=" + os.Getenv("PATH"), "HOME=" + os.Getenv("HOME")}
	for k, v := range env {
		cmd.Env = append(cmd.Env, k+"="+v)
	}
	c := &child{cmd: cmd, logs: &syncBuffer{}, done: make(chan struct{})}
	cmd.Stdout, cmd.Stderr = c.logs, c.logs
	cmd.SysProcAttr = &syscall.SysProcAttr{Pdeathsig: syscall.SIGKILL}
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	go func() {
		c.err = cmd.Wait()
		close(c.done)
	}()
	t.Cleanup(func() { c.kill() })
	return c
}

// kill ends the child with SIGKILL and waits for it.
func (c *child) kill() {
	_ = c.cmd.Process.Signal(syscall.SIGKILL)
	<-c.done
}

// stop ends the child with SIGTERM and waits for it, at most 20 s.
func (c *child) stop(t *testing.T) {
	t.Helper()
	_ = c.cmd.Process.Signal(syscall.SIGTERM)
	select {
	case <-c.done:
	case <-time.After(20 * time.Second):
		c.kill()
		t.Fatalf("the bot did not stop on SIGTERM; log:\n%s", c.logs.String())
	}
}

// waitHealthy polls the child's /healthz until it answers: the listener
// is bound only after the inbox was replayed.
func (c *child) waitHealthy(t *testing.T, addr string) {
	t.Helper()
	deadline := time.Now().Add(60 * time.Second)
	for {
		res, err := http.Get("http://" + addr + "/healthz")
		if err == nil {
			res.Body.Close()
			if res.StatusCode == http.StatusOK {
				return
			}
		}
		select {
		case <-c.done:
			t.Fatalf("the bot exited (%v); log:\n%s", c.err, c.logs.String())
		default:
		}
		if time.Now().After(deadline) {
			t.Fatalf("the bot did not become healthy; log:\n%s", c.logs.String())
		}
		time.Sleep(10 * time.Millisecond)
	}
}

// standIn is a stand-in Slack for child bots: the Web API methods the bot
// calls, response_url hooks, and a socket-mode websocket that sends
// envelopes and counts acknowledgements.
type standIn struct {
	srv *httptest.Server

	mu      sync.Mutex
	posts   int
	acks    map[string]int
	conns   chan *standInConn
	payload map[string]string // envelope id -> the ack's payload, if any
}

type standInConn struct {
	c    *websocket.Conn
	wmu  sync.Mutex
	done chan struct{}
}

func newStandIn(t *testing.T) *standIn {
	s := &standIn{acks: map[string]int{}, conns: make(chan *standInConn, 16), payload: map[string]string{}}
	s.srv = httptest.NewServer(http.HandlerFunc(s.serve))
	t.Cleanup(s.srv.Close)
	return s
}

func (s *standIn) apiURL() string { return s.srv.URL + "/api/" }

func (s *standIn) serve(w http.ResponseWriter, r *http.Request) {
	if r.URL.Path == "/ws" {
		s.serveWS(w, r)
		return
	}
	_, _ = io.Copy(io.Discard, r.Body)
	w.Header().Set("Content-Type", "application/json")
	p := r.URL.Path
	switch {
	case strings.HasSuffix(p, "/auth.test"):
		io.WriteString(w, `{"ok":true,"team":"Harbour","user":"lathmark","team_id":"T1","user_id":"UBOT","bot_id":"B1"}`)
	case strings.HasSuffix(p, "/apps.connections.open"):
		io.WriteString(w, `{"ok":true,"url":"ws`+strings.TrimPrefix(s.srv.URL, "http")+`/ws"}`)
	case strings.HasSuffix(p, "/users.info"):
		io.WriteString(w, `{"ok":true,"user":{"id":"U_COACH","name":"coach","profile":{"display_name":"Coach"}}}`)
	case strings.HasSuffix(p, "/conversations.open"):
		io.WriteString(w, `{"ok":true,"channel":{"id":"D1"}}`)
	case strings.HasSuffix(p, "/chat.postMessage"), strings.HasSuffix(p, "/chat.postEphemeral"), strings.HasPrefix(p, "/respond/"):
		s.mu.Lock()
		s.posts++
		s.mu.Unlock()
		io.WriteString(w, `{"ok":true,"channel":"C1","ts":"1700000000.000200"}`)
	default:
		io.WriteString(w, `{"ok":true}`)
	}
}

func (s *standIn) serveWS(w http.ResponseWriter, r *http.Request) {
	up := websocket.Upgrader{CheckOrigin: func(*http.Request) bool { return true }}
	c, err := up.Upgrade(w, r, nil)
	if err != nil {
		return
	}
	defer c.Close()
	sc := &standInConn{c: c, done: make(chan struct{})}
	if sc.send(map[string]any{"type": "hello", "num_connections": 1}) != nil {
		return
	}
	s.conns <- sc
	for {
		_, msg, err := c.ReadMessage()
		if err != nil {
			close(sc.done)
			return
		}
		var ack struct {
			EnvelopeID string          `json:"envelope_id"`
			Payload    json.RawMessage `json:"payload"`
		}
		if json.Unmarshal(msg, &ack) == nil && ack.EnvelopeID != "" {
			s.mu.Lock()
			s.acks[ack.EnvelopeID]++
			if len(ack.Payload) > 0 {
				s.payload[ack.EnvelopeID] = string(ack.Payload)
			}
			s.mu.Unlock()
		}
	}
}

func (c *standInConn) send(v any) error {
	c.wmu.Lock()
	defer c.wmu.Unlock()
	return c.c.WriteJSON(v)
}

// nextConn waits for the child's socket-mode connection (opened only after
// the inbox was replayed).
func (s *standIn) nextConn(t *testing.T, c *child) *standInConn {
	t.Helper()
	select {
	case sc := <-s.conns:
		return sc
	case <-c.done:
		t.Fatalf("the bot exited (%v); log:\n%s", c.err, c.logs.String())
	case <-time.After(60 * time.Second):
		t.Fatalf("no socket-mode connection; log:\n%s", c.logs.String())
	}
	return nil
}

func (s *standIn) acked(id string) (n int, payload string) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.acks[id], s.payload[id]
}
