package slackfront

import (
	"bufio"
	"fmt"
	"net"
	"net/http"
	"strconv"
	"testing"
	"time"
)

// rawStatus opens a connection, sends only the request line and headers
// (the declared body never follows) and returns the status the server
// answers within a second: a refusal that needs no body.
func rawStatus(t *testing.T, addr, headers string) int {
	t.Helper()
	c, err := net.Dial("tcp", addr)
	if err != nil {
		t.Fatal(err)
	}
	defer c.Close()
	_ = c.SetDeadline(time.Now().Add(time.Second))
	if _, err := fmt.Fprintf(c, "POST /slack/commands HTTP/1.1\r\nHost: x\r\nContent-Type: application/x-www-form-urlencoded\r\nContent-Length: %d\r\n%s\r\n", 1<<20, headers); err != nil {
		t.Fatal(err)
	}
	res, err := http.ReadResponse(bufio.NewReader(c), nil)
	if err != nil {
		t.Fatalf("no answer without the body (headers %q): %v", headers, err)
	}
	res.Body.Close()
	return res.StatusCode
}

// Signature headers and the declared length are checked before any of the
// body is read: a request without headers, with a stale timestamp, or
// declaring more than the bound is refused at once although its body never
// arrives.
func TestRefusedBeforeBody(t *testing.T) {
	fs := newFakeSlack(t)
	h := &recHandler{}
	f, _, _ := httpFront(t, fs, h, newMemDedup(), nil)
	now := time.Now().Unix()
	sig := "v0=" + fmt.Sprintf("%064x", 0)
	cases := []struct {
		name, headers string
		want          int
	}{
		{"no headers", "", http.StatusUnauthorized},
		{"stale timestamp", "X-Slack-Request-Timestamp: " + strconv.FormatInt(now-600, 10) + "\r\nX-Slack-Signature: " + sig + "\r\n", http.StatusUnauthorized},
		{"not a v0 signature", "X-Slack-Request-Timestamp: " + strconv.FormatInt(now, 10) + "\r\nX-Slack-Signature: md5=abc\r\n", http.StatusUnauthorized},
		{"declared over the bound", "X-Slack-Request-Timestamp: " + strconv.FormatInt(now, 10) + "\r\nX-Slack-Signature: " + sig + "\r\n", http.StatusRequestEntityTooLarge},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := rawStatus(t, f.Addr(), c.headers); got != c.want {
				t.Fatalf("status %d, want %d", got, c.want)
			}
		})
	}
	if n := len(h.requests()); n != 0 {
		t.Fatalf("%d commands ran", n)
	}
}

// A signed client that stops sending its body is cut off after the body
// deadline, and its slot is free again.
func TestSlowBodyCutOff(t *testing.T) {
	fs := newFakeSlack(t)
	f, _, _ := httpFront(t, fs, &recHandler{}, newMemDedup(), func(c *Config) { c.BodyTimeout = 200 * time.Millisecond })
	c, err := net.Dial("tcp", f.Addr())
	if err != nil {
		t.Fatal(err)
	}
	defer c.Close()
	now := strconv.FormatInt(time.Now().Unix(), 10)
	fmt.Fprintf(c, "POST /slack/commands HTTP/1.1\r\nHost: x\r\nContent-Length: 1000\r\nX-Slack-Request-Timestamp: %s\r\nX-Slack-Signature: v0=%064x\r\n\r\nabc", now, 0)
	_ = c.SetDeadline(time.Now().Add(3 * time.Second))
	start := time.Now()
	res, err := http.ReadResponse(bufio.NewReader(c), nil)
	if err == nil {
		res.Body.Close()
		if res.StatusCode != http.StatusBadRequest {
			t.Fatalf("status %d, want 400 after the body deadline", res.StatusCode)
		}
	}
	if d := time.Since(start); d > 2*time.Second {
		t.Fatalf("the slow body held the connection for %v", d)
	}
}
