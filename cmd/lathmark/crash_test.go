package main

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"net/http"
	"net/url"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/slackfront"
	"github.com/lathmark-team/lathmark/store"
)

// The crash test of the durable inbox: the bot as a child process gets a
// burst of crashBurst signed commands at once, is killed with SIGKILL right
// after the last acknowledgement, and is started again (which replays its
// inbox before taking traffic). At the end every acknowledged command's
// effect (its logged jump, found by the message id it carries) must be
// there exactly once, and no command refused as busy may have run.
const (
	envInboxRounds   = "LATHMARK_INBOX_CRASH_ROUNDS" // rounds of the long form
	crashShortRounds = 3
	crashBurst       = 200
	crashAthletes    = 40
	crashSecret      = "crash-test-signing-secret"
	crashCoach       = "U_COACH"
)

func crashRounds() int {
	if n, err := strconv.Atoi(os.Getenv(envInboxRounds)); err == nil && n > 0 {
		return n
	}
	return crashShortRounds
}

// seedSquad adds the athletes the burst logs for, at the terminal.
func seedSquad(t *testing.T, data string) {
	t.Helper()
	var in strings.Builder
	for i := range crashAthletes {
		fmt.Fprintf(&in, "athlete add Jumper%02d height 1.80\n", i)
	}
	out, errs, code := runLines(t, in.String(), "--data", data)
	if code != 0 || strings.Count(out, "Added") != crashAthletes {
		t.Fatalf("seeding (code %d):\n%s\n%s", code, out, errs)
	}
}

func crashEnv(t *testing.T, stand *standIn) map[string]string {
	return map[string]string{
		"SLACK_BOT_TOKEN": "xoxb-crash", "SLACK_SIGNING_SECRET": crashSecret, "SLACK_API_URL": stand.apiURL(),
		"LATHMARK_HEAD_COACH": crashCoach, "TMPDIR": t.TempDir(), "LATHMARK_LOG": "warn",
	}
}

// tally is what the senders learnt: which triggers were acknowledged and
// which were refused as busy.
type tally struct {
	mu    sync.Mutex
	acked map[string]bool
	busy  map[string]bool
	sent  int
	// replayed counts deliveries the restarted bots ran from their inbox
	// (acknowledged, not yet run when the kill came).
	replayed int
}

// countReplayed adds what a started child says it replayed.
func (ta *tally) countReplayed(c *child) {
	re := regexp.MustCompile(`acknowledged before the restart".*?count=(\d+)`)
	for _, m := range re.FindAllStringSubmatch(c.logs.String(), -1) {
		n, _ := strconv.Atoi(m[1])
		ta.replayed += n
	}
}

func newTally() *tally { return &tally{acked: map[string]bool{}, busy: map[string]bool{}} }

func (ta *tally) mark(trigger string, acked bool) {
	ta.mu.Lock()
	defer ta.mu.Unlock()
	ta.sent++
	if acked {
		ta.acked[trigger] = true
	} else {
		ta.busy[trigger] = true
	}
}

func crashLine(i int) string { return fmt.Sprintf("log Jumper%02d 1.80 o", i%crashAthletes) }

// httpBurst sends crashBurst signed slash commands at once and returns
// when the last has been answered.
func httpBurst(t *testing.T, addr string, stand *standIn, round int, ta *tally) {
	t.Helper()
	tr := &http.Transport{MaxIdleConnsPerHost: crashBurst}
	defer tr.CloseIdleConnections()
	client := &http.Client{Transport: tr, Timeout: 30 * time.Second}
	var wg sync.WaitGroup
	errs := make(chan error, crashBurst)
	for i := range crashBurst {
		wg.Go(func() {
			trigger := fmt.Sprintf("r%d-%d", round, i)
			body := url.Values{
				"command": {"/lath"}, "text": {crashLine(i)}, "user_id": {crashCoach}, "user_name": {"coach"},
				"channel_id": {"C1"}, "team_id": {"T1"}, "trigger_id": {trigger},
				"response_url": {stand.srv.URL + "/respond/" + trigger},
			}.Encode()
			ts := strconv.FormatInt(time.Now().Unix(), 10)
			req, _ := http.NewRequest(http.MethodPost, "http://"+addr+"/slack/commands", strings.NewReader(body))
			req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
			req.Header.Set("X-Slack-Request-Timestamp", ts)
			req.Header.Set("X-Slack-Signature", slackfront.Signature(crashSecret, ts, []byte(body)))
			res, err := client.Do(req)
			if err != nil {
				errs <- fmt.Errorf("%s: %w", trigger, err)
				return
			}
			answer, _ := io.ReadAll(res.Body)
			res.Body.Close()
			switch {
			case res.StatusCode == http.StatusOK && len(answer) == 0:
				ta.mark(trigger, true)
			case res.StatusCode == http.StatusOK && strings.Contains(string(answer), "nothing was done"):
				ta.mark(trigger, false)
			default:
				errs <- fmt.Errorf("%s: status %d %q", trigger, res.StatusCode, answer)
			}
		})
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		t.Fatal(err)
	}
}

