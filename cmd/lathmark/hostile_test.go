package main

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"net"
	"net/http"
	"net/url"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/internal/slackfront"
)

// Shape of the hostile-client test.
const (
	hostileClients = 300
	hostileBody    = 1 << 20 // each sends a 1 MiB body
	hostileFor     = 3 * time.Second
	maxRSSBytes    = 100 << 20 // the bound the bot must stay under
	signedEvery    = 25 * time.Millisecond
	signedSenders  = 4
)

// procStatus reads one "kB" field of /proc/PID/status, in bytes.
func procStatus(pid int, field string) (int64, error) {
	b, err := os.ReadFile(fmt.Sprintf("/proc/%d/status", pid))
	if err != nil {
		return 0, err
	}
	for _, line := range strings.Split(string(b), "\n") {
		if v, ok := strings.CutPrefix(line, field+":"); ok {
			kb, err := strconv.ParseInt(strings.TrimSpace(strings.TrimSuffix(strings.TrimSpace(v), "kB")), 10, 64)
			return kb << 10, err
		}
	}
	return 0, fmt.Errorf("no %s in /proc/%d/status", field, pid)
}

// hostileRequest is one unsigned (or falsely signed) client's request: no
// signature headers; a forged signature with the length declared; or a
// forged signature with a chunked body, which the bot must read (up to its
// bound) before it can tell the signature is false.
func hostileRequest(kind int, addr string) []byte {
	var h strings.Builder
	fmt.Fprintf(&h, "POST /slack/commands HTTP/1.1\r\nHost: %s\r\nContent-Type: application/x-www-form-urlencoded\r\n", addr)
	if kind > 0 {
		fmt.Fprintf(&h, "X-Slack-Request-Timestamp: %d\r\nX-Slack-Signature: v0=%064x\r\n", time.Now().Unix(), kind)
	}
	if kind == 2 {
		h.WriteString("Transfer-Encoding: chunked\r\n\r\n")
	} else {
		fmt.Fprintf(&h, "Content-Length: %d\r\n\r\n", hostileBody)
	}
	return []byte(h.String())
}

// attack sends one hostile request with its 1 MiB body and reads whatever
// answer comes; errors are the point (the bot hangs up).
func attack(kind int, addr string, chunk []byte) {
	c, err := net.DialTimeout("tcp", addr, 5*time.Second)
	if err != nil {
		return
	}
	defer c.Close()
	_ = c.SetDeadline(time.Now().Add(10 * time.Second))
	if _, err := c.Write(hostileRequest(kind, addr)); err != nil {
		return
	}
	for sent := 0; sent < hostileBody; sent += len(chunk) {
		var err error
		if kind == 2 {
			_, err = fmt.Fprintf(c, "%x\r\n%s\r\n", len(chunk), chunk)
		} else {
			_, err = c.Write(chunk)
		}
		if err != nil {
			return
		}
	}
	if kind == 2 {
		_, _ = io.WriteString(c, "0\r\n\r\n")
	}
	if res, err := http.ReadResponse(bufio.NewReader(c), nil); err == nil {
		_, _ = io.Copy(io.Discard, res.Body)
		res.Body.Close()
	}
}

