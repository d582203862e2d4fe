package slackfront

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"net/http"
	"net/http/httptest"
	"strconv"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
)

// countHandler answers every command with a small reply and counts them.
type countHandler struct{ n atomic.Int64 }

func (h *countHandler) Handle(_ context.Context, req bot.Request) bot.Reply {
	h.n.Add(1)
	return bot.Reply{Title: "Logged", Fields: []bot.Field{{Label: "Bar", Value: "1.95 m"}, {Label: "Result", Value: "o"}}}
}

// load sends every body to url from senders goroutines, signed with fresh
// timestamps; a 503 (queue full) is sent again after a millisecond, as
// Slack would later. It returns the slowest answer and how many answers
// took longer than Slack's 3 s and how many were 503.
func load(b *testing.B, client *http.Client, url string, bodies [][]byte, senders int) (maxAck time.Duration, late, busy int64) {
	var (
		next   atomic.Int64
		mu     sync.Mutex
		wg     sync.WaitGroup
		failed atomic.Value
	)
	for range senders {
		wg.Go(func() {
			for {
				i := int(next.Add(1)) - 1
				if i >= len(bodies) {
					return
				}
				for {
					stamp := strconv.FormatInt(time.Now().Unix(), 10)
					req, _ := http.NewRequest(http.MethodPost, url, bytes.NewReader(bodies[i]))
					req.Header.Set("Content-Type", "application/json")
					req.Header.Set(headerTimestamp, stamp)
					req.Header.Set(headerSignature, Signature(testSecret, stamp, bodies[i]))
					start := time.Now()
					res, err := client.Do(req)
					if err != nil {
						failed.Store(err)
						return
					}
					_, _ = io.Copy(io.Discard, res.Body)
					_ = res.Body.Close()
					d := time.Since(start)
					mu.Lock()
					maxAck = max(maxAck, d)
					if d > 3*time.Second {
						late++
					}
					if res.StatusCode == http.StatusServiceUnavailable {
						busy++
					}
					mu.Unlock()
					if res.StatusCode == http.StatusServiceUnavailable {
						time.Sleep(time.Millisecond)
						continue
					}
					if res.StatusCode != http.StatusOK {
						failed.Store(fmt.Errorf("status %d", res.StatusCode))
						return
					}
					break
				}
			}
		})
	}
	wg.Wait()
	if err, _ := failed.Load().(error); err != nil {
		b.Fatal(err)
	}
	return maxAck, late, busy
}

// BenchmarkHTTPEvents measures events handled per second in HTTP mode, end
// to end on loopback: a signed POST to /slack/events, the ack, a worker,
// the Handler, and chat.postMessage on a local fake Slack. It reports the
// slowest ack and, as a floor measured in the same run with the same
// client and load, a bare net/http handler that only reads the body.
func BenchmarkHTTPEvents(b *testing.B) {
	fs := newFakeSlack(b)
	h := &countHandler{}
	cfg := testConfig(fs, h, newMemDedup())
	cfg.HTTPAddr = "127.0.0.1:0"
	cfg.Users = staticUsers{}
	cfg.Workers = 16
	cfg.QueueSize = 1024
	f, err := New(cfg)
	if err != nil {
		b.Fatal(err)
	}
	stop := running(b, f)
	floor := httptest.NewServer(http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		_, _ = io.Copy(io.Discard, r.Body)
		w.WriteHeader(http.StatusOK)
	}))
	defer floor.Close()

	bodies := make([][]byte, b.N)
	for i := range bodies {
		ts := fmt.Sprintf("%d.%06d", 1700000000+i/1000000, i%1000000)
		bodies[i] = mentionEvent(fmt.Sprintf("Ev%08d", i), "C0JUMPS", "U0KAI", "<@UBOT> log Kai 1.95 o", ts)
	}
	tr := &http.Transport{MaxIdleConnsPerHost: 64}
	defer tr.CloseIdleConnections()
	client := &http.Client{Transport: tr}
	const senders = 16

	floorStart := time.Now()
	load(b, client, floor.URL, bodies, senders)
	floorRate := float64(b.N) / time.Since(floorStart).Seconds()

	b.ResetTimer()
	start := time.Now()
	maxAck, late, busy := load(b, client, "http://"+f.Addr()+"/slack/events", bodies, senders)
	waitFor(b, "every event handled", func() bool { return h.n.Load() >= int64(b.N) })
	if err := stop(); err != nil { // waits for the last replies to be posted
		b.Fatal(err)
	}
	elapsed := time.Since(start)
	b.StopTimer()

	if n := len(fs.callsOf("chat.postMessage")); n != b.N {
		b.Fatalf("%d replies posted for %d events", n, b.N)
	}
	rate := float64(b.N) / elapsed.Seconds()
	b.ReportMetric(rate, "events/s")
	b.ReportMetric(float64(maxAck.Microseconds())/1000, "max-ack-ms")
	b.ReportMetric(floorRate, "floor-req/s")
	b.ReportMetric(rate/floorRate, "ratio-to-floor")
	b.ReportMetric(float64(busy), "503s")
	b.ReportMetric(float64(late), "acks-over-3s")
	if late > 0 {
		b.Errorf("%d acks took longer than Slack's 3 s", late)
	}
}
