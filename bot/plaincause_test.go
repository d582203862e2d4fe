package bot_test

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/botstore"
	"github.com/lathmark-team/lathmark/store"
)

// fullDisk is a store whose commits fail as a full disk makes them fail.
type fullDisk struct{ bot.Store }

func (f fullDisk) Update(ctx context.Context, fn func(bot.Tx) error) error {
	return fmt.Errorf("store: commit x.db: %w (write x.db: no space left on device)", store.ErrDiskFull)
}

func (f fullDisk) Batch(ctx context.Context, fn func(bot.Tx) error) error { return f.Update(ctx, fn) }

// A full disk is named as the cause, not "something went wrong".
func TestDiskFullIsNamed(t *testing.T) {
	te := newTestEngine(t)
	e, err := bot.New(bot.Config{Store: fullDisk{botstore.New(te.DB)}, HeadCoaches: []string{"U_HEAD"}})
	if err != nil {
		t.Fatal(err)
	}
	for _, line := range []string{"athlete add Mira height 1.78", "team units imperial"} {
		r := e.Handle(context.Background(), bot.Request{UserID: "U_HEAD", Text: line, Time: testClockStart, MessageID: "full-" + line})
		if r.OK() || len(r.Lines) == 0 || r.Lines[0] != "The disk is full; nothing was saved." {
			t.Errorf("%q on a full disk: %s", line, plain(r))
		}
	}
}

// A damaged record is named as damage; what is still sound is served.
func TestDamagedRecordIsNamed(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "lathmark.db")
	te := newTestEngineAt(t, path)
	te.must("athlete add Mira height 1.78 mass 63 sex f pb 1.81")
	te.must("athlete add Kai height 1.90 mass 75 sex m pb 2.05")
	te.closed = true
	if err := te.DB.Close(); err != nil {
		t.Fatal(err)
	}
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	// Every copy of Mira's profile (free pages may hold older ones).
	bad := bytes.ReplaceAll(data, []byte(`"stature_m":1.78`), []byte(`"stature_m":1.88`))
	if bytes.Equal(bad, data) {
		t.Fatal("profile not found in the file")
	}
	if err := os.WriteFile(path, bad, 0o600); err != nil {
		t.Fatal(err)
	}
	db, err := store.Open(path, testStoreOptions)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	e, err := bot.New(bot.Config{Store: botstore.New(db), HeadCoaches: []string{"U_HEAD"}})
	if err != nil {
		t.Fatal(err)
	}
	ask := func(text string) bot.Reply {
		return e.Handle(context.Background(), bot.Request{UserID: "U_HEAD", Text: text, Time: testClockStart})
	}
	r := ask("athlete Mira")
	if r.OK() || len(r.Lines) == 0 || !strings.HasPrefix(r.Lines[0], "The data file is damaged; run `lathmark check`") || strings.Contains(plain(r), "1.88") {
		t.Errorf("damaged profile: %s", plain(r))
	}
	if r := ask("athlete Kai"); !r.OK() || !strings.Contains(plain(r), "1.90") {
		t.Errorf("sound profile beside a damaged one: %s", plain(r))
	}
}