// 300 clients without a valid signature, each sending a 1 MiB body over
// and over, keep the bot (a separate process, measured from outside through
// /proc/PID/status) under 100 MB resident, and signed slash commands sent
// meanwhile are all answered.
func TestHostileClientsBoundedMemory(t *testing.T) {
	if runtime.GOOS != "linux" {
		t.Skip("reads /proc/PID/status")
	}
	stand := newStandIn(t)
	data := filepath.Join(t.TempDir(), "hostile.db")
	seedSquad(t, data)
	env := crashEnv(t, stand)
	addr := freePort(t)
	c := startChild(t, env, "--http", addr, "--data", data)
	c.waitHealthy(t, addr)
	pid := c.cmd.Process.Pid
	idle, _ := procStatus(pid, "VmRSS")

	stop := make(chan struct{})
	var wg sync.WaitGroup
	var attacks atomic.Int64
	chunk := bytes.Repeat([]byte("a"), 64<<10)
	for i := range hostileClients {
		wg.Go(func() {
			for {
				select {
				case <-stop:
					return
				default:
				}
				attack(i%3, addr, chunk)
				attacks.Add(1)
			}
		})
	}

	// Signed traffic meanwhile, from a few senders at once.
	var (
		mu                sync.Mutex
		answered, refused int
		retried           int
		slowest           time.Duration
		peakSeen          int64
		senders           sync.WaitGroup
	)
	client := &http.Client{Timeout: 20 * time.Second}
	deadline := time.Now().Add(hostileFor)
	for s := range signedSenders {
		senders.Go(func() {
			for n := 0; time.Now().Before(deadline); n++ {
				trigger := fmt.Sprintf("h%d-%d", s, n)
				body := url.Values{
					"command": {"/lath"}, "text": {crashLine(n)}, "user_id": {crashCoach}, "user_name": {"coach"},
					"channel_id": {"C1"}, "team_id": {"T1"}, "trigger_id": {trigger},
					"response_url": {stand.srv.URL + "/respond/h"},
				}.Encode()
				ts := strconv.FormatInt(time.Now().Unix(), 10)
				req, _ := http.NewRequest(http.MethodPost, "http://"+addr+"/slack/commands", strings.NewReader(body))
				req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
				req.Header.Set("X-Slack-Request-Timestamp", ts)
				req.Header.Set("X-Slack-Signature", slackfront.Signature(crashSecret, ts, []byte(body)))
				start := time.Now()
				res, err := client.Do(req)
				if err != nil {
					// No answer at all (the connection was dropped while
					// it waited behind the attackers): Slack retries an
					// event that got none; so does this sender, once.
					t.Logf("signed request %s: %v; sending it again", trigger, err)
					mu.Lock()
					retried++
					mu.Unlock()
					req, _ = http.NewRequest(http.MethodPost, "http://"+addr+"/slack/commands", strings.NewReader(body))
					req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
					req.Header.Set("X-Slack-Request-Timestamp", ts)
					req.Header.Set("X-Slack-Signature", slackfront.Signature(crashSecret, ts, []byte(body)))
					res, err = client.Do(req)
				}
				if err == nil {
					_, _ = io.Copy(io.Discard, res.Body)
					res.Body.Close()
				}
				took := time.Since(start)
				rss, _ := procStatus(pid, "VmRSS")
				mu.Lock()
				slowest = max(slowest, took)
				peakSeen = max(peakSeen, rss)
				if err == nil && res.StatusCode == http.StatusOK {
					answered++
				} else {
					refused++
					t.Logf("signed request %s: %v", trigger, err)
				}
				mu.Unlock()
				time.Sleep(signedEvery)
			}
		})
	}
	senders.Wait()
	close(stop)
	wg.Wait()
	hwm, err := procStatus(pid, "VmHWM")
	if err != nil {
		t.Fatal(err)
	}
	c.stop(t)
	t.Logf("hostile clients: %d clients, %d requests of 1 MiB sent; bot resident idle %.1f MB, peak (VmHWM) %.1f MB, highest sample %.1f MB; signed: %d answered, %d not, %d sent twice, slowest %v",
		hostileClients, attacks.Load(), mb(idle), mb(hwm), mb(peakSeen), answered, refused, retried, slowest.Round(time.Millisecond))
	if hwm >= maxRSSBytes {
		t.Errorf("peak resident %.1f MB, want under %.0f MB", mb(hwm), mb(maxRSSBytes))
	}
	if refused > 0 || answered == 0 {
		t.Errorf("signed traffic: %d answered, %d not", answered, refused)
	}
}

func mb(b int64) float64 { return float64(b) / 1e6 }
