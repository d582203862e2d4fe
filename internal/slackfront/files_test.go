package slackfront

import (
	"context"
	"os"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/internal/botstore"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// fileShareDM is a direct message carrying one file, as Slack's Events API
// sends it (message event, subtype file_share, files[]).
func fileShareDM(eventID, user, text, ts string, file map[string]any) []byte {
	return dmEvent(eventID, "D0"+user, user, text, ts, map[string]any{"subtype": "file_share", "files": []map[string]any{file}})
}

// TestSlackCSVFromDirectMessage: a CSV file shared in a direct message is
// fetched with the bot token and imported all-or-nothing; the answer comes
// in the file's thread. The fixture holds 5 attempts for 2 athletes
// (counted by hand from testdata/csv/import-spreadsheet.csv). A file over
// the bound is refused without being fetched, a file without a URL is found
// through files.info, and a CSV with bad rows is refused by row number in a
// channel thread with nothing stored.
func TestSlackCSVFromDirectMessage(t *testing.T) {
	fs := newFakeSlack(t)
	client := newClient(t)
	e, db := engineFront(t)
	if err := db.Update(context.Background(), func(tx *store.Tx) error {
		for _, a := range []record.Athlete{{Name: "Mira", StatureM: 1.78}, {Name: "Kai", StatureM: 1.86}} {
			if err := tx.PutAthlete(&a); err != nil {
				return err
			}
		}
		return nil
	}); err != nil {
		t.Fatal(err)
	}
	good, err := os.ReadFile("../../testdata/csv/import-spreadsheet.csv")
	if err != nil {
		t.Fatal(err)
	}
	bad, err := os.ReadFile("../../testdata/csv/import-errors.csv")
	if err != nil {
		t.Fatal(err)
	}
	fs.mu.Lock()
	fs.files["squad.csv"], fs.files["F0INFO"], fs.files["errors.csv"] = good, good, bad
	fs.mu.Unlock()
	_, addr, _ := httpFront(t, fs, e, botstore.Dedup{DB: db}, func(c *Config) { c.Workers = 1 })
	post := func(body []byte) {
		t.Helper()
		if res := signedPost(t, client, addr+"/slack/events", "application/json", body, time.Now(), nil); res.StatusCode != 200 {
			t.Fatalf("status %d", res.StatusCode)
		}
	}
	// Message times now (the fixture's rows are of 2026-11; a message
	// from before them would make them lie in the future).
	base := time.Now().Unix()
	ts := func(k int64) string { return strconv.FormatInt(base+k, 10) + ".000100" }
	attempts := func() int {
		return len(storedAttempts(t, db, "Mira")) + len(storedAttempts(t, db, "Kai"))
	}

	post(fileShareDM("Ev-f1", "U0HEAD", "", ts(0), map[string]any{
		"id": "F0SQUAD", "name": "squad.csv", "mimetype": "text/csv", "filetype": "csv", "size": len(good),
		"url_private_download": fs.url() + "files-pri/squad.csv",
	}))
	msgs := fs.waitCalls(t, "chat.postMessage", 1)
	if got := blocksText(t, msgs[0]); !strings.Contains(got, "Imported 5 jumps for 2 athletes") {
		t.Fatalf("reply:\n%s", got)
	}
	if msgs[0].Form.Get("thread_ts") != ts(0) || msgs[0].Form.Get("channel") != "D0U0HEAD" {
		t.Errorf("answered in %v", msgs[0].Form)
	}
	dl := fs.callsOf("file download")
	if len(dl) != 1 || dl[0].Header.Get("Authorization") != "Bearer "+testBotToken {
		t.Fatalf("downloads %+v", dl)
	}
	if n := attempts(); n != 5 {
		t.Fatalf("stored %d attempts, want 5", n)
	}

	// Over the bound: refused from the size Slack gives, nothing fetched.
	post(fileShareDM("Ev-f2", "U0HEAD", "import csv", ts(1), map[string]any{
		"id": "F0BIG", "name": "big.csv", "mimetype": "text/csv", "size": 3 << 20,
		"url_private_download": fs.url() + "files-pri/big.csv",
	}))
	waitFor(t, "the second reply", func() bool { return len(fs.posted()) >= 2 })
	if got := blocksText(t, fs.posted()[1]); !strings.Contains(got, "3.0 MiB") || !strings.Contains(got, "up to 2.0 MiB") {
		t.Errorf("big file reply:\n%s", got)
	}
	if n := len(fs.callsOf("file download")); n != 1 {
		t.Errorf("the big file was fetched (%d downloads)", n)
	}

	// No URL in the event: files.info says where; the rows are already
	// stored, so they are skipped as duplicates and nothing is added.
	post(fileShareDM("Ev-f3", "U0HEAD", "", ts(2), map[string]any{"id": "F0INFO", "name": "again.csv"}))
	fs.waitCalls(t, "files.info", 1)
	waitFor(t, "the third reply", func() bool { return len(fs.posted()) >= 3 })
	if n := attempts(); n != 5 {
		t.Errorf("a repeated import stored %d attempts, want still 5", n)
	}

	// A channel thread: "@lathmark import csv" with a file of bad rows.
	post(eventCallback("Ev-f4", map[string]any{
		"type": "app_mention", "user": "U0HEAD", "text": "<@UBOT> import csv", "ts": ts(3),
		"thread_ts": ts(9), "channel": "C0JUMPS", "event_ts": ts(3),
		"files": []map[string]any{{"id": "F0ERR", "name": "errors.csv", "mimetype": "text/csv", "size": len(bad), "url_private_download": fs.url() + "files-pri/errors.csv"}},
	}))
	waitFor(t, "the fourth reply", func() bool { return len(fs.posted()) >= 4 })
	last := fs.posted()[3]
	if got := blocksText(t, last); !strings.Contains(got, "row 3") || !strings.Contains(got, "Nothing was imported") {
		t.Errorf("bad rows reply:\n%s", got)
	}
	if last.Form.Get("thread_ts") != ts(9) {
		t.Errorf("bad rows answered in %v", last.Form)
	}
	if n := attempts(); n != 5 {
		t.Errorf("a refused import stored rows: %d attempts", n)
	}
}

// TestSlackCSVCutAtBound: a file whose size the event does not give is
// cut off at the 2 MiB bound while downloading and refused before parsing.
func TestSlackCSVCutAtBound(t *testing.T) {
	fs := newFakeSlack(t)
	client := newClient(t)
	e, db := engineFront(t)
	huge := []byte("athlete,time,bar_m,outcome\n" + strings.Repeat("Mira,2026-11-20T17:00:00Z,1.70,o\n", (maxUploadBytes/33)+10))
	fs.mu.Lock()
	fs.files["huge.csv"] = huge
	fs.mu.Unlock()
	_, addr, _ := httpFront(t, fs, e, botstore.Dedup{DB: db}, func(c *Config) { c.Workers = 1 })
	ts := strconv.FormatInt(time.Now().Unix(), 10) + ".000100"
	body := fileShareDM("Ev-huge", "U0HEAD", "", ts, map[string]any{"id": "F0HUGE", "name": "huge.csv", "url_private_download": fs.url() + "files-pri/huge.csv"})
	if res := signedPost(t, client, addr+"/slack/events", "application/json", body, time.Now(), nil); res.StatusCode != 200 {
		t.Fatalf("status %d", res.StatusCode)
	}
	waitFor(t, "the reply", func() bool { return len(fs.posted()) >= 1 })
	if got := blocksText(t, fs.posted()[0]); !strings.Contains(got, "larger than 2.0 MiB") {
		t.Errorf("reply:\n%s", got)
	}
	if len(huge) <= maxUploadBytes {
		t.Fatalf("fixture of %d bytes is not over the bound", len(huge))
	}
}
