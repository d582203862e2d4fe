package main

import (
	"context"
	"fmt"
	"io"
	"net/http"
	"net/url"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/botstore"
	"github.com/lathmark-team/lathmark/internal/inboxstore"
	"github.com/lathmark-team/lathmark/internal/slackfront"
)

// Shape of the ack-latency benchmark: requests a second, and how many
// requests one iteration sends to each front end.
const (
	ackRate    = 200
	ackPerIter = 200
)

// BenchmarkAckLatency200 measures how long Slack waits for its 200 at 200
// signed slash commands a second (each a log line, so each writes), with
// the durable inbox (the delivery is committed through the group commit
// before the 200) against the same front end without it, in one run, on
// the same data file and engine. Requests are sent on a fixed schedule, each
// on its own goroutine, so a slow answer does not delay the next request
// (no coordinated omission). It reports p50, p99 and max for both and the
// ratios with/without.
func BenchmarkAckLatency200(b *testing.B) {
	fake := newFakeSlack(b)
	env := func(k string) string { return map[string]string{"TMPDIR": b.TempDir()}[k] }
	cfg, err := parseConfig([]string{"--data", filepath.Join(b.TempDir(), "ack.db")}, env, io.Discard)
	if err != nil {
		b.Fatal(err)
	}
	a, err := newApp(context.Background(), cfg, stdio{strings.NewReader(""), io.Discard, io.Discard})
	if err != nil {
		b.Fatal(err)
	}
	defer a.Close()
	for i := range crashAthletes {
		if r := a.engine.Handle(context.Background(), bot.Request{UserID: operatorID, Text: fmt.Sprintf("athlete add Jumper%02d height 1.80", i)}); !r.OK() {
			b.Fatal(r.Title)
		}
	}
	start := func(inbox slackfront.Inbox) string {
		f, err := slackfront.New(slackfront.Config{
			BotToken: "xoxb-bench", SigningSecret: crashSecret, APIURL: fake.srv.URL + "/api/", HTTPAddr: "127.0.0.1:0",
			Handler: a.engine, Dedup: botstore.Dedup{DB: a.db}, Inbox: inbox, Users: benchUsers{},
		})
		if err != nil {
			b.Fatal(err)
		}
		ctx, cancel := context.WithCancel(context.Background())
		done := make(chan error, 1)
		go func() { done <- f.Run(ctx) }()
		select {
		case <-f.Ready():
		case err := <-done:
			b.Fatal(err)
		}
		b.Cleanup(func() { cancel(); <-done })
		return "http://" + f.Addr() + "/slack/commands"
	}
	without := start(nil)
	with := start(inboxstore.Inbox{DB: a.db, Limit: inboxLimit})
	var latWith, latWithout []time.Duration
	seq := 0
	b.ResetTimer()
	// Each phase waits for the replies of the one before, so that neither
	// runs beside the other's backlog.
	drain := func() {
		deadline := time.Now().Add(time.Minute)
		for fake.count() < seq {
			if time.Now().After(deadline) {
				b.Fatalf("%d replies for %d commands", fake.count(), seq)
			}
			time.Sleep(5 * time.Millisecond)
		}
	}
	for range b.N {
		latWithout = append(latWithout, pacedLoad(b, without, fake, &seq)...)
		drain()
		latWith = append(latWith, pacedLoad(b, with, fake, &seq)...)
		drain()
	}
	b.StopTimer()
	pw, pwo := percentiles(latWith), percentiles(latWithout)
	for i, name := range []string{"p50", "p99", "max"} {
		b.ReportMetric(ms(pw[i]), name+"-inbox-ms")
		b.ReportMetric(ms(pwo[i]), name+"-floor-ms")
		b.ReportMetric(ms(pw[i])/ms(pwo[i]), name+"-ratio")
	}
}

// pacedLoad sends ackPerIter signed log commands at ackRate a second and
// returns each one's time to its 200.
func pacedLoad(b *testing.B, target string, fake *fakeSlack, seq *int) []time.Duration {
	tr := &http.Transport{MaxIdleConnsPerHost: 64}
	defer tr.CloseIdleConnections()
	client := &http.Client{Transport: tr, Timeout: 30 * time.Second}
	lat := make([]time.Duration, ackPerIter)
	var wg sync.WaitGroup
	var failed error
	var mu sync.Mutex
	t0 := time.Now()
	for i := range ackPerIter {
		*seq++
		n := *seq
		time.Sleep(time.Until(t0.Add(time.Duration(i) * time.Second / ackRate)))
		wg.Go(func() {
			body := url.Values{
				"command": {"/lath"}, "text": {crashLine(n)}, "user_id": {operatorID}, "user_name": {"coach"},
				"channel_id": {"C1"}, "team_id": {"T1"}, "trigger_id": {"ack-" + strconv.Itoa(n)},
				"response_url": {fake.srv.URL + "/respond/" + strconv.Itoa(n)},
			}.Encode()
			ts := strconv.FormatInt(time.Now().Unix(), 10)
			req, _ := http.NewRequest(http.MethodPost, target, strings.NewReader(body))
			req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
			req.Header.Set("X-Slack-Request-Timestamp", ts)
			req.Header.Set("X-Slack-Signature", slackfront.Signature(crashSecret, ts, []byte(body)))
			start := time.Now()
			res, err := client.Do(req)
			if err == nil {
				_, _ = io.Copy(io.Discard, res.Body)
				res.Body.Close()
				if res.StatusCode != http.StatusOK {
					err = fmt.Errorf("status %d", res.StatusCode)
				}
			}
			lat[i] = time.Since(start)
			if err != nil {
				mu.Lock()
				failed = err
				mu.Unlock()
			}
		})
	}
	wg.Wait()
	if failed != nil {
		b.Fatal(failed)
	}
	return lat
}

// percentiles returns p50, p99 and max (nearest rank).
func percentiles(d []time.Duration) [3]time.Duration {
	s := slices.Clone(d)
	slices.Sort(s)
	rank := func(p float64) time.Duration {
		i := int(p*float64(len(s))+0.5) - 1
		return s[min(max(i, 0), len(s)-1)]
	}
	return [3]time.Duration{rank(0.50), rank(0.99), s[len(s)-1]}
}

func ms(d time.Duration) float64 { return float64(d.Microseconds()) / 1000 }

type benchUsers struct{}

func (benchUsers) DisplayName(context.Context, string) (string, error) { return "Coach", nil }

func (f *fakeSlack) count() int {
	f.mu.Lock()
	defer f.mu.Unlock()
	return len(f.msgs)
}