// socketBurst sends crashBurst slash-command envelopes at once over the
// child's socket-mode connection and returns when every one is
// acknowledged.
func socketBurst(t *testing.T, c *child, sc *standInConn, stand *standIn, round int, ta *tally) {
	t.Helper()
	var wg sync.WaitGroup
	for i := range crashBurst {
		wg.Go(func() {
			trigger := fmt.Sprintf("s%d-%d", round, i)
			payload, _ := json.Marshal(map[string]any{
				"command": "/lath", "text": crashLine(i), "user_id": crashCoach, "user_name": "coach",
				"channel_id": "C1", "team_id": "T1", "trigger_id": trigger,
				"response_url": stand.srv.URL + "/respond/" + trigger,
			})
			_ = sc.send(map[string]any{"envelope_id": "env-" + trigger, "type": "slash_commands", "payload": json.RawMessage(payload), "accepts_response_payload": true})
		})
	}
	wg.Wait()
	deadline := time.Now().Add(60 * time.Second)
	for i := 0; i < crashBurst; {
		trigger := fmt.Sprintf("s%d-%d", round, i)
		n, busy := stand.acked("env-" + trigger)
		if n == 0 {
			if time.Now().After(deadline) {
				t.Fatalf("envelope %s never acknowledged; log:\n%s", trigger, c.logs.String())
			}
			time.Sleep(2 * time.Millisecond)
			continue
		}
		ta.mark(trigger, busy == "")
		i++
	}
}

// verifyCrash opens the data file after the last run and checks that
// every acknowledged command logged its jump exactly once, that nothing
// refused as busy ran, that the inbox is empty and the file consistent.
func verifyCrash(t *testing.T, data string, ta *tally, rounds int) {
	t.Helper()
	db, err := store.Open(data, store.Options{ReadOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	if err := db.Check(); err != nil {
		t.Fatalf("consistency check: %v", err)
	}
	if n, err := db.InboxLen(context.Background()); err != nil || n != 0 {
		t.Fatalf("inbox after the last run: %d entries (%v), want 0", n, err)
	}
	found := map[string]int{}
	err = db.View(context.Background(), func(tx *store.Tx) error {
		as, err := tx.Athletes()
		if err != nil {
			return err
		}
		for _, a := range as {
			err := tx.Attempts(a.ID, time.Unix(0, 0), time.Date(2200, 1, 1, 0, 0, 0, 0, time.UTC), func(at record.Attempt) error {
				found[strings.TrimPrefix(at.MessageID, "cmd:")]++
				return nil
			})
			if err != nil {
				return err
			}
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	var lost, dup, ranBusy int
	for trig := range ta.acked {
		switch found[trig] {
		case 0:
			lost++
		case 1:
		default:
			dup++
		}
	}
	for trig := range ta.busy {
		if found[trig] > 0 {
			ranBusy++
		}
	}
	t.Logf("inbox crash summary: %d rounds of %d, %d acknowledged, %d refused busy, %d run from the inbox after a kill, %d jumps found, %d lost, %d duplicated, %d busy ran",
		rounds, crashBurst, len(ta.acked), len(ta.busy), ta.replayed, len(found), lost, dup, ranBusy)
	if lost > 0 || dup > 0 || ranBusy > 0 || len(found) != len(ta.acked) {
		t.Fatalf("%d acknowledged commands lost, %d run twice, %d refused ones run; %d effects for %d acknowledged", lost, dup, ranBusy, len(found), len(ta.acked))
	}
}

// TestInboxCrashHTTP: HTTP mode, SIGKILL right after the last 200.
func TestInboxCrashHTTP(t *testing.T) {
	stand := newStandIn(t)
	data := filepath.Join(t.TempDir(), "crash.db")
	seedSquad(t, data)
	env := crashEnv(t, stand)
	addr := freePort(t)
	rounds := crashRounds()
	ta := newTally()
	for round := range rounds {
		c := startChild(t, env, "--http", addr, "--data", data)
		c.waitHealthy(t, addr)
		ta.countReplayed(c)
		httpBurst(t, addr, stand, round, ta)
		c.kill()
	}
	c := startChild(t, env, "--http", addr, "--data", data)
	c.waitHealthy(t, addr)
	c.stop(t)
	ta.countReplayed(c)
	verifyCrash(t, data, ta, rounds)
}

// TestInboxCrashSocket: socket mode, SIGKILL right after the last ack.
func TestInboxCrashSocket(t *testing.T) {
	stand := newStandIn(t)
	data := filepath.Join(t.TempDir(), "crash.db")
	seedSquad(t, data)
	env := crashEnv(t, stand)
	env["SLACK_APP_TOKEN"] = "xapp-crash"
	delete(env, "SLACK_SIGNING_SECRET")
	rounds := crashRounds()
	ta := newTally()
	for round := range rounds {
		c := startChild(t, env, "--data", data)
		sc := stand.nextConn(t, c)
		ta.countReplayed(c)
		socketBurst(t, c, sc, stand, round, ta)
		c.kill()
	}
	c := startChild(t, env, "--data", data)
	stand.nextConn(t, c)
	c.stop(t)
	ta.countReplayed(c)
	verifyCrash(t, data, ta, rounds)
}
